package solver

// seg summarises a stretch of a route so that two stretches can be joined,
// and a move judged, in constant time (Kindervater and Savelsbergh 1997;
// with time warp as in Vidal, Crainic, Gendreau, Prins, Computers & OR 40(1),
// 2013). Time warp is how far a schedule has to travel back in time to meet
// every latest start: 0 means the stretch is feasible.
type seg struct {
	d  int64 // duration: travel, service and waiting, warp excluded
	tw int64 // total time warp
	e  int64 // earliest start of service at the first node without waiting inside
	l  int64 // latest start at the first node without adding time warp
	c  int64 // travel cost: sum of arcs
}

// join concatenates a and b with the arc travel t from a's last node to b's first.
// It is kept small enough for the compiler to inline: it is the engine's
// innermost step.
func join(a, b seg, t int64) seg {
	dl := a.d - a.tw + t
	wt := max(b.e-dl-a.l, 0)
	tw := max(a.e+dl-b.l, 0)
	a.d += b.d + t + wt
	a.e = max(b.e-dl, a.e) - wt
	a.l = min(b.l-dl, a.l) + tw
	a.tw += b.tw + tw
	a.c += b.c + t
	return a
}
