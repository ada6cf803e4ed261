package solver

import (
	"math"

	"visitline/solver/turn"
)

// Granular insertion on large windowed days (Toth and Vigo 2003, "The
// granular tabu search and its application to the vehicle-routing
// problem"): each node keeps its granularK nearest successors and
// predecessors by travel among the arcs a feasible plan can hold (arcOK,
// after window tightening), and the repair tries to insert a visit only
// next to one of them: after a candidate predecessor or before a candidate
// successor. The time per insertion is then about constant instead of
// linear in the route's length. When no candidate place takes the visit
// without time warp on a route that has none, the full scan by position
// runs as before, so that no feasible insertion is lost to the lists.
//
// Days with fewer than granularFrom movable visits keep the full scan:
// their plans at a given seed and iteration budget are unchanged.

const (
	granularFrom = 500
	granularK    = 12
)

// buildGranular fills m.succ and m.pred for the nodes of the route (the
// start, the movable visits and the sentinel). One pass over the matrix by
// rows: each arc u→w is offered to u's successor list and to w's
// predecessor list (a scan by columns would miss the cache on every entry
// of a large matrix).
func (m *model) buildGranular() {
	n := m.n
	nodes := make([]int, 0, len(m.movable)+2)
	nodes = append(nodes, m.start)
	nodes = append(nodes, m.movable...)
	nodes = append(nodes, m.end)
	m.succ = make([][]int32, n)
	m.pred = make([][]int32, n)
	flat := make([]int32, 2*granularK*len(nodes))
	predW := make([][]int64, n)
	wflat := make([]int64, granularK*len(nodes))
	for _, v := range nodes {
		if v != m.start {
			m.pred[v], flat = flat[:0:granularK], flat[granularK:]
			predW[v], wflat = wflat[:0:granularK], wflat[granularK:]
		}
	}
	// offer puts w (at travel t) into the list c, kept sorted by travel
	// with ties in the order offered, at most granularK long.
	offer := func(c []int32, ws []int64, w int32, t int64) ([]int32, []int64) {
		if len(c) == granularK && t >= ws[len(ws)-1] {
			return c, ws
		}
		p := len(c)
		if p == granularK {
			p--
		} else {
			c, ws = append(c, 0), append(ws, 0)
		}
		for p > 0 && ws[p-1] > t {
			c[p], ws[p] = c[p-1], ws[p-1]
			p--
		}
		c[p], ws[p] = w, t
		return c, ws
	}
	// worst[w]: the travel a new predecessor of w must beat (MaxInt64
	// while w's list is short), in one array for the cache's sake.
	worst := make([]int64, n)
	for i := range worst {
		worst[i] = math.MaxInt64
	}
	sw := make([]int64, 0, granularK)
	for _, u := range nodes {
		if u == m.end {
			continue
		}
		turn.Due()
		c := flat[:0:granularK]
		flat = flat[granularK:]
		sw = sw[:0]
		sMax := int64(math.MaxInt64)
		row := u * n
		for _, w := range nodes {
			if w == u || w == m.start {
				continue
			}
			t := m.tk(row + w)
			if t >= sMax && t >= worst[w] || !m.arcOK(u, w) {
				continue
			}
			if t < sMax {
				if c, sw = offer(c, sw, int32(w), t); len(c) == granularK {
					sMax = sw[granularK-1]
				}
			}
			if t < worst[w] {
				if m.pred[w], predW[w] = offer(m.pred[w], predW[w], int32(u), t); len(m.pred[w]) == granularK {
					worst[w] = predW[w][granularK-1]
				}
			}
		}
		m.succ[u] = c
	}
	// candArc(a, b) as one bit per pair (n²/8 bytes: 125 KB at 1,000 sites,
	// 3 MB at 5,000), so that the local search's test, asked for every
	// move it looks at on a large day, is one load and not a scan of 24.
	m.candWords = (n + 63) / 64
	m.candBits = make([]uint64, n*m.candWords)
	for a, cs := range m.succ {
		for _, b := range cs {
			m.candBits[a*m.candWords+int(b)>>6] |= 1 << (uint(b) & 63)
		}
	}
	for b, cs := range m.pred {
		for _, a := range cs {
			m.candBits[int(a)*m.candWords+b>>6] |= 1 << (uint(b) & 63)
		}
	}
}

// candArc says whether a→b is a candidate arc: b among a's nearest
// successors or a among b's nearest predecessors.
func (m *model) candArc(a, b int32) bool {
	return m.candBits[int(a)*m.candWords+int(b)>>6]>>(uint(b)&63)&1 == 1
}

// candArcByLists is candArc read from the lists themselves (the tests hold
// the two equal).
func (m *model) candArcByLists(a, b int32) bool {
	for _, c := range m.succ[a] {
		if c == b {
			return true
		}
	}
	for _, c := range m.pred[b] {
		if c == a {
			return true
		}
	}
	return false
}

// granular says whether the repair uses the candidate lists.
func (m *model) granular() bool { return m.succ != nil }

// trackPositions records where each node of x sits (s.at), for the
// granular insertion; positions from lo on are written again.
func (s *search) trackPositions(x *route, lo int) {
	if len(s.at) < s.m.n {
		s.at = make([]int32, s.m.n)
		for i := range s.at {
			s.at[i] = -1
		}
	}
	for i := lo; i < len(x.r); i++ {
		s.at[x.r[i]] = int32(i)
	}
}

// bestInsertGranular is bestInsert over the places next to v's candidate
// predecessors and successors. ok is false when it found no place, or only
// places with time warp on a route that has none: then the caller scans
// every place.
func (s *search) bestInsertGranular(x *route, v int32) (pos int, best, second float64, ok bool) {
	m := s.m
	u := m.unit(int(v))
	cur := m.value(x.total(), s.lam)
	best, second = math.Inf(1), math.Inf(1)
	pos = -1
	r := x.r
	feasible := x.total().tw == 0
	var bestTW int64
	s.epoch++
	if len(s.seen) < len(r) {
		s.seen = make([]uint32, 2*len(r))
	}
	// The places to try, in the order they are tried: after each
	// candidate predecessor, then before each candidate successor, each
	// place once.
	places := s.places[:0]
	add := func(p int) {
		if p < 0 || p >= len(r)-1 || s.seen[p] == s.epoch {
			return
		}
		s.seen[p] = s.epoch
		places = append(places, int32(p))
	}
	for _, a := range m.pred[v] {
		if p := s.at[a]; p >= 0 && int(p) < len(r) && r[p] == a {
			add(int(p))
		}
	}
	for _, b := range m.succ[v] {
		if p := s.at[b]; p >= 0 && int(p) < len(r) && r[p] == b {
			add(int(p) - 1)
		}
	}
	s.places = places
	// arcOK and arc written out over slices read once, as in bestInsert.
	es, ss, ls, t32, t64, n := m.e, m.s, m.l, m.t32, m.t64, m.n
	lv, evs := ls[v], es[v]+ss[v]
	check := !m.infeas
	fwd, bwd := x.fwd[:len(r)], x.bwd[:len(r)]
	for _, p32 := range places {
		p := int(p32)
		a, b := r[p], r[p+1]
		tav := travelAt(t32, t64, int(a)*n+int(v))
		if check && (a == v || es[a]+ss[a]+tav > lv) {
			continue
		}
		tvb := travelAt(t32, t64, int(v)*n+int(b))
		if check && (v == b || evs+tvb > ls[b]) {
			continue
		}
		sd, stw, sc := joinPair(&fwd[p], &u, &bwd[p+1], tav, tvb)
		d := m.valueOf(sd, stw, sc, s.lam) - cur
		if d < best || d == best && p < pos {
			second = best
			best, pos, bestTW = d, p, stw
		} else if d < second {
			second = d
		}
	}
	if pos < 0 || feasible && bestTW > 0 {
		return -1, 0, 0, false
	}
	return pos, best, second, true
}
