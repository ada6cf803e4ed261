package main

import (
	"context"
	"math/rand/v2"
	"time"

	"visitline/solver"
)

// standinSolve is a small relocate-one-visit local search that keeps the
// contract of solver.Solve that the worker relies on: it calls OnImprove for
// each new best, OnProgress and Pause about every ProgressEvery, takes the
// newest Mix from MixUpdates between iterations, and stops at the budget or
// when ctx is cancelled. It exists so that the worker's tests (and the
// browser tests, built with -tags standin while solver.Solve is still the
// construction-only placeholder) can watch a search that runs for a while.
// It is not the product's search.
func standinSolve(ctx context.Context, in *solver.Instance, s solver.Settings) (solver.Result, error) {
	if err := in.Validate(); err != nil {
		return solver.Result{}, err
	}
	start := time.Now()
	every := s.ProgressEvery
	if every <= 0 {
		every = 50 * time.Millisecond
	}
	rng := rand.New(rand.NewPCG(uint64(s.Seed), 0x5eed))
	route := []int{in.Start}
	for i := 0; i < in.N; i++ {
		if i != in.Start && !(in.Shape == solver.OpenFixed && i == in.End) {
			route = append(route, i)
		}
	}
	if in.Shape == solver.OpenFixed && in.N > 1 {
		route = append(route, in.End)
	}
	better := func(a, b solver.Schedule) bool {
		if a.TotalLateness != b.TotalLateness {
			return a.TotalLateness < b.TotalLateness
		}
		return a.Cost(s.Objective) < b.Cost(s.Objective)
	}
	cur := solver.Evaluate(in, route)
	mix := s.Mix
	res := solver.Result{}
	emit := func(op string) {
		res.Improvements++
		p := solver.Plan{Route: append([]int(nil), route...), Schedule: cur, Cost: cur.Cost(s.Objective), Feasible: cur.Feasible,
			Iteration: res.Iterations, Elapsed: time.Since(start), Operator: op}
		res.Best = p
		if s.OnImprove != nil {
			s.OnImprove(p)
		}
	}
	emit("construct")
	lastTick := time.Now()
	lo, hi := 1, len(route)
	if in.Shape == solver.OpenFixed {
		hi--
	}
	for {
		if s.MixUpdates != nil {
			select {
			case m := <-s.MixUpdates:
				mix = m
			default:
			}
		}
		if ctx.Err() != nil {
			res.Stop = "cancelled"
			break
		}
		if s.Budget > 0 && time.Since(start) >= s.Budget {
			res.Stop = "budget"
			break
		}
		if s.Iterations > 0 && res.Iterations >= s.Iterations {
			res.Stop = "iterations"
			break
		}
		if time.Since(lastTick) >= every {
			lastTick = time.Now()
			if s.OnProgress != nil {
				s.OnProgress(solver.Progress{Iteration: res.Iterations, Elapsed: time.Since(start), BestCost: res.Best.Cost,
					Feasible: res.Best.Feasible, Weights: normalised(mix)})
			}
			if s.Pause != nil {
				s.Pause()
			}
		}
		res.Iterations++
		if hi-lo < 2 {
			continue
		}
		a, b := lo+rng.IntN(hi-lo), lo+rng.IntN(hi-lo)
		if a == b {
			continue
		}
		v := route[a]
		next := append([]int(nil), route[:a]...)
		next = append(next, route[a+1:]...)
		next = append(next[:b], append([]int{v}, next[b:]...)...)
		sch := solver.Evaluate(in, next)
		if better(sch, cur) {
			route, cur = next, sch
			emit("relocate")
		}
	}
	res.Elapsed = time.Since(start)
	return res, nil
}

func normalised(m solver.Mix) solver.Mix {
	out := solver.Mix{}
	var sum float64
	for _, o := range solver.Operators {
		w := 1.0
		if m != nil {
			w = m[o]
		}
		out[o] = w
		sum += w
	}
	for o := range out {
		if sum > 0 {
			out[o] /= sum
		}
	}
	return out
}
