package app

import (
	"context"
	"os"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"visitline/solver"
	"visitline/solver/format"
)

func TestRunOptionsChecked(t *testing.T) {
	cases := []struct {
		name string
		o    RunOptions
		want string
	}{
		{"no budget at all", RunOptions{}, "never stops"},
		{"negative budget", RunOptions{Budget: -1}, "budget -1 s"},
		{"negative iterations", RunOptions{Iterations: -5}, "iterations -5"},
		{"unknown operator", RunOptions{Budget: 1, Mix: map[string]float64{"nosuch": 1}}, "unknown operator"},
		{"all zero", RunOptions{Budget: 1, Mix: map[string]float64{"random": 0}}, "at least one weight"},
		{"objective", RunOptions{Budget: 1, Objective: "fastest"}, "fastest"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := c.o.Settings()
			require.Error(t, err)
			assert.Contains(t, err.Error(), c.want)
		})
	}
}

func loadExample(t *testing.T) *format.Dataset {
	t.Helper()
	f, err := os.Open("../../examples/bakery/sites.csv")
	require.NoError(t, err)
	defer f.Close()
	m, err := os.Open("../../examples/bakery/travel.csv")
	require.NoError(t, err)
	defer m.Close()
	d, err := Load(f, m, "sites.csv", "travel.csv", LoadOptions{})
	require.NoError(t, err)
	return d
}

// TestRunIsTheEngine checks that the layer adds nothing of its own to the
// search: with a seed and an iteration budget its plan is the engine's,
// and the report is recomputed by the independent evaluator.
func TestRunIsTheEngine(t *testing.T) {
	d := loadExample(t)
	o := RunOptions{Iterations: 300, Seed: 4, NoBound: true}
	out, err := Run(context.Background(), d, o, Hooks{})
	require.NoError(t, err)
	s, err := o.Settings()
	require.NoError(t, err)
	res, err := solver.Solve(context.Background(), d.Instance, s)
	require.NoError(t, err)
	assert.Equal(t, res.Best.Route, out.Result.Best.Route)
	assert.Equal(t, solver.StopIterations, out.Why)
	sch := solver.Evaluate(d.Instance, out.Result.Best.Route)
	assert.Equal(t, sch.Feasible, out.Plan.Feasible)
	assert.InDelta(t, d.Instance.InputUnits(sch.Cost(solver.TravelTime)), out.Plan.Cost, 1e-9)
	assert.Empty(t, out.Note)
}

// TestRunSaysWhenTheBudgetIsTooShort: a budget that ends before the first
// plan is ready still gives that plan, as a used budget, with a note.
func TestRunSaysWhenTheBudgetIsTooShort(t *testing.T) {
	d := loadExample(t)
	out, err := Run(context.Background(), d, RunOptions{Budget: 1e-9, Seed: 1}, Hooks{})
	require.NoError(t, err)
	assert.Equal(t, solver.StopBudget, out.Why)
	assert.Contains(t, out.Note, "ended before the first plan")
	require.NotNil(t, out.Result.Best.Route)
	require.NoError(t, solver.CheckRoute(d.Instance, out.Result.Best.Route))
}

// TestExplainTimeKeepsToTheLeeway: the explanation gets ExplainLimit, cut
// to what is left of a budget's leeway (a tenth, at least half a second)
// less 100 ms; nothing when the search has used it up. Worked by hand.
func TestExplainTimeKeepsToTheLeeway(t *testing.T) {
	cases := []struct {
		budget, used, want time.Duration
	}{
		{time.Second, 500 * time.Millisecond, 400 * time.Millisecond},  // ExplainLimit: 0.4 s
		{time.Second, 1300 * time.Millisecond, 100 * time.Millisecond}, // 1 + 0.5 - 0.1 - 1.3
		{time.Second, 1500 * time.Millisecond, -100 * time.Millisecond},
		{10 * time.Second, 10 * time.Second, 900 * time.Millisecond}, // 10 + 1 - 0.1 - 10
		{0, time.Minute, 5 * time.Second},                            // iterations only
	}
	for _, c := range cases {
		assert.Equal(t, c.want, ExplainTime(c.budget, c.used), "budget %v used %v", c.budget, c.used)
	}
}
