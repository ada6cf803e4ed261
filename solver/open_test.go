package solver

import (
	"context"
	"math"
	"math/rand"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// openInstance is a day with no windows: travel from random points,
// rounded Euclidean (sym) or with asymmetric noise, random service times.
func openInstance(rng *rand.Rand, n int, sym bool, shape Shape) *Instance {
	in := &Instance{N: n, Scale: 1, Shape: shape, Travel: make([]int64, n*n), Service: make([]int64, n), Early: make([]int64, n), Late: make([]int64, n)}
	xs, ys := make([]float64, n), make([]float64, n)
	for i := range xs {
		xs[i], ys[i] = rng.Float64()*1000, rng.Float64()*1000
		in.Service[i] = rng.Int63n(20)
		in.Late[i] = Horizon
	}
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			if i != j {
				in.Travel[i*n+j] = int64(math.Round(math.Hypot(xs[i]-xs[j], ys[i]-ys[j])))
				if !sym {
					in.Travel[i*n+j] += rng.Int63n(200)
				}
			}
		}
	}
	if shape == OpenFixed {
		in.End = n - 1
	}
	return in
}

func TestWindowsFree(t *testing.T) {
	rng := rand.New(rand.NewSource(3))
	in := openInstance(rng, 12, true, Closed)
	m, err := newModel(in, TravelTime)
	require.NoError(t, err)
	assert.True(t, m.free, "no window")

	// A latest start that some order misses: the windows can bind.
	late := in.Clone()
	late.Late[5] = 100
	m, err = newModel(late, TravelTime)
	require.NoError(t, err)
	assert.False(t, m.free)

	// An earliest start after the departure: some order waits.
	early := in.Clone()
	early.Early[5] = 1
	m, err = newModel(early, CompletionTime)
	require.NoError(t, err)
	assert.False(t, m.free)

	// No route gets further than the sum, over the nodes it leaves, of
	// service and longest arc out: a latest start there is free, one
	// below is not (it could bind).
	reach := int64(0)
	for i := 0; i < in.N; i++ {
		var out int64
		for j := 0; j < in.N; j++ {
			out = max(out, in.T(i, j))
		}
		reach += in.Service[i] + out
	}
	edge := in.Clone()
	edge.Late[4] = reach
	m, _ = newModel(edge, TravelTime)
	assert.True(t, m.free, "latest start at the bound any route can reach")
	edge.Late[4] = reach - 1
	m, _ = newModel(edge, TravelTime)
	assert.False(t, m.free, "latest start below that bound")
}

// On days with no windows the open-day search finds what enumerating every
// order finds, for every shape and objective, symmetric or not; and every
// plan it reports passes the independent evaluator.
func TestOpenDayMatchesEnumeration(t *testing.T) {
	rng := rand.New(rand.NewSource(5))
	for trial := 0; trial < 12; trial++ {
		shape := []Shape{Closed, OpenFree, OpenFixed}[trial%3]
		obj := []Objective{TravelTime, CompletionTime}[(trial/3)%2]
		sym := trial/6 == 0
		n := 9
		if shape == OpenFixed {
			n = 10
		}
		in := openInstance(rng, n, sym, shape)
		m, err := newModel(in, obj)
		require.NoError(t, err)
		require.True(t, m.free, "trial %d is an open day", trial)
		_, want := enumerate(in, obj)
		var plans []Plan
		res, err := Solve(context.Background(), in, Settings{Iterations: 300, Seed: int64(trial), Objective: obj,
			OnImprove: func(p Plan) { plans = append(plans, p) }})
		require.NoError(t, err)
		checkPlan(t, in, obj, res.Best)
		for _, p := range plans {
			checkPlan(t, in, obj, p)
		}
		assert.True(t, res.Best.Feasible)
		assert.Equal(t, want.Cost(obj), res.Best.Cost, "trial %d shape=%v obj=%v sym=%v", trial, shape, obj, sym)
	}
}

// nearestTour is the nearest-neighbour closed tour from node 0, written
// apart from the engine.
func nearestTour(in *Instance) int64 {
	used := make([]bool, in.N)
	used[0] = true
	cur, total := 0, int64(0)
	for k := 1; k < in.N; k++ {
		next := -1
		for v := 0; v < in.N; v++ {
			if !used[v] && (next < 0 || in.T(cur, v) < in.T(cur, next)) {
				next = v
			}
		}
		used[next] = true
		total += in.T(cur, next)
		cur = next
	}
	return total + in.T(cur, 0)
}

// On a 400-site day with no windows the search ends well below the
// nearest-neighbour tour (on random points that tour is some 25 % above
// the optimum and 2-opt with or-opt about 5 %: Johnson and McGeoch 1997,
// from memory), symmetric and not, in a few hundred iterations.
func TestOpenDayBeatsNearestNeighbour(t *testing.T) {
	for _, sym := range []bool{true, false} {
		rng := rand.New(rand.NewSource(9))
		in := openInstance(rng, 400, sym, Closed)
		nn := nearestTour(in)
		var plans int
		res, err := Solve(context.Background(), in, Settings{Iterations: 300, Seed: 1,
			OnImprove: func(p Plan) { checkPlan(t, in, TravelTime, p); plans++ }})
		require.NoError(t, err)
		checkPlan(t, in, TravelTime, res.Best)
		assert.Greater(t, plans, 1)
		assert.Less(t, float64(res.Best.Cost), 0.88*float64(nn), "sym=%v: %d against nearest neighbour %d", sym, res.Best.Cost, nn)
	}
}

// The search is reproducible for a seed and an iteration budget.
func TestOpenDayDeterministic(t *testing.T) {
	in := openInstance(rand.New(rand.NewSource(2)), 120, false, Closed)
	run := func() []int {
		res, err := Solve(context.Background(), in, Settings{Iterations: 500, Seed: 4})
		require.NoError(t, err)
		return res.Best.Route
	}
	assert.Equal(t, run(), run())
}

// Every move's change of travel, judged in constant time, equals the
// travel of the changed route summed again from scratch; on symmetric and
// asymmetric travel, for every shape.
func TestOpenMoveDeltas(t *testing.T) {
	for trial, c := range []struct {
		sym   bool
		shape Shape
		pot   bool
	}{{true, Closed, false}, {false, Closed, false}, {false, OpenFree, false}, {false, OpenFixed, false}, {true, OpenFixed, false},
		{true, Closed, true}, {true, OpenFree, true}} {
		rng := rand.New(rand.NewSource(int64(trial)))
		in := openInstance(rng, 30, c.sym, c.shape)
		if c.pot {
			// Asymmetric by a potential per node: service folded into the
			// arcs out of each node.
			for i := 0; i < in.N; i++ {
				for j := 0; j < in.N; j++ {
					if i != j {
						in.Travel[i*in.N+j] += 7 * int64(i%5)
					}
				}
			}
		}
		m, err := newModel(in, TravelTime)
		require.NoError(t, err)
		o := newOpenTour(m)
		require.Equal(t, c.pot, o.pot != nil, "potentials found")
		require.Equal(t, !c.sym, o.sums, "prefix sums kept")
		r := identityRoute(m)
		rng.Shuffle(len(r)-2, func(i, j int) { r[i+1], r[j+1] = r[j+1], r[i+1] })
		o.set(r)
		travel := func() int64 {
			var s int64
			for k := 1; k < len(o.r); k++ {
				s += o.d(o.r[k-1], o.r[k])
			}
			return s
		}
		last := len(o.r) - 2
		for step := 0; step < 300; step++ {
			before := travel()
			require.Equal(t, before, o.cost)
			switch step % 3 {
			case 0:
				x := 1 + rng.Intn(last-1)
				y := x + 1 + rng.Intn(last-x)
				d := o.revDelta(x, y)
				o.reverse(x, y, d)
				require.Equal(t, before+d, travel(), "2-opt %d..%d", x, y)
			case 1:
				L := 1 + rng.Intn(3)
				x := 1 + rng.Intn(last-L+1)
				y := x + L - 1
				k := rng.Intn(last + 1)
				if k >= x-1 && k <= y {
					continue
				}
				rev := rng.Intn(2) == 0
				d := o.moveDelta(x, y, k, rev)
				o.move(x, y, k, rev, d)
				require.Equal(t, before+d, travel(), "or-opt %d..%d after %d rev=%v", x, y, k, rev)
			case 2:
				i := rng.Intn(last - 1)
				j := i + 1 + rng.Intn(last-i-1)
				k := j + 1 + rng.Intn(last-j)
				d := o.swapDelta(i, j, k)
				o.kick(i, j, k)
				require.Equal(t, before+d, travel(), "swap %d %d %d", i, j, k)
			}
			for v, p := range o.pos {
				if m.isMov[v] {
					require.Equal(t, int32(v), o.r[p], "position of %d", v)
				}
			}
		}
		o.queue = o.queue[:0]
	}
}

// On a big day whose windows are loose and laid around a tour that goes
// to the nearest site each time (as the generated days are), the first
// plan already meets every window: the nearest-neighbour start is tried
// beside the orders by window, which zigzag far from any feasible plan.
func TestLooseWindowsNearestStart(t *testing.T) {
	rng := rand.New(rand.NewSource(8))
	n := 1100
	in := openInstance(rng, n, true, Closed)
	for i := range in.Service {
		in.Service[i] = 0
	}
	// Windows of width 600 (some 20 arcs) around the nearest-neighbour tour's times.
	used := make([]bool, n)
	used[0] = true
	cur, at := 0, int64(0)
	for k := 1; k < n; k++ {
		next := -1
		for v := 0; v < n; v++ {
			if !used[v] && (next < 0 || in.T(cur, v) < in.T(cur, next)) {
				next = v
			}
		}
		used[next] = true
		at += in.T(cur, next)
		e := max(0, at-rng.Int63n(601))
		in.Early[next], in.Late[next] = e, e+600
		cur = next
	}
	in.Late[0] = at + in.T(cur, 0) + 600
	m, err := newModel(in, TravelTime)
	require.NoError(t, err)
	require.False(t, m.free)
	nn := at + in.T(cur, 0)
	res, err := Solve(context.Background(), in, Settings{Iterations: 1, Seed: 1})
	require.NoError(t, err)
	checkPlan(t, in, TravelTime, res.Best)
	assert.True(t, res.Best.Feasible, "first plan meets every window")
	assert.LessOrEqual(t, res.Best.Cost, nn, "first plan no longer than the nearest-neighbour tour")
}

// Travel beyond the int32 range keeps a 64-bit matrix in the model: the
// engine still finds what enumeration finds, on a windowed day and on an
// open one, with every time multiplied by 10⁸.
func TestTravelBeyondInt32(t *testing.T) {
	rng := rand.New(rand.NewSource(21))
	for _, in := range []*Instance{randomInstance(rng, 9, 120, Closed), openInstance(rng, 9, false, Closed)} {
		const f = 100_000_000
		for k := range in.Travel {
			in.Travel[k] *= f
		}
		for i := range in.Service {
			in.Service[i] *= f
			in.Early[i] *= f
			if in.Late[i] != Horizon {
				in.Late[i] *= f
			}
		}
		m, err := newModel(in, TravelTime)
		require.NoError(t, err)
		require.Nil(t, m.t32)
		_, want := enumerate(in, TravelTime)
		res, err := Solve(context.Background(), in, Settings{Iterations: 400, Seed: 1})
		require.NoError(t, err)
		checkPlan(t, in, TravelTime, res.Best)
		assert.Equal(t, want.Cost(TravelTime), res.Best.Cost)
	}
	small := openInstance(rng, 9, true, Closed)
	m, err := newModel(small, TravelTime)
	require.NoError(t, err)
	assert.NotNil(t, m.t32, "travel that fits takes int32")
	assert.Nil(t, m.t64)
}
