package fleet

import (
	"math/rand"
	"testing"

	"github.com/stretchr/testify/require"

	"visitline/solver"
)

// After the polish has run to a fixed point, no swap of stretches of up
// to three visits between two routes (the cross-exchange of Taillard et
// al. 1997) lowers the travel of a feasible plan: every such swap is
// tried here by brute force and judged by Evaluate, apart from the
// engine's summaries. The days are small enough that every visit is among
// every other's nearest, so the polish's granular lists hide nothing.
func TestPolishLeavesNoImprovingCrossExchange(t *testing.T) {
	rng := rand.New(rand.NewSource(11))
	tried := 0
	for c := 0; c < 40; c++ {
		p := randomFleet(rng, 10+rng.Intn(6), 2+rng.Intn(2))
		for v := range p.Vehicles { // long shifts, so that routes are long
			p.Vehicles[v].ShiftEnd += 400
			p.Vehicles[v].MaxDuration = NoLimit
		}
		m := newModel(p, solver.TravelTime, false)
		require.Less(t, len(m.visits), nearSize)
		s := newState(m)
		s.repair(rng, 2, 0)
		for pass := 0; pass < 100; pass++ {
			before := s.plan()
			for r := range s.dirty {
				s.dirty[r] = true
			}
			s.polish(true)
			if equalPlans(before, s.plan()) {
				break
			}
		}
		pl := s.plan()
		rep, err := Evaluate(p, pl)
		require.NoError(t, err)
		require.True(t, rep.Feasible, rep.Problems)
		for a, ra := range pl.Routes {
			for b, rb := range pl.Routes {
				if a == b || len(ra) == 0 || len(rb) == 0 {
					continue
				}
				for i := 0; i < len(ra); i++ {
					for j := 0; j <= len(rb); j++ {
						for x := 0; x <= crossMax && i+x <= len(ra); x++ {
							for y := 0; y <= crossMax && j+y <= len(rb); y++ {
								if x+y <= 1 || x == 1 && y == 1 {
									continue
								}
								q := pl.Clone()
								q.Routes[a] = append(append(append([]int{}, ra[:i]...), rb[j:j+y]...), ra[i+x:]...)
								q.Routes[b] = append(append(append([]int{}, rb[:j]...), ra[i:i+x]...), rb[j+y:]...)
								qr, err := Evaluate(p, q)
								require.NoError(t, err)
								tried++
								if qr.Feasible && qr.UnservedWeight == rep.UnservedWeight {
									require.GreaterOrEqual(t, qr.Travel, rep.Travel,
										"day %d: swapping %v of route %d with %v of route %d lowers the travel", c, ra[i:i+x], a, rb[j:j+y], b)
								}
							}
						}
					}
				}
			}
		}
	}
	require.Greater(t, tried, 10000)
}

func equalPlans(a, b Plan) bool {
	if len(a.Routes) != len(b.Routes) {
		return false
	}
	for k := range a.Routes {
		if len(a.Routes[k]) != len(b.Routes[k]) {
			return false
		}
		for i := range a.Routes[k] {
			if a.Routes[k][i] != b.Routes[k][i] {
				return false
			}
		}
	}
	return true
}
