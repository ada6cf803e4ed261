package bound

import (
	"cmp"
	"context"
	"math"
	"slices"

	"visitline/solver"
)

// relax is the state-space relaxation of Christofides, Mingozzi and Toth
// (1981) with time: the visited set is relaxed to its size, so a relaxed path
// is a sequence of n nodes that meets every window (and pin) and may visit a
// node more than once, but never goes straight back (i→j→i; two-cycle
// elimination). Node penalties λ turn "each node once" into a Lagrangian
// term. The tables are computed backwards: for r nodes still to come after
// node i, a set of labels (L, C) says that a relaxed completion with
// penalised cost C exists when service at i starts no later than L.
//
// Every number here is a valid bound for any λ: Z(λ) = min C at the start
// plus Σλ is at most the optimum, and cost-to-go(i, t, r) + Σ_{unvisited} λ
// is at most the cost of any true completion from i at time t.
type relax struct {
	p   *prob
	obj solver.Objective
	lam []int64
	// lamSum is Σλ over all nodes.
	lamSum int64
	// Per (r, i) at index r*n+i: the lookup envelope envL ascending with envC
	// the least C among labels with that L or more.
	envOff     []int32
	envL, envC []int64
	z          int64 // Z(λ): the bound, inf when no relaxed path exists
	path       []int // a relaxed optimal path, the start first
	merged     bool  // some labels were merged to fit the cap
}

// label arrays of one build.
type rlabels struct {
	L, C   []int64
	sn, sl []int32 // successor node (-1: none or merged) and successor label (-1 at the end)
	node   []int32
	off    []int32 // per (r, i): first label; off[r*n+i+1] ends it
}

type cand struct {
	L, C   int64
	sn, sl int32
}

// buildRelax computes the tables for penalties lam. perState caps the labels
// of one (r, i) (merging keeps the bound valid); maxTotal caps the whole
// table. It returns nil when the cap is hit or ctx is done.
func buildRelax(ctx context.Context, p *prob, obj solver.Objective, lam []int64, perState, maxTotal int, y *yielder) *relax {
	n := p.n
	rx := &relax{p: p, obj: obj, lam: lam, z: inf}
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
		return true
	}
	var cands, sorted []cand
	var counts []int32
	bySucc := make([]int64, n)
	for i := range bySucc {
		bySucc[i] = inf
	}
	var touched []int32
	for r := 0; r < n; r++ {
		idx := n - 1 - r
		for i := 0; i < n; i++ {
			lb.off[r*n+i] = int32(len(lb.L))
			if !allowedAt(i, idx) {
				continue
			}
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
					if n > 1 && p.arc[i*n+p.start] {
						L := min(p.lt[i], p.lateRet-p.s[i]-p.t(i, p.start))
						if L >= p.et[i] {
							cands = append(cands, cand{L, cost(i, p.start), -1, -1})
						}
					}
				default:
					c := int64(0)
					if obj == solver.CompletionTime {
						c = p.s[i]
					}
					cands = append(cands, cand{p.lt[i], c, -1, -1})
				}
			} else {
				base := (r - 1) * n
				for _, j32 := range p.succ[i] {
					j := int(j32)
					if j == p.start {
						continue
					}
					a, b := lb.off[base+j], lb.off[base+j+1]
					if a == b {
						continue
					}
					cij := cost(i, j) - lam[j]
					// Labels are in L-descending order. Those late enough that
					// L at i is capped by i's own window collapse into one
					// candidate (the least C); the rest stop at i's earliest.
					dt := p.s[i] + p.t(i, j)
					k := a
					bestK := int32(-1)
					for ; k < b && lb.L[k]-dt >= p.lt[i]; k++ {
						if lb.sn[k] != int32(i) && (bestK < 0 || lb.C[k] < lb.C[bestK]) {
							bestK = k
						}
					}
					if bestK >= 0 {
						cands = append(cands, cand{p.lt[i], lb.C[bestK] + cij, int32(j), bestK})
					}
					for ; k < b; k++ {
						L := lb.L[k] - dt
						if L < p.et[i] {
							break
						}
						if lb.sn[k] == int32(i) {
							continue
						}
						cands = append(cands, cand{L, lb.C[k] + cij, int32(j), k})
					}
				}
			}
			if len(cands) == 0 {
				continue
			}
			// Pareto filter with two-cycle elimination: a label goes when a
			// label with the same successor, or two labels with different
			// successors, are at least as good in both L and C.
			cands, sorted = sortCands(cands, sorted, p.lt[i]-p.et[i], p.lt[i], &counts)
			keep := cands[:0]
			anyC, b1, b2 := inf, inf, inf
			var s1 int32 = -1
			for _, c := range cands {
				sn := c.sn
				if anyC <= c.C || sn >= 0 && bySucc[sn] <= c.C || b1 <= c.C && b2 <= c.C {
					continue
				}
				keep = append(keep, c)
				if sn < 0 {
					anyC = c.C // sorted by L then C: the first such label is the least
					continue
				}
				if bySucc[sn] == inf {
					touched = append(touched, sn)
				}
				bySucc[sn] = min(bySucc[sn], c.C)
				// b1 and b2: least C of two labels with different successors.
				switch {
				case c.C < b1:
					if sn != s1 {
						b2 = b1
					}
					b1, s1 = c.C, sn
				case sn != s1 && c.C < b2:
					b2 = c.C
				}
			}
			for _, t := range touched {
				bySucc[t] = inf
			}
			touched = touched[:0]
			if perState > 0 && len(keep) > perState {
				keep = mergeLabels(keep, perState)
				rx.merged = true
			}
			for _, c := range keep {
				lb.L = append(lb.L, c.L)
				lb.C = append(lb.C, c.C)
				lb.sn = append(lb.sn, c.sn)
				lb.sl = append(lb.sl, c.sl)
				lb.node = append(lb.node, int32(i))
			}
			if maxTotal > 0 && len(lb.L) > maxTotal {
				return nil
			}
		}
	}
	lb.off[n*n] = int32(len(lb.L))
	// Z and a relaxed optimal path.
	a, b := lb.off[(n-1)*n+p.start], lb.off[(n-1)*n+p.start+1]
	best := int32(-1)
	for k := a; k < b; k++ {
		if lb.L[k] >= p.e[p.start] && (best < 0 || lb.C[k] < lb.C[best]) {
			best = k
		}
	}
	if best >= 0 {
		rx.z = lb.C[best] + rx.lamSum
		if obj == solver.CompletionTime {
			rx.z += p.e[p.start]
		}
		rx.path = append(rx.path, p.start)
		for k := best; lb.sl[k] >= 0; k = lb.sl[k] {
			rx.path = append(rx.path, int(lb.node[lb.sl[k]]))
		}
	}
	// Lookup envelopes.
	rx.envOff = make([]int32, n*n+1)
	rx.envL = make([]int64, 0, len(lb.L))
	rx.envC = make([]int64, 0, len(lb.L))
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
	}
	rx.envOff[n*n] = int32(len(rx.envL))
	return rx
}

// sortCands orders candidates by L descending, then C ascending. All L lie
// in [top-width, top]; when that range is small (integer times of a few
// thousand units), a counting sort by L and an insertion sort of each run of
// equal L is much faster than a comparison sort. It returns the sorted
// slice and the spare buffer.
func sortCands(c, buf []cand, width, top int64, counts *[]int32) (sortedOut, spare []cand) {
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
	// Runs of equal L by C ascending.
	for a := 0; a < len(out); {
		b := a + 1
		for b < len(out) && out[b].L == out[a].L {
			b++
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

// mergeLabels cuts a Pareto list (L descending) to k labels by replacing runs
// of neighbours with one optimistic label: the largest L and the least C of
// the run. The result is a relaxation of the list, so bounds stay valid.
func mergeLabels(c []cand, k int) []cand {
	out := c[:0:0]
	out = make([]cand, 0, k)
	per := (len(c) + k - 1) / k
	for a := 0; a < len(c); a += per {
		b := min(a+per, len(c))
		m := c[a]
		for _, x := range c[a+1 : b] {
			if x.C < m.C {
				m.C, m.sl = x.C, x.sl
				if x.sn != m.sn {
					m.sn = -1
				}
			} else if x.sn != m.sn {
				m.sn = -1
			}
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

// lagrangeOpts steer the subgradient ascent.
type lagrangeOpts struct {
	iters    int
	perState int
	maxTotal int
	ub       int64 // best known feasible cost; inf when none
}

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
	// route is set when a relaxed optimal path is a feasible route whose
	// cost equals the bound: it is then optimal.
	route []int
	// done: converged, proven, shown infeasible, or out of room.
	done bool
}

func newAscent(p *prob, obj solver.Objective, o lagrangeOpts) *ascent {
	return &ascent{p: p, obj: obj, o: o, lamF: make([]float64, p.n), lam: make([]int64, p.n), mu: 2, target: o.ub}
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
	a.mu = 0.5 // from a good start, long steps only undo it
}

// run does up to iters more iterations (fewer when it converges or ctx
// ends). ub, when below the target, replaces it.
func (a *ascent) run(ctx context.Context, iters int, y *yielder) {
	p, n := a.p, a.p.n
	for it := 0; it < max(1, iters) && !a.done; it++ {
		if ctx.Err() != nil {
			return
		}
		rx := buildRelax(ctx, p, a.obj, append([]int64(nil), a.lam...), a.o.perState, a.o.maxTotal, y)
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
			}
		}
		if elementary || a.mu < 0.005 {
			a.done = true // a zero subgradient cannot move the penalties any further
			return
		}
		tgt := a.target
		if tgt >= inf {
			tgt = rx.z + max(1, abs64(rx.z)/20)
		}
		if tgt <= a.best.z {
			a.done = true // the bound has closed on the best known cost
			return
		}
		var norm float64
		for j := 0; j < n; j++ {
			if j != p.start {
				g := float64(1 - counts[j])
				norm += g * g
			}
		}
		step := a.mu * float64(tgt-rx.z) / norm
		for j := 0; j < n; j++ {
			if j != p.start {
				a.lamF[j] += step * float64(1-counts[j])
				a.lam[j] = int64(math.Round(a.lamF[j]))
			}
		}
	}
}

func abs64(v int64) int64 {
	if v < 0 {
		return -v
	}
	return v
}
