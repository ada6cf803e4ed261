package bound

import (
	"context"

	"visitline/solver"
)

// Reduced-cost elimination of arcs by route index (in the manner of the
// fixing used by exact methods for routing with time windows, e.g.
// Baldacci, Mingozzi and Roberti 2012, INFORMS Journal on Computing 24(3);
// Irnich, Desaulniers, Desrosiers and Hadjar 2010, "Path-reduced costs for
// eliminating arcs in routing and scheduling", INFORMS Journal on Computing
// 22(2)). Under one set of penalties, the backward tables give the least
// penalised relaxed completion from j at each time, and the same tables
// built on the reversed day give the least penalised relaxed prefix that
// reaches i by each time. Their sum across an arc i→j taken from route index
// k is a lower bound on every route that takes that arc there; when it is at
// least the cost u of a feasible route, no route cheaper than u does, and the
// arc is removed at that index for good. Every bound computed afterwards
// holds for the routes cheaper than u only, so it is reported as
// min(u, bound) (prob.elimUB), which stays a valid bound on the optimum.

// elimOK says whether elimination applies: the travel objective on a closed
// tour without pins other than the start (the reversal below handles that
// case), and days small enough for a cubic bit set.
func elimOK(p *prob, obj solver.Objective) bool {
	return obj == solver.TravelTime && p.shape == solver.Closed && !p.pinned && p.end < 0 && p.n > 2 && p.n <= mediumN && p.minPos != nil
}

// eliminated says whether arc i→j is removed when taken from route index k
// (j at index k+1, or the return when j is the start).
func (p *prob) eliminated(k, i, j int) bool {
	if p.elim == nil {
		return false
	}
	b := (k*p.n+i)*p.n + j
	return p.elim[b>>6]&(1<<(uint(b)&63)) != 0
}

// reversed builds the day run backwards for the relaxation: the tour's order
// reversed, travel transposed, and times mirrored (service at i starting at
// T_i becomes service at H − T_i − s_i, so that "j no earlier than i's end
// plus travel" keeps its form). The start departs at H − (latest return) and
// must be back by H − (departure + its service), with no service of its own.
// Only what buildRelax reads is filled. Route index k > 0 becomes n − k.
func (p *prob) reversed() *prob {
	n := p.n
	in := &solver.Instance{N: n, Start: p.start, Shape: solver.Closed, Travel: make([]int64, n*n), Scale: p.in.Scale}
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			in.Travel[j*n+i] = p.in.Travel[i*n+j]
		}
	}
	var h int64
	for i := 0; i < n; i++ {
		h = max(h, p.lt[i]+p.s[i])
	}
	h = max(h, p.lateRet) + 1
	q := &prob{in: in, n: n, start: p.start, end: -1, shape: solver.Closed, ctx: p.ctx}
	q.e, q.et, q.lt, q.s = make([]int64, n), make([]int64, n), make([]int64, n), make([]int64, n)
	for i := 0; i < n; i++ {
		q.s[i] = p.s[i]
		q.et[i], q.lt[i] = h-p.lt[i]-p.s[i], h-p.et[i]-p.s[i]
		q.e[i] = q.et[i]
	}
	st := p.start
	q.s[st] = 0
	q.e[st], q.et[st], q.lt[st] = h-p.lateRet, h-p.lateRet, h-p.lateRet
	q.lateRet = h - p.e[st] - p.s[st]
	q.arc = make([]bool, n*n)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			q.arc[j*n+i] = p.arc[i*n+j]
		}
	}
	q.pinAt, q.pinOf = make([]int32, n), make([]int32, n)
	for i := range q.pinAt {
		q.pinAt[i], q.pinOf[i] = -1, -1
	}
	q.pinAt[0], q.pinOf[st] = int32(st), 0
	q.finishSets()
	for i := 0; i < n; i++ {
		if i != st {
			q.minPos[i], q.maxPos[i] = int32(n)-p.maxPos[i], int32(n)-p.minPos[i]
		}
	}
	return q
}

// eliminate removes the arcs (by route index) that no route cheaper than u
// takes, from the backward tables rx (built on p) and tables built here on
// the reversed day under the same penalties. It returns the number of
// (index, arc) pairs removed now, and false when ctx ended or the tables did
// not fit (nothing is removed then).
func eliminate(ctx context.Context, p *prob, rx *relax, u int64, perState, maxTotal int, y *yielder) (int, bool) {
	n := p.n
	if u >= inf || rx == nil || rx.z >= inf {
		return 0, false
	}
	if p.revp == nil {
		p.revp = p.reversed()
	}
	q := p.revp
	q.elim = nil
	if p.elim != nil {
		// The reversed tables skip what is removed already: arc i→j from
		// index k is arc j→i from index n−k−1 there.
		q.elim = make([]uint64, len(p.elim))
		for k := 0; k < n; k++ {
			for i := 0; i < n; i++ {
				for j := 0; j < n; j++ {
					if p.eliminated(k, i, j) {
						b := ((n-1-k)*n+j)*n + i
						q.elim[b>>6] |= 1 << (uint(b) & 63)
					}
				}
			}
		}
	}
	q.elimUB = inf
	fw := buildRelax(ctx, q, solver.TravelTime, rx.lam, rx.ng, perState, maxTotal, y)
	if fw == nil {
		return 0, false
	}
	// Every arc removed from here on is removed with respect to u.
	if p.elim == nil {
		p.elim, p.elimUB = make([]uint64, (n*n*n+63)/64), u
	}
	p.elimUB = min(p.elimUB, u)
	lam := rx.lam
	h := q.et[p.start] + p.lateRet // the mirror constant: q.et[start] = h − lateRet
	removed := 0
	set := func(k, i, j int) {
		b := (k*n+i)*n + j
		if p.elim[b>>6]&(1<<(uint(b)&63)) == 0 {
			p.elim[b>>6] |= 1 << (uint(b) & 63)
			removed++
		}
	}
	// lbFrom is the least bound over the prefixes that reach i at index k
	// (k ≥ 1), for a continuation whose least cost from an earliest end of
	// service e (start of service at i plus s_i) is g(e); inf when none.
	lbFrom := func(k, i int, g func(e int64) int64) int64 {
		st := (k-1)*n + i
		a, b := int(fw.envOff[st]), int(fw.envOff[st+1])
		best := inf
		for m := a; m < b; m++ {
			// A reversed start L' at i is a forward earliest start h − s_i − L'.
			e := h - fw.envL[m]
			if v := g(e); v < inf {
				best = min(best, fw.envC[m]+v)
			}
		}
		return best
	}
	for k := 0; k < n; k++ {
		if y.ticks(n) && ctx.Err() != nil {
			return removed, false
		}
		for i := 0; i < n; i++ {
			if int32(k) < p.minPos[i] || int32(k) > p.maxPos[i] {
				continue
			}
			for _, j32 := range p.succ[i] {
				j := int(j32)
				if p.eliminated(k, i, j) {
					continue
				}
				if y.tick() && ctx.Err() != nil {
					return removed, false
				}
				tij := p.t(i, j)
				var g func(e int64) int64
				if j == p.start {
					if k != n-1 {
						continue
					}
					g = func(e int64) int64 {
						if e+tij > p.lateRet {
							return inf
						}
						return tij - lam[i]
					}
				} else {
					if k+1 > n-1 || int32(k+1) < p.minPos[j] || int32(k+1) > p.maxPos[j] {
						set(k, i, j)
						continue
					}
					r := n - 2 - k
					g = func(e int64) int64 {
						c := rx.togo(r, j, max(e+tij, p.et[j]))
						if c >= inf {
							return inf
						}
						return c + tij - lam[i] - lam[j]
					}
				}
				var lb int64
				if k == 0 {
					if i != p.start {
						continue
					}
					lb = g(p.e[p.start] + p.s[p.start])
				} else {
					lb = lbFrom(k, i, g)
				}
				if lb >= inf || lb+rx.lamSum >= u {
					set(k, i, j)
				}
			}
		}
	}
	return removed, true
}
