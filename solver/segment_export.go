package solver

// Seg is the segment summary of seg with exported fields, for the other
// engines of the project (solver/fleet), so that every route of every
// engine is judged by the one concatenation.
type Seg struct {
	D  int64 // duration: travel, service and waiting, warp excluded
	TW int64 // total time warp
	E  int64 // earliest start of service at the first node without waiting inside
	L  int64 // latest start at the first node without adding time warp
	C  int64 // travel cost: sum of arcs
}

// NodeSeg is the summary of one node with the given service time and window.
func NodeSeg(service, early, late int64) Seg {
	return Seg{D: service, E: early, L: late}
}

// JoinSeg concatenates a and b with travel t from a's last node to b's first
// (Kindervater and Savelsbergh 1997; Vidal et al. 2013). It is join, line
// for line, on the exported fields (written out rather than converted so
// that the compiler inlines it); TestJoinSegIsJoin holds the two equal.
func JoinSeg(a, b Seg, t int64) Seg {
	dl := a.D - a.TW + t
	wt := max(b.E-dl-a.L, 0)
	tw := max(a.E+dl-b.L, 0)
	a.D += b.D + t + wt
	a.E = max(b.E-dl, a.E) - wt
	a.L = min(b.L-dl, a.L) + tw
	a.TW += b.TW + tw
	a.C += b.C + t
	return a
}
