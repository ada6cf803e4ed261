package turn

import (
	"testing"

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
