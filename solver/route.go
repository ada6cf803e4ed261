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
	for i := 1; i < k; i++ {
		x.fwd[i] = join(x.fwd[i-1], m.unit(int(x.r[i])), m.arc(x.r[i-1], x.r[i]))
	}
	x.bwd[k-1] = m.unit(int(x.r[k-1]))
	for i := k - 2; i >= 0; i-- {
		x.bwd[i] = join(m.unit(int(x.r[i])), x.bwd[i+1], m.arc(x.r[i], x.r[i+1]))
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
	m := x.m
	for i := lo; i < nk; i++ {
		x.fwd[i] = join(x.fwd[i-1], m.unit(int(x.r[i])), m.arc(x.r[i-1], x.r[i]))
	}
	for i := nk - tail - 1; i >= 0; i-- {
		x.bwd[i] = join(m.unit(int(x.r[i])), x.bwd[i+1], m.arc(x.r[i], x.r[i+1]))
	}
}

// setSpan replaces the order when only positions lo..hi changed: the
// forward summaries before lo and the backward ones after hi still hold.
func (x *route) setSpan(r []int32, lo, hi int) {
	if len(r) != len(x.r) || len(x.fwd) != len(r) {
		x.set(r)
		return
	}
	copy(x.r, r)
	m := x.m
	k := len(x.r)
	lo = max(lo, 1)
	hi = min(hi, k-2)
	for i := lo; i < k; i++ {
		x.fwd[i] = join(x.fwd[i-1], m.unit(int(x.r[i])), m.arc(x.r[i-1], x.r[i]))
	}
	for i := hi; i >= 0; i-- {
		x.bwd[i] = join(m.unit(int(x.r[i])), x.bwd[i+1], m.arc(x.r[i], x.r[i+1]))
	}
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

// revOf summarises r[j], r[j-1], ..., r[i].
func (x *route) revOf(i, j int) seg {
	m := x.m
	s := m.unit(int(x.r[j]))
	for k := j - 1; k >= i; k-- {
		s = join(s, m.unit(int(x.r[k])), m.arc(x.r[k+1], x.r[k]))
	}
	return s
}
