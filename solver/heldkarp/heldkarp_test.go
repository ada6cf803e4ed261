package heldkarp

import (
	"context"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"

	"github.com/stretchr/testify/require"

	"visitline/solver/format"
)

// optimum is the shortest closed tour by dynamic programming over subsets
// (the test oracle for small matrices).
func optimum(n int, c []int64) int64 {
	full := 1 << (n - 1)
	const inf = math.MaxInt64 / 4
	f := make([]int64, full*n)
	for i := range f {
		f[i] = inf
	}
	for j := 1; j < n; j++ {
		f[(1<<(j-1))*n+j] = c[j]
	}
	for s := 1; s < full; s++ {
		for j := 1; j < n; j++ {
			v := f[s*n+j]
			if v >= inf || s&(1<<(j-1)) == 0 {
				continue
			}
			for k := 1; k < n; k++ {
				if s&(1<<(k-1)) != 0 {
					continue
				}
				t := s | 1<<(k-1)
				f[t*n+k] = min(f[t*n+k], v+c[j*n+k])
			}
		}
	}
	best := int64(inf)
	for j := 1; j < n; j++ {
		best = min(best, f[(full-1)*n+j]+c[j*n])
	}
	return best
}

// On random small matrices, symmetric and not, every bound is at most the
// optimum found by enumeration, and a bound that says it is a tour equals it.
func TestBoundAtMostOptimumOnSmallMatrices(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for trial := 0; trial < 60; trial++ {
		n := 4 + rng.IntN(6)
		c := make([]int64, n*n)
		xs, ys := make([]float64, n), make([]float64, n)
		for i := range xs {
			xs[i], ys[i] = rng.Float64()*100, rng.Float64()*100
		}
		sym := trial%2 == 0
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				if i == j {
					continue
				}
				d := math.Round(math.Hypot(xs[i]-xs[j], ys[i]-ys[j]))
				if !sym {
					d += float64(rng.IntN(30)) // one-way detours
				}
				c[i*n+j] = int64(d)
			}
		}
		if sym {
			for i := 0; i < n; i++ {
				for j := 0; j < i; j++ {
					c[i*n+j] = c[j*n+i]
				}
			}
		}
		opt := optimum(n, c)
		for _, asym := range []bool{false, true} {
			r, err := Bound(context.Background(), n, c, Options{Asymmetric: asym})
			require.NoError(t, err)
			require.LessOrEqual(t, r.Value, opt, "trial %d (n=%d, symmetric %v, 2n bound %v)", trial, n, sym, asym)
			require.Equal(t, sym && !asym, r.Symmetric)
			if r.Tour {
				require.Equal(t, opt, r.Value, "trial %d: a 1-tree that is a tour is optimal", trial)
			}
			// Not far below: the bound is within 15 % of the optimum on
			// these small days (a weak check; the published instances
			// below are the real one).
			require.GreaterOrEqual(t, float64(r.Value), 0.85*float64(opt), "trial %d (n=%d, sym %v, 2n %v)", trial, n, sym, asym)
		}
	}
}

func loadTSPLIB(t *testing.T, name string) (int, []int64) {
	t.Helper()
	d := filepath.Join("..", "..", "..", "shared", "benchmarks", "tsplib")
	if _, err := os.Stat(d); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("shared benchmarks missing at %s (required under CI)", d)
		}
		t.Skipf("shared benchmarks not found at %s", d)
	}
	fh, err := os.Open(filepath.Join(d, name))
	require.NoError(t, err)
	defer fh.Close()
	ds, err := format.Load(fh, nil, format.Options{SitesName: name})
	require.NoError(t, err)
	return ds.Instance.N, ds.Instance.Travel
}

// TSPLIB (G. Reinelt 1991) published optimal tour lengths, from the shared
// optimal.csv: the bound is at most the optimum, and on the symmetric
// instance within 1 % of it (the Held-Karp bound is typically within about
// 1 % of the optimum on such instances: from memory of Johnson and McGeoch's
// surveys, not a published value for this instance).
func TestBoundAgainstTSPLIBOptimal(t *testing.T) {
	cases := []struct {
		file    string
		optimal int64
		within  float64 // the bound is at least this share of the optimum
		sym     bool
	}{
		{"pcb442.tsp", 50778, 0.99, true},
		// Asymmetric: only "at most the optimum", and a loose floor (the
		// asymmetric Held-Karp gap differs widely between instances).
		{"ft70.atsp", 38673, 0.9, false},
		{"kro124p.atsp", 36230, 0.9, false},
	}
	for _, k := range cases {
		t.Run(k.file, func(t *testing.T) {
			n, c := loadTSPLIB(t, k.file)
			r, err := Bound(context.Background(), n, c, Options{Upper: k.optimal})
			require.NoError(t, err)
			require.Equal(t, k.sym, r.Symmetric)
			require.LessOrEqual(t, r.Value, k.optimal, "published optimal tour length (TSPLIB, shared optimal.csv)")
			require.GreaterOrEqual(t, float64(r.Value), k.within*float64(k.optimal))
			t.Logf("%s: bound %d, optimal %d (%.2f %% below), %d iterations", k.file, r.Value, k.optimal, 100*float64(k.optimal-r.Value)/float64(k.optimal), r.Iterations)
		})
	}
}
