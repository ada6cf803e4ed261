package bound

import (
	"context"
	"math/bits"

	"visitline/solver"
	"visitline/solver/turn"
)

// dpKind is what the forward dynamic programme minimises.
type dpKind int

const (
	dpTravel     dpKind = iota // sum of arcs
	dpCompletion               // end of the route, waiting counted
	dpFeasible                 // nothing: the first feasible route will do
	dpMinStart                 // the start of service at one target node
)

// dpConfig sets one run of the forward dynamic programme.
type dpConfig struct {
	kind   dpKind
	target int // for dpMinStart
	// beam caps the labels kept per stage; beyond it the labels with the
	// worst bound are dropped and the least dropped bound is recorded, which
	// keeps the run's lower bound valid. 0 means no cap.
	beam int
	// maxHistory caps the labels kept over all stages for rebuilding the
	// route; a run that needs more stops unfinished, unless boundOnly.
	maxHistory int
	// boundOnly lets a run whose history outgrows maxHistory while an
	// upper bound is in force go on without it: it can no longer rebuild a
	// route, but it still proves the bound (or finds the cost of a better
	// route, reported in cost with found false and costOnly true).
	boundOnly bool
	rx        *relax       // completion bounds; nil for none
	ub        func() int64 // labels whose bound is ≥ ub() are pruned; nil for none
	y         *yielder
}

// dpResult is what one run found.
type dpResult struct {
	found bool
	route []int
	cost  int64
	// dropped says the beam dropped labels; droppedLB is the least bound
	// among them (inf when none). With ub the upper bound in force at the
	// end, min(ub, found cost, droppedLB) is a lower bound on the optimum.
	dropped   bool
	droppedLB int64
	complete  bool // ran to the end: not cancelled, not out of history
	labels    int64
	// costOnly says the run dropped its history on the way (boundOnly);
	// when it reached the end, cost is the least cost of a complete route
	// it met (inf for none) and route is nil.
	costOnly bool
}

// layer is one finished stage in compact form: states with their sets and
// last nodes, each with a range of labels (time, penalised cost).
type layer struct {
	hash  []uint64
	last  []int32
	words []uint64
	first []int32 // labels of state s are first[s]..first[s+1]-1
	T, PC []int64
}

// stage collects the labels of the next layer in an open-addressing hash
// table keyed by (set, last node), keeping per state only labels that no
// other label beats in both time and cost.
type stage struct {
	w      int
	sHash  []uint64
	sLast  []int32
	sWords []uint64
	sHead  []int32
	slots  []int32
	mask   uint64
	lT     []int64
	lPC    []int64
	lF     []int64
	lNext  []int32
	lPar   []int32
	lState []int32 // -1 once the label is dominated or dropped
	live   int
	cut    int64 // candidates with a bound above cut are dropped
	drop   int64 // least bound dropped so far
}

func (s *stage) reset(w int) {
	s.w = w
	s.sHash, s.sLast, s.sWords, s.sHead = s.sHash[:0], s.sLast[:0], s.sWords[:0], s.sHead[:0]
	s.lT, s.lPC, s.lF, s.lNext, s.lPar, s.lState = s.lT[:0], s.lPC[:0], s.lF[:0], s.lNext[:0], s.lPar[:0], s.lState[:0]
	if len(s.slots) == 0 {
		s.slots = make([]int32, 1<<10)
	}
	for i := range s.slots {
		s.slots[i] = -1
	}
	s.mask = uint64(len(s.slots) - 1)
	s.live = 0
	s.cut = inf
	s.drop = inf
}

func slotKey(h uint64, last int32) uint64 {
	x := h ^ (uint64(last)+1)*0x9E3779B97F4A7C15
	x ^= x >> 31
	x *= 0xBF58476D1CE4E5B9
	x ^= x >> 29
	return x
}

func (s *stage) grow() {
	s.slots = make([]int32, 2*len(s.slots))
	for i := range s.slots {
		s.slots[i] = -1
	}
	s.mask = uint64(len(s.slots) - 1)
	for si := range s.sHash {
		pos := slotKey(s.sHash[si], s.sLast[si]) & s.mask
		for s.slots[pos] >= 0 {
			pos = (pos + 1) & s.mask
		}
		s.slots[pos] = int32(si)
	}
}

// insert adds a label for the set pw ∪ {bit} ending at last, unless a label
// of that state is at least as good; labels it beats are removed.
func (s *stage) insert(h uint64, last int32, pw []uint64, bit int32, t, pc, f int64, parent int32) {
	if f > s.cut {
		s.drop = min(s.drop, f)
		return
	}
	w := s.w
	bw, bm := int(bit>>6), uint64(1)<<(uint(bit)&63)
	pos := slotKey(h, last) & s.mask
	si := int32(-1)
	for {
		c := s.slots[pos]
		if c < 0 {
			break
		}
		if s.sHash[c] == h && s.sLast[c] == last {
			ws := s.sWords[int(c)*w : int(c)*w+w]
			eq := true
			for k := 0; k < w; k++ {
				want := pw[k]
				if k == bw {
					want |= bm
				}
				if ws[k] != want {
					eq = false
					break
				}
			}
			if eq {
				si = c
				break
			}
		}
		pos = (pos + 1) & s.mask
	}
	if si < 0 {
		si = int32(len(s.sHash))
		s.sHash = append(s.sHash, h)
		s.sLast = append(s.sLast, last)
		s.sWords = append(s.sWords, pw...)
		s.sWords[int(si)*w+bw] |= bm
		s.sHead = append(s.sHead, -1)
		s.slots[pos] = si
		if 2*len(s.sHash) > len(s.slots) {
			s.grow()
		}
	} else {
		for l := s.sHead[si]; l >= 0; l = s.lNext[l] {
			if s.lT[l] <= t && s.lPC[l] <= pc {
				return
			}
		}
		prev := int32(-1)
		for l := s.sHead[si]; l >= 0; {
			nx := s.lNext[l]
			if t <= s.lT[l] && pc <= s.lPC[l] {
				if prev < 0 {
					s.sHead[si] = nx
				} else {
					s.lNext[prev] = nx
				}
				s.lState[l] = -1
				s.live--
			} else {
				prev = l
			}
			l = nx
		}
	}
	l := int32(len(s.lT))
	s.lT = append(s.lT, t)
	s.lPC = append(s.lPC, pc)
	s.lF = append(s.lF, f)
	s.lNext = append(s.lNext, s.sHead[si])
	s.lPar = append(s.lPar, parent)
	s.lState = append(s.lState, si)
	s.sHead[si] = l
	s.live++
}

// trim drops the live labels with the worst bounds so that about keep
// remain, and lowers the cut so that later candidates as bad are dropped too.
func (s *stage) trim(keep int, scratch []int64) []int64 {
	scratch = scratch[:0]
	for l, st := range s.lState {
		if st >= 0 {
			scratch = append(scratch, s.lF[l])
		}
	}
	thr := selectKth(scratch, keep-1)
	kill := func(strict bool) {
		for l, st := range s.lState {
			if st >= 0 && (s.lF[l] > thr || !strict && s.lF[l] >= thr) {
				s.drop = min(s.drop, s.lF[l])
				s.lState[l] = -1
				s.live--
			}
		}
	}
	kill(true)
	s.cut = min(s.cut, thr)
	if s.live > keep+keep/2 {
		// Many ties at the threshold: drop them as well.
		kill(false)
		s.cut = min(s.cut, thr-1)
	}
	// Unlink the dropped labels.
	for si := range s.sHead {
		prev := int32(-1)
		for l := s.sHead[si]; l >= 0; l = s.lNext[l] {
			if s.lState[l] < 0 {
				if prev < 0 {
					s.sHead[si] = s.lNext[l]
				} else {
					s.lNext[prev] = s.lNext[l]
				}
			} else {
				prev = l
			}
		}
	}
	return scratch
}

// compact writes the live labels into a layer (states in creation order,
// labels in list order) and returns, per label, its parent and node.
func (s *stage) compact(out *layer) (parent, node []int32) {
	w := s.w
	out.hash, out.last, out.words, out.first = out.hash[:0], out.last[:0], out.words[:0], out.first[:0]
	out.T, out.PC = out.T[:0], out.PC[:0]
	parent = make([]int32, 0, s.live)
	node = make([]int32, 0, s.live)
	for si := range s.sHead {
		if s.sHead[si] < 0 {
			continue
		}
		out.hash = append(out.hash, s.sHash[si])
		out.last = append(out.last, s.sLast[si])
		out.words = append(out.words, s.sWords[si*w:si*w+w]...)
		out.first = append(out.first, int32(len(out.T)))
		for l := s.sHead[si]; l >= 0; l = s.lNext[l] {
			out.T = append(out.T, s.lT[l])
			out.PC = append(out.PC, s.lPC[l])
			parent = append(parent, s.lPar[l])
			node = append(node, s.sLast[si])
		}
	}
	out.first = append(out.first, int32(len(out.T)))
	return parent, node
}

// selectKth returns the k-th smallest value (0-based) of a, reordering it.
func selectKth(a []int64, k int) int64 {
	if k >= len(a) {
		k = len(a) - 1
	}
	lo, hi := 0, len(a)-1
	for lo < hi {
		m := lo + (hi-lo)/2
		// median of three as pivot
		if a[m] < a[lo] {
			a[m], a[lo] = a[lo], a[m]
		}
		if a[hi] < a[lo] {
			a[hi], a[lo] = a[lo], a[hi]
		}
		if a[hi] < a[m] {
			a[hi], a[m] = a[m], a[hi]
		}
		piv := a[m]
		i, j := lo, hi
		for i <= j {
			for a[i] < piv {
				i++
			}
			for a[j] > piv {
				j--
			}
			if i <= j {
				a[i], a[j] = a[j], a[i]
				i++
				j--
			}
		}
		switch {
		case k <= j:
			hi = j
		case k >= i:
			lo = i
		default:
			return a[k]
		}
	}
	return a[k]
}

// zobrist gives each rank a fixed random word; a set hashes to the XOR of
// its members' words.
func zobrist(n int) []uint64 {
	z := make([]uint64, n)
	x := uint64(0x243F6A8885A308D3)
	for i := range z {
		x += 0x9E3779B97F4A7C15
		v := x
		v = (v ^ (v >> 30)) * 0xBF58476D1CE4E5B9
		v = (v ^ (v >> 27)) * 0x94D049BB133111EB
		z[i] = v ^ (v >> 31)
	}
	return z
}

// runDP runs the forward dynamic programme over (visited set, last node,
// time) with dominance on (time, cost), window propagation, precedences,
// reachability of the unvisited nodes with the nearest deadlines, the
// completion bound of the relaxation and the upper bound.
func runDP(ctx context.Context, p *prob, cfg dpConfig) dpResult {
	res := dpResult{droppedLB: inf}
	n, w := p.n, p.words
	if p.infeasible {
		res.complete = true
		return res
	}
	if n == 1 {
		res.complete, res.found, res.route = true, true, []int{p.start}
		res.cost = finalCost(p, cfg, p.start, p.e[p.start], 0)
		return res
	}
	y := cfg.y
	if y == nil {
		y = &yielder{}
	}
	z := zobrist(n)
	var lam []int64
	var lamSum int64
	if cfg.rx != nil && (cfg.kind == dpTravel || cfg.kind == dpCompletion) {
		lam, lamSum = cfg.rx.lam, cfg.rx.lamSum
	}
	lamOf := func(j int) int64 {
		if lam == nil {
			return 0
		}
		return lam[j]
	}
	// Layer 0: the start alone.
	cur := &layer{}
	sr := p.rank[p.start]
	startWords := make([]uint64, w)
	startWords[sr>>6] |= 1 << (uint(sr) & 63)
	cur.hash = []uint64{z[sr]}
	cur.last = []int32{int32(p.start)}
	cur.words = startWords
	cur.first = []int32{0, 1}
	cur.T = []int64{p.e[p.start]}
	cur.PC = []int64{0}
	histPar := [][]int32{{-1}}
	histNode := [][]int32{{int32(p.start)}}
	history := 1
	var st stage
	var scratch []int64
	ubNow := func() int64 {
		if cfg.ub == nil {
			return inf
		}
		return cfg.ub()
	}
	for k := 1; k < n; k++ {
		st.reset(w)
		r := n - 1 - k
		final := k == n-1
		pinned := p.pinAt[k]
		for s := 0; s < len(cur.last); s++ {
			i := int(cur.last[s])
			words := cur.words[s*w : s*w+w]
			h := cur.hash[s]
			succ := p.succ[i]
			if pinned >= 0 {
				if !p.arc[i*n+int(pinned)] {
					continue
				}
				succ = []int32{pinned}
			}
			for l := cur.first[s]; l < cur.first[s+1]; l++ {
				if y.tick() && ctx.Err() != nil {
					return res
				}
				t, pc := cur.T[l], cur.PC[l]
				ub := ubNow()
				dep := t + p.s[i]
				for _, j32 := range succ {
					j := int(j32)
					if j == p.start || p.eliminated(k-1, i, j) {
						continue
					}
					rj := p.rank[j]
					if words[rj>>6]&(1<<(uint(rj)&63)) != 0 {
						continue
					}
					if pj := p.pinOf[j]; pj >= 0 && pj != int32(k) {
						continue
					}
					if !final && j == p.end {
						continue
					}
					arr := dep + p.t(i, j)
					stj := max(arr, p.e[j])
					if stj > p.lt[j] {
						continue
					}
					if p.mustBefore != nil && p.mustBefore[j] != nil && !subset(p.mustBefore[j], words) {
						continue
					}
					if final && p.shape == solver.Closed && (!p.arc[j*n+p.start] || p.eliminated(n-1, j, p.start) || stj+p.s[j]+p.t(j, p.start) > p.lateRet) {
						continue
					}
					if final && p.end >= 0 && j != p.end {
						continue
					}
					pc2 := pc
					switch cfg.kind {
					case dpTravel:
						pc2 += p.t(i, j) - lamOf(j)
					case dpCompletion:
						pc2 -= lamOf(j)
					case dpMinStart:
						if j == cfg.target {
							pc2 = stj
						}
					}
					var f int64
					if final {
						f = finalCost(p, cfg, j, stj, pc2+lamSum)
					} else {
						g := int64(0)
						if cfg.rx != nil {
							g = cfg.rx.togoSet(r, j, stj, words)
							if g == inf {
								continue
							}
						}
						switch cfg.kind {
						case dpTravel:
							f = pc2 + g + lamSum
						case dpCompletion:
							f = stj + pc2 + g + lamSum
						default:
							f = stj
						}
					}
					if (cfg.kind == dpTravel || cfg.kind == dpCompletion) && f >= ub {
						continue
					}
					if !final && !reachable(p, words, rj, j, stj) {
						continue
					}
					res.labels++
					st.insert(h^z[rj], int32(j), words, rj, stj, pc2, f, l)
					if cfg.beam > 0 && st.live > 2*cfg.beam {
						scratch = st.trim(cfg.beam, scratch)
						turn.Due()
					}
				}
				if cfg.kind == dpFeasible && final && st.live > 0 {
					break
				}
			}
		}
		if cfg.beam > 0 && st.live > cfg.beam && !final {
			scratch = st.trim(cfg.beam, scratch)
			turn.Due()
		}
		if st.drop < inf {
			res.dropped = true
			res.droppedLB = min(res.droppedLB, st.drop)
		}
		if st.live == 0 {
			res.complete = true
			return res
		}
		next := &layer{}
		par, node := st.compact(next)
		history += len(par)
		if !res.costOnly && cfg.maxHistory > 0 && history > cfg.maxHistory {
			if !cfg.boundOnly || ubNow() >= inf {
				return res
			}
			// Go on without the history: the bound is what this run is
			// for, and the upper bound in force already has its route.
			res.costOnly, res.cost = true, inf
			histPar, histNode = nil, nil
		}
		if !res.costOnly {
			histPar = append(histPar, par)
			histNode = append(histNode, node)
		}
		if final {
			// Pick the best complete route.
			best, bestCost := -1, inf
			for s := 0; s < len(next.last); s++ {
				j := int(next.last[s])
				for l := next.first[s]; l < next.first[s+1]; l++ {
					c := finalCost(p, cfg, j, next.T[l], next.PC[l]+lamSum)
					if c < bestCost {
						best, bestCost = int(l), c
					}
				}
			}
			if res.costOnly {
				res.cost, res.complete = bestCost, true
				return res
			}
			route := make([]int, n)
			for kk, l := n-1, best; kk >= 0; kk-- {
				route[kk] = int(histNode[kk][l])
				l = int(histPar[kk][l])
			}
			res.found, res.route, res.cost, res.complete = true, route, bestCost, true
			return res
		}
		cur = next
	}
	res.complete = true
	return res
}

// finalCost is the objective of a complete route whose last node is j with
// service starting at t; pcFull is the penalised cost plus Σλ (the true cost
// so far for the travel objective).
func finalCost(p *prob, cfg dpConfig, j int, t, pcFull int64) int64 {
	closed := p.shape == solver.Closed && p.n > 1
	switch cfg.kind {
	case dpTravel:
		if closed {
			return pcFull + p.t(j, p.start)
		}
		return pcFull
	case dpCompletion:
		if closed {
			return t + p.s[j] + p.t(j, p.start)
		}
		return t + p.s[j]
	case dpMinStart:
		return pcFull
	}
	return 0
}

// subset reports whether every member of a is in b.
func subset(a, b []uint64) bool {
	for k, x := range a {
		if x&^b[k] != 0 {
			return false
		}
	}
	return true
}

// reachCheck is how many of the unvisited nodes with the earliest deadlines
// a new label checks it can still reach in time.
const reachCheck = 6

// reachable checks that the unvisited nodes with the nearest deadlines can
// still be reached in time from node j at time t (through any path: shortest
// paths bound it from below).
func reachable(p *prob, words []uint64, rj int32, j int, t int64) bool {
	if p.sp == nil {
		return true
	}
	n := p.n
	checked := 0
	bw, bm := int(rj>>6), uint64(1)<<(uint(rj)&63)
	for k := 0; k < len(words); k++ {
		x := words[k]
		if k == bw {
			x |= bm
		}
		free := ^x
		for free != 0 {
			b := bits.TrailingZeros64(free)
			free &= free - 1
			rr := k*64 + b
			if rr >= n {
				return true
			}
			u := int(p.byRank[rr])
			if u == p.start {
				continue
			}
			if d := p.sp[j*n+u]; d >= inf || t+d > p.lt[u] {
				return false
			}
			checked++
			if checked >= reachCheck {
				return true
			}
		}
	}
	return true
}
