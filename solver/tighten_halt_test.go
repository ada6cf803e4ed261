package solver

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// A day of three nodes, every window [0, 100], every trip 10 minutes:
// worked by hand, no visit can start before 10 (the earliest arrival from
// any predecessor is 0 + 0 + 10), so full tightening moves both earliest
// starts to 10. A halt that says stop at once leaves the windows as given,
// which is still valid, only less tight.
func TestTighteningStopsWhenHalted(t *testing.T) {
	in := &Instance{N: 3, Shape: Closed, Scale: 1,
		Travel:  []int64{0, 10, 10, 10, 0, 10, 10, 10, 0},
		Service: []int64{0, 0, 0}, Early: []int64{0, 0, 0}, Late: []int64{100, 100, 100}}
	full, err := buildModel(in, TravelTime, nil)
	require.NoError(t, err)
	assert.Equal(t, int64(10), full.e[1])
	assert.Equal(t, int64(10), full.e[2])

	halted, err := buildModel(in, TravelTime, func() bool { return true })
	require.NoError(t, err)
	assert.Equal(t, int64(0), halted.e[1])
	assert.Equal(t, int64(0), halted.e[2])
	assert.False(t, halted.infeas)
}
