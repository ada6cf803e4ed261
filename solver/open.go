package solver

import (
	"context"
	"math"
	"math/rand"

	"visitline/solver/turn"
)

// Open days: when no window can bind on any order (every visit on time
// whatever the order, and none ever waits), the day is a travelling
// salesman path from the start to the end, and the cost of a plan is its
// travel plus a constant. The search then works on the order alone, with
// moves judged by their travel in constant time:
//
//   - candidate lists, the k nearest other nodes of each node (granular
//     neighbourhoods, Toth and Vigo, INFORMS J. on Computing 15(4), 2003):
//     a move is tried only when it creates an arc to a candidate, and only
//     while that arc is shorter than the one it replaces (the gain
//     criterion of Lin and Kernighan, Operations Research 21(2), 1973);
//   - 2-opt (reverse a stretch; on asymmetric travel the reversed stretch's
//     travel comes from prefix sums of the backward arcs, so it stays exact)
//     and or-opt (move a stretch of 1 to 3 visits, also reversed, next to a
//     candidate), first improvement, with a queue of nodes whose
//     surroundings changed ("don't look bits", Bentley, ORSA J. on
//     Computing 4(4), 1992);
//   - iterated local search: a double bridge on a short stretch of the
//     route (swap two neighbouring stretches: it reverses nothing, so it
//     is as good on asymmetric travel), the local search around the four
//     arcs it changed, and the result kept when it is no worse (Martin,
//     Otto and Felten, Complex Systems 5(3), 1991; Johnson and McGeoch
//     1997 for the segment-local kick).
//
// Every plan handed out is a model route judged again by the segment
// summaries and by Evaluate, as on any other day.

// openK is the length of the candidate lists.
const openK = 10

// openMin is the fewest movable visits for which an open day is searched
// as one (smaller days take the general search, which is exact on them).
const openMin = 8

// windowsFree reports whether no window can bind on any order: every
// visit can start at its arrival whatever the order (its own earliest is
// not after the start's departure), and the latest start of every node is
// beyond the latest any route can reach (the start's time plus, per node,
// its service and its longest arc out).
func (m *model) windowsFree() bool {
	if m.infeas || len(m.suffix) > 0 || len(m.movable) == 0 {
		return false
	}
	n := m.n
	targets := append(append([]int(nil), m.movable...), m.end)
	reach := m.startAt
	for _, i := range append([]int{m.start}, m.movable...) {
		turn.Due()
		var out int64
		for _, j := range targets {
			if j != i {
				out = max(out, m.tk(i*n+j))
			}
		}
		reach += m.s[i] + out
		if reach > Horizon {
			return false
		}
	}
	for _, v := range targets {
		if m.origE[v] > m.startAt || m.l[v] < reach || m.origL[v] < reach {
			return false
		}
	}
	return true
}

// openTour is a route of an open day with what its moves need.
type openTour struct {
	m     *model
	n     int
	t32   []int32 // the model's travel: one of the two is set
	t64   []int64
	r     []int32 // start ... end (the sentinel)
	pos   []int32 // position of each node of the route in r
	sym   bool
	pot   []int64 // potentials when travel is asymmetric only by them (see newOpenTour)
	sums  bool    // fw and bw are kept: asymmetric travel without potentials
	fw    []int64 // fw[k]: travel of r[0..k] forward (asymmetric travel only)
	bw    []int64 // bw[k]: travel of r[k], r[k-1], ..., r[0] (asymmetric only)
	cost  int64   // travel of r
	cand  [][]int32
	candW [][]int64 // candW[a][x] = w(a, cand[a][x])
	// freeEnd: the end is a sentinel without a place (an open path that
	// ends anywhere): every arc into it is free.
	freeEnd bool

	queue []int32
	inQ   []bool
	lo    int // positions changed since the last mark
	hi    int
	buf   []int32
	moves int
}

func (o *openTour) d(a, b int32) int64 {
	k := int(a)*o.n + int(b)
	if o.t32 != nil {
		return int64(o.t32[k])
	}
	return o.t64[k]
}

func newOpenTour(m *model) *openTour {
	o := &openTour{m: m, n: m.n, t32: m.t32, t64: m.t64, pos: make([]int32, m.n), inQ: make([]bool, m.n)}
	o.freeEnd = m.in.Shape == OpenFree && len(m.suffix) == 0
	nodes := append(append([]int{m.start}, m.movable...), m.end)
	o.sym = true
	for _, i := range m.movable {
		for _, j := range m.movable {
			if j > i && m.tk(i*m.n+j) != m.tk(j*m.n+i) {
				o.sym = false
				break
			}
		}
		if !o.sym {
			break
		}
	}
	if !o.sym && len(m.movable) > 0 {
		// Asymmetric only by a potential per node (t(i,j) − t(j,i) =
		// p(i) − p(j), as when each visit's service is folded into the
		// arcs out of it): a reversed stretch then differs from itself by
		// p(last) − p(first), with no sums to keep.
		v0 := m.movable[0]
		pot := make([]int64, m.n)
		for _, i := range m.movable {
			pot[i] = m.tk(i*m.n+v0) - m.tk(v0*m.n+i)
		}
		ok := true
		for _, i := range m.movable {
			for _, j := range m.movable {
				if j > i && m.tk(i*m.n+j)-m.tk(j*m.n+i) != pot[i]-pot[j] {
					ok = false
					break
				}
			}
			if !ok {
				break
			}
		}
		if ok {
			o.pot = pot
		}
	}
	o.sums = !o.sym && o.pot == nil
	o.cand = make([][]int32, m.n)
	o.candW = make([][]int64, m.n)
	k := min(openK, len(nodes)-1)
	type nb struct {
		v int32
		w int64
	}
	best := make([]nb, 0, k+1)
	for _, i := range nodes {
		turn.Due()
		best = best[:0]
		for _, j := range nodes {
			if j == i || o.freeEnd && (j == m.end || i == m.end) {
				continue
			}
			w := min(m.tk(i*m.n+j), m.tk(j*m.n+i))
			if len(best) == k && w >= best[k-1].w {
				continue
			}
			// Insertion into the sorted list; ties by node number.
			p := len(best)
			if p < k {
				best = append(best, nb{})
			} else {
				p = k - 1
			}
			for p > 0 && best[p-1].w > w {
				best[p] = best[p-1]
				p--
			}
			best[p] = nb{int32(j), w}
		}
		c := make([]int32, len(best))
		cw := make([]int64, len(best))
		for x, b := range best {
			c[x], cw[x] = b.v, b.w
		}
		o.cand[i], o.candW[i] = c, cw
	}
	return o
}

// set takes a route order and recomputes positions, sums and cost.
func (o *openTour) set(r []int32) {
	o.r = append(o.r[:0], r...)
	if o.sums {
		o.fw = make([]int64, len(r))
		o.bw = make([]int64, len(r))
	}
	o.lo, o.hi = 0, len(r)-1
	o.refresh(0, len(r)-1)
	o.cost = 0
	for k := 1; k < len(r); k++ {
		o.cost += o.d(r[k-1], r[k])
	}
}

// refresh brings positions of r[lo..hi] and the prefix sums from lo on up
// to date after r changed there.
func (o *openTour) refresh(lo, hi int) {
	for k := lo; k <= hi; k++ {
		o.pos[o.r[k]] = int32(k)
	}
	o.lo, o.hi = min(o.lo, lo), max(o.hi, hi)
	if !o.sums {
		return
	}
	r := o.r
	for k := max(lo, 1); k < len(r); k++ {
		o.fw[k] = o.fw[k-1] + o.d(r[k-1], r[k])
		o.bw[k] = o.bw[k-1] + o.d(r[k], r[k-1])
	}
}

func (o *openTour) push(v int32) {
	if !o.inQ[v] {
		o.inQ[v] = true
		o.queue = append(o.queue, v)
	}
}

func (o *openTour) pushAt(p int) {
	if p >= 0 && p < len(o.r) {
		o.push(o.r[p])
	}
}

// revDelta is the change of travel when r[x..y] is reversed, 1 ≤ x < y ≤ len-2.
func (o *openTour) revDelta(x, y int) int64 {
	r := o.r
	a, b, c, d := r[x-1], r[x], r[y], r[y+1]
	delta := o.d(a, c) + o.d(b, d) - o.d(a, b) - o.d(c, d)
	switch {
	case o.pot != nil:
		delta += o.pot[c] - o.pot[b]
	case o.sums:
		delta += (o.bw[y] - o.bw[x]) - (o.fw[y] - o.fw[x])
	}
	return delta
}

func (o *openTour) reverse(x, y int, delta int64) {
	r := o.r
	for a, b := x, y; a < b; a, b = a+1, b-1 {
		r[a], r[b] = r[b], r[a]
	}
	o.cost += delta
	o.refresh(x, y)
	o.pushAt(x - 1)
	o.pushAt(x)
	o.pushAt(y)
	o.pushAt(y + 1)
	o.moves++
}

// inner is the travel inside r[x..y], forward or reversed (short stretches).
func (o *openTour) inner(x, y int, rev bool) int64 {
	var s int64
	for k := x; k < y; k++ {
		if rev {
			s += o.d(o.r[k+1], o.r[k])
		} else {
			s += o.d(o.r[k], o.r[k+1])
		}
	}
	return s
}

// moveDelta is the change of travel when r[x..y] moves between r[k] and
// r[k+1] (k < x-1 or k > y), reversed if rev.
func (o *openTour) moveDelta(x, y, k int, rev bool) int64 {
	r := o.r
	p, q := r[k], r[k+1]
	first, last := r[x], r[y]
	if rev {
		first, last = last, first
	}
	delta := o.d(r[x-1], r[y+1]) - o.d(r[x-1], r[x]) - o.d(r[y], r[y+1]) - o.d(p, q) + o.d(p, first) + o.d(last, q)
	if rev && x < y {
		delta += o.inner(x, y, true) - o.inner(x, y, false)
	}
	return delta
}

func (o *openTour) move(x, y, k int, rev bool, delta int64) {
	r := o.r
	L := y - x + 1
	seg := append(o.buf[:0], r[x:y+1]...)
	if rev {
		for a, b := 0, L-1; a < b; a, b = a+1, b-1 {
			seg[a], seg[b] = seg[b], seg[a]
		}
	}
	o.buf = seg
	var lo, hi int
	if k > y {
		copy(r[x:], r[y+1:k+1])
		copy(r[k-L+1:], seg)
		lo, hi = x, k
	} else {
		copy(r[k+1+L:], r[k+1:x])
		copy(r[k+1:], seg)
		lo, hi = k+1, y
	}
	o.cost += delta
	o.refresh(lo, hi)
	o.pushAt(lo - 1)
	o.pushAt(lo)
	o.pushAt(hi)
	o.pushAt(hi + 1)
	if k > y {
		o.pushAt(k - L)
		o.pushAt(k - L + 1)
	} else {
		o.pushAt(k + L)
		o.pushAt(k + L + 1)
	}
	o.moves++
}

// improve tries the moves that put a next to one of its candidates and
// makes the first that lowers the travel.
func (o *openTour) improve(a int32) bool {
	last := len(o.r) - 2 // last movable position
	pa := int(o.pos[a])
	var gSucc, gPred int64 = -1, -1 // the arcs a 2-opt or or-opt step would cut at a
	if pa <= last {
		gSucc = o.d(a, o.r[pa+1])
	}
	if pa >= 1 {
		gPred = o.d(o.r[pa-1], a)
	}
	cw := o.candW[a]
	for x, c := range o.cand[a] {
		w := cw[x]
		if w >= gSucc && w >= gPred {
			break
		}
		pc := int(o.pos[c])
		// 2-opt: a new arc between a and c, cutting the arc after both
		// (succ) or before both (pred).
		u, v := pa, pc
		uSucc := w < gSucc
		uPred := w < gPred
		if pc < pa {
			u, v = pc, pa
		}
		if uSucc {
			if x, y := u+1, v; x >= 1 && y <= last && x < y {
				if d := o.revDelta(x, y); d < 0 {
					o.reverse(x, y, d)
					return true
				}
			}
		}
		if uPred {
			if x, y := u, v-1; x >= 1 && y <= last && x < y {
				if d := o.revDelta(x, y); d < 0 {
					o.reverse(x, y, d)
					return true
				}
			}
		}
		// Or-opt: a stretch of L visits with a at one end moves next to c.
		for L := 1; L <= 3; L++ {
			// a first: r[pa..pa+L-1]; the arc before a is cut.
			if x, y := pa, pa+L-1; (uPred || L == 1 && uSucc) && x >= 1 && y <= last {
				if pc < x || pc > y {
					// after c, forward (c, a, ...)
					if k := pc; pc <= last && (k < x-1 || k > y) {
						if d := o.moveDelta(x, y, k, false); d < 0 {
							o.move(x, y, k, false, d)
							return true
						}
					}
					// before c, reversed (..., a, c)
					if k := pc - 1; pc >= 1 && (k < x-1 || k > y) {
						if d := o.moveDelta(x, y, k, true); d < 0 {
							o.move(x, y, k, true, d)
							return true
						}
					}
				}
			}
			// a last: r[pa-L+1..pa]; the arc after a is cut.
			if x, y := pa-L+1, pa; uSucc && L > 1 && x >= 1 && y <= last {
				if pc < x || pc > y {
					if k := pc - 1; pc >= 1 && (k < x-1 || k > y) {
						if d := o.moveDelta(x, y, k, false); d < 0 {
							o.move(x, y, k, false, d)
							return true
						}
					}
					if k := pc; pc <= last && (k < x-1 || k > y) {
						if d := o.moveDelta(x, y, k, true); d < 0 {
							o.move(x, y, k, true, d)
							return true
						}
					}
				}
			}
		}
	}
	if o.segSwap(a, pa, last) {
		return true
	}
	if o.freeEnd && pa >= 1 && pa <= last-1 {
		// An open path's end is free: make the stretch after a run to the end
		// reversed (a's successor side becomes the last visit).
		if pa+1 < last {
			if d := o.revDelta(pa+1, last); d < 0 {
				o.reverse(pa+1, last, d)
				return true
			}
		}
	}
	return false
}

// swapDelta is the change of travel when the neighbouring stretches
// r[i+1..j] and r[j+1..k] trade places (0 ≤ i < j < k ≤ len-2).
func (o *openTour) swapDelta(i, j, k int) int64 {
	r := o.r
	return o.d(r[i], r[j+1]) + o.d(r[k], r[i+1]) + o.d(r[j], r[k+1]) -
		o.d(r[i], r[i+1]) - o.d(r[j], r[j+1]) - o.d(r[k], r[k+1])
}

// segSwap tries the or-3opt move (two neighbouring stretches of any length
// trade places; nothing is reversed, so it is exact on asymmetric travel)
// that gives a a candidate as its new successor, with the second new arc
// into a's old successor from one of its candidates.
func (o *openTour) segSwap(a int32, pa, last int) bool {
	if pa > last {
		return false
	}
	b := o.r[pa+1]
	g := o.d(a, b)
	// a ends the first part: r[pa+1..j] and r[j+1..k] trade places, and
	// a → r[j+1] = c, r[k] = e → b.
	cw := o.candW[a]
	for x, c := range o.cand[a] {
		if cw[x] >= g {
			break
		}
		pc := int(o.pos[c])
		g1 := g - o.d(a, c)
		if pc >= pa+2 && pc <= last {
			j := pc - 1
			g2 := g1 + o.d(o.r[j], c)
			ew := o.candW[b]
			for y, e := range o.cand[b] {
				if ew[y] >= g2 {
					break
				}
				if k := int(o.pos[e]); k >= pc && k <= last {
					if d := o.swapDelta(pa, j, k); d < 0 {
						o.kick(pa, j, k)
						o.moves++
						return true
					}
				}
			}
		}
		// a ends the second part: r[i+1..j] and r[j+1..pa] trade places,
		// with r[i+1] = c, so a → c, and r[j] = e → b.
		if pc >= 1 && pc <= pa-1 {
			i := pc - 1
			g2 := g1 + o.d(o.r[i], c)
			ew := o.candW[b]
			for y, e := range o.cand[b] {
				if ew[y] >= g2 {
					break
				}
				if j := int(o.pos[e]); j >= pc && j <= pa-1 {
					if d := o.swapDelta(i, j, pa); d < 0 {
						o.kick(i, j, pa)
						o.moves++
						return true
					}
				}
			}
		}
	}
	return false
}

// search runs the local search until the queue is empty or halt says stop.
func (o *openTour) search(halt func() bool) {
	var pace turn.Pacer
	for len(o.queue) > 0 {
		if pace.Step() && halt != nil && halt() {
			return
		}
		// Last in, first out: the nodes a move just woke come first.
		a := o.queue[len(o.queue)-1]
		o.queue = o.queue[:len(o.queue)-1]
		o.inQ[a] = false
		for o.improve(a) {
		}
	}
}

func (o *openTour) pushAll() {
	for _, v := range o.r {
		o.push(v)
	}
}

// kick swaps the neighbouring stretches r[i+1..j] and r[j+1..k] (a double
// bridge) and wakes the ends of the four arcs it changed.
func (o *openTour) kick(i, j, k int) {
	r := o.r
	delta := o.d(r[i], r[j+1]) + o.d(r[k], r[i+1]) + o.d(r[j], r[k+1]) -
		o.d(r[i], r[i+1]) - o.d(r[j], r[j+1]) - o.d(r[k], r[k+1])
	tmp := append(o.buf[:0], r[i+1:j+1]...)
	copy(r[i+1:], r[j+1:k+1])
	copy(r[i+1+k-j:], tmp)
	o.buf = tmp
	o.cost += delta
	o.refresh(i+1, k)
	for _, p := range []int{i, i + 1, i + k - j, i + k - j + 1, k, k + 1} {
		o.pushAt(p)
	}
}

// nearestOrder builds a route by nearest neighbour through the candidate
// lists (a full scan when every candidate is taken).
func (o *openTour) nearestOrder() []int32 {
	m := o.m
	used := make([]bool, m.n)
	r := make([]int32, 0, len(m.movable)+2)
	cur := int32(m.start)
	r = append(r, cur)
	for len(r) <= len(m.movable) {
		turn.Due()
		next := int32(-1)
		var bd int64
		for _, c := range o.cand[cur] {
			if m.isMov[c] && !used[c] && (next < 0 || o.d(cur, c) < bd) {
				next, bd = c, o.d(cur, c)
			}
		}
		if next < 0 {
			for _, v := range m.movable {
				if !used[v] && (next < 0 || o.d(cur, int32(v)) < bd) {
					next, bd = int32(v), o.d(cur, int32(v))
				}
			}
		}
		used[next] = true
		r = append(r, next)
		cur = next
	}
	return append(r, int32(m.end))
}

// openSearch is a worker's whole run on an open day: nearest neighbour and
// the local search, then iterated local search until the engine stops.
func (s *search) openSearch(ctx context.Context, e *engine) {
	m := s.m
	o := newOpenTour(m)
	halt := func() bool { return e.interrupted(ctx) }
	o.set(o.nearestOrder())
	// Construction counts as an iteration, so that every budget holds.
	if goOn, _ := e.tick(ctx); !goOn {
		e.offer(newRoute(m, o.r), "construct")
		return
	}
	o.pushAll()
	o.search(halt)
	e.offer(newRoute(m, o.r), "construct")
	o.improveByKicks(ctx, e, s.rng, halt)
}

// improveByKicks is the iterated local search. A kick that leaves the
// route worse is undone; after a long run without a new best, kicks that
// make it a little worse are taken now and then (a warm spell, in the
// manner of simulated annealing), and when that finds nothing either the
// search goes back to the best route.
func (o *openTour) improveByKicks(ctx context.Context, e *engine, rng *rand.Rand, halt func() bool) {
	m := o.m
	snap := append([]int32(nil), o.r...)
	bestR := append([]int32(nil), o.r...)
	cur, best := o.cost, o.cost
	// The engine ranks routes by the model's cost, which differs from the
	// travel by a constant on an open day.
	offset := m.cost(newRoute(m, o.r).total()) - o.cost
	pending := false
	moves := len(o.r) - 2
	span := min(50, max(1, moves/3))
	stallAfter := max(2000, 5*moves)
	stall := 0
	for it := 1; moves >= openMin; it++ {
		if goOn, _ := e.tick(ctx); !goOn {
			break
		}
		// Three cut points within a short stretch of the route.
		l1, l2 := 1+rng.Intn(span), 1+rng.Intn(span)
		if l1+l2 > moves-1 {
			l1, l2 = 1, 1
		}
		i := rng.Intn(moves - l1 - l2 + 1) // r[i] stays; r[i+1..] moves
		j, k := i+l1, i+l1+l2
		o.lo, o.hi = len(o.r), -1
		o.kick(i, j, k)
		o.search(halt)
		accept := o.cost <= cur
		if !accept && stall >= stallAfter {
			// Warm: a route worse by a tenth of a mean arc passes with
			// probability 1/e.
			temp := 0.1 * float64(cur) / float64(moves+1)
			accept = rng.Float64() < math.Exp(-float64(o.cost-cur)/temp)
		}
		if accept {
			if o.hi >= o.lo {
				copy(snap[o.lo:o.hi+1], o.r[o.lo:o.hi+1])
			}
			cur = o.cost
		} else {
			lo, hi := o.lo, o.hi
			copy(o.r[lo:hi+1], snap[lo:hi+1])
			for _, v := range o.queue {
				o.inQ[v] = false
			}
			o.queue = o.queue[:0]
			o.refresh(lo, hi)
			o.cost = cur
		}
		stall++
		if cur < best {
			best, stall, pending = cur, 0, true
			copy(bestR, o.r)
		} else if stall >= 2*stallAfter {
			// The warm spell found nothing: back to the best.
			o.set(bestR)
			copy(snap, bestR)
			cur, stall = best, 0
		}
		if it&63 == 0 {
			if pending {
				e.offer(newRoute(m, bestR), "local search")
				pending = false
			}
			// Another worker's better route replaces this one.
			if r := e.sharedBest(0, best+offset); r != nil {
				o.set(r)
				copy(snap, o.r)
				copy(bestR, o.r)
				cur, best, stall = o.cost, o.cost, 0
			}
		}
	}
	if pending {
		e.offer(newRoute(m, bestR), "local search")
	}
}
