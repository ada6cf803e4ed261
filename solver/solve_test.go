package solver

import (
	"context"
	"math/rand"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// enumerate is the test oracle: every order of the free visits, scored by the
// plain evaluator. It returns the best feasible route, or the one with least
// lateness when none is feasible.
func enumerate(in *Instance, obj Objective) (best []int, bestS Schedule) {
	var free []int
	used := map[int]bool{in.Start: true}
	if in.Shape == OpenFixed {
		used[in.End] = true
	}
	for _, v := range in.Fixed {
		used[v] = true
	}
	for i := 0; i < in.N; i++ {
		if !used[i] {
			free = append(free, i)
		}
	}
	prefix := []int{in.Start}
	if len(in.Fixed) > 0 {
		prefix = append([]int(nil), in.Fixed...)
	}
	var rec func(k int)
	have := false
	rec = func(k int) {
		if k == len(free) {
			r := append(append([]int(nil), prefix...), free...)
			if in.Shape == OpenFixed {
				r = append(r, in.End)
			}
			if CheckRoute(in, r) != nil {
				return
			}
			s := Evaluate(in, r)
			if !have || s.TotalLateness < bestS.TotalLateness || s.TotalLateness == bestS.TotalLateness && s.Cost(obj) < bestS.Cost(obj) {
				best, bestS, have = r, s, true
			}
			return
		}
		for i := k; i < len(free); i++ {
			free[k], free[i] = free[i], free[k]
			rec(k + 1)
			free[k], free[i] = free[i], free[k]
		}
	}
	rec(0)
	return best, bestS
}

// randomInstance makes an asymmetric instance with windows around a random
// reference tour, so that most are feasible; width sets the window tightness.
func randomInstance(rng *rand.Rand, n int, width int64, shape Shape) *Instance {
	in := &Instance{N: n, Scale: 1, Shape: shape, Travel: make([]int64, n*n), Service: make([]int64, n), Early: make([]int64, n), Late: make([]int64, n)}
	xs := make([]int64, n)
	ys := make([]int64, n)
	for i := range xs {
		xs[i], ys[i] = rng.Int63n(50), rng.Int63n(50)
	}
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			if i != j {
				dx, dy := xs[i]-xs[j], ys[i]-ys[j]
				if dx < 0 {
					dx = -dx
				}
				if dy < 0 {
					dy = -dy
				}
				in.Travel[i*n+j] = dx + dy + rng.Int63n(8) // asymmetric noise
			}
		}
	}
	perm := rng.Perm(n - 1)
	t := int64(0)
	prev := 0
	for _, p := range perm {
		v := p + 1
		in.Service[v] = rng.Int63n(5)
		t += in.Travel[prev*n+v]
		lo := t - rng.Int63n(width+1)
		if lo < 0 {
			lo = 0
		}
		in.Early[v], in.Late[v] = lo, lo+width
		if t < lo {
			t = lo
		}
		t += in.Service[v]
		prev = v
	}
	in.Late[0] = t + 1000
	if shape == OpenFixed {
		in.End = n - 1
		in.Late[n-1] = t + 1000
	}
	return in
}

// checkPlan is the independent check of a reported plan.
func checkPlan(t *testing.T, in *Instance, obj Objective, p Plan) {
	t.Helper()
	require.NoError(t, CheckRoute(in, p.Route))
	s := Evaluate(in, p.Route)
	require.Equal(t, s.Feasible, p.Feasible, "feasibility as claimed")
	require.Equal(t, s.Cost(obj), p.Cost, "cost recomputed from scratch")
	require.Equal(t, s.TotalLateness, p.Schedule.TotalLateness)
}

func TestSolveMatchesEnumeration(t *testing.T) {
	rng := rand.New(rand.NewSource(7))
	for trial := 0; trial < 36; trial++ {
		n := 8 + trial%3
		width := []int64{15, 40, 120, 400}[trial%4]
		shape := []Shape{Closed, OpenFree, OpenFixed}[trial%3]
		obj := []Objective{TravelTime, CompletionTime}[(trial/3)%2]
		in := randomInstance(rng, n, width, shape)
		_, want := enumerate(in, obj)
		var plans []Plan
		res, err := Solve(context.Background(), in, Settings{Iterations: 400, Seed: int64(trial), Objective: obj,
			OnImprove: func(p Plan) { plans = append(plans, p) }})
		require.NoError(t, err)
		checkPlan(t, in, obj, res.Best)
		for _, p := range plans {
			checkPlan(t, in, obj, p)
		}
		assert.Equal(t, want.TotalLateness, res.Best.Schedule.TotalLateness, "trial %d lateness", trial)
		if want.Feasible {
			assert.Equal(t, want.Cost(obj), res.Best.Cost, "trial %d n=%d width=%d shape=%v obj=%v", trial, n, width, shape, obj)
		}
	}
}

func TestSolveFixedPrefixAndPins(t *testing.T) {
	rng := rand.New(rand.NewSource(11))
	for trial := 0; trial < 8; trial++ {
		in := randomInstance(rng, 9, 200, Closed)
		ref, _ := enumerate(in, TravelTime)
		// Fix the first two visits of some order and pin one to the end.
		in.Fixed = []int{0, ref[2], ref[1]}
		in.Position = make([]int, in.N)
		in.Position[ref[5]] = in.N - 1
		_, want := enumerate(in, TravelTime)
		res, err := Solve(context.Background(), in, Settings{Iterations: 300, Seed: 3})
		require.NoError(t, err)
		checkPlan(t, in, TravelTime, res.Best)
		assert.Equal(t, in.Fixed, res.Best.Route[:3])
		assert.Equal(t, ref[5], res.Best.Route[in.N-1])
		if want.Feasible {
			assert.Equal(t, want.Cost(TravelTime), res.Best.Cost, "trial %d", trial)
		}
	}
}

func TestSolveMiddlePinRejected(t *testing.T) {
	in := randomInstance(rand.New(rand.NewSource(1)), 8, 100, Closed)
	in.Position = make([]int, in.N)
	in.Position[3] = 4
	_, err := Solve(context.Background(), in, Settings{Iterations: 10})
	require.Error(t, err)
	assert.Contains(t, err.Error(), "pinned to position 4")
}

func TestSolveDeterministicForSeed(t *testing.T) {
	in := randomInstance(rand.New(rand.NewSource(5)), 40, 60, Closed)
	run := func() Result {
		res, err := Solve(context.Background(), in, Settings{Iterations: 300, Seed: 42})
		require.NoError(t, err)
		return res
	}
	a, b := run(), run()
	assert.Equal(t, a.Best.Route, b.Best.Route)
	assert.Equal(t, a.Best.Cost, b.Best.Cost)
	assert.Equal(t, a.Improvements, b.Improvements)
	assert.Equal(t, StopIterations, a.Stop)
}

func TestSolveInfeasibleLeastLateness(t *testing.T) {
	rng := rand.New(rand.NewSource(9))
	for trial := 0; trial < 10; trial++ {
		in := randomInstance(rng, 8, 10, Closed)
		// Squeeze two windows so that the day cannot work.
		in.Late[1], in.Early[1] = 5, 0
		in.Late[2], in.Early[2] = 5, 0
		_, want := enumerate(in, TravelTime)
		require.False(t, want.Feasible)
		res, err := Solve(context.Background(), in, Settings{Iterations: 300, Seed: 1})
		require.NoError(t, err)
		checkPlan(t, in, TravelTime, res.Best)
		assert.False(t, res.Best.Feasible)
		assert.Equal(t, want.TotalLateness, res.Best.Schedule.TotalLateness, "trial %d", trial)
	}
}

func TestSolveStopsOnCancel(t *testing.T) {
	in := randomInstance(rand.New(rand.NewSource(2)), 60, 100, Closed)
	ctx, cancel := context.WithCancel(context.Background())
	calls := 0
	res, err := Solve(ctx, in, Settings{Seed: 1, ProgressEvery: time.Nanosecond, OnProgress: func(Progress) {
		calls++
		if calls == 20 {
			cancel()
		}
	}})
	require.NoError(t, err)
	assert.Equal(t, StopStopped, res.Stop)
	checkPlan(t, in, TravelTime, res.Best)
}

func TestSolveTakesMixUpdates(t *testing.T) {
	in := randomInstance(rand.New(rand.NewSource(3)), 30, 100, Closed)
	ch := make(chan Mix, 1)
	ch <- Mix{"slice": 1}
	var last Progress
	_, err := Solve(context.Background(), in, Settings{Iterations: 200, Seed: 1, MixUpdates: ch, FixedMix: true,
		ProgressEvery: time.Nanosecond, OnProgress: func(p Progress) { last = p }})
	require.NoError(t, err)
	assert.Equal(t, 1.0, last.Weights["slice"])
	assert.Equal(t, 0.0, last.Weights["random"])
}

func TestParseMix(t *testing.T) {
	m, err := ParseMix("random=1, slice=2,related=0,worst=0.5")
	require.NoError(t, err)
	assert.Equal(t, Mix{"random": 1, "slice": 2, "related": 0, "worst": 0.5}, m)
	for _, bad := range []string{"random", "spin=1", "random=-1", "random=0,slice=0", "random=x"} {
		_, err := ParseMix(bad)
		assert.Error(t, err, bad)
	}
}

func TestSolveFewestLateVisits(t *testing.T) {
	rng := rand.New(rand.NewSource(13))
	for trial := 0; trial < 6; trial++ {
		in := randomInstance(rng, 8, 10, Closed)
		in.Late[1], in.Early[1] = 5, 0
		in.Late[2], in.Early[2] = 5, 0
		// Oracle: fewest late visits, then least lateness, then travel.
		var bestKey [3]int64
		have := false
		var rec func(k int, free []int)
		free := []int{1, 2, 3, 4, 5, 6, 7}
		rec = func(k int, free []int) {
			if k == len(free) {
				s := Evaluate(in, append([]int{0}, free...))
				key := [3]int64{int64(s.LateVisits), s.TotalLateness, s.Travel}
				if !have || key[0] < bestKey[0] || key[0] == bestKey[0] && (key[1] < bestKey[1] || key[1] == bestKey[1] && key[2] < bestKey[2]) {
					bestKey, have = key, true
				}
				return
			}
			for i := k; i < len(free); i++ {
				free[k], free[i] = free[i], free[k]
				rec(k+1, free)
				free[k], free[i] = free[i], free[k]
			}
		}
		rec(0, free)
		res, err := Solve(context.Background(), in, Settings{Iterations: 300, Seed: 1, FewestLate: true})
		require.NoError(t, err)
		checkPlan(t, in, TravelTime, res.Best)
		assert.Equal(t, bestKey[0], int64(res.Best.Schedule.LateVisits), "trial %d late visits", trial)
	}
}
