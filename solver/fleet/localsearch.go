package fleet

import "visitline/solver"

// polish improves the plan by first-improvement local search until no
// move helps: relocate a visit (within its route or to another), exchange
// two visits of different routes, 2-opt* (swap the tails of two routes
// that end at the same place) and cross-exchange (swap stretches of up to
// three visits between two routes). Every move is judged in constant time (or,
// for a relocation within a route, by one incremental scan) with the
// routes' segment summaries; only moves that keep every route feasible
// are made.
//
// Only moves that touch a route changed since the last polish (the routes
// the repair changed, then those the polish changed) are tried.
//
// Cross-exchange is the dearest of the moves (a stretch of each route
// against every stretch beside a near visit of the other), so it is tried
// only when deep is set: the search asks for it on plans that come close to
// the best one, where the last per mille counts.
func (s *state) polish(deep bool) {
	active := make([]bool, len(s.routes))
	for round := 0; round < 50; round++ {
		any := false
		for r := range s.routes {
			active[r] = s.dirty[r]
			s.dirty[r] = false
			any = any || active[r]
		}
		if !any {
			return
		}
		s.active = active
		for r := range s.routes {
			if !active[r] {
				continue
			}
			for k := 0; k < len(s.routes[r]); k++ {
				s.relocate(r, k)
			}
		}
		s.exchange()
		s.twoOptStar()
		if deep {
			s.crossExchange()
		}
		for r := range s.routes {
			if active[r] {
				s.twoOpt(r)
			}
		}
		if s.m.types > 1 {
			s.swapVehicles()
		}
	}
}

// intraReach bounds how far along its own route a visit is moved, so
// that a polish round stays linear in the route's length.
const intraReach = 12

// without is route a's summary and cost with its k-th visit taken out.
func (s *state) without(a, k int) (solver.Seg, int64, bool) {
	m := s.m
	if len(s.routes[a]) == 1 {
		return solver.Seg{}, 0, true
	}
	x := solver.JoinSeg(s.fwd[a][k], s.bwd[a][k+1], m.tt(s.prevNode(a, k), s.nextNode(a, k+1)))
	return x, m.routeCost(x), m.ok(a, x)
}

// relocate moves the k-th visit of route a to its best place, if that
// lowers the cost.
func (s *state) relocate(a, k int) bool {
	m := s.m
	v := s.routes[a][k]
	_, costA, okA := s.without(a, k)
	if !okA {
		return false
	}
	gain := s.rcost[a] - costA // saved by taking v out
	bestD, bestR, bestPos := int64(0), -1, -1
	// Other routes: before or after one of v's nearest visits.
	for _, w := range m.near[v] {
		b := s.where[w]
		if b < 0 || b == a {
			continue
		}
		for _, j := range [2]int{s.pos[w], s.pos[w] + 1} {
			if c, ok := s.insertCost(b, j, v); ok && c-gain < bestD {
				bestD, bestR, bestPos = c-gain, b, j
			}
		}
	}
	// Within the route: the stretch between the old and the new place is
	// summed incrementally.
	rt := s.routes[a]
	L := len(rt)
	if L > 1 {
		// Earlier places j < k: fwd[j] + v + rt[j..k-1] + bwd[k+1].
		var mid solver.Seg
		for j := k - 1; j >= 0 && k-j <= intraReach; j-- {
			if j == k-1 {
				mid = m.unit[rt[j]]
			} else {
				mid = solver.JoinSeg(m.unit[rt[j]], mid, m.tt(rt[j], rt[j+1]))
			}
			x := solver.JoinSeg(s.fwd[a][j], m.unit[v], m.tt(s.prevNode(a, j), v))
			x = solver.JoinSeg(x, mid, m.tt(v, rt[j]))
			x = solver.JoinSeg(x, s.bwd[a][k+1], m.tt(rt[k-1], s.nextNode(a, k+1)))
			if m.ok(a, x) {
				if d := m.routeCost(x) - s.rcost[a]; d < bestD {
					bestD, bestR, bestPos = d, a, j
				}
			}
		}
		// Later places j > k: fwd[k] + rt[k+1..j] + v + bwd[j+1].
		var acc solver.Seg
		for j := k + 1; j < L && j-k <= intraReach; j++ {
			if j == k+1 {
				acc = solver.JoinSeg(s.fwd[a][k], m.unit[rt[j]], m.tt(s.prevNode(a, k), rt[j]))
			} else {
				acc = solver.JoinSeg(acc, m.unit[rt[j]], m.tt(rt[j-1], rt[j]))
			}
			if acc.TW > 0 {
				break
			}
			x := solver.JoinSeg(acc, m.unit[v], m.tt(rt[j], v))
			x = solver.JoinSeg(x, s.bwd[a][j+1], m.tt(v, s.nextNode(a, j+1)))
			if m.ok(a, x) {
				if d := m.routeCost(x) - s.rcost[a]; d < bestD {
					bestD, bestR, bestPos = d, a, j+1
				}
			}
		}
	}
	if bestR < 0 {
		return false
	}
	if bestR == a {
		nr := make([]int, 0, L)
		for j, w := range rt {
			if j == bestPos && bestPos < k {
				nr = append(nr, v)
			}
			if j != k {
				nr = append(nr, w)
			}
			if j+1 == bestPos && bestPos > k {
				nr = append(nr, v)
			}
		}
		s.routes[a] = nr
		s.refresh(a)
		return true
	}
	s.routes[a] = append(rt[:k:k], rt[k+1:]...)
	s.refresh(a)
	if len(s.routes[a]) == 0 {
		s.used--
	}
	s.insertAt(bestR, bestPos, v)
	return true
}

// replaced is route a's summary with its k-th visit replaced by w.
func (s *state) replaced(a, k, w int) solver.Seg {
	m := s.m
	x := solver.JoinSeg(s.fwd[a][k], m.unit[w], m.tt(s.prevNode(a, k), w))
	return solver.JoinSeg(x, s.bwd[a][k+1], m.tt(w, s.nextNode(a, k+1)))
}

// exchange swaps a visit of a changed route with one of its nearest
// visits in another route where that lowers the cost (first improvement).
func (s *state) exchange() bool {
	m := s.m
	improved := false
	for a := range s.routes {
		if !s.active[a] {
			continue
		}
		for i := 0; i < len(s.routes[a]); i++ {
			v := s.routes[a][i]
			for _, w := range m.near[v] {
				b := s.where[w]
				if b < 0 || b == a {
					continue
				}
				j := s.pos[w]
				if s.load[a]-m.dem[v]+m.dem[w] > m.veh[a].cap || s.load[b]-m.dem[w]+m.dem[v] > m.veh[b].cap {
					continue
				}
				xa := s.replaced(a, i, w)
				if !m.ok(a, xa) {
					continue
				}
				xb := s.replaced(b, j, v)
				if !m.ok(b, xb) {
					continue
				}
				if m.routeCost(xa)+m.routeCost(xb) < s.rcost[a]+s.rcost[b] {
					s.routes[a][i], s.routes[b][j] = w, v
					s.refresh(a)
					s.refresh(b)
					improved = true
					break
				}
			}
		}
	}
	return improved
}

// twoOptStar exchanges the tails of two routes whose vehicles end at the
// same place by the same time: for a visit v of a changed route and one of
// its nearest visits w in another, v's route goes on with w and what
// followed w, and w's route goes on with what followed v.
func (s *state) twoOptStar() bool {
	m := s.m
	improved := false
	for a := range s.routes {
		if !s.active[a] {
			continue
		}
		for i := 0; i < len(s.routes[a]); i++ {
			v := s.routes[a][i]
			for _, w := range m.near[v] {
				b := s.where[w]
				if b < 0 || b == a || m.veh[a].endSeg != m.veh[b].endSeg || m.veh[a].end != m.veh[b].end {
					continue
				}
				j := s.pos[w]
				ra, rb := s.routes[a], s.routes[b]
				headA, headB := s.pload[a][i+1], s.pload[b][j]
				if headA+(s.load[b]-headB) > m.veh[a].cap || headB+(s.load[a]-headA) > m.veh[b].cap {
					continue
				}
				xa := solver.JoinSeg(s.fwd[a][i+1], s.bwd[b][j], m.tt(v, w))
				if !m.ok(a, xa) {
					continue
				}
				xb := solver.JoinSeg(s.fwd[b][j], s.bwd[a][i+1], m.tt(s.prevNode(b, j), s.nextNode(a, i+1)))
				if !m.ok(b, xb) {
					continue
				}
				ca, cb := m.routeCost(xa), m.routeCost(xb)
				if j+len(ra)-(i+1) == 0 {
					cb = 0 // b is left with nothing
				}
				if ca+cb < s.rcost[a]+s.rcost[b] {
					na := append(append([]int{}, ra[:i+1]...), rb[j:]...)
					nb := append(append([]int{}, rb[:j]...), ra[i+1:]...)
					s.routes[a], s.routes[b] = na, nb
					s.refresh(a)
					s.refresh(b)
					s.countUsed()
					improved = true
					break
				}
			}
		}
	}
	return improved
}

// seqSeg is the summary of visits driven by vehicle r, and whether r can
// drive them (windows, longest day, capacity).
func (s *state) seqSeg(r int, visits []int) (solver.Seg, bool) {
	m := s.m
	x := m.veh[r].startSeg
	prev := m.veh[r].start
	var load int64
	for _, v := range visits {
		x = solver.JoinSeg(x, m.unit[v], m.tt(prev, v))
		if x.TW > 0 {
			return x, false
		}
		prev = v
		load += m.dem[v]
	}
	x = solver.JoinSeg(x, m.veh[r].endSeg, m.tt(prev, m.veh[r].end))
	return x, m.ok(r, x) && load <= m.veh[r].cap
}

// swapVehicles hands whole routes between vehicles of different kinds
// (one of them may be idle) where that lowers the cost.
func (s *state) swapVehicles() bool {
	m := s.m
	improved := false
	for a := range s.routes {
		if len(s.routes[a]) == 0 {
			continue
		}
		for b := range s.routes {
			if b == a || m.typeOf[a] == m.typeOf[b] || len(s.routes[b]) > 0 && b < a {
				continue
			}
			xa, okA := s.seqSeg(b, s.routes[a])
			if !okA {
				continue
			}
			cb := int64(0)
			if len(s.routes[b]) > 0 {
				xb, okB := s.seqSeg(a, s.routes[b])
				if !okB {
					continue
				}
				cb = m.routeCost(xb)
			}
			if m.routeCost(xa)+cb < s.rcost[a]+s.rcost[b] {
				s.routes[a], s.routes[b] = s.routes[b], s.routes[a]
				s.refresh(a)
				s.refresh(b)
				improved = true
			}
		}
	}
	return improved
}

// twoOpt reverses a stretch of route a (of up to intraReach visits) where
// that lowers the cost; the reversed stretch is summed again as it grows,
// so asymmetric travel is exact.
func (s *state) twoOpt(a int) bool {
	m := s.m
	improved := false
	rt := s.routes[a]
	for i := 0; i+1 < len(rt); i++ {
		if s.fwd[a][i].TW > 0 {
			break
		}
		rev := m.unit[rt[i]]
		for j := i + 1; j < len(rt) && j-i <= intraReach; j++ {
			rev = solver.JoinSeg(m.unit[rt[j]], rev, m.tt(rt[j], rt[j-1]))
			x := solver.JoinSeg(s.fwd[a][i], rev, m.tt(s.prevNode(a, i), rt[j]))
			if x.TW > 0 {
				continue
			}
			x = solver.JoinSeg(x, s.bwd[a][j+1], m.tt(rt[i], s.nextNode(a, j+1)))
			if m.ok(a, x) && m.routeCost(x) < s.rcost[a] {
				for l, r := i, j; l < r; l, r = l+1, r-1 {
					rt[l], rt[r] = rt[r], rt[l]
				}
				s.refresh(a)
				improved = true
				rev = m.unit[rt[i]]
				for k := i + 1; k <= j; k++ {
					rev = solver.JoinSeg(m.unit[rt[k]], rev, m.tt(rt[k], rt[k-1]))
				}
			}
		}
	}
	return improved
}

// crossMax is the longest stretch of visits a cross-exchange moves.
const crossMax = 3

// crossExchange swaps a stretch of up to crossMax visits of a changed
// route with a stretch of up to crossMax visits of another route, either
// of them possibly empty (Taillard et al. 1997, "A tabu search heuristic
// for the vehicle routing problem with soft time windows"). The stretch of
// route a that starts at visit v goes where a stretch of route b starts,
// beside one of v's nearest visits; the best such swap is made where it
// lowers the cost (one visit for one visit, or one visit moved alone, are
// exchange's and relocate's).
func (s *state) crossExchange() bool {
	improved := false
	for a := range s.routes {
		if !s.active[a] {
			continue
		}
	next:
		for i := 0; i < len(s.routes[a]); i++ {
			v := s.routes[a][i]
			for _, w := range s.m.near[v] {
				b := s.where[w]
				if b < 0 || b == a {
					continue
				}
				for _, j := range [2]int{s.pos[w], s.pos[w] + 1} {
					if s.cross(a, i, b, j) {
						improved = true
						continue next
					}
				}
			}
		}
	}
	return improved
}

// cross makes the best swap of route a's stretch from i with route b's
// stretch from j (each 0 to crossMax visits long), if one lowers the cost.
func (s *state) cross(a, i, b, j int) bool {
	m := s.m
	ra, rb := s.routes[a], s.routes[b]
	var sa, sb [crossMax + 1]solver.Seg
	la := min(crossMax, len(ra)-i)
	lb := min(crossMax, len(rb)-j)
	for k := 1; k <= la; k++ {
		if k == 1 {
			sa[1] = m.unit[ra[i]]
		} else {
			sa[k] = solver.JoinSeg(sa[k-1], m.unit[ra[i+k-1]], m.tt(ra[i+k-2], ra[i+k-1]))
		}
	}
	for k := 1; k <= lb; k++ {
		if k == 1 {
			sb[1] = m.unit[rb[j]]
		} else {
			sb[k] = solver.JoinSeg(sb[k-1], m.unit[rb[j+k-1]], m.tt(rb[j+k-2], rb[j+k-1]))
		}
	}
	// with is route r's cost with its stretch [p, p+lp) replaced by the
	// other route's stretch [q, q+lq) (summary x), and whether it holds.
	with := func(r, p, lp int, x solver.Seg, other []int, q, lq int) (int64, bool) {
		if len(s.routes[r])-lp+lq == 0 {
			return 0, true
		}
		var y solver.Seg
		if lq == 0 {
			y = solver.JoinSeg(s.fwd[r][p], s.bwd[r][p+lp], m.tt(s.prevNode(r, p), s.nextNode(r, p+lp)))
		} else {
			y = solver.JoinSeg(s.fwd[r][p], x, m.tt(s.prevNode(r, p), other[q]))
			if y.TW > 0 {
				return 0, false
			}
			y = solver.JoinSeg(y, s.bwd[r][p+lp], m.tt(other[q+lq-1], s.nextNode(r, p+lp)))
		}
		return m.routeCost(y), m.ok(r, y)
	}
	best, bestA, bestB := s.rcost[a]+s.rcost[b], -1, -1
	for x := 0; x <= la; x++ {
		if x > 0 && sa[x].TW > 0 {
			break
		}
		loadA := s.pload[a][i+x] - s.pload[a][i]
		for y := 0; y <= lb; y++ {
			if y > 0 && sb[y].TW > 0 {
				break
			}
			if x+y <= 1 || x == 1 && y == 1 {
				continue
			}
			loadB := s.pload[b][j+y] - s.pload[b][j]
			if s.load[a]-loadA+loadB > m.veh[a].cap || s.load[b]-loadB+loadA > m.veh[b].cap {
				continue
			}
			ca, okA := with(a, i, x, sb[y], rb, j, y)
			if !okA || ca >= best {
				continue
			}
			cb, okB := with(b, j, y, sa[x], ra, i, x)
			if okB && ca+cb < best {
				best, bestA, bestB = ca+cb, x, y
			}
		}
	}
	if bestA < 0 {
		return false
	}
	na := append(append(append(make([]int, 0, len(ra)-bestA+bestB), ra[:i]...), rb[j:j+bestB]...), ra[i+bestA:]...)
	nb := append(append(append(make([]int, 0, len(rb)-bestB+bestA), rb[:j]...), ra[i:i+bestA]...), rb[j+bestB:]...)
	s.routes[a], s.routes[b] = na, nb
	s.refresh(a)
	s.refresh(b)
	s.countUsed()
	return true
}

// markAllDirty has the next polish try moves on every route.
func (s *state) markAllDirty() {
	for r := range s.dirty {
		s.dirty[r] = true
	}
}
