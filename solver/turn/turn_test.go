package turn

import (
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
)

// TestStepReportsEveryThousandSteps checks the rhythm callers rely on to
// check their context: true once per checkEvery steps, never in between.
func TestStepReportsEveryThousandSteps(t *testing.T) {
	var p Pacer
	trues := 0
	for i := 1; i <= 5*checkEvery; i++ {
		if p.Step() {
			trues++
			assert.Zero(t, i%checkEvery, "step %d", i)
		}
	}
	assert.Equal(t, 5, trues)
}

// TestNativeNeverCallsHost checks that a native build pays nothing: the
// host hook is never called, however long the work.
func TestNativeNeverCallsHost(t *testing.T) {
	if Enabled {
		t.Skip("GOOS=js")
	}
	old := Host
	defer func() { Host = old }()
	calls := 0
	Host = func() { calls++ }
	var p Pacer
	for i := 0; i < 100*checkEvery; i++ {
		p.Step()
	}
	Due()
	Give()
	assert.Zero(t, calls)
}

// TestAddCountsWeightedSteps: a step worth k counts as k steps.
func TestAddCountsWeightedSteps(t *testing.T) {
	var p Pacer
	assert.False(t, p.Add(checkEvery-1))
	assert.True(t, p.Add(1))
	assert.True(t, p.Add(5*checkEvery), "one big step is due at once")
	assert.False(t, p.Step())
}

// Now stays in order with time.Now (by the monotonic clock, as deadlines
// compare), in either build: read between two readings of time.Now, it
// falls between them.
func TestNowIsInOrderWithTimeNow(t *testing.T) {
	for i := 0; i < 1000; i++ {
		a := time.Now()
		n := Now()
		b := time.Now()
		assert.False(t, n.Before(a), "Now before an earlier time.Now")
		assert.False(t, b.Before(n), "Now after a later time.Now")
		assert.False(t, n.Sub(a) < 0)
	}
}
