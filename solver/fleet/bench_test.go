package fleet

import (
	"context"
	"math/rand"
	"testing"
)

// BenchmarkSolve100 times search iterations on an invented day of 100
// visits and 8 vehicles (randomFleet's kind of data, wider windows, no
// capacities or longest days): one
// op is 200 iterations with a fixed seed.
func BenchmarkSolve100(b *testing.B) {
	rng := rand.New(rand.NewSource(3))
	p := randomFleet(rng, 100, 8)
	for i := range p.Late {
		if !p.Depots()[i] {
			p.Late[i] += 200
		}
	}
	for k := range p.Vehicles {
		p.Vehicles[k].ShiftEnd += 400
		p.Vehicles[k].Capacity, p.Vehicles[k].MaxDuration = NoLimit, NoLimit
	}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := Solve(context.Background(), p, Settings{Iterations: 200, Seed: 1}); err != nil {
			b.Fatal(err)
		}
	}
}
