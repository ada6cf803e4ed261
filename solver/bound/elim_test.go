package bound

import (
	"context"
	"fmt"
	"math/rand"
	"testing"

	"github.com/stretchr/testify/require"

	"visitline/solver"
)

// feasibleRoutes lists every feasible route of a small day with its travel
// cost, each order judged by solver.Evaluate.
func feasibleRoutes(in *solver.Instance) (routes [][]int, costs []int64) {
	var rest []int
	for v := 0; v < in.N; v++ {
		if v != in.Start {
			rest = append(rest, v)
		}
	}
	var perm func(k int)
	perm = func(k int) {
		if k == len(rest) {
			r := append([]int{in.Start}, rest...)
			if solver.CheckRoute(in, r) != nil {
				return
			}
			if sch := solver.Evaluate(in, r); sch.Feasible {
				routes, costs = append(routes, r), append(costs, sch.Cost(solver.TravelTime))
			}
			return
		}
		for x := k; x < len(rest); x++ {
			rest[k], rest[x] = rest[x], rest[k]
			perm(k + 1)
			rest[k], rest[x] = rest[x], rest[k]
		}
	}
	perm(0)
	return routes, costs
}

// TestArcEliminationKeepsEveryCheaperRoute: on small random closed days,
// after rounds of elimination with an upper bound u (the optimum plus a
// margin, so that routes dearer than the optimum but cheaper than u exist),
// every feasible route cheaper than u keeps every (index, arc) pair it
// takes, the relaxation's bound afterwards stays at most the optimum, and
// elimination does remove pairs on most days.
func TestArcEliminationKeepsEveryCheaperRoute(t *testing.T) {
	rng := rand.New(rand.NewSource(5))
	days, removedDays := 0, 0
	for c := 0; c < 40; c++ {
		n := 6 + c%3
		in := randomInstance(rng, n, []int64{20, 60, 150, 5000}[c%4], solver.Closed)
		routes, costs := feasibleRoutes(in)
		if len(routes) == 0 {
			continue
		}
		opt := costs[0]
		for _, v := range costs {
			opt = min(opt, v)
		}
		p := newProb(in)
		require.True(t, elimOK(p, solver.TravelTime))
		days++
		for _, margin := range []int64{0, 1, 10} {
			u := opt + margin
			name := fmt.Sprintf("case %d n %d u %d (optimum %d)", c, n, u, opt)
			q := newProb(in)
			a := newAscent(q, solver.TravelTime, lagrangeOpts{perState: 8, maxTotal: 1 << 20, ub: u, ngSize: 3, ngMax: 3})
			removed := 0
			for round := 0; round < 3 && !a.done; round++ {
				a.run(context.Background(), 4, &yielder{})
				if a.best == nil || a.done {
					break
				}
				k, ok := eliminate(context.Background(), q, a.best, u, 8, 1<<20, &yielder{})
				require.True(t, ok, name)
				removed += k
			}
			if removed > 0 {
				removedDays++
			}
			for x, r := range routes {
				if costs[x] >= u {
					continue
				}
				for k := 0; k < n; k++ {
					j := in.Start
					if k+1 < n {
						j = r[k+1]
					}
					require.False(t, q.eliminated(k, r[k], j), "%s: route %v of cost %d lost arc %d→%d at index %d", name, r, costs[x], r[k], j, k)
				}
			}
			if q.elim != nil {
				rx := buildRelax(context.Background(), q, solver.TravelTime, a.lam, nil, 8, 1<<20, &yielder{})
				require.NotNil(t, rx, name)
				require.LessOrEqual(t, rx.z, opt, "%s: bound after elimination", name)
			}
		}
	}
	require.Greater(t, days, 20, "most days should be feasible")
	require.Greater(t, removedDays, days/2, "elimination should remove pairs on many (day, bound) runs")
}

// TestExactWithEarlyEliminationMatchesEnumeration runs the whole exact
// search with elimination rounds after every step and at any gap, on closed
// days with the travel objective (where elimination applies).
func TestExactWithEarlyEliminationMatchesEnumeration(t *testing.T) {
	defer func(e int, g float64) { elimEvery, elimGap = e, g }(elimEvery, elimGap)
	elimEvery, elimGap = 1, 10
	rng := rand.New(rand.NewSource(17))
	for c := 0; c < 30; c++ {
		n := 7 + c%6
		in := randomInstance(rng, n, []int64{30, 90, 200, 5000}[c%4], solver.Closed)
		checkAgainstEnumerationWith(t, fmt.Sprintf("early elimination %d (n %d)", c, n), in, Options{ArcElimination: true})
	}
}
