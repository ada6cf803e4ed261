package bound

import (
	"context"
	"time"

	"visitline/solver"
	"visitline/solver/fmtlite"
	"visitline/solver/turn"
)

// Options steer the bound computations. The zero value is useful: default
// limits, the travel objective, no known plan.
type Options struct {
	Objective solver.Objective
	// Incumbent, when set, returns the cost of the best feasible plan known
	// so far (ok false while there is none). It is polled while searching:
	// a better plan found elsewhere prunes the exact search at once. It must
	// be safe to call from the bound's goroutine.
	Incumbent func() (cost int64, ok bool)
	// Iterations of the subgradient ascent on the node penalties (default 80).
	Iterations int
	// StateLabels caps the labels of one state of the relaxation; beyond it,
	// labels are merged into optimistic ones (default 128 up to 120 nodes,
	// 64 up to 250, or 256 there with 20 s or more to run, 32 above:
	// larger tables converge too slowly to pay in a short budget).
	StateLabels int
	// Neighbours is the size of the ng-route neighbourhoods of the
	// relaxation, each node counted in its own (default 6 up to 250 nodes,
	// 4 above; at most 12);
	// NeighboursMax, when larger, lets them grow where the relaxed path
	// cycles (decremental state-space relaxation). Larger neighbourhoods
	// forbid more cycles but make each penalty step slower.
	Neighbours, NeighboursMax int
	// TableLabels caps the labels of the whole relaxation (default 6 million);
	// a larger table is retried with fewer labels per state.
	TableLabels int
	// StageLabels caps the labels of one stage of the exact search (default
	// 2^19); a stage that needs more is cut to its best labels, which keeps
	// the bound valid but gives up the proof. StageLabelsMax, when larger,
	// lets a run with a deadline go on growing the cap (eight-, four- or
	// twofold) while the time left looks enough for the next run to
	// finish (default 2^22 natively: 614 MB at most over the published
	// days of 20-100 nodes at 30 s, see docs/results.md; 2^19 under
	// GOOS=js, where the page's memory is kept low).
	StageLabels, StageLabelsMax int
	// HistoryLabels caps the labels kept over all stages for rebuilding the
	// route (default 2^25, about 270 MB).
	HistoryLabels int
	// RelaxShare is the share of the context's remaining time that the
	// penalty ascent may use before the exact search starts (default 0.6,
	// 0.8 from 121 to 250 nodes).
	RelaxShare float64
	// ArcElimination turns on the removal of arcs (by route index) that no
	// route cheaper than the best known one can take (see eliminate). It is
	// off by default: at 10 CPU s on the published days it did not pay
	// (docs/results.md).
	ArcElimination bool
}

func (o Options) withDefaults() Options {
	if o.Iterations <= 0 {
		o.Iterations = 80
	}
	if o.StateLabels <= 0 {
		o.StateLabels = 128
	}
	if o.Neighbours <= 0 {
		o.Neighbours = defaultNG
	}
	o.Neighbours = min(o.Neighbours, maxNG)
	o.NeighboursMax = min(max(o.NeighboursMax, o.Neighbours), maxNG)
	if o.TableLabels <= 0 {
		o.TableLabels = 6 << 20
	}
	if o.StageLabels <= 0 {
		o.StageLabels = 1 << 19
	}
	if o.StageLabelsMax <= 0 {
		o.StageLabelsMax = defaultStageLabelsMax
	}
	o.StageLabelsMax = max(o.StageLabelsMax, o.StageLabels)
	if o.HistoryLabels <= 0 {
		o.HistoryLabels = 1 << 25
	}
	if o.RelaxShare <= 0 || o.RelaxShare > 1 {
		o.RelaxShare = 0.6
	}
	return o
}

// Bound is what the bound side knows about an instance's optimum. Values
// are in internal units (Instance.Scale per input unit).
type Bound struct {
	// Value is a lower bound on the cost of every feasible plan; it is set
	// when Valid. It is the largest of the bounds below.
	Value int64
	Valid bool
	// Method names the bound that gave Value: "assignment", "state-space",
	// "windows", "search" (the exact search's bound, or its optimum).
	Method string
	// The separate bounds, each with a flag saying it was computed.
	Assignment, StateSpace, Search          int64
	HasAssignment, HasStateSpace, HasSearch bool
	// ProvenOptimal says Value is the optimum: Route attains it, or (from
	// Solve) the plan returned beside it does.
	ProvenOptimal bool
	// Infeasible says it is proven that no plan meets every window.
	Infeasible bool
	// Route is the best feasible route the bound side found (nil if none),
	// with its Cost; it is optimal when ProvenOptimal.
	Route []int
	Cost  int64
	// Notes say where a weaker bound was used and why.
	Notes []string
	// Labels counts the labels the exact search created, for reports.
	Labels int64
}

// GapPct is how far cost can be above the optimum, in percent of the bound:
// 100·(cost − Value)/Value. ok is false when there is no positive bound.
func (b Bound) GapPct(cost int64) (gap float64, ok bool) {
	if !b.Valid || b.Value <= 0 {
		return 0, false
	}
	if cost <= b.Value {
		return 0, true
	}
	return 100 * float64(cost-b.Value) / float64(b.Value), true
}

func (b *Bound) raise(v int64, method string) {
	if !b.Valid || v > b.Value {
		b.Value, b.Valid, b.Method = v, true, method
	}
}

func (b *Bound) offer(route []int, cost int64) {
	if route != nil && (b.Route == nil || cost < b.Cost) {
		b.Route, b.Cost = append([]int(nil), route...), cost
	}
}

// ub is the least feasible cost known: the bound side's own route or the
// incumbent. ok is false when neither exists.
func (b *Bound) ub(o Options) (int64, bool) {
	v, ok := inf, false
	if b.Route != nil {
		v, ok = b.Cost, true
	}
	if o.Incumbent != nil {
		if c, has := o.Incumbent(); has && c < v {
			v, ok = c, true
		}
	}
	return v, ok
}

func (b *Bound) checkProven(o Options) {
	if u, ok := b.ub(o); ok && b.Valid && b.Value >= u {
		if b.Value > u {
			b.Notes = append(b.Notes, fmtlite.Sprintf("internal error: the %s bound %d is above a feasible cost %d", b.Method, b.Value, u))
		}
		b.Value = u
		b.ProvenOptimal = true
	}
}

// Lower computes lower bounds without the exact search: the assignment
// relaxation and the state-space relaxation with penalties, started from the
// assignment's dual potentials (and, for the
// completion objective, a bound from the windows). It may still find and
// prove an optimal route when the relaxation's best path is one.
func Lower(ctx context.Context, in *solver.Instance, o Options) Bound {
	return runPhases(ctx, ctx, in, o, false)
}

// Exact computes the bounds of Lower, then runs the exact search until it
// proves a route optimal or the instance infeasible, or ctx ends. The search
// is a dynamic programme over (visited set, last node, time) with dominance,
// run with a growing cap on the labels per stage: each run that finishes
// gives a feasible route and a valid bound (the least bound of the labels it
// had to drop), and a run that drops nothing is exact.
func Exact(ctx context.Context, in *solver.Instance, o Options) Bound {
	return runPhases(ctx, ctx, in, o, true)
}

// runPhases computes the bounds under ctx and then, when exact, runs the
// exact search under sctx (which ends no later than ctx).
func runPhases(ctx, sctx context.Context, in *solver.Instance, o Options, exact bool) Bound {
	autoLabels := o.StateLabels <= 0
	if autoLabels && in.N > largeN {
		// Measured on the published days of 151-201 nodes: 64 gave better
		// bounds than 32 at 10 CPU s (docs/results.md); larger days keep 32,
		// untested beyond, and their tables are cut down anyway.
		o.StateLabels = 32
		if in.N <= mediumN {
			o.StateLabels = 64
		}
	}
	if dl, ok := ctx.Deadline(); ok && autoLabels && in.N <= mediumN && time.Until(dl) >= longBudget {
		// With 20 s or more, finer tables pay: 256 labels per state gave
		// better bounds at 30 CPU s on the OhlmannThomas and
		// GendreauDumasExtended days, and worse at 10 (docs/results.md,
		// session 6).
		o.StateLabels = 256
	}
	if o.Neighbours <= 0 && in.N <= mediumN {
		// With the states cut to the route indices each node can take,
		// memories of 6 give the better bound up to mediumN nodes at 10
		// CPU s (docs/results.md); above, untested, 4 stay.
		o.Neighbours = smallNG
	}
	if o.RelaxShare <= 0 && in.N > largeN && in.N <= mediumN {
		// Measured on the published days of 151-201 nodes: 0.8 of the
		// time for the penalty ascent gave the better bound at 10 CPU s
		// (docs/results.md).
		o.RelaxShare = 0.8
	}
	o = o.withDefaults()
	var b Bound
	if err := in.Validate(); err != nil {
		b.Notes = append(b.Notes, "invalid instance: "+err.Error())
		return b
	}
	y := &yielder{}
	p := newProbCtx(ctx, in)
	if p.cut {
		b.Notes = append(b.Notes, "the budget ended before preprocessing did: no bound")
		return b
	}
	obj := o.Objective
	kind := dpTravel
	if obj == solver.CompletionTime {
		kind = dpCompletion
	}
	if p.infeasible {
		b.Infeasible, b.Method = true, "windows"
		b.Notes = append(b.Notes, "preprocessing: "+p.why)
		return b
	}
	if in.N == 1 {
		sch := solver.Evaluate(in, []int{in.Start})
		b.offer([]int{in.Start}, sch.Cost(obj))
		b.raise(b.Cost, "search")
		b.ProvenOptimal = true
		return b
	}
	if p.pinned {
		b.Notes = append(b.Notes, "the assignment bound ignores the position pins and done visits except where they remove arcs")
	}
	if obj == solver.CompletionTime {
		b.raise(windowBound(p), "windows")
	}
	// Assignment relaxation.
	var apPot []int64
	if in.N <= 1500 {
		if v, pot, ok, infeas := assignmentBound(ctx, p, obj, y); ok {
			b.Assignment, b.HasAssignment = v, true
			apPot = pot
			b.raise(v, "assignment")
		} else if infeas {
			b.Infeasible = true
			b.Notes = append(b.Notes, "no assignment of successors exists over the arcs the windows allow")
			return b
		}
	} else {
		b.Notes = append(b.Notes, fmtlite.Sprintf("assignment bound skipped: %d nodes", in.N))
	}
	if ctx.Err() != nil {
		return b
	}
	// A quick restricted search for a first upper bound, which steers the
	// penalty ascent.
	if _, ok := b.ub(o); !ok || exact {
		r := runDP(ctx, p, dpConfig{kind: kind, beam: 32, maxHistory: o.HistoryLabels, y: y})
		if r.found {
			b.offerChecked(in, r.route, obj)
		}
	}
	// State-space relaxation with penalties.
	var rx *relax
	u0, _ := b.ub(o)
	asc := newAscent(p, obj, lagrangeOpts{iters: o.Iterations, perState: o.StateLabels, maxTotal: o.TableLabels, ub: u0,
		ngSize: o.Neighbours, ngMax: o.NeighboursMax, noElim: !o.ArcElimination})
	asc.warm(apPot)
	if ctx.Err() == nil {
		lctx, cancel := shareOf(ctx, o.RelaxShare)
		asc.run(lctx, o.Iterations, y)
		cancel()
		rx, route := asc.best, asc.route
		if asc.ubRoute != nil {
			b.offerChecked(in, asc.ubRoute, obj)
		}
		switch {
		case rx == nil:
			b.Notes = append(b.Notes, "state-space bound skipped: the table does not fit the label cap or time ran out")
		case rx.z == inf:
			b.Infeasible = true
			b.Notes = append(b.Notes, "no relaxed path meets every window: no plan can")
			return b
		default:
			b.StateSpace, b.HasStateSpace = rx.z, true
			b.raise(rx.z, "state-space")
			if route != nil {
				b.offerChecked(in, route, obj)
			}
		}
	}
	b.checkProven(o)
	if !exact || b.ProvenOptimal || sctx.Err() != nil {
		return b
	}
	// A last round of arc elimination with the best penalties, for the
	// exact search.
	if u, ok := b.ub(o); ok && asc.elim && asc.best != nil && asc.lastElim != asc.iters {
		asc.target = min(asc.target, u)
		asc.eliminate(sctx, y)
	}
	rx = asc.best
	if rx != nil && rx.z == inf {
		rx = nil
	}
	// more gives time the exact search cannot use to the penalty ascent:
	// only when there is a deadline, so that runs without one stay the
	// same from run to run.
	_, timed := sctx.Deadline()
	more := func(share float64) {
		if !timed || asc.done || asc.best == nil || sctx.Err() != nil {
			return
		}
		if u, ok := b.ub(o); ok {
			asc.target = min(asc.target, u)
		}
		actx, cancel := shareOf(sctx, share)
		asc.run(actx, 1000, y)
		cancel()
		if asc.best.z != inf && (!b.HasStateSpace || asc.best.z > b.StateSpace) {
			b.StateSpace, b.HasStateSpace = asc.best.z, true
			b.raise(asc.best.z, "state-space")
			rx = asc.best
		}
		if asc.route != nil {
			b.offerChecked(in, asc.route, obj)
		}
		if asc.ubRoute != nil {
			b.offerChecked(in, asc.ubRoute, obj)
		}
		b.checkProven(o)
	}
	// Exact search with a growing beam.
	ubf := func() int64 {
		u, _ := b.ub(o)
		return u
	}
	// left is the time the exact search has left (in the budget's own
	// clock: CPU time under WithCPUBudget).
	left := func() time.Duration {
		dl, _ := sctx.Deadline()
		return time.Until(dl)
	}
	for beam := min(256, o.StageLabels); ; {
		before := left()
		r := runDP(sctx, p, dpConfig{kind: kind, beam: beam, maxHistory: o.HistoryLabels, boundOnly: true, rx: rx, ub: ubf, y: y})
		b.Labels += r.labels
		if !r.complete {
			if sctx.Err() == nil {
				b.Notes = append(b.Notes, "exact search stopped: the route history outgrew its cap")
			}
			break
		}
		if r.found {
			b.offerChecked(in, r.route, obj)
		}
		u, has := b.ub(o)
		lb := min(u, r.droppedLB)
		if r.costOnly {
			// Routes cheaper than u that could not be rebuilt: the
			// least of them bounds the optimum as droppedLB does.
			lb = min(lb, r.cost)
		}
		if !r.dropped && !has {
			b.Infeasible = true
			b.Method = "search"
			return b
		}
		if lb < inf {
			if !b.HasSearch || lb > b.Search {
				b.Search, b.HasSearch = lb, true
			}
			b.raise(lb, "search")
		}
		b.checkProven(o)
		if b.ProvenOptimal || sctx.Err() != nil {
			break
		}
		if !timed {
			// No deadline: the same steps from run to run, up to the cap.
			if beam >= o.StageLabels {
				break
			}
			beam = min(beam*8, o.StageLabels)
			continue
		}
		if beam >= o.StageLabelsMax {
			more(1)
			break
		}
		spent := before - left()
		if beam >= 2048 {
			more(0.4)
			if b.ProvenOptimal || sctx.Err() != nil {
				break
			}
		}
		// The next run takes about as much longer as its cap is larger,
		// and one cut short proves nothing: grow the cap eightfold, four-
		// or twofold, as far as the time left looks enough for the run to
		// finish (with as much again to spare). When it is not enough even
		// for twice the cap, the penalty ascent may have all of it first,
		// and the larger run gets what the ascent leaves (it stops early
		// once it has nothing more to gain).
		f := 8
		for f > 1 && left() < time.Duration(f)*spent*2 {
			f /= 2
		}
		if f == 1 {
			more(1)
			if b.ProvenOptimal || sctx.Err() != nil {
				break
			}
			f = 2
		}
		beam = min(beam*f, o.StageLabelsMax)
	}
	return b
}

// offerChecked evaluates a route found here with the engine's independent
// evaluator and keeps it only when it is valid and feasible there; anything
// else is an internal error, noted rather than trusted.
func (b *Bound) offerChecked(in *solver.Instance, route []int, obj solver.Objective) {
	if err := solver.CheckRoute(in, route); err != nil {
		b.Notes = append(b.Notes, "internal error: a route found by the bound search is not valid: "+err.Error())
		return
	}
	sch := solver.Evaluate(in, route)
	if !sch.Feasible {
		b.Notes = append(b.Notes, "internal error: a route found by the bound search is late")
		return
	}
	b.offer(route, sch.Cost(obj))
}

// windowBound bounds the completion time from the windows alone: every visit
// starts no earlier than its tightened earliest start, and a closed tour must
// still return from there.
func windowBound(p *prob) int64 {
	n := p.n
	best := p.e[p.start] + p.s[p.start]
	for j := 0; j < n; j++ {
		if j == p.start {
			continue
		}
		v := p.et[j] + p.s[j]
		if p.shape == solver.Closed {
			ret := inf
			for k := 0; k < n; k++ {
				if k == p.start || !p.arc[k*n+p.start] {
					continue
				}
				d := int64(inf)
				if k == j {
					d = 0
				} else if p.sp != nil {
					d = p.sp[j*n+k]
				}
				if d < inf {
					ret = min(ret, d+p.s[k]+p.t(k, p.start))
				}
			}
			if ret == inf {
				ret = p.s[j] // without shortest paths: service alone
			}
			v = p.et[j] + ret
		}
		best = max(best, v)
	}
	return best
}

// shareOf returns a context that ends after share of ctx's remaining time
// (or with ctx, when it has no deadline). Under a CPU-time budget
// (WithCPUBudget) the share is of the CPU time left.
func shareOf(ctx context.Context, share float64) (context.Context, context.CancelFunc) {
	dl, ok := ctx.Deadline()
	if !ok {
		return context.WithCancel(ctx)
	}
	rem := time.Until(dl)
	if clock, ok := ctx.Value(cpuClockKey{}).(func() time.Duration); ok {
		return WithCPUBudget(ctx, time.Duration(float64(rem)*share), clock)
	}
	return context.WithTimeout(ctx, time.Duration(float64(rem)*share))
}

type cpuClockKey struct{}

// cpuCtx ends once clock has advanced by budget. Its deadline moves with
// the CPU time left, so that shares of it (shareOf) are shares of CPU time.
type cpuCtx struct {
	context.Context
	end   time.Duration
	clock func() time.Duration
}

func (c *cpuCtx) Deadline() (time.Time, bool) {
	rem := c.end - c.clock()
	if pd, ok := c.Context.Deadline(); ok && time.Until(pd) < rem {
		return pd, true
	}
	return time.Now().Add(rem), true
}

// WithCPUBudget returns a context that ends when clock (the process's CPU
// time, say) has advanced by budget, or with parent. It is for measuring on
// a shared machine, where a wall-clock budget buys a varying amount of work;
// the bound's internal time shares follow it.
func WithCPUBudget(parent context.Context, budget time.Duration, clock func() time.Duration) (context.Context, context.CancelFunc) {
	inner, cancel := context.WithCancel(context.WithValue(parent, cpuClockKey{}, clock))
	c := &cpuCtx{Context: inner, end: clock() + budget, clock: clock}
	go func() {
		tk := time.NewTicker(2 * time.Millisecond)
		defer tk.Stop()
		for {
			select {
			case <-inner.Done():
				return
			case <-tk.C:
				if clock() >= c.end {
					cancel()
					return
				}
			}
		}
	}()
	return c, cancel
}

// defaultStageLabelsMax is Options.StageLabelsMax's default.
var defaultStageLabelsMax = func() int {
	if turn.Enabled {
		return 1 << 19
	}
	return 1 << 22
}()

// longBudget is the time from which days of up to mediumN nodes get finer
// relaxation tables.
const longBudget = 20 * time.Second

// smallNG is the ng-neighbourhood size up to mediumN nodes.
const smallNG = 6

// mediumN is the size up to which the coarser tables keep 64 labels per
// state.
const mediumN = 250

// largeN is the size above which the relaxation's tables are coarser.
const largeN = 120
