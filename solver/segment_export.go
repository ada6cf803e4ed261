package solver

// Seg is the segment summary of seg with exported fields, for the other
// engines of the project (solver/fleet): every route of every engine is
// judged by the one concatenation, JoinSeg, which calls join itself.
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
// (Kindervater and Savelsbergh 1997; Vidal et al. 2013).
func JoinSeg(a, b Seg, t int64) Seg {
	s := join(seg{a.D, a.TW, a.E, a.L, a.C}, seg{b.D, b.TW, b.E, b.L, b.C}, t)
	return Seg{s.d, s.tw, s.e, s.l, s.c}
}
