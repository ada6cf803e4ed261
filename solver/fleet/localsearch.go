package fleet

import "visitline/solver"

// polish improves the plan by first-improvement local search until no
// move helps: relocate a visit (within its route or to another), exchange
// two visits of different routes, and 2-opt* (swap the tails of two routes
// that end at the same place). Every move is judged in constant time (or,
// for a relocation within a route, by one incremental scan) with the
// routes' segment summaries; only moves that keep every route feasible
// are made.
func (s *state) polish() {
	for round := 0; round < 50; round++ {
		improved := false
		for r := range s.routes {
			for k := 0; k < len(s.routes[r]); k++ {
				if s.relocate(r, k) {
					improved = true
				}
			}
		}
		if s.exchange() {
			improved = true
		}
		if s.twoOptStar() {
			improved = true
		}
		if !improved {
			return
		}
	}
}

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
	for b := range s.routes {
		if b == a {
			continue
		}
		if len(s.routes[b]) == 0 {
			continue // opening a vehicle is the repair's choice
		}
		c, pos, ok := s.bestInsert(b, v)
		if ok && c-gain < bestD {
			bestD, bestR, bestPos = c-gain, b, pos
		}
	}
	// Within the route: the stretch between the old and the new place is
	// summed incrementally.
	rt := s.routes[a]
	L := len(rt)
	if L > 1 {
		// Earlier places j < k: fwd[j] + v + rt[j..k-1] + bwd[k+1].
		var mid solver.Seg
		for j := k - 1; j >= 0; j-- {
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
		for j := k + 1; j < L; j++ {
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

// exchange swaps two visits of different routes where that lowers the
// cost (first improvement).
func (s *state) exchange() bool {
	m := s.m
	improved := false
	for a := range s.routes {
		for b := a + 1; b < len(s.routes); b++ {
			if len(s.routes[a]) == 0 || len(s.routes[b]) == 0 {
				continue
			}
		scan:
			for i := 0; i < len(s.routes[a]); i++ {
				v := s.routes[a][i]
				for j := 0; j < len(s.routes[b]); j++ {
					w := s.routes[b][j]
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
						continue scan
					}
				}
			}
		}
	}
	return improved
}

// twoOptStar exchanges the tails of two routes whose vehicles end at the
// same place by the same time: route a keeps its first i visits and takes
// b's visits from j on, and b the other way round.
func (s *state) twoOptStar() bool {
	m := s.m
	improved := false
	for a := range s.routes {
		for b := a + 1; b < len(s.routes); b++ {
			if len(s.routes[a]) == 0 || len(s.routes[b]) == 0 || m.veh[a].endSeg != m.veh[b].endSeg || m.veh[a].end != m.veh[b].end {
				continue
			}
		again:
			ra, rb := s.routes[a], s.routes[b]
			var headA int64
			for i := 0; i <= len(ra); i++ {
				if i > 0 {
					headA += m.dem[ra[i-1]]
				}
				if s.fwd[a][i].TW > 0 {
					break
				}
				var headB int64
				for j := 0; j <= len(rb); j++ {
					if j > 0 {
						headB += m.dem[rb[j-1]]
					}
					if i == len(ra) && j == len(rb) || i == 0 && j == 0 {
						continue
					}
					if headA+(s.load[b]-headB) > m.veh[a].cap || headB+(s.load[a]-headA) > m.veh[b].cap {
						continue
					}
					xa := solver.JoinSeg(s.fwd[a][i], s.bwd[b][j], m.tt(s.prevNode(a, i), s.nextNode(b, j)))
					if !m.ok(a, xa) {
						continue
					}
					xb := solver.JoinSeg(s.fwd[b][j], s.bwd[a][i], m.tt(s.prevNode(b, j), s.nextNode(a, i)))
					if !m.ok(b, xb) {
						continue
					}
					ca, cb := m.routeCost(xa), m.routeCost(xb)
					if i == 0 && j == len(rb) {
						ca = 0
					}
					if j == 0 && i == len(ra) {
						cb = 0
					}
					if i+len(rb)-j == 0 {
						ca = 0
					}
					if j+len(ra)-i == 0 {
						cb = 0
					}
					if ca+cb < s.rcost[a]+s.rcost[b] {
						na := append(append([]int{}, ra[:i]...), rb[j:]...)
						nb := append(append([]int{}, rb[:j]...), ra[i:]...)
						s.routes[a], s.routes[b] = na, nb
						s.refresh(a)
						s.refresh(b)
						s.countUsed()
						improved = true
						goto again
					}
				}
			}
		}
	}
	return improved
}
