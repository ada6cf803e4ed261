package solver

import (
	"errors"
	"math"
	"sort"

	"visitline/solver/fmtlite"
	"visitline/solver/turn"
)

// model is the engine's working copy of an instance: the driven prefix folded
// into the start, the route's end made one sentinel node, windows tightened
// and impossible orders recorded. The search sees every shape as a path from
// node start to node end = sentinel.
type model struct {
	in  *Instance
	obj Objective
	n   int // nodes in the model: the instance's plus the sentinel
	// t32 or t64 is the n×n travel (row sentinel unused), in int32 when
	// every value fits (half the memory of the instance's own copy).
	t32 []int32
	t64 []int64
	s   []int64 // service
	e   []int64 // tightened earliest start
	l   []int64 // tightened latest start
	// origE and origL are the instance's own windows (used when the
	// tightened ones prove the instance infeasible, to minimise lateness).
	origE, origL []int64

	start   int   // where the movable part begins (the last node of the prefix)
	startAt int64 // time service starts at start
	end     int   // the sentinel
	endSeg  seg   // summary of the sentinel: the pinned tail and the route's end
	prefix  []int // instance nodes driven or pinned before the movable part (start first)
	suffix  []int // instance nodes pinned after the movable part (before the end)
	prefixC int64 // travel of the prefix
	movable []int // nodes the search orders
	isMov   []bool
	before  [][]uint64 // before[u] has bit k when u must come before k
	infeas  bool       // tightening proved that no plan meets every window
	fewest  bool       // rank late plans by late visits first
	// free: no window can bind (windowsFree), and the day is searched as an
	// open day (open.go); before is then left out.
	free bool
	// succ and pred are the candidate lists of granular insertion
	// (granular.go), nil below granularFrom movable visits.
	succ, pred [][]int32
	// candBits holds candArc for every pair, candWords words per row: the
	// lists are read there in one load instead of a scan of both.
	candBits  []uint64
	candWords int
}

func (m *model) T(i, j int) int64 { return m.tk(i*m.n + j) }

// tk is entry k of the travel matrix.
func (m *model) tk(k int) int64 {
	if m.t32 != nil {
		return int64(m.t32[k])
	}
	return m.t64[k]
}

// travelAt is tk over the matrix slices held by the caller.
func travelAt(t32 []int32, t64 []int64, k int) int64 {
	if t32 != nil {
		return int64(t32[k])
	}
	return t64[k]
}

// setT sets entry k of the travel matrix.
func (m *model) setT(k int, v int64) {
	if m.t32 != nil {
		m.t32[k] = int32(v)
	} else {
		m.t64[k] = v
	}
}

func (m *model) mustBefore(u, k int) bool { return m.before[u][k>>6]>>(k&63)&1 == 1 }

// unit is the one-node summary of node i.
func (m *model) unit(i int) seg {
	if i == m.end {
		return m.endSeg
	}
	return seg{d: m.s[i], e: m.e[i], l: m.l[i]}
}

// newModel builds the model of in. It reports an error for constraints the
// engine cannot honour.
func newModel(in *Instance, obj Objective) (*model, error) {
	return buildModel(in, obj, nil)
}

// buildModel is newModel whose window tightening ends early when halt says
// so (a time budget running short on a large day): windows tightened part
// of the way are still valid, only less tight.
func buildModel(in *Instance, obj Objective, halt func() bool) (*model, error) {
	N := in.N
	n := N + 1
	m := &model{in: in, obj: obj, n: n, end: N}
	fits := true
	for _, v := range in.Travel {
		if v > math.MaxInt32 {
			fits = false
			break
		}
	}
	if fits {
		m.t32 = make([]int32, n*n)
	} else {
		m.t64 = make([]int64, n*n)
	}
	m.s = make([]int64, n)
	m.e = make([]int64, n)
	m.l = make([]int64, n)
	for i := 0; i < N; i++ {
		for j, v := range in.Travel[i*N : (i+1)*N] {
			m.setT(i*n+j, v)
		}
		m.s[i], m.e[i], m.l[i] = in.Service[i], in.Early[i], in.Late[i]
	}
	// Prefix: the driven visits, then visits pinned to the next positions.
	pos := map[int]int{}
	for i, p := range in.Position {
		if p > 0 {
			if _, dup := pos[p]; dup {
				return nil, fmtlite.Errorf("two visits are pinned to position %d", p)
			}
			pos[p] = i
		}
	}
	used := make([]bool, N)
	if len(in.Fixed) > 0 {
		m.prefix = append(m.prefix, in.Fixed...)
	} else {
		m.prefix = []int{in.Start}
	}
	for _, v := range m.prefix {
		used[v] = true
	}
	for {
		v, ok := pos[len(m.prefix)]
		if !ok {
			break
		}
		if used[v] {
			return nil, fmtlite.Errorf("%s is pinned to position %d but is already placed", in.ID(v), len(m.prefix))
		}
		m.prefix = append(m.prefix, v)
		used[v] = true
		delete(pos, len(m.prefix)-1)
	}
	last := N - 1 // position of the last visit
	tailEnd := -1
	if in.Shape == OpenFixed {
		tailEnd = in.End
		if used[in.End] && N > 1 {
			return nil, fmtlite.Errorf("the end %s cannot also be a done or pinned visit", in.ID(in.End))
		}
		used[in.End] = true
		last = N - 2
	}
	// Suffix: visits pinned to the last positions, walking back.
	var rev []int
	for {
		v, ok := pos[last-len(rev)]
		if !ok || last-len(rev) < len(m.prefix) {
			break
		}
		if used[v] {
			return nil, fmtlite.Errorf("%s is pinned to position %d but is already placed", in.ID(v), last-len(rev))
		}
		rev = append(rev, v)
		used[v] = true
		delete(pos, last-len(rev)+1)
	}
	for k := len(rev) - 1; k >= 0; k-- {
		m.suffix = append(m.suffix, rev[k])
	}
	if len(pos) > 0 {
		ps := make([]int, 0, len(pos))
		for p := range pos {
			ps = append(ps, p)
		}
		sort.Ints(ps)
		return nil, fmtlite.Errorf("%s is pinned to position %d: pins must form a run from the start or from the end of the route", in.ID(pos[ps[0]]), ps[0])
	}
	// Fold the prefix into the start: its schedule is fixed.
	sch := Evaluate(in, m.prefix)
	lastV := sch.Visits[len(sch.Visits)-1]
	m.start = m.prefix[len(m.prefix)-1]
	m.startAt = lastV.Start
	m.prefixC = sch.Travel
	m.e[m.start], m.l[m.start] = m.startAt, m.startAt
	for i := 0; i < N; i++ {
		if !used[i] {
			m.movable = append(m.movable, i)
		}
	}
	m.isMov = make([]bool, n)
	for _, v := range m.movable {
		m.isMov[v] = true
	}
	// The sentinel: arcs into it go to the first node of the tail.
	tail := append([]int(nil), m.suffix...)
	if tailEnd >= 0 {
		tail = append(tail, tailEnd)
	}
	var endSeg seg
	var first int
	switch {
	case len(tail) > 0:
		first = tail[0]
		endSeg = seg{d: m.s[first], e: m.e[first], l: m.l[first]}
		for k := 1; k < len(tail); k++ {
			endSeg = join(endSeg, seg{d: m.s[tail[k]], e: m.e[tail[k]], l: m.l[tail[k]]}, m.tk(tail[k-1]*n+tail[k]))
		}
		if in.Shape == Closed {
			endSeg = join(endSeg, seg{e: -Horizon, l: in.Late[in.Start]}, m.tk(tail[len(tail)-1]*n+in.Start))
		}
		m.e[N], m.l[N] = endSeg.e, endSeg.l
	case in.Shape == Closed:
		first = in.Start
		m.e[N], m.l[N] = -Horizon, in.Late[in.Start]
		endSeg = seg{e: -Horizon, l: in.Late[in.Start]}
	default: // open, free end
		first = -1
		m.e[N], m.l[N] = -Horizon, Horizon
		endSeg = seg{e: -Horizon, l: Horizon}
	}
	m.endSeg = endSeg
	for i := 0; i < N; i++ {
		if first >= 0 {
			m.setT(i*n+N, in.Travel[i*N+first])
		}
	}
	m.origE = append([]int64(nil), m.e...)
	m.origL = append([]int64(nil), m.l...)
	if len(m.movable) >= openMin && m.windowsFree() {
		// No window can bind: nothing to tighten, no arc or order to
		// rule out; the open-day search needs none of it (open.go).
		m.free = true
		return m, nil
	}
	if debugMode != "notight" {
		m.tighten(halt)
	}
	if len(m.movable) >= granularFrom && !m.infeas {
		m.buildGranular()
	}
	if debugMode == "" || debugMode == "normal" {
		m.buildPrecedence(halt)
	} else {
		m.before = make([][]uint64, n)
		for u := range m.before {
			m.before[u] = make([]uint64, (n+63)/64)
		}
	}
	return m, nil
}

// tighten narrows windows from predecessors and successors until nothing
// changes (Desrochers, Desrosiers, Solomon 1992; Dumas et al. 1995):
// service at j cannot start before the earliest arrival from any possible
// predecessor, and must start early enough to reach some possible successor.
// Both rules keep every feasible plan feasible. When a window empties, no
// plan meets every window: the originals are kept for lateness search.
func (m *model) tighten(halt func() bool) {
	if len(m.movable) == 0 {
		return
	}
	n := m.n
	nodes := append([]int(nil), m.movable...)
	preds := append([]int{m.start}, m.movable...)
	succs := append(append([]int(nil), m.movable...), m.end)
	if len(m.movable)*len(m.movable) > 25_000_000 {
		return
	}
	for round := 0; round < 8; round++ {
		changed := false
		for x, j := range nodes {
			turn.Due()
			if halt != nil && x%64 == 0 && halt() {
				return
			}
			lo := Horizon
			for _, i := range preds {
				if i == j {
					continue
				}
				a := m.e[i] + m.s[i] + m.tk(i*n+j)
				if a <= m.l[j] && a < lo {
					lo = a
				}
			}
			if lo > m.e[j] && lo != Horizon {
				m.e[j] = lo
				changed = true
			}
			if lo == Horizon {
				m.infeas = true
			}
			hi := -Horizon
			for _, k := range succs {
				if k == j {
					continue
				}
				if m.e[j]+m.s[j]+m.tk(j*n+k) > m.l[k] {
					continue
				}
				b := m.l[k] - m.s[j] - m.tk(j*n+k)
				if b > hi {
					hi = b
				}
			}
			if hi == -Horizon {
				m.infeas = true
			} else if hi < m.l[j] {
				m.l[j] = hi
				changed = true
			}
			if m.e[j] > m.l[j] {
				m.infeas = true
			}
			if m.infeas {
				break
			}
		}
		if m.infeas || !changed {
			break
		}
	}
	if m.infeas {
		copy(m.e, m.origE)
		copy(m.l, m.origL)
	}
}

// arcOK says whether arc i→j can be in a feasible plan: service at j can
// still start in its window when i is left as early as it can be. It is
// worked out at each call from the tightened windows, which no longer
// change once the model is built (an n² table of it would cost a byte per
// pair).
func (m *model) arcOK(i, j int) bool {
	return i != j && m.e[i]+m.s[i]+m.tk(i*m.n+j) <= m.l[j]
}

// buildPrecedence records u-before-k when k, served as early as it can be,
// cannot reach u by u's latest start even directly (Dumas et al. 1995).
// Stretches of a route that would break a precedence are skipped by the
// local search. With the triangle inequality broken this is a heuristic
// filter only: it never makes a plan infeasible, it may hide a move.
//
// halt (when set) is asked every 64 rows: rows not reached keep no
// precedence, which is valid (the search only prunes less).
func (m *model) buildPrecedence(halt func() bool) {
	n := m.n
	words := (n + 63) / 64
	m.before = make([][]uint64, n)
	flat := make([]uint64, n*words)
	for u := 0; u < n; u++ {
		m.before[u] = flat[u*words : (u+1)*words]
	}
	if m.infeas {
		return
	}
	for x, u := range m.movable {
		turn.Due()
		if halt != nil && x%64 == 0 && halt() {
			return
		}
		for _, k := range m.movable {
			if u != k && m.e[k]+m.s[k]+m.tk(k*n+u) > m.l[u] {
				m.before[u][k>>6] |= 1 << (k & 63)
			}
		}
	}
}

// external turns a model route (start ... sentinel) into an instance route.
func (m *model) external(r []int32) []int {
	out := make([]int, 0, m.in.N)
	out = append(out, m.prefix...)
	for _, v := range r[1 : len(r)-1] {
		out = append(out, int(v))
	}
	out = append(out, m.suffix...)
	if m.in.Shape == OpenFixed && m.in.N > 1 {
		out = append(out, m.in.End)
	}
	return out
}

// internal turns an instance route into a model route, or nil when the
// route does not keep the prefix and suffix the model folds away.
func (m *model) internal(route []int) []int32 {
	k := len(route) - len(m.suffix)
	if m.in.Shape == OpenFixed && m.in.N > 1 {
		k--
	}
	if k < len(m.prefix) {
		return nil
	}
	for i, v := range m.prefix {
		if route[i] != v {
			return nil
		}
	}
	for i, v := range m.suffix {
		if route[k+i] != v {
			return nil
		}
	}
	r := make([]int32, 0, k-len(m.prefix)+2)
	r = append(r, int32(m.start))
	for _, v := range route[len(m.prefix):k] {
		r = append(r, int32(v))
	}
	return append(r, int32(m.end))
}

var errNoNodes = errors.New("nothing to plan")

var debugMode string
