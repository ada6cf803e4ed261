// Package heldkarp computes the Held-Karp lower bound on the length of a
// closed tour through every node of a travel matrix: the 1-tree bound with
// node multipliers fitted by subgradient ascent (M. Held and R. M. Karp,
// "The traveling-salesman problem and minimum spanning trees", Operations
// Research 18, 1970, and part II, Mathematical Programming 1, 1971).
//
// On a symmetric matrix it is the textbook bound: a minimum spanning tree
// over the nodes other than node 0, plus the two cheapest edges at node 0,
// every edge (i, j) costed c(i, j) + π(i) + π(j), less 2·Σπ. Every tour is
// such a 1-tree, so every value is at most the length of every tour.
//
// On an asymmetric matrix it bounds the tour through the classic
// transformation to a symmetric problem on 2n nodes (R. Jonker and
// T. Volgenant, "Transforming asymmetric into symmetric traveling salesman
// problems", Operations Research Letters 2, 1983): each node i becomes an
// in-copy and an out-copy joined by an edge every tour must use, and the
// arc i→j becomes the edge from the out-copy of i to the in-copy of j. Its
// 1-tree, with the forced edges contracted, is a spanning tree in which the
// pair {i, j} is joined by the cheaper of the two arcs i→j and j→i (each
// costed c(i, j) + μ(i) + λ(j), μ the out-copy's multiplier and λ the
// in-copy's), plus the cheapest arc into node 0. The multipliers play two
// roles at once: their sum is the degree penalty of the symmetric bound,
// their difference a potential that moves cost from one direction of an
// arc to the other (a tour's length does not change under it). They start
// from the row and column reduction of the matrix (every tour leaves each
// node once and enters it once, so the least arc out of each node and then
// the least into each is a constant part of every tour; on a day whose
// service times are folded into the arcs leaving a site, each site's service
// is inside its row's least arc).
//
// Arithmetic is exact: multipliers are integers in units of 1/Scale of the
// matrix's unit, every 1-tree is summed in int64, and Value is the ceiling
// of the best 1-tree over Scale, which is valid because tour lengths are
// integers. Windows and service are ignored (they can only lengthen a tour),
// so Value also bounds every closed tour of a day with windows whose
// objective is the sum of the arcs.
//
// The package is a measuring tool: the product command and the browser
// worker do not import it. The asymmetric bound keeps a transposed copy
// of the matrix (n² int64) for its column reads.
package heldkarp

import (
	"context"
	"errors"
	"fmt"
	"math"
)

// Options steer the ascent. The zero value is useful.
type Options struct {
	// Iterations caps the subgradient steps (default 1000).
	Iterations int
	// Upper is the length of a known tour, used for the step size (Polyak's
	// rule: a step of α·(Upper − L)/‖g‖²). 0 means the nearest-neighbour
	// tour from node 0, computed here.
	Upper int64
	// Asymmetric uses the 2n-node bound even on a symmetric matrix (for
	// tests; on a symmetric matrix it is valid but converges more slowly).
	Asymmetric bool
}

// Result is a lower bound on the length of every tour.
type Result struct {
	// Value is at most the length of every closed tour through all nodes.
	Value int64
	// Symmetric says which bound ran: the 1-tree on n nodes (true) or the
	// 2n-node bound for asymmetric travel.
	Symmetric bool
	// Iterations is the number of 1-trees computed.
	Iterations int
	// Upper is the tour length the step size was aimed at.
	Upper int64
	// Tour is true when the best 1-tree was a tour: then Value is the
	// optimum.
	Tour bool
	// Scale is the number of multiplier units in one unit of travel.
	Scale int64
}

// Bound computes the Held-Karp bound of the n×n row-major matrix travel
// (travel[i*n+j] from i to j; the diagonal is ignored). It stops at the
// iteration cap, when the steps have shrunk to nothing, when a 1-tree is a
// tour, or when ctx ends; the bound so far is valid in every case.
func Bound(ctx context.Context, n int, travel []int64, o Options) (Result, error) {
	if n < 3 {
		return Result{}, fmt.Errorf("held-karp bound: %d nodes, want at least 3", n)
	}
	if len(travel) != n*n {
		return Result{}, fmt.Errorf("held-karp bound: travel has %d entries, want %d×%d", len(travel), n, n)
	}
	var maxc int64
	for i, v := range travel {
		if i/n == i%n {
			continue
		}
		if v < 0 {
			return Result{}, errors.New("held-karp bound: negative travel")
		}
		maxc = max(maxc, v)
	}
	if o.Iterations <= 0 {
		o.Iterations = 1000
	}
	sym := !o.Asymmetric && symmetric(n, travel)
	// Scale: multipliers stay within a few times the largest arc, and a
	// 1-tree sums 2n terms of at most about 4·maxc·scale each.
	scale := int64(1 << 16)
	for scale > 1 && float64(maxc+1)*float64(scale)*float64(16*n) > 1<<62 {
		scale >>= 1
	}
	if o.Upper <= 0 {
		o.Upper = nearestNeighbour(n, travel)
	}
	var t tree
	if sym {
		t = newSymTree(n, travel, scale)
	} else {
		t = newAsymTree(n, travel, scale)
	}
	res := ascend(ctx, t, o, scale)
	res.Symmetric = sym
	res.Upper = o.Upper
	res.Scale = scale
	return res, nil
}

// tree is one of the two 1-tree bounds: eval computes the 1-tree at the
// current multipliers and returns its scaled value and the subgradient;
// step adds round(s·d) to each multiplier.
type tree interface {
	eval(g []int) int64
	size() int
	step(s float64, d []float64)
	save()
	restore()
}

func ascend(ctx context.Context, t tree, o Options, scale int64) Result {
	m := t.size()
	g := make([]int, m)
	d := make([]float64, m)
	best := int64(math.MinInt64)
	alpha := 2.0
	patience := max(20, min(100, m/20))
	since := 0
	res := Result{}
	upper := float64(o.Upper) * float64(scale)
	for it := 0; it < o.Iterations; it++ {
		if it%8 == 0 && ctx.Err() != nil {
			break
		}
		l := t.eval(g)
		res.Iterations++
		norm := 0.0
		for _, x := range g {
			norm += float64(x * x)
		}
		if l > best {
			best = l
			t.save()
			since = 0
			res.Tour = norm == 0
		} else if since++; since >= patience {
			// No progress for a while: halve the step and go back to
			// the best multipliers.
			alpha /= 2
			since = 0
			t.restore()
			clear(d)
			continue
		}
		if norm == 0 || alpha < 1e-4 {
			break
		}
		// Direction: the subgradient with a little of the last direction
		// (Camerini, Fratta and Maffioli 1975), which damps zigzagging.
		dn := 0.0
		for i, x := range g {
			d[i] = 0.7*float64(x) + 0.3*d[i]
			dn += d[i] * d[i]
		}
		gap := upper - float64(l)
		if gap < float64(scale) {
			gap = float64(scale)
		}
		t.step(alpha*gap/dn, d)
	}
	if best == math.MinInt64 {
		best = 0
	}
	t.restore()
	// ceil(best/scale): tour lengths are integers.
	v := best / scale
	if best%scale > 0 {
		v++
	}
	res.Value = v
	return res
}

func symmetric(n int, c []int64) bool {
	for i := 0; i < n; i++ {
		for j := i + 1; j < n; j++ {
			if c[i*n+j] != c[j*n+i] {
				return false
			}
		}
	}
	return true
}

// nearestNeighbour is the length of the nearest-neighbour tour from node 0.
func nearestNeighbour(n int, c []int64) int64 {
	seen := make([]bool, n)
	seen[0] = true
	u, total := 0, int64(0)
	for k := 1; k < n; k++ {
		b := -1
		for v := 0; v < n; v++ {
			if !seen[v] && (b < 0 || c[u*n+v] < c[u*n+b]) {
				b = v
			}
		}
		seen[b] = true
		total += c[u*n+b]
		u = b
	}
	return total + c[u*n]
}

// symTree is the 1-tree of Held and Karp: node 0 is the special node.
type symTree struct {
	n     int
	c     []int64
	scale int64
	p     []int64 // multipliers, scaled
	saved []int64
	key   []int64
	par   []int32
	in    []bool
}

func newSymTree(n int, c []int64, scale int64) *symTree {
	return &symTree{n: n, c: c, scale: scale, p: make([]int64, n), saved: make([]int64, n),
		key: make([]int64, n), par: make([]int32, n), in: make([]bool, n)}
}

func (s *symTree) size() int { return s.n }
func (s *symTree) save()     { copy(s.saved, s.p) }
func (s *symTree) restore()  { copy(s.p, s.saved) }
func (s *symTree) step(x float64, d []float64) {
	for i := range s.p {
		s.p[i] += int64(math.Round(x * d[i]))
	}
}

func (s *symTree) eval(g []int) int64 {
	n, c, sc, p := s.n, s.c, s.scale, s.p
	for i := range g {
		g[i] = -2
	}
	// Prim over 1..n-1 from node 1.
	for v := 1; v < n; v++ {
		s.in[v] = false
		s.key[v] = c[n+v]*sc + p[1] + p[v]
		s.par[v] = 1
	}
	s.in[1] = true
	var total int64
	// The next node joins as the last scan finds it (one pass per node).
	u, bk := -1, int64(0)
	for v := 2; v < n; v++ {
		if u < 0 || s.key[v] < bk {
			u, bk = v, s.key[v]
		}
	}
	for k := 2; k < n; k++ {
		s.in[u] = true
		total += bk
		g[u]++
		g[s.par[u]]++
		row := c[u*n : u*n+n]
		pu := p[u]
		nu := -1
		var nk int64
		for v := 2; v < n; v++ {
			if s.in[v] {
				continue
			}
			kv := s.key[v]
			if w := row[v]*sc + pu + p[v]; w < kv {
				kv = w
				s.key[v] = w
				s.par[v] = int32(u)
			}
			if nu < 0 || kv < nk {
				nu, nk = v, kv
			}
		}
		u, bk = nu, nk
	}
	// The two cheapest edges at node 0.
	a, b := -1, -1
	var wa, wb int64
	for v := 1; v < n; v++ {
		w := c[v]*sc + p[0] + p[v]
		if a < 0 || w < wa {
			b, wb = a, wa
			a, wa = v, w
		} else if b < 0 || w < wb {
			b, wb = v, w
		}
	}
	total += wa + wb
	g[0] += 2
	g[a]++
	g[b]++
	for _, x := range p {
		total -= 2 * x
	}
	return total
}

// asymTree is the 1-tree of the 2n-node transformation with the forced
// edges contracted: node 0 of the tree is the out-copy of node 0 alone,
// node i ≥ 1 the pair of copies of i; the in-copy of node 0 is the special
// node, joined to its out-copy and by the cheapest arc into 0.
type asymTree struct {
	n            int
	c, ct        []int64 // ct is the transpose: ct[u*n+v] = c[v*n+u]
	scale        int64
	lam, mu      []int64 // in-copy and out-copy multipliers, scaled
	slam, smu    []int64
	key          []int64
	par          []int32
	fwd, in      []bool
	indeg, outdg []int
}

func newAsymTree(n int, c []int64, scale int64) *asymTree {
	ct := make([]int64, n*n)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			ct[j*n+i] = c[i*n+j]
		}
	}
	a := &asymTree{n: n, c: c, ct: ct, scale: scale,
		lam: make([]int64, n), mu: make([]int64, n), slam: make([]int64, n), smu: make([]int64, n),
		key: make([]int64, n), par: make([]int32, n), fwd: make([]bool, n), in: make([]bool, n),
		indeg: make([]int, n), outdg: make([]int, n)}
	// Row, then column reduction as the starting multipliers.
	for i := 0; i < n; i++ {
		r := int64(math.MaxInt64)
		for j := 0; j < n; j++ {
			if j != i {
				r = min(r, c[i*n+j])
			}
		}
		a.mu[i] = -r * scale
	}
	for j := 0; j < n; j++ {
		r := int64(math.MaxInt64)
		for i := 0; i < n; i++ {
			if i != j {
				r = min(r, c[i*n+j]*scale+a.mu[i])
			}
		}
		a.lam[j] = -r
	}
	return a
}

func (a *asymTree) size() int { return 2 * a.n }
func (a *asymTree) save()     { copy(a.slam, a.lam); copy(a.smu, a.mu) }
func (a *asymTree) restore()  { copy(a.lam, a.slam); copy(a.mu, a.smu) }

// step: the first n entries of d are the in-copies, the next n the
// out-copies.
func (a *asymTree) step(x float64, d []float64) {
	for i := 0; i < a.n; i++ {
		a.lam[i] += int64(math.Round(x * d[i]))
		a.mu[i] += int64(math.Round(x * d[a.n+i]))
	}
}

func (a *asymTree) eval(g []int) int64 {
	n, c, ct, sc, lam, mu := a.n, a.c, a.ct, a.scale, a.lam, a.mu
	for i := 0; i < n; i++ {
		a.indeg[i], a.outdg[i] = 0, 0
	}
	// Prim from tree node 0 (the out-copy of 0): only arcs 0→v.
	for v := 1; v < n; v++ {
		a.in[v] = false
		a.key[v] = c[v]*sc + mu[0] + lam[v]
		a.par[v] = 0
		a.fwd[v] = true
	}
	var total int64
	u, bk := -1, int64(0)
	for v := 1; v < n; v++ {
		if u < 0 || a.key[v] < bk {
			u, bk = v, a.key[v]
		}
	}
	for k := 1; k < n; k++ {
		a.in[u] = true
		total += bk
		if p := int(a.par[u]); a.fwd[u] {
			a.outdg[p]++
			a.indeg[u]++
		} else {
			a.outdg[u]++
			a.indeg[p]++
		}
		row, col := c[u*n:u*n+n], ct[u*n:u*n+n]
		muU, lamU := mu[u], lam[u]
		nu := -1
		var nk int64
		for v := 1; v < n; v++ {
			if a.in[v] {
				continue
			}
			kv := a.key[v]
			x := row[v]*sc + muU + lam[v] // u→v
			y := col[v]*sc + mu[v] + lamU // v→u
			if x < kv || y < kv {
				if y < x {
					kv, a.fwd[v] = y, false
				} else {
					kv, a.fwd[v] = x, true
				}
				a.key[v] = kv
				a.par[v] = int32(u)
			}
			if nu < 0 || kv < nk {
				nu, nk = v, kv
			}
		}
		u, bk = nu, nk
	}
	// The cheapest arc into node 0.
	b := -1
	var wb int64
	for k := 1; k < n; k++ {
		if w := ct[k]*sc + mu[k] + lam[0]; b < 0 || w < wb {
			b, wb = k, w
		}
	}
	total += wb
	a.outdg[b]++
	a.indeg[0]++
	for i := 0; i < n; i++ {
		total -= lam[i] + mu[i]
		g[i] = a.indeg[i] - 1
		g[n+i] = a.outdg[i] - 1
	}
	return total
}
