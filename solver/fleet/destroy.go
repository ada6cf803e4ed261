package fleet

import (
	"math"
	"math/rand"
	"sort"

	"visitline/solver"
)

// Destroy operators: each frees q visits of the current plan for the
// repair to put back (Shaw 1998; Ropke and Pisinger 2006; Pisinger and
// Ropke 2007).
const (
	opRandom  = iota // q visits at random
	opRelated        // visits related to a seed in place, time and demand (Shaw removal)
	opWorst          // the visits whose removal saves the most, with randomness
	opRoute          // a whole route, the shorter ones more likely
	opString         // a stretch of one route around a seed visit
	numOps
)

var opNames = [numOps]string{"random", "related", "worst", "route", "stretch"}

// served lists the visits in routes.
func (s *state) served(buf []int) []int {
	buf = buf[:0]
	for _, rt := range s.routes {
		buf = append(buf, rt...)
	}
	return buf
}

// starts works out the earliest start of service of every served visit,
// for relatedness in time.
func (s *state) starts(out []int64) {
	m := s.m
	for r, rt := range s.routes {
		t := m.veh[r].shiftS + m.p.Service[m.veh[r].start]
		prev := m.veh[r].start
		for _, v := range rt {
			t = max(t+m.tt(prev, v), m.p.Early[v])
			out[v] = t
			t += m.p.Service[v]
			prev = v
		}
	}
}

func (s *state) destroy(rng *rand.Rand, op, q int, scratch *scratch) {
	sv := s.served(scratch.served)
	scratch.served = sv
	if len(sv) == 0 {
		return
	}
	q = min(q, len(sv))
	var out []int
	switch op {
	case opRandom:
		rng.Shuffle(len(sv), func(a, b int) { sv[a], sv[b] = sv[b], sv[a] })
		out = append(out, sv[:q]...)
	case opRelated:
		out = s.related(rng, q, sv, scratch)
	case opWorst:
		out = s.worst(rng, q, sv)
	case opRoute:
		out = s.routeRemoval(rng, q)
	case opString:
		out = s.stretch(rng, q, sv)
	}
	s.remove(out)
}

// related is Shaw removal: travel both ways, the difference of service
// starts and of demands, each normalised, relatedness to a visit already
// chosen (or, while visits are unserved, to an unserved one, to make room
// near it).
func (s *state) related(rng *rand.Rand, q int, sv []int, sc *scratch) []int {
	m := s.m
	s.starts(sc.start)
	var maxT, maxD int64 = 1, 1
	for _, v := range sv {
		maxD = max(maxD, m.dem[v])
	}
	for r := range s.routes {
		maxT = max(maxT, m.veh[r].shiftE-m.veh[r].shiftS)
	}
	rel := func(a, b int) float64 {
		d := float64(m.tt(a, b)+m.tt(b, a)) / float64(2*m.maxArc+1)
		sa, sb := sc.start[a], sc.start[b]
		if s.where[a] < 0 {
			sa = max(m.p.Early[a], min(sb, m.p.Late[a]))
		}
		t := math.Abs(float64(sa-sb)) / float64(maxT)
		dm := math.Abs(float64(m.dem[a]-m.dem[b])) / float64(maxD)
		return 9*d + 3*t + 2*dm
	}
	var seed int
	chosen := []int{}
	if len(s.unserved) > 0 && rng.Intn(2) == 0 {
		seed = s.unserved[rng.Intn(len(s.unserved))]
	} else {
		seed = sv[rng.Intn(len(sv))]
		chosen = append(chosen, seed)
	}
	refs := []int{seed}
	var cand []int
	type rv struct {
		v int
		r float64
	}
	var list []rv
	for len(chosen) < q {
		// The candidates are sorted by relatedness to a reference chosen
		// at random among the visits taken so far, again every few picks.
		if len(cand) == 0 || len(chosen)%4 == 0 {
			ref := refs[rng.Intn(len(refs))]
			list = list[:0]
			for _, v := range sv {
				if v != ref && !contains(chosen, v) {
					list = append(list, rv{v, rel(ref, v)})
				}
			}
			sort.Slice(list, func(a, b int) bool {
				if list[a].r != list[b].r {
					return list[a].r < list[b].r
				}
				return list[a].v < list[b].v
			})
			cand = cand[:0]
			for _, e := range list {
				cand = append(cand, e.v)
			}
		}
		if len(cand) == 0 {
			break
		}
		// Randomised choice, skewed to the most related (p = 6).
		x := int(math.Pow(rng.Float64(), 6) * float64(len(cand)))
		chosen = append(chosen, cand[x])
		refs = append(refs, cand[x])
		cand = append(cand[:x], cand[x+1:]...)
	}
	return chosen
}

func contains(xs []int, v int) bool {
	for _, x := range xs {
		if x == v {
			return true
		}
	}
	return false
}

// worst removes the visits whose removal saves most, one at a time,
// randomised (p = 3).
func (s *state) worst(rng *rand.Rand, q int, sv []int) []int {
	m := s.m
	type sav struct {
		v int
		c int64
	}
	var out []int
	for len(out) < q {
		var list []sav
		for r, rt := range s.routes {
			for k, v := range rt {
				if contains(out, v) {
					continue
				}
				pred, succ := s.prevNode(r, k), s.nextNode(r, k+1)
				saving := m.tt(pred, v) + m.tt(v, succ) - m.tt(pred, succ)
				if m.obj == solver.CompletionTime {
					saving += m.p.Service[v]
				}
				list = append(list, sav{v, saving})
			}
		}
		if len(list) == 0 {
			break
		}
		sort.Slice(list, func(a, b int) bool {
			if list[a].c != list[b].c {
				return list[a].c > list[b].c
			}
			return list[a].v < list[b].v
		})
		x := int(math.Pow(rng.Float64(), 3) * float64(len(list)))
		out = append(out, list[x].v)
		if len(out) >= q || len(out) > 2*q {
			break
		}
		// Savings of the others change little; take a few per pass.
		for _, e := range list {
			if len(out) >= q {
				break
			}
			if rng.Intn(3) == 0 && !contains(out, e.v) {
				out = append(out, e.v)
			}
		}
	}
	return out
}

// routeRemoval frees one route (a short one more likely), and more routes
// while fewer than q visits are free.
func (s *state) routeRemoval(rng *rand.Rand, q int) []int {
	var rs []int
	for r, rt := range s.routes {
		if len(rt) > 0 {
			rs = append(rs, r)
		}
	}
	sort.Slice(rs, func(a, b int) bool {
		la, lb := len(s.routes[rs[a]]), len(s.routes[rs[b]])
		if la != lb {
			return la < lb
		}
		return rs[a] < rs[b]
	})
	var out []int
	for len(rs) > 0 {
		x := int(math.Pow(rng.Float64(), 2) * float64(len(rs)))
		out = append(out, s.routes[rs[x]]...)
		rs = append(rs[:x], rs[x+1:]...)
		if len(out) >= q/2 || rng.Intn(2) == 0 {
			break
		}
	}
	return out
}

// stretch frees a run of consecutive visits of one route around a seed,
// and runs of the routes nearest the seed while fewer than q are free
// (in the spirit of string removal).
func (s *state) stretch(rng *rand.Rand, q int, sv []int) []int {
	m := s.m
	seed := sv[rng.Intn(len(sv))]
	// Routes by the nearest of their visits to the seed.
	near := []int{}
	dist := map[int]int64{}
	for r, rt := range s.routes {
		if len(rt) == 0 {
			continue
		}
		d := int64(math.MaxInt64)
		for _, v := range rt {
			d = min(d, m.tt(seed, v)+m.tt(v, seed))
		}
		dist[r] = d
		near = append(near, r)
	}
	sort.Slice(near, func(a, b int) bool {
		if dist[near[a]] != dist[near[b]] {
			return dist[near[a]] < dist[near[b]]
		}
		return near[a] < near[b]
	})
	var out []int
	for _, r := range near {
		if len(out) >= q {
			break
		}
		rt := s.routes[r]
		// The visit of r nearest the seed is the middle of the run.
		c := 0
		for k, v := range rt {
			if m.tt(seed, v)+m.tt(v, seed) < m.tt(seed, rt[c])+m.tt(rt[c], seed) {
				c = k
			}
		}
		L := 1 + rng.Intn(min(len(rt), max(1, q-len(out), 10)))
		from := max(0, c-rng.Intn(L))
		to := min(len(rt), from+L)
		out = append(out, rt[from:to]...)
		if rng.Intn(3) == 0 {
			break
		}
	}
	return out
}
