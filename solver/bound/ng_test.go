package bound

import (
	"cmp"
	"context"
	"fmt"
	"math/rand"
	"slices"
	"testing"

	"github.com/stretchr/testify/require"

	"visitline/solver"
)

// TestNGRelaxationNeverAboveOptimum runs the penalty ascent of the ng-route
// relaxation on random asymmetric instances of 6 to 12 nodes (every shape,
// both objectives, tight to no windows), with small and grown
// neighbourhoods and with and without merged labels: the bound of every
// step is at most the optimum found by enumeration (Enumerate, independent
// of this code), and so is the exact search's proven value.
func TestNGRelaxationNeverAboveOptimum(t *testing.T) {
	rng := rand.New(rand.NewSource(21))
	checked := 0
	for _, n := range []int{6, 8, 10, 11, 12} {
		widths := []int64{10, 40, 120, 5000}
		if n >= 11 {
			widths = widths[:3] // enumeration without windows is too slow here
		}
		for _, width := range widths {
			for _, shape := range shapes {
				for _, obj := range []solver.Objective{solver.TravelTime, solver.CompletionTime} {
					in := randomInstance(rng, n, width, shape)
					_, opt, ok := Enumerate(in, obj)
					if !ok {
						continue
					}
					for _, cfg := range []struct{ ng, ngMax, perState int }{{2, 2, 0}, {4, 4, 3}, {3, 8, 2}, {12, 12, 0}} {
						name := fmt.Sprintf("n%d w%d %v %v ng %d-%d cap %d", n, width, shape, obj, cfg.ng, cfg.ngMax, cfg.perState)
						p := newProb(in)
						asc := newAscent(p, obj, lagrangeOpts{perState: cfg.perState, ngSize: cfg.ng, ngMax: cfg.ngMax, ub: opt})
						for it := 0; it < 12 && !asc.done; it++ {
							asc.run(context.Background(), 1, &yielder{})
							require.NotNil(t, asc.best, name)
							require.LessOrEqual(t, asc.best.z, opt, "%s: step %d", name, it)
						}
						if asc.route != nil {
							sch := solver.Evaluate(in, asc.route)
							require.Equal(t, opt, sch.Cost(obj), "%s: a route the ascent proves optimal", name)
						}
						checked++
					}
					b := Exact(context.Background(), in, Options{Objective: obj, Neighbours: 3, NeighboursMax: 6})
					require.True(t, b.ProvenOptimal, "n%d w%d %v %v", n, width, shape, obj)
					require.Equal(t, opt, b.Value)
				}
			}
		}
	}
	require.Greater(t, checked, 150)
}

// TestNGFullNeighbourhoodIsExact: with every node in every neighbourhood and
// no merged labels, a relaxed path cannot repeat a node, so for the travel
// objective the relaxation's bound with zero penalties is the optimum
// itself (a relaxed path of n nodes is then a route), for every shape.
func TestNGFullNeighbourhoodIsExact(t *testing.T) {
	rng := rand.New(rand.NewSource(5))
	checked := 0
	for c := 0; c < 36; c++ {
		n := 6 + c%6 // 6 to 11
		width := []int64{20, 60, 150}[c%3]
		in := randomInstance(rng, n, width, shapes[(c/3)%3])
		_, opt, ok := Enumerate(in, solver.TravelTime)
		p := newProb(in)
		rx := buildRelax(context.Background(), p, solver.TravelTime, make([]int64, n), fullNGSets(n), 0, 0, &yielder{})
		require.NotNil(t, rx)
		if !ok {
			require.Equal(t, inf, rx.z, "case %d: no route, so no elementary relaxed path", c)
			continue
		}
		require.Equal(t, opt, rx.z, "case %d (n %d, %v)", c, n, in.Shape)
		require.Len(t, rx.path, n)
		require.NoError(t, solver.CheckRoute(in, rx.path))
		sch := solver.Evaluate(in, rx.path)
		require.True(t, sch.Feasible)
		require.Equal(t, opt, sch.Cost(solver.TravelTime))
		checked++
	}
	require.Greater(t, checked, 15)
}

// TestNGSetsGrowOnCycles: growing puts the repeated node into the
// neighbourhoods of the nodes between its visits, up to the size limit.
func TestNGSetsGrowOnCycles(t *testing.T) {
	rng := rand.New(rand.NewSource(2))
	in := randomInstance(rng, 10, 5000, solver.Closed)
	p := newProb(in)
	ng := newNGSets(p, 2, 3)
	for i := 0; i < 10; i++ {
		require.Len(t, ng.list[i], 2)
		require.Equal(t, int32(i), ng.list[i][0])
	}
	// 0 → 4 → 5 → 4 → 6 ...: the cycle 4 → 5 → 4 puts 4 into N(5).
	path := []int{0, 4, 5, 4, 6, 7, 8, 9, 1, 2}
	had := ng.pos[5*10+4] >= 0
	added := ng.grow(path)
	require.GreaterOrEqual(t, ng.pos[5*10+4], int8(0))
	if !had {
		require.Equal(t, 1, added)
	}
	// Neighbourhoods stop at the limit.
	ng.grow([]int{0, 1, 5, 1, 2, 5, 2, 3, 5, 3, 1, 2, 5})
	for i := 0; i < 10; i++ {
		require.LessOrEqual(t, len(ng.list[i]), 3)
	}
	require.Len(t, ng.list[5], 3)
}

// TestMergeByMemoryRelaxes: merging a state's labels to fit the cap keeps
// a relaxation (every label is dominated by a merged one: as late a start,
// no dearer, remembering no more), in L-descending order, within the cap;
// and with fewer memories than slots, it never mixes memories.
func TestMergeByMemoryRelaxes(t *testing.T) {
	rng := rand.New(rand.NewSource(3))
	for c := 0; c < 200; c++ {
		n := 1 + rng.Intn(300)
		k := 1 + rng.Intn(40)
		mems := 1 + rng.Intn(12)
		in := make([]cand, n)
		for i := range in {
			in[i] = cand{L: int64(rng.Intn(500)), C: int64(rng.Intn(1000) - 300), M: uint64(rng.Intn(mems))<<1 | 1, sl: int32(i)}
		}
		slices.SortFunc(in, func(a, b cand) int { return cmp.Compare(b.L, a.L) })
		out := mergeByMemory(append([]cand(nil), in...), k)
		require.LessOrEqual(t, len(out), k, "case %d", c)
		for i := 1; i < len(out); i++ {
			require.GreaterOrEqual(t, out[i-1].L, out[i].L, "case %d: L descending", c)
		}
		distinct := map[uint64]bool{}
		for _, x := range in {
			distinct[x.M] = true
		}
		for _, x := range in {
			require.True(t, slices.ContainsFunc(out, func(o cand) bool { return o.L >= x.L && o.C <= x.C && o.M&^x.M == 0 }),
				"case %d: label %+v has no merged label that relaxes it", c, x)
		}
		if len(distinct) <= k {
			for _, o := range out {
				require.True(t, distinct[o.M], "case %d: a merged memory %b that no label had", c, o.M)
			}
			kept := map[uint64]bool{}
			for _, o := range out {
				kept[o.M] = true
			}
			require.Len(t, kept, len(distinct), "case %d: every memory keeps a label", c)
		}
	}
}
