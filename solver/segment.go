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
	f  int32 // first node
	z  int32 // last node
}

// join concatenates a and b with the arc travel t between a.z and b.f.
func join(a, b seg, t int64) seg {
	delta := a.d - a.tw + t
	wt := b.e - delta - a.l
	if wt < 0 {
		wt = 0
	}
	tw := a.e + delta - b.l
	if tw < 0 {
		tw = 0
	}
	e := b.e - delta
	if a.e > e {
		e = a.e
	}
	l := b.l - delta
	if a.l < l {
		l = a.l
	}
	return seg{d: a.d + b.d + t + wt, tw: a.tw + b.tw + tw, e: e - wt, l: l + tw, c: a.c + b.c + t, f: a.f, z: b.z}
}
