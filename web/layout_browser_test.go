package web_test

// Browser tests of the page's layout and of the defects it had: one test
// per item of the list they were found in, each checked to fail on the
// page before the fix (see the commit log).

import (
	"context"
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// clockDay is an invented day of n visits as a sites CSV with x,y
// coordinates in km and clock windows built around one random tour at
// 40 km/h, so that it is feasible.
func clockDay(n int, seed uint64) string {
	rng := rand.New(rand.NewPCG(seed, 3))
	var b strings.Builder
	b.WriteString("id,name,x,y,earliest,latest,service\n")
	clock := 7 * 60.0
	px, py := 50.0, 50.0
	fmt.Fprintf(&b, "DEPOT,Yard,%.1f,%.1f,07:00,23:59,0\n", px, py)
	hm := func(m float64) string {
		m = math.Max(0, math.Min(m, 23*60+59))
		return fmt.Sprintf("%02d:%02d", int(m)/60, int(m)%60)
	}
	for i := 1; i <= n; i++ {
		x, y := px+rng.Float64()*6-3, py+rng.Float64()*6-3
		clock += math.Hypot(x-px, y-py) / 40 * 60 * 1.1
		e := clock - 20 - float64(rng.IntN(40))
		fmt.Fprintf(&b, "S%03d,Site %d,%.2f,%.2f,%s,%s,%d\n", i, i, x, y, hm(e), hm(e+90+float64(rng.IntN(60))), 1)
		clock += 1
		px, py = x, y
	}
	return b.String()
}

// loadAverage is the machine's one-minute load, for timings taken on a
// shared machine.
func loadAverage() string {
	b, err := os.ReadFile("/proc/loadavg")
	if err != nil {
		return "unknown"
	}
	return strings.Fields(string(b))[0]
}

func viewport(t *testing.T, ctx context.Context, w, h int64) {
	t.Helper()
	require.NoError(t, chromedp.Do(ctx, chromedp.EmulateViewport(w, h)))
}

// view saves the first screen only (small files, for docs/).
func view(t *testing.T, ctx context.Context, dir, name string) {
	t.Helper()
	require.NoError(t, os.MkdirAll(dir, 0o755))
	b, err := chromedp.Run(ctx, chromedp.CaptureScreenshot())
	require.NoError(t, err)
	require.NoError(t, os.WriteFile(filepath.Join(dir, name+".png"), b, 0o644))
}

func loadExample(t *testing.T, ctx context.Context, key string) {
	t.Helper()
	require.NoError(t, chromedp.Do(ctx, chromedp.SetValue(chromedp.ID("example-pick"), key), chromedp.Click(byTestID("example-load"))))
	waitFor(t, ctx, `!document.querySelector('[data-testid=start]').disabled && document.getElementById('summary').textContent.includes(`+jsString(key[strings.LastIndex(key, "/")+1:])+`)`, 10*time.Second)
}

func jsString(s string) string {
	b, _ := json.Marshal(s)
	return string(b)
}

func paste(t *testing.T, ctx context.Context, text string) {
	t.Helper()
	setField(t, ctx, "paste-input", text)
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(byTestID("paste-load"))))
}

func run(t *testing.T, ctx context.Context, budget string) {
	t.Helper()
	setField(t, ctx, "budget", budget)
	eval[bool](t, ctx, `delete document.body.dataset.run; true`)
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(byTestID("start"))))
	waitFor(t, ctx, `document.body.dataset.run === "finished" && !document.body.dataset.drawing`, 60*time.Second)
}

// Defect 1: an empty closing time froze the tab (a tick per day out to
// 1.9e11 minutes).
func TestDefectEmptyClosingTimeDrawsABoundedAxis(t *testing.T) {
	ctx, _ := tab(t)
	openPage(t, ctx, "")
	text := strings.Replace(string(shared.files["examples/boiler/sites.csv"]), "W03,The Old Forge,10:00,12:00,", "W03,The Old Forge,10:00,,", 1)
	require.NotEqual(t, string(shared.files["examples/boiler/sites.csv"]), text)
	paste(t, ctx, text)
	waitFor(t, ctx, `!document.querySelector('[data-testid=start]').disabled`, 10*time.Second)
	run(t, ctx, "0.5")
	ticks := eval[int](t, ctx, `document.querySelectorAll('[data-testid=timeline] .tick').length`)
	assert.Positive(t, ticks)
	assert.LessOrEqual(t, ticks, 12)
	rows := tableRows(t, ctx)
	col := tableColumns(t, ctx)
	found := false
	for _, r := range rows {
		if r[col["Site"]] == "W03" {
			found = true
			assert.Equal(t, "open", r[col["Slack"]])
			assert.True(t, strings.HasPrefix(r[col["Window"]], "from "), r[col["Window"]])
		}
	}
	assert.True(t, found)
}

// Defect 2: window columns with names the reader does not know were
// skipped, and the page planned a day without windows as "proven".
func TestDefectUnknownWindowHeadersAreNotIgnored(t *testing.T) {
	ctx, _ := tab(t)
	openPage(t, ctx, "")
	paste(t, ctx, "id,name,Time window start,Time window end,service,x,y\nD,Depot,07:00,18:00,0,0,0\nA,Alpha,08:00,09:00,10,3,4\nB,Beta,09:30,10:00,10,6,8\n")
	waitFor(t, ctx, `!document.querySelector('[data-testid=errors]').hidden || !document.querySelector('[data-testid=start]').disabled`, 10*time.Second)
	if eval[bool](t, ctx, `!document.querySelector('[data-testid=errors]').hidden`) {
		assert.Contains(t, eval[string](t, ctx, `document.querySelector('[data-testid=errors]').textContent`), "Time window")
		return
	}
	// Read: then the windows must be the file's.
	assert.NotContains(t, eval[string](t, ctx, `document.getElementById('summary').textContent`), "no closing time")
}

// Defect 3: changed route options were ignored by Start.
func TestDefectRouteOptionsApplyOnStart(t *testing.T) {
	ctx, _ := tab(t)
	openPage(t, ctx, "")
	loadExample(t, ctx, "bakery/sites.csv")
	run(t, ctx, "0.3")
	assert.Equal(t, 1, eval[int](t, ctx, `document.querySelectorAll('[data-testid=timeline] [data-return]').length`))
	setField(t, ctx, "route-end", "free")
	setField(t, ctx, "shift-start", "05:00")
	run(t, ctx, "0.3")
	assert.Zero(t, eval[int](t, ctx, `document.querySelectorAll('[data-testid=timeline] [data-return]').length`), "the route now ends at the last visit")
	assert.Contains(t, eval[string](t, ctx, `document.getElementById('summary').textContent`), "ends at the last visit")
	col := tableColumns(t, ctx)
	assert.Equal(t, localClock(t, ctx, 5, 0), tableRows(t, ctx)[0][col["Start"]], "the shift start applies")
	assert.Equal(t, "sites.csv", eval[string](t, ctx, `document.querySelector('#summary h3').textContent`), "the data keeps its name")
}

// Defect 4: a Windows-1252 file was garbled.
func TestDefectWindows1252FileIsConverted(t *testing.T) {
	ctx, _ := tab(t)
	openPage(t, ctx, "")
	p := filepath.Join(t.TempDir(), "cp1252.csv")
	body := []byte("id,name,open,close,service,x,y\nD,Depot,07:00,18:00,0,0,0\nA,B\xe4ckerei M\xfcller,08:00,09:00,10,3,4\n")
	require.NoError(t, os.WriteFile(p, body, 0o644))
	require.NoError(t, chromedp.Do(ctx, chromedp.SetUploadFiles(byTestID("file-input"), []string{p})))
	waitFor(t, ctx, `document.getElementById('summary').textContent.includes('cp1252.csv')`, 10*time.Second)
	assert.Contains(t, eval[string](t, ctx, `document.querySelector('[data-testid=paste-input]').value`), "Bäckerei Müller")
	assert.Contains(t, eval[string](t, ctx, `document.querySelector('[data-testid=warnings]').textContent`), "Windows-1252")
	run(t, ctx, "0.2")
	assert.Contains(t, eval[string](t, ctx, `document.querySelector('[data-testid=plan-table]').textContent`), "Bäckerei Müller")
}

// Defect 5: Start was below the fold; the first screen holds the run bar.
func TestDefectStartAndBestPlanInTheFirstScreen(t *testing.T) {
	ctx, _ := tab(t)
	for _, vp := range [][2]int64{{1366, 768}, {390, 844}} {
		viewport(t, ctx, vp[0], vp[1])
		openPage(t, ctx, "")
		loadExample(t, ctx, "bakery/sites.csv")
		run(t, ctx, "0.3")
		for _, id := range []string{"start", "stop", "best-cost", "progress", "status"} {
			r := eval[[]float64](t, ctx, `(() => { const r = document.querySelector('[data-testid=`+id+`]').getBoundingClientRect(); return [r.top, r.bottom, r.left, r.right]; })()`)
			assert.GreaterOrEqual(t, r[0], 0.0, "%s at %v", id, vp)
			assert.LessOrEqual(t, r[1], float64(vp[1]), "%s in the first screen at %v", id, vp)
			assert.LessOrEqual(t, r[3], float64(vp[0]), "%s within the width at %v", id, vp)
		}
		assert.False(t, eval[bool](t, ctx, `document.getElementById('experts').open`), "the experts' section starts closed")
		assert.LessOrEqual(t, eval[int](t, ctx, `document.documentElement.scrollWidth`), int(vp[0]), "no sideways scrolling at %v", vp)
	}
	cores := eval[int](t, ctx, `Number(document.querySelector('[data-testid=cores]').value)`)
	hw := eval[int](t, ctx, `navigator.hardwareConcurrency`)
	assert.Equal(t, max(1, min(8, hw-1)), cores)
}

// clipped lists the table cells whose text does not fit, and whether the
// table runs past the plan's panel or the page scrolls sideways.
const clipped = `(() => {
  const out = [];
  const tbl = document.querySelector('[data-testid=plan-table]');
  for (const c of tbl.querySelectorAll('th, td')) if (c.checkVisibility() && c.scrollWidth > c.clientWidth + 1) out.push(c.textContent);
  const panel = document.getElementById('plan-panel').getBoundingClientRect();
  if (tbl.getBoundingClientRect().right > panel.right + 1) out.push('table past its panel');
  if (document.documentElement.scrollWidth > innerWidth) out.push('page scrolls sideways');
  return out;
})()`

// Defect 5 (table): no column is cut at 1366 px, no date in every cell,
// and the table does not scroll inside the page. The screenshots of every
// example at three widths go to docs/ with VISITLINE_DOCS_SHOTS=docs.
func TestDefectTableFitsAtEveryWidthForEachExample(t *testing.T) {
	ctx, _ := tab(t)
	docs := os.Getenv("VISITLINE_DOCS_SHOTS")
	widths := []int64{1366}
	if docs != "" {
		widths = []int64{390, 1366, 1920}
	}
	keys := []string{"art/sites.csv", "bakery/sites.csv", "boiler/sites.csv", "boiler/sites-overbooked.csv", "warehouse/picks.txt"}
	for _, w := range widths {
		viewport(t, ctx, w, map[int64]int64{390: 844, 1366: 768, 1920: 1080}[w])
		openPage(t, ctx, "")
		for _, key := range keys {
			loadExample(t, ctx, key)
			run(t, ctx, "0.5")
			if w >= 1366 {
				assert.Empty(t, eval[[]string](t, ctx, clipped), "%s at %d px", key, w)
			}
			assert.Equal(t, "visible", eval[string](t, ctx, `getComputedStyle(document.querySelector('[data-testid=plan-table]').parentElement).overflowY`), "no scrolling box around the table")
			if key == "art/sites.csv" {
				assert.NotContains(t, eval[string](t, ctx, `document.querySelector('[data-testid=plan-table] tbody').textContent`), "2026", "the date is in the heading, not in the cells")
				assert.Contains(t, eval[string](t, ctx, `document.querySelector('[data-testid=table-day]').textContent`), "2026")
			}
			name := strings.NewReplacer("/", "-", ".csv", "", ".txt", "").Replace(key)
			if docs != "" {
				// On a phone the day plan comes after the data: show it there.
				eval[bool](t, ctx, `window.scrollTo(0, `+map[bool]string{true: `document.getElementById('plan-panel').getBoundingClientRect().top + scrollY`, false: "0"}[w < 900]+`); true`)
				view(t, ctx, docs, fmt.Sprintf("page-%s-%d", name, w))
			} else {
				screenshot(t, ctx, fmt.Sprintf("layout-%s-%d", name, w))
			}
		}
	}
}

// Defect 5 (timeline): at 200 visits the rows compress, the plan fits in
// about two screens and the axis stays in view while scrolled; 500 visits
// draw, and the drawing time is reported (not asserted: shared machine).
func TestDefectTimelineAt200And500Visits(t *testing.T) {
	ctx, _ := tab(t)
	viewport(t, ctx, 1366, 768)
	openPage(t, ctx, "")
	paste(t, ctx, clockDay(200, 1))
	waitFor(t, ctx, `!document.querySelector('[data-testid=start]').disabled`, 20*time.Second)
	run(t, ctx, "1")
	require.Equal(t, 201, eval[int](t, ctx, `document.querySelectorAll('[data-testid=timeline] [data-visit]').length`))
	h := eval[float64](t, ctx, `document.querySelector('[data-testid=timeline]').getBoundingClientRect().height`)
	assert.Less(t, h, 2.0*768, "200 visits in under two screens (%.0f px)", h)
	t.Logf("200 visits: timeline %.0f px tall, drawn in %s ms", h, eval[string](t, ctx, `document.querySelector('[data-testid=timeline]').dataset.drawMs`))
	assert.Contains(t, eval[string](t, ctx, `(() => { document.querySelector('[data-testid=timeline] [data-visit="S100"] .track').dispatchEvent(new MouseEvent('mouseover', {bubbles: true}));
	  return document.querySelector('[data-testid=visit-detail]').textContent; })()`), "(Site 100)", "names on hover")
	eval[bool](t, ctx, `(() => { const tl = document.querySelector('[data-testid=timeline]'); window.scrollTo(0, tl.getBoundingClientRect().top + scrollY + tl.offsetHeight / 2); return true; })()`)
	top := eval[float64](t, ctx, `document.querySelector('[data-testid=timeline] .axis').getBoundingClientRect().top`)
	bar := eval[float64](t, ctx, `document.querySelector('.runbar').getBoundingClientRect().bottom`)
	assert.InDelta(t, bar, top, 2, "the axis sticks under the run bar while the rows scroll")
	assert.Greater(t, bar, 0.0, "and the run bar (Start, Stop, the best plan) stays in view")
	assert.Less(t, bar, 150.0)
	view(t, ctx, "testout", "layout-200-visits-scrolled")
	if d := os.Getenv("VISITLINE_DOCS_SHOTS"); d != "" {
		for _, w := range []int64{390, 1366, 1920} {
			viewport(t, ctx, w, map[int64]int64{390: 844, 1366: 768, 1920: 1080}[w])
			eval[bool](t, ctx, `window.scrollTo(0, `+map[bool]string{true: `document.getElementById('plan-panel').getBoundingClientRect().top + scrollY`, false: "0"}[w < 900]+`); true`)
			view(t, ctx, d, fmt.Sprintf("page-200-visits-%d", w))
		}
		viewport(t, ctx, 1366, 768)
	} else {
		screenshot(t, ctx, "layout-200-visits")
	}

	paste(t, ctx, clockDay(500, 2))
	waitFor(t, ctx, `!document.querySelector('[data-testid=start]').disabled && document.getElementById('summary').textContent.includes('500')`, 30*time.Second)
	run(t, ctx, "1")
	require.Equal(t, 501, eval[int](t, ctx, `document.querySelectorAll('[data-testid=timeline] [data-visit]').length`))
	t.Logf("500 visits: last plan drawn in %s ms, of which %s ms building the rows and the rest layout (1366x768; load average %s)",
		eval[string](t, ctx, `document.querySelector('[data-testid=timeline]').dataset.drawMs`), eval[string](t, ctx, `document.querySelector('[data-testid=timeline]').dataset.buildMs`), loadAverage())
}

// Defect 9: a share link carries the plan; the receiver sees it drawn
// without pressing Start.
func TestDefectShareLinkOpensWithThePlanDrawn(t *testing.T) {
	ctx, _ := tab(t)
	openPage(t, ctx, "")
	loadExample(t, ctx, "bakery/sites.csv")
	run(t, ctx, "0.5")
	cost := eval[string](t, ctx, `document.querySelector('[data-testid=best-cost]').dataset.cost`)
	rows := tableRows(t, ctx)
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(byTestID("share-link"))))
	waitFor(t, ctx, `!document.querySelector('[data-testid=share-url]').hidden`, 5*time.Second)
	link := eval[string](t, ctx, `document.querySelector('[data-testid=share-url]').value`)

	other, _ := tab(t)
	// A mail program glued a full stop to the link.
	require.NoError(t, chromedp.Do(other, chromedp.Navigate(link+".")))
	waitFor(t, other, `document.body.dataset.engine === "ready" && document.querySelectorAll('[data-testid=timeline] [data-visit]').length > 0`, 20*time.Second)
	assert.Equal(t, cost, eval[string](t, other, `document.querySelector('[data-testid=best-cost]').dataset.cost`))
	assert.Equal(t, rows, tableRows(t, other))
	assert.Contains(t, eval[string](t, other, `document.querySelector('[data-testid=status]').textContent`), "shared plan")
	assert.NotEqual(t, "running", eval[string](t, other, `document.body.dataset.run || ""`), "nothing was started")
}

// TestThousandSites drives a generated 1,000-site day through the page
// once: read, search, draw, and how long the page's own event loop is
// held up while it runs (a timer's lateness). Reported, not asserted;
// VISITLINE_BIG=FILE runs it (make one with visitline gen --n 1000).
func TestThousandSites(t *testing.T) {
	file := os.Getenv("VISITLINE_BIG")
	if file == "" {
		t.Skip("set VISITLINE_BIG to a generated 1,000-site file")
	}
	text, err := os.ReadFile(file)
	require.NoError(t, err)
	ctx, _ := tab(t)
	viewport(t, ctx, 1366, 768)
	openPage(t, ctx, "")
	p := filepath.Join(t.TempDir(), "n1000.txt")
	require.NoError(t, os.WriteFile(p, text, 0o644))
	t0 := time.Now()
	require.NoError(t, chromedp.Do(ctx, chromedp.SetUploadFiles(byTestID("file-input"), []string{p})))
	waitFor(t, ctx, `!document.querySelector('[data-testid=start]').disabled || !document.querySelector('[data-testid=errors]').hidden`, 120*time.Second)
	t.Logf("1,000 sites (%d bytes) read in %.1f s", len(text), time.Since(t0).Seconds())
	t0 = time.Now()
	setField(t, ctx, "budget", "10")
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(byTestID("start"))))
	waitFor(t, ctx, `document.querySelectorAll('[data-testid=timeline] [data-visit]').length === 1000`, 120*time.Second)
	t.Logf("first plan drawn %.1f s after Start", time.Since(t0).Seconds())
	// How long the page takes to answer while the search runs: a round
	// trip of a trivial script, every 200 ms.
	var worst time.Duration
	for eval[string](t, ctx, `document.body.dataset.run || ""`) == "running" {
		t1 := time.Now()
		eval[bool](t, ctx, `true`)
		worst = max(worst, time.Since(t1))
		time.Sleep(200 * time.Millisecond)
	}
	waitFor(t, ctx, `document.body.dataset.run === "finished" && !document.body.dataset.drawing`, 180*time.Second)
	t.Logf("finished %.1f s after Start (budget 10 s): %s; last drawing %s ms; slowest answer of the page while searching %d ms; load average %s",
		time.Since(t0).Seconds(), eval[string](t, ctx, `document.querySelector('[data-testid=status]').textContent`),
		eval[string](t, ctx, `document.querySelector('[data-testid=timeline]').dataset.drawMs`), worst.Milliseconds(), loadAverage())
	h := eval[float64](t, ctx, `document.querySelector('[data-testid=timeline]').getBoundingClientRect().height`)
	t.Logf("timeline %.0f px tall, rows built in %s ms; table drawn in %s ms; page %d px", h, eval[string](t, ctx, `document.querySelector('[data-testid=timeline]').dataset.buildMs`),
		eval[string](t, ctx, `document.querySelector('[data-testid=plan-table]').dataset.drawMs`), eval[int](t, ctx, `document.documentElement.scrollHeight`))
	view(t, ctx, "testout", "layout-1000-sites")
}

// Defects 6 and 7: the completion objective reads as a finishing time,
// not as a cost in minutes; a weak bound reads as no verdict, with the
// figures one click away.
func TestDefectNumbersAndBoundInWords(t *testing.T) {
	ctx, _ := tab(t)
	openPage(t, ctx, "")
	loadExample(t, ctx, "bakery/sites.csv")
	setField(t, ctx, "objective", "completion")
	run(t, ctx, "0.5")
	rows := tableRows(t, ctx)
	col := tableColumns(t, ctx)
	best := eval[string](t, ctx, `document.querySelector('[data-testid=best-cost]').textContent`)
	assert.True(t, strings.HasPrefix(best, "ends at "+rows[len(rows)-1][col["Arrival"]]), "%q: the finishing clock time, the return's arrival", best)
	for _, r := range rows {
		for _, c := range []string{"Wait", "Slack"} {
			assert.Regexp(t, `^(–|open|\d+ min|\d+:\d\d h|late by .*)$`, r[col[c]], "%s in whole minutes or H:MM", c)
		}
	}

	paste(t, ctx, clockDay(200, 1))
	waitFor(t, ctx, `!document.querySelector('[data-testid=start]').disabled && document.getElementById('summary').textContent.includes('200')`, 20*time.Second)
	setField(t, ctx, "objective", "travel")
	run(t, ctx, "1")
	q := eval[string](t, ctx, `document.querySelector('[data-testid=quality]').textContent`)
	details := eval[string](t, ctx, `document.querySelector('[data-testid=bound-details]').textContent`)
	t.Logf("200 visits: %q; details: %q", q, details)
	if !strings.HasPrefix(q, "within ") && q != "proven best" {
		assert.NotContains(t, q, "%", "a gap of 5 %% or more is not shown as a verdict")
	}
	if strings.Contains(q, "yet") {
		assert.Contains(t, details, "at most", "the exact figures stay in the details")
	}
}

// On a wide screen the run bar stays at the top; a long table scrolled
// under it keeps its column names in sight just below the bar.
func TestTableColumnNamesStayUnderTheRunBar(t *testing.T) {
	ctx, _ := tab(t)
	viewport(t, ctx, 1366, 768)
	openPage(t, ctx, "")
	paste(t, ctx, clockDay(60, 1))
	waitFor(t, ctx, `!document.querySelector('[data-testid=start]').disabled`, 20*time.Second)
	run(t, ctx, "0.5")
	eval[bool](t, ctx, `(() => { const t = document.getElementById('plan-table'); window.scrollTo(0, t.getBoundingClientRect().top + scrollY + 400); return true; })()`)
	waitFor(t, ctx, `document.getElementById('plan-table').getBoundingClientRect().top < 0`, 5*time.Second)
	bar := eval[float64](t, ctx, `document.querySelector('.runbar').getBoundingClientRect().bottom`)
	top := eval[float64](t, ctx, `document.querySelector('#plan-table thead th').getBoundingClientRect().top`)
	assert.InDelta(t, bar, top, 2, "the column names sit just under the run bar")
	under := eval[string](t, ctx, `(() => { const b = document.querySelector('.runbar').getBoundingClientRect().bottom; const e = document.elementFromPoint(innerWidth * 0.75, b + 4); return e ? e.tagName + (e.closest('thead') ? ' in thead' : '') : ''; })()`)
	assert.Equal(t, "TH in thead", under, "what shows just under the bar is a column name, not a row")
}

// A plan of hundreds of rows shows its first 400 in the table and a button
// for the rest (the layout of thousands of rows froze the page for a
// second and more after each new plan); the button shows every row, the
// printed sheet has every row, and the next plan keeps them all shown.
func TestLongPlanTableShowsTheFirstRowsAndAllOnAsking(t *testing.T) {
	ctx, _ := tabFor(t, 3*time.Minute)
	viewport(t, ctx, 1366, 768)
	openPage(t, ctx, "")
	paste(t, ctx, clockDay(700, 2))
	waitFor(t, ctx, `!document.querySelector('[data-testid=start]').disabled`, time.Minute)
	run(t, ctx, "1")
	rows := func() int {
		return eval[int](t, ctx, `document.querySelectorAll('[data-testid=plan-table] tbody tr:not(.more-rows)').length`)
	}
	assert.Equal(t, 400, rows(), "the first 400 rows")
	all := eval[string](t, ctx, `document.querySelector('[data-testid=table-all]').dataset.rows`)
	assert.Equal(t, "702", all, "the start, 700 visits and the return")
	assert.Contains(t, eval[string](t, ctx, `document.querySelector('[data-testid=table-all]').textContent`), "Show all 702 rows")
	eval[bool](t, ctx, `(() => { window.dispatchEvent(new Event('beforeprint')); return true; })()`)
	assert.Equal(t, 702, rows(), "the printed sheet has every row")
	run(t, ctx, "0.5")
	assert.Equal(t, 400, rows(), "printing did not ask for every row on the page")
	eval[bool](t, ctx, `(() => { document.querySelector('[data-testid=table-all]').click(); return true; })()`)
	waitFor(t, ctx, `!document.querySelector('[data-testid=table-all]')`, 10*time.Second)
	assert.Equal(t, 702, rows(), "every row on asking")
	run(t, ctx, "0.5")
	assert.Equal(t, 702, rows(), "the next plan of the same data keeps every row shown")

	// A day this large gets its CSV export from the engine on asking:
	// every row, in the plan's order.
	name, text := exportText(t, ctx, "export-csv")
	assert.True(t, strings.HasSuffix(name, "-plan.csv"), name)
	lines := strings.Split(strings.TrimSpace(text), "\n")
	require.Len(t, lines, 703, "the header and 702 rows")
	assert.True(t, strings.HasPrefix(lines[0], "order,site,name,arrival"), lines[0])
	ids := eval[[]string](t, ctx, `[...document.querySelectorAll('[data-testid=plan-table] tbody tr:not(.more-rows) th')].map(th => th.textContent)`)
	for i, id := range ids {
		assert.Equal(t, id, strings.Split(lines[1+i], ",")[1], "row %d", i+1)
	}
}

// A day where every visit is late names the first dozen late visits and
// counts the rest, rather than burying its sentence under hundreds of
// names (a 1,000-site day stopped early listed 666).
func TestWhyNamesTheFirstDozenLateVisits(t *testing.T) {
	ctx, _ := tab(t)
	openPage(t, ctx, "")
	var b strings.Builder
	b.WriteString("id,x,y,open,close,service\nD,0,0,0,100000,0\n")
	for i := 1; i <= 20; i++ {
		fmt.Fprintf(&b, "S%d,%d,0,0,1,1\n", i, 50+i) // an hour away, due within a minute
	}
	paste(t, ctx, b.String())
	waitFor(t, ctx, `!document.querySelector('[data-testid=start]').disabled`, 10*time.Second)
	run(t, ctx, "0.5")
	why := eval[string](t, ctx, `document.querySelector('[data-testid=why]').textContent`)
	assert.Contains(t, why, "20 visits are late")
	assert.Len(t, regexp.MustCompile(`S\d+ by `).FindAllString(why, -1), 12, why)
	assert.Contains(t, why, "and 8 more, marked in the plan")
	assert.Equal(t, 20, eval[int](t, ctx, `document.querySelectorAll('[data-testid=timeline] .visit.is-late').length`), "the timeline marks every one")
}
