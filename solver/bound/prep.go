package bound

import (
	"context"
	"math"
	"sort"

	"visitline/solver"
)

// inf is the "no value" of costs and times: far above any sum of Horizon-sized
// values this package adds to it, far below overflow.
const inf int64 = math.MaxInt64 / 4

// spLimit is the largest instance for which all-pairs shortest paths (and so
// precedences) are computed: Floyd–Warshall is cubic.
var spLimit = 600

// prob is an instance after window tightening and arc elimination. Times are
// those of the instance; e is the original earliest start (schedules are
// computed from it), et and lt the tightened earliest and latest starts.
type prob struct {
	in         *solver.Instance
	n          int
	start, end int // end is -1 unless the shape is OpenFixed
	shape      solver.Shape
	e, et, lt  []int64
	s          []int64
	lateRet    int64 // latest return to the start of a closed tour
	arc        []bool
	succ       [][]int32
	pinAt      []int32 // pinAt[k] is the node pinned to route index k, or -1
	pinOf      []int32 // pinOf[i] is the route index node i is pinned to, or -1
	sp         []int64 // sp[i*n+j]: least service-plus-travel from the start of service at i to that at j; nil when not computed
	rank       []int32 // rank of each node in order of tightened latest start: bit positions of sets
	byRank     []int32
	words      int
	mustBefore [][]uint64 // per node, the set (by rank) of nodes that must precede it; nil when not computed
	infeasible bool       // preprocessing alone shows that no plan is feasible
	cut        bool       // ctx ended before the tables were built: use nothing of p
	why        string     // a short reason when infeasible
	pinned     bool       // some node other than the start is pinned (fixed prefix or positions)
	// minPos[i] and maxPos[i] bound the route index of node i in every
	// feasible route: at least one more than the nodes that must precede
	// it, at most n-1 less the nodes that must follow it (and the pins).
	minPos, maxPos []int32
	// elim, when set, holds the (route index, arc) pairs that no route
	// cheaper than elimUB takes (see eliminate); bounds computed with them
	// hold as min(elimUB, bound). revp caches the reversed day.
	elim   []uint64
	elimUB int64
	revp   *prob

	mustBeforeTmp [][]bool
	y             yielder         // turns for the host during the cubic steps
	ctx           context.Context // preprocessing stops early (still valid, only weaker) when it ends
}

// halted steps the pacer and says whether preprocessing must stop now.
func (p *prob) halted() bool { return p.y.ticks(p.n) && p.ctx.Err() != nil }

func (p *prob) t(i, j int) int64 { return p.in.Travel[i*p.n+j] }

// newProb tightens windows and eliminates arcs. All rules are the classical
// ones (Desrochers, Desrosiers and Solomon 1992; Dumas et al. 1995), written
// so that they stay valid when travel times break the triangle inequality:
// precedences use shortest paths, never single arcs.
func newProb(in *solver.Instance) *prob { return newProbCtx(context.Background(), in) }

// newProbCtx is newProb that stops tightening when ctx ends: every rule
// applied so far holds, so the result is valid, only less tight.
func newProbCtx(ctx context.Context, in *solver.Instance) *prob {
	n := in.N
	p := &prob{in: in, n: n, start: in.Start, end: -1, shape: in.Shape, ctx: ctx}
	if in.Shape == solver.OpenFixed {
		p.end = in.End
	}
	p.e = append([]int64(nil), in.Early...)
	p.et = append([]int64(nil), in.Early...)
	p.lt = append([]int64(nil), in.Late...)
	p.s = in.Service
	p.lateRet = in.Late[in.Start]
	p.pinAt = make([]int32, n)
	p.pinOf = make([]int32, n)
	for i := range p.pinAt {
		p.pinAt[i], p.pinOf[i] = -1, -1
	}
	fail := func(why string) *prob {
		p.infeasible = true
		if p.why == "" {
			p.why = why
		}
		p.finishSets()
		return p
	}
	pin := func(node, k int) bool {
		if k < 0 || k >= n {
			return false
		}
		if p.pinAt[k] >= 0 && p.pinAt[k] != int32(node) || p.pinOf[node] >= 0 && p.pinOf[node] != int32(k) {
			return false
		}
		p.pinAt[k], p.pinOf[node] = int32(node), int32(k)
		return true
	}
	if !pin(p.start, 0) {
		return fail("the start is pinned elsewhere")
	}
	if p.end >= 0 && !pin(p.end, n-1) {
		return fail("the end is pinned elsewhere")
	}
	for k, v := range in.Fixed {
		if !pin(v, k) {
			return fail("the done visits and the pins disagree")
		}
	}
	if in.Position != nil {
		for i, k := range in.Position {
			if k > 0 && !pin(i, k) {
				return fail("two visits are pinned to one place, or a pin is out of range")
			}
		}
	}
	for i := 0; i < n; i++ {
		if i != p.start && p.pinOf[i] >= 0 {
			p.pinned = true
		}
	}
	// The start departs at its earliest; a start pinned elsewhere is caught
	// above, so the start's own window only bounds the return.
	p.et[p.start], p.lt[p.start] = p.e[p.start], p.e[p.start]
	p.arc = make([]bool, n*n)
	for i := 0; i < n; i++ {
		p.y.ticks(n)
		if n > largeN && i%64 == 0 && ctx.Err() != nil {
			// Out of time before the arcs were even listed (a large day
			// late in its budget): a quadratic pass or two more would
			// only overrun it.
			p.cut = true
			return p
		}
		for j := 0; j < n; j++ {
			p.arc[i*n+j] = p.structural(i, j)
		}
	}
	if n == 1 {
		p.finishSets()
		return p
	}
	for round := 0; round < 4; round++ {
		before := p.countArcs()
		if why := p.tighten(); why != "" {
			return fail(why)
		}
		if n > spLimit || ctx.Err() != nil {
			break
		}
		if !p.shortestPaths() {
			break
		}
		if !p.precedences() {
			return fail("two visits must each come before the other")
		}
		if p.countArcs() == before && round > 0 {
			break
		}
	}
	if ctx.Err() != nil && n > largeN {
		p.cut = true // finishSets is quadratic too
		return p
	}
	p.finishSets()
	return p
}

// countArcs is the number of arcs left.
func (p *prob) countArcs() int {
	c := 0
	for _, a := range p.arc {
		if a {
			c++
		}
	}
	return c
}

// tighten alternates arc elimination and window tightening until nothing
// changes. It returns a reason when it shows that no plan is feasible.
func (p *prob) tighten() string {
	n := p.n
	changed := true
	for pass := 0; changed && pass < 50; pass++ {
		changed = false
		// Arc elimination by windows.
		for i := 0; i < n; i++ {
			if p.halted() {
				return ""
			}
			for j := 0; j < n; j++ {
				if !p.arc[i*n+j] {
					continue
				}
				lj := p.lt[j]
				if j == p.start {
					lj = p.lateRet
				}
				if p.et[i]+p.s[i]+p.t(i, j) > lj {
					p.arc[i*n+j] = false
					changed = true
				}
			}
		}
		// Earliest start from the earliest predecessor; latest start from the
		// latest successor.
		for j := 0; j < n; j++ {
			if p.halted() {
				return ""
			}
			if j == p.start {
				continue
			}
			best := inf
			for i := 0; i < n; i++ {
				if p.arc[i*n+j] {
					if v := p.et[i] + p.s[i] + p.t(i, j); v < best {
						best = v
					}
				}
			}
			if best == inf {
				return "a visit cannot be reached in time from any other"
			}
			if best > p.et[j] {
				p.et[j] = best
				changed = true
			}
		}
		for j := 0; j < n; j++ {
			if p.halted() {
				return ""
			}
			if j == p.start || p.shape == solver.OpenFree || j == p.end {
				continue
			}
			best := -inf
			for k := 0; k < n; k++ {
				if p.arc[j*n+k] {
					lk := p.lt[k]
					if k == p.start {
						lk = p.lateRet
					}
					if v := lk - p.s[j] - p.t(j, k); v > best {
						best = v
					}
				}
			}
			if best == -inf {
				return "after a visit, no other can be reached in time"
			}
			if best < p.lt[j] {
				p.lt[j] = best
				changed = true
			}
		}
		for j := 0; j < n; j++ {
			if p.et[j] > p.lt[j] {
				return "a visit's window cannot be met"
			}
		}
	}
	return ""
}

// structural says whether arc i→j can be in any route at all, before
// windows: no loops, nothing into the start (except the return of a closed
// tour), nothing out of a fixed end, and agreement with the pins.
func (p *prob) structural(i, j int) bool {
	n := p.n
	if i == j {
		return false
	}
	if p.end >= 0 && i == p.end {
		return false
	}
	if j == p.start {
		if p.shape != solver.Closed {
			return false
		}
		// The return leaves from the visit at index n-1.
		if pi := p.pinOf[i]; pi >= 0 && pi != int32(n-1) {
			return false
		}
		if v := p.pinAt[n-1]; v >= 0 && v != int32(i) {
			return false
		}
		return true
	}
	pi, pj := p.pinOf[i], p.pinOf[j]
	if pi >= 0 && pj >= 0 && pj != pi+1 {
		return false
	}
	if pi >= 0 && pi+1 < int32(n) {
		if v := p.pinAt[pi+1]; v >= 0 && v != int32(j) {
			return false
		}
	}
	if pj >= 1 {
		if v := p.pinAt[pj-1]; v >= 0 && v != int32(i) {
			return false
		}
	}
	if p.end >= 0 && j == p.end && i == p.start && n > 2 {
		return false
	}
	return true
}

// shortestPaths fills sp by Floyd–Warshall over the remaining arcs, with arc
// i→j weighing s_i + t_ij: waiting only adds to it, so it bounds from below
// the time from the start of service at i to the start of service at j.
// It reports false, leaving sp nil, when the context ended first (partial
// paths would overestimate, and precedences need underestimates).
func (p *prob) shortestPaths() bool {
	n := p.n
	sp := make([]int64, n*n)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			sp[i*n+j] = inf
			if i == j {
				sp[i*n+j] = 0
			} else if p.arc[i*n+j] && j != p.start {
				sp[i*n+j] = p.s[i] + p.t(i, j)
			}
		}
	}
	for k := 0; k < n; k++ {
		if k == p.start {
			continue
		}
		rowK := sp[k*n : k*n+n]
		for i := 0; i < n; i++ {
			if p.halted() {
				return false
			}
			dik := sp[i*n+k]
			if dik == inf {
				continue
			}
			rowI := sp[i*n : i*n+n]
			for j, dkj := range rowK {
				if dkj != inf && dik+dkj < rowI[j] {
					rowI[j] = dik + dkj
				}
			}
		}
	}
	p.sp = sp
	return true
}

// precedences derives "i must come before j" from shortest paths and
// windows, tightens windows along them and removes the arcs they forbid. It
// reports false when two visits must each precede the other.
func (p *prob) precedences() bool {
	n := p.n
	before := make([][]bool, n) // before[j][i]: i must precede j
	for j := range before {
		before[j] = make([]bool, n)
	}
	for i := 0; i < n; i++ {
		p.y.ticks(n)
		for j := 0; j < n; j++ {
			if i == j || i == p.start || j == p.start {
				continue
			}
			// j cannot come before i: then i must come before j.
			if p.sp[j*n+i] == inf || p.et[j]+p.sp[j*n+i] > p.lt[i] {
				before[j][i] = true
			}
		}
	}
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			if before[j][i] && before[i][j] {
				return false
			}
		}
	}
	// Windows along precedences.
	for j := 0; j < n; j++ {
		for i := 0; i < n; i++ {
			if before[j][i] && p.sp[i*n+j] < inf {
				if v := p.et[i] + p.sp[i*n+j]; v > p.et[j] {
					p.et[j] = v
				}
				if v := p.lt[j] - p.sp[i*n+j]; v < p.lt[i] {
					p.lt[i] = v
				}
			}
		}
	}
	for j := 0; j < n; j++ {
		if p.et[j] > p.lt[j] {
			return false
		}
	}
	// An arc i→j is impossible when some k must come after i and before j.
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			if !p.arc[i*n+j] || j == p.start {
				continue
			}
			if p.halted() {
				// Stop removing arcs; the precedences found still hold.
				p.mustBeforeTmp = before
				return true
			}
			for k := 0; k < n; k++ {
				if k != i && k != j && before[k][i] && before[j][k] {
					p.arc[i*n+j] = false
					break
				}
			}
		}
	}
	p.mustBeforeTmp = before
	return true
}

// finishSets ranks nodes by tightened latest start (bit positions of the
// visited sets, so that the unvisited node with the earliest deadline is the
// lowest zero bit) and builds successor lists.
func (p *prob) finishSets() {
	n := p.n
	p.rank = make([]int32, n)
	p.byRank = make([]int32, n)
	for i := range p.byRank {
		p.byRank[i] = int32(i)
	}
	sort.SliceStable(p.byRank, func(x, y int) bool {
		a, b := p.byRank[x], p.byRank[y]
		if p.lt[a] != p.lt[b] {
			return p.lt[a] < p.lt[b]
		}
		return a < b
	})
	for r, v := range p.byRank {
		p.rank[v] = int32(r)
	}
	p.words = (n + 63) / 64
	if p.arc != nil {
		// One flat array of exactly the arcs left, counted first: lists
		// grown by append took 3.5 times the memory of the arcs (345 MB on
		// a 5,000-site day where every arc is left).
		total := 0
		for _, ok := range p.arc {
			if ok {
				total++
			}
		}
		flat := make([]int32, 0, total)
		p.succ = make([][]int32, n)
		for i := 0; i < n; i++ {
			p.y.ticks(n)
			from := len(flat)
			row := p.arc[i*n : (i+1)*n]
			for _, j := range p.byRank {
				if row[j] {
					flat = append(flat, j)
				}
			}
			if len(flat) > from {
				p.succ[i] = flat[from:len(flat):len(flat)]
			}
		}
	}
	p.minPos, p.maxPos = make([]int32, n), make([]int32, n)
	for i := 0; i < n; i++ {
		p.minPos[i], p.maxPos[i] = 1, int32(n-1)
		if i == p.start {
			p.maxPos[i] = 0
		}
		if k := p.pinOf[i]; k >= 0 {
			p.minPos[i], p.maxPos[i] = k, k
		}
	}
	if p.mustBeforeTmp != nil {
		// Position ranges from the precedences (Christofides, Mingozzi and
		// Toth 1981 use the same counts to restrict the n-path relaxation's
		// states): before[j][i] says i must precede j, the start excluded.
		for j := 0; j < n; j++ {
			if j == p.start {
				continue
			}
			for i := 0; i < n; i++ {
				if i != j && i != p.start && p.mustBeforeTmp[j][i] {
					if p.pinOf[j] < 0 {
						p.minPos[j]++
					}
					if p.pinOf[i] < 0 {
						p.maxPos[i]--
					}
				}
			}
		}
		for i := 0; i < n; i++ {
			if p.minPos[i] > p.maxPos[i] {
				// Cannot happen with consistent precedences and pins;
				// keep the ranges valid rather than trust them.
				p.minPos[i], p.maxPos[i] = 0, int32(n-1)
			}
		}
	}
	if p.mustBeforeTmp != nil {
		p.mustBefore = make([][]uint64, n)
		for j := 0; j < n; j++ {
			var set []uint64
			for i := 0; i < n; i++ {
				if p.mustBeforeTmp[j][i] {
					if set == nil {
						set = make([]uint64, p.words)
					}
					r := p.rank[i]
					set[r>>6] |= 1 << (uint(r) & 63)
				}
			}
			p.mustBefore[j] = set
		}
		p.mustBeforeTmp = nil
	}
}
