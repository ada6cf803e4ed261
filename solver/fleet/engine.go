package fleet

import (
	"math"
	"math/rand"
	"sort"

	"visitline/solver"
)

// model is the engine's working copy of a Problem: a travel matrix with
// one extra node (index N, reached from everywhere at no cost) that stands
// for the free end of a route, and the summaries of every start and end.
type model struct {
	p      *Problem
	n      int // nodes of the working matrix: p.N + 1
	t      []int64
	unit   []solver.Seg
	dem, w []int64
	visits []int
	obj    solver.Objective
	veh    []mveh
	types  int   // distinct kinds of vehicle (same start, end, shift, limits)
	typeOf []int // vehicle -> kind
	maxArc int64
	metric bool // travel keeps the triangle inequality
	// near[v] lists the visits nearest v (travel both ways), for the
	// granular polish (Toth and Vigo 2003).
	near    [][]int
	totalW  int64
	penalty float64 // cost weight of one unit of unserved priority in the annealing
	// vehPenalty is the price of opening a vehicle in insertion and in the
	// annealing when vehicles are minimised (0 otherwise): more than any
	// change of cost a few visits can make, less than one unit of
	// unserved priority.
	vehPenalty int64
}

type mveh struct {
	start, end     int
	startSeg       solver.Seg
	endSeg         solver.Seg
	cap, maxDur    int64
	shiftS, shiftE int64
}

func newModel(p *Problem, obj solver.Objective, minVeh bool) *model {
	n := p.N + 1
	m := &model{p: p, n: n, t: make([]int64, n*n), unit: make([]solver.Seg, n), dem: make([]int64, n), w: make([]int64, n), obj: obj}
	for i := 0; i < p.N; i++ {
		for j := 0; j < p.N; j++ {
			m.t[i*n+j] = p.T(i, j)
			m.maxArc = max(m.maxArc, p.T(i, j))
		}
		m.unit[i] = solver.NodeSeg(p.Service[i], p.Early[i], p.Late[i])
		m.dem[i] = p.DemandOf(i)
		m.w[i] = p.Weight(i)
	}
	m.visits = p.Visits()
	for _, v := range m.visits {
		m.totalW += m.w[v]
	}
	kinds := map[[7]int64]int{}
	for _, v := range p.Vehicles {
		end := v.End
		if end == FreeEnd {
			end = p.N
		}
		mv := mveh{start: v.Start, end: end, cap: v.Capacity, maxDur: v.MaxDuration, shiftS: v.ShiftStart, shiftE: v.ShiftEnd,
			startSeg: solver.NodeSeg(p.Service[v.Start], v.ShiftStart, v.ShiftEnd),
			endSeg:   solver.NodeSeg(0, -solver.Horizon, v.ShiftEnd)}
		m.veh = append(m.veh, mv)
		key := [7]int64{int64(v.Start), int64(end), v.ShiftStart, v.ShiftEnd, v.Capacity, v.MaxDuration, 0}
		k, ok := kinds[key]
		if !ok {
			k = len(kinds)
			kinds[key] = k
		}
		m.typeOf = append(m.typeOf, k)
	}
	m.types = len(kinds)
	m.near = nearLists(m, nearSize)
	m.metric = p.N <= maxMetricCheck && metric(p)
	// One unit of unserved priority outweighs any detour a visit can
	// cause in the annealing's single number (the exact comparison of
	// plans is lexicographic, see Value).
	unit := 4*m.maxArc + 1
	if obj == solver.CompletionTime {
		var h int64
		for _, v := range p.Vehicles {
			h = max(h, v.ShiftEnd-v.ShiftStart)
		}
		unit += min(h, solver.Horizon/4)
	}
	m.penalty = float64(unit)
	if minVeh {
		m.vehPenalty = unit
		m.penalty = float64(unit) * float64(len(p.Vehicles)+2)
	}
	return m
}

func (m *model) tt(i, j int) int64 { return m.t[i*m.n+j] }

// state is a plan with the summaries that judge a move in constant time:
// for route r, fwd[r][k] summarises the start and the first k visits,
// bwd[r][k] the visits from k on and the end.
type state struct {
	m        *model
	routes   [][]int
	fwd, bwd [][]solver.Seg
	pload    [][]int64 // pload[r][k]: demand of the first k visits
	load     []int64
	rcost    []int64
	where    []int // route of each node, -1 unserved or not a visit
	pos      []int // place of each served node in its route
	unserved []int
	used     int
	maxVeh   int
	// dirty marks the routes changed since the last polish; active the
	// routes the current round of the polish looks at.
	dirty, active []bool
}

func newState(m *model) *state {
	k := len(m.veh)
	s := &state{m: m, routes: make([][]int, k), fwd: make([][]solver.Seg, k), bwd: make([][]solver.Seg, k), pload: make([][]int64, k),
		load: make([]int64, k), rcost: make([]int64, k), where: make([]int, m.n), pos: make([]int, m.n), maxVeh: k, dirty: make([]bool, k)}
	for i := range s.where {
		s.where[i] = -1
	}
	for r := range s.routes {
		s.refresh(r)
	}
	s.unserved = append([]int(nil), m.visits...)
	return s
}

func (s *state) clone() *state {
	c := &state{m: s.m, routes: make([][]int, len(s.routes)), fwd: make([][]solver.Seg, len(s.routes)), bwd: make([][]solver.Seg, len(s.routes)), pload: make([][]int64, len(s.routes)),
		load: append([]int64(nil), s.load...), rcost: append([]int64(nil), s.rcost...), where: append([]int(nil), s.where...), pos: append([]int(nil), s.pos...),
		unserved: append([]int(nil), s.unserved...), used: s.used, maxVeh: s.maxVeh, dirty: append([]bool(nil), s.dirty...)}
	for r := range s.routes {
		c.routes[r] = append([]int(nil), s.routes[r]...)
		c.fwd[r] = append([]solver.Seg(nil), s.fwd[r]...)
		c.bwd[r] = append([]solver.Seg(nil), s.bwd[r]...)
		c.pload[r] = append([]int64(nil), s.pload[r]...)
	}
	return c
}

// copyFrom makes s equal to o without allocating where it can.
func (s *state) copyFrom(o *state) {
	for r := range o.routes {
		s.routes[r] = append(s.routes[r][:0], o.routes[r]...)
		s.fwd[r] = append(s.fwd[r][:0], o.fwd[r]...)
		s.bwd[r] = append(s.bwd[r][:0], o.bwd[r]...)
		s.pload[r] = append(s.pload[r][:0], o.pload[r]...)
	}
	copy(s.load, o.load)
	copy(s.rcost, o.rcost)
	copy(s.where, o.where)
	copy(s.pos, o.pos)
	s.unserved = append(s.unserved[:0], o.unserved...)
	s.used, s.maxVeh = o.used, o.maxVeh
	for r := range s.dirty {
		s.dirty[r] = false
	}
}

func (s *state) prevNode(r, k int) int {
	if k == 0 {
		return s.m.veh[r].start
	}
	return s.routes[r][k-1]
}

func (s *state) nextNode(r, k int) int {
	if k == len(s.routes[r]) {
		return s.m.veh[r].end
	}
	return s.routes[r][k]
}

// routeCost is the cost of a whole-route summary under the objective.
func (m *model) routeCost(x solver.Seg) int64 {
	if m.obj == solver.CompletionTime {
		return x.E + x.D
	}
	return x.C
}

// ok says whether a whole-route summary keeps every window and the
// vehicle's longest day.
func (m *model) ok(r int, x solver.Seg) bool {
	return x.TW == 0 && x.D <= m.veh[r].maxDur
}

// refresh recomputes route r's summaries, load and cost.
func (s *state) refresh(r int) {
	m := s.m
	rt := s.routes[r]
	L := len(rt)
	f := s.fwd[r][:0]
	f = append(f, m.veh[r].startSeg)
	prev := m.veh[r].start
	var load int64
	pl := append(s.pload[r][:0], 0)
	for _, v := range rt {
		f = append(f, solver.JoinSeg(f[len(f)-1], m.unit[v], m.tt(prev, v)))
		prev = v
		load += m.dem[v]
		pl = append(pl, load)
	}
	s.pload[r] = pl
	b := s.bwd[r][:0]
	for cap(b) < L+1 {
		b = append(b[:cap(b)], solver.Seg{})
	}
	b = b[:L+1]
	b[L] = m.veh[r].endSeg
	next := m.veh[r].end
	for k := L - 1; k >= 0; k-- {
		v := rt[k]
		b[k] = solver.JoinSeg(m.unit[v], b[k+1], m.tt(v, next))
		next = v
	}
	s.fwd[r], s.bwd[r], s.load[r] = f, b, load
	s.dirty[r] = true
	if L == 0 {
		s.rcost[r] = 0
	} else {
		s.rcost[r] = m.routeCost(solver.JoinSeg(f[L], m.veh[r].endSeg, m.tt(prev, m.veh[r].end)))
	}
	for k, v := range rt {
		s.where[v], s.pos[v] = r, k
	}
}

func (s *state) countUsed() {
	s.used = 0
	for _, rt := range s.routes {
		if len(rt) > 0 {
			s.used++
		}
	}
}

func (s *state) value() Value {
	var v Value
	for _, u := range s.unserved {
		v.Unserved += s.m.w[u]
	}
	v.Vehicles = s.used
	for _, c := range s.rcost {
		v.Cost += c
	}
	return v
}

// score is the single number the annealing compares.
func (s *state) score(v Value) float64 {
	return float64(v.Unserved)*s.m.penalty + float64(v.Vehicles)*float64(s.m.vehPenalty) + float64(v.Cost)
}

// insertCost judges putting v before position k of route r: the change in
// route cost, and whether the route stays feasible.
func (s *state) insertCost(r, k, v int) (int64, bool) {
	m := s.m
	if s.load[r]+m.dem[v] > m.veh[r].cap {
		return 0, false
	}
	pred, succ := s.prevNode(r, k), s.nextNode(r, k)
	x := solver.JoinSeg(s.fwd[r][k], m.unit[v], m.tt(pred, v))
	if x.TW > 0 {
		return 0, false
	}
	y := solver.JoinSeg(x, s.bwd[r][k], m.tt(v, succ))
	if !m.ok(r, y) {
		return 0, false
	}
	return m.routeCost(y) - s.rcost[r], true
}

// bestInsert is the cheapest feasible place for v in route r. Where travel
// keeps the triangle inequality, the earliest arrival at v only grows along
// the route, so the scan stops at the first place that reaches v too late.
func (s *state) bestInsert(r, v int) (int64, int, bool) {
	m := s.m
	best, pos, found := int64(math.MaxInt64), -1, false
	if s.load[r]+m.dem[v] > m.veh[r].cap {
		return best, pos, false
	}
	rt := s.routes[r]
	fwd, bwd := s.fwd[r], s.bwd[r]
	pred := m.veh[r].start
	uv := m.unit[v]
	for k := 0; k <= len(rt); k++ {
		succ := m.veh[r].end
		if k < len(rt) {
			succ = rt[k]
		}
		x := solver.JoinSeg(fwd[k], uv, m.tt(pred, v))
		if x.TW > 0 {
			if m.metric {
				break
			}
		} else {
			y := solver.JoinSeg(x, bwd[k], m.tt(v, succ))
			if m.ok(r, y) {
				if c := m.routeCost(y) - s.rcost[r]; c < best {
					best, pos, found = c, k, true
				}
			}
		}
		pred = succ
	}
	return best, pos, found
}

func (s *state) insertAt(r, k, v int) {
	rt := s.routes[r]
	rt = append(rt, 0)
	copy(rt[k+1:], rt[k:])
	rt[k] = v
	s.routes[r] = rt
	if len(rt) == 1 {
		s.used++
	}
	s.refresh(r)
}

// remove takes the visits in set out of their routes and adds them to the
// unserved list.
func (s *state) remove(set []int) {
	touched := map[int]bool{}
	mark := make(map[int]bool, len(set))
	for _, v := range set {
		if s.where[v] >= 0 {
			mark[v] = true
			touched[s.where[v]] = true
		}
	}
	for r := range touched {
		rt := s.routes[r][:0]
		for _, v := range s.routes[r] {
			if !mark[v] {
				rt = append(rt, v)
			}
		}
		s.routes[r] = rt
	}
	rs := make([]int, 0, len(touched))
	for r := range touched {
		rs = append(rs, r)
	}
	sort.Ints(rs) // map order must not reach the random stream
	for _, r := range rs {
		s.refresh(r)
	}
	for _, v := range set {
		if mark[v] {
			s.where[v] = -1
			s.unserved = append(s.unserved, v)
		}
	}
	s.countUsed()
}

// plan returns the state as a Plan (unserved in ascending order).
func (s *state) plan() Plan {
	pl := Plan{Routes: make([][]int, len(s.routes))}
	for r, rt := range s.routes {
		pl.Routes[r] = append([]int{}, rt...)
	}
	pl.Unserved = append([]int(nil), s.unserved...)
	sort.Ints(pl.Unserved)
	return pl
}

// columns lists the routes a pending visit may go to: the routes in use,
// and for each kind of vehicle its first idle one while the fleet cap
// allows another vehicle.
func (s *state) columns(buf []int) []int {
	buf = buf[:0]
	seen := make([]bool, s.m.types)
	for r, rt := range s.routes {
		if len(rt) > 0 {
			buf = append(buf, r)
		} else if s.used < s.maxVeh && !seen[s.m.typeOf[r]] {
			seen[s.m.typeOf[r]] = true
			buf = append(buf, r)
		}
	}
	return buf
}

// repair puts the unserved visits back by regret-k insertion (k = 1 is
// greedy), with noise on the costs when noise > 0 (Ropke and Pisinger
// 2006). Visits that fit nowhere stay unserved.
func (s *state) repair(rng *rand.Rand, k int, noise float64) {
	m := s.m
	pend := s.unserved
	s.unserved = nil
	if len(pend) == 0 {
		return
	}
	rng.Shuffle(len(pend), func(a, b int) { pend[a], pend[b] = pend[b], pend[a] })
	// Half the time heavier visits go first (they weigh more in the first
	// objective); the other half they take their turn, since a light visit
	// put in early can be what lets every visit in.
	byWeight := rng.Intn(2) == 0
	if k == 0 {
		if byWeight {
			sort.SliceStable(pend, func(a, b int) bool { return m.w[pend[a]] > m.w[pend[b]] })
		}
		s.sequential(pend)
		return
	}
	R := len(s.routes)
	type ins struct {
		c   int64
		pos int
	}
	cache := make([]ins, len(pend)*R)
	valid := make([]bool, R) // cache column computed for the route's current content
	noiseAmp := noise * float64(m.maxArc)
	costOf := func(c int64) int64 {
		if noiseAmp == 0 {
			return c
		}
		return c + int64(noiseAmp*(2*rng.Float64()-1))
	}
	fill := func(r int) {
		for x, v := range pend {
			if v < 0 {
				continue
			}
			c, pos, ok := s.bestInsert(r, v)
			if !ok {
				pos = -1
			} else {
				c = costOf(c)
				if len(s.routes[r]) == 0 {
					c += m.vehPenalty
				}
			}
			cache[x*R+r] = ins{c, pos}
		}
		valid[r] = true
	}
	var cols []int
	const missing = int64(1) << 58
	left := len(pend)
	for left > 0 {
		cols = s.columns(cols)
		for _, r := range cols {
			if !valid[r] {
				fill(r)
			}
		}
		bestX, bestR, bestPos := -1, -1, -1
		var bestReg, bestC int64
		for x, v := range pend {
			if v < 0 {
				continue
			}
			c1, c2, c3 := missing, missing, missing
			r1, p1 := -1, -1
			for _, r := range cols {
				e := cache[x*R+r]
				if e.pos < 0 {
					continue
				}
				switch {
				case e.c < c1:
					c3, c2, c1, r1, p1 = c2, c1, e.c, r, e.pos
				case e.c < c2:
					c3, c2 = c2, e.c
				case e.c < c3:
					c3 = e.c
				}
			}
			if r1 < 0 {
				continue
			}
			var reg int64
			switch k {
			case 1:
				reg = -c1
			case 2:
				reg = c2 - c1
			default:
				reg = (c2 - c1) + (c3 - c1)
			}
			// Heavier visits first (they weigh more in the first
			// objective), then by regret, then by cost.
			if bestX < 0 || byWeight && m.w[v] != m.w[pend[bestX]] && m.w[v] > m.w[pend[bestX]] ||
				(!byWeight || m.w[v] == m.w[pend[bestX]]) && (reg > bestReg || reg == bestReg && c1 < bestC) {
				bestX, bestR, bestPos, bestReg, bestC = x, r1, p1, reg, c1
			}
		}
		if bestX < 0 {
			break
		}
		v := pend[bestX]
		pend[bestX] = -1
		left--
		wasEmpty := len(s.routes[bestR]) == 0
		s.insertAt(bestR, bestPos, v)
		valid[bestR] = false
		if wasEmpty {
			// Another idle vehicle of the same kind becomes a column.
			for r := range s.routes {
				if len(s.routes[r]) == 0 && m.typeOf[r] == m.typeOf[bestR] {
					valid[r] = false
				}
			}
		}
	}
	for _, v := range pend {
		if v >= 0 {
			s.unserved = append(s.unserved, v)
		}
	}
}

// sequential inserts the visits one after another in the given order,
// each at its cheapest feasible place: with a
// random order it varies which visits get in when not all fit (in the
// spirit of the random-order insertion of Christiaens and Vanden Berghe
// 2020).
func (s *state) sequential(pend []int) {
	m := s.m
	var cols []int
	for _, v := range pend {
		cols = s.columns(cols)
		bestC, bestR, bestPos := int64(math.MaxInt64), -1, -1
		for _, r := range cols {
			c, pos, ok := s.bestInsert(r, v)
			if !ok {
				continue
			}
			if len(s.routes[r]) == 0 {
				c += m.vehPenalty
			}
			if c < bestC {
				bestC, bestR, bestPos = c, r, pos
			}
		}
		if bestR < 0 {
			s.unserved = append(s.unserved, v)
			continue
		}
		s.insertAt(bestR, bestPos, v)
	}
}

// maxMetricCheck bounds the O(n³) triangle check.
const maxMetricCheck = 600

// metric reports whether t(i,k) ≤ t(i,j) + t(j,k) for every i, j, k.
func metric(p *Problem) bool {
	n := p.N
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			tij := p.Travel[i*n+j]
			row := p.Travel[j*n : j*n+n]
			ik := p.Travel[i*n : i*n+n]
			for k, tjk := range row {
				if ik[k] > tij+tjk {
					return false
				}
			}
		}
	}
	return true
}

// nearSize is how many neighbours the granular polish looks at per visit.
const nearSize = 25

func nearLists(m *model, k int) [][]int {
	near := make([][]int, m.n)
	for _, v := range m.visits {
		var l []int
		for _, w := range m.visits {
			if w != v {
				l = append(l, w)
			}
		}
		sort.Slice(l, func(a, b int) bool {
			da, db := m.tt(v, l[a])+m.tt(l[a], v), m.tt(v, l[b])+m.tt(l[b], v)
			if da != db {
				return da < db
			}
			return l[a] < l[b]
		})
		if len(l) > k {
			l = l[:k]
		}
		near[v] = l
	}
	return near
}
