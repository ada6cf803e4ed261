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
