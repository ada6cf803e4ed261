package solver

import (
	"context"
	"runtime"
	"sync"
	"time"

	"visitline/solver/turn"
)

// Solve searches for the best plan of in within the limits of s and returns
// the best plan found. It stops at s.Budget, s.Iterations or when ctx is
// cancelled, whichever comes first. With one worker, a seed and an
// iteration budget (and no mix changes during the run) a run is
// reproducible.
func Solve(ctx context.Context, in *Instance, s Settings) (Result, error) {
	// The budget counts from here: building the model is part of it.
	start := time.Now()
	if err := in.Validate(); err != nil {
		return Result{}, err
	}
	// On a large day tightening the windows can take seconds: it stops
	// when the context ends or half the time budget is gone, so that
	// construction has the rest.
	halt := func() bool {
		return ctx.Err() != nil || s.Budget > 0 && time.Since(start) >= s.Budget/2
	}
	m, err := buildModel(in, s.Objective, halt)
	if err != nil {
		return Result{}, err
	}
	m.fewest = s.FewestLate
	e := &engine{m: m, set: s, start: start}
	if e.set.ProgressEvery <= 0 {
		e.set.ProgressEvery = 50 * time.Millisecond
	}
	if e.set.Budget > 0 {
		e.deadline = e.start.Add(e.set.Budget)
	}
	e.weights = s.Mix.weights()
	var sum float64
	for _, w := range e.weights {
		sum += w
	}
	if sum <= 0 {
		e.weights = Mix(nil).weights()
	}
	workers := s.Workers
	if workers < 1 {
		workers = 1
	}
	if max := runtime.GOMAXPROCS(0); workers > max {
		workers = max
	}
	if len(m.movable) < 4 {
		workers = 1
	}
	e.lastTick = e.start
	if workers == 1 {
		e.work(ctx, 0, s.Seed)
	} else {
		var wg sync.WaitGroup
		for w := 0; w < workers; w++ {
			wg.Add(1)
			go func(w int) {
				defer wg.Done()
				e.work(ctx, w, s.Seed+int64(w)*7919)
			}(w)
		}
		wg.Wait()
	}
	res := Result{Best: e.best, Iterations: e.iters, Elapsed: time.Since(e.start), Improvements: e.improvements, Stop: e.stop, FirstPlan: e.first}
	if !e.done {
		// A worker ended on its own (nothing left to search).
		res.Stop = StopComplete
	}
	if res.Best.Route == nil { // nothing found: cannot happen with ≥ 1 construction
		res.Best = e.planOf(identityRoute(m), 0, "construct")
	}
	if !res.Best.Feasible && ctx.Err() == nil {
		// The last polish gets a twentieth of the budget past its end, at
		// most 100 ms (a large day's polish could take seconds).
		var halt func() bool
		if !e.deadline.IsZero() {
			end := e.deadline.Add(min(s.Budget/20, 100*time.Millisecond))
			halt = func() bool { return ctx.Err() != nil || !time.Now().Before(end) }
		}
		p := minimiseLateness(m, res.Best.Route, s.Objective, halt)
		if e.better(p, res.Best) {
			p.Iteration, p.Elapsed, p.Operator = e.iters, time.Since(e.start), "lateness"
			res.Best = p
			res.Improvements++
			if s.OnImprove != nil {
				s.OnImprove(clonePlan(p))
			}
		}
	}
	return res, nil
}

func identityRoute(m *model) []int32 {
	r := []int32{int32(m.start)}
	for _, v := range m.movable {
		r = append(r, int32(v))
	}
	return append(r, int32(m.end))
}

// engine holds what the workers share: the best plan, the counters and the
// reporting.
type engine struct {
	m     *model
	set   Settings
	start time.Time

	deadline time.Time

	mu           sync.Mutex
	best         Plan
	bestTW       int64 // time warp of the best (0 when feasible)
	bestVal      int64 // model cost of the best
	haveBest     bool
	bestRoute    []int32
	iters        int
	improvements int
	stop         Stop
	done         bool
	first        time.Duration // when the first plan was offered
	weights      []float64
	lastTick     time.Time
}

// offer records a candidate route found by a worker; it reports whether it
// became the best. Feasible plans rank by cost; infeasible ones after every
// feasible plan, by total lateness as the evaluator counts it, then cost.
func (e *engine) offer(r *route, op string) bool {
	t := r.total()
	c := e.m.cost(t)
	e.mu.Lock()
	defer e.mu.Unlock()
	if e.haveBest && e.best.Feasible && (t.tw > 0 || c >= e.bestVal) {
		return false
	}
	if t.tw > 0 || !e.haveBest || !e.best.Feasible {
		p := e.planOf(r.r, e.iters, op)
		if e.haveBest && !e.better(p, e.best) {
			return false
		}
		e.take(r.r, t, p)
		return true
	}
	e.take(r.r, t, e.planOf(r.r, e.iters, op))
	return true
}

// offerExternal offers an instance route (from the lateness search).
func (e *engine) offerExternal(route []int, op string) bool {
	sch := Evaluate(e.m.in, route)
	p := Plan{Route: append([]int(nil), route...), Schedule: sch, Cost: sch.Cost(e.set.Objective), Feasible: sch.Feasible, Operator: op}
	e.mu.Lock()
	defer e.mu.Unlock()
	p.Iteration, p.Elapsed = e.iters, time.Since(e.start)
	if e.haveBest && !e.better(p, e.best) {
		return false
	}
	if !e.haveBest {
		e.first = time.Since(e.start)
	}
	e.haveBest = true
	e.best = p
	e.bestTW = 1 // not from a model route: workers keep their own
	e.bestVal = p.Cost
	if e.set.Objective == TravelTime {
		e.bestVal -= e.m.prefixC // model costs leave out the driven prefix
	}
	e.bestRoute = nil
	e.improvements++
	if e.set.OnImprove != nil {
		e.set.OnImprove(clonePlan(p))
	}
	return true
}

func (e *engine) better(a, b Plan) bool {
	if a.Feasible != b.Feasible {
		return a.Feasible
	}
	if !a.Feasible {
		ka := lateKey(a.Schedule.TotalLateness, a.Schedule.LateVisits, e.m.fewest)
		kb := lateKey(b.Schedule.TotalLateness, b.Schedule.LateVisits, e.m.fewest)
		if ka != kb {
			return ka < kb
		}
	}
	return a.Cost < b.Cost
}

func (e *engine) take(r []int32, t seg, p Plan) {
	if !e.haveBest {
		e.first = time.Since(e.start)
	}
	e.haveBest = true
	e.bestTW, e.bestVal = t.tw, e.m.cost(t)
	e.bestRoute = append(e.bestRoute[:0], r...)
	e.best = p
	e.improvements++
	if e.set.OnImprove != nil {
		e.set.OnImprove(clonePlan(e.best))
	}
}

func (e *engine) planOf(r []int32, iter int, op string) Plan {
	route := e.m.external(r)
	sch := Evaluate(e.m.in, route)
	return Plan{Route: route, Schedule: sch, Cost: sch.Cost(e.set.Objective), Feasible: sch.Feasible,
		Iteration: iter, Elapsed: time.Since(e.start), Operator: op}
}

func clonePlan(p Plan) Plan {
	p.Route = append([]int(nil), p.Route...)
	p.Schedule.Visits = append([]Visit(nil), p.Schedule.Visits...)
	return p
}

// tick counts one iteration and decides whether to go on. It also runs the
// periodic progress report and picks up mix changes.
func (e *engine) tick(ctx context.Context) (goOn bool, mixChanged []float64) {
	e.mu.Lock()
	defer e.mu.Unlock()
	if e.done {
		return false, nil
	}
	e.iters++
	if e.set.Iterations > 0 && e.iters >= e.set.Iterations {
		e.finish(StopIterations)
		return false, nil
	}
	if ctx.Err() != nil {
		e.finish(StopOf(ctx))
		return false, nil
	}
	now := turn.Now()
	if !e.deadline.IsZero() && !now.Before(e.deadline) {
		e.finish(StopBudget)
		return false, nil
	}
	if e.set.MixUpdates != nil {
		select {
		case mx := <-e.set.MixUpdates:
			w := mx.weights()
			var sum float64
			for _, x := range w {
				sum += x
			}
			if sum > 0 {
				e.weights = w
				mixChanged = w
			}
		default:
		}
	}
	if e.set.Adopt != nil {
		select {
		case r := <-e.set.Adopt:
			e.adopt(r)
		default:
		}
	}
	e.heartbeat(now)
	return true, mixChanged
}

// adopt takes an instance route from outside as the best when it is better
// (a route that does not fit is ignored). Call with e.mu held.
func (e *engine) adopt(route []int) {
	if CheckRoute(e.m.in, route) != nil {
		return
	}
	r := e.m.internal(route)
	if r == nil {
		return
	}
	t := newRoute(e.m, r).total()
	p := e.planOf(r, e.iters, "shared")
	if e.haveBest && !e.better(p, e.best) {
		return
	}
	if !e.haveBest {
		e.first = time.Since(e.start)
	}
	e.haveBest = true
	e.bestTW, e.bestVal = t.tw, e.m.cost(t)
	e.bestRoute = append(e.bestRoute[:0], r...)
	e.best = p
}

// heartbeat reports progress and gives the host a turn when due. Call with
// e.mu held.
func (e *engine) heartbeat(now time.Time) {
	if now.Sub(e.lastTick) < e.set.ProgressEvery {
		e.giveTurn(now)
		return
	}
	e.lastTick = now
	if e.set.OnProgress != nil {
		e.set.OnProgress(Progress{Iteration: e.iters, Elapsed: now.Sub(e.start), BestCost: e.best.Cost, Feasible: e.best.Feasible, Weights: normalised(e.weights)})
		now = turn.Now() // the report may have taken a while
	}
	e.giveTurn(now)
}

// giveTurn lets the host's event loop run when it is due (under GOOS=js;
// natively it compiles to nothing); now is the clock read just before.
// Call with e.mu held.
func (e *engine) giveTurn(now time.Time) {
	if turn.Enabled {
		e.mu.Unlock()
		turn.DueAt(now)
		e.mu.Lock()
	}
}

// interrupted is checked inside long steps (a polish of a big route): it
// keeps progress and pauses flowing and says when the run must end now.
// pastBudget says whether the time budget is over (without ending the
// run: construction asks it to skip what it can do without).
func (e *engine) pastBudget() bool {
	return !e.deadline.IsZero() && !turn.Now().Before(e.deadline)
}

func (e *engine) interrupted(ctx context.Context) bool {
	e.mu.Lock()
	defer e.mu.Unlock()
	if e.done {
		return true
	}
	if ctx.Err() != nil {
		e.finish(StopOf(ctx))
		return true
	}
	now := turn.Now()
	if !e.deadline.IsZero() && !now.Before(e.deadline) {
		e.finish(StopBudget)
		return true
	}
	e.heartbeat(now)
	return false
}

func (e *engine) finish(why Stop) {
	if !e.done {
		e.done, e.stop = true, why
	}
}

func (e *engine) isDone() bool {
	e.mu.Lock()
	defer e.mu.Unlock()
	return e.done
}

func normalised(w []float64) Mix {
	var sum float64
	for _, x := range w {
		sum += x
	}
	out := Mix{}
	for i, o := range Operators {
		if sum > 0 {
			out[o] = w[i] / sum
		}
	}
	return out
}

// sharedBest returns a copy of the best route when it beats (tw, cost).
func (e *engine) sharedBest(tw, cost int64) []int32 {
	e.mu.Lock()
	defer e.mu.Unlock()
	if !e.haveBest || e.bestRoute == nil || e.bestTW > tw || e.bestTW == tw && e.bestVal >= cost {
		return nil
	}
	return append([]int32(nil), e.bestRoute...)
}
