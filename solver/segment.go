package solver

// seg summarises a stretch of a route so that two stretches can be joined,
// and a move judged, in constant time (Kindervater and Savelsbergh 1997;
// with time warp as in Vidal, Crainic, Gendreau, Prins, Computers & OR 40(1),
// 2013). Time warp is how far a schedule has to travel back in time to meet
// every latest start: 0 means the stretch is feasible.
type seg struct {
	d  int64 // duration: travel, service and waiting, warp excluded
	tw int64 // total time warp
	e  int64 // earliest start of service at the first node without waiting inside
	l  int64 // latest start at the first node without adding time warp
	c  int64 // travel cost: sum of arcs
}

// join concatenates a and b with the arc travel t from a's last node to b's first.
// It is kept small enough for the compiler to inline: it is the engine's
// innermost step.
func join(a, b seg, t int64) seg {
	dl := a.d - a.tw + t
	wt := max(b.e-dl-a.l, 0)
	tw := max(a.e+dl-b.l, 0)
	a.d += b.d + t + wt
	a.e = max(b.e-dl, a.e) - wt
	a.l = min(b.l-dl, a.l) + tw
	a.tw += b.tw + tw
	a.c += b.c + t
	return a
}

// The search judges a move by joining three or four summaries and reading
// the cost and the time warp of the result. joinPair and joinTriple do that
// with the arithmetic of join, line for line, on summaries passed by
// pointer: no copies of the 40-byte summaries in and out of calls, and no
// earliest and latest start for the last join, which nothing reads. In
// WebAssembly, whose stack lives in linear memory, each call of join with
// its copies costs several times what it does natively.
// TestJoinPairTriple holds them equal to the chains of join.

// joinPair is join(join(a, b, t1), c, t2) less its earliest and latest
// start: the duration, the time warp and the travel.
func joinPair(a, b, c *seg, t1, t2 int64) (d, tw, cost int64) {
	dl := a.d - a.tw + t1
	wt := max(b.e-dl-a.l, 0)
	w := max(a.e+dl-b.l, 0)
	d = a.d + b.d + t1 + wt
	tw = a.tw + b.tw + w
	e := max(b.e-dl, a.e) - wt
	l := min(b.l-dl, a.l) + w
	cost = a.c + b.c + t1
	dl = d - tw + t2
	wt = max(c.e-dl-l, 0)
	w = max(e+dl-c.l, 0)
	return d + c.d + t2 + wt, tw + c.tw + w, cost + c.c + t2
}

// joinTriple is join(join(join(a, b, t1), c, t2), z, t3) less its earliest
// and latest start.
func joinTriple(a, b, c, z *seg, t1, t2, t3 int64) (d, tw, cost int64) {
	dl := a.d - a.tw + t1
	wt := max(b.e-dl-a.l, 0)
	w := max(a.e+dl-b.l, 0)
	d = a.d + b.d + t1 + wt
	tw = a.tw + b.tw + w
	e := max(b.e-dl, a.e) - wt
	l := min(b.l-dl, a.l) + w
	cost = a.c + b.c + t1
	dl = d - tw + t2
	wt = max(c.e-dl-l, 0)
	w = max(e+dl-c.l, 0)
	d += c.d + t2 + wt
	tw += c.tw + w
	e = max(c.e-dl, e) - wt
	l = min(c.l-dl, l) + w
	cost += c.c + t2
	dl = d - tw + t3
	wt = max(z.e-dl-l, 0)
	w = max(e+dl-z.l, 0)
	return d + z.d + t3 + wt, tw + z.tw + w, cost + z.c + t3
}

// joinLast is join(*a, *b, t) less its earliest and latest start.
func joinLast(a, b *seg, t int64) (d, tw, cost int64) {
	dl := a.d - a.tw + t
	wt := max(b.e-dl-a.l, 0)
	w := max(a.e+dl-b.l, 0)
	return a.d + b.d + t + wt, a.tw + b.tw + w, a.c + b.c + t
}

// joinInto sets *r to join(*a, *b, t); r may be a or b. It stores field by
// field: Go's WebAssembly code copies a whole summary with memory.copy, a
// call out of the compiled code, where natively it is two or three moves.
func joinInto(r, a, b *seg, t int64) {
	dl := a.d - a.tw + t
	wt := max(b.e-dl-a.l, 0)
	w := max(a.e+dl-b.l, 0)
	d, tw, e, l, c := a.d+b.d+t+wt, a.tw+b.tw+w, max(b.e-dl, a.e)-wt, min(b.l-dl, a.l)+w, a.c+b.c+t
	r.d, r.tw, r.e, r.l, r.c = d, tw, e, l, c
}

// pushBack sets *r to join(*r, unit(v), t): r grown by one node at its end.
func (m *model) pushBack(r *seg, v int32, t int64) {
	ud, utw, ue, ul, uc := m.unitOf(v)
	dl := r.d - r.tw + t
	wt := max(ue-dl-r.l, 0)
	w := max(r.e+dl-ul, 0)
	d, tw, e, l, c := r.d+ud+t+wt, r.tw+utw+w, max(ue-dl, r.e)-wt, min(ul-dl, r.l)+w, r.c+uc+t
	r.d, r.tw, r.e, r.l, r.c = d, tw, e, l, c
}

// pushFront sets *r to join(unit(v), *r, t): r grown by one node in front.
func (m *model) pushFront(r *seg, v int32, t int64) {
	ud, utw, ue, ul, uc := m.unitOf(v)
	dl := ud - utw + t
	wt := max(r.e-dl-ul, 0)
	w := max(ue+dl-r.l, 0)
	d, tw, e, l, c := ud+r.d+t+wt, utw+r.tw+w, max(r.e-dl, ue)-wt, min(r.l-dl, ul)+w, uc+r.c+t
	r.d, r.tw, r.e, r.l, r.c = d, tw, e, l, c
}

// setUnit sets *r to unit(v), field by field.
func (m *model) setUnit(r *seg, v int32) {
	r.d, r.tw, r.e, r.l, r.c = m.unitOf(v)
}

// unitOf is unit(v) as its five fields.
func (m *model) unitOf(v int32) (d, tw, e, l, c int64) {
	if int(v) == m.end {
		u := &m.endSeg
		return u.d, u.tw, u.e, u.l, u.c
	}
	return m.s[v], 0, m.e[v], m.l[v], 0
}

// valueAt is value(*s, lam) without copying *s.
func (m *model) valueAt(s *seg, lam float64) float64 {
	return m.valueOf(s.d, s.tw, s.c, lam)
}

// valueOf is value for a summary given by its duration, time warp and
// travel (the parts that cost reads).
func (m *model) valueOf(d, tw, c int64, lam float64) float64 {
	if m.obj == CompletionTime {
		return float64(m.startAt+d) + lam*float64(tw)
	}
	return float64(c) + lam*float64(tw)
}
