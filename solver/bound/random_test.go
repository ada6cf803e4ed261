package bound

import (
	"context"
	"fmt"
	"math/rand"
	"testing"
	"time"

	"github.com/stretchr/testify/require"

	"visitline/solver"
)

// randomInstance builds a seeded asymmetric instance: points on a plane with
// a direction-dependent travel time (uphill is slower), a random extra delay
// on some arcs (so the triangle inequality may break), service times, and
// windows around a reference tour's times, of half-width `width`.
func randomInstance(rng *rand.Rand, n int, width int64, shape solver.Shape) *solver.Instance {
	xs := make([]float64, n)
	ys := make([]float64, n)
	hs := make([]float64, n)
	for i := range xs {
		xs[i], ys[i], hs[i] = rng.Float64()*100, rng.Float64()*100, rng.Float64()*20
	}
	in := &solver.Instance{Name: "random", N: n, Scale: 1, Shape: shape,
		Travel: make([]int64, n*n), Service: make([]int64, n), Early: make([]int64, n), Late: make([]int64, n)}
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			if i == j {
				continue
			}
			dx, dy := xs[i]-xs[j], ys[i]-ys[j]
			d := int64(dx*dx+dy*dy)/100 + 1
			if hs[j] > hs[i] {
				d += int64(hs[j] - hs[i])
			}
			if rng.Intn(8) == 0 {
				d += int64(rng.Intn(40))
			}
			in.Travel[i*n+j] = d
		}
		if i > 0 {
			in.Service[i] = int64(rng.Intn(6))
		}
	}
	in.Start = rng.Intn(n)
	if shape == solver.OpenFixed {
		in.End = (in.Start + 1 + rng.Intn(n-1)) % n
	}
	// A reference order gives windows that some route can meet (mostly).
	perm := rng.Perm(n)
	order := []int{in.Start}
	for _, v := range perm {
		if v != in.Start && !(shape == solver.OpenFixed && v == in.End) {
			order = append(order, v)
		}
	}
	if shape == solver.OpenFixed {
		order = append(order, in.End)
	}
	t := int64(0)
	for k, v := range order {
		if k > 0 {
			t += in.Service[order[k-1]] + in.T(order[k-1], v)
		}
		c := t + int64(rng.Intn(int(width)+1)) - width/2
		if rng.Intn(5) == 0 {
			// Moved away from the reference: may make the day infeasible.
			c += int64(rng.Intn(int(3*width)+1)) - 3*width/2
		}
		in.Early[v] = max(0, c-width/2)
		in.Late[v] = max(in.Early[v], c+width/2)
	}
	in.Early[in.Start] = 0
	in.Late[in.Start] = solver.Horizon
	if shape == solver.Closed && rng.Intn(2) == 0 {
		in.Late[in.Start] = t + in.T(order[len(order)-1], in.Start) + width
	}
	if width > 1000 {
		for i := range in.Late {
			if i != in.Start {
				in.Early[i], in.Late[i] = 0, solver.Horizon
			}
		}
	}
	return in
}

var shapes = []solver.Shape{solver.Closed, solver.OpenFree, solver.OpenFixed}

func TestExactMatchesEnumeration(t *testing.T) {
	// 6–10 nodes, four window widths (tight to none), three shapes, both
	// objectives: the exact search's proven optimum is the enumerated one,
	// and every bound is at most it.
	rng := rand.New(rand.NewSource(7))
	count, feasible := 0, 0
	for _, n := range []int{6, 7, 8, 9, 10} {
		for _, width := range []int64{10, 40, 120, 5000} {
			for _, shape := range shapes {
				for _, obj := range []solver.Objective{solver.TravelTime, solver.CompletionTime} {
					in := randomInstance(rng, n, width, shape)
					name := fmt.Sprintf("n%d w%d %v %v", n, width, shape, obj)
					checkAgainstEnumeration(t, name, in, obj)
					count++
					if _, _, ok := Enumerate(in, obj); ok {
						feasible++
					}
				}
			}
		}
	}
	require.Greater(t, feasible, count/2, "most generated instances should be feasible")
	require.Less(t, feasible, count, "some generated instances should be infeasible")
}

func TestExactWithALongDeadlineMatchesEnumeration(t *testing.T) {
	// With a deadline of 20 s or more the exact search takes other steps
	// (finer relaxation tables, the labels per stage grown past their cap
	// as far as the time left allows, the penalty ascent given time between
	// runs): the same optimum. No ng-memories, one penalty step to begin
	// with and a cap of 2 labels per stage leave the relaxation weak and
	// make the first runs drop labels, so that the growth past the cap is
	// what proves these days (in milliseconds: the deadline is never
	// reached).
	rng := rand.New(rand.NewSource(31))
	for c := 0; c < 36; c++ {
		n := 6 + c%5
		in := randomInstance(rng, n, []int64{10, 40, 120, 5000}[c%4], shapes[c%3])
		ctx, cancel := context.WithTimeout(context.Background(), time.Minute)
		checkAgainstEnumerationCtx(t, ctx, fmt.Sprintf("deadline %d", c), in, Options{Objective: solver.Objective(c / 18), StageLabels: 2, Neighbours: 1, Iterations: 1})
		cancel()
	}
}

func TestExactMatchesEnumerationWithPins(t *testing.T) {
	rng := rand.New(rand.NewSource(11))
	for c := 0; c < 40; c++ {
		n := 6 + c%4
		in := randomInstance(rng, n, []int64{30, 90, 5000}[c%3], shapes[c%3])
		// A done prefix of one or two visits, or a pinned position.
		if c%2 == 0 {
			ref, _, ok := Enumerate(in, solver.TravelTime)
			if ok {
				in.Fixed = append([]int(nil), ref[:1+c%3]...)
			}
		} else {
			in.Position = make([]int, n)
			for v := 0; v < n; v++ {
				if v != in.Start && !(in.Shape == solver.OpenFixed && v == in.End) {
					in.Position[v] = 1 + rng.Intn(n-2)
					break
				}
			}
		}
		checkAgainstEnumeration(t, fmt.Sprintf("pins %d", c), in, solver.Objective(c%2))
	}
}

func checkAgainstEnumeration(t *testing.T, name string, in *solver.Instance, obj solver.Objective) {
	t.Helper()
	checkAgainstEnumerationWith(t, name, in, Options{Objective: obj})
}

// checkAgainstEnumerationWith is checkAgainstEnumeration with options.
func checkAgainstEnumerationWith(t *testing.T, name string, in *solver.Instance, o Options) {
	t.Helper()
	checkAgainstEnumerationCtx(t, context.Background(), name, in, o)
}

// checkAgainstEnumerationCtx is checkAgainstEnumerationWith under ctx.
func checkAgainstEnumerationCtx(t *testing.T, ctx context.Context, name string, in *solver.Instance, o Options) {
	t.Helper()
	obj := o.Objective
	want, wantCost, ok := Enumerate(in, obj)
	b := Exact(ctx, in, o)
	for _, note := range b.Notes {
		require.NotContains(t, note, "internal error", name)
	}
	if !ok {
		require.True(t, b.Infeasible, "%s: enumeration finds no feasible route, the exact search must prove it (notes %v)", name, b.Notes)
		require.Nil(t, b.Route, name)
		return
	}
	require.False(t, b.Infeasible, "%s: feasible by enumeration (%v)", name, want)
	require.True(t, b.ProvenOptimal, "%s: small instances must be solved exactly", name)
	require.Equal(t, wantCost, b.Cost, "%s: optimum (enumerated route %v, exact route %v)", name, want, b.Route)
	require.Equal(t, wantCost, b.Value, name)
	require.NoError(t, solver.CheckRoute(in, b.Route), name)
	sch := solver.Evaluate(in, b.Route)
	require.True(t, sch.Feasible, name)
	require.Equal(t, wantCost, sch.Cost(obj), name)
	// The bounds alone never exceed the optimum.
	l := Lower(context.Background(), in, o)
	require.False(t, l.Infeasible, name)
	if l.Valid {
		require.LessOrEqual(t, l.Value, wantCost, "%s: bound by %s", name, l.Method)
	}
	if l.HasAssignment {
		require.LessOrEqual(t, l.Assignment, wantCost, "%s: assignment bound", name)
	}
	if l.HasStateSpace {
		require.LessOrEqual(t, l.StateSpace, wantCost, "%s: state-space bound", name)
	}
}

func TestDPWithoutHistoryStillBounds(t *testing.T) {
	// A run whose route history outgrows its cap while an upper bound is in
	// force goes on without it (boundOnly): with the optimum as the upper
	// bound it ends with no route cheaper and nothing dropped (the proof);
	// with one more, it finds the optimum's cost, the route it can no
	// longer rebuild left out. Without boundOnly the run stops unfinished.
	rng := rand.New(rand.NewSource(23))
	checked := 0
	for c := 0; c < 30; c++ {
		in := randomInstance(rng, 7+c%3, []int64{40, 120, 5000}[c%3], shapes[c%3])
		_, opt, ok := Enumerate(in, solver.TravelTime)
		if !ok {
			continue
		}
		p := newProb(in)
		run := func(u int64, boundOnly bool) dpResult {
			return runDP(context.Background(), p, dpConfig{kind: dpTravel, maxHistory: 2, boundOnly: boundOnly,
				ub: func() int64 { return u }})
		}
		r := run(opt, true)
		require.True(t, r.complete, "case %d", c)
		require.True(t, r.costOnly, "case %d", c)
		require.False(t, r.dropped, "case %d", c)
		require.False(t, r.found, "case %d", c)
		require.Equal(t, int64(inf), r.cost, "case %d: nothing is cheaper than the optimum", c)
		r = run(opt+1, true)
		require.True(t, r.complete && r.costOnly && !r.found, "case %d", c)
		require.Nil(t, r.route, "case %d", c)
		require.Equal(t, opt, r.cost, "case %d: the optimum's cost", c)
		r = run(opt+1, false)
		require.False(t, r.complete, "case %d: out of history", c)
		checked++
	}
	require.Greater(t, checked, 10)
}
