package solver

import (
	"context"
	"sort"
)

func sortStable(v []int, less func(a, b int) bool) {
	sort.SliceStable(v, func(i, j int) bool { return less(v[i], v[j]) })
}

// lateKey ranks lateness: total lateness, or with fewest the number of late
// visits first and total lateness second.
func lateKey(total int64, count int, fewest bool) int64 {
	if !fewest {
		return total
	}
	const cap = 1<<40 - 1
	if total > cap {
		total = cap
	}
	return int64(count)<<40 + total
}

// lateScore is the lateness key and cost of an instance route, as Evaluate
// counts them (late starts carry on late), without building a schedule.
func lateScore(in *Instance, r []int, obj Objective, fewest bool) (late, cost int64) {
	count := 0
	t := in.Early[r[0]]
	var travel int64
	n := in.N
	for k, v := range r {
		if k > 0 {
			a := in.Travel[r[k-1]*n+v]
			travel += a
			t += a
		}
		if t < in.Early[v] {
			t = in.Early[v]
		}
		if t > in.Late[v] {
			late += t - in.Late[v]
			count++
		}
		t += in.Service[v]
	}
	if in.Shape == Closed && len(r) > 1 {
		a := in.Travel[r[len(r)-1]*n+r[0]]
		travel += a
		t += a
		if t > in.Late[r[0]] {
			late += t - in.Late[r[0]]
			count++
		}
	}
	late = lateKey(late, count, fewest)
	if obj == CompletionTime {
		return late, t
	}
	return late, travel
}

// lateRange is the span of route positions a lateness search may reorder.
func (m *model) lateRange() (lo, hi int) {
	lo = len(m.prefix)
	hi = m.in.N - 1 - len(m.suffix)
	if m.in.Shape == OpenFixed {
		hi--
	}
	return lo, hi
}

// descendLateness relocates single visits, and swaps pairs, with full
// re-evaluation until no move lowers (lateness, cost). It gives up after
// maxEvals evaluations, or when halt (if set) says so: it is asked every
// 64 evaluations, each of which walks the whole route.
func descendLateness(m *model, r []int, obj Objective, maxEvals int, halt func() bool) (late, cost int64) {
	in := m.in
	lo, hi := m.lateRange()
	late, cost = lateScore(in, r, obj, m.fewest)
	cand := make([]int, len(r))
	evals, steps := 0, 0
	for improved := true; improved && evals < maxEvals; {
		improved = false
		for i := lo; i <= hi && evals < maxEvals; i++ {
			for j := lo; j <= hi; j++ {
				if j == i {
					continue
				}
				if steps++; steps&63 == 1 && halt != nil && halt() {
					return late, cost
				}
				copy(cand, r)
				v := cand[i]
				if i < j {
					copy(cand[i:j], cand[i+1:j+1])
				} else {
					copy(cand[j+1:i+1], cand[j:i])
				}
				cand[j] = v
				evals++
				if l, c := lateScore(in, cand, obj, m.fewest); l < late || l == late && c < cost {
					late, cost = l, c
					copy(r, cand)
					improved = true
				}
				if j > i {
					copy(cand, r)
					cand[i], cand[j] = cand[j], cand[i]
					evals++
					if l, c := lateScore(in, cand, obj, m.fewest); l < late || l == late && c < cost {
						late, cost = l, c
						copy(r, cand)
						improved = true
					}
				}
			}
		}
	}
	return late, cost
}

// lateSearch spends the rest of the run on a plan that no order can make
// feasible: iterated local search on total lateness, then cost.
func (s *search) lateSearch(ctx context.Context, e *engine) {
	m := s.m
	e.mu.Lock()
	cur := append([]int(nil), e.best.Route...)
	e.mu.Unlock()
	lo, hi := m.lateRange()
	if hi-lo < 1 {
		return
	}
	evals := max(2000, min(40000, 4_000_000/len(cur)))
	halt := func() bool { return e.interrupted(ctx) }
	curL, curC := descendLateness(m, cur, m.obj, evals, halt)
	e.offerExternal(cur, "lateness")
	x := make([]int, len(cur))
	for {
		goOn, _ := e.tick(ctx)
		if !goOn {
			return
		}
		copy(x, cur)
		kicks := 1 + s.rng.Intn(3)
		for k := 0; k < kicks; k++ {
			i := lo + s.rng.Intn(hi-lo+1)
			j := lo + s.rng.Intn(hi-lo+1)
			x[i], x[j] = x[j], x[i]
		}
		l, c := descendLateness(m, x, m.obj, evals, halt)
		if l < curL || l == curL && c <= curC {
			if l < curL || c < curC {
				e.offerExternal(x, "lateness")
			}
			copy(cur, x)
			curL, curC = l, c
		}
	}
}

// minimiseLateness is the last polish of an infeasible best plan; halt
// (when set) ends it early, with the best order found so far.
func minimiseLateness(m *model, route []int, obj Objective, halt func() bool) Plan {
	r := append([]int(nil), route...)
	descendLateness(m, r, obj, max(2000, 20_000_000/len(r)), halt)
	s := Evaluate(m.in, r)
	return Plan{Route: r, Schedule: s, Cost: s.Cost(obj), Feasible: s.Feasible}
}
