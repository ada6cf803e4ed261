package solver

import (
	"math/rand"
	"testing"

	"github.com/stretchr/testify/require"
)

// JoinSeg and join are the same algebra: equal on random summaries, with
// and without time warp.
func TestJoinSegIsJoin(t *testing.T) {
	rng := rand.New(rand.NewSource(1))
	r := func() int64 { return rng.Int63n(2000) - 500 }
	for k := 0; k < 10000; k++ {
		a := seg{d: rng.Int63n(300), tw: rng.Int63n(3) * rng.Int63n(50), e: r(), c: rng.Int63n(500)}
		a.l = a.e + rng.Int63n(400) - 50
		b := seg{d: rng.Int63n(300), tw: rng.Int63n(3) * rng.Int63n(50), e: r(), c: rng.Int63n(500)}
		b.l = b.e + rng.Int63n(400) - 50
		tt := rng.Int63n(200)
		want := join(a, b, tt)
		got := JoinSeg(Seg{a.d, a.tw, a.e, a.l, a.c}, Seg{b.d, b.tw, b.e, b.l, b.c}, tt)
		require.Equal(t, Seg{want.d, want.tw, want.e, want.l, want.c}, got, "case %d", k)
	}
}
