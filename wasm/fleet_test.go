package main

import (
	"encoding/csv"
	"encoding/json"
	"os"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"visitline/solver/app"
	"visitline/solver/fleet"
	"visitline/solver/format"
)

const (
	teamSitesName = "testdata/fleet/boiler-team-sites.csv"
	teamVehName   = "testdata/fleet/boiler-team-vehicles.csv"
)

func readFile(t *testing.T, path string) string {
	t.Helper()
	b, err := os.ReadFile(path)
	require.NoError(t, err)
	return string(b)
}

// withoutTimes drops the wall-clock fields of a plan object.
func withoutTimes(t *testing.T, text string) map[string]any {
	t.Helper()
	var j map[string]any
	require.NoError(t, json.Unmarshal([]byte(text), &j))
	delete(j, "seconds")
	delete(j, "seconds_to_best")
	return j
}

// teamEngine is a new worker engine with the boiler firm's team day loaded.
func teamEngine(t *testing.T) (*Engine, *recorder) {
	t.Helper()
	rec := newRecorder()
	e := NewEngine(rec.post)
	loadTeam(t, e, rec)
	return e, rec
}

func loadTeam(t *testing.T, e *Engine, rec *recorder) map[string]any {
	t.Helper()
	e.Handle(msg(t, map[string]any{"type": "load", "name": teamSitesName, "text": readFile(t, "../"+teamSitesName),
		"vehicles": readFile(t, "../"+teamVehName), "vehicles_name": teamVehName}))
	return rec.wait(t, "loaded")
}

// The worker plans a fleet day as `visitline solve --format json` does:
// the same input, seed and iteration budget give the plan the command line
// wrote into testdata/fleet/boiler-team-plan.json (cmd/visitline's
// TestSolveFleetGolden checks the file against the command line itself).
func TestEngineFleetDayMatchesCommandLine(t *testing.T) {
	rec := newRecorder()
	e := NewEngine(rec.post)
	sum := loadTeam(t, e, rec)["summary"].(map[string]any)
	fl := sum["fleet"].(map[string]any)
	require.Len(t, fl["vehicles"], 3)
	assert.Equal(t, "Ines", fl["vehicles"].([]any)[0].(map[string]any)["name"])
	assert.Equal(t, 5.0, fl["vehicles"].([]any)[0].(map[string]any)["capacity"])
	assert.Equal(t, "07:30", sum["day_start_text"])

	e.Handle(msg(t, map[string]any{"type": "start", "budget": 0, "iterations": 400, "seed": 3}))
	fin := rec.wait(t, "finished")
	require.Equal(t, "iterations", fin["why"], fin)
	plans := rec.all("plan")
	require.NotEmpty(t, plans)
	pm := plans[len(plans)-1] // the run's last plan; earlier ones stream while it searches
	got := withoutTimes(t, pm["json"].(string))
	want := withoutTimes(t, readFile(t, "../testdata/fleet/boiler-team-plan.json"))
	assert.Equal(t, want, got)

	// The plan is a plan of the day: Evaluate, written apart from the
	// search, finds it feasible at the cost it claims.
	fd, _, err := app.LoadFleet(app.FleetInput{Sites: readFile(t, "../"+teamSitesName), SitesName: teamSitesName,
		Vehicles: readFile(t, "../"+teamVehName), VehiclesName: teamVehName})
	require.NoError(t, err)
	rep := evaluateFleetJSON(t, fd, got)
	assert.InDelta(t, fd.Problem.InputUnits(rep.Travel), got["cost"], 1e-9)
	assert.Contains(t, got["unserved_ids"], "H15") // its window closes before any shift begins

	// The CSV export has a vehicle column and lists the unserved visits.
	rows, err := csv.NewReader(strings.NewReader(pm["csv"].(string))).ReadAll()
	require.NoError(t, err)
	assert.Equal(t, "vehicle", rows[0][0])
	served := 0
	for _, r := range rows[1:] {
		if r[0] != "" {
			served++
		}
	}
	assert.Equal(t, int(got["served"].(float64)), served)
	assert.Equal(t, "unserved", rows[len(rows)-1][2])
}

func TestEngineFleetSizeAndErrors(t *testing.T) {
	sites := readFile(t, "../"+teamSitesName)
	cases := []struct {
		name string
		load map[string]any
		want string // "" loads, else a fragment of the first error
	}{
		{"fleet size", map[string]any{"fleet": 2}, ""},
		{"start not a site", map[string]any{"vehicles": "id,start\nV1,YARD\n", "vehicles_name": "v.csv"}, "v.csv:2"},
		{"shift backwards", map[string]any{"vehicles": "id,start,shift start,shift end\nV1,DEPOT,17:00,08:00\n", "vehicles_name": "v.csv"}, "v.csv:2"},
		{"both", map[string]any{"vehicles": "id,start\nV1,DEPOT\n", "fleet": 2}, "not both"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			rec := newRecorder()
			e := NewEngine(rec.post)
			m := map[string]any{"type": "load", "name": "sites.csv", "text": sites}
			for k, v := range c.load {
				m[k] = v
			}
			e.Handle(msg(t, m))
			if c.want == "" {
				sum := rec.wait(t, "loaded")["summary"].(map[string]any)
				assert.Len(t, sum["fleet"].(map[string]any)["vehicles"], 2)
				return
			}
			errs := rec.wait(t, "errors")["errors"].([]any)
			assert.Contains(t, errs[0].(map[string]any)["text"], c.want)
		})
	}
}

// A Solomon file is a fleet day by content, with its own vehicles; with
// "minimize":"vehicles" the plan uses as few as it can. Worked by hand:
// demands 6 + 6 exceed one capacity of 10, so two routes out and back,
// 2 × 5 + 2 × 5 = 20.
func TestEngineSolomonByContentAndFewestVehicles(t *testing.T) {
	rec := newRecorder()
	e := NewEngine(rec.post)
	text := "tiny\n\nVEHICLE\nNUMBER CAPACITY\n 3 10\n\nCUSTOMER\nCUST NO. XCOORD. YCOORD. DEMAND READY TIME DUE DATE SERVICE TIME\n" +
		" 0 0 0 0 0 100 0\n 1 3 4 6 0 50 1\n 2 -3 -4 6 0 50 1\n"
	e.Handle(msg(t, map[string]any{"type": "load", "name": "tiny.txt", "text": text}))
	sum := rec.wait(t, "loaded")["summary"].(map[string]any)
	assert.Len(t, sum["fleet"].(map[string]any)["vehicles"], 3)
	assert.Equal(t, 2.0, sum["sites"])
	e.Handle(msg(t, map[string]any{"type": "start", "budget": 0, "iterations": 200, "seed": 1, "minimize": "vehicles"}))
	rec.wait(t, "finished")
	p := rec.lastPlan()
	assert.Equal(t, true, p["minimize_vehicles"])
	assert.Equal(t, 2.0, p["vehicles_used"])
	assert.InDelta(t, 20, p["cost"], 1e-9)
}

// A stop ends a fleet day's search at once, with why "stopped" and the
// best plan so far.
func TestEngineFleetStop(t *testing.T) {
	rec := newRecorder()
	e := NewEngine(rec.post)
	loadTeam(t, e, rec)
	e.Handle(msg(t, map[string]any{"type": "start", "budget": 600, "seed": 1}))
	rec.wait(t, "started")
	e.Handle(msg(t, map[string]any{"type": "stop"}))
	fin := rec.wait(t, "finished")
	assert.Equal(t, "stopped", fin["why"])
	assert.Less(t, fin["elapsed"].(float64), 60.0, "a stop does not wait for the budget")
	assert.GreaterOrEqual(t, rec.count("plan"), 1, "the best plan so far comes with the stop")
}

// evaluateFleetJSON rebuilds a plan from its JSON object and checks it with
// fleet.Evaluate, written apart from the search: it must be feasible.
func evaluateFleetJSON(t *testing.T, fd *format.FleetDataset, got map[string]any) fleet.Report {
	t.Helper()
	pl := fleet.Plan{Routes: make([][]int, len(fd.Problem.Vehicles))}
	ids := map[string]int{}
	for k, v := range fd.Problem.Vehicles {
		ids[v.ID] = k
	}
	for _, r := range got["routes"].([]any) {
		r := r.(map[string]any)
		k, ok := ids[r["vehicle"].(string)]
		require.True(t, ok, "plan names vehicle %v, not in the day", r["vehicle"])
		for _, v := range r["visits"].([]any) {
			pl.Routes[k] = append(pl.Routes[k], int(v.(float64)))
		}
	}
	for _, u := range got["unserved"].([]any) {
		pl.Unserved = append(pl.Unserved, int(u.(float64)))
	}
	rep, err := fleet.Evaluate(fd.Problem, pl)
	require.NoError(t, err)
	require.True(t, rep.Feasible, rep.Problems)
	return rep
}

// A team search streams its new best plans while it runs, not only at the
// end: the construction's plan comes at once, later ones as they are
// found (held back as one-vehicle plans are), the last just before "finished"; each
// is a plan of the day (fleet.Evaluate), its cost and vehicle count as it
// claims, and the costs never rise.
func TestEngineFleetStreamsPlans(t *testing.T) {
	e, rec := teamEngine(t)
	e.Handle(msg(t, map[string]any{"type": "start", "budget": 0, "iterations": 400, "seed": 3}))
	rec.wait(t, "finished")
	fd, _, err := app.LoadFleet(app.FleetInput{Sites: readFile(t, "../"+teamSitesName), SitesName: teamSitesName,
		Vehicles: readFile(t, "../"+teamVehName), VehiclesName: teamVehName})
	require.NoError(t, err)
	seenFinished := false
	var plans []map[string]any
	for _, m := range rec.all("") {
		switch m["type"] {
		case "finished":
			seenFinished = true
		case "plan":
			assert.False(t, seenFinished, "a plan after finished")
			plans = append(plans, m["plan"].(map[string]any))
		}
	}
	require.GreaterOrEqual(t, len(plans), 2, "the construction's plan and the last one at least")
	for i, p := range plans {
		rep := evaluateFleetJSON(t, fd, p)
		assert.InDelta(t, fd.Problem.InputUnits(rep.Travel), p["cost"], 1e-9, "plan %d", i)
		assert.Equal(t, float64(rep.VehiclesUsed), p["vehicles_used"], "plan %d", i)
		if i == 0 {
			continue
		}
		// Serve more weight first, then travel less (no vehicle minimising here).
		u, pu := p["unserved_priority"].(float64), plans[i-1]["unserved_priority"].(float64)
		assert.LessOrEqual(t, u, pu, "plan %d leaves more out than the one before", i)
		if u == pu {
			assert.LessOrEqual(t, p["cost"].(float64), plans[i-1]["cost"].(float64), "plan %d travels more than the one before", i)
		}
	}
}

// A team's calendar from the worker: the plan's routes come back, are
// checked by fleet.Evaluate and written as one iCalendar file (RFC 5545)
// with the vehicle first in each event's summary, or one vehicle's only;
// a route naming a vehicle not in the table is refused.
func TestEngineFleetCalendar(t *testing.T) {
	e, rec := teamEngine(t)
	e.Handle(msg(t, map[string]any{"type": "start", "budget": 0, "iterations": 200, "seed": 3}))
	rec.wait(t, "finished")
	p := rec.lastPlan()
	var routes []map[string]any
	served := 0
	for _, r := range p["routes"].([]any) {
		r := r.(map[string]any)
		routes = append(routes, map[string]any{"vehicle": r["vehicle"], "visits": r["visits"]})
		served += len(r["visits"].([]any))
	}
	require.NotEmpty(t, routes)
	e.Handle(msg(t, map[string]any{"type": "export", "format": "ics", "routes": routes, "date": "2026-12-03"}))
	x := rec.wait(t, "export")
	require.Empty(t, x["error"])
	text := x["text"].(string)
	assert.True(t, strings.HasPrefix(text, "BEGIN:VCALENDAR\r\n"))
	assert.Equal(t, served, strings.Count(text, "BEGIN:VEVENT"))
	first := p["routes"].([]any)[0].(map[string]any)
	name := first["vehicle_name"].(string)
	assert.Equal(t, len(first["visits"].([]any)), strings.Count(text, "SUMMARY:"+name+": "), text)

	e2, rec2 := teamEngine(t)
	e2.Handle(msg(t, map[string]any{"type": "export", "format": "ics", "routes": routes, "vehicle": first["vehicle"], "date": "2026-12-03"}))
	one := rec2.wait(t, "export")
	assert.Equal(t, len(first["visits"].([]any)), strings.Count(one["text"].(string), "BEGIN:VEVENT"))

	e3, rec3 := teamEngine(t)
	e3.Handle(msg(t, map[string]any{"type": "export", "format": "ics", "routes": []any{map[string]any{"vehicle": "NOPE", "visits": []int{1}}}, "date": "2026-12-03"}))
	assert.Contains(t, rec3.wait(t, "export")["error"], `vehicle "NOPE" is not in the vehicles table`)
}
