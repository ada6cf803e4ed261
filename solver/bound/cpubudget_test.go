package bound

import (
	"context"
	"sync/atomic"
	"testing"
	"time"

	"github.com/stretchr/testify/require"
)

// TestCPUBudgetFollowsItsClock: the context ends once its clock (here a
// counter the test moves) has advanced by the budget, not before; its
// deadline is the time left on that clock, so shares of it (shareOf) are
// shares of the clock's time.
func TestCPUBudgetFollowsItsClock(t *testing.T) {
	var now atomic.Int64
	clock := func() time.Duration { return time.Duration(now.Load()) }
	now.Store(int64(5 * time.Second))
	ctx, cancel := WithCPUBudget(context.Background(), 2*time.Hour, clock)
	defer cancel()
	dl, ok := ctx.Deadline()
	require.True(t, ok)
	require.Greater(t, time.Until(dl), 119*time.Minute, "two hours left on the clock")
	now.Add(int64(90 * time.Minute))
	dl, _ = ctx.Deadline()
	require.Less(t, time.Until(dl), 31*time.Minute, "half an hour left once the clock has moved on")
	require.NoError(t, ctx.Err(), "the wall clock has not moved much: still running")

	// A share of it ends at its own part of the clock's time.
	sub, cancelSub := shareOf(ctx, 0.5)
	defer cancelSub()
	now.Add(int64(16 * time.Minute)) // past half of the 30 minutes left
	select {
	case <-sub.Done():
	case <-time.After(time.Minute):
		t.Fatal("the share did not end")
	}
	require.NoError(t, ctx.Err(), "the whole budget is not used up yet")
	now.Add(int64(15 * time.Minute))
	select {
	case <-ctx.Done():
	case <-time.After(time.Minute):
		t.Fatal("the budget did not end")
	}
}
