package solver

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// shapesExample is a five-node instance with asymmetric travel, worked by
// hand below for every shape. Travel (row from, column to):
//
//	     0   1   2   3   4
//	0:   -   5   9   7  12
//	1:   6   -   4   8  10
//	2:   9   3   -   5   6
//	3:   8   9   4   -   3
//	4:  11  10   7   2   -
//
// Service 0:2 1:4 2:3 3:0 4:5; windows 0:[10,200] 1:[20,30] 2:[0,40]
// 3:[30,60] 4:[0,100]. The route leaves node 0 at its earliest, 10, after
// its own service of 2, so at 12.
func shapesExample(shape Shape) *Instance {
	return &Instance{N: 5, Shape: shape, End: 4, Scale: 1,
		Travel: []int64{
			0, 5, 9, 7, 12,
			6, 0, 4, 8, 10,
			9, 3, 0, 5, 6,
			8, 9, 4, 0, 3,
			11, 10, 7, 2, 0,
		},
		Service: []int64{2, 4, 3, 0, 5},
		Early:   []int64{10, 20, 0, 30, 0},
		Late:    []int64{200, 30, 40, 60, 100},
	}
}

// v is a visit as worked by hand: arrival, start, departure and the
// window's latest; wait, slack and lateness follow from them.
func v(node int, arr, start, dep, late int64) Visit {
	vis := Visit{Node: node, Arrival: arr, Start: start, Wait: start - arr, Departure: dep, Slack: late - start}
	if start > late {
		vis.Lateness = start - late
	}
	return vis
}

func TestEvaluateEveryShapeByHand(t *testing.T) {
	noReturn := Visit{Node: -1}
	cases := []struct {
		name   string
		in     func() *Instance
		route  []int
		visits []Visit
		ret    Visit
		// travel, completion, total lateness, late visits
		travel, completion, lateness int64
		lateVisits                   int
	}{
		{
			// 0 at 10, leaves 12; 1: 12+5=17, waits to 20, leaves 24; 2: 24+4=28,
			// leaves 31; 3: 31+5=36, leaves 36; 4: 36+3=39, leaves 44; back at
			// 0: 44+11=55. Travel 5+4+5+3+11 = 28; completion 55.
			name: "closed tour", in: func() *Instance { return shapesExample(Closed) },
			route: []int{0, 1, 2, 3, 4},
			visits: []Visit{v(0, 10, 10, 12, 200), v(1, 17, 20, 24, 30), v(2, 28, 28, 31, 40),
				v(3, 36, 36, 36, 60), v(4, 39, 39, 44, 100)},
			ret:    Visit{Node: 0, Arrival: 55, Start: 55, Departure: 55, Slack: 200 - 55},
			travel: 28, completion: 55,
		},
		{
			// The same tour with the return due by 50: back at 55, 5 late.
			name: "closed tour, late return", in: func() *Instance { in := shapesExample(Closed); in.Late[0] = 50; return in },
			route: []int{0, 1, 2, 3, 4},
			visits: []Visit{v(0, 10, 10, 12, 50), v(1, 17, 20, 24, 30), v(2, 28, 28, 31, 40),
				v(3, 36, 36, 36, 60), v(4, 39, 39, 44, 100)},
			ret:    Visit{Node: 0, Arrival: 55, Start: 55, Departure: 55, Slack: -5, Lateness: 5},
			travel: 28, completion: 55, lateness: 5, lateVisits: 1,
		},
		{
			// Open, free end: the same order without the return. Travel
			// 5+4+5+3 = 17; the route ends when 4 is served, at 44.
			name: "open, free end", in: func() *Instance { return shapesExample(OpenFree) },
			route: []int{0, 1, 2, 3, 4},
			visits: []Visit{v(0, 10, 10, 12, 200), v(1, 17, 20, 24, 30), v(2, 28, 28, 31, 40),
				v(3, 36, 36, 36, 60), v(4, 39, 39, 44, 100)},
			ret:    noReturn,
			travel: 17, completion: 44,
		},
		{
			// Open, fixed end 4: 0 leaves 12; 2: 12+9=21, leaves 24; 1: 24+3=27,
			// leaves 31; 3: 31+8=39, leaves 39; 4: 39+3=42, leaves 47. Travel
			// 9+3+8+3 = 23; completion 47.
			name: "open, fixed end", in: func() *Instance { return shapesExample(OpenFixed) },
			route:  []int{0, 2, 1, 3, 4},
			visits: []Visit{v(0, 10, 10, 12, 200), v(2, 21, 21, 24, 40), v(1, 27, 27, 31, 30), v(3, 39, 39, 39, 60), v(4, 42, 42, 47, 100)},
			ret:    noReturn,
			travel: 23, completion: 47,
		},
		{
			// Lateness carries on: 3: 12+7=19, waits to 30; 2: 30+4=34, leaves
			// 37; 1: 37+3=40, 10 after its latest 30, leaves 44; 4: 44+10=54,
			// leaves 59. Travel 7+4+3+10 = 24.
			name: "open, fixed end, a late visit", in: func() *Instance { return shapesExample(OpenFixed) },
			route:  []int{0, 3, 2, 1, 4},
			visits: []Visit{v(0, 10, 10, 12, 200), v(3, 19, 30, 30, 60), v(2, 34, 34, 37, 40), v(1, 40, 40, 44, 30), v(4, 54, 54, 59, 100)},
			ret:    noReturn,
			travel: 24, completion: 59, lateness: 10, lateVisits: 1,
		},
		{
			// Node 3 pinned first: 3: 12+7=19, waits to 30; 4: 30+3=33, leaves
			// 38; 2: 38+7=45, 5 late (latest 40), leaves 48; 1: 48+3=51, 21
			// late, leaves 55; back 55+6=61. Travel 7+3+7+3+6 = 26; lateness
			// 5+21 = 26.
			name: "closed tour with a pin", in: func() *Instance {
				in := shapesExample(Closed)
				in.Position = []int{0, 0, 0, 1, 0}
				return in
			},
			route:  []int{0, 3, 4, 2, 1},
			visits: []Visit{v(0, 10, 10, 12, 200), v(3, 19, 30, 30, 60), v(4, 33, 33, 38, 100), v(2, 45, 45, 48, 40), v(1, 51, 51, 55, 30)},
			ret:    Visit{Node: 0, Arrival: 61, Start: 61, Departure: 61, Slack: 200 - 61},
			travel: 26, completion: 61, lateness: 26, lateVisits: 2,
		},
		{
			// Done visits 0, 2 kept as the route's prefix: 2: 12+9=21, leaves
			// 24; 1: 24+3=27, leaves 31; 3: 31+8=39; 4: 39+3=42, leaves 47; back
			// 47+11=58. Travel 9+3+8+3+11 = 34.
			name: "closed tour after done visits", in: func() *Instance {
				in := shapesExample(Closed)
				in.Fixed = []int{0, 2}
				return in
			},
			route:  []int{0, 2, 1, 3, 4},
			visits: []Visit{v(0, 10, 10, 12, 200), v(2, 21, 21, 24, 40), v(1, 27, 27, 31, 30), v(3, 39, 39, 39, 60), v(4, 42, 42, 47, 100)},
			ret:    Visit{Node: 0, Arrival: 58, Start: 58, Departure: 58, Slack: 200 - 58},
			travel: 34, completion: 58,
		},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			in := c.in()
			require.NoError(t, in.Validate())
			require.NoError(t, CheckRoute(in, c.route))
			s := Evaluate(in, c.route)
			assert.Equal(t, c.visits, s.Visits)
			assert.Equal(t, c.ret, s.Return)
			assert.Equal(t, c.travel, s.Travel, "travel")
			assert.Equal(t, c.completion, s.Completion, "completion")
			assert.Equal(t, c.lateness, s.TotalLateness, "total lateness")
			assert.Equal(t, c.lateVisits, s.LateVisits, "late visits")
			assert.Equal(t, c.lateness == 0, s.Feasible)
			// The two objectives: travel, or when the route ends (waiting
			// counted).
			assert.Equal(t, c.travel, s.Cost(TravelTime))
			assert.Equal(t, c.completion, s.Cost(CompletionTime))
		})
	}
}

// TestCheckRouteRefusesEachShapeRule: the orders CheckRoute must refuse,
// one per rule of the shapes above.
func TestCheckRouteRefusesEachShapeRule(t *testing.T) {
	fixed := shapesExample(OpenFixed)
	pinned := shapesExample(Closed)
	pinned.Position = []int{0, 0, 0, 1, 0}
	done := shapesExample(Closed)
	done.Fixed = []int{0, 2}
	cases := []struct {
		name  string
		in    *Instance
		route []int
		want  string
	}{
		{"fixed end elsewhere", fixed, []int{0, 4, 1, 2, 3}, "route ends at 3, want the end 4"},
		{"pin broken", pinned, []int{0, 1, 2, 3, 4}, "3 is pinned to position 1 but is at 3"},
		{"done visits reordered", done, []int{0, 1, 2, 3, 4}, "route position 1 is 1, but the done visits fix 2 there"},
		{"not from the start", shapesExample(OpenFree), []int{1, 0, 2, 3, 4}, "route starts at 1, want the start 0"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			assert.EqualError(t, CheckRoute(c.in, c.route), c.want)
		})
	}
}
