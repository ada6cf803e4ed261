package solver

import (
	"math"
	"math/rand"
	"slices"
)

// search is one worker's large neighbourhood search state.
type search struct {
	m   *model
	rng *rand.Rand
	cur *route
	tmp *route
	pol polisher
	lam float64

	// scratch
	removed   []int32
	keep      []int32
	rem       []int32 // repairInsert's visits still to place
	ins       []int32 // repairInsert's next order
	cs        []ranked
	taken     []bool
	perm      []int
	inRem     []bool
	at        []int32  // granular insertion: each node's position in the route
	seen      []uint32 // granular insertion: places tried, by epoch
	places    []int32  // granular insertion: the places to try
	exactSegs []seg    // exactSlice's summaries by depth
	epoch     uint32

	// statistics per destroy operator
	weights []float64
	scores  []float64
	uses    []int
	fixed   bool

	exactNodes int // node budget of one exact repair
}

func newSearch(m *model, seed int64) *search {
	s := &search{m: m, rng: rand.New(rand.NewSource(seed)), inRem: make([]bool, m.n), exactNodes: 20000}
	s.pol = polisher{m: m, maxScan: maxScanFor(len(m.movable))}
	return s
}

func maxScanFor(k int) int {
	switch {
	case k <= 300:
		return k + 2
	case k <= 1000:
		return 120
	}
	return 60
}

// qRange is how many visits a destroy frees: small enough that the repair
// can place them well, large enough to leave a local optimum.
func (s *search) qSize() int {
	k := len(s.m.movable)
	if k <= 2 {
		return k
	}
	hi := k / qFrac
	if hi > 30 {
		hi = 30
	}
	if hi < 2 {
		hi = 2
	}
	lo := 2
	if hi > 8 {
		lo = 4
	}
	return lo + s.rng.Intn(hi-lo+1)
}

// destroy removes visits from x (a copy of the current route) by operator op
// and leaves them in s.removed. For a slice it returns where the slice was
// cut out (an index into the shortened x.r), otherwise -1.
func (s *search) destroy(x *route, op int, q int) int {
	m := s.m
	r := x.r
	k := len(r) - 2 // movable count
	s.removed = s.removed[:0]
	at := -1
	if k == 0 || q == 0 {
		return at
	}
	if q > k {
		q = k
	}
	switch Operators[op] {
	case "random":
		perm := permInto(s.rng, s.perm[:0], k)
		s.perm = perm
		for _, p := range perm[:q] {
			s.removed = append(s.removed, r[1+p])
		}
	case "slice":
		a := 1 + s.rng.Intn(k-q+1)
		s.removed = append(s.removed, r[a:a+q]...)
		at = a
	case "related":
		seed := r[1+s.rng.Intn(k)]
		cs := s.cs[:0]
		for _, v := range r[1 : len(r)-1] {
			if v != seed {
				cs = append(cs, ranked{v, s.relatedness(seed, v)})
			}
		}
		s.removed = append(s.removed, seed)
		// Randomised pick biased to the most related (Ropke and Pisinger 2006, p = 6).
		s.cs = cs
		s.pickBiased(cs, q, 6)
	case "worst":
		cs := s.cs[:0]
		cur := m.value(x.total(), s.lam)
		for i := 1; i <= k; i++ {
			sg := join(x.fwd[i-1], x.bwd[i+1], m.arc(r[i-1], r[i+1]))
			cs = append(cs, ranked{r[i], m.value(sg, s.lam) - cur}) // most saved first
		}
		s.cs = cs
		s.pickBiased(cs, q, 3)
	}
	for _, v := range s.removed {
		s.inRem[v] = true
	}
	keep := s.keep[:0]
	first, last := len(r), -1
	for i, v := range r {
		if !s.inRem[v] {
			keep = append(keep, v)
		} else {
			first, last = min(first, i), i
		}
	}
	for _, v := range s.removed {
		s.inRem[v] = false
	}
	s.keep = keep
	if last < 0 {
		x.set(keep)
	} else {
		x.setShifted(keep, first, len(r)-1-last)
	}
	return at
}

// permInto is rng.Perm(n) written into buf: the same permutation from the
// same draws, without a new slice each call.
func permInto(rng *rand.Rand, buf []int, n int) []int {
	m := buf[:0]
	for range n {
		m = append(m, 0)
	}
	for i := 0; i < n; i++ {
		j := rng.Intn(i + 1)
		m[i] = m[j]
		m[j] = i
	}
	return m
}

// ranked is a visit with a key, smaller first.
type ranked struct {
	v   int32
	key float64
}

// pickBiased sorts cs by key and adds visits to s.removed until it holds q,
// drawing rank ⌊u^p·len⌋ for uniform u: strongly biased to the front for a
// large p, yet random.
func (s *search) pickBiased(cs []ranked, q int, p float64) {
	// The order is total (the visits differ), so any sort gives the one
	// result; slices.SortFunc does it without sort.Slice's reflection and
	// its allocations.
	slices.SortFunc(cs, func(a, b ranked) int {
		switch {
		case a.key < b.key || a.key == b.key && a.v < b.v:
			return -1
		case a.key == b.key && a.v == b.v:
			return 0
		}
		return 1
	})
	taken := s.taken[:0]
	for range cs {
		taken = append(taken, false)
	}
	s.taken = taken
	for len(s.removed) < q && len(cs) > 0 {
		idx := int(math.Pow(s.rng.Float64(), p) * float64(len(cs)))
		for taken[idx] {
			idx = (idx + 1) % len(cs)
		}
		taken[idx] = true
		s.removed = append(s.removed, cs[idx].v)
	}
}

// relatedness is small for visits close in travel and in window (Shaw 1998).
func (s *search) relatedness(a, b int32) float64 {
	m := s.m
	d := float64(m.arc(a, b) + m.arc(b, a))
	w := math.Abs(float64(m.e[a]-m.e[b])) + math.Abs(float64(m.l[a]-m.l[b]))
	return d + 0.5*w
}

// insertCost is the best place to insert v into x and the regret.
func (s *search) bestInsert(x *route, v int32) (pos int, best, second float64) {
	m := s.m
	u := m.unit(int(v))
	cur := m.value(x.total(), s.lam)
	best, second = math.Inf(1), math.Inf(1)
	pos = -1
	r := x.r
	feasible := x.total().tw == 0
	skipped := false
	// The loop is arcOK and arc written out over slices read once: in
	// WebAssembly every field of m read again is a load from linear memory
	// and a bounds check more per place.
	es, ss, ls, t32, t64, n := m.e, m.s, m.l, m.t32, m.t64, m.n
	lv, evs := ls[v], es[v]+ss[v]
	check := !m.infeas
	fwd, bwd := x.fwd[:len(r)], x.bwd[:len(r)]
	for p := 0; p < len(r)-1; p++ {
		a, b := r[p], r[p+1]
		ea := es[a]
		if feasible && ea > lv {
			// Starts only grow along a feasible route: from here on v
			// would always start after its latest.
			break
		}
		tav := travelAt(t32, t64, int(a)*n+int(v))
		if check && (a == v || ea+ss[a]+tav > lv) {
			// An arc no feasible plan can hold: try it only if nothing
			// else is left.
			skipped = true
			continue
		}
		tvb := travelAt(t32, t64, int(v)*n+int(b))
		if check && (v == b || evs+tvb > ls[b]) {
			skipped = true
			continue
		}
		sd, stw, sc := joinPair(&fwd[p], &u, &bwd[p+1], tav, tvb)
		d := m.valueOf(sd, stw, sc, s.lam) - cur
		if d < best {
			second = best
			best, pos = d, p
		} else if d < second {
			second = d
		}
	}
	if pos < 0 && skipped {
		for p := 0; p < len(r)-1; p++ {
			sd, stw, sc := joinPair(&x.fwd[p], &u, &x.bwd[p+1], m.arc(r[p], v), m.arc(v, r[p+1]))
			d := m.valueOf(sd, stw, sc, s.lam) - cur
			if d < best {
				second = best
				best, pos = d, p
			} else if d < second {
				second = d
			}
		}
	}
	return pos, best, second
}

// repairInsert puts the removed visits back one at a time: greedy (k = 1) or
// regret-k (k = 2, 3), with multiplicative noise on the costs.
func (s *search) repairInsert(x *route, regret int, noise float64) {
	rem := append(s.rem[:0], s.removed...)
	defer func() { s.rem = rem[:0] }()
	gran := s.m.granular()
	if gran {
		s.trackPositions(x, 0)
	}
	for len(rem) > 0 {
		bestIdx, bestPos := -1, -1
		bestKey := math.Inf(1)
		for i, v := range rem {
			var pos int
			var c1, c2 float64
			ok := false
			if gran {
				pos, c1, c2, ok = s.bestInsertGranular(x, v)
			}
			if !ok {
				pos, c1, c2 = s.bestInsert(x, v)
			}
			if pos < 0 {
				continue
			}
			if noise > 0 {
				c1 *= 1 + noise*(2*s.rng.Float64()-1)
			}
			key := c1
			if regret > 1 && len(rem) > 1 {
				key = -(c2 - c1)
				if math.IsInf(c2, 1) {
					key = -1e300
				}
			}
			if key < bestKey {
				bestKey, bestIdx, bestPos = key, i, pos
			}
		}
		if bestIdx < 0 {
			bestIdx, bestPos = 0, len(x.r)-2
		}
		v := rem[bestIdx]
		rem[bestIdx] = rem[len(rem)-1]
		rem = rem[:len(rem)-1]
		b := append(s.ins[:0], x.r[:bestPos+1]...)
		b = append(b, v)
		b = append(b, x.r[bestPos+1:]...)
		s.ins = b
		x.setShifted(b, bestPos+1, len(x.r)-bestPos-1)
		if gran {
			s.trackPositions(x, bestPos+1)
		}
	}
}
