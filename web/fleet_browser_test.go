package web_test

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/cdproto/cdp"
	"github.com/chromedp/cdproto/emulation"
	"github.com/chromedp/cdproto/page"
	"github.com/chromedp/chromedp"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"visitline/solver/app"
	"visitline/solver/fleet"
	"visitline/solver/format"
)

// An invented boiler firm's day (testdata/fleet/): three technicians,
// fifteen visits, one of which (H15) closes before any shift begins. The
// dispatcher opens the vehicles file and the sites file, plans, and reads
// three lanes, the unserved visits with their reasons, a vehicle column;
// the plan the page shows (its JSON export) passes fleet.Evaluate.
func TestPageFleetDayLanesUnservedAndExports(t *testing.T) {
	ctx, _ := tab(t)
	viewport(t, ctx, 1366, 768)
	openPage(t, ctx, "")
	sitesPath, vehPath := filepath.Join("..", "testdata", "fleet", "boiler-team-sites.csv"), filepath.Join("..", "testdata", "fleet", "boiler-team-vehicles.csv")
	absV, err := filepath.Abs(vehPath)
	require.NoError(t, err)
	absS, err := filepath.Abs(sitesPath)
	require.NoError(t, err)
	require.NoError(t, chromedp.Do(ctx, chromedp.SetUploadFiles(byTestID("vehicles-file"), []string{absV})))
	waitFor(t, ctx, `document.querySelector('[data-testid=vehicles-input]').value.includes('Marek')`, 5*time.Second)
	require.NoError(t, chromedp.Do(ctx, chromedp.SetUploadFiles(byTestID("file-input"), []string{absS})))
	waitFor(t, ctx, `!!document.querySelector('[data-testid=team-summary]')`, 10*time.Second)
	assert.Contains(t, eval[string](t, ctx, `document.querySelector('[data-testid=team-summary]').textContent`), "T2 Marek 08:00–17:30, holds 5")

	eval[bool](t, ctx, `window.__statuses = []; new MutationObserver(() => window.__statuses.push(document.querySelector('[data-testid=status]').textContent))
	  .observe(document.querySelector('[data-testid=status]'), {childList: true, characterData: true, subtree: true}); true`)
	run(t, ctx, "1")
	assert.True(t, eval[bool](t, ctx, `window.__statuses.some(s => s.startsWith("Searching a team's day: so far "))`),
		"the run bar tells the search's best while it runs: %v", eval[[]string](t, ctx, `window.__statuses`))
	lanes := eval[[]string](t, ctx, `[...document.querySelectorAll('[data-testid=timeline] .lane-head')].map(e => e.dataset.lane)`)
	_, jsonText := exportText(t, ctx, "export-json")
	var p format.FleetPlanReport
	require.NoError(t, json.Unmarshal([]byte(jsonText), &p))
	want := []string{}
	for _, r := range p.Routes {
		want = append(want, r.Vehicle)
	}
	require.Equal(t, []string{"T1", "T2", "T3"}, lanes, "one lane per vehicle, in the vehicles file's order")
	assert.Equal(t, want, lanes)
	// Each lane's visits follow its header, in route order.
	for _, r := range p.Routes {
		got := eval[[]string](t, ctx, `[...document.querySelectorAll('[data-testid=timeline] .visit[data-vehicle=`+jsString(r.Vehicle)+`]')].map(e => e.dataset.visit)`)
		assert.Equal(t, r.VisitIDs, got, "lane %s", r.Vehicle)
		head := eval[string](t, ctx, `document.querySelector('[data-testid=timeline] .lane-head[data-lane=`+jsString(r.Vehicle)+`]').textContent`)
		assert.Contains(t, head, r.VehicleName)
		assert.Contains(t, head, "load ")
	}

	// The unserved visits, each with its reason.
	require.NotEmpty(t, p.UnservedWhy)
	un := eval[[]string](t, ctx, `[...document.querySelectorAll('[data-testid=unserved] li')].map(e => e.dataset.visit + ': ' + e.querySelector('.reason').textContent)`)
	var wantUn []string
	for _, u := range p.UnservedWhy {
		wantUn = append(wantUn, u.ID+": "+u.Why)
	}
	assert.Equal(t, wantUn, un)
	assert.Contains(t, un, "H15: no vehicle can reach it within its window", "H15 closes at 07:00, before every shift")
	assert.Contains(t, eval[string](t, ctx, `document.querySelector('[data-testid=best-cost]').textContent`), "3 vehicles of 3")

	// The table has a vehicle column, a row per visit served.
	tcol := tableColumns(t, ctx)
	require.Contains(t, tcol, "Vehicle")
	rows := tableRows(t, ctx)
	require.Len(t, rows, p.Served)
	k := 0
	for _, r := range p.Routes {
		for _, id := range r.VisitIDs {
			assert.Equal(t, r.Vehicle, rows[k][tcol["Vehicle"]])
			assert.Equal(t, id, rows[k][tcol["Site"]])
			k++
		}
	}

	// The plan shown passes the independent evaluator, at its cost.
	fd, _, err := app.LoadFleet(app.FleetInput{Sites: readText(t, sitesPath), SitesName: "boiler-team-sites.csv", Vehicles: readText(t, vehPath), VehiclesName: "v.csv"})
	require.NoError(t, err)
	pl := fleet.Plan{Routes: make([][]int, len(fd.Problem.Vehicles)), Unserved: p.Unserved}
	for _, r := range p.Routes {
		for k, v := range fd.Problem.Vehicles {
			if v.ID == r.Vehicle {
				pl.Routes[k] = r.Visits
			}
		}
	}
	rep, err := fleet.Evaluate(fd.Problem, pl)
	require.NoError(t, err)
	assert.True(t, rep.Feasible, rep.Problems)
	assert.InDelta(t, fd.Problem.InputUnits(rep.Travel), p.Cost, 1e-6)
	assert.Equal(t, 15, p.Served+len(p.Unserved))

	// The CSV export: a vehicle column, then the unserved rows.
	_, csvText := exportText(t, ctx, "export-csv")
	recs, err := csv.NewReader(strings.NewReader(csvText)).ReadAll()
	require.NoError(t, err)
	assert.Equal(t, format.FleetCSVHeader, recs[0])
	assert.Len(t, recs, 1+p.Served+len(p.Unserved))
	// The calendar: one event per visit served (RFC 5545 VEVENT), the
	// vehicle's name first in each summary.
	name, icsText := exportText(t, ctx, "export-ics")
	assert.True(t, strings.HasSuffix(name, ".ics"), name)
	assert.True(t, strings.HasPrefix(icsText, "BEGIN:VCALENDAR\r\n"), icsText)
	assert.Equal(t, p.Served, strings.Count(icsText, "BEGIN:VEVENT"))
	for _, r := range p.Routes {
		assert.Equal(t, len(r.VisitIDs), strings.Count(icsText, "SUMMARY:"+r.VehicleName+": "), "events of %s", r.Vehicle)
	}

	// The hint line under the lanes covers none of their rows.
	eval[bool](t, ctx, `window.scrollTo(0, 0); true`)
	assert.Equal(t, 0, eval[int](t, ctx, hintOverlaps), "the hint line overlaps no row")
	assert.Contains(t, eval[string](t, ctx, `getComputedStyle(document.getElementById('visit-detail'), '::before').content`), "Point at a visit")
	screenshot(t, ctx, "fleet-1366")
	viewport(t, ctx, 390, 844)
	eval[bool](t, ctx, `window.dispatchEvent(new Event('resize')); true`)
	time.Sleep(300 * time.Millisecond)
	screenshot(t, ctx, "fleet-390")
	wide := eval[[]string](t, ctx, `[...document.querySelectorAll('body *')].filter(e => e.getBoundingClientRect().right > 391).slice(0, 8).map(e => e.tagName + '.' + e.className + '#' + e.id)`)
	assert.LessOrEqual(t, eval[int](t, ctx, `document.documentElement.scrollWidth`), 390, "nothing wider than the phone: %v", wide)
	eval[bool](t, ctx, `document.querySelector('[data-testid=unserved]').scrollIntoView(); true`)
	view(t, ctx, "testout", "fleet-390-lanes")
	eval[bool](t, ctx, `document.querySelector('[data-testid=plan-table]').scrollIntoView(); true`)
	view(t, ctx, "testout", "fleet-390-table")
}

// A day past 60 visits with a fleet size: one compact row per vehicle,
// its visits as blocks.
func TestPageFleetSizeLargeDayCompactRows(t *testing.T) {
	ctx, _ := tab(t)
	viewport(t, ctx, 1366, 768)
	openPage(t, ctx, "")
	setField(t, ctx, "fleet-size", "4")
	paste(t, ctx, fourRounds())
	waitFor(t, ctx, `!!document.querySelector('[data-testid=team-summary]')`, 10*time.Second)
	run(t, ctx, "1")
	_, jsonText := exportText(t, ctx, "export-json")
	var p format.FleetPlanReport
	require.NoError(t, json.Unmarshal([]byte(jsonText), &p))
	require.Greater(t, p.Served, 60)
	require.Equal(t, 4, len(p.Routes), "four rounds at the same hours need four vehicles")
	assert.Equal(t, len(p.Routes), eval[int](t, ctx, `document.querySelectorAll('[data-testid=timeline] .lane-head.compact').length`))
	assert.Equal(t, 0, eval[int](t, ctx, `document.querySelectorAll('[data-testid=timeline] .visit').length`), "no row per visit on a large day")
	assert.Equal(t, p.Served, eval[int](t, ctx, `document.querySelectorAll('[data-testid=timeline] .lane-head .block').length`), "a block per visit served")
	view(t, ctx, "testout", "fleet-compact-1366")
}

func readText(t *testing.T, path string) string {
	t.Helper()
	b, err := os.ReadFile(path)
	require.NoError(t, err)
	return string(b)
}

// fourRounds is an invented day of 64 meter readings in four streets, 16
// each, whose windows come at the same hours in every street: no vehicle
// can be in two streets at once, so the day needs four.
func fourRounds() string {
	var b strings.Builder
	b.WriteString("id,name,x,y,earliest,latest,service\nDEPOT,Yard,10,10,07:00,18:00,0\n")
	for g := 0; g < 4; g++ {
		for i := 0; i < 16; i++ {
			m := 8*60 + i*25
			fmt.Fprintf(&b, "R%d-%02d,Street %c no. %d,%.1f,%.1f,%02d:%02d,%02d:%02d,15\n", g+1, i+1, 'A'+g, i+1, 10+float64(g)*3, 10+float64(i)*0.2, m/60, m%60, (m+15)/60, (m+15)%60)
		}
	}
	return b.String()
}

// Stop is taken during a team's search in the worker: the fleet search
// gives the worker's event loop its turns (through the clock it reads),
// so the stop ends the run long before its budget.
func TestPageFleetStop(t *testing.T) {
	ctx, _ := tab(t)
	openPage(t, ctx, "")
	setField(t, ctx, "fleet-size", "4")
	paste(t, ctx, fourRounds())
	waitFor(t, ctx, `!!document.querySelector('[data-testid=team-summary]')`, 10*time.Second)
	setField(t, ctx, "budget", "120")
	eval[bool](t, ctx, `delete document.body.dataset.run; true`)
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(byTestID("start"))))
	waitFor(t, ctx, `document.body.dataset.run === "running"`, 10*time.Second)
	time.Sleep(500 * time.Millisecond)
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(byTestID("stop"))))
	waitFor(t, ctx, `document.body.dataset.run === "finished" && !document.body.dataset.drawing`, 20*time.Second)
	assert.Equal(t, "stopped", eval[string](t, ctx, `document.querySelector('[data-testid=status]').dataset.why`))
	assert.Equal(t, 4, eval[int](t, ctx, `document.querySelectorAll('[data-testid=timeline] .lane-head').length`), "the best plan so far is drawn")
}

// A team's plan comes back from a share link and from the tab's kept
// session: the vehicles, the "fewest vehicles" choice and the plan itself
// (the same lanes and the same cost, before any new search). The choice
// "came back unticked" because this test's click on it, in the closed
// section, ticked nothing: the box is now ticked as a person would, and
// checked before the link is made.
func TestPageFleetPlanBackFromLinkAndKeptSession(t *testing.T) {
	ctx, _ := tab(t)
	openPage(t, ctx, "")
	setField(t, ctx, "vehicles-input", readText(t, filepath.Join("..", "testdata", "fleet", "boiler-team-vehicles.csv")))
	// The section is closed on a fresh page: open it as a person would,
	// then tick the box (a click on a control in a closed section lands
	// nowhere).
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(chromedp.CSS(`#team-box > summary`))))
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(byTestID("fewest-vehicles"))))
	require.True(t, eval[bool](t, ctx, `document.querySelector('[data-testid=fewest-vehicles]').checked`), "ticked")
	paste(t, ctx, readText(t, filepath.Join("..", "testdata", "fleet", "boiler-team-sites.csv")))
	waitFor(t, ctx, `!!document.querySelector('[data-testid=team-summary]')`, 10*time.Second)
	run(t, ctx, "0.5")
	lanes := `[...document.querySelectorAll('[data-testid=timeline] .lane-head')].map(e => e.dataset.lane).join(' ')`
	cost := `document.querySelector('[data-testid=best-cost]').dataset.cost || ''`
	wantLanes, wantCost := eval[string](t, ctx, lanes), eval[string](t, ctx, cost)
	require.NotEmpty(t, wantLanes)
	require.NotEmpty(t, wantCost)
	link := makeLink(t, ctx)

	require.NoError(t, chromedp.Do(ctx, chromedp.Navigate("about:blank")))
	require.NoError(t, chromedp.Do(ctx, chromedp.Navigate(link)))
	waitFor(t, ctx, `document.body.dataset.engine === "ready" && !!document.querySelector('[data-testid=timeline] .lane-head')`, 20*time.Second)
	assert.Equal(t, wantLanes, eval[string](t, ctx, lanes), "the link's team plan is drawn")
	assert.Equal(t, wantCost, eval[string](t, ctx, cost))
	assert.Contains(t, eval[string](t, ctx, `document.querySelector('[data-testid=vehicles-input]').value`), "Marek")
	assert.True(t, eval[bool](t, ctx, `document.querySelector('[data-testid=fewest-vehicles]').checked`), "the link's \"fewest vehicles\" comes back ticked")
	assert.True(t, eval[bool](t, ctx, `document.querySelector('[data-testid=team-box]').open`), "a team's day shows its section open")

	// Kept in the tab, it comes back after a reload.
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(byTestID("keep-session"))))
	time.Sleep(300 * time.Millisecond)
	openPage(t, ctx, "")
	waitFor(t, ctx, `!!document.querySelector('[data-testid=timeline] .lane-head')`, 20*time.Second)
	assert.Equal(t, wantLanes, eval[string](t, ctx, lanes), "the kept team plan is drawn")
	assert.Equal(t, wantCost, eval[string](t, ctx, cost))
	assert.Contains(t, eval[string](t, ctx, `document.querySelector('[data-testid=status]').textContent`), "kept session")
	assert.True(t, eval[bool](t, ctx, `document.querySelector('[data-testid=fewest-vehicles]').checked`), "the kept \"fewest vehicles\" comes back ticked")
}

// Exports for one vehicle: with T2 chosen beside the export buttons the
// calendar holds T2's visits only (one RFC 5545 VEVENT each, the
// technician's name first in the summary), in a file named for T2; the
// printed plan has a section per vehicle, each after a page break, or
// T2's alone.
func TestPageFleetOneVehicleCalendarAndPrint(t *testing.T) {
	ctx, _ := tab(t)
	viewport(t, ctx, 1366, 768)
	openPage(t, ctx, "")
	setField(t, ctx, "vehicles-input", readText(t, filepath.Join("..", "testdata", "fleet", "boiler-team-vehicles.csv")))
	paste(t, ctx, readText(t, filepath.Join("..", "testdata", "fleet", "boiler-team-sites.csv")))
	waitFor(t, ctx, `!!document.querySelector('[data-testid=team-summary]')`, 10*time.Second)
	run(t, ctx, "1")
	_, jsonText := exportText(t, ctx, "export-json")
	var p format.FleetPlanReport
	require.NoError(t, json.Unmarshal([]byte(jsonText), &p))
	require.Len(t, p.Routes, 3)
	opts := eval[[]string](t, ctx, `[...document.querySelectorAll('[data-testid=export-vehicle] option')].map(o => o.value + '=' + o.textContent)`)
	assert.Equal(t, []string{"=all vehicles", "T1=T1 · Ines", "T2=T2 · Marek", "T3=T3 · Sol"}, opts)

	var t2 format.FleetRouteJSON
	for _, r := range p.Routes {
		if r.Vehicle == "T2" {
			t2 = r
		}
	}
	require.NotEmpty(t, t2.VisitIDs)
	setField(t, ctx, "export-vehicle", "T2")
	name, ics := exportText(t, ctx, "export-ics")
	assert.True(t, strings.HasSuffix(name, "-plan-T2.ics"), name)
	assert.True(t, strings.HasPrefix(ics, "BEGIN:VCALENDAR\r\n"), ics)
	assert.Equal(t, len(t2.VisitIDs), strings.Count(ics, "BEGIN:VEVENT"), "one event per visit of T2")
	assert.Equal(t, len(t2.VisitIDs), strings.Count(ics, "SUMMARY:Marek: "), "every event is Marek's")
	assert.NotContains(t, ics, "SUMMARY:Ines")
	assert.NotContains(t, ics, "SUMMARY:Sol")
	for _, id := range t2.VisitIDs {
		assert.Contains(t, ics, id, "T2's visit %s", id)
	}
	// The CSV for T2 alone: the header and T2's rows, in its visiting order.
	name, csvText := exportText(t, ctx, "export-csv")
	assert.True(t, strings.HasSuffix(name, "-plan-T2.csv"), name)
	rows, err := csv.NewReader(strings.NewReader(csvText)).ReadAll()
	require.NoError(t, err)
	require.Len(t, rows, 1+len(t2.VisitIDs), csvText)
	assert.Equal(t, "vehicle", rows[0][0])
	for k, id := range t2.VisitIDs {
		assert.Equal(t, "T2", rows[k+1][0])
		assert.Equal(t, id, rows[k+1][3], "T2's visit %d", k+1)
	}
	// All vehicles again: the team's calendar.
	setField(t, ctx, "export-vehicle", "")
	name, ics = exportText(t, ctx, "export-ics")
	assert.True(t, strings.HasSuffix(name, "-plan.ics"), name)
	assert.Equal(t, p.Served, strings.Count(ics, "BEGIN:VEVENT"))

	// Print: a section per vehicle, a page break before each but the first.
	eval[bool](t, ctx, `window.print = () => {}; true`)
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(byTestID("print-plan"))))
	secs := eval[[]string](t, ctx, `[...document.querySelectorAll('[data-testid=print-team] .print-vehicle')].map(s => s.dataset.vehicle)`)
	assert.Equal(t, []string{"T1", "T2", "T3"}, secs)
	for _, r := range p.Routes {
		got := eval[[]string](t, ctx, `[...document.querySelectorAll('[data-testid=print-team] .print-vehicle[data-vehicle=`+jsString(r.Vehicle)+`] .print-visits tbody th')].map(e => e.textContent)`)
		assert.Equal(t, r.VisitIDs, got, "the printed visits of %s", r.Vehicle)
		lane := eval[[]string](t, ctx, `[...document.querySelectorAll('[data-testid=print-team] .print-vehicle[data-vehicle=`+jsString(r.Vehicle)+`] .visit')].map(e => e.dataset.vehicle)`)
		assert.Len(t, lane, len(r.VisitIDs), "the printed lane of %s", r.Vehicle)
		for _, v := range lane {
			assert.Equal(t, r.Vehicle, v)
		}
	}
	require.NoError(t, chromedp.Do(ctx, media("print")))
	breaks := eval[[]string](t, ctx, `[...document.querySelectorAll('.print-vehicle')].map(s => getComputedStyle(s).breakBefore)`)
	assert.Equal(t, []string{"auto", "page", "page"}, breaks)
	assert.Equal(t, "none", eval[string](t, ctx, `getComputedStyle(document.getElementById('timeline')).display`), "the sections replace the screen's lanes")
	assert.Equal(t, "block", eval[string](t, ctx, `getComputedStyle(document.querySelector('[data-testid=print-team]')).display`))
	assert.Equal(t, "block", eval[string](t, ctx, `getComputedStyle(document.querySelector('main')).display`))
	assert.Equal(t, 3, pdfPages(t, ctx), "a page per vehicle")
	screenshot(t, ctx, "fleet-print-sheets")
	require.NoError(t, chromedp.Do(ctx, media("")))
	// On screen the page is as before: the lanes, not the sheets.
	assert.Equal(t, "none", eval[string](t, ctx, `getComputedStyle(document.querySelector('[data-testid=print-team]')).display`))
	assert.Equal(t, "block", eval[string](t, ctx, `getComputedStyle(document.body).display`))
	assert.NotEqual(t, "none", eval[string](t, ctx, `getComputedStyle(document.getElementById('timeline')).display`))

	setField(t, ctx, "export-vehicle", "T2")
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(byTestID("print-plan"))))
	assert.Equal(t, []string{"T2"}, eval[[]string](t, ctx, `[...document.querySelectorAll('[data-testid=print-team] .print-vehicle')].map(s => s.dataset.vehicle)`))
	assert.Equal(t, 1, pdfPages(t, ctx), "T2's page alone")
}

// media emulates a CSS media type ("" the screen's own).
func media(m string) chromedp.Action[chromedp.Void] {
	return chromedp.Func(func(ctx context.Context, t *chromedp.Target) error {
		_, err := cdp.Call(ctx, t, emulation.SetEmulatedMedia, emulation.SetEmulatedMediaParams{Media: m})
		return err
	})
}

// pdfPages prints the page to PDF as the browser would and counts its
// pages.
func pdfPages(t *testing.T, ctx context.Context) int {
	t.Helper()
	buf, err := chromedp.Run(ctx, chromedp.PrintToPDF(chromedp.PDFPaper(chromedp.PaperA4), chromedp.PDFMargin(0.4),
		func(p *page.PrintToPDFParams) { p.PrintBackground = ptr(true) }))
	require.NoError(t, err)
	require.NoError(t, os.MkdirAll("testout", 0o755))
	require.NoError(t, os.WriteFile(filepath.Join("testout", "fleet-print-"+t.Name()+".pdf"), buf, 0o644))
	return len(regexp.MustCompile(`/Type\s*/Page[^s]`).FindAll(buf, -1))
}

// hintOverlaps counts the timeline's rows the empty hint line under the
// plan ("Point at a visit…") lies over.
const hintOverlaps = `(() => {
  const h = document.getElementById('visit-detail').getBoundingClientRect();
  return [...document.querySelectorAll('#timeline .visit, #timeline .lane-head')].filter(e => {
    const r = e.getBoundingClientRect(); return r.bottom > h.top + 0.5 && r.top < h.bottom - 0.5; }).length; })()`
