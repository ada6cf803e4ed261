package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"strconv"
	"strings"
	"sync"
	"time"

	"visitline/solver"
	"visitline/solver/bound"
	"visitline/solver/format"
)

// solve is the search the engine runs (a variable so that tests can watch
// the engine's side of the contract with a search of their own).
var solve = solver.Solve

// planEvery is the least time between two plans posted to the page.
const planEvery = 50 * time.Millisecond

// Engine is the worker's state: the loaded instance and the running search.
// Handle must be called from one goroutine at a time; post may be called
// from the search's goroutine too.
type Engine struct {
	post  func([]byte)
	pause func()

	mu  sync.Mutex
	d   *format.Dataset
	cur *run
	ids int
}

type run struct {
	id     int
	cancel context.CancelFunc
	mix    chan solver.Mix
	done   chan struct{}
	start  time.Time
}

// NewEngine makes an engine that sends its messages (JSON text) with post
// and gives the host a turn with pause while a search runs.
func NewEngine(post func([]byte), pause func()) *Engine {
	return &Engine{post: post, pause: pause}
}

func (e *Engine) send(msg map[string]any) {
	var b bytes.Buffer
	enc := json.NewEncoder(&b)
	enc.SetEscapeHTML(false)
	if err := enc.Encode(msg); err != nil {
		// Only NaN or Inf could get here; say so rather than go quiet.
		b.Reset()
		fmt.Fprintf(&b, `{"type":"failed","message":%q}`, "cannot encode a message: "+err.Error())
	}
	e.post(bytes.TrimSpace(b.Bytes()))
}

func (e *Engine) fail(format string, a ...any) {
	e.send(map[string]any{"type": "failed", "message": fmt.Sprintf(format, a...)})
}

// Ready announces the engine to the page.
func (e *Engine) Ready() {
	e.send(map[string]any{"type": "ready", "operators": solver.Operators})
}

// Handle acts on one message from the page (JSON text).
func (e *Engine) Handle(raw string) {
	var m inbound
	if err := json.Unmarshal([]byte(raw), &m); err != nil {
		e.fail("message is not valid JSON: %s", format.JSONError(err))
		return
	}
	switch m.Type {
	case "load":
		e.stopRun()
		e.load(m)
	case "start":
		e.stopRun()
		e.start(m)
	case "mix":
		e.changeMix(m)
	case "stop":
		e.stopRun()
	case "export":
		e.export(m)
	default:
		e.fail("unknown message type %q; want load, start, mix, stop or export", m.Type)
	}
}

func (e *Engine) load(m inbound) {
	name := m.Name
	if name == "" {
		name = "pasted text"
	}
	if strings.TrimSpace(m.Text) == "" {
		e.send(map[string]any{"type": "errors", "errors": []InputError{{File: name, Line: 1, Message: "there is no data: paste a matrix or CSV, or choose a file",
			Text: name + ":1: there is no data: paste a matrix or CSV, or choose a file"}}})
		return
	}
	m.Name = name
	d, err := loadDataset(m)
	if err != nil {
		e.mu.Lock()
		e.d = nil
		e.mu.Unlock()
		e.send(map[string]any{"type": "errors", "errors": inputErrors(err, name)})
		return
	}
	e.mu.Lock()
	e.d = d
	e.mu.Unlock()
	e.send(map[string]any{"type": "loaded", "summary": SummariseDataset(d)})
}

func (e *Engine) start(m inbound) {
	e.mu.Lock()
	d := e.d
	e.mu.Unlock()
	if d == nil {
		e.fail("no data is loaded: load a file, a paste or an example first")
		return
	}
	if !(m.Budget > 0 && m.Budget <= 3600) {
		e.fail("budget %s s: want seconds above 0 and at most 3600", strconv.FormatFloat(m.Budget, 'g', -1, 64))
		return
	}
	mix, err := checkMix(m.Mix)
	if err != nil {
		e.fail("mix: %v", err)
		return
	}
	obj, err := solver.ParseObjective(m.Objective)
	if err != nil {
		e.fail("%v", err)
		return
	}
	ctx, cancel := context.WithCancel(context.Background())
	e.mu.Lock()
	e.ids++
	r := &run{id: e.ids, cancel: cancel, mix: make(chan solver.Mix, 1), done: make(chan struct{}), start: time.Now()}
	e.cur = r
	e.mu.Unlock()
	budget := time.Duration(m.Budget * float64(time.Second))
	e.send(map[string]any{"type": "started", "run": r.id, "budget": m.Budget, "seed": m.Seed, "mix": mixOut(mix), "fixed": m.Fixed, "objective": obj.String()})
	go e.search(ctx, r, d, solver.Settings{Budget: budget, Seed: m.Seed, Mix: mix, FixedMix: m.Fixed, Objective: obj, FewestLate: m.FewestLate}, !m.NoBound)
}

// mixOut gives the weights the search starts from, for display.
func mixOut(m solver.Mix) map[string]float64 {
	out := map[string]float64{}
	for _, o := range solver.Operators {
		if m == nil {
			out[o] = 1
		} else {
			out[o] = m[o]
		}
	}
	return out
}

func (e *Engine) search(ctx context.Context, r *run, d *format.Dataset, s solver.Settings, withBound bool) {
	in := d.Instance
	defer close(r.done)
	defer r.cancel()
	// With the bound, OnImprove may come from the exact search's goroutine
	// too (never at the same time as from the engine's): mu keeps the
	// coalescing state whole natively; in the browser there is one thread.
	var (
		mu           sync.Mutex
		pending      *solver.Plan
		lastPost     time.Time
		iterations   int
		improvements int
	)
	post := func(p solver.Plan, res solver.Result, extra func(*format.PlanJSON)) {
		j := d.PlanJSON(s.Objective, p, &res)
		if extra != nil {
			extra(&j)
		}
		var csv, js bytes.Buffer
		if err := format.WriteCSV(&csv, in, j); err != nil {
			e.fail("cannot write the plan as CSV: %v", err)
		}
		if err := format.WriteJSON(&js, j); err != nil {
			e.fail("cannot write the plan as JSON: %v", err)
		}
		e.send(map[string]any{"type": "plan", "run": r.id, "plan": j, "csv": csv.String(), "json": js.String()})
	}
	flush := func() {
		if pending == nil {
			return
		}
		p := *pending
		pending = nil
		lastPost = time.Now()
		if p.Iteration > iterations {
			iterations = p.Iteration
		}
		post(p, solver.Result{Iterations: iterations, Elapsed: time.Since(r.start), Improvements: improvements}, nil)
	}
	s.MixUpdates = r.mix
	s.Pause = e.pause
	s.ProgressEvery = 50 * time.Millisecond
	s.OnImprove = func(p solver.Plan) {
		mu.Lock()
		defer mu.Unlock()
		improvements++
		pending = &p
		if time.Since(lastPost) >= planEvery {
			flush()
		}
	}
	s.OnProgress = func(p solver.Progress) {
		mu.Lock()
		defer mu.Unlock()
		flush()
		iterations = p.Iteration
		e.send(map[string]any{"type": "progress", "run": r.id, "iterations": p.Iteration, "elapsed": p.Elapsed.Seconds(),
			"best_cost": in.Float(p.BestCost), "feasible": p.Feasible, "weights": p.Weights})
	}
	var (
		res solver.Result
		b   bound.Bound
		err error
	)
	if withBound {
		res, b, err = solveBound(ctx, in, s, bound.Options{Yield: e.pause})
	} else {
		res, err = solve(ctx, in, s)
	}
	mu.Lock()
	defer mu.Unlock()
	if err != nil {
		flush()
		e.send(map[string]any{"type": "finished", "run": r.id, "why": "error", "message": err.Error(),
			"iterations": iterations, "elapsed": time.Since(r.start).Seconds(), "improvements": improvements})
		return
	}
	pending = nil
	if res.Best.Route != nil {
		// The last word on the best plan, with what the bound says of it
		// and, for a day that cannot be met, why: as `solve --format json`.
		var report bound.Report
		var ex *bound.Explanation
		if withBound {
			report = bound.ReportFor(b, res.Best)
			if !res.Best.Feasible && ctx.Err() == nil {
				e.send(map[string]any{"type": "progress", "run": r.id, "iterations": res.Iterations, "elapsed": time.Since(r.start).Seconds(),
					"best_cost": in.Float(res.Best.Cost), "feasible": false, "explaining": true})
				ex = explainDay(ctx, d, s.Budget, e.pause)
			}
		}
		post(res.Best, res, func(j *format.PlanJSON) {
			if report.HasBound {
				lb := in.Float(report.LowerBound)
				j.LowerBound = &lb
			}
			if report.HasGap {
				g := report.GapPct
				j.GapBoundPct = &g
			}
			j.ProvenOptimal = report.ProvenOptimal
			if ex != nil {
				j.Conflict, j.Reason = ex.ConflictIDs, ex.Reason
			}
		})
	}
	why := res.Stop
	if why == "cancelled" || (ctx.Err() != nil && why == "") {
		why = "stopped"
	}
	if why == "" {
		why = "budget"
	}
	e.send(map[string]any{"type": "finished", "run": r.id, "why": why, "iterations": res.Iterations,
		"elapsed": time.Since(r.start).Seconds(), "improvements": max(res.Improvements, improvements), "best_cost": in.Float(res.Best.Cost),
		"feasible": res.Best.Feasible})
}

// solveBound is the search with the bound beside it (a variable, as solve).
var solveBound = bound.SolveWith

// explainLimit caps the time spent explaining a day that cannot be met
// (the search yields to the event loop meanwhile, so a stop still lands).
const explainLimit = 3 * time.Second

// explainDay says why no plan meets every window, in the file's own times,
// or returns nil when that cannot be decided in time.
func explainDay(ctx context.Context, d *format.Dataset, budget time.Duration, yield func()) *bound.Explanation {
	ctx, cancel := context.WithTimeout(ctx, min(max(budget/2, time.Second), explainLimit))
	defer cancel()
	dur := d.FormatDuration
	if d.Unit != "" {
		dur = func(v int64) string { return d.FormatDuration(v) + " " + d.Unit }
	}
	ex, err := bound.ExplainWith(ctx, d.Instance, bound.ExplainOptions{FormatTime: d.FormatTime, FormatDuration: dur, Name: d.Name, Yield: yield})
	if err != nil {
		if errors.Is(err, bound.ErrUndecided) {
			return &bound.Explanation{Reason: "No plan meets every window within the search limits, and no short explanation was found in time."}
		}
		return nil
	}
	return &ex
}

func (e *Engine) changeMix(m inbound) {
	mix, err := checkMix(m.Mix)
	if err != nil || mix == nil {
		if err == nil {
			err = fmt.Errorf("empty mix: give a weight to at least one operator")
		}
		e.fail("mix: %v", err)
		return
	}
	e.mu.Lock()
	r := e.cur
	e.mu.Unlock()
	running := false
	elapsed := 0.0
	if r != nil {
		select {
		case <-r.done:
		default:
			// Keep only the newest mix: drop one the search has not taken yet.
			select {
			case <-r.mix:
			default:
			}
			r.mix <- mix
			running = true
			elapsed = time.Since(r.start).Seconds()
		}
	}
	id := 0
	if r != nil {
		id = r.id
	}
	e.send(map[string]any{"type": "mix", "run": id, "mix": mixOut(mix), "running": running, "elapsed": elapsed})
}

// stopRun cancels the running search and waits until it has said
// "finished", so that messages of two runs never interleave.
func (e *Engine) stopRun() {
	e.mu.Lock()
	r := e.cur
	e.cur = nil
	e.mu.Unlock()
	if r == nil {
		return
	}
	r.cancel()
	<-r.done
}

// export writes a plan of the loaded data in a format that needs more than
// the plan message carries: today the calendar, which needs the day.
func (e *Engine) export(m inbound) {
	e.mu.Lock()
	d := e.d
	e.mu.Unlock()
	reply := func(text, problem string) {
		e.send(map[string]any{"type": "export", "format": m.Format, "text": text, "error": problem})
	}
	if d == nil {
		reply("", "no data is loaded")
		return
	}
	if m.Format != "ics" {
		reply("", fmt.Sprintf("format %q: want ics", m.Format))
		return
	}
	in := d.Instance
	if err := solver.CheckRoute(in, m.Route); err != nil {
		reply("", "the plan does not fit the loaded data: "+err.Error())
		return
	}
	var day time.Time
	if m.Date != "" {
		var err error
		if day, err = time.Parse("2006-01-02", m.Date); err != nil {
			reply("", fmt.Sprintf("day %q: want YYYY-MM-DD", m.Date))
			return
		}
	}
	obj, _ := solver.ParseObjective(m.Objective)
	sch := solver.Evaluate(in, m.Route)
	p := solver.Plan{Route: m.Route, Schedule: sch, Cost: sch.Cost(obj), Feasible: sch.Feasible}
	var b bytes.Buffer
	if err := format.WriteICS(&b, d, p, format.ICSOptions{Date: day, Stamp: time.Now()}); err != nil {
		reply("", err.Error())
		return
	}
	reply(b.String(), "")
}
