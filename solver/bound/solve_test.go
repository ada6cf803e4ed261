package bound

import (
	"context"
	"fmt"
	"math/rand"
	"sync"
	"testing"
	"time"

	"github.com/stretchr/testify/require"

	"visitline/solver"
)

func TestSolveProvesSmallInstanceOptimal(t *testing.T) {
	// The budget is a ceiling only: the proof on ten nodes ends the run long
	// before it, and the optimum is checked against enumeration.
	rng := rand.New(rand.NewSource(3))
	for c := 0; c < 6; c++ {
		in := randomInstance(rng, 10, 60, shapes[c%3])
		obj := solver.Objective(c % 2)
		want, wantCost, ok := Enumerate(in, obj)
		if !ok {
			continue
		}
		var mu sync.Mutex
		var costs []int64
		s := solver.Settings{Budget: time.Minute, Seed: 1, Objective: obj, OnImprove: func(p solver.Plan) {
			mu.Lock()
			defer mu.Unlock()
			if p.Feasible {
				costs = append(costs, p.Cost)
			}
		}}
		res, b, err := Solve(context.Background(), in, s)
		require.NoError(t, err)
		require.True(t, res.Best.Feasible)
		require.Equal(t, wantCost, res.Best.Cost, "enumerated optimum %v", want)
		require.True(t, b.ProvenOptimal)
		require.Equal(t, solver.StopComplete, res.Stop)
		require.Equal(t, wantCost, b.Value)
		r := ReportFor(b, res.Best)
		require.True(t, r.ProvenOptimal)
		require.True(t, r.HasBound)
		require.NotEmpty(t, costs)
		for k := 1; k < len(costs); k++ {
			require.Less(t, costs[k], costs[k-1], "reported feasible plans only improve")
		}
		require.Equal(t, wantCost, costs[len(costs)-1])
	}
}

func TestSolveWithIterationBudgetKeepsBoundValid(t *testing.T) {
	rng := rand.New(rand.NewSource(9))
	in := randomInstance(rng, 10, 200, solver.Closed)
	_, opt, ok := Enumerate(in, solver.TravelTime)
	require.True(t, ok)
	res, b, err := Solve(context.Background(), in, solver.Settings{Iterations: 5, Seed: 2})
	require.NoError(t, err)
	require.True(t, b.Valid)
	require.LessOrEqual(t, b.Value, opt)
	require.GreaterOrEqual(t, res.Best.Cost, opt)
	if b.ProvenOptimal {
		require.Equal(t, opt, res.Best.Cost)
	}
}

func TestSolveInfeasibleDay(t *testing.T) {
	// Two visits both open [10, 12], 5 apart and 10 from the depot: no plan
	// (see TestExplainTwoTightWindows). The engine still returns its least
	// late plan; the bound side proves infeasibility.
	in := hand([]string{"S", "A", "B"}, solver.Closed, func(i, j int) int64 {
		if i+j == 3 {
			return 5
		}
		return 10
	}, []int64{0, 10, 10}, []int64{1000, 12, 12})
	res, b, err := Solve(context.Background(), in, solver.Settings{Iterations: 20, Seed: 1})
	require.NoError(t, err)
	require.False(t, res.Best.Feasible)
	require.True(t, b.Infeasible)
	require.False(t, ReportFor(b, res.Best).ProvenOptimal)
	ok, proven := FeasibleExists(context.Background(), in)
	require.False(t, ok)
	require.True(t, proven)
}

func TestPrepStopsWhenContextEnds(t *testing.T) {
	// With its context ended, preprocessing stops before the shortest
	// paths (which could not be trusted half done) and claims nothing:
	// the exact search on such a prob still agrees with enumeration
	// through its own bound checks, and the full prob has the paths.
	rng := rand.New(rand.NewSource(4))
	in := randomInstance(rng, 10, 5000, solver.Closed)
	require.NotNil(t, newProb(in).sp)
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	p := newProbCtx(ctx, in)
	require.Nil(t, p.sp)
	require.Nil(t, p.mustBefore)
	require.False(t, p.infeasible)
	b := Lower(ctx, in, Options{})
	require.False(t, b.ProvenOptimal)
	require.False(t, b.Infeasible)
}

func TestSearchWithoutShortestPaths(t *testing.T) {
	// Above spLimit nodes there are no shortest paths and no precedences (the
	// limit is lowered here to keep the test small): the exact search must
	// still agree with enumeration.
	old := spLimit
	spLimit = 4
	defer func() { spLimit = old }()
	rng := rand.New(rand.NewSource(8))
	for c := 0; c < 6; c++ {
		in := randomInstance(rng, 9, []int64{20, 80, 5000}[c%3], shapes[c%3])
		require.Nil(t, newProb(in).sp)
		checkAgainstEnumeration(t, fmt.Sprintf("no shortest paths %d", c), in, solver.TravelTime)
	}
}
