package solver

// exactSlice re-optimises the order of the freed visits s.removed exactly,
// between the fixed parts of x where they were cut out (position a is where
// the slice began in x.r before removal). Depth-first search with window
// propagation: a partial order is dropped as soon as its penalised value
// plus a bound on the rest cannot beat the best complete order, or when a
// visit left over must come before the one just placed. It gives up (false)
// after nodeBudget search nodes, keeping x unchanged.
func (s *search) exactSlice(x *route, a int, nodeBudget int) bool {
	m := s.m
	rem := s.removed
	q := len(rem)
	if q == 0 || q > 16 {
		return false
	}
	before := x.fwd[a-1]
	after := x.bwd[a]
	lastBefore := x.r[a-1]
	firstAfter := x.r[a]
	// Cheapest arc into each freed visit and into the part after, from any
	// node that could precede it here: the bound on the rest.
	minIn := make([]int64, q+1)
	for i := 0; i <= q; i++ {
		to := firstAfter
		if i < q {
			to = rem[i]
		}
		best := m.arc(lastBefore, to)
		for j := 0; j < q; j++ {
			if j != i {
				if c := m.arc(rem[j], to); c < best {
					best = c
				}
			}
		}
		minIn[i] = best
	}
	var restBound int64
	for _, v := range minIn {
		restBound += v
	}
	bestVal := m.value(join(joinAll(m, before, rem, lastBefore), after, m.arc(rem[q-1], firstAfter)), s.lam)
	bestOrder := append([]int32(nil), rem...)
	order := make([]int32, 0, q)
	used := make([]bool, q)
	nodes := 0
	// The partial orders' summaries, one per depth, written in place
	// (passing 40-byte summaries by value is dear in WebAssembly).
	if cap(s.exactSegs) < q+1 {
		s.exactSegs = make([]seg, q+1)
	}
	segs := s.exactSegs[:q+1]
	segs[0] = before
	var dfs func(depth int, last int32, bound int64) bool
	dfs = func(depth int, last int32, bound int64) bool {
		nodes++
		if nodes > nodeBudget {
			return false
		}
		cur := &segs[depth]
		if len(order) == q {
			fd, ftw, fc := joinLast(cur, &after, m.arc(last, firstAfter))
			if v := m.valueOf(fd, ftw, fc, s.lam); v < bestVal-improveEps {
				bestVal = v
				copy(bestOrder, order)
			}
			return true
		}
		for i := 0; i < q; i++ {
			if used[i] {
				continue
			}
			v := rem[i]
			ok := true
			for j := 0; j < q; j++ {
				if !used[j] && j != i && m.mustBefore(int(rem[j]), int(v)) {
					ok = false
					break
				}
			}
			if !ok {
				continue
			}
			next := &segs[depth+1]
			next.d, next.tw, next.e, next.l, next.c = cur.d, cur.tw, cur.e, cur.l, cur.c
			m.pushBack(next, v, m.arc(last, v))
			nb := bound - minIn[i]
			if m.obj == TravelTime {
				if m.valueAt(next, s.lam)+float64(nb) >= bestVal-improveEps {
					continue
				}
			} else if m.valueAt(next, s.lam) >= bestVal-improveEps {
				continue
			}
			used[i] = true
			order = append(order, v)
			if !dfs(depth+1, v, nb) {
				return false
			}
			order = order[:len(order)-1]
			used[i] = false
		}
		return true
	}
	done := dfs(0, lastBefore, restBound)
	if !done {
		return false
	}
	b := append(s.ins[:0], x.r[:a]...)
	b = append(b, bestOrder...)
	b = append(b, x.r[a:]...)
	s.ins = b
	x.set(b)
	return true
}

func joinAll(m *model, s seg, vs []int32, last int32) seg {
	for _, v := range vs {
		s = join(s, m.unit(int(v)), m.arc(last, v))
		last = v
	}
	return s
}
