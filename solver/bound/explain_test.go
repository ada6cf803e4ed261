package bound

import (
	"context"
	"fmt"
	"math/rand"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"visitline/solver"
)

// hand builds an instance from a travel function and windows; node 0 is the
// depot "S" and the others are named by ids.
func hand(ids []string, shape solver.Shape, travel func(i, j int) int64, early, late []int64) *solver.Instance {
	n := len(ids)
	in := &solver.Instance{Name: "hand", N: n, Scale: 1, Shape: shape, IDs: ids,
		Travel: make([]int64, n*n), Service: make([]int64, n), Early: early, Late: late}
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			if i != j {
				in.Travel[i*n+j] = travel(i, j)
			}
		}
	}
	return in
}

func TestExplainTwoTightWindows(t *testing.T) {
	// Depot S leaves at 0. A and B both open [10, 12]; S is 10 from each and
	// A, B are 5 apart. Whichever is served first starts at 10, the other is
	// reached at 15 > 12: {A, B} is infeasible, and each alone is fine. C and
	// D have open windows and are 10 from everything. Widening either
	// window by 15 − 12 = 3 fixes the day; so does leaving out A (or B).
	travel := func(i, j int) int64 {
		if i+j == 3 && (i == 1 || i == 2) {
			return 5
		}
		return 10
	}
	in := hand([]string{"S", "A", "B", "C", "D"}, solver.Closed, travel,
		[]int64{0, 10, 10, 0, 0}, []int64{1000, 12, 12, 1000, 1000})
	ex, err := Explain(context.Background(), in)
	require.NoError(t, err)
	assert.ElementsMatch(t, []int{1, 2}, ex.Conflict)
	assert.True(t, ex.Minimal)
	assert.Equal(t, int64(3), ex.WidenBy)
	assert.True(t, ex.WidenExact)
	assert.Contains(t, []int{1, 2}, ex.Widen)
	assert.Contains(t, []int{1, 2}, ex.Drop)
	assert.Contains(t, ex.Reason, "A [10, 12]")
	assert.Contains(t, ex.Reason, "B [10, 12]")
	assert.Contains(t, ex.Reason, "later by 3")
	checkConflictByEnumeration(t, in, ex)
}

func TestExplainThreeWayConflict(t *testing.T) {
	// A, B, C open [10, 20], 10 from the depot and 6 from each other. Any
	// two fit (10 and 16), all three do not: the third is reached at 22 > 20.
	// So no pair is infeasible and the conflict is all three; the least
	// widening is 22 − 20 = 2, and dropping any one of them fixes the day.
	travel := func(i, j int) int64 {
		if i > 0 && j > 0 && i < 4 && j < 4 {
			return 6
		}
		return 10
	}
	in := hand([]string{"S", "A", "B", "C", "D"}, solver.OpenFree, travel,
		[]int64{0, 10, 10, 10, 0}, []int64{1000, 20, 20, 20, 1000})
	ex, err := Explain(context.Background(), in)
	require.NoError(t, err)
	assert.ElementsMatch(t, []int{1, 2, 3}, ex.Conflict)
	assert.True(t, ex.Minimal)
	assert.Equal(t, int64(2), ex.WidenBy)
	assert.NotEqual(t, -1, ex.Drop)
	checkConflictByEnumeration(t, in, ex)
}

func TestExplainUnreachableAlone(t *testing.T) {
	// A closes at 5 but is 10 from the depot: A alone is the conflict, and
	// the least widening is 10 − 5 = 5. The route must end at E.
	in := hand([]string{"S", "A", "B", "E"}, solver.OpenFixed, func(i, j int) int64 { return 10 },
		[]int64{0, 0, 0, 0}, []int64{100, 5, 100, 100})
	in.End = 3
	ex, err := Explain(context.Background(), in)
	require.NoError(t, err)
	assert.Equal(t, []int{1}, ex.Conflict)
	assert.Equal(t, int64(5), ex.WidenBy)
	assert.Equal(t, 1, ex.Drop)
	assert.Contains(t, ex.Reason, "ending at E")
	checkConflictByEnumeration(t, in, ex)
}

// A window bound is "open" only when it is absent (solver.OpenEnd), as in
// every other output: large times a user wrote, here past half the
// horizon, are written as numbers, and the return by the depot's close is
// named.
func TestExplainLargeTimesAreNotOpen(t *testing.T) {
	h := solver.Horizon / 2
	in := hand([]string{"S", "A", "B"}, solver.Closed, func(i, j int) int64 { return 10 },
		[]int64{h, h, h}, []int64{h + 1000, h + 5, h + 1000})
	ex, err := Explain(context.Background(), in)
	require.NoError(t, err)
	assert.Equal(t, []int{1}, ex.Conflict)
	assert.NotContains(t, ex.Reason, "open", ex.Reason)
	assert.Contains(t, ex.Reason, fmt.Sprintf("A [%d, %d]", h, h+5), ex.Reason)
	assert.Contains(t, ex.Reason, fmt.Sprintf("returning by %d", h+1000), ex.Reason)
	checkConflictByEnumeration(t, in, ex)
}

func TestExplainFeasibleDay(t *testing.T) {
	in := hand([]string{"S", "A"}, solver.Closed, func(i, j int) int64 { return 1 }, []int64{0, 0}, []int64{10, 10})
	_, err := Explain(context.Background(), in)
	require.ErrorIs(t, err, ErrFeasible)
}

func TestExplainOnlyPins(t *testing.T) {
	// A [0, 15] and B [0, 100], 10 from each other and from S: A then B is
	// fine, but B is pinned first, so A is reached at 20 > 15. Without the
	// pin the day is feasible: the pins are the cause.
	in := hand([]string{"S", "A", "B"}, solver.OpenFree, func(i, j int) int64 { return 10 },
		[]int64{0, 0, 0}, []int64{100, 15, 100})
	in.Position = []int{0, 0, 1}
	ex, err := Explain(context.Background(), in)
	require.NoError(t, err)
	assert.True(t, ex.Pins)
	assert.Equal(t, []int{2}, ex.Conflict)
	assert.Contains(t, ex.Reason, "pinned")
}

func TestExplainRandomInfeasibleDays(t *testing.T) {
	// Random infeasible days of 7–10 nodes: the conflict is infeasible, each
	// set one smaller is feasible, the widening works and (when exact) one
	// unit less does not, and dropping the named visit works, all checked by
	// exhaustive enumeration.
	rng := rand.New(rand.NewSource(5))
	done := 0
	for c := 0; c < 200 && done < 25; c++ {
		in := randomInstance(rng, 7+c%4, []int64{10, 30, 60}[c%3], shapes[c%3])
		if _, _, ok := Enumerate(in, solver.TravelTime); ok {
			continue
		}
		done++
		ex, err := Explain(context.Background(), in)
		require.NoError(t, err, "case %d", c)
		require.True(t, ex.Minimal, "case %d", c)
		checkConflictByEnumeration(t, in, ex)
	}
	require.Equal(t, 25, done, "enough infeasible random days")
}

// checkConflictByEnumeration checks an explanation with Enumerate alone.
func checkConflictByEnumeration(t *testing.T, in *solver.Instance, ex Explanation) {
	t.Helper()
	frame, _ := splitFrame(in)
	feasible := func(x *solver.Instance) bool {
		_, _, ok := Enumerate(x, solver.TravelTime)
		return ok
	}
	name := fmt.Sprintf("conflict %v", ex.ConflictIDs)
	require.False(t, feasible(subInstance(in, frame, ex.Conflict)), "%s must be infeasible", name)
	for k := range ex.Conflict {
		rest := append(append([]int(nil), ex.Conflict[:k]...), ex.Conflict[k+1:]...)
		require.True(t, feasible(subInstance(in, frame, rest)), "%s without %s must be feasible", name, in.ID(ex.Conflict[k]))
	}
	if ex.Widen >= 0 {
		w := in.Clone()
		w.Late[ex.Widen] += ex.WidenBy
		require.True(t, feasible(w), "%s: widening %s by %d", name, in.ID(ex.Widen), ex.WidenBy)
		if ex.WidenExact && ex.WidenBy > 0 {
			w.Late[ex.Widen]--
			require.False(t, feasible(w), "%s: widening %s by one less", name, in.ID(ex.Widen))
		}
	}
	if ex.Drop >= 0 {
		_, cands := splitFrame(in)
		var rest []int
		for _, v := range cands {
			if v != ex.Drop {
				rest = append(rest, v)
			}
		}
		require.True(t, feasible(subInstance(in, frame, rest)), "%s: dropping %s", name, in.ID(ex.Drop))
	}
	require.NotEmpty(t, ex.Reason)
}

func TestExplainWithWritesTimesAndNamesTheCallersWay(t *testing.T) {
	// The day of TestExplainTwoTightWindows, with times written as clock
	// minutes and sites by name.
	travel := func(i, j int) int64 {
		if i+j == 3 && (i == 1 || i == 2) {
			return 5
		}
		return 10
	}
	in := hand([]string{"S", "A", "B"}, solver.Closed, travel, []int64{480, 490, 490}, []int64{1000, 492, 492})
	names := []string{"Depot", "Bakery", "Café"}
	clock := func(v int64) string { return fmt.Sprintf("%02d:%02d", v/60, v%60) }
	ex, err := ExplainWith(context.Background(), in, ExplainOptions{FormatTime: clock,
		FormatDuration: func(v int64) string { return fmt.Sprint(v, " min") }, Name: func(i int) string { return names[i] }})
	require.NoError(t, err)
	assert.Equal(t, []string{"A", "B"}, ex.ConflictIDs)
	assert.Contains(t, ex.Reason, "Bakery [08:10, 08:12]")
	assert.Contains(t, ex.Reason, "leaving the start Depot at 08:00")
	assert.Contains(t, ex.Reason, "later by 3 min")
}
