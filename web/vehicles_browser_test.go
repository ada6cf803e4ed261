package web_test

import (
	"encoding/json"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"visitline/solver/app"
	"visitline/solver/fleet"
	"visitline/solver/format"
)

// The vehicles editor: the boiler firm's sites are read for one vehicle;
// the dispatcher opens "Several vehicles", asks for 3 vehicles, sets
// their shift and capacity on every vehicle, and presses Start. The page
// reads the day again with the table the editor wrote into the text box
// and draws 3 lanes; the plan (its JSON export) passes fleet.Evaluate on
// the day read from that same text, and every vehicle has the shift and
// capacity set. A wrong shift is refused first, naming the vehicle and
// the field, and the text keeps what was typed.
func TestPageVehicleEditorThreeVehiclesStart(t *testing.T) {
	ctx, _ := tab(t)
	viewport(t, ctx, 1366, 768)
	openPage(t, ctx, "")
	sites := readText(t, filepath.Join("..", "testdata", "fleet", "boiler-team-sites.csv"))
	paste(t, ctx, sites)
	waitFor(t, ctx, `!document.querySelector('[data-testid=start]').disabled`, 10*time.Second)
	require.False(t, eval[bool](t, ctx, `!!document.querySelector('[data-testid=team-summary]')`), "one vehicle so far")

	require.NoError(t, chromedp.Do(ctx, chromedp.Click(chromedp.CSS(`#team-box > summary`))))
	setField(t, ctx, "fleet-size", "3")
	assert.Equal(t, 3, eval[int](t, ctx, `document.querySelectorAll('[data-testid=vehicle-cards] li').length`), "a card per vehicle")
	setField(t, ctx, "all-shift-start", "08:00")
	setField(t, ctx, "all-shift-end", "16:30")
	setField(t, ctx, "all-capacity", "5")
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(byTestID("vehicles-set-all"))))
	text := eval[string](t, ctx, `document.querySelector('[data-testid=vehicles-input]').value`)
	assert.Equal(t, "id,name,start,end,shift start,shift end,capacity\n1,,,,08:00,16:30,5\n2,,,,08:00,16:30,5\n3,,,,08:00,16:30,5\n", text,
		"the editor writes the table into the text box, vehicles 1 to 3 as --fleet 3 names them")

	// A shift that ends before it starts: named with its vehicle and
	// field, marked, and Start refuses it; the text keeps it as typed.
	eval[bool](t, ctx, `(() => { const e = document.querySelector('[data-testid=vehicle-cards] li[data-row="1"] input[data-field="shift end"]');
	  e.value = '07:15'; e.dispatchEvent(new Event('input', {bubbles: true})); return true; })()`)
	probs := eval[string](t, ctx, `document.querySelector('[data-testid=vehicles-problems]').textContent`)
	assert.Contains(t, probs, "Vehicle 2 (2), shift end: “07:15” is before the shift start “08:00”")
	assert.Equal(t, "true", eval[string](t, ctx, `document.querySelector('[data-testid=vehicle-cards] li[data-row="1"] input[data-field="shift end"]').getAttribute('aria-invalid')`))
	assert.Contains(t, eval[string](t, ctx, `document.querySelector('[data-testid=vehicles-input]').value`), "2,,,,08:00,07:15,5", "nothing typed is lost")
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(byTestID("start"))))
	assert.Contains(t, eval[string](t, ctx, `document.querySelector('[data-testid=status]').textContent`), "Vehicle 2 (2), shift end")
	assert.Equal(t, "shift end", eval[string](t, ctx, `document.activeElement.dataset.field || ''`), "the cursor goes to the field")
	assert.Empty(t, eval[string](t, ctx, `document.body.dataset.run || ''`), "no search started")
	// Put it right again.
	eval[bool](t, ctx, `(() => { const e = document.querySelector('[data-testid=vehicle-cards] li[data-row="1"] input[data-field="shift end"]');
	  e.value = '16:30'; e.dispatchEvent(new Event('input', {bubbles: true})); return true; })()`)
	assert.True(t, eval[bool](t, ctx, `document.querySelector('[data-testid=vehicles-problems]').hidden`))
	text = eval[string](t, ctx, `document.querySelector('[data-testid=vehicles-input]').value`)
	require.Equal(t, 3, strings.Count(text, ",08:00,16:30,5\n"))

	run(t, ctx, "1")
	waitFor(t, ctx, `!!document.querySelector('[data-testid=team-summary]')`, 5*time.Second)
	lanes := eval[[]string](t, ctx, `[...document.querySelectorAll('[data-testid=timeline] .lane-head')].map(e => e.dataset.lane)`)
	assert.Equal(t, []string{"1", "2", "3"}, lanes, "three lanes")
	_, jsonText := exportText(t, ctx, "export-json")
	var p format.FleetPlanReport
	require.NoError(t, json.Unmarshal([]byte(jsonText), &p))
	require.Equal(t, 3, p.Vehicles)
	require.Len(t, p.Routes, 3)

	// The plan against the independent evaluator, on the day read from
	// the text the editor wrote.
	fd, _, err := app.LoadFleet(app.FleetInput{Sites: sites, SitesName: "pasted text", Vehicles: text, VehiclesName: "pasted vehicles"})
	require.NoError(t, err)
	for _, v := range fd.Problem.Vehicles {
		assert.Equal(t, "08:00", fd.FormatTime(v.ShiftStart), "vehicle %s", v.ID)
		assert.Equal(t, "16:30", fd.FormatTime(v.ShiftEnd), "vehicle %s", v.ID)
		assert.Equal(t, "5", fd.FormatLoad(v.Capacity), "vehicle %s", v.ID)
	}
	pl := fleet.Plan{Routes: make([][]int, len(fd.Problem.Vehicles)), Unserved: p.Unserved}
	for _, r := range p.Routes {
		for k, v := range fd.Problem.Vehicles {
			if v.ID == r.Vehicle {
				pl.Routes[k] = r.Visits
			}
		}
		assert.LessOrEqual(t, r.Load, 5.0, "vehicle %s within its capacity", r.Vehicle)
	}
	rep, err := fleet.Evaluate(fd.Problem, pl)
	require.NoError(t, err)
	assert.True(t, rep.Feasible, rep.Problems)
	assert.InDelta(t, fd.Problem.InputUnits(rep.Travel), p.Cost, 1e-6)
	assert.Equal(t, 15, p.Served+len(p.Unserved))
	view(t, ctx, "testout", "vehicle-editor-1366")
	eval[bool](t, ctx, `document.querySelector('[data-testid=vehicles-editor]').scrollIntoView(); true`)
	view(t, ctx, "testout", "vehicle-editor-cards-1366")
	viewport(t, ctx, 390, 844)
	eval[bool](t, ctx, `document.querySelector('[data-testid=vehicles-editor]').scrollIntoView(); true`)
	view(t, ctx, "testout", "vehicle-editor-cards-390")
	assert.LessOrEqual(t, eval[int](t, ctx, `document.documentElement.scrollWidth`), 390, "the editor fits a phone")
}

// What the editor wrote and nobody read yet comes back with a kept
// session after a reload: the text box and its cards.
func TestPageVehicleEditorKeptUnread(t *testing.T) {
	ctx, _ := tab(t)
	openPage(t, ctx, "")
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(byTestID("keep-session"))))
	paste(t, ctx, readText(t, filepath.Join("..", "testdata", "fleet", "boiler-team-sites.csv")))
	waitFor(t, ctx, `!document.querySelector('[data-testid=start]').disabled`, 10*time.Second)
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(chromedp.CSS(`#team-box > summary`))))
	setField(t, ctx, "fleet-size", "2")
	eval[bool](t, ctx, `(() => { const e = document.querySelector('[data-testid=vehicle-cards] li[data-row="1"] input[data-field="name"]');
	  e.value = 'Petra'; e.dispatchEvent(new Event('input', {bubbles: true})); return true; })()`)
	want := "id,name,start,end,shift start,shift end,capacity\n1,,,,,,\n2,Petra,,,,,\n"
	require.Equal(t, want, eval[string](t, ctx, `document.querySelector('[data-testid=vehicles-input]').value`))
	time.Sleep(1200 * time.Millisecond) // the page saves typing after 0.8 s
	openPage(t, ctx, "")
	waitFor(t, ctx, `document.getElementById('summary').textContent.includes('pasted text')`, 10*time.Second)
	assert.Equal(t, want, eval[string](t, ctx, `document.querySelector('[data-testid=vehicles-input]').value`), "the editor's table is kept, unread")
	assert.Equal(t, "Petra", eval[string](t, ctx, `document.querySelector('[data-testid=vehicle-cards] li[data-row="1"] input[data-field="name"]').value`))
	assert.Equal(t, "2", eval[string](t, ctx, `document.querySelector('[data-testid=fleet-size]').value`))
}

// Emptying the vehicles text plans one vehicle again: the count goes too,
// and Start reads the sites alone.
func TestPageVehicleEditorEmptiedIsOneVehicle(t *testing.T) {
	ctx, _ := tab(t)
	openPage(t, ctx, "")
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(chromedp.CSS(`#team-box > summary`))))
	setField(t, ctx, "fleet-size", "2")
	paste(t, ctx, readText(t, filepath.Join("..", "testdata", "fleet", "boiler-team-sites.csv")))
	waitFor(t, ctx, `!!document.querySelector('[data-testid=team-summary]')`, 10*time.Second)
	setField(t, ctx, "vehicles-input", "")
	assert.Equal(t, "", eval[string](t, ctx, `document.querySelector('[data-testid=fleet-size]').value`))
	assert.Equal(t, 0, eval[int](t, ctx, `document.querySelectorAll('[data-testid=vehicle-cards] li').length`))
	run(t, ctx, "0.3")
	assert.False(t, eval[bool](t, ctx, `!!document.querySelector('[data-testid=team-summary]')`), "one vehicle again")
	assert.Zero(t, eval[int](t, ctx, `document.querySelectorAll('[data-testid=timeline] .lane-head').length`))
	assert.Positive(t, eval[int](t, ctx, `document.querySelectorAll('[data-testid=timeline] .visit').length`))
}
