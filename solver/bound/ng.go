package bound

import (
	"math/bits"

	"visitline/solver/turn"
)

// ngSets are the neighbourhoods of the ng-route relaxation (Baldacci,
// Mingozzi and Roberti 2011, "New route relaxation and pricing strategies
// for the vehicle routing problem", Operations Research 59(5); for this
// problem Baldacci, Mingozzi and Roberti 2012, INFORMS Journal on Computing
// 24(3)). Each node i has a set N(i) holding i itself (always at position 0)
// and its nearest nodes by travel and window. A relaxed path remembers, at
// each node, the nodes of its part still to come that lie in the
// neighbourhoods of every node passed since: it may not visit a remembered
// node again. Every elementary path is allowed, so any neighbourhoods give a
// valid relaxation; larger ones forbid more cycles.
//
// A memory is a bit mask over the positions of N(i); the relaxation keeps
// tables indexed by memory, so neighbourhoods have at most maxNG members.
type ngSets struct {
	n    int
	list [][]int32 // list[i][0] == i
	pos  []int8    // pos[i*n+v]: position of v in list[i], -1 when absent
	max  int       // the largest size grow may reach
	// Translation tables, filled on first use (see table): per pair at
	// i*n+j the offset of its table in tab, or -1.
	tabOff []int32
	tab    []uint16
}

// tableNG is the largest neighbourhood whose memories are translated by a
// table.
const tableNG = 6

// table returns translate(m, j, i) for every memory m of node j, or nil
// when N(j) is too large for a table.
func (ng *ngSets) table(j, i int) []uint16 {
	kj := len(ng.list[j])
	if kj > tableNG {
		return nil
	}
	if ng.tabOff == nil {
		ng.tabOff = make([]int32, ng.n*ng.n)
		for k := range ng.tabOff {
			ng.tabOff[k] = -1
		}
	}
	if o := ng.tabOff[i*ng.n+j]; o >= 0 {
		return ng.tab[o : int(o)+1<<kj]
	}
	o := len(ng.tab)
	ng.tabOff[i*ng.n+j] = int32(o)
	row := ng.pos[i*ng.n : i*ng.n+ng.n]
	for m := 0; m < 1<<kj; m++ {
		v := uint16(1)
		if m > 0 {
			low := bits.TrailingZeros(uint(m))
			v = ng.tab[o+(m&(m-1))]
			if q := row[ng.list[j][low]]; q >= 0 {
				v |= 1 << uint(q)
			}
		}
		ng.tab = append(ng.tab, v)
	}
	return ng.tab[o : o+1<<kj]
}

// maxNG is the largest neighbourhood.
const maxNG = 12

// newNGSets picks for every node the k−1 nearest other nodes by travel in
// either direction plus the distance between the windows, among the nodes
// it may meet on a route (arcs either way). k is capped at maxNG; grow may
// later add members up to limit.
func newNGSets(p *prob, k, limit int) *ngSets {
	n := p.n
	k = min(max(k, 1), maxNG, n)
	limit = min(max(limit, k), maxNG, n)
	ng := &ngSets{n: n, list: make([][]int32, n), pos: make([]int8, n*n), max: limit}
	for i := range ng.pos {
		ng.pos[i] = -1
	}
	type cv struct {
		v int32
		d int64
	}
	less := func(a, b cv) bool { return a.d < b.d || a.d == b.d && a.v < b.v }
	// The k-1 nearest of each row by bounded insertion, in the order a
	// full sort by (distance, node) would give: linear in the row, where
	// a sort of every row took seconds at a few thousand nodes.
	best := make([]cv, 0, k)
	stopped := false
	for i := 0; i < n; i++ {
		turn.Due() // a row: quadratic in all
		best = best[:0]
		if !stopped && i%16 == 0 && p.ctx != nil && p.ctx.Err() != nil {
			// Out of time: the rows left keep only their own node, a
			// smaller neighbourhood, so a weaker but valid relaxation.
			stopped = true
		}
		if stopped {
			ng.add(i, i)
			continue
		}
		for v := 0; v < n; v++ {
			if v == i || !p.arc[i*n+v] && !p.arc[v*n+i] {
				continue
			}
			d := min(p.t(i, v), p.t(v, i))
			// Distance between the windows: a far-apart pair is rarely on a
			// short cycle.
			if gap := p.et[v] - p.lt[i]; gap > 0 {
				d += gap
			}
			if gap := p.et[i] - p.lt[v]; gap > 0 {
				d += gap
			}
			c := cv{int32(v), d}
			if len(best) == k-1 && (k-1 == 0 || !less(c, best[len(best)-1])) {
				continue
			}
			j := len(best)
			if j < k-1 {
				best = append(best, c)
			} else {
				j--
			}
			for ; j > 0 && less(c, best[j-1]); j-- {
				best[j] = best[j-1]
			}
			best[j] = c
		}
		ng.add(i, i)
		for _, c := range best {
			ng.add(i, int(c.v))
		}
	}
	return ng
}

// fullNGSets makes every node's neighbourhood the whole instance (n ≤ maxNG):
// the relaxation is then exact up to merged labels.
func fullNGSets(n int) *ngSets {
	ng := &ngSets{n: n, list: make([][]int32, n), pos: make([]int8, n*n), max: n}
	for i := range ng.pos {
		ng.pos[i] = -1
	}
	for i := 0; i < n; i++ {
		ng.add(i, i)
		for v := 0; v < n; v++ {
			if v != i {
				ng.add(i, v)
			}
		}
	}
	return ng
}

func (ng *ngSets) add(i, v int) bool {
	if ng.pos[i*ng.n+v] >= 0 || len(ng.list[i]) >= maxNG {
		return false
	}
	ng.pos[i*ng.n+v] = int8(len(ng.list[i]))
	ng.list[i] = append(ng.list[i], int32(v))
	return true
}

// clone copies the sets, so that a relaxation built from them keeps them
// while grow changes the original.
func (ng *ngSets) clone() *ngSets {
	c := &ngSets{n: ng.n, list: make([][]int32, ng.n), pos: append([]int8(nil), ng.pos...), max: ng.max}
	// The tables are not copied: grow changes what they would hold.
	for i, l := range ng.list {
		c.list[i] = append([]int32(nil), l...)
	}
	return c
}

// translate maps memory m of a label at node j to the positions of N(i),
// for a path that goes i → j: the remembered nodes that lie in N(i), plus i.
func (ng *ngSets) translate(m uint64, j, i int) uint64 {
	out := uint64(1)
	lj := ng.list[j]
	row := ng.pos[i*ng.n : i*ng.n+ng.n]
	for m != 0 {
		b := bits.TrailingZeros64(m)
		m &= m - 1
		if q := row[lj[b]]; q >= 0 {
			out |= 1 << uint(q)
		}
	}
	return out
}

// grow applies decremental state-space relaxation (Righini and Salani 2008,
// Networks 51(3), in the form for ng-routes): for every cycle of the relaxed
// path (a node v met twice), v joins the neighbourhoods of the nodes between
// its two visits, so that the cycle is forbidden next time. Neighbourhoods
// stop at ng.max members. It returns the number of members added.
func (ng *ngSets) grow(path []int) int {
	added := 0
	last := make(map[int]int, len(path))
	for b, v := range path {
		if a, ok := last[v]; ok {
			for _, u := range path[a+1 : b] {
				if u != v && len(ng.list[u]) < ng.max && ng.add(u, v) {
					added++
				}
			}
		}
		last[v] = b
	}
	return added
}
