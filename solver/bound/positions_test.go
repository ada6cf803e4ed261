package bound

import (
	"fmt"
	"math/rand"
	"testing"

	"github.com/stretchr/testify/require"

	"visitline/solver"
)

// TestPositionRangesHoldForEveryFeasibleRoute checks the route-index ranges
// that restrict the relaxation's states against every feasible route of
// small random days (all orders tried, each judged by solver.Evaluate).
func TestPositionRangesHoldForEveryFeasibleRoute(t *testing.T) {
	rng := rand.New(rand.NewSource(21))
	narrowed, routes := 0, 0
	for c := 0; c < 36; c++ {
		n := 6 + c%3
		in := randomInstance(rng, n, []int64{10, 40, 120}[c/3%3], shapes[c%3])
		if c%4 == 3 {
			in.Position = make([]int, n)
			for v := 0; v < n; v++ {
				if v != in.Start && !(in.Shape == solver.OpenFixed && v == in.End) {
					in.Position[v] = 1 + rng.Intn(n-2)
					break
				}
			}
		}
		p := newProb(in)
		if p.infeasible {
			continue
		}
		for i := 0; i < n; i++ {
			if p.minPos[i] > 1 || p.maxPos[i] < int32(n-1) {
				narrowed++
			}
		}
		route := []int{in.Start}
		var rest []int
		for v := 0; v < n; v++ {
			if v != in.Start {
				rest = append(rest, v)
			}
		}
		var perm func(k int)
		perm = func(k int) {
			if k == len(rest) {
				r := append(route[:1:1], rest...)
				if solver.CheckRoute(in, r) != nil || !solver.Evaluate(in, r).Feasible {
					return
				}
				routes++
				for idx, v := range r {
					require.True(t, int32(idx) >= p.minPos[v] && int32(idx) <= p.maxPos[v],
						fmt.Sprintf("case %d: node %d at index %d of feasible route %v, range [%d, %d]", c, v, idx, r, p.minPos[v], p.maxPos[v]))
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
	}
	require.Greater(t, routes, 100, "the days should have feasible routes to check")
	require.Greater(t, narrowed, 20, "the windows should narrow some ranges")
}
