package fleet

import (
	"context"
	"fmt"
	"math"
	"math/rand"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"visitline/solver"
)

// randomFleet builds a small random day: n visits, k vehicles with
// different starts, ends (back, free, elsewhere), shifts, capacities and
// longest days, windows, demands and priorities. Travel is Euclidean,
// rounded, with a random asymmetric surcharge.
func randomFleet(rng *rand.Rand, n, k int) *Problem {
	depots := 2
	N := depots + n
	p := &Problem{Name: "random", N: N, Scale: 1, Travel: make([]int64, N*N), Service: make([]int64, N),
		Early: make([]int64, N), Late: make([]int64, N), Demand: make([]int64, N)}
	xs, ys := make([]float64, N), make([]float64, N)
	for i := range xs {
		xs[i], ys[i] = float64(rng.Intn(60)), float64(rng.Intn(60))
	}
	for i := 0; i < N; i++ {
		for j := 0; j < N; j++ {
			if i != j {
				p.Travel[i*N+j] = int64(math.Round(math.Hypot(xs[i]-xs[j], ys[i]-ys[j]))) + int64(rng.Intn(4))
			}
		}
	}
	for i := 0; i < depots; i++ {
		p.Late[i] = 1000
	}
	for i := depots; i < N; i++ {
		p.Service[i] = int64(rng.Intn(12))
		p.Early[i] = int64(rng.Intn(160))
		p.Late[i] = p.Early[i] + 5 + int64(rng.Intn(90))
		p.Demand[i] = 1 + int64(rng.Intn(5))
	}
	if rng.Intn(2) == 0 {
		p.Priority = make([]int64, N)
		for i := range p.Priority {
			p.Priority[i] = 1 + int64(rng.Intn(3))
		}
	}
	for v := 0; v < k; v++ {
		veh := Vehicle{ID: fmt.Sprint("v", v+1), Start: 0, End: 0, ShiftStart: int64(rng.Intn(30)), ShiftEnd: 200 + int64(rng.Intn(120)),
			Capacity: NoLimit, MaxDuration: NoLimit}
		switch rng.Intn(4) {
		case 1:
			veh.End = FreeEnd
		case 2:
			veh.Start = 1
		case 3:
			veh.End = 1
		}
		if rng.Intn(2) == 0 {
			veh.Capacity = 4 + int64(rng.Intn(8))
		}
		if rng.Intn(3) == 0 {
			veh.MaxDuration = 80 + int64(rng.Intn(120))
		}
		p.Vehicles = append(p.Vehicles, veh)
	}
	// Depot 1 unused by every vehicle is a visit like any other: give it
	// a visit's data.
	if !p.Depots()[1] {
		p.Early[1], p.Late[1], p.Demand[1], p.Service[1] = 20, 140, 2, 5
	}
	return p
}

type enumBest struct {
	ok       bool
	vehicles int
	cost     int64
	seq      [][]int // per vehicle
}

// enumerate finds the optimum under the hierarchical objective by brute
// force, written apart from the engine: every order of every subset of
// visits is tried for every vehicle with the plain evaluator
// (evaluateRoute), then the routes are combined over disjoint subsets.
func enumerate(p *Problem, obj solver.Objective, minVeh bool) Value {
	v, _ := enumeratePlan(p, obj, minVeh)
	return v
}

// enumeratePlan is enumerate with an optimal plan.
func enumeratePlan(p *Problem, obj solver.Objective, minVeh bool) (Value, Plan) {
	visits := p.Visits()
	n := len(visits)
	full := 1 << n
	K := len(p.Vehicles)
	// routeBest[k][mask]: cheapest feasible order of exactly mask for vehicle k.
	routeBest := make([][]int64, K)
	routeSeq := make([][][]int, K)
	for k := range routeBest {
		routeSeq[k] = make([][]int, full)
		routeBest[k] = make([]int64, full)
		for i := range routeBest[k] {
			routeBest[k][i] = -1
		}
		var seq []int
		var dfs func(mask int)
		dfs = func(mask int) {
			if len(seq) > 0 {
				rr := evaluateRoute(p, k, seq)
				c := rr.Travel
				if obj == solver.CompletionTime {
					c = rr.Completion
				}
				if len(rr.Problems) == 0 && (routeBest[k][mask] < 0 || c < routeBest[k][mask]) {
					routeBest[k][mask] = c
					routeSeq[k][mask] = append([]int(nil), seq...)
				}
				// A late visit or an overload stays so for every longer
				// route with this beginning.
				for _, s := range rr.Stops {
					if s.Lateness > 0 {
						return
					}
				}
				if rr.Load > p.Vehicles[k].Capacity {
					return
				}
			}
			for x := 0; x < n; x++ {
				if mask&(1<<x) == 0 {
					seq = append(seq, visits[x])
					dfs(mask | 1<<x)
					seq = seq[:len(seq)-1]
				}
			}
		}
		dfs(0)
		routeBest[k][0] = 0
	}
	type vc struct {
		ok  bool
		veh int
		c   int64
	}
	better := func(a, b vc) bool {
		if !b.ok {
			return a.ok
		}
		if !a.ok {
			return false
		}
		if minVeh && a.veh != b.veh {
			return a.veh < b.veh
		}
		return a.c < b.c
	}
	f := make([]vc, full)
	f[0] = vc{ok: true}
	choice := make([][]int, K) // choice[k][mask]: the subset vehicle k serves
	for k := 0; k < K; k++ {
		g := make([]vc, full)
		choice[k] = make([]int, full)
		copy(g, f) // vehicle k idle
		for mask := 1; mask < full; mask++ {
			for s := mask; s > 0; s = (s - 1) & mask {
				rc := routeBest[k][s]
				prev := f[mask^s]
				if rc < 0 || !prev.ok {
					continue
				}
				c := vc{true, prev.veh + 1, prev.c + rc}
				if better(c, g[mask]) {
					g[mask] = c
					choice[k][mask] = s
				}
			}
		}
		f = g
	}
	var total int64
	for _, v := range visits {
		total += p.Weight(v)
	}
	best := Value{Unserved: math.MaxInt64}
	bestMask := 0
	for mask := 0; mask < full; mask++ {
		if !f[mask].ok {
			continue
		}
		var w int64
		for x := 0; x < n; x++ {
			if mask&(1<<x) != 0 {
				w += p.Weight(visits[x])
			}
		}
		v := Value{Unserved: total - w, Vehicles: f[mask].veh, Cost: f[mask].c}
		if v.Better(best, minVeh) {
			best, bestMask = v, mask
		}
	}
	pl := Plan{Routes: make([][]int, K)}
	mask := bestMask
	for k := K - 1; k >= 0; k-- {
		if sub := choice[k][mask]; sub != 0 {
			pl.Routes[k] = routeSeq[k][sub]
			mask ^= sub
		}
	}
	for x := 0; x < n; x++ {
		if bestMask&(1<<x) == 0 {
			pl.Unserved = append(pl.Unserved, visits[x])
		}
	}
	return best, pl
}

func TestSolveMatchesEnumeration(t *testing.T) {
	type tc struct {
		name   string
		seed   int64
		n, k   int
		obj    solver.Objective
		minVeh bool
	}
	var cases []tc
	for s := int64(1); s <= 40; s++ {
		c := tc{seed: s, n: 5 + int(s%4), k: 2 + int(s%2)}
		c.obj = solver.TravelTime
		if s%5 == 0 {
			c.obj = solver.CompletionTime
		}
		c.minVeh = s%3 == 0
		c.name = fmt.Sprintf("seed%d-n%d-k%d-%s-minveh%v", s, c.n, c.k, c.obj, c.minVeh)
		cases = append(cases, c)
	}
	// Larger days: 9 and 10 visits (the windows keep the enumeration short).
	for s := int64(41); s <= 48; s++ {
		c := tc{seed: s, n: 9 + int(s%2), k: 2 + int(s%3)/2, minVeh: s%4 == 0}
		c.name = fmt.Sprintf("seed%d-n%d-k%d-%s-minveh%v", s, c.n, c.k, c.obj, c.minVeh)
		cases = append(cases, c)
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := randomFleet(rand.New(rand.NewSource(c.seed)), c.n, c.k)
			require.NoError(t, p.Validate())
			want := enumerate(p, c.obj, c.minVeh)
			res, err := Solve(context.Background(), p, Settings{Iterations: 2000, Seed: c.seed, Objective: c.obj, MinimizeVehicles: c.minVeh})
			require.NoError(t, err)
			rep, err := Evaluate(p, res.Best)
			require.NoError(t, err)
			require.True(t, rep.Feasible, "%v", rep.Problems)
			got := rep.Value(c.obj)
			if !c.minVeh {
				got.Vehicles, want.Vehicles = 0, 0 // not part of the objective
			}
			assert.Equal(t, want, got, "plan %v", res.Best)
			assert.Len(t, res.Reasons, len(rep.Unserved))
		})
	}
}
