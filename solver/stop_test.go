package solver

import (
	"context"
	"encoding/json"
	"math/rand"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func TestStopNamesRoundTrip(t *testing.T) {
	for s, want := range map[Stop]string{StopBudget: "budget", StopIterations: "iterations", StopComplete: "complete", StopStopped: "stopped", StopError: "error"} {
		assert.Equal(t, want, s.String())
		b, err := json.Marshal(s)
		require.NoError(t, err)
		assert.Equal(t, `"`+want+`"`, string(b))
		var back Stop
		require.NoError(t, json.Unmarshal(b, &back))
		assert.Equal(t, s, back)
	}
	var s Stop
	assert.Error(t, s.UnmarshalText([]byte("cancelled")))
}

// TestDeadlineIsABudgetNotAStop guards the race of the bound side's
// timeout with the engine's own deadline: a context that ends by its
// deadline is a used budget, only a cancel is a stop.
func TestDeadlineIsABudgetNotAStop(t *testing.T) {
	in := randomInstance(rand.New(rand.NewSource(3)), 30, 100, Closed)
	cases := []struct {
		name string
		ctx  func() (context.Context, context.CancelFunc)
		want Stop
	}{
		{"deadline passed", func() (context.Context, context.CancelFunc) {
			return context.WithDeadline(context.Background(), time.Now().Add(-time.Second))
		}, StopBudget},
		{"cancelled", func() (context.Context, context.CancelFunc) {
			ctx, cancel := context.WithCancel(context.Background())
			cancel()
			return ctx, cancel
		}, StopStopped},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			ctx, cancel := c.ctx()
			defer cancel()
			assert.Equal(t, c.want, StopOf(ctx))
			res, err := Solve(ctx, in, Settings{Seed: 1})
			require.NoError(t, err)
			assert.Equal(t, c.want, res.Stop)
			require.NotNil(t, res.Best.Route, "a first plan is still built")
		})
	}
}

// TestAdoptTakesABetterRoute: a better route sent to a running search
// becomes its best (so the result is at least as good), and a route that
// does not fit the instance is ignored.
func TestAdoptTakesABetterRoute(t *testing.T) {
	in := randomInstance(rand.New(rand.NewSource(5)), 80, 300, Closed)
	good, err := Solve(context.Background(), in, Settings{Seed: 9, Iterations: 1500})
	require.NoError(t, err)
	require.True(t, good.Best.Feasible)
	ch := make(chan []int, 2)
	ch <- []int{0, 1}
	ch <- good.Best.Route
	res, err := Solve(context.Background(), in, Settings{Seed: 1, Iterations: 3, Adopt: ch})
	require.NoError(t, err)
	assert.LessOrEqual(t, res.Best.Cost, good.Best.Cost)
	checkPlan(t, in, TravelTime, res.Best)
	// Without the adopted route, three iterations do worse.
	alone, err := Solve(context.Background(), in, Settings{Seed: 1, Iterations: 3})
	require.NoError(t, err)
	assert.Greater(t, alone.Best.Cost, good.Best.Cost)
}
