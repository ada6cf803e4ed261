package solver

import (
	"context"
	"sort"
)

func sortStable(v []int, less func(a, b int) bool) {
	sort.SliceStable(v, func(i, j int) bool { return less(v[i], v[j]) })
}

// minimiseLateness improves an infeasible route for total lateness as the
// evaluator counts it (late starts carry on late), then for cost, by
// relocating single visits with full re-evaluation. The search minimises
// time warp, which ranks plans a little differently; this pass makes the
// reported plan the one with least lateness it can reach.
func minimiseLateness(ctx context.Context, in *Instance, route []int, obj Objective) Plan {
	r := append([]int(nil), route...)
	if CheckRoute(in, r) != nil || len(r) > 400 {
		s := Evaluate(in, r)
		return Plan{Route: r, Schedule: s, Cost: s.Cost(obj), Feasible: s.Feasible}
	}
	lo := 1
	for lo < len(r) && lo < len(in.Fixed) {
		lo++
	}
	hi := len(r) - 1 // last movable position
	if in.Shape == OpenFixed {
		hi--
	}
	best := Evaluate(in, r)
	better := func(a, b Schedule) bool {
		if a.TotalLateness != b.TotalLateness {
			return a.TotalLateness < b.TotalLateness
		}
		return a.Cost(obj) < b.Cost(obj)
	}
	cand := make([]int, len(r))
	for pass := 0; pass < 50; pass++ {
		improved := false
		for i := lo; i <= hi; i++ {
			if ctx.Err() != nil {
				break
			}
			if in.Position != nil && in.Position[r[i]] > 0 {
				continue
			}
			for j := lo; j <= hi; j++ {
				if j == i {
					continue
				}
				// move r[i] to position j
				copy(cand, r)
				v := cand[i]
				if i < j {
					copy(cand[i:j], cand[i+1:j+1])
				} else {
					copy(cand[j+1:i+1], cand[j:i])
				}
				cand[j] = v
				if CheckRoute(in, cand) != nil {
					continue
				}
				s := Evaluate(in, cand)
				if better(s, best) {
					best = s
					copy(r, cand)
					improved = true
				}
			}
		}
		if !improved {
			break
		}
	}
	return Plan{Route: r, Schedule: best, Cost: best.Cost(obj), Feasible: best.Feasible}
}
