package main

import (
	"bytes"
	"context"
	"strconv"
	"sync"
	"time"

	"visitline/solver"
	"visitline/solver/app"
	"visitline/solver/fleet"
	"visitline/solver/fmtlite"
	"visitline/solver/format"
)

// FleetSummary lists the vehicles of a fleet day, as loaded.
type FleetSummary struct {
	Vehicles []VehicleSummary `json:"vehicles"`
	// Demand says whether any visit has a demand.
	Demand bool `json:"demand"`
}

// VehicleSummary is one vehicle: where it starts and ends ("" a free end),
// its shift (input units, and as the file writes times), its capacity and
// longest day (absent: none).
type VehicleSummary struct {
	ID             string   `json:"id"`
	Name           string   `json:"name,omitempty"`
	Start          string   `json:"start"`
	End            string   `json:"end"`
	ShiftStart     float64  `json:"shift_start"`
	ShiftEnd       float64  `json:"shift_end"`
	ShiftStartText string   `json:"shift_start_text"`
	ShiftEndText   string   `json:"shift_end_text"`
	Capacity       *float64 `json:"capacity,omitempty"`
	MaxDuration    *float64 `json:"max_duration,omitempty"`
}

// SummariseFleet is the Summary of a fleet day: that of its sites file
// (d, nil for a Solomon file) with the vehicles.
func SummariseFleet(fd *format.FleetDataset, d *format.Dataset) Summary {
	p := fd.Problem
	var s Summary
	if d != nil {
		s = SummariseDataset(d)
		// The fleet's own warnings: the sites reader's less those about the
		// demand and priority columns, which a fleet day reads.
		s.Warnings = []InputError{}
		for _, w := range fd.Warnings {
			s.Warnings = append(s.Warnings, InputError{File: w.File, Line: w.Line, Column: w.Column, Field: w.Field, Message: w.Msg, Text: w.String()})
		}
	} else {
		s = Summary{Name: p.Name, Nodes: p.N, Shape: "closed", Scale: p.Scale, Warnings: []InputError{}}
		depot := p.Depots()
		for i := 0; i < p.N; i++ {
			if !depot[i] {
				s.Sites++
			}
		}
		if len(p.Vehicles) > 0 {
			v := p.Vehicles[0]
			s.Start = p.ID(v.Start)
			s.DayStart, s.DayEnd = p.InputUnits(v.ShiftStart), p.InputUnits(v.ShiftEnd)
			s.DayStartText, s.DayEndText = fd.FormatTime(v.ShiftStart), fd.FormatTime(v.ShiftEnd)
		}
	}
	f := &FleetSummary{Vehicles: []VehicleSummary{}}
	for k, v := range p.Vehicles {
		vs := VehicleSummary{ID: v.ID, Name: fd.VehicleNames[k], Start: p.ID(v.Start), ShiftStart: p.InputUnits(v.ShiftStart), ShiftEnd: p.InputUnits(v.ShiftEnd),
			ShiftStartText: fd.FormatTime(v.ShiftStart), ShiftEndText: fd.FormatTime(v.ShiftEnd)}
		if v.End != fleet.FreeEnd {
			vs.End = p.ID(v.End)
		}
		if v.Capacity < fleet.NoLimit {
			c, _ := strconv.ParseFloat(fd.FormatLoad(v.Capacity), 64)
			vs.Capacity = &c
		}
		if v.MaxDuration < fleet.NoLimit {
			md := p.InputUnits(v.MaxDuration)
			vs.MaxDuration = &md
		}
		// The day spans every shift.
		s.DayStart, s.DayEnd = min(s.DayStart, vs.ShiftStart), max(s.DayEnd, vs.ShiftEnd)
		f.Vehicles = append(f.Vehicles, vs)
	}
	for i := 0; i < p.N; i++ {
		if p.DemandOf(i) > 0 {
			f.Demand = true
		}
	}
	s.Fleet = f
	return s
}

// fleetDay is the loaded fleet day, nil if none.
func (e *Engine) fleetDay() *format.FleetDataset {
	e.mu.Lock()
	defer e.mu.Unlock()
	return e.fd
}

func (e *Engine) loadFleet(m inbound, name string) {
	vname := m.VehiclesName
	if vname == "" {
		vname = "pasted vehicles"
	}
	fd, d, err := app.LoadFleet(app.FleetInput{Sites: m.Text, SitesName: name, Matrix: m.Matrix, MatrixName: m.MatrixName,
		Vehicles: m.Vehicles, VehiclesName: vname, Count: m.Fleet, Options: m.Options})
	if err != nil {
		e.mu.Lock()
		e.d, e.fd = nil, nil
		e.mu.Unlock()
		e.send(errorsMsg{Type: "errors", LoadID: m.LoadID, Errors: inputErrors(err, name)})
		return
	}
	e.mu.Lock()
	e.d, e.fd = d, fd
	e.mu.Unlock()
	e.send(loadedMsg{Type: "loaded", LoadID: m.LoadID, Summary: SummariseFleet(fd, d)})
}

// startFleet runs a fleet day's search through app.RunFleet, as `solve`
// does for one: progress at each new best (fleet.Solve reports values,
// not plans, as it goes), then the best plan with its exports, then
// "finished".
func (e *Engine) startFleet(m inbound, fd *format.FleetDataset) {
	o := m.RunOptions
	if !(o.Budget > 0 && o.Budget <= maxBudget) && !(o.Budget == 0 && o.Iterations > 0) {
		e.fail("budget %s s: want seconds above 0 and at most %d", strconv.FormatFloat(o.Budget, 'g', -1, 64), maxBudget)
		return
	}
	switch m.Minimize {
	case "", "vehicles":
	default:
		e.fail("minimize %q: want vehicles or nothing", m.Minimize)
		return
	}
	obj, err := solver.ParseObjective(o.Objective)
	if err != nil {
		e.fail("%v", err)
		return
	}
	if m.Role == "bound" {
		e.fail("a day with several vehicles has no bound worker: start one worker with role search or none")
		return
	}
	if m.Role == "search" {
		o.Seed += int64(m.Worker) * 7919
	}
	asked := o.Budget
	o.Budget -= waited(m.ClickedAt, o.Budget)
	ctx, cancel := context.WithCancel(context.Background())
	e.mu.Lock()
	e.ids++
	r := &run{id: e.ids, cancel: cancel, mix: make(chan solver.Mix, 1), adopt: make(chan []int, 4), done: make(chan struct{}), start: time.Now()}
	e.cur = r
	e.mu.Unlock()
	e.send(startedMsg{Type: "started", Run: r.id, Role: m.Role, Budget: asked, Seed: o.Seed, Mix: mixOut(nil), Objective: obj.String()})
	go e.searchFleet(ctx, r, fd, o, m.Minimize == "vehicles")
}

func (e *Engine) searchFleet(ctx context.Context, r *run, fd *format.FleetDataset, o app.RunOptions, minVeh bool) {
	defer close(r.done)
	defer r.cancel()
	var mu sync.Mutex
	obj, _ := solver.ParseObjective(o.Objective) // checked by startFleet
	improved, iters := 0, 0
	last, lastPlan, every := time.Time{}, time.Time{}, planEvery(fd.Problem.N)
	onImprove := func(p fleet.Progress) {
		mu.Lock()
		defer mu.Unlock()
		improved++
		iters = p.Iteration
		if time.Since(last) < 50*time.Millisecond {
			return
		}
		last = time.Now()
		e.send(progressMsg{Type: "progress", Run: r.id, Iterations: p.Iteration, Elapsed: p.Elapsed.Seconds(), BestCost: fd.Problem.InputUnits(p.Value.Cost),
			Feasible: true, VehiclesUsed: p.Value.Vehicles, UnservedPriority: p.Value.Unserved, Phase: p.Phase})
		if p.Plan != nil && time.Since(lastPlan) >= every {
			lastPlan = last
			e.sendFleetPlan(r.id, fd, obj, minVeh, p)
		}
	}
	out, err := app.RunFleet(ctx, fd, o, minVeh, onImprove)
	mu.Lock()
	defer mu.Unlock()
	if err != nil {
		e.send(finishedMsg{Type: "finished", Run: r.id, Why: solver.StopError, Message: err.Error(), Iterations: iters,
			Elapsed: time.Since(r.start).Seconds(), Improvements: improved})
		return
	}
	res := out.Result
	why := solver.StopBudget
	switch {
	case ctx.Err() != nil:
		why = solver.StopStopped
	case o.Iterations > 0 && res.Iterations >= o.Iterations:
		why = solver.StopIterations
	}
	var csv, js bytes.Buffer
	if err := format.WriteFleetCSV(&csv, out.Plan); err != nil {
		e.fail("cannot write the plan as CSV: %v", err)
	}
	if err := format.WriteFleetJSON(&js, out.Plan); err != nil {
		e.fail("cannot write the plan as JSON: %v", err)
	}
	e.send(planMsg{Type: "plan", Run: r.id, Plan: rawJSON(bytes.TrimSpace(js.Bytes())), CSV: csv.String(), JSON: js.String()})
	c := out.Plan.Cost
	e.send(finishedMsg{Type: "finished", Run: r.id, Why: why, Iterations: res.Iterations, Elapsed: time.Since(r.start).Seconds(),
		Improvements: len(res.Trace), BestCost: &c, Feasible: out.Plan.Feasible})
}

// sendFleetPlan sends the new best plan of a running fleet search as a
// "plan" message, the same object as the last one of the run (checked from
// scratch by fleet.Evaluate first; a plan that fails the check is not
// sent, the final one reports the error). Days over 300 nodes get their
// exports only with the last plan, as one-vehicle days do.
func (e *Engine) sendFleetPlan(run int, fd *format.FleetDataset, obj solver.Objective, minVeh bool, p fleet.Progress) {
	res, err := evaluated(fd.Problem, p.Plan(), obj)
	if err != nil {
		return
	}
	res.Iterations, res.Elapsed, res.ToBest = p.Iteration, p.Elapsed, p.Elapsed
	plan := fd.PlanReport(obj, minVeh, &res)
	var js bytes.Buffer
	if err := format.WriteFleetJSON(&js, plan); err != nil {
		return
	}
	m := planMsg{Type: "plan", Run: run, Plan: rawJSON(bytes.TrimSpace(js.Bytes()))}
	if fd.Problem.N <= 300 {
		var csv bytes.Buffer
		if format.WriteFleetCSV(&csv, plan) == nil {
			m.CSV, m.JSON = csv.String(), js.String()
		}
	}
	e.send(m)
}

// fleetICS writes a fleet plan sent back by the page as a calendar: the
// routes are rebuilt into a fleet.Plan (the visits in no route are the
// unserved ones), checked by fleet.Evaluate, and written from the report
// recomputed from them, not from the page's figures.
func fleetICS(fd *format.FleetDataset, m inbound) (string, error) {
	p := fd.Problem
	pl := fleet.Plan{Routes: make([][]int, len(p.Vehicles))}
	byID := map[string]int{}
	for k, v := range p.Vehicles {
		byID[v.ID] = k
	}
	in := map[int]bool{}
	for _, r := range m.Routes {
		k, ok := byID[r.Vehicle]
		if !ok {
			return "", fmtlite.Errorf("the plan does not fit the loaded data: vehicle %q is not in the vehicles table", r.Vehicle)
		}
		for _, v := range r.Visits {
			if v < 0 || v >= p.N {
				return "", fmtlite.Errorf("the plan does not fit the loaded data: node %d is not a site", v)
			}
			in[v] = true
		}
		pl.Routes[k] = append(pl.Routes[k], r.Visits...)
	}
	for _, v := range p.Visits() {
		if !in[v] {
			pl.Unserved = append(pl.Unserved, v)
		}
	}
	obj, _ := solver.ParseObjective(m.Objective)
	res, err := evaluated(p, pl, obj)
	if err != nil {
		return "", fmtlite.Errorf("the plan does not fit the loaded data: %v", err)
	}
	var day time.Time
	if m.Date != "" {
		if day, err = time.Parse("2006-01-02", m.Date); err != nil {
			return "", fmtlite.Errorf("day %q: want YYYY-MM-DD", m.Date)
		}
	}
	var b bytes.Buffer
	if err := format.WriteFleetICS(&b, fd, fd.PlanReport(obj, false, &res), m.Vehicle, format.ICSOptions{Date: day, Stamp: time.Now()}); err != nil {
		return "", err
	}
	return b.String(), nil
}

// evaluated checks a plan from scratch with fleet.Evaluate and gives it as
// a Result, with the reasons for its unserved visits, for PlanReport; a
// plan that is not a plan of the day, or breaks a constraint, is an error.
func evaluated(p *fleet.Problem, pl fleet.Plan, obj solver.Objective) (fleet.Result, error) {
	rep, err := fleet.Evaluate(p, pl)
	if err != nil {
		return fleet.Result{}, err
	}
	if !rep.Feasible {
		return fleet.Result{}, fmtlite.Errorf("%v", rep.Problems)
	}
	return fleet.Result{Best: pl, Report: rep, Value: rep.Value(obj), Reasons: fleet.Reasons(p, rep.Unserved)}, nil
}
