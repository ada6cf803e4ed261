package solver

// route is a model route r[0] = start ... r[len-1] = sentinel with its prefix
// and suffix summaries: fwd[i] covers r[0..i], bwd[i] covers r[i..].
type route struct {
	m        *model
	r        []int32
	fwd, bwd []seg
}

func newRoute(m *model, r []int32) *route {
	x := &route{m: m}
	x.set(r)
	return x
}

// set replaces the order and recomputes the summaries.
func (x *route) set(r []int32) {
	x.r = append(x.r[:0], r...)
	x.rebuild()
}

func (x *route) rebuild() {
	k := len(x.r)
	if cap(x.fwd) < k {
		x.fwd = make([]seg, k, 2*k)
		x.bwd = make([]seg, k, 2*k)
	}
	x.fwd, x.bwd = x.fwd[:k], x.bwd[:k]
	m := x.m
	x.fwd[0] = m.unit(int(x.r[0]))
	x.forward(1)
	x.bwd[k-1] = m.unit(int(x.r[k-1]))
	x.backward(k - 2)
}

// forward recomputes the forward summaries from position lo (at least 1)
// to the end, each the join of the one before and its node's unit. The
// running summary is kept in five locals rather than read back from the
// slice: the arithmetic is join's, line for line (TestForwardBackward
// holds them equal).
func (x *route) forward(lo int) {
	r, f := x.r, x.fwd[:len(x.r)]
	if lo < 1 || lo >= len(r) {
		return
	}
	m := x.m
	a := &f[lo-1]
	d, tw, e, l, c := a.d, a.tw, a.e, a.l, a.c
	prev := r[lo-1]
	for i := lo; i < len(r); i++ {
		v := r[i]
		ud, utw, ue, ul, uc := m.unitOf(v)
		t := m.arc(prev, v)
		dl := d - tw + t
		wt := max(ue-dl-l, 0)
		w := max(e+dl-ul, 0)
		d, tw, e, l, c = d+ud+t+wt, tw+utw+w, max(ue-dl, e)-wt, min(ul-dl, l)+w, c+uc+t
		p := &f[i]
		p.d, p.tw, p.e, p.l, p.c = d, tw, e, l, c
		prev = v
	}
}

// backward recomputes the backward summaries from position hi (at most
// len-2) down to 0, each the join of its node's unit and the one after.
func (x *route) backward(hi int) {
	r, b := x.r, x.bwd[:len(x.r)]
	if hi < 0 || hi+1 >= len(r) {
		return
	}
	m := x.m
	z := &b[hi+1]
	d, tw, e, l, c := z.d, z.tw, z.e, z.l, z.c
	next := r[hi+1]
	for i := hi; i >= 0; i-- {
		v := r[i]
		ud, utw, ue, ul, uc := m.unitOf(v)
		t := m.arc(v, next)
		dl := ud - utw + t
		wt := max(e-dl-ul, 0)
		w := max(ue+dl-l, 0)
		d, tw, e, l, c = ud+d+t+wt, utw+tw+w, max(e-dl, ue)-wt, min(l-dl, ul)+w, uc+c+t
		p := &b[i]
		p.d, p.tw, p.e, p.l, p.c = d, tw, e, l, c
		next = v
	}
}

// setShifted replaces the order by r when r agrees with the old order on
// r[:lo] and its last tail entries are the old order's last tail entries
// (a removal or an insertion between them): the forward summaries before lo
// and the backward ones of the common tail still hold, the latter moved to
// their new positions. The result equals set(r). r must not alias x.r.
func (x *route) setShifted(r []int32, lo, tail int) {
	k, nk := len(x.r), len(r)
	if lo < 1 || tail < 1 || len(x.fwd) != k || cap(x.fwd) < nk || lo > min(k, nk) || tail > min(k, nk) {
		x.set(r)
		return
	}
	x.fwd, x.bwd = x.fwd[:max(k, nk)], x.bwd[:max(k, nk)]
	copy(x.bwd[nk-tail:nk], x.bwd[k-tail:k])
	x.fwd, x.bwd = x.fwd[:nk], x.bwd[:nk]
	x.r = append(x.r[:0], r...)
	x.forward(lo)
	x.backward(nk - tail - 1)
}

// setSpan replaces the order when only positions lo..hi changed: the
// forward summaries before lo and the backward ones after hi still hold.
func (x *route) setSpan(r []int32, lo, hi int) {
	if len(r) != len(x.r) || len(x.fwd) != len(r) {
		x.set(r)
		return
	}
	copy(x.r, r)
	k := len(x.r)
	x.forward(max(lo, 1))
	x.backward(min(hi, k-2))
}

func (x *route) total() seg { return x.fwd[len(x.r)-1] }

// arc is the travel from a to b.
func (m *model) arc(a, b int32) int64 { return m.tk(int(a)*m.n + int(b)) }

// cost is the objective of a whole route summary, warp ignored.
func (m *model) cost(s seg) int64 {
	if m.obj == CompletionTime {
		return m.startAt + s.d
	}
	return s.c
}

// value is the penalised objective the search minimises.
func (m *model) value(s seg, lam float64) float64 {
	return float64(m.cost(s)) + lam*float64(s.tw)
}

// segOf summarises r[i..j] from scratch.
func (x *route) segOf(i, j int) seg {
	m := x.m
	s := m.unit(int(x.r[i]))
	for k := i + 1; k <= j; k++ {
		s = join(s, m.unit(int(x.r[k])), m.arc(x.r[k-1], x.r[k]))
	}
	return s
}

// segInto sets *s to segOf(i, j), field by field.
func (x *route) segInto(s *seg, i, j int) {
	m := x.m
	m.setUnit(s, x.r[i])
	for k := i + 1; k <= j; k++ {
		m.pushBack(s, x.r[k], m.arc(x.r[k-1], x.r[k]))
	}
}

// revInto sets *s to revOf(i, j), field by field.
func (x *route) revInto(s *seg, i, j int) {
	m := x.m
	m.setUnit(s, x.r[j])
	for k := j - 1; k >= i; k-- {
		m.pushBack(s, x.r[k], m.arc(x.r[k+1], x.r[k]))
	}
}

// revOf summarises r[j], r[j-1], ..., r[i].
func (x *route) revOf(i, j int) seg {
	m := x.m
	s := m.unit(int(x.r[j]))
	for k := j - 1; k >= i; k-- {
		s = join(s, m.unit(int(x.r[k])), m.arc(x.r[k+1], x.r[k]))
	}
	return s
}
