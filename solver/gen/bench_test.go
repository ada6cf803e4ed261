package gen

import (
	"context"
	"fmt"
	"testing"

	"visitline/solver"
)

// Kernel benchmarks on generated instances; compare runs with benchstat.
// Time per op of BenchmarkSolveIterations divided by the iteration count
// is the cost of one search iteration at that size.

func BenchmarkGenerate(b *testing.B) {
	for _, n := range []int{300, 1000} {
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			for b.Loop() {
				if _, err := Generate(Options{N: n, Tightness: Tight, Seed: 1}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func BenchmarkEvaluate(b *testing.B) {
	for _, n := range []int{100, 1000} {
		g, err := Generate(Options{N: n, Tightness: Medium, Seed: 1})
		if err != nil {
			b.Fatal(err)
		}
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			for b.Loop() {
				if s := solver.Evaluate(g.Instance, g.Reference); !s.Feasible {
					b.Fatal("reference infeasible")
				}
			}
		})
	}
}

func BenchmarkSolveIterations(b *testing.B) {
	const iters = 200
	for _, n := range []int{100, 300, 1000} {
		g, err := Generate(Options{N: n, Tightness: Medium, Seed: 1})
		if err != nil {
			b.Fatal(err)
		}
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			for b.Loop() {
				res, err := solver.Solve(context.Background(), g.Instance, solver.Settings{Iterations: iters, Seed: 1})
				if err != nil {
					b.Fatal(err)
				}
				if !res.Best.Feasible {
					b.Fatal("no feasible plan")
				}
			}
		})
	}
}
