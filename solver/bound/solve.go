package bound

import (
	"context"
	"sync"
	"time"

	"visitline/solver"
)

// Report is the bound side's verdict on a plan, ready for output: the
// command line's `lower_bound`, `gap_bound_pct` and `proven_optimal`.
type Report struct {
	// LowerBound is in internal units; HasBound says it was computed.
	LowerBound int64
	HasBound   bool
	// GapPct is 100·(cost − bound)/bound for the returned plan; HasGap says
	// it is defined (a feasible plan and a positive bound).
	GapPct float64
	HasGap bool
	// ProvenOptimal says the returned plan is optimal.
	ProvenOptimal bool
	// Infeasible says it is proven that no plan meets every window.
	Infeasible bool
}

// ReportFor states what b says about a plan of the given cost.
func ReportFor(b Bound, best solver.Plan) Report {
	r := Report{LowerBound: b.Value, HasBound: b.Valid, Infeasible: b.Infeasible}
	if best.Feasible && b.Valid {
		r.GapPct, r.HasGap = b.GapPct(best.Cost)
		r.ProvenOptimal = b.Value >= best.Cost
	}
	return r
}

// Solve runs the engine (solver.Solve) and the bound side (Exact) at the
// same time within the same budget, and returns the engine's result, improved
// by the exact search where it found a better plan, with the bound. The two
// share the best feasible cost: every plan the engine finds prunes the exact
// search, and a proof of optimality stops the engine early (Result.Stop is
// then "complete"). A plan the exact search finds that beats the engine's is
// sent to s.OnImprove with Operator "exact"; s.OnImprove may then be called
// from either goroutine, never from both at once.
//
// With s.Budget set, both sides stop at it. With only an iteration budget,
// the bounds before the exact search run to their own limits (so they are
// the same from run to run), and the exact search stops when the engine does.
func Solve(ctx context.Context, in *solver.Instance, s solver.Settings) (solver.Result, Bound, error) {
	return SolveWith(ctx, in, s, Options{})
}

// SolveWith is Solve with bound options (limits, a yield hook); their
// Objective and Incumbent are set from s and the engine.
func SolveWith(ctx context.Context, in *solver.Instance, s solver.Settings, o Options) (solver.Result, Bound, error) {
	if err := in.Validate(); err != nil {
		return solver.Result{}, Bound{}, err
	}
	start := time.Now()
	if s.Budget > 0 {
		var cancel context.CancelFunc
		ctx, cancel = context.WithTimeout(ctx, s.Budget)
		defer cancel()
	}
	engCtx, stopEngine := context.WithCancel(ctx)
	defer stopEngine()
	searchCtx, stopSearch := context.WithCancel(ctx)
	defer stopSearch()

	var mu sync.Mutex
	incCost, incOK := int64(0), false // best feasible cost known on either side
	reported := false                 // a feasible plan was sent to OnImprove
	reportedCost := int64(0)
	improvements := 0
	user := s.OnImprove
	s.OnImprove = func(p solver.Plan) {
		mu.Lock()
		defer mu.Unlock()
		feasible := p.Feasible && solver.CheckRoute(in, p.Route) == nil && solver.Evaluate(in, p.Route).Feasible
		if feasible && (!incOK || p.Cost < incCost) {
			incCost, incOK = p.Cost, true
		}
		if reported && (!feasible || p.Cost >= reportedCost) {
			return // the exact search already sent a plan at least as good
		}
		if feasible {
			reported, reportedCost = true, p.Cost
		}
		improvements++
		if user != nil {
			user(p)
		}
	}
	o.Objective = s.Objective
	o.Incumbent = func() (int64, bool) {
		mu.Lock()
		defer mu.Unlock()
		return incCost, incOK
	}

	var b Bound
	done := make(chan struct{})
	go func() {
		defer close(done)
		b = runPhases(ctx, searchCtx, in, o, true)
		mu.Lock()
		if b.Route != nil && (!incOK || b.Cost < incCost) {
			incCost, incOK = b.Cost, true
			if !reported || b.Cost < reportedCost {
				sch := solver.Evaluate(in, b.Route)
				p := solver.Plan{Route: append([]int(nil), b.Route...), Schedule: sch, Cost: sch.Cost(s.Objective),
					Feasible: sch.Feasible, Elapsed: time.Since(start), Operator: "exact"}
				reported, reportedCost = true, p.Cost
				improvements++
				if user != nil {
					user(p)
				}
			}
		}
		proven := b.Valid && incOK && b.Value >= incCost
		mu.Unlock()
		if proven {
			stopEngine()
		}
	}()
	res, err := solver.Solve(engCtx, in, s)
	if s.Budget <= 0 || err != nil {
		stopSearch() // only an iteration budget (or a failure): the search ends with the engine
	}
	<-done
	if err != nil {
		return res, b, err
	}
	// The better of the two plans.
	if b.Route != nil && (!res.Best.Feasible || b.Cost < res.Best.Cost) {
		sch := solver.Evaluate(in, b.Route)
		res.Best = solver.Plan{Route: append([]int(nil), b.Route...), Schedule: sch, Cost: sch.Cost(s.Objective),
			Feasible: sch.Feasible, Iteration: res.Iterations, Elapsed: time.Since(start), Operator: "exact"}
	}
	if res.Best.Feasible && b.Valid && b.Value >= res.Best.Cost {
		b.Value = res.Best.Cost
		b.ProvenOptimal = true
		res.Stop = solver.StopComplete
	} else {
		b.ProvenOptimal = false
	}
	res.Improvements = improvements
	res.Elapsed = time.Since(start)
	return res, b, nil
}
