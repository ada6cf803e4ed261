package solver

import (
	"context"
	"math"

	"visitline/solver/turn"
)

// Adaptive weights (Ropke and Pisinger, Transportation Science 40(4), 2006):
// an operator scores when its result is a new best, better than the current
// plan, or accepted; every segment the weights move toward the scores.
var tempFactor = 0.01
var qFrac = 1

const (
	scoreBest     = 33
	scoreBetter   = 9
	scoreAccepted = 13
	segmentLength = 100
	reaction      = 0.2
)

// work runs one worker until the engine says stop.
func (e *engine) work(ctx context.Context, id int, seed int64) {
	m := e.m
	s := newSearch(m, seed)
	if len(m.movable) > 150 || turn.Enabled {
		s.pol.halt = func() bool { return e.interrupted(ctx) }
	}
	if m.free {
		// No window can bind: a travelling salesman day.
		s.openSearch(ctx, e)
		return
	}
	e.mu.Lock()
	s.weights = append([]float64(nil), e.weights...)
	e.mu.Unlock()
	s.fixed = e.set.FixedMix
	s.scores = make([]float64, len(Operators))
	s.uses = make([]int, len(Operators))
	base := append([]float64(nil), s.weights...)

	// Scale for penalties and temperatures: the mean feasible arc.
	var arcSum float64
	arcN := 0
	for i := 0; i < m.n*m.n && arcN < 200000; i++ {
		if m.arcOK(i/m.n, i%m.n) {
			arcSum += float64(m.tk(i))
			arcN++
		}
	}
	meanArc := 1.0
	if arcN > 0 && arcSum > 0 {
		meanArc = arcSum / float64(arcN)
	}

	// Construction: windows by latest start, then drive time warp to zero.
	s.cur = newRoute(m, constructOrder(m))
	starts := []func(*model) []int32{greedyOrder}
	if len(m.movable) >= nearestStartMin {
		starts = append(starts, nearestOrder)
	}
	for _, order := range starts {
		// Each other start is quadratic: past the budget, or once the run
		// is stopped, the first order has to do (at 5,000 sites the two
		// others were a tenth of a second natively, half a second in
		// WebAssembly, between a Stop and the run's end).
		if e.pastBudget() || ctx.Err() != nil {
			break
		}
		if alt := newRoute(m, order(m)); alt.total().tw < s.cur.total().tw ||
			alt.total().tw == s.cur.total().tw && m.cost(alt.total()) < m.cost(s.cur.total()) {
			s.cur = alt
		}
	}
	s.lam = 1000
	s.pol.x, s.pol.lam = s.cur, s.lam
	s.pol.moves = 0
	s.pol.wakeAll()
	s.pol.run(1 << 30)
	e.offer(s.cur, "construct")
	if s.cur.total().tw > 0 {
		s.findFeasible(ctx, e)
	}
	if m.infeas {
		// Tightening proved that no order meets every window: spend the
		// run on the least lateness.
		s.lateSearch(ctx, e)
		return
	}
	s.lam = math.Max(1, meanArc*0.5)
	if m.infeas {
		s.lam = 1000
	}
	s.tmp = newRoute(m, s.cur.r)
	bestLocal := newRoute(m, s.cur.r)

	curVal := m.value(s.cur.total(), s.lam)
	temp0 := tempFactor * math.Max(1, float64(m.cost(s.cur.total())))
	temp := temp0
	sinceBest := 0
	restartAfter := 2000 + 20*len(m.movable)
	segIter := 0
	for {
		goOn, mix := e.tick(ctx)
		if !goOn {
			return
		}
		if mix != nil {
			s.weights = append(s.weights[:0], mix...)
			base = append(base[:0], mix...)
			for i := range s.scores {
				s.scores[i], s.uses[i] = 0, 0
			}
		}
		op := s.pick()
		q := s.qSize()
		x := s.tmp
		x.set(s.cur.r)
		at := s.destroy(x, op, q)
		repaired := false
		if at > 0 && len(s.removed) <= 10 {
			repaired = s.exactSlice(x, at, s.exactNodes)
		}
		if !repaired {
			switch s.rng.Intn(3) {
			case 0:
				s.repairInsert(x, 1, 0.1)
			case 1:
				s.repairInsert(x, 2, 0)
			default:
				s.repairInsert(x, 3, 0.05)
			}
		}
		s.pol.x, s.pol.lam = x, s.lam
		s.pol.moves = 0
		s.wakeRemoved(x)
		s.pol.run(50 + len(m.movable))
		val := m.value(x.total(), s.lam)

		score := 0.0
		accepted := false
		if val < curVal-improveEps {
			accepted = true
			score = scoreBetter
		} else if temp > 0 && s.rng.Float64() < math.Exp(-(val-curVal)/temp) {
			accepted = true
			score = scoreAccepted
		}
		if e.offer(x, Operators[op]) {
			score = scoreBest
			sinceBest = 0
		} else {
			sinceBest++
		}
		xt := x.total()
		bt := bestLocal.total()
		if xt.tw < bt.tw || xt.tw == bt.tw && m.cost(xt) < m.cost(bt) {
			bestLocal.set(x.r)
		}
		if accepted {
			s.cur, s.tmp = x, s.cur
			curVal = val
		}
		// Penalty: raise it while the current plan stays late, ease it
		// while it keeps every window.
		if s.cur.total().tw > 0 {
			s.lam = math.Min(s.lam*1.05, 1e6)
		} else {
			s.lam = math.Max(s.lam*0.98, 0.05*meanArc)
		}
		curVal = m.value(s.cur.total(), s.lam)
		if !s.fixed {
			s.scores[op] += score
			s.uses[op]++
			segIter++
			if segIter >= segmentLength {
				segIter = 0
				s.adapt(base)
			}
		}
		temp *= 0.999
		if sinceBest >= restartAfter || temp < temp0*1e-3 {
			// Restart from the best known (shared between workers).
			if r := e.sharedBest(bestLocal.total().tw, m.cost(bestLocal.total())); r != nil {
				bestLocal.set(r)
			}
			s.cur.set(bestLocal.r)
			curVal = m.value(s.cur.total(), s.lam)
			temp = temp0
			sinceBest = 0
		}
	}
}

// wakeRemoved marks the reinserted visits and their neighbours in x for
// the polish; the rest of the route was a local optimum already.
func (s *search) wakeRemoved(x *route) {
	p := &s.pol
	if len(p.active) < s.m.n {
		p.active = make([]bool, s.m.n)
	}
	for i := range p.active {
		p.active[i] = false
	}
	for _, v := range s.removed {
		s.inRem[v] = true
	}
	for i, v := range x.r {
		if s.inRem[v] {
			p.wakeAround(i)
		}
	}
	for _, v := range s.removed {
		s.inRem[v] = false
	}
}

// pick draws a destroy operator by weight.
func (s *search) pick() int {
	var sum float64
	for _, w := range s.weights {
		sum += w
	}
	r := s.rng.Float64() * sum
	for i, w := range s.weights {
		if r < w {
			return i
		}
		r -= w
	}
	for i := len(s.weights) - 1; i >= 0; i-- {
		if s.weights[i] > 0 {
			return i
		}
	}
	return 0
}

// adapt moves weights toward recent scores; an operator the user set to 0
// stays off, and none falls below a tenth of its share of the user's mix.
func (s *search) adapt(base []float64) {
	var bsum float64
	for _, w := range base {
		bsum += w
	}
	for i := range s.weights {
		if base[i] <= 0 {
			s.weights[i] = 0
			continue
		}
		if s.uses[i] > 0 {
			s.weights[i] = (1-reaction)*s.weights[i] + reaction*s.scores[i]/float64(s.uses[i])
		}
		floor := 0.1 * base[i] / bsum * sumOf(s.weights)
		if s.weights[i] < floor {
			s.weights[i] = floor
		}
		s.scores[i], s.uses[i] = 0, 0
	}
}

func sumOf(w []float64) float64 {
	var s float64
	for _, x := range w {
		s += x
	}
	return s
}

func maxInt(a, b int) int {
	if a > b {
		return a
	}
	return b
}

// constructOrder sorts the movable visits by latest start, then earliest.
func constructOrder(m *model) []int32 {
	vs := append([]int(nil), m.movable...)
	sortStable(vs, func(a, b int) bool {
		if m.l[a] != m.l[b] {
			return m.l[a] < m.l[b]
		}
		return m.e[a] < m.e[b]
	})
	r := make([]int32, 0, len(vs)+2)
	r = append(r, int32(m.start))
	for _, v := range vs {
		r = append(r, int32(v))
	}
	return append(r, int32(m.end))
}

// nearestStartMin is the fewest movable visits for which the nearest
// neighbour tour is tried as a start: on big days with loose windows the
// orders by window are long zigzags, far from any plan that meets them.
const nearestStartMin = 500

// nearestOrder is the nearest-neighbour route by travel alone, windows
// ignored: a start fit for days whose windows are loose.
func nearestOrder(m *model) []int32 {
	n := m.n
	used := make([]bool, n)
	r := make([]int32, 0, len(m.movable)+2)
	r = append(r, int32(m.start))
	cur := m.start
	for len(r) <= len(m.movable) {
		turn.Due()
		next := -1
		for _, v := range m.movable {
			if !used[v] && (next < 0 || m.tk(cur*n+v) < m.tk(cur*n+next)) {
				next = v
			}
		}
		used[next] = true
		r = append(r, int32(next))
		cur = next
	}
	return append(r, int32(m.end))
}

// warpPositions lists the route positions where time warp arises.
func warpPositions(x *route) []int {
	var out []int
	for i := 1; i < len(x.r); i++ {
		if x.fwd[i].tw > x.fwd[i-1].tw {
			out = append(out, i)
		}
	}
	if len(out) > 0 && out[len(out)-1] == len(x.r)-1 {
		out[len(out)-1] = len(x.r) - 2 // the end cannot move: move the last visit
	}
	return out
}

// greedyOrder builds a route forward in time: next comes the visit that can
// start soonest, unless some visit would miss its latest start by waiting
// one more step, in which case the most urgent goes first.
func greedyOrder(m *model) []int32 {
	n := m.n
	left := append([]int(nil), m.movable...)
	r := make([]int32, 0, len(left)+2)
	r = append(r, int32(m.start))
	cur, t := m.start, m.startAt+m.s[m.start]
	for len(left) > 0 {
		turn.Due()
		bi, bs := -1, int64(0)
		ui, us := -1, int64(0)
		for i, v := range left {
			arr := t + m.tk(cur*n+v)
			st := max(arr, m.e[v])
			if bi < 0 || st < bs {
				bi, bs = i, st
			}
			if slack := m.l[v] - arr; ui < 0 || slack < us {
				ui, us = i, slack
			}
		}
		pick := bi
		// Going to the soonest first would make the most urgent late.
		v := left[bi]
		if ui != bi && bs+m.s[v]+m.tk(v*n+left[ui]) > m.l[left[ui]] {
			pick = ui
		}
		v = left[pick]
		arr := t + m.tk(cur*n+v)
		t = max(arr, m.e[v]) + m.s[v]
		cur = v
		r = append(r, int32(v))
		left[pick] = left[len(left)-1]
		left = left[:len(left)-1]
	}
	return append(r, int32(m.end))
}

// findFeasible perturbs and polishes with a heavy penalty until the time warp
// is gone, the instance is known infeasible, or the engine stops
// (da Silva and Urrutia, Discrete Optimization 7(4), 2010, in spirit: a
// variable neighbourhood search on lateness).
func (s *search) findFeasible(ctx context.Context, e *engine) {
	m := s.m
	bestTW := s.cur.total().tw
	best := newRoute(m, s.cur.r)
	x := newRoute(m, s.cur.r)
	level := 1
	for tries := 0; bestTW > 0 && tries < 200000; tries++ {
		// Each round counts as an iteration, so that every budget holds.
		if goOn, _ := e.tick(ctx); !goOn {
			break
		}
		x.set(best.r)
		k := len(x.r) - 2
		if k < 2 {
			return
		}
		// Shake: move `level` visits, half of them where the warp is, to
		// a place nearby (or anywhere, now and then); then polish only
		// around what moved.
		p := &s.pol
		if len(p.active) < m.n {
			p.active = make([]bool, m.n)
		}
		for i := range p.active {
			p.active[i] = false
		}
		for i := 0; i < level; i++ {
			a := 1 + s.rng.Intn(k)
			if s.rng.Intn(2) == 0 {
				if late := warpPositions(x); len(late) > 0 {
					a = late[s.rng.Intn(len(late))]
				}
			}
			var b int
			if s.rng.Intn(4) == 0 {
				b = 1 + s.rng.Intn(k)
			} else {
				b = a - 1 - s.rng.Intn(min(30, k))
				if s.rng.Intn(3) == 0 {
					b = a + 1 + s.rng.Intn(min(30, k))
				}
				b = max(1, min(k, b))
			}
			if a == b {
				continue
			}
			p.x = x
			p.wakeAround(a)
			v := x.r[a]
			r := append([]int32(nil), x.r...)
			r = append(r[:a], r[a+1:]...)
			r = append(r[:b], append([]int32{v}, r[b:]...)...)
			x.set(r)
			p.wakeAround(b)
		}
		s.pol.x, s.pol.lam = x, 1e6
		s.pol.moves = 0
		s.pol.run(1 << 30)
		if tw := x.total().tw; tw < bestTW {
			bestTW = tw
			best.set(x.r)
			level = 1
			e.offer(best, "construct")
		} else if level < 8 {
			level++
		} else {
			level = 1
		}
		if m.infeas && tries > 200 || tries > 5000 && tries > 50*len(m.movable) {
			break
		}
	}
	s.cur.set(best.r)
}
