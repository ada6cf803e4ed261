package fleet

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"visitline/solver"
)

// handDay is worked by hand in the tests below: depot 0, visits 1 and 2;
// travel 0–1 10, 0–2 20, 1–2 5 (both ways); service 3 and 4; windows
// [30, 40] and [20, 60]; demands 2 and 3; one vehicle, shift [0, 100],
// capacity 5.
func handDay() *Problem {
	return &Problem{Name: "hand", N: 3, Scale: 1,
		Travel:  []int64{0, 10, 20, 10, 0, 5, 20, 5, 0},
		Service: []int64{0, 3, 4}, Early: []int64{0, 30, 20}, Late: []int64{100, 40, 60}, Demand: []int64{0, 2, 3},
		Vehicles: []Vehicle{{ID: "A", Start: 0, End: 0, ShiftStart: 0, ShiftEnd: 100, Capacity: 5, MaxDuration: NoLimit}}}
}

func TestEvaluateWorkedExample(t *testing.T) {
	p := handDay()
	rep, err := Evaluate(p, Plan{Routes: [][]int{{1, 2}}})
	require.NoError(t, err)
	require.True(t, rep.Feasible, rep.Problems)
	r := rep.Routes[0]
	// Leaving at 0: at 1 at 10, wait to 30, leave 33; at 2 at 38, leave
	// 42; back at 62. Travel 10 + 5 + 20 = 35.
	assert.Equal(t, int64(35), r.Travel)
	assert.Equal(t, int64(62), r.Completion)
	assert.Equal(t, int64(5), r.Load)
	// Latest begin: 2 starts by min(60, 100 − 20 − 4) = 60, 1 by
	// min(40, 60 − 5 − 3) = 40, so leave at 40 − 10 = 30: at 1 at 40, at 2
	// at 48, leave 52, back at 72; the day is 72 − 30 = 42.
	assert.Equal(t, int64(30), r.Begin)
	assert.Equal(t, int64(42), r.Duration)
	require.Len(t, r.Stops, 2)
	assert.Equal(t, solver.Visit{Node: 1, Arrival: 40, Start: 40, Departure: 43, Slack: 0}, r.Stops[0])
	assert.Equal(t, solver.Visit{Node: 2, Arrival: 48, Start: 48, Departure: 52, Slack: 12}, r.Stops[1])
	assert.Equal(t, int64(72), r.End.Arrival)
	assert.Equal(t, 1, rep.VehiclesUsed)
	assert.Equal(t, Value{Unserved: 0, Vehicles: 1, Cost: 35}, rep.Value(solver.TravelTime))
	assert.Equal(t, Value{Unserved: 0, Vehicles: 1, Cost: 62}, rep.Value(solver.CompletionTime))
}

func TestEvaluateBreaches(t *testing.T) {
	cases := []struct {
		name   string
		change func(p *Problem)
		want   string
	}{
		{"capacity", func(p *Problem) { p.Vehicles[0].Capacity = 4 }, "load 5 is over the capacity 4"},
		{"longest day", func(p *Problem) { p.Vehicles[0].MaxDuration = 41 }, "working day 42 is over the longest day 41"},
		{"shift end", func(p *Problem) { p.Vehicles[0].ShiftEnd = 60 }, "ends 2 after the shift end"},
		{"window", func(p *Problem) { p.Vehicles[0].ShiftStart = 35 }, "1 starts 5 after its latest"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := handDay()
			c.change(p)
			rep, err := Evaluate(p, Plan{Routes: [][]int{{1, 2}}})
			require.NoError(t, err)
			assert.False(t, rep.Feasible)
			assert.Contains(t, rep.Problems, "vehicle A: "+c.want)
		})
	}
}

func TestEvaluateFreeEnd(t *testing.T) {
	p := handDay()
	p.Vehicles[0].End = FreeEnd
	rep, err := Evaluate(p, Plan{Routes: [][]int{{1, 2}}})
	require.NoError(t, err)
	require.True(t, rep.Feasible)
	// No way back: travel 15; the day ends leaving 2, at 42 when leaving
	// at 0; latest begin 30 (2 by 60, 1 by 40), day 52 − 30 = 22.
	assert.Equal(t, int64(15), rep.Routes[0].Travel)
	assert.Equal(t, int64(42), rep.Routes[0].Completion)
	assert.Equal(t, int64(22), rep.Routes[0].Duration)
}

func TestEvaluateRefusesNonPlans(t *testing.T) {
	cases := []struct {
		name string
		plan Plan
		want string
	}{
		{"twice", Plan{Routes: [][]int{{1, 2, 1}}}, "1 is served twice"},
		{"missing", Plan{Routes: [][]int{{1}}}, "2 is neither served nor listed unserved"},
		{"served and unserved", Plan{Routes: [][]int{{1, 2}}, Unserved: []int{2}}, "both served and unserved"},
		{"depot", Plan{Routes: [][]int{{0, 1, 2}}}, "a vehicle's start or end"},
		{"routes", Plan{Routes: [][]int{{1}, {2}}}, "want one per vehicle"},
		{"out of range", Plan{Routes: [][]int{{1, 2, 7}}}, "outside 0..2"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := Evaluate(handDay(), c.plan)
			require.Error(t, err)
			assert.Contains(t, err.Error(), c.want)
		})
	}
}

func TestReasons(t *testing.T) {
	p := handDay()
	// 3: demand 9 over the capacity 5. 4: window [0, 5], 20 away.
	// 5: reachable in its window, but 90 away: no way back by 100.
	// 6: fits alone, but not with 1 and 2 (capacity).
	p.N = 7
	tr := make([]int64, 49)
	far := []int64{0, 10, 20, 1, 20, 90, 1}
	for i := 0; i < 7; i++ {
		for j := 0; j < 7; j++ {
			switch {
			case i == j:
			case i < 3 && j < 3:
				tr[i*7+j] = handDay().Travel[i*3+j]
			default:
				tr[i*7+j] = far[i] + far[j]
			}
		}
	}
	p.Travel = tr
	p.Service = append(p.Service, 0, 0, 0, 0)
	p.Early = append(p.Early, 0, 0, 0, 0)
	p.Late = append(p.Late, 100, 5, 100, 100)
	p.Demand = append(p.Demand, 9, 0, 0, 1)
	got := Reasons(p, []int{3, 4, 5, 6})
	assert.Equal(t, []Reason{Capacity, Window, Shift, NoRoom}, got)
}
