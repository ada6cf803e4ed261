package fleet

import (
	"math/rand"
	"testing"

	"github.com/stretchr/testify/require"

	"visitline/solver"
)

// The engine's route summaries agree with the plain evaluator on random
// routes: feasibility, travel, earliest completion and, for feasible
// routes, the shortest working day.
func TestSummariesMatchEvaluator(t *testing.T) {
	rng := rand.New(rand.NewSource(7))
	checked := 0
	for c := 0; c < 300; c++ {
		p := randomFleet(rng, 5+rng.Intn(4), 2+rng.Intn(2))
		m := newModel(p, solver.TravelTime, false)
		s := newState(m)
		visits := p.Visits()
		for k := range p.Vehicles {
			rng.Shuffle(len(visits), func(a, b int) { visits[a], visits[b] = visits[b], visits[a] })
			route := append([]int(nil), visits[:1+rng.Intn(3)]...)
			s.routes[k] = route
			s.refresh(k)
			L := len(route)
			whole := solver.JoinSeg(s.fwd[k][L], m.veh[k].endSeg, m.tt(s.prevNode(k, L), m.veh[k].end))
			rr := evaluateRoute(p, k, route)
			feasible := len(rr.Problems) == 0
			engineOK := m.ok(k, whole) && s.load[k] <= m.veh[k].cap
			require.Equal(t, feasible, engineOK, "vehicle %+v route %v: %v, summary %+v", p.Vehicles[k], route, rr.Problems, whole)
			require.Equal(t, rr.Travel, whole.C)
			if feasible {
				checked++
				require.Equal(t, rr.Completion, whole.E+whole.D, "completion, route %v", route)
				require.Equal(t, rr.Duration, whole.D, "duration, route %v", route)
			}
			s.routes[k] = nil
			s.refresh(k)
		}
	}
	require.Greater(t, checked, 100)
}
