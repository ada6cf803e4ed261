package bound

import (
	"context"
	"testing"

	"github.com/stretchr/testify/require"
)

// TestBoundsBelowBestKnown covers a sample of every family of the shared
// collection: the bounds (with label limits instead of a clock, so that the
// test is deterministic) never exceed the best-known value, and where the
// exact search proves a route optimal its cost equals the published optimum.
// Each check names its source: best-known.csv and the paper in its
// bound_from column.
func TestBoundsBelowBestKnown(t *testing.T) {
	all := loadKnown(t)
	perFamily := map[string]int{}
	proven := 0
	for _, k := range all {
		in := loadBench(t, k)
		if in.N > 45 || perFamily[k.family] >= 4 {
			continue
		}
		perFamily[k.family]++
		o := Options{Iterations: 40, StageLabels: 1 << 13, HistoryLabels: 1 << 20}
		b := Exact(context.Background(), in, o)
		src := "best-known.csv: " + k.source
		require.True(t, b.Valid, "%s/%s: a bound", k.family, k.instance)
		require.False(t, b.Infeasible, "%s/%s is feasible (%s)", k.family, k.instance, src)
		require.LessOrEqual(t, in.InputUnits(b.Value), k.best+0.01, "%s/%s: bound by %s above best-known (%s)", k.family, k.instance, b.Method, src)
		if b.HasAssignment {
			require.LessOrEqual(t, in.InputUnits(b.Assignment), k.best+0.01, "%s/%s: assignment bound (%s)", k.family, k.instance, src)
		}
		if b.HasStateSpace {
			require.LessOrEqual(t, in.InputUnits(b.StateSpace), k.best+0.01, "%s/%s: state-space bound (%s)", k.family, k.instance, src)
		}
		require.NotNil(t, b.Route, "%s/%s: a feasible route", k.family, k.instance)
		require.GreaterOrEqual(t, in.InputUnits(b.Cost), k.best-0.01, "%s/%s: a route below best-known would be news (%s)", k.family, k.instance, src)
		if b.ProvenOptimal {
			proven++
			require.InDelta(t, k.best, in.InputUnits(b.Cost), 0.011, "%s/%s: proven optimum (%s)", k.family, k.instance, src)
		}
	}
	// Families of large instances only (OhlmannThomas, 151–201 nodes): the
	// first instance, with a coarse relaxation and no exact search.
	for _, k := range all {
		if perFamily[k.family] > 0 {
			continue
		}
		perFamily[k.family]++
		in := loadBench(t, k)
		b := Lower(context.Background(), in, Options{Iterations: 6, StateLabels: 2})
		src := "best-known.csv: " + k.source
		require.True(t, b.Valid, "%s/%s: a bound", k.family, k.instance)
		require.LessOrEqual(t, in.InputUnits(b.Value), k.best+0.01, "%s/%s: bound by %s above best-known (%s)", k.family, k.instance, b.Method, src)
	}
	require.Len(t, perFamily, 6, "every family sampled")
	require.GreaterOrEqual(t, proven, 12, "most small instances are proven optimal")
}
