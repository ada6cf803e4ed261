package bound

import (
	"context"
	"math/rand"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"visitline/solver"
)

// TestPrepOfALargeDayStopsWhenTheBudgetIsGone: on a day over largeN nodes
// whose budget is already over, preprocessing builds no quadratic table
// (the prob is marked cut) and the bound side gives no bound rather than
// running on; a small day is prepared as before.
func TestPrepOfALargeDayStopsWhenTheBudgetIsGone(t *testing.T) {
	rng := rand.New(rand.NewSource(3))
	over, cancel := context.WithCancel(context.Background())
	cancel()

	big := randomInstance(rng, largeN+30, 200, solver.Closed)
	p := newProbCtx(over, big)
	assert.True(t, p.cut)
	assert.Nil(t, p.succ, "no successor lists were built")
	b := runPhases(over, over, big, Options{}, true)
	assert.False(t, b.Valid)
	assert.Contains(t, b.Notes, "the budget ended before preprocessing did: no bound")

	small := randomInstance(rng, 10, 200, solver.Closed)
	q := newProbCtx(over, small)
	assert.False(t, q.cut)
	live := newProbCtx(context.Background(), big)
	assert.False(t, live.cut)
	require.Len(t, live.succ, big.N)
}

// TestNGSetsStopWhenCancelled: with the context over, every neighbourhood
// is the node alone (a weaker but valid relaxation); with time left they
// hold the nearest nodes as asked.
func TestNGSetsStopWhenCancelled(t *testing.T) {
	rng := rand.New(rand.NewSource(4))
	in := randomInstance(rng, 40, 5000, solver.Closed)
	p := newProb(in)
	full := newNGSets(p, 6, 6)
	longer := 0
	for i := 0; i < in.N; i++ {
		require.Equal(t, int32(i), full.list[i][0])
		if len(full.list[i]) > 1 {
			longer++
		}
	}
	assert.Equal(t, in.N, longer, "with time left every node has neighbours")

	over, cancel := context.WithCancel(context.Background())
	cancel()
	p.ctx = over
	cut := newNGSets(p, 6, 6)
	for i := 0; i < in.N; i++ {
		assert.Equal(t, []int32{int32(i)}, cut.list[i], "node %d", i)
	}
}

// countingCtx counts the looks at its Err, and is never done.
type countingCtx struct {
	context.Context
	looks int
}

func (c *countingCtx) Err() error { c.looks++; return nil }

// TestPrepLooksAtTheClockEveryRowOfALargeDay: on a large day a row of the
// quadratic passes is thousands of arcs, and the preprocessing must notice
// the end of its time (and, in the browser, give the host its turn) after
// each row, not after a thousand rows: at 5,000 sites a thousand rows were
// a quarter of a second of WebAssembly with the page's stop waiting.
func TestPrepLooksAtTheClockEveryRowOfALargeDay(t *testing.T) {
	rng := rand.New(rand.NewSource(5))
	in := randomInstance(rng, 1100, 400, solver.Closed)
	ctx := &countingCtx{Context: context.Background()}
	newProbCtx(ctx, in)
	// Each tightening pass scans every row three times.
	assert.GreaterOrEqual(t, ctx.looks, 3*in.N, "one look per row at least")
}
