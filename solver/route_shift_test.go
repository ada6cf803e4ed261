package solver

import (
	"math/rand"
	"testing"

	"github.com/stretchr/testify/require"
)

// setShifted after a removal or an insertion leaves the same summaries as
// recomputing them all with set.
func TestSetShiftedEqualsSet(t *testing.T) {
	rng := rand.New(rand.NewSource(4))
	in := randomInstance(rng, 30, 60, Closed)
	m, err := newModel(in, TravelTime)
	require.NoError(t, err)
	for trial := 0; trial < 300; trial++ {
		order := []int32{int32(m.start)}
		for _, v := range rng.Perm(len(m.movable)) {
			order = append(order, int32(m.movable[v]))
		}
		order = append(order, int32(m.end))
		x := newRoute(m, order)
		var next []int32
		var lo, tail int
		if trial%2 == 0 { // remove a run of visits and a few others after it
			a := 1 + rng.Intn(len(order)-2)
			b := a + rng.Intn(len(order)-1-a)
			next = append(append([]int32(nil), order[:a]...), order[b+1:]...)
			lo, tail = a, len(order)-1-b
		} else { // insert a removed visit back at a random place
			v := order[len(order)-2]
			short := append(append([]int32(nil), order[:len(order)-2]...), order[len(order)-1])
			x = newRoute(m, short)
			p := rng.Intn(len(short) - 1)
			next = append(append(append([]int32(nil), short[:p+1]...), v), short[p+1:]...)
			lo, tail = p+1, len(short)-p-1
		}
		want := newRoute(m, next)
		x.setShifted(next, lo, tail)
		require.Equal(t, want.r, x.r, "trial %d", trial)
		require.Equal(t, want.fwd, x.fwd, "trial %d", trial)
		require.Equal(t, want.bwd, x.bwd, "trial %d", trial)
	}
}

// permInto draws what rand.Perm draws and leaves the generator where
// rand.Perm leaves it.
func TestPermIntoIsPerm(t *testing.T) {
	var buf []int
	for seed := int64(1); seed <= 20; seed++ {
		a, b := rand.New(rand.NewSource(seed)), rand.New(rand.NewSource(seed))
		for _, n := range []int{0, 1, 2, 7, 50} {
			buf = permInto(b, buf, n)
			require.Equal(t, a.Perm(n), append([]int{}, buf...), "seed %d n %d", seed, n)
		}
		require.Equal(t, a.Int63(), b.Int63(), "seed %d", seed)
	}
}
