package solver

import (
	"context"
	"math/rand"
	"testing"
)

// Kernel benchmarks: `go test -run '^$' -bench . ./solver`.

func BenchmarkJoin(b *testing.B) {
	x := seg{d: 10, e: 5, l: 50, c: 3}
	y := seg{d: 7, e: 30, l: 90, c: 4}
	var s seg
	for i := 0; i < b.N; i++ {
		s = join(x, y, int64(i&7))
	}
	_ = s
}

func BenchmarkEvaluate100(b *testing.B) {
	in := randomInstance(rand.New(rand.NewSource(1)), 100, 80, Closed)
	r := make([]int, in.N)
	for i := range r {
		r[i] = i
	}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		Evaluate(in, r)
	}
}

func BenchmarkPolish100(b *testing.B) {
	in := randomInstance(rand.New(rand.NewSource(1)), 100, 80, Closed)
	m, err := newModel(in, TravelTime)
	if err != nil {
		b.Fatal(err)
	}
	start := constructOrder(m)
	x := newRoute(m, start)
	p := polisher{m: m, x: x, lam: 1000, maxScan: maxScanFor(len(m.movable))}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		x.set(start)
		p.moves = 0
		p.wakeAll()
		p.run(1 << 30)
	}
}

func BenchmarkIterations100(b *testing.B) {
	in := randomInstance(rand.New(rand.NewSource(1)), 100, 80, Closed)
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := Solve(context.Background(), in, Settings{Iterations: 200, Seed: 1}); err != nil {
			b.Fatal(err)
		}
	}
}
