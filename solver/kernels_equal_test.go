package solver

import (
	"math/rand"
	"sort"
	"testing"

	"github.com/stretchr/testify/require"
)

// randomSeg is a summary with fields of either sign and any order of e and
// l, so that every branch of join's max and min is taken.
func randomSeg(rng *rand.Rand) seg {
	f := func() int64 { return rng.Int63n(2001) - 500 }
	return seg{d: f(), tw: rng.Int63n(50) * rng.Int63n(2), e: f(), l: f(), c: f()}
}

// joinPair, joinTriple, joinInto and valueOf give what the chains of join
// and value give, field for field.
func TestFusedJoinsAreJoin(t *testing.T) {
	rng := rand.New(rand.NewSource(11))
	for _, obj := range []Objective{TravelTime, CompletionTime} {
		m := &model{obj: obj, startAt: 37}
		for trial := 0; trial < 20000; trial++ {
			a, b, c, z := randomSeg(rng), randomSeg(rng), randomSeg(rng), randomSeg(rng)
			t1, t2, t3 := rng.Int63n(300), rng.Int63n(300), rng.Int63n(300)
			lam := rng.Float64() * 100

			want := join(join(a, b, t1), c, t2)
			d, tw, cost := joinPair(&a, &b, &c, t1, t2)
			require.Equal(t, [3]int64{want.d, want.tw, want.c}, [3]int64{d, tw, cost}, "pair, trial %d", trial)
			require.Equal(t, m.value(want, lam), m.valueOf(d, tw, cost, lam), "pair value, trial %d", trial)

			want = join(join(join(a, b, t1), c, t2), z, t3)
			d, tw, cost = joinTriple(&a, &b, &c, &z, t1, t2, t3)
			require.Equal(t, [3]int64{want.d, want.tw, want.c}, [3]int64{d, tw, cost}, "triple, trial %d", trial)
			require.Equal(t, m.value(want, lam), m.valueOf(d, tw, cost, lam), "triple value, trial %d", trial)

			want = join(a, b, t1)
			d, tw, cost = joinLast(&a, &b, t1)
			require.Equal(t, [3]int64{want.d, want.tw, want.c}, [3]int64{d, tw, cost}, "last, trial %d", trial)

			var r seg
			joinInto(&r, &a, &b, t1)
			require.Equal(t, join(a, b, t1), r, "into, trial %d", trial)
			r = a
			joinInto(&r, &r, &b, t1) // r aliases the first part
			require.Equal(t, join(a, b, t1), r, "into a, trial %d", trial)
			r = b
			joinInto(&r, &a, &r, t1) // r aliases the second part
			require.Equal(t, join(a, b, t1), r, "into b, trial %d", trial)
		}
	}
}

// The route's forward and backward summaries, kept by forward and backward
// in five locals, equal the chains of join from scratch, for closed tours,
// open paths and both objectives, after set, setShifted and setSpan.
func TestForwardBackwardAreJoin(t *testing.T) {
	rng := rand.New(rand.NewSource(12))
	check := func(x *route, what string) {
		m := x.m
		k := len(x.r)
		f := m.unit(int(x.r[0]))
		require.Equal(t, f, x.fwd[0], what)
		for i := 1; i < k; i++ {
			f = join(f, m.unit(int(x.r[i])), m.arc(x.r[i-1], x.r[i]))
			require.Equal(t, f, x.fwd[i], "%s: fwd[%d]", what, i)
		}
		b := m.unit(int(x.r[k-1]))
		require.Equal(t, b, x.bwd[k-1], what)
		for i := k - 2; i >= 0; i-- {
			b = join(m.unit(int(x.r[i])), b, m.arc(x.r[i], x.r[i+1]))
			require.Equal(t, b, x.bwd[i], "%s: bwd[%d]", what, i)
		}
	}
	for _, shape := range []Shape{Closed, OpenFree} {
		for _, obj := range []Objective{TravelTime, CompletionTime} {
			in := randomInstance(rng, 25, 40, shape)
			m, err := newModel(in, obj)
			require.NoError(t, err)
			for trial := 0; trial < 100; trial++ {
				order := []int32{int32(m.start)}
				for _, v := range rng.Perm(len(m.movable)) {
					order = append(order, int32(m.movable[v]))
				}
				order = append(order, int32(m.end))
				x := newRoute(m, order)
				check(x, "set")
				// Reverse a stretch (as 2-opt does), then remove a run.
				i := 1 + rng.Intn(len(order)-2)
				j := i + rng.Intn(len(order)-1-i)
				next := append([]int32(nil), order...)
				for a, c := i, j; a < c; a, c = a+1, c-1 {
					next[a], next[c] = next[c], next[a]
				}
				x.setSpan(next, i, j)
				check(x, "setSpan")
				var got seg
				x.segInto(&got, i, j)
				require.Equal(t, x.segOf(i, j), got, "segInto %d..%d", i, j)
				x.revInto(&got, i, j)
				require.Equal(t, x.revOf(i, j), got, "revInto %d..%d", i, j)
				// One node pushed at either end of any summary, the end
				// node (whose unit is kept apart) included.
				for _, v := range []int32{x.r[i], x.r[len(x.r)-1]} {
					r0, tt := randomSeg(rng), rng.Int63n(100)
					got = r0
					m.pushBack(&got, v, tt)
					require.Equal(t, join(r0, m.unit(int(v)), tt), got, "pushBack %d", v)
					got = r0
					m.pushFront(&got, v, tt)
					require.Equal(t, join(m.unit(int(v)), r0, tt), got, "pushFront %d", v)
					m.setUnit(&got, v)
					require.Equal(t, m.unit(int(v)), got, "setUnit %d", v)
					require.Equal(t, m.value(r0, 3.5), m.valueAt(&r0, 3.5))
				}
				short := append(append([]int32(nil), next[:i]...), next[j+1:]...)
				x.setShifted(short, i, len(next)-1-j)
				check(x, "setShifted")
			}
			// The end's unit may carry travel and warp (a fixed tail of
			// visits folded into it): every field must come through.
			m.endSeg = randomSeg(rng)
			end := int32(m.end)
			for trial := 0; trial < 50; trial++ {
				r0, tt := randomSeg(rng), rng.Int63n(100)
				got := r0
				m.pushBack(&got, end, tt)
				require.Equal(t, join(r0, m.endSeg, tt), got)
				got = r0
				m.pushFront(&got, end, tt)
				require.Equal(t, join(m.endSeg, r0, tt), got)
				m.setUnit(&got, end)
				require.Equal(t, m.endSeg, got)
			}
		}
	}
}

// pickBiased leaves the candidates in the order sort.Slice gave them
// before (key, then visit), ties in the key included.
func TestPickBiasedOrdersAsBefore(t *testing.T) {
	rng := rand.New(rand.NewSource(13))
	s := &search{rng: rand.New(rand.NewSource(1))}
	for trial := 0; trial < 200; trial++ {
		var cs []ranked
		for _, v := range rng.Perm(40) {
			cs = append(cs, ranked{int32(v), float64(rng.Intn(8))})
		}
		want := append([]ranked(nil), cs...)
		sort.Slice(want, func(a, b int) bool {
			return want[a].key < want[b].key || want[a].key == want[b].key && want[a].v < want[b].v
		})
		s.removed = s.removed[:0]
		s.pickBiased(cs, 5, 3)
		require.Equal(t, want, cs, "trial %d", trial)
		require.Len(t, s.removed, 5)
	}
}
