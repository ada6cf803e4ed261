package solver

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// A worked example by hand: three sites plus a depot, closed tour 0-1-2-3-0.
//
//	depot 0 window [0,100]; site 1 [10,20] service 5; site 2 [0,30] service 2;
//	site 3 [40,50] service 0. Travel 0→1 4, 1→2 6, 2→3 3, 3→0 7.
//
// Leave 0 at 0, reach 1 at 4, wait 6, serve 10-15; reach 2 at 21, serve
// 21-23; reach 3 at 26, wait 14, serve 40; back at 47. Travel 4+6+3+7=20.
func handExample() *Instance {
	n := 4
	t := make([]int64, n*n)
	set := func(i, j int, v int64) { t[i*n+j] = v }
	set(0, 1, 4)
	set(1, 2, 6)
	set(2, 3, 3)
	set(3, 0, 7)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			if i != j && t[i*n+j] == 0 {
				t[i*n+j] = 50
			}
		}
	}
	return &Instance{N: n, Travel: t, Scale: 1,
		Service: []int64{0, 5, 2, 0},
		Early:   []int64{0, 10, 0, 40},
		Late:    []int64{100, 20, 30, 50}}
}

func TestEvaluateHandExample(t *testing.T) {
	in := handExample()
	require.NoError(t, in.Validate())
	s := Evaluate(in, []int{0, 1, 2, 3})
	require.True(t, s.Feasible)
	assert.Equal(t, int64(20), s.Travel)
	assert.Equal(t, int64(47), s.Completion)
	want := []Visit{
		{Node: 0, Arrival: 0, Start: 0, Departure: 0, Slack: 100},
		{Node: 1, Arrival: 4, Start: 10, Wait: 6, Departure: 15, Slack: 10},
		{Node: 2, Arrival: 21, Start: 21, Departure: 23, Slack: 9},
		{Node: 3, Arrival: 26, Start: 40, Wait: 14, Departure: 40, Slack: 10},
	}
	assert.Equal(t, want, s.Visits)
	assert.Equal(t, int64(47), s.Return.Arrival)
}

func TestEvaluateLateness(t *testing.T) {
	in := handExample()
	// 0-2-1-3: reach 2 at 50, serve 50-52 (late 20); reach 1 at 102 (late 82) ...
	s := Evaluate(in, []int{0, 2, 1, 3})
	require.False(t, s.Feasible)
	assert.Equal(t, int64(20), s.Visits[1].Lateness)
	assert.Equal(t, int64(82), s.Visits[2].Lateness)
	assert.Greater(t, s.LateVisits, 1)
}

func TestCheckRouteRejects(t *testing.T) {
	in := handExample()
	assert.Error(t, CheckRoute(in, []int{0, 1, 2}))
	assert.Error(t, CheckRoute(in, []int{1, 0, 2, 3}))
	assert.Error(t, CheckRoute(in, []int{0, 1, 1, 3}))
	assert.NoError(t, CheckRoute(in, []int{0, 3, 2, 1}))
}
