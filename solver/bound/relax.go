package bound

import (
	"cmp"
	"context"
	"math"
	"slices"

	"visitline/solver"
)

// relax is the state-space relaxation of Christofides, Mingozzi and Toth
// (1981) with time, strengthened by ng-route memories (see ngSets): the
// visited set is relaxed to its size and to the memory of a small
// neighbourhood, so a relaxed path is a sequence of n nodes that meets every
// window (and pin) and may visit a node more than once, but never returns to
// a node it still remembers. Node penalties λ turn "each node once" into a
// Lagrangian term. The tables are computed backwards: for r nodes still to
// come after node i, a set of labels (L, C, M) says that a relaxed
// completion with penalised cost C and memory M (the nodes of N(i) it
// remembers, i among them) exists when service at i starts no later than L.
//
// Every number here is a valid bound for any λ and any neighbourhoods:
// Z(λ) = min C at the start plus Σλ is at most the optimum, and
// cost-to-go(i, t, r) + Σ_{unvisited} λ is at most the cost of any true
// completion from i at time t (a true completion never remembers a node
// visited before i, which togoSet uses).
type relax struct {
	p   *prob
	obj solver.Objective
	lam []int64
	ng  *ngSets
	// lamSum is Σλ over all nodes.
	lamSum int64
	// Per (r, i) at index r*n+i: the lookup envelope envL ascending with envC
	// the least C among labels with that L or more.
	envOff     []int32
	envL, envC []int64
	// The same labels by C ascending, with their L and memory, for lookups
	// that know the visited set (togoSet).
	byCL, byCC []int64
	byCM       []uint64
	// nbRank[i][b] is the rank (bit of the visited sets) of list[i][b].
	nbRank [][]int32
	z      int64 // Z(λ): the bound, inf when no relaxed path exists
	path   []int // a relaxed optimal path, the start first
	merged bool  // some labels were merged to fit the cap
	labels int   // labels in the table
}

// label arrays of one build.
type rlabels struct {
	L, C []int64
	M    []uint64
	sl   []int32 // successor label (-1 at the end)
	node []int32
	off  []int32 // per (r, i): first label; off[r*n+i+1] ends it
}

type cand struct {
	L, C int64
	M    uint64
	sl   int32
}

// buildRelax computes the tables for penalties lam and neighbourhoods ng
// (nil: the default ones). perState caps the labels of one (r, i) (merging
// keeps the bound valid); maxTotal caps the whole table. It returns nil when
// the cap is hit or ctx is done.
func buildRelax(ctx context.Context, p *prob, obj solver.Objective, lam []int64, ng *ngSets, perState, maxTotal int, y *yielder) *relax {
	n := p.n
	if ng == nil {
		ng = newNGSets(p, defaultNG, defaultNG)
	}
	rx := &relax{p: p, obj: obj, lam: lam, ng: ng, z: inf}
	for _, v := range lam {
		rx.lamSum += v
	}
	var lb rlabels
	lb.off = make([]int32, n*n+1)
	cost := func(i, j int) int64 {
		if obj == solver.CompletionTime {
			return p.s[i] + p.t(i, j)
		}
		return p.t(i, j)
	}
	allowedAt := func(i, idx int) bool {
		if v := p.pinAt[idx]; v >= 0 && v != int32(i) {
			return false
		}
		if v := p.pinOf[i]; v >= 0 && v != int32(idx) {
			return false
		}
		if p.minPos != nil && (int32(idx) < p.minPos[i] || int32(idx) > p.maxPos[i]) {
			return false
		}
		return true
	}
	var cands, sorted []cand
	var counts []int32
	// Per state, indexed by memory without i's own bit (mask >> 1): the
	// least C of a candidate whose L is capped by i's window (top, with its
	// successor label), and the least C of a kept label (best).
	const nm = 1 << (maxNG - 1)
	topC, best := make([]int64, nm), make([]int64, nm)
	topSl := make([]int32, nm)
	for k := range topC {
		topC[k], best[k] = inf, inf
	}
	var topUsed, bestUsed []int32
	// dominated says a kept label with L at least as large (by the order
	// of processing), C at most c and a memory that is a subset of m
	// exists; keep records c.
	dominated := func(m uint64, c int64) bool {
		for sub := m; ; sub = (sub - 1) & m {
			if best[sub] <= c {
				return true
			}
			if sub == 0 {
				return false
			}
		}
	}
	var keep []cand
	keepOne := func(c cand) {
		m := c.M >> 1
		if dominated(m, c.C) {
			return
		}
		if best[m] == inf {
			bestUsed = append(bestUsed, int32(m))
		}
		best[m] = c.C
		keep = append(keep, c)
	}
	for r := 0; r < n; r++ {
		idx := n - 1 - r
		for i := 0; i < n; i++ {
			lb.off[r*n+i] = int32(len(lb.L))
			if !allowedAt(i, idx) {
				continue
			}
			eti := p.et[i]
			// A state's work grows with its successors (their labels are
			// merged and sorted): count it so, so that a turn comes every
			// few milliseconds at any size.
			if y.ticks(1+perState*len(p.succ[i])) && ctx.Err() != nil {
				return nil
			}
			cands = cands[:0]
			if r == 0 {
				switch {
				case p.shape == solver.Closed:
					if n > 1 && p.arc[i*n+p.start] && !p.eliminated(n-1, i, p.start) {
						L := min(p.lt[i], p.lateRet-p.s[i]-p.t(i, p.start))
						if L >= eti {
							cands = append(cands, cand{L, cost(i, p.start), 1, -1})
						}
					}
				default:
					c := int64(0)
					if obj == solver.CompletionTime {
						c = p.s[i]
					}
					cands = append(cands, cand{p.lt[i], c, 1, -1})
				}
			} else {
				base := (r - 1) * n
				for _, j32 := range p.succ[i] {
					j := int(j32)
					if j == p.start || p.eliminated(idx, i, j) {
						continue
					}
					a, b := lb.off[base+j], lb.off[base+j+1]
					if a == b {
						continue
					}
					// One step per successor (up to a few hundred labels):
					// turns for the host at least every few milliseconds.
					if y.tick() && ctx.Err() != nil {
						return nil
					}
					cij := cost(i, j) - lam[j]
					var block uint64
					if q := ng.pos[j*n+i]; q >= 0 {
						block = 1 << uint(q)
					}
					// Labels are in L-descending order; those late enough
					// that L at i is capped by i's own window all get that L.
					dt := p.s[i] + p.t(i, j)
					tab := ng.table(j, i)
					for k := a; k < b; k++ {
						L := lb.L[k] - dt
						if L < eti {
							break
						}
						if lb.M[k]&block != 0 {
							continue
						}
						var m uint64
						if tab != nil {
							m = uint64(tab[lb.M[k]])
						} else {
							m = ng.translate(lb.M[k], j, i)
						}
						c := lb.C[k] + cij
						if L >= p.lt[i] {
							// Capped: only the least C per memory matters.
							x := m >> 1
							if topC[x] == inf {
								topUsed = append(topUsed, int32(x))
							}
							if c < topC[x] {
								topC[x], topSl[x] = c, k
							}
							continue
						}
						cands = append(cands, cand{L, c, m, k})
					}
				}
			}
			if len(cands) == 0 && len(topUsed) == 0 {
				continue
			}
			// Pareto filter: a label goes when a kept label (with L at least
			// as large, by the order) has C at most as large and remembers
			// no more. The capped candidates come first, by C ascending.
			keep = keep[:0]
			if len(topUsed) > 0 {
				slices.SortFunc(topUsed, func(x, y int32) int { return cmp.Compare(topC[x], topC[y]) })
				for _, x := range topUsed {
					keepOne(cand{p.lt[i], topC[x], uint64(x)<<1 | 1, topSl[x]})
					topC[x] = inf
				}
				topUsed = topUsed[:0]
			}
			cands, sorted = sortCands(cands, sorted, p.lt[i]-p.et[i], p.lt[i], &counts, true)
			for _, c := range cands {
				keepOne(c)
			}
			for _, x := range bestUsed {
				best[x] = inf
			}
			bestUsed = bestUsed[:0]
			out := keep
			if perState > 0 && len(keep) > perState {
				out = mergeByMemory(keep, perState)
				rx.merged = true
			}
			for _, c := range out {
				lb.L = append(lb.L, c.L)
				lb.C = append(lb.C, c.C)
				lb.M = append(lb.M, c.M)
				lb.sl = append(lb.sl, c.sl)
				lb.node = append(lb.node, int32(i))
			}
			if maxTotal > 0 && len(lb.L) > maxTotal {
				return nil
			}
		}
	}
	lb.off[n*n] = int32(len(lb.L))
	rx.labels = len(lb.L)
	// Z and a relaxed optimal path.
	a, b := lb.off[(n-1)*n+p.start], lb.off[(n-1)*n+p.start+1]
	bestK := int32(-1)
	for k := a; k < b; k++ {
		if lb.L[k] >= p.e[p.start] && (bestK < 0 || lb.C[k] < lb.C[bestK]) {
			bestK = k
		}
	}
	if bestK >= 0 {
		rx.z = lb.C[bestK] + rx.lamSum
		if obj == solver.CompletionTime {
			rx.z += p.e[p.start]
		}
		if p.elim != nil {
			rx.z = min(rx.z, p.elimUB)
		}
		rx.path = append(rx.path, p.start)
		for k := bestK; lb.sl[k] >= 0; k = lb.sl[k] {
			rx.path = append(rx.path, int(lb.node[lb.sl[k]]))
		}
	}
	if p.elim != nil && rx.z == inf {
		// No relaxed path avoids the removed arcs: no route is cheaper
		// than the one that removed them.
		rx.z = p.elimUB
	}
	// Lookup envelopes.
	rx.envOff = make([]int32, n*n+1)
	rx.envL = make([]int64, 0, len(lb.L))
	rx.envC = make([]int64, 0, len(lb.L))
	rx.byCL = make([]int64, 0, len(lb.L))
	rx.byCC = make([]int64, 0, len(lb.L))
	rx.byCM = make([]uint64, 0, len(lb.L))
	var ord []int
	for st := 0; st < n*n; st++ {
		rx.envOff[st] = int32(len(rx.envL))
		a, b := int(lb.off[st]), int(lb.off[st+1])
		if a == b {
			continue
		}
		// Labels are in L-descending order: walk them backwards for the
		// ascending envelope, then fix the suffix minima.
		first := len(rx.envL)
		for k := b - 1; k >= a; k-- {
			rx.envL = append(rx.envL, lb.L[k])
			rx.envC = append(rx.envC, lb.C[k])
		}
		for k := len(rx.envC) - 2; k >= first; k-- {
			rx.envC[k] = min(rx.envC[k], rx.envC[k+1])
		}
		ord = ord[:0]
		for k := a; k < b; k++ {
			ord = append(ord, k)
		}
		slices.SortStableFunc(ord, func(x, y int) int { return cmp.Compare(lb.C[x], lb.C[y]) })
		for _, k := range ord {
			rx.byCL = append(rx.byCL, lb.L[k])
			rx.byCC = append(rx.byCC, lb.C[k])
			rx.byCM = append(rx.byCM, lb.M[k])
		}
	}
	rx.envOff[n*n] = int32(len(rx.envL))
	rx.nbRank = make([][]int32, n)
	for i, l := range ng.list {
		rx.nbRank[i] = make([]int32, len(l))
		for b, v := range l {
			rx.nbRank[i][b] = p.rank[v]
		}
	}
	return rx
}

// sortCands orders candidates by L descending, then C ascending (or, with
// skipRuns and the counting sort, in any order among equal L: the filter
// then keeps a few extra labels, which costs less than sorting). All L lie
// in [top-width, top]; when that range is small (integer times of a few
// thousand units), a counting sort by L and an insertion sort of each run of
// equal L is much faster than a comparison sort. It returns the sorted
// slice and the spare buffer.
func sortCands(c, buf []cand, width, top int64, counts *[]int32, skipRuns bool) (sortedOut, spare []cand) {
	if width < 0 || width > 1<<13 || len(c) < 48 {
		slices.SortFunc(c, func(a, b cand) int {
			if a.L != b.L {
				return cmp.Compare(b.L, a.L)
			}
			return cmp.Compare(a.C, b.C)
		})
		return c, buf
	}
	w := int(width) + 1
	if cap(*counts) < w+1 {
		*counts = make([]int32, w+1)
	}
	cnt := (*counts)[:w+1]
	for k := range cnt {
		cnt[k] = 0
	}
	for _, x := range c {
		cnt[top-x.L+1]++
	}
	for k := 1; k <= w; k++ {
		cnt[k] += cnt[k-1]
	}
	if cap(buf) < len(c) {
		buf = make([]cand, len(c))
	}
	out := buf[:len(c)]
	for _, x := range c {
		k := top - x.L
		out[cnt[k]] = x
		cnt[k]++
	}
	if skipRuns {
		return out, c
	}
	// Runs of equal L by C ascending.
	for a := 0; a < len(out); {
		b := a + 1
		for b < len(out) && out[b].L == out[a].L {
			b++
		}
		if b-a > 24 {
			slices.SortFunc(out[a:b], func(x, y cand) int { return cmp.Compare(x.C, y.C) })
			a = b
			continue
		}
		for x := a + 1; x < b; x++ {
			v := out[x]
			y := x - 1
			for y >= a && out[y].C > v.C {
				out[y+1] = out[y]
				y--
			}
			out[y+1] = v
		}
		a = b
	}
	return out, c
}

// mergeByMemory cuts a Pareto list (L descending) to at most k labels like
// mergeLabels, but merges only labels with the same memory, each memory's
// labels getting a share of the k slots by their number: the merged labels
// then lose time only, never the cycles their memory forbids, which on wide
// windows are what the bound lives on. With more memories than slots it
// falls back to mergeLabels. The result is in L-descending order.
func mergeByMemory(c []cand, k int) []cand {
	ord := make([]int, len(c))
	for i := range ord {
		ord[i] = i
	}
	slices.SortStableFunc(ord, func(a, b int) int { return cmp.Compare(c[a].M, c[b].M) })
	var starts []int
	for i := range ord {
		if i == 0 || c[ord[i]].M != c[ord[i-1]].M {
			starts = append(starts, i)
		}
	}
	if len(starts) > k {
		return mergeLabels(c, k)
	}
	starts = append(starts, len(ord))
	out := make([]cand, 0, k)
	groups := len(starts) - 1
	spare := k - groups // slots beyond one per memory
	for g := 0; g < groups; g++ {
		a, b := starts[g], starts[g+1]
		size := b - a
		slots := 1 + spare*size/len(c)
		slots = min(slots, size)
		per := (size + slots - 1) / slots
		for x := a; x < b; x += per {
			y := min(x+per, b)
			m := c[ord[x]]
			for _, q := range ord[x+1 : y] {
				if c[q].C < m.C {
					m.C, m.sl = c[q].C, c[q].sl
				}
				m.L = max(m.L, c[q].L)
			}
			out = append(out, m)
		}
	}
	slices.SortFunc(out, func(a, b cand) int {
		if a.L != b.L {
			return cmp.Compare(b.L, a.L)
		}
		return cmp.Compare(a.C, b.C)
	})
	return out
}

// mergeLabels cuts a Pareto list (L descending) to k labels by replacing runs
// of neighbours with one optimistic label: the largest L, the least C and
// the common part of the memories. The result is a relaxation of the list,
// so bounds stay valid.
func mergeLabels(c []cand, k int) []cand {
	out := make([]cand, 0, k)
	per := (len(c) + k - 1) / k
	for a := 0; a < len(c); a += per {
		b := min(a+per, len(c))
		m := c[a]
		for _, x := range c[a+1 : b] {
			if x.C < m.C {
				m.C, m.sl = x.C, x.sl
			}
			m.M &= x.M
		}
		out = append(out, m)
	}
	return out
}

// togo is the least penalised cost of a relaxed completion from node i with
// service starting at t and r nodes still to come; inf when none exists.
func (rx *relax) togo(r, i int, t int64) int64 {
	st := r*rx.p.n + i
	a, b := int(rx.envOff[st]), int(rx.envOff[st+1])
	// First envelope entry with L ≥ t.
	lo, hi := a, b
	for lo < hi {
		m := (lo + hi) / 2
		if rx.envL[m] >= t {
			hi = m
		} else {
			lo = m + 1
		}
	}
	if lo == b {
		return inf
	}
	return rx.envC[lo]
}

// togoSet is togo for a search that knows the visited set (words, by rank,
// without i): a true completion never remembers a visited node, so labels
// whose memory holds one are skipped.
func (rx *relax) togoSet(r, i int, t int64, words []uint64) int64 {
	var vis uint64
	for b, rk := range rx.nbRank[i][1:] {
		if words[rk>>6]&(1<<(uint(rk)&63)) != 0 {
			vis |= 2 << uint(b)
		}
	}
	st := r*rx.p.n + i
	a, b := int(rx.envOff[st]), int(rx.envOff[st+1])
	for k := a; k < b; k++ {
		if rx.byCL[k] >= t && rx.byCM[k]&vis == 0 {
			return rx.byCC[k]
		}
	}
	return inf
}

// lagrangeOpts steer the subgradient ascent.
type lagrangeOpts struct {
	iters    int
	perState int
	maxTotal int
	ub       int64 // best known feasible cost; inf when none
	// ngSize and ngMax: the neighbourhoods' first and largest size (grown
	// where the relaxed path cycles); ngFull makes them the whole instance.
	ngSize, ngMax int
	ngFull        bool
	noElim        bool // no arc elimination
}

// defaultNG is the neighbourhood size when none is set.
const defaultNG = 4

// ascent is the subgradient ascent on the node penalties (Polyak steps
// towards the best known cost), resumable so that time left over by the
// exact search can go to it.
type ascent struct {
	p      *prob
	obj    solver.Objective
	o      lagrangeOpts
	lamF   []float64
	lam    []int64
	mu     float64
	stall  int
	target int64
	iters  int
	best   *relax
	dir    []float64 // last step direction
	ng     *ngSets
	grown  int // members added by grow
	// route is set when a relaxed optimal path is a feasible route whose
	// cost equals the bound: it is then optimal.
	route []int
	// done: converged, proven, shown infeasible, or out of room.
	done bool
	// ubRoute is the cheapest feasible route among the relaxed paths (nil
	// when none), of cost ubCost: the caller must know every route whose
	// cost the target (and so arc elimination) uses.
	ubRoute []int
	ubCost  int64
	// elim turns on arc elimination (elimOK); lastElim is the iteration of
	// the last round, removed the pairs removed so far.
	elim     bool
	lastElim int
	removed  int
}

func newAscent(p *prob, obj solver.Objective, o lagrangeOpts) *ascent {
	a := &ascent{p: p, obj: obj, o: o, lamF: make([]float64, p.n), lam: make([]int64, p.n), mu: 2, target: o.ub, elim: elimOK(p, obj) && !o.noElim}
	switch {
	case o.ngFull && p.n <= maxNG:
		a.ng = fullNGSets(p.n)
	default:
		if a.o.ngSize <= 0 {
			a.o.ngSize = defaultNG
		}
		a.o.ngMax = max(a.o.ngMax, a.o.ngSize)
		a.ng = newNGSets(p, a.o.ngSize, a.o.ngMax)
	}
	return a
}

// warm starts the penalties at the assignment's dual potentials (additive
// bounding in the manner of Fischetti and Toth: the relaxation then starts at
// the assignment bound or above). Any penalties give a valid bound.
func (a *ascent) warm(pot []int64) {
	if len(pot) != a.p.n {
		return
	}
	for j := range pot {
		if j != a.p.start {
			a.lam[j] = pot[j]
			a.lamF[j] = float64(pot[j])
		}
	}
	a.mu = 1 // from a good start, longer steps only undo it
}

// run does up to iters more iterations (fewer when it converges or ctx
// ends). ub, when below the target, replaces it.
func (a *ascent) run(ctx context.Context, iters int, y *yielder) {
	p, n := a.p, a.p.n
	for it := 0; it < max(1, iters) && !a.done; it++ {
		if ctx.Err() != nil {
			return
		}
		rx := buildRelax(ctx, p, a.obj, append([]int64(nil), a.lam...), a.ng, a.o.perState, a.o.maxTotal, y)
		if rx == nil {
			if a.best == nil && a.o.perState > 1 && ctx.Err() == nil {
				// Too big: retry with a coarser table.
				a.o.perState = max(1, a.o.perState/4)
				it--
				continue
			}
			if ctx.Err() == nil {
				a.done = true
			}
			return
		}
		a.iters++
		if rx.z == inf {
			// No relaxed path at all: no feasible plan exists.
			a.best, a.done = rx, true
			return
		}
		if a.best == nil || rx.z > a.best.z {
			a.best = rx
			a.stall = 0
		} else {
			a.stall++
			if a.stall >= 8 {
				a.mu /= 2
				a.stall = 0
			}
		}
		// Is the relaxed path a route?
		counts := make([]int, n)
		for _, v := range rx.path {
			counts[v]++
		}
		elementary := len(rx.path) == n
		for _, c := range counts {
			if c != 1 {
				elementary = false
			}
		}
		if elementary && solver.CheckRoute(p.in, rx.path) == nil {
			sch := solver.Evaluate(p.in, rx.path)
			if sch.Feasible && sch.Cost(a.obj) <= rx.z {
				a.best, a.route, a.done = rx, append([]int(nil), rx.path...), true
				return
			}
			if sch.Feasible && sch.Cost(a.obj) < a.target {
				a.target = sch.Cost(a.obj)
				a.ubRoute, a.ubCost = append([]int(nil), rx.path...), a.target
			}
		}
		if !elementary {
			// Forbid the cycles of this path from now on (a fresh copy: rx
			// keeps the sets it was built with).
			g := a.ng.clone()
			if k := g.grow(rx.path); k > 0 {
				a.ng, a.grown = g, a.grown+k
			}
		}
		if elementary || a.mu < 0.005 {
			a.done = true // a zero subgradient cannot move the penalties any further
			return
		}
		if a.target < inf && a.target <= a.best.z {
			a.done = true // the bound has closed on the best known cost
			return
		}
		if a.elim && a.best == rx && a.iters-a.lastElim >= elimEvery &&
			float64(a.target-rx.z) < elimGap*float64(abs64(rx.z)) {
			a.eliminate(ctx, y)
			if ctx.Err() != nil {
				return
			}
		}
		// The step aims at the best known cost, but no further than a
		// little above the best bound: a poor first plan would otherwise
		// make every step overshoot.
		tgt := min(a.target, a.best.z+max(1, int64(targetCap*float64(abs64(a.best.z)))))
		// Deflected subgradient (Camerini, Fratta and Maffioli 1975): the
		// direction keeps part of the last one when the two disagree, which
		// damps the zig-zag of plain steps.
		if a.dir == nil {
			a.dir = make([]float64, n)
		}
		var gd, dd float64
		for j := 0; j < n; j++ {
			if j != p.start {
				gd += float64(1-counts[j]) * a.dir[j]
				dd += a.dir[j] * a.dir[j]
			}
		}
		beta := 0.0
		if deflect && gd < 0 && dd > 0 {
			beta = -1.5 * gd / dd
		}
		var norm float64
		for j := 0; j < n; j++ {
			if j != p.start {
				a.dir[j] = float64(1-counts[j]) + beta*a.dir[j]
				norm += a.dir[j] * a.dir[j]
			}
		}
		if norm == 0 {
			a.done = true
			return
		}
		step := a.mu * float64(tgt-rx.z) / norm
		for j := 0; j < n; j++ {
			if j != p.start {
				a.lamF[j] += step * a.dir[j]
				a.lam[j] = int64(math.Round(a.lamF[j]))
			}
		}
	}
}

// eliminate runs a round of arc elimination with the best table's
// penalties and the best known cost.
func (a *ascent) eliminate(ctx context.Context, y *yielder) {
	if !a.elim || a.best == nil || a.target >= inf {
		return
	}
	a.lastElim = a.iters
	k, ok := eliminate(ctx, a.p, a.best, a.target, a.o.perState, a.o.maxTotal, y)
	a.removed += k
	if !ok && ctx.Err() == nil {
		a.elim = false // the reversed tables do not fit
	}
}

// elimEvery is the least number of penalty steps between rounds of arc
// elimination, and elimGap the largest relative gap between the best
// bound and the best known cost at which a round is tried.
var (
	elimEvery = 10
	elimGap   = 0.1
)

// deflect turns on the deflected subgradient steps.
var deflect = true

// targetCap is how far above the best bound, as a share of it, a step aims
// at most.
var targetCap = 0.05

func abs64(v int64) int64 {
	if v < 0 {
		return -v
	}
	return v
}
