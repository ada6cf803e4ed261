package solver

import (
	"context"
	"math/rand"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// windowedAround is an n-site day with windows of the given width around
// the times of its nearest-neighbour tour, which it returns (a feasible
// order, start first).
func windowedAround(seed int64, n int, width int64) (*Instance, []int) {
	rng := rand.New(rand.NewSource(seed))
	in := openInstance(rng, n, false, Closed)
	used := make([]bool, n)
	used[0] = true
	order := []int{0}
	cur, at := 0, int64(0)
	for k := 1; k < n; k++ {
		next := -1
		for v := 0; v < n; v++ {
			if !used[v] && (next < 0 || in.T(cur, v) < in.T(cur, next)) {
				next = v
			}
		}
		used[next] = true
		at += in.Service[cur] + in.T(cur, next)
		e := max(0, at-rng.Int63n(width+1))
		in.Early[next], in.Late[next] = e, e+width
		cur = next
		order = append(order, next)
	}
	in.Late[0] = at + in.Service[cur] + in.T(cur, 0) + width
	return in, order
}

// The candidate lists hold, for each node, the nearest arcs that a feasible
// plan can hold, in order of travel; days under granularFrom movable visits
// have none (their search is unchanged).
func TestGranularLists(t *testing.T) {
	small, _ := windowedAround(3, granularFrom-10, 600)
	m, err := newModel(small, TravelTime)
	require.NoError(t, err)
	assert.False(t, m.granular())

	in, _ := windowedAround(3, granularFrom+100, 600)
	m, err = newModel(in, TravelTime)
	require.NoError(t, err)
	require.True(t, m.granular())
	for _, v := range m.movable {
		// Shorter lists where fewer arcs can be held.
		require.LessOrEqual(t, len(m.succ[v]), granularK)
		require.LessOrEqual(t, len(m.pred[v]), granularK)
		require.NotEmpty(t, m.succ[v])
		for k, w := range m.succ[v] {
			require.True(t, m.arcOK(v, int(w)))
			if k > 0 {
				require.LessOrEqual(t, m.T(v, int(m.succ[v][k-1])), m.T(v, int(w)))
			}
		}
		// No feasible arc outside the list is shorter than its last one
		// (and none is outside a list shorter than granularK).
		last := m.T(v, int(m.succ[v][len(m.succ[v])-1]))
		in := map[int32]bool{}
		for _, w := range m.succ[v] {
			in[w] = true
		}
		for _, w := range m.movable {
			if w != v && !in[int32(w)] && m.arcOK(v, w) {
				require.Len(t, m.succ[v], granularK)
				require.GreaterOrEqual(t, m.T(v, w), last)
			}
		}
		for k, u := range m.pred[v] {
			require.True(t, m.arcOK(int(u), v))
			if k > 0 {
				require.LessOrEqual(t, m.T(int(m.pred[v][k-1]), v), m.T(int(u), v))
			}
		}
	}
}

// Granular insertion against the full scan: never better than the best
// place of all, equal to it whenever that place is next to a candidate,
// and it declines (so that the full scan runs) rather than add time warp
// to a route without it.
func TestGranularInsertAgainstFullScan(t *testing.T) {
	in, order := windowedAround(5, granularFrom+100, 900)
	m, err := newModel(in, TravelTime)
	require.NoError(t, err)
	require.True(t, m.granular())
	s := newSearch(m, 1)
	s.lam = 1000
	r := []int32{}
	for _, v := range order {
		r = append(r, int32(v))
	}
	r = append(r, int32(m.end))
	x := newRoute(m, r)
	require.Zero(t, x.total().tw, "the nearest-neighbour order meets its windows")
	rng := rand.New(rand.NewSource(2))
	agreed, declined := 0, 0
	for trial := 0; trial < 200; trial++ {
		// Take one visit out, then put it back.
		i := 1 + rng.Intn(len(r)-2)
		v := r[i]
		rest := append(append([]int32{}, r[:i]...), r[i+1:]...)
		y := newRoute(m, rest)
		s.trackPositions(y, 0)
		p, best, _, ok := s.bestInsertGranular(y, v)
		fp, fbest, _ := s.bestInsert(y, v)
		require.GreaterOrEqual(t, fp, 0)
		if !ok {
			declined++
			continue
		}
		require.GreaterOrEqual(t, best, fbest-1e-9, "trial %d: granular below the full scan", trial)
		a, b := y.r[fp], y.r[fp+1]
		cand := false
		for _, c := range m.pred[v] {
			cand = cand || c == a
		}
		for _, c := range m.succ[v] {
			cand = cand || c == b
		}
		if cand {
			require.InDelta(t, fbest, best, 1e-9, "trial %d: the best place is next to a candidate", trial)
			agreed++
		}
		// The place it picked is valid and costs what it says.
		sg := join(join(y.fwd[p], m.unit(int(v)), m.arc(y.r[p], v)), y.bwd[p+1], m.arc(v, y.r[p+1]))
		require.Zero(t, sg.tw, "trial %d: no warp added", trial)
		require.InDelta(t, m.value(sg, s.lam)-m.value(y.total(), s.lam), best, 1e-9)
	}
	assert.Greater(t, agreed, 100, "most best places are next to a candidate")
	t.Logf("agreed %d, declined %d of 200", agreed, declined)
}

// A large windowed day solved with granular insertion: every plan passes
// the independent evaluator and meets every window.
func TestGranularSolveChecked(t *testing.T) {
	in, _ := windowedAround(9, granularFrom+50, 600)
	res, err := Solve(context.Background(), in, Settings{Iterations: 150, Seed: 1, Workers: 1})
	require.NoError(t, err)
	checkPlan(t, in, TravelTime, res.Best)
	assert.True(t, res.Best.Feasible)
}

// candArc, read from its table of bits, says what the candidate lists say
// for every pair of nodes.
func TestCandArcIsTheLists(t *testing.T) {
	in, _ := windowedAround(7, granularFrom+30, 900)
	m, err := newModel(in, TravelTime)
	require.NoError(t, err)
	require.True(t, m.granular())
	yes := 0
	for a := 0; a < m.n; a++ {
		for b := 0; b < m.n; b++ {
			want := m.candArcByLists(int32(a), int32(b))
			require.Equal(t, want, m.candArc(int32(a), int32(b)), "arc %d→%d", a, b)
			if want {
				yes++
			}
		}
	}
	assert.Greater(t, yes, m.n*granularK, "each node has its successors and predecessors")
}
