package solver

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// Worked by hand: node 1's window is [0, 10], node 2's [50, 60], every
// trip 10. Node 2 cannot come before node 1 (50 + 10 > 10), so the full
// model records that precedence; halted at once it records none, which
// is valid (the search prunes less), as with tightening.
func TestPrecedencesStopWhenHalted(t *testing.T) {
	in := &Instance{N: 3, Shape: Closed, Scale: 1,
		Travel:  []int64{0, 10, 10, 10, 0, 10, 10, 10, 0},
		Service: []int64{0, 0, 0}, Early: []int64{0, 0, 50}, Late: []int64{1000, 10, 60}}
	full, err := buildModel(in, TravelTime, nil)
	require.NoError(t, err)
	assert.True(t, full.mustBefore(1, 2), "2 can never come before 1")

	halted, err := buildModel(in, TravelTime, func() bool { return true })
	require.NoError(t, err)
	assert.False(t, halted.mustBefore(1, 2))
}

// Worked by hand: every trip is 10, node 1 must start by 5 and node 2 by
// 100. The order 0 2 1 starts 1 at 20 (15 late); 0 1 2 starts it at 10
// (5 late), so the last lateness polish moves 1 forward; halted at once
// it hands the order back as it was.
func TestLastLatenessPolishStopsWhenHalted(t *testing.T) {
	in := &Instance{N: 3, Shape: Closed, Scale: 1,
		Travel:  []int64{0, 10, 10, 10, 0, 10, 10, 10, 0},
		Service: []int64{0, 0, 0}, Early: []int64{0, 0, 0}, Late: []int64{1000, 5, 100}}
	m, err := buildModel(in, TravelTime, nil)
	require.NoError(t, err)
	given := []int{0, 2, 1}
	p := minimiseLateness(m, given, TravelTime, nil)
	assert.Equal(t, []int{0, 1, 2}, p.Route)
	assert.Equal(t, int64(5), p.Schedule.TotalLateness)

	q := minimiseLateness(m, given, TravelTime, func() bool { return true })
	assert.Equal(t, []int{0, 2, 1}, q.Route)
	assert.Equal(t, int64(15), q.Schedule.TotalLateness)
	assert.Equal(t, Evaluate(in, q.Route), q.Schedule, "the plan's schedule is the evaluator's")
}
