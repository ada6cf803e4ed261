package web_test

// Browser tests: the built site in Debian's Chromium, driven with chromedp
// as a person would use it. They build engine.wasm themselves, so plain
// `go test ./...` runs them; without a browser they skip, except under
// CI=true, where a missing browser fails. Screenshots of the main states go
// to web/testout/ (git-ignored) for a person to look at.

import (
	"compress/gzip"
	"context"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"net/http"
	"net/http/httptest"
	"net/url"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/cdproto/network"
	"github.com/chromedp/cdproto/page"
	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"visitline/solver"
	"visitline/solver/format"
	"visitline/web"
)

var shared struct {
	once  sync.Once
	err   error
	files map[string][]byte
	tmp   string
	srv   *httptest.Server

	proxy *httptest.Server
	seen  requests

	browserOnce sync.Once
	browser     context.Context
	browserErr  error
	cancel      []func()
}

func TestMain(m *testing.M) {
	code := m.Run()
	for i := len(shared.cancel) - 1; i >= 0; i-- {
		shared.cancel[i]()
	}
	if shared.srv != nil {
		shared.srv.Close()
	}
	if shared.tmp != "" {
		os.RemoveAll(shared.tmp)
	}
	os.Exit(code)
}

// longInstance is an invented 60-site day in the plain matrix format, with
// windows built around one random tour so that it is feasible, and wide
// enough that a search has plenty to improve for many seconds.
func longInstance(n int, seed uint64) string {
	rng := rand.New(rand.NewPCG(seed, 7))
	xs, ys := make([]float64, n), make([]float64, n)
	for i := range xs {
		xs[i], ys[i] = rng.Float64()*100, rng.Float64()*100
	}
	t := func(i, j int) int {
		if i == j {
			return 0
		}
		d := math.Hypot(xs[i]-xs[j], ys[i]-ys[j])
		if j < i { // one direction is slower: uphill, one-way streets
			d *= 1.15
		}
		return int(math.Round(d)) + 1
	}
	perm := rng.Perm(n - 1)
	early, late := make([]int, n), make([]int, n)
	clock := 0
	prev := 0
	for _, p := range perm {
		v := p + 1
		clock += t(prev, v)
		early[v] = max(0, clock-30-rng.IntN(60))
		late[v] = clock + 30 + rng.IntN(60)
		clock += 5
		prev = v
	}
	early[0], late[0] = 0, clock+t(prev, 0)+200
	var b strings.Builder
	fmt.Fprintf(&b, "# invented test day: %d sites\n%d\n", n-1, n)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			if j > 0 {
				b.WriteByte(' ')
			}
			// Service (5) is folded into travel, as the format wants.
			v := t(i, j)
			if i != j {
				v += 5
			}
			fmt.Fprint(&b, v)
		}
		b.WriteByte('\n')
	}
	for i := 0; i < n; i++ {
		fmt.Fprintf(&b, "%d %d\n", early[i], late[i])
	}
	return b.String()
}

func site(t *testing.T) map[string][]byte {
	t.Helper()
	shared.once.Do(func() {
		shared.tmp, shared.err = os.MkdirTemp("", "visitline-web-test-")
		if shared.err != nil {
			return
		}
		out := filepath.Join(shared.tmp, "engine.wasm")
		ctx, cancel := context.WithTimeout(context.Background(), 3*time.Minute)
		defer cancel()
		if shared.err = web.CompileEngine(ctx, "..", out); shared.err != nil {
			return
		}
		eng, err := os.ReadFile(out)
		if err != nil {
			shared.err = err
			return
		}
		wexec, err := web.WasmExec(ctx)
		if err != nil {
			shared.err = err
			return
		}
		shared.files, shared.err = web.Files(web.Options{Engine: eng, WasmExec: wexec})
		if shared.err == nil {
			shared.srv = httptest.NewServer(web.Handler(shared.files))
			shared.proxy = httptest.NewServer(recordingProxy(shared.srv, &shared.seen))
		}
	})
	require.NoError(t, shared.err)
	return shared.files
}

func chromiumPath() string {
	for _, p := range []string{"/usr/bin/chromium", "/usr/bin/chromium-browser"} {
		if _, err := os.Stat(p); err == nil {
			return p
		}
	}
	if p, err := exec.LookPath("chromium"); err == nil {
		return p
	}
	return ""
}

// tab opens a fresh tab of the shared browser, recording every request the
// page and its worker make.
func tab(t *testing.T) (context.Context, *requests) {
	t.Helper()
	return tabFor(t, 90*time.Second)
}

// tabFor is tab for a test that may take up to d.
func tabFor(t *testing.T, d time.Duration) (context.Context, *requests) {
	t.Helper()
	path := chromiumPath()
	if path == "" {
		if os.Getenv("CI") == "true" {
			t.Fatal("chromium is missing; under CI=true the browser tests must run (apt-get install -y chromium)")
		}
		t.Skip("chromium not found (apt-get install -y chromium); skipping the browser tests")
	}
	site(t)
	shared.browserOnce.Do(func() {
		prof, err := os.MkdirTemp(shared.tmp, "profile-")
		if err != nil {
			shared.browserErr = err
			return
		}
		actx, c1 := chromedp.NewExecAllocator(context.Background(),
			chromedp.ExecPath(path), chromedp.Headless, chromedp.NoSandbox, chromedp.DisableGPU,
			chromedp.NoFirstRun, chromedp.NoDefaultBrowserCheck, chromedp.UserDataDir(prof),
			chromedp.Flag("disable-background-networking", true), chromedp.Flag("disable-component-update", true),
			chromedp.Flag("disable-sync", true), chromedp.Flag("disable-default-apps", true),
			// The browser's own services stay quiet, so that the proxy below
			// sees only what the page asks for.
			chromedp.Flag("disable-features", "AutofillServerCommunication,OptimizationHints,Translate,MediaRouter,DialMediaRouteProvider,InterestFeedContentSuggestions,CertificateTransparencyComponentUpdater"),
			chromedp.Flag("disable-extensions", true), chromedp.Flag("no-pings", true), chromedp.Flag("disable-client-side-phishing-detection", true),
			chromedp.Flag("disable-domain-reliability", true), chromedp.Flag("disable-breakpad", true),
			// Every request of the page and its worker goes through the
			// recording proxy, loopback included, so the test sees them all.
			chromedp.ProxyServer(shared.proxy.URL), chromedp.Flag("proxy-bypass-list", "<-loopback>"),
			chromedp.WindowSize(1440, 1000))
		bctx, c2 := chromedp.NewContext(actx)
		shared.cancel = append(shared.cancel, c1, c2)
		shared.browserErr = chromedp.Do(bctx, chromedp.Navigate("about:blank"))
		shared.browser = bctx
	})
	require.NoError(t, shared.browserErr)
	// A browser context of its own per test: storage starts empty.
	ctx, cancel := chromedp.NewContext(shared.browser, chromedp.WithNewBrowserContext())
	t.Cleanup(cancel)
	ctx, cancel2 := context.WithTimeout(ctx, d)
	t.Cleanup(cancel2)
	require.NoError(t, chromedp.Do(ctx, chromedp.Navigate("about:blank")))
	rec := &requests{from: &shared.seen, mark: len(shared.seen.list())}
	t.Cleanup(func() {
		for _, u := range rec.from.list()[rec.mark:] {
			if browserService(u) {
				t.Logf("the browser itself asked for %s (not the page; not counted)", u)
			}
		}
	})
	require.NoError(t, chromedp.Listen(ctx, func(ev any) {
		if e, ok := ev.(*network.EventRequestWillBeSent); ok {
			rec.add(e.Request.URL)
		}
	}))
	_, err := chromedp.Call(ctx, network.Enable, network.EnableParams{})
	require.NoError(t, err)
	return ctx, rec
}

type requests struct {
	mu   sync.Mutex
	urls []string
	// from, when set, adds what the proxy saw since mark.
	from *requests
	mark int
}

// recordingProxy stands between the browser and every server: it records
// each request and passes those for the site's server to it; anything else
// gets 403 without a connection being made.
func recordingProxy(site *httptest.Server, rec *requests) http.Handler {
	su, _ := url.Parse(site.URL)
	h := web.Handler(shared.files)
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		if r.Method == http.MethodConnect {
			rec.add("https://" + r.Host + "/")
			http.Error(w, "no", http.StatusForbidden)
			return
		}
		rec.add(r.URL.String())
		if r.URL.Host != su.Host {
			http.Error(w, "outside the origin", http.StatusForbidden)
			return
		}
		h.ServeHTTP(w, r)
	})
}

func (r *requests) add(u string) {
	r.mu.Lock()
	r.urls = append(r.urls, u)
	r.mu.Unlock()
}

// list gives what the page's own network events saw, all of it, and what
// the proxy saw (which includes the worker's requests) less the browser's
// own service traffic (updates, sign-in), which no page can cause: a page
// asking for those hosts would still show in its network events.
func (r *requests) list() []string {
	r.mu.Lock()
	out := append([]string(nil), r.urls...)
	r.mu.Unlock()
	if r.from != nil {
		for _, u := range r.from.list()[r.mark:] {
			if !browserService(u) {
				out = append(out, u)
			}
		}
	}
	return out
}

func browserService(u string) bool {
	pu, err := url.Parse(u)
	if err != nil {
		return false
	}
	h := pu.Hostname()
	for _, suffix := range []string{".googleapis.com", ".google.com", ".gvt1.com", ".gstatic.com"} {
		if strings.HasSuffix(h, suffix) {
			return true
		}
	}
	return false
}

func eval[T any](t *testing.T, ctx context.Context, expr string) T {
	t.Helper()
	v, err := chromedp.Run(ctx, chromedp.Evaluate[T](expr, chromedp.EvalAwaitPromise))
	require.NoError(t, err, expr)
	return v
}

func waitFor(t *testing.T, ctx context.Context, expr string, d time.Duration) {
	t.Helper()
	_, err := chromedp.Run(ctx, chromedp.Poll[chromedp.Void](expr, chromedp.WithPollingTimeout(d), chromedp.WithPollingInterval(20*time.Millisecond)))
	if err != nil {
		status := eval[string](t, ctx, `document.querySelector('[data-testid=status]').textContent`)
		t.Fatalf("waiting for %s: %v (status: %s)", expr, err, status)
	}
}

// setField sets an input by test id as typing would (also inside a closed
// section) and fires input and change.
func setField(t *testing.T, ctx context.Context, id, value string) {
	t.Helper()
	v, _ := json.Marshal(value)
	eval[bool](t, ctx, `(() => { const e = document.querySelector('[data-testid=`+id+`]'); e.value = `+string(v)+`;
	  e.dispatchEvent(new Event('input', {bubbles: true})); e.dispatchEvent(new Event('change', {bubbles: true})); return true; })()`)
}

// localClock is how the browser's locale writes hh:mm.
func localClock(t *testing.T, ctx context.Context, h, m int) string {
	return eval[string](t, ctx, fmt.Sprintf(`new Date(Date.UTC(2000, 0, 1, %d, %d)).toLocaleTimeString(undefined, {hour: "2-digit", minute: "2-digit", timeZone: "UTC"})`, h, m))
}

func byTestID(id string) chromedp.CSS { return chromedp.CSS(`[data-testid="` + id + `"]`) }

func screenshot(t *testing.T, ctx context.Context, name string) {
	t.Helper()
	dir := os.Getenv("VISITLINE_SCREENSHOTS")
	if dir == "" {
		dir = "testout"
	}
	require.NoError(t, os.MkdirAll(dir, 0o755))
	b, err := chromedp.Run(ctx, chromedp.FullScreenshot(100))
	require.NoError(t, err)
	ext := ".png"
	if len(b) > 2 && b[0] == 0xff && b[1] == 0xd8 {
		ext = ".jpg"
	}
	require.NoError(t, os.WriteFile(filepath.Join(dir, name+ext), b, 0o644))
}

// captureDownloads wraps URL.createObjectURL so the test can read what the
// page hands to the browser as a download.
const captureDownloads = `(() => {
  window.__blobs = [];
  const orig = URL.createObjectURL.bind(URL);
  URL.createObjectURL = (b) => { window.__blobs.push(b); return orig(b); };
  HTMLAnchorElement.prototype.click = function () { window.__lastDownload = this.download; };
  return true;
})()`

func openPage(t *testing.T, ctx context.Context, query string) {
	t.Helper()
	require.NoError(t, chromedp.Do(ctx, chromedp.Navigate(shared.srv.URL+"/"+query)))
	waitFor(t, ctx, `document.body.dataset.engine === "ready"`, 20*time.Second)
	eval[bool](t, ctx, captureDownloads)
}

type planOut struct {
	Cost     float64  `json:"cost"`
	Feasible bool     `json:"feasible"`
	Route    []int    `json:"route"`
	RouteIDs []string `json:"route_ids"`
	Schedule []struct {
		ID        string  `json:"id"`
		Arrival   float64 `json:"arrival"`
		Start     float64 `json:"start"`
		Wait      float64 `json:"wait"`
		Departure float64 `json:"departure"`
		Earliest  float64 `json:"earliest"`
		Latest    float64 `json:"latest"`
		Slack     float64 `json:"slack"`
	} `json:"schedule"`
	Return *struct {
		ID      string  `json:"id"`
		Arrival float64 `json:"arrival"`
	} `json:"return"`
}

// exportText clicks an export button and returns the downloaded text.
func exportText(t *testing.T, ctx context.Context, id string) (name, text string) {
	t.Helper()
	eval[bool](t, ctx, `window.__blobs = []; true`)
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(byTestID(id))))
	waitFor(t, ctx, `window.__blobs.length === 1`, 5*time.Second)
	text = eval[string](t, ctx, `window.__blobs[0].text()`)
	name = eval[string](t, ctx, `window.__lastDownload`)
	return name, text
}

// tableColumns maps the plan table's header texts to column numbers.
func tableColumns(t *testing.T, ctx context.Context) map[string]int {
	heads := eval[[]string](t, ctx, `[...document.querySelectorAll('[data-testid=plan-table] thead th')].map(th => th.textContent)`)
	m := map[string]int{}
	for i, h := range heads {
		m[h] = i
	}
	return m
}

func tableRows(t *testing.T, ctx context.Context) [][]string {
	// A long team's table is drawn a task after its lanes.
	waitFor(t, ctx, `!document.querySelector('[data-testid=plan-table]').dataset.pending`, 5*time.Second)
	return eval[[][]string](t, ctx, `[...document.querySelectorAll('[data-testid=plan-table] tbody tr')].map(tr => [...tr.children].map(c => c.textContent))`)
}

func TestPageExampleRunTimelineTableExport(t *testing.T) {
	ctx, rec := tab(t)
	openPage(t, ctx, "")
	screenshot(t, ctx, "1-ready")
	assert.False(t, eval[bool](t, ctx, `document.getElementById('ics-day-row').checkVisibility()`), "hidden parts stay hidden")
	assert.False(t, eval[bool](t, ctx, `document.querySelector('[data-testid=errors]').checkVisibility()`))

	require.NoError(t, chromedp.Do(ctx, chromedp.SetValue(chromedp.ID("example-pick"), "warehouse/picks.txt"), chromedp.Click(byTestID("example-load"))))
	waitFor(t, ctx, `!document.querySelector('[data-testid=start]').disabled`, 10*time.Second)
	summary := eval[string](t, ctx, `document.getElementById('summary').textContent`)
	assert.Contains(t, summary, "15")
	assert.Contains(t, summary, "back to the start")
	screenshot(t, ctx, "2-loaded")

	require.NoError(t, chromedp.Do(ctx,
		chromedp.SetValue(byTestID("budget"), "1.5"),
		chromedp.Click(byTestID("start"))))
	waitFor(t, ctx, `document.querySelectorAll('[data-testid=timeline] [data-visit]').length > 0`, 10*time.Second)
	waitFor(t, ctx, `document.body.dataset.run === "finished" && !document.body.dataset.drawing`, 15*time.Second)
	screenshot(t, ctx, "3-finished")

	_, js := exportText(t, ctx, "export-json")
	var p planOut
	require.NoError(t, json.Unmarshal([]byte(js), &p))
	require.Len(t, p.Route, 16)
	// Cross-check the exported plan with the engine's own evaluator.
	in, err := readBench(string(shared.files["examples/warehouse/picks.txt"]))
	require.NoError(t, err)
	require.NoError(t, solver.CheckRoute(in, p.Route))
	sch := solver.Evaluate(in, p.Route)
	assert.InDelta(t, in.InputUnits(sch.Travel), p.Cost, 1e-9)

	visits := eval[[]string](t, ctx, `[...document.querySelectorAll('[data-testid=timeline] [data-visit]')].map(e => e.dataset.visit)`)
	assert.Equal(t, p.RouteIDs, visits, "one timeline row per visit, in route order")
	rows := tableRows(t, ctx)
	require.Len(t, rows, len(p.Route)+1, "a row per visit and the return")
	for k, id := range p.RouteIDs {
		assert.Equal(t, id, rows[k][1])
		assert.Equal(t, fmt.Sprint(k), rows[k][0])
	}
	assert.Equal(t, "back", rows[len(rows)-1][0])
	assert.Equal(t, "proven best", eval[string](t, ctx, `document.querySelector('[data-testid=quality]').textContent`),
		"the bound beside the search proves the 15 pick faces")
	assert.InDelta(t, p.Cost, eval[float64](t, ctx, `Number(document.querySelector('[data-testid=best-cost]').dataset.cost)`), 1e-9)
	best := eval[string](t, ctx, `document.querySelector('[data-testid=best-cost]').textContent`)
	assert.Contains(t, best, "units travel", "the warehouse file's times have no unit: the page says so")

	name, text := exportText(t, ctx, "export-csv")
	assert.Equal(t, "picks-plan.csv", name)
	recs, err := csv.NewReader(strings.NewReader(text)).ReadAll()
	require.NoError(t, err)
	require.Len(t, recs, len(p.Route)+2, "header, visits, return")
	assert.Equal(t, format.CSVHeader, recs[0])
	col := map[string]int{}
	for i, h := range recs[0] {
		col[h] = i
	}
	tcol := tableColumns(t, ctx)
	for k, v := range p.Schedule {
		r := recs[k+1]
		assert.Equal(t, v.ID, r[col["site"]])
		assert.Equal(t, fmt.Sprint(v.Start), r[col["start"]])
		assert.Equal(t, rows[k][tcol["Start"]], r[col["start"]], "CSV start matches the table")
		assert.Equal(t, rows[k][tcol["Arrival"]], r[col["arrival"]], "CSV arrival matches the table")
		assert.Equal(t, fmt.Sprint(v.Departure), r[col["departure"]])
	}
	assert.Equal(t, "return", recs[len(recs)-1][0])

	// Keyboard: a visit takes focus and shows its details.
	eval[bool](t, ctx, `document.querySelector('[data-testid=timeline] [data-visit]').focus(); true`)
	detail := eval[string](t, ctx, `document.getElementById('visit-detail').textContent`)
	assert.Contains(t, detail, "Start at 0")
	require.NoError(t, chromedp.Do(ctx, chromedp.KeyEvent(kb.ArrowDown)))
	assert.Equal(t, p.RouteIDs[1], eval[string](t, ctx, `document.activeElement.dataset.visit`), "the arrow keys move along the route")
	assert.Contains(t, eval[string](t, ctx, `document.getElementById('visit-detail').textContent`), "Stop 1, site "+p.RouteIDs[1])

	checkOrigin(t, rec, shared.srv.URL)
}

// checkOrigin asserts that every request went to the page's origin (or is
// local data). engine.wasm, fetched by the worker, must be among them, so
// the recording sees the worker's requests too.
func checkOrigin(t *testing.T, rec *requests, origin string) {
	t.Helper()
	u, err := url.Parse(origin)
	require.NoError(t, err)
	seenEngine := false
	for _, r := range rec.list() {
		ru, err := url.Parse(r)
		require.NoError(t, err)
		switch ru.Scheme {
		case "data", "blob":
			continue
		case "file":
			if u.Scheme == "file" {
				continue
			}
		}
		assert.Equal(t, u.Scheme+"://"+u.Host, ru.Scheme+"://"+ru.Host, "request outside the page's origin: %s", r)
		if strings.HasSuffix(ru.Path, "/engine.wasm") {
			seenEngine = true
		}
	}
	if u.Scheme != "file" {
		assert.True(t, seenEngine, "the recording did not see the worker fetch engine.wasm: %v", rec.list())
	}
}

func TestPageMixChangeAndStop(t *testing.T) {
	ctx, _ := tab(t)
	openPage(t, ctx, "")
	text := longInstance(61, 11)
	require.NoError(t, chromedp.Do(ctx,
		chromedp.SetValue(byTestID("paste-input"), text),
		chromedp.Click(byTestID("paste-load"))))
	waitFor(t, ctx, `!document.querySelector('[data-testid=start]').disabled`, 10*time.Second)
	// The bound, in a worker of its own, proves this day optimal within
	// seconds and so ends the run early: steer a run without it.
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(byTestID("with-bound"))))
	// Without the bound: with it, the exact search now proves this day
	// in a second or two and the run ends before the weights change.
	eval[bool](t, ctx, `document.querySelector('[data-testid=with-bound]').checked = false; true`)
	require.NoError(t, chromedp.Do(ctx,
		chromedp.SetValue(byTestID("budget"), "60"),
		chromedp.Click(byTestID("start"))))
	waitFor(t, ctx, `document.querySelectorAll('[data-testid=timeline] [data-visit]').length === 61 && Number(document.getElementById('iterations').textContent.replace(/,/g,'')) > 0`, 10*time.Second)
	screenshot(t, ctx, "4-running")

	// Change a weight mid-run, as a user would with the keyboard.
	eval[bool](t, ctx, `document.getElementById('experts').open = true`)
	require.NoError(t, chromedp.Do(ctx, chromedp.Focus(byTestID("mix-random"))))
	ack := eval[float64](t, ctx, `new Promise(res => {
	  const el = document.querySelector('[data-testid=mix-random]');
	  const n0 = Number(document.querySelector('[data-testid=status]').dataset.mixAcks || "0");
	  const t0 = performance.now();
	  el.value = "3"; el.dispatchEvent(new Event('input', {bubbles:true})); el.dispatchEvent(new Event('change', {bubbles:true}));
	  const iv = setInterval(() => { if (Number(document.querySelector('[data-testid=status]').dataset.mixAcks || "0") > n0) { clearInterval(iv); res(performance.now() - t0); } }, 5);
	})`)
	status := eval[string](t, ctx, `document.querySelector('[data-testid=status]').textContent`)
	assert.Contains(t, status, "Weights changed at")
	assert.Contains(t, status, "random 3")
	assert.Less(t, ack, 1000.0, "mix acknowledged after %.0f ms", ack)
	t.Logf("mix change acknowledged by the running search after %.0f ms", ack)
	assert.Equal(t, "running", eval[string](t, ctx, `document.body.dataset.run`))

	before := eval[string](t, ctx, `document.querySelector('[data-testid=best-cost]').textContent`)
	took := eval[float64](t, ctx, `new Promise(res => {
	  const t0 = performance.now();
	  document.querySelector('[data-testid=stop]').click();
	  const iv = setInterval(() => { if (document.body.dataset.run === "finished") { clearInterval(iv); res(performance.now() - t0); } }, 5);
	})`)
	t.Logf("stop took %.0f ms", took)
	assert.Less(t, took, 1000.0, "stop must halt the search within 1 s")
	assert.Equal(t, "stopped", eval[string](t, ctx, `document.querySelector('[data-testid=status]').dataset.why`))
	assert.Equal(t, 61, eval[int](t, ctx, `document.querySelectorAll('[data-testid=timeline] [data-visit]').length`), "the best plan stays")
	after := eval[string](t, ctx, `document.querySelector('[data-testid=best-cost]').textContent`)
	assert.NotEqual(t, "–", after)
	// A plan found in the instant before the stop may still arrive: it can only be better.
	if before != after {
		t.Logf("best cost moved from %s to %s while stopping", before, after)
	}
	// Nothing runs after the stop: the iteration count stays put.
	n1 := eval[string](t, ctx, `document.getElementById('iterations').textContent`)
	time.Sleep(300 * time.Millisecond)
	assert.Equal(t, n1, eval[string](t, ctx, `document.getElementById('iterations').textContent`))
	screenshot(t, ctx, "5-stopped")
}

func TestPageBadPasteShowsPlaceAndKeepsWorking(t *testing.T) {
	ctx, _ := tab(t)
	openPage(t, ctx, "")
	bad := "3\n0 1 2\n1 0 x\n2 1 0\n0 100\n0 50\n0 50\n"
	require.NoError(t, chromedp.Do(ctx,
		chromedp.SetValue(byTestID("paste-input"), bad),
		chromedp.Click(byTestID("paste-load"))))
	waitFor(t, ctx, `!document.querySelector('[data-testid=errors]').hidden`, 10*time.Second)
	errs := eval[string](t, ctx, `document.querySelector('[data-testid=errors]').textContent`)
	assert.Contains(t, errs, "Line 3, column 3")
	assert.Contains(t, errs, `"x" is not a number`)
	assert.Equal(t, bad, eval[string](t, ctx, `document.querySelector('[data-testid=paste-input]').value`), "the pasted text is kept")
	assert.True(t, eval[bool](t, ctx, `document.querySelector('[data-testid=start]').disabled`))
	// The error's place selects the field in the text box.
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(chromedp.CSS(`[data-testid=errors] button`))))
	sel := eval[string](t, ctx, `(() => { const t = document.querySelector('[data-testid=paste-input]'); return t.value.slice(t.selectionStart, t.selectionEnd); })()`)
	assert.Equal(t, "x", sel)
	screenshot(t, ctx, "6-error")

	// The page keeps working: fix the text and run.
	require.NoError(t, chromedp.Do(ctx,
		chromedp.SetValue(byTestID("paste-input"), strings.Replace(bad, "x", "3", 1)),
		chromedp.Click(byTestID("paste-load"))))
	waitFor(t, ctx, `document.querySelector('[data-testid=errors]').hidden && !document.querySelector('[data-testid=start]').disabled`, 10*time.Second)
	require.NoError(t, chromedp.Do(ctx, chromedp.SetValue(byTestID("budget"), "0.3"), chromedp.Click(byTestID("start"))))
	waitFor(t, ctx, `document.body.dataset.run === "finished" && !document.body.dataset.drawing && document.querySelectorAll('[data-testid=timeline] [data-visit]').length === 3`, 10*time.Second)
}

func TestPageOpenExampleFromAddress(t *testing.T) {
	ctx, _ := tab(t)
	openPage(t, ctx, "?example=warehouse")
	waitFor(t, ctx, `!document.querySelector('[data-testid=start]').disabled`, 10*time.Second)
	assert.Contains(t, eval[string](t, ctx, `document.querySelector('[data-testid=paste-input]').value`), "pick faces")
	assert.Equal(t, "bakery/sites.csv", eval[string](t, ctx, `document.querySelector('#example-pick option[selected]').value`), "the bakery is offered first")
}

func TestPageContentSecurityPolicy(t *testing.T) {
	ctx, _ := tab(t)
	openPage(t, ctx, "")
	resp, err := http.Get(shared.srv.URL + "/")
	require.NoError(t, err)
	resp.Body.Close()
	csp := resp.Header.Get("Content-Security-Policy")
	assert.Contains(t, csp, "connect-src 'self'")
	assert.Contains(t, csp, "default-src 'none'")
	// A connection to another origin is refused by the policy before it is
	// made (127.0.0.2 is loopback, a different origin, and has no server).
	v := eval[string](t, ctx, `new Promise(res => {
	  document.addEventListener('securitypolicyviolation', e => res(e.effectiveDirective), {once: true});
	  fetch('http://127.0.0.2:9/x').catch(() => {});
	  setTimeout(() => res('no violation'), 3000);
	})`)
	assert.Equal(t, "connect-src", v)
}

func TestSingleFileWorksFromDisk(t *testing.T) {
	ctx, rec := tab(t)
	dir := t.TempDir()
	p := filepath.Join(dir, "visitline.html")
	require.NoError(t, os.WriteFile(p, shared.files["visitline.html"], 0o644))
	require.NoError(t, chromedp.Do(ctx, chromedp.Navigate("file://"+p)))
	waitFor(t, ctx, `document.body.dataset.engine === "ready"`, 30*time.Second)
	require.NoError(t, chromedp.Do(ctx, chromedp.SetValue(chromedp.ID("example-pick"), "warehouse/picks.txt"), chromedp.Click(byTestID("example-load"))))
	waitFor(t, ctx, `!document.querySelector('[data-testid=start]').disabled`, 10*time.Second)
	require.NoError(t, chromedp.Do(ctx, chromedp.SetValue(byTestID("budget"), "0.5"), chromedp.Click(byTestID("start"))))
	waitFor(t, ctx, `document.body.dataset.run === "finished" && !document.body.dataset.drawing && document.querySelectorAll('[data-testid=timeline] [data-visit]').length === 16`, 15*time.Second)
	screenshot(t, ctx, "7-single-file")
	for _, r := range rec.list() {
		assert.True(t, strings.HasPrefix(r, "file://") || strings.HasPrefix(r, "data:") || strings.HasPrefix(r, "blob:"), "request from the single file: %s", r)
	}
}

func readBench(text string) (*solver.Instance, error) {
	return format.ReadBenchmark(strings.NewReader(text), "test")
}

// TestMeasure reports the page's figures for the README: time to
// interactive and to a running engine on localhost, engine.wasm size, and
// the iteration rate in the browser against the native one on the same
// instance, seed and budget. It asserts nothing about speed (the machine is
// shared); run it with VISITLINE_MEASURE=1 go test -run TestMeasure -v ./web.
func TestMeasure(t *testing.T) {
	if os.Getenv("VISITLINE_MEASURE") == "" {
		t.Skip("set VISITLINE_MEASURE=1 to measure")
	}
	ctx, _ := tab(t)
	files := site(t)
	t.Logf("engine.wasm: %d bytes raw, %d bytes gzip -9", len(files["engine.wasm"]), gzipSize(files["engine.wasm"]))
	t.Logf("visitline.html: %d bytes", len(files["visitline.html"]))
	for i := 0; i < 3; i++ {
		openPage(t, ctx, "")
		type timing struct {
			Interactive float64 `json:"interactive"`
			Loaded      float64 `json:"loaded"`
			Ready       float64 `json:"ready"`
		}
		tm := eval[timing](t, ctx, `(() => { const n = performance.getEntriesByType('navigation')[0];
		  return {interactive: n.domInteractive, loaded: n.domContentLoadedEventEnd, ready: Number(document.body.dataset.readyMs)}; })()`)
		t.Logf("load %d: DOM interactive %.0f ms, DOMContentLoaded %.0f ms, engine ready %.0f ms", i+1, tm.Interactive, tm.Loaded, tm.Ready)
	}
	const budget = 5.0
	text := longInstance(61, 11)
	require.NoError(t, chromedp.Do(ctx,
		chromedp.SetValue(byTestID("paste-input"), text),
		chromedp.Click(byTestID("paste-load"))))
	waitFor(t, ctx, `!document.querySelector('[data-testid=start]').disabled`, 10*time.Second)
	// The engine alone, as the native run below: no bound beside it.
	eval[bool](t, ctx, `document.querySelector('[data-testid=with-bound]').checked = false; true`)
	require.NoError(t, chromedp.Do(ctx, chromedp.SetValue(byTestID("budget"), fmt.Sprint(budget)), chromedp.Click(byTestID("start"))))
	waitFor(t, ctx, `document.body.dataset.run === "finished" && !document.body.dataset.drawing`, 30*time.Second)
	iters := eval[float64](t, ctx, `Number(document.getElementById('iterations').textContent.replace(/,/g, ''))`)
	in, err := readBench(text)
	require.NoError(t, err)
	res, err := solver.Solve(context.Background(), in, solver.Settings{Budget: time.Duration(budget * float64(time.Second)), Seed: 1})
	require.NoError(t, err)
	web, native := iters/budget, float64(res.Iterations)/res.Elapsed.Seconds()
	t.Logf("61 sites, %g s, seed 1: browser %.0f iterations/s, native %.0f iterations/s, ratio %.2f", budget, web, native, web/native)
}

func gzipSize(b []byte) int {
	var buf strings.Builder
	zw, _ := gzip.NewWriterLevel(&buf, gzip.BestCompression)
	zw.Write(b)
	zw.Close()
	return buf.Len()
}

func TestPageSessionRestoredAndForgotten(t *testing.T) {
	ctx, _ := tab(t)
	openPage(t, ctx, "")
	assert.False(t, eval[bool](t, ctx, `document.querySelector('[data-testid=keep-session]').checked`), "keeping is off until asked")
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(byTestID("keep-session"))))
	require.NoError(t, chromedp.Do(ctx, chromedp.SetValue(chromedp.ID("example-pick"), "warehouse/picks.txt"), chromedp.Click(byTestID("example-load"))))
	waitFor(t, ctx, `!document.querySelector('[data-testid=start]').disabled`, 10*time.Second)
	setField(t, ctx, "seed", "5")
	require.NoError(t, chromedp.Do(ctx,
		chromedp.SetValue(byTestID("budget"), "0.4"),
		chromedp.Click(byTestID("start"))))
	waitFor(t, ctx, `document.body.dataset.run === "finished" && !document.body.dataset.drawing`, 10*time.Second)
	rows := tableRows(t, ctx)
	// Reload: data, settings and the best plan come back.
	openPage(t, ctx, "")
	waitFor(t, ctx, `document.querySelectorAll('[data-testid=timeline] [data-visit]').length === 16`, 10*time.Second)
	assert.Contains(t, eval[string](t, ctx, `document.querySelector('[data-testid=status]').textContent`), "Back from this tab's kept session")
	assert.Equal(t, rows, tableRows(t, ctx))
	assert.Equal(t, "5", eval[string](t, ctx, `document.querySelector('[data-testid=seed]').value`))
	assert.Equal(t, "0.4", eval[string](t, ctx, `document.querySelector('[data-testid=budget]').value`))
	assert.False(t, eval[bool](t, ctx, `document.querySelector('[data-testid=export-csv]').disabled`))
	// Forget: a reload finds nothing.
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(byTestID("forget-session"))))
	assert.Contains(t, eval[string](t, ctx, `document.querySelector('[data-testid=status]').textContent`), "Forgotten")
	openPage(t, ctx, "")
	time.Sleep(300 * time.Millisecond)
	assert.Equal(t, "", eval[string](t, ctx, `document.querySelector('[data-testid=paste-input]').value`))
	assert.True(t, eval[bool](t, ctx, `document.querySelector('[data-testid=start]').disabled`))
	assert.False(t, eval[bool](t, ctx, `document.querySelector('[data-testid=keep-session]').checked`))
	assert.Zero(t, eval[int](t, ctx, `sessionStorage.length + localStorage.length`), "nothing is left in the browser's storage")
}

func TestPageShareLinkOpensInFreshProfile(t *testing.T) {
	ctx, _ := tab(t)
	openPage(t, ctx, "")
	text := longInstance(21, 5)
	require.NoError(t, chromedp.Do(ctx,
		chromedp.SetValue(byTestID("paste-input"), text),
		chromedp.Click(byTestID("paste-load"))))
	waitFor(t, ctx, `!document.querySelector('[data-testid=share-link]').disabled`, 10*time.Second)
	setField(t, ctx, "seed", "7")
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(byTestID("share-link"))))
	waitFor(t, ctx, `!document.querySelector('[data-testid=share-url]').hidden`, 5*time.Second)
	link := eval[string](t, ctx, `document.querySelector('[data-testid=share-url]').value`)
	require.True(t, strings.HasPrefix(link, shared.srv.URL+"/#data="), link)
	assert.Less(t, len(link), len(text), "the data is compressed")
	summary := eval[string](t, ctx, `document.getElementById('summary').textContent`)

	other, _ := tab(t) // a fresh browser context: no storage shared
	require.NoError(t, chromedp.Do(other, chromedp.Navigate(link)))
	waitFor(t, other, `document.body.dataset.engine === "ready" && !document.querySelector('[data-testid=start]').disabled`, 20*time.Second)
	assert.Equal(t, text, eval[string](t, other, `document.querySelector('[data-testid=paste-input]').value`))
	assert.Equal(t, "7", eval[string](t, other, `document.querySelector('[data-testid=seed]').value`))
	assert.Equal(t, summary, eval[string](t, other, `document.getElementById('summary').textContent`))

	// Data too large for a link gets a clear message instead of a link.
	big := longInstance(301, 3)
	require.NoError(t, chromedp.Do(other,
		chromedp.SetValue(byTestID("paste-input"), big),
		chromedp.Click(byTestID("paste-load"))))
	waitFor(t, other, `document.getElementById('summary').textContent.includes('300')`, 20*time.Second)
	require.NoError(t, chromedp.Do(other, chromedp.Click(byTestID("share-link"))))
	waitFor(t, other, `document.querySelector('[data-testid=status]').textContent.includes('too large for a link')`, 10*time.Second)
	assert.True(t, eval[bool](t, other, `document.querySelector('[data-testid=share-url]').hidden`))

	// A damaged link says so and loads nothing.
	require.NoError(t, chromedp.Do(other, chromedp.Navigate(shared.srv.URL+"/#data=AAAA"+"x")))
	waitFor(t, other, `document.body.dataset.engine === "ready"`, 20*time.Second)
	waitFor(t, other, `document.querySelector('[data-testid=status]').textContent.includes("damaged")`, 5*time.Second)
	assert.NotContains(t, eval[string](t, other, `document.querySelector('[data-testid=status]').textContent`), "Go struct")
}

func TestPagePrintsThirtyVisitsOnOnePage(t *testing.T) {
	ctx, _ := tab(t)
	openPage(t, ctx, "")
	require.NoError(t, chromedp.Do(ctx,
		chromedp.SetValue(byTestID("paste-input"), longInstance(31, 9)),
		chromedp.Click(byTestID("paste-load"))))
	waitFor(t, ctx, `!document.querySelector('[data-testid=start]').disabled`, 10*time.Second)
	require.NoError(t, chromedp.Do(ctx, chromedp.SetValue(byTestID("budget"), "0.4"), chromedp.Click(byTestID("start"))))
	waitFor(t, ctx, `document.body.dataset.run === "finished" && !document.body.dataset.drawing`, 10*time.Second)
	for name, paper := range map[string]chromedp.PaperSize{"a4": chromedp.PaperA4, "letter": chromedp.PaperLetter} {
		pdf, err := chromedp.Run(ctx, chromedp.PrintToPDF(chromedp.PDFPaper(paper), chromedp.PDFMargin(0.4),
			func(p *page.PrintToPDFParams) { p.PrintBackground = ptr(true) }))
		require.NoError(t, err)
		pages := len(regexp.MustCompile(`/Type\s*/Page[^s]`).FindAll(pdf, -1))
		assert.Equal(t, 1, pages, "%s: 31 rows (start and 30 visits) print on one page", name)
		dir := os.Getenv("VISITLINE_SCREENSHOTS")
		if dir == "" {
			dir = "testout"
		}
		require.NoError(t, os.WriteFile(filepath.Join(dir, "8-print-"+name+".pdf"), pdf, 0o644))
	}
}

func ptr[T any](v T) *T { return &v }

func TestPageFileAndDropLoadAndLatenessShows(t *testing.T) {
	ctx, _ := tab(t)
	openPage(t, ctx, "")
	// The file picker.
	p := filepath.Join(t.TempDir(), "picks.txt")
	require.NoError(t, os.WriteFile(p, shared.files["examples/warehouse/picks.txt"], 0o644))
	require.NoError(t, chromedp.Do(ctx, chromedp.SetUploadFiles(byTestID("file-input"), []string{p})))
	waitFor(t, ctx, `document.getElementById('summary').textContent.includes('picks.txt')`, 10*time.Second)
	assert.Equal(t, string(shared.files["examples/warehouse/picks.txt"]), eval[string](t, ctx, `document.querySelector('[data-testid=paste-input]').value`))

	// A file dropped on the box. Two visits that cannot both be on time:
	// 1 must start by 10 and 2 by 12, 5 from the start and 20 from each
	// other. Start, 1 (at 5), 2 (at 25) is 13 late; start, 2 (at 5), 1 (at
	// 25) is 15 late: the plan is the first, late by 13 (worked by hand).
	late := "3\n0 5 5\n5 0 20\n5 20 0\n0 100\n0 10\n0 12\n"
	eval[bool](t, ctx, `(() => {
	  const dt = new DataTransfer();
	  dt.items.add(new File([`+"`"+late+"`"+`], "tight.txt", {type: "text/plain"}));
	  document.getElementById('drop-zone').dispatchEvent(new DragEvent('drop', {dataTransfer: dt, bubbles: true, cancelable: true}));
	  return true; })()`)
	waitFor(t, ctx, `document.getElementById('summary').textContent.includes('tight.txt')`, 10*time.Second)
	require.NoError(t, chromedp.Do(ctx, chromedp.SetValue(byTestID("budget"), "0.3"), chromedp.Click(byTestID("start"))))
	waitFor(t, ctx, `document.body.dataset.run === "finished" && !document.body.dataset.drawing && document.querySelectorAll('[data-testid=timeline] [data-visit]').length === 3`, 10*time.Second)
	assert.Contains(t, eval[string](t, ctx, `document.querySelector('[data-testid=best-cost]').textContent`), "1 visit late")
	assert.Equal(t, 1, eval[int](t, ctx, `document.querySelectorAll('[data-testid=timeline] .visit.is-late .late').length`), "the late visit carries a lateness block")
	assert.Equal(t, 1, eval[int](t, ctx, `document.querySelectorAll('[data-testid=plan-table] tr.is-late').length`))
	assert.Contains(t, eval[string](t, ctx, `document.querySelector('[data-testid=plan-table] tr.is-late').textContent`), "late by 13")
	screenshot(t, ctx, "9-late")
}

func TestPageSitesExamplesWithClockTimesAndCalendar(t *testing.T) {
	ctx, _ := tab(t)
	openPage(t, ctx, "?example=bakery")
	waitFor(t, ctx, `!document.querySelector('[data-testid=start]').disabled`, 10*time.Second)
	assert.Contains(t, eval[string](t, ctx, `document.querySelector('[data-testid=matrix-input]').value`), "BAK")
	summary := eval[string](t, ctx, `document.getElementById('summary').textContent`)
	at435 := localClock(t, ctx, 4, 35)
	assert.Contains(t, summary, at435+" to", "times in the browser's locale")
	assert.Contains(t, summary, "from matrix")
	require.NoError(t, chromedp.Do(ctx, chromedp.SetValue(byTestID("budget"), "1"), chromedp.Click(byTestID("start"))))
	waitFor(t, ctx, `document.body.dataset.run === "finished" && !document.body.dataset.drawing`, 15*time.Second)
	rows := tableRows(t, ctx)
	col := tableColumns(t, ctx)
	assert.Equal(t, "BAK", rows[0][col["Site"]])
	assert.Equal(t, "Crumb & Crust Bakery", rows[0][col["Name"]])
	assert.Equal(t, at435, rows[0][col["Start"]], "clock times in the browser's locale")
	screenshot(t, ctx, "10-bakery")

	require.NoError(t, chromedp.Do(ctx, chromedp.SetValue(byTestID("ics-date"), "2026-12-01")))
	name, ics := exportText(t, ctx, "export-ics")
	assert.Equal(t, "sites-plan.ics", name)
	assert.True(t, strings.HasPrefix(ics, "BEGIN:VCALENDAR\r\n"), "CRLF line ends (RFC 5545 section 3.1)")
	assert.Contains(t, ics, "DTSTART:20261201T")
	withService := 0
	for _, r := range rows[:len(rows)-1] {
		if r[col["Start"]] != r[col["Departure"]] {
			withService++
		}
	}
	assert.Equal(t, withService, strings.Count(ics, "BEGIN:VEVENT"), "one event per visit with a service time (the start's loading too), none for the return")

	// The art truck: an open path to a fixed end, from the README's --end.
	require.NoError(t, chromedp.Do(ctx, chromedp.SetValue(chromedp.ID("example-pick"), "art/sites.csv"), chromedp.Click(byTestID("example-load"))))
	waitFor(t, ctx, `document.getElementById('summary').textContent.includes('ends at SOUTH')`, 10*time.Second)
	assert.Equal(t, "site", eval[string](t, ctx, `document.querySelector('[data-testid=route-end]').value`))
	require.NoError(t, chromedp.Do(ctx, chromedp.SetValue(byTestID("budget"), "0.5"), chromedp.Click(byTestID("start"))))
	waitFor(t, ctx, `document.body.dataset.run === "finished" && !document.body.dataset.drawing`, 15*time.Second)
	visits := eval[[]string](t, ctx, `[...document.querySelectorAll('[data-testid=timeline] [data-visit]')].map(e => e.dataset.visit)`)
	require.NotEmpty(t, visits)
	assert.Equal(t, "NORTH", visits[0])
	assert.Equal(t, "SOUTH", visits[len(visits)-1])
	assert.Zero(t, eval[int](t, ctx, `document.querySelectorAll('[data-testid=timeline] [data-return]').length`), "an open path has no return")

	// The overbooked technician: no order meets every slot, and the page says who is late.
	require.NoError(t, chromedp.Do(ctx, chromedp.SetValue(chromedp.ID("example-pick"), "boiler/sites-overbooked.csv"), chromedp.Click(byTestID("example-load"))))
	waitFor(t, ctx, `document.getElementById('summary').textContent.includes('sites-overbooked.csv')`, 10*time.Second)
	require.NoError(t, chromedp.Do(ctx, chromedp.SetValue(byTestID("budget"), "1"), chromedp.Click(byTestID("start"))))
	// Generous: after its budget the engine still works on the lateness of
	// a day that cannot be met.
	waitFor(t, ctx, `document.body.dataset.run === "finished" && !document.body.dataset.drawing`, 60*time.Second)
	assert.False(t, eval[bool](t, ctx, `document.querySelector('[data-testid=why]').hidden`))
	why := eval[string](t, ctx, `document.querySelector('[data-testid=why]').textContent`)
	assert.Regexp(t, `W\d+ by (\d+ min|\d+:\d\d h)`, why, "late visits named with their lateness in the file's unit")
	assert.Contains(t, why, "cannot all be met together", "the reason found by the explanation, as solve --format json gives it")
	assert.Contains(t, why, "These visits cannot all be on time together:")
	assert.Positive(t, eval[int](t, ctx, `document.querySelectorAll('[data-testid=timeline] .visit.is-late').length`))
	screenshot(t, ctx, "11-overbooked")
}
