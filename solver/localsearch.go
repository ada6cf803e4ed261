package solver

// Local search polish: or-opt (move a stretch of 1-3 visits, also reversed),
// 2-opt (reverse a stretch; asymmetric travel is summed again for the
// reversed stretch, incrementally) and swap of two visits. Every candidate is
// judged in constant time by joining summaries: the part before, the moved
// stretch, the part between (grown one node at a time as the scan goes on),
// and the part after.

import "visitline/solver/turn"

const improveEps = 1e-7

type polisher struct {
	m       *model
	x       *route
	lam     float64
	maxScan int // how far a stretch may move, in positions
	buf     []int32
	moves   int
	// halt, when set, is asked between passes (and within them, see
	// stopNow) whether to stop at once.
	halt  func() bool
	steps int
	// active marks the nodes whose surroundings changed ("don't look
	// bits"): a node stays quiet until a move touches an arc next to it.
	active []bool
}

// wake marks every node active.
func (p *polisher) wakeAll() {
	if len(p.active) < p.m.n {
		p.active = make([]bool, p.m.n)
	}
	for i := range p.active {
		p.active[i] = true
	}
}

// wakeAround marks the nodes at route positions i-1, i, i+1.
func (p *polisher) wakeAround(i int) {
	r := p.x.r
	for k := i - 1; k <= i+1; k++ {
		if k >= 0 && k < len(r) {
			p.active[r[k]] = true
		}
	}
}

// stopNow asks halt, within a pass, whether to stop at once: every 64
// positions natively (so that a pass over a large route keeps the budget),
// every 16 under GOOS=js, where halt also gives the host its turns when
// they are due. A position costs at most a few thousand joins (tens of
// microseconds in WebAssembly), so 16 of them stay far inside a turn;
// asking at every position cost the WebAssembly build a clock reading, a
// call into JavaScript, per position, most of which are skipped as quiet.
func (p *polisher) stopNow() bool {
	if p.halt == nil {
		return false
	}
	p.steps++
	if p.steps&63 != 0 && (!turn.Enabled || p.steps&15 != 0) {
		return false
	}
	return p.halt()
}

// run improves x until no move helps or budget moves were made.
func (p *polisher) run(budget int) {
	for p.moves < budget {
		if p.halt != nil && p.halt() {
			return
		}
		improved := false
		if p.orOpt() {
			improved = true
		}
		if p.twoOpt() {
			improved = true
		}
		if !improved && p.swap() {
			improved = true
		}
		if !improved {
			return
		}
	}
}

// hasBefore reports whether some node of r[a..b] must come before node v.
func (p *polisher) anyMustBefore(a, b int, v int32) bool {
	m := p.m
	for k := a; k <= b; k++ {
		if m.mustBefore(int(p.x.r[k]), int(v)) {
			return true
		}
	}
	return false
}

// mustPrecedeAny reports whether v must come before some node of r[a..b].
func (p *polisher) mustPrecedeAny(v int32, a, b int) bool {
	m := p.m
	for k := a; k <= b; k++ {
		if m.mustBefore(int(v), int(p.x.r[k])) {
			return true
		}
	}
	return false
}

func (p *polisher) orOpt() bool {
	x, m := p.x, p.m
	gran := m.granular()
	improvedAny := false
	for i := 1; i <= len(x.r)-2; i++ {
		if p.stopNow() {
			return improvedAny
		}
		if !p.active[x.r[i]] {
			continue
		}
		found := false
		for L := 1; L <= 3 && i+L-1 <= len(x.r)-2 && !found; L++ {
			j := i + L - 1
			cur := m.valueAt(&x.fwd[len(x.r)-1], p.lam)
			for rev := 0; rev < 2; rev++ {
				if rev == 1 && L == 1 {
					break
				}
				var S seg
				if rev == 0 {
					x.segInto(&S, i, j)
				} else {
					x.revInto(&S, i, j)
				}
				sf, sz := x.r[i], x.r[j]
				if rev == 1 {
					sf, sz = sz, sf
				}
				// The route, its summaries and the matrix in locals, and
				// the arc that closes the gap left by the stretch, read
				// once (see bestInsert).
				r, fwd, bwd := x.r, x.fwd[:len(x.r)], x.bwd[:len(x.r)]
				t32, t64, n := m.t32, m.t64, m.n
				gap := travelAt(t32, t64, int(r[i-1])*n+int(r[j+1]))
				// Backward: insert between r[q] and r[q+1], q < i-1. The
				// stretch between, mid, grows by one node a step (pushFront
				// written out on five locals: most steps go no further than
				// the candidate test, and a call per step is dear in
				// WebAssembly).
				var mid seg
				var md, mtw, me, ml, mc int64
				for q := i - 2; q >= 0 && i-1-q <= p.maxScan; q-- {
					nd := r[q+1]
					ud, utw, ue, ul, uc := m.unitOf(nd)
					if q == i-2 {
						md, mtw, me, ml, mc = ud, utw, ue, ul, uc
					} else {
						t := travelAt(t32, t64, int(nd)*n+int(r[q+2]))
						dl := ud - utw + t
						wt := max(me-dl-ul, 0)
						w := max(ue+dl-ml, 0)
						md, mtw, me, ml, mc = ud+md+t+wt, utw+mtw+w, max(me-dl, ue)-wt, min(ml-dl, ul)+w, uc+mc+t
					}
					if p.anyMustBeforeNode(nd, i, j) {
						break
					}
					if gran && !m.candArc(r[q], sf) && !m.candArc(sz, nd) {
						continue
					}
					mid.d, mid.tw, mid.e, mid.l, mid.c = md, mtw, me, ml, mc
					sd, stw, sc := joinTriple(&fwd[q], &S, &mid, &bwd[j+1], travelAt(t32, t64, int(r[q])*n+int(sf)), travelAt(t32, t64, int(sz)*n+int(nd)), gap)
					if m.valueOf(sd, stw, sc, p.lam) < cur-improveEps {
						p.applyOr(i, j, q, rev == 1)
						improvedAny, found = true, true
						goto next
					}
				}
				// Forward: insert between r[q] and r[q+1], q > j.
				for q := j + 1; q <= len(r)-2 && q-j <= p.maxScan; q++ {
					nd := r[q]
					ud, utw, ue, ul, uc := m.unitOf(nd)
					if q == j+1 {
						md, mtw, me, ml, mc = ud, utw, ue, ul, uc
					} else {
						// pushBack written out, as above.
						t := travelAt(t32, t64, int(r[q-1])*n+int(nd))
						dl := md - mtw + t
						wt := max(ue-dl-ml, 0)
						w := max(me+dl-ul, 0)
						md, mtw, me, ml, mc = md+ud+t+wt, mtw+utw+w, max(ue-dl, me)-wt, min(ul-dl, ml)+w, mc+uc+t
					}
					if p.mustPrecedeAnyNode(i, j, nd) {
						break
					}
					if gran && !m.candArc(nd, sf) && !m.candArc(sz, r[q+1]) {
						continue
					}
					mid.d, mid.tw, mid.e, mid.l, mid.c = md, mtw, me, ml, mc
					sd, stw, sc := joinTriple(&fwd[i-1], &mid, &S, &bwd[q+1], gap, travelAt(t32, t64, int(nd)*n+int(sf)), travelAt(t32, t64, int(sz)*n+int(r[q+1])))
					if m.valueOf(sd, stw, sc, p.lam) < cur-improveEps {
						p.applyOr(i, j, q, rev == 1)
						improvedAny, found = true, true
						goto next
					}
				}
			}
		next:
		}
		if !found {
			p.active[x.r[i]] = false
		}
	}
	return improvedAny
}

// anyMustBeforeNode: moving r[i..j] in front of nd is impossible when nd
// must come before one of them.
func (p *polisher) anyMustBeforeNode(nd int32, i, j int) bool {
	return p.mustPrecedeAny(nd, i, j)
}

// mustPrecedeAnyNode: moving r[i..j] behind nd is impossible when one of
// them must come before nd.
func (p *polisher) mustPrecedeAnyNode(i, j int, nd int32) bool {
	return p.anyMustBefore(i, j, nd)
}

// applyOr moves r[i..j] (reversed if rev) to sit between r[q] and r[q+1].
func (p *polisher) applyOr(i, j, q int, rev bool) {
	x := p.x
	p.wakeAround(i)
	p.wakeAround(j)
	p.wakeAround(q)
	p.wakeAround(q + 1)
	b := p.buf[:0]
	segm := make([]int32, 0, j-i+1)
	if rev {
		for k := j; k >= i; k-- {
			segm = append(segm, x.r[k])
		}
	} else {
		segm = append(segm, x.r[i:j+1]...)
	}
	if q < i {
		b = append(b, x.r[:q+1]...)
		b = append(b, segm...)
		b = append(b, x.r[q+1:i]...)
		b = append(b, x.r[j+1:]...)
	} else {
		b = append(b, x.r[:i]...)
		b = append(b, x.r[j+1:q+1]...)
		b = append(b, segm...)
		b = append(b, x.r[q+1:]...)
	}
	p.buf = b
	lo, hi := min(i, q+1), max(j, q)
	x.setSpan(b, lo, hi)
	p.moves++
}

func (p *polisher) twoOpt() bool {
	x, m := p.x, p.m
	gran := m.granular()
	improvedAny := false
	feasible := x.total().tw == 0
	for i := 1; i < len(x.r)-2; i++ {
		if p.stopNow() {
			return improvedAny
		}
		if !p.active[x.r[i]] && !p.active[x.r[i-1]] {
			continue
		}
		cur := m.valueAt(&x.fwd[len(x.r)-1], p.lam)
		// The reversed stretch r[j..i], grown by one node a step on five
		// locals (pushFront written out, as in orOpt).
		var rev seg
		rd, rtw, re, rl, rc := m.unitOf(x.r[i])
		t32, t64, n := m.t32, m.t64, m.n
		for j := i + 1; j <= len(x.r)-2 && j-i <= p.maxScan; j++ {
			ud, utw, ue, ul, uc := m.unitOf(x.r[j])
			t := travelAt(t32, t64, int(x.r[j])*n+int(x.r[j-1]))
			dl := ud - utw + t
			wt := max(re-dl-ul, 0)
			w := max(ue+dl-rl, 0)
			rd, rtw, re, rl, rc = ud+rd+t+wt, utw+rtw+w, max(re-dl, ue)-wt, min(rl-dl, ul)+w, uc+rc+t
			if feasible && rtw > 0 {
				break // longer reversals from i only add warp
			}
			if gran && !m.candArc(x.r[i-1], x.r[j]) && !m.candArc(x.r[i], x.r[j+1]) {
				continue
			}
			rev.d, rev.tw, rev.e, rev.l, rev.c = rd, rtw, re, rl, rc
			sd, stw, sc := joinPair(&x.fwd[i-1], &rev, &x.bwd[j+1], m.arc(x.r[i-1], x.r[j]), m.arc(x.r[i], x.r[j+1]))
			if m.valueOf(sd, stw, sc, p.lam) < cur-improveEps {
				p.wakeAround(i)
				p.wakeAround(j)
				b := append(p.buf[:0], x.r...)
				for a, c := i, j; a < c; a, c = a+1, c-1 {
					b[a], b[c] = b[c], b[a]
				}
				p.buf = b
				x.setSpan(b, i, j)
				p.moves++
				improvedAny = true
				feasible = x.total().tw == 0
				cur = m.valueAt(&x.fwd[len(x.r)-1], p.lam)
				break
			}
		}
	}
	return improvedAny
}

func (p *polisher) swap() bool {
	x, m := p.x, p.m
	improvedAny := false
	for i := 1; i < len(x.r)-2; i++ {
		if p.stopNow() {
			return improvedAny
		}
		if !p.active[x.r[i]] {
			continue
		}
		cur := m.valueAt(&x.fwd[len(x.r)-1], p.lam)
		a := x.r[i]
		var ua, ub, mid seg
		m.setUnit(&ua, a)
		for j := i + 1; j <= len(x.r)-2 && j-i <= p.maxScan; j++ {
			b := x.r[j]
			m.setUnit(&ub, b)
			var sd, stw, sc int64
			if j == i+1 {
				sd, stw, sc = joinTriple(&x.fwd[i-1], &ub, &ua, &x.bwd[j+1], m.arc(x.r[i-1], b), m.arc(b, a), m.arc(a, x.r[j+1]))
			} else {
				nd := x.r[j-1]
				if j == i+2 {
					m.setUnit(&mid, nd)
				} else {
					m.pushBack(&mid, nd, m.arc(x.r[j-2], nd))
				}
				var s seg
				joinInto(&s, &x.fwd[i-1], &ub, m.arc(x.r[i-1], b))
				sd, stw, sc = joinTriple(&s, &mid, &ua, &x.bwd[j+1], m.arc(b, x.r[i+1]), m.arc(nd, a), m.arc(a, x.r[j+1]))
			}
			if m.valueOf(sd, stw, sc, p.lam) < cur-improveEps {
				p.wakeAround(i)
				p.wakeAround(j)
				bf := append(p.buf[:0], x.r...)
				bf[i], bf[j] = bf[j], bf[i]
				p.buf = bf
				x.setSpan(bf, i, j)
				p.moves++
				improvedAny = true
				break
			}
			if m.mustBefore(int(a), int(b)) {
				break // a may not move behind b, nor any later node
			}
		}
	}
	return improvedAny
}
