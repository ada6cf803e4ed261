package gen

import (
	"bytes"
	"context"
	"fmt"
	"math/rand"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"visitline/solver"
	"visitline/solver/format"
)

func TestGenerateReadsBackAndReferenceIsFeasible(t *testing.T) {
	for _, n := range []int{2, 7, 100, 300} {
		for _, lvl := range Levels {
			t.Run(fmt.Sprintf("n%d-%s", n, lvl), func(t *testing.T) {
				g, err := Generate(Options{N: n, Tightness: lvl, Seed: 3})
				require.NoError(t, err)
				var buf bytes.Buffer
				require.NoError(t, WriteBenchmark(&buf, g.Instance, "invented test instance"))
				in, err := format.ReadBenchmark(&buf, "gen.txt")
				require.NoError(t, err)
				assert.Equal(t, g.Instance.N, in.N)
				assert.Equal(t, int64(1), in.Scale)
				assert.Equal(t, g.Instance.Travel, in.Travel)
				assert.Equal(t, g.Instance.Early, in.Early)
				assert.Equal(t, g.Instance.Late, in.Late)
				require.NoError(t, solver.CheckRoute(in, g.Reference))
				s := solver.Evaluate(in, g.Reference)
				assert.True(t, s.Feasible, "reference route late by %d", s.TotalLateness)
			})
		}
	}
}

func TestGenerateIsDeterministicForASeed(t *testing.T) {
	a, err := Generate(Options{N: 150, Tightness: Tight, Seed: 11})
	require.NoError(t, err)
	b, err := Generate(Options{N: 150, Tightness: Tight, Seed: 11})
	require.NoError(t, err)
	assert.Equal(t, a.Instance.Travel, b.Instance.Travel)
	assert.Equal(t, a.Instance.Early, b.Instance.Early)
	assert.Equal(t, a.Instance.Late, b.Instance.Late)
	assert.Equal(t, a.Reference, b.Reference)
	c, err := Generate(Options{N: 150, Tightness: Tight, Seed: 12})
	require.NoError(t, err)
	assert.NotEqual(t, a.Instance.Travel, c.Instance.Travel, "another seed gives another instance")
}

func TestGenerateMatrixIsAsymmetric(t *testing.T) {
	g, err := Generate(Options{N: 200, Seed: 1, ServiceMax: -1})
	require.NoError(t, err)
	in := g.Instance
	asym := 0
	for i := 0; i < in.N; i++ {
		assert.Equal(t, int64(0), in.T(i, i))
		for j := i + 1; j < in.N; j++ {
			if in.T(i, j) != in.T(j, i) {
				asym++
			}
		}
	}
	// Without service times, asymmetry comes from the climb term and the
	// one-way detours: far more than a tenth of the pairs differ.
	assert.Greater(t, asym, in.N*(in.N-1)/2/10)
}

// TestGenerateWindowWidthsFollowTightness checks the widths against the
// ranges the command promises (visitline gen --help and the README: wide
// 240-480 minutes, medium 90-180, tight 30-60), written here rather than
// taken from the generator, and that they are drawn across the range, not
// stuck at one end. With no windows, any order must be on time.
func TestGenerateWindowWidthsFollowTightness(t *testing.T) {
	promised := []struct {
		lvl    Tightness
		lo, hi int64
	}{
		{Wide, 240, 480},
		{Medium, 90, 180},
		{Tight, 30, 60},
	}
	for _, p := range promised {
		g, err := Generate(Options{N: 300, Tightness: p.lvl, Seed: 5})
		require.NoError(t, err)
		in := g.Instance
		minW, maxW := int64(1<<62), int64(0)
		for v := 1; v < in.N; v++ {
			w := in.Late[v] - in.Early[v]
			assert.GreaterOrEqual(t, w, p.lo, "%s node %d", p.lvl, v)
			assert.LessOrEqual(t, w, p.hi, "%s node %d", p.lvl, v)
			minW, maxW = min(minW, w), max(maxW, w)
		}
		// 299 uniform draws: the extremes fall within a tenth of the range
		// of its ends (a miss has odds below 0.9^299).
		span := p.hi - p.lo
		assert.LessOrEqual(t, minW, p.lo+span/10, "%s: narrowest window", p.lvl)
		assert.GreaterOrEqual(t, maxW, p.hi-span/10, "%s: widest window", p.lvl)
	}
	g, err := Generate(Options{N: 50, Tightness: None, Seed: 5})
	require.NoError(t, err)
	in := g.Instance
	for v := 1; v < 50; v++ {
		assert.Equal(t, int64(0), in.Early[v])
	}
	// Any order is on time: the reference, its reverse, and shuffles.
	rev := []int{0}
	for k := len(g.Reference) - 1; k > 0; k-- {
		rev = append(rev, g.Reference[k])
	}
	orders := [][]int{g.Reference, rev}
	rng := rand.New(rand.NewSource(9))
	for range 20 {
		o := append([]int(nil), g.Reference...)
		rng.Shuffle(len(o)-1, func(i, j int) { o[i+1], o[j+1] = o[j+1], o[i+1] })
		orders = append(orders, o)
	}
	for _, o := range orders {
		require.NoError(t, solver.CheckRoute(in, o))
		assert.True(t, solver.Evaluate(in, o).Feasible, "with no windows every order is on time")
	}
}

func TestGenerateServiceIsFoldedIntoTravel(t *testing.T) {
	with, err := Generate(Options{N: 40, Seed: 2, ServiceMax: 10})
	require.NoError(t, err)
	// Every arc leaving a site is at least the shortest service time (1).
	for i := 1; i < 40; i++ {
		for j := 0; j < 40; j++ {
			if i != j {
				assert.GreaterOrEqual(t, with.Instance.T(i, j), int64(1))
			}
		}
	}
	for _, s := range with.Instance.Service {
		assert.Equal(t, int64(0), s)
	}
}

func TestGenerateRejectsBadOptions(t *testing.T) {
	_, err := Generate(Options{N: 1})
	assert.ErrorContains(t, err, "at least 2")
	_, err = Generate(Options{N: MaxSites + 1})
	assert.ErrorContains(t, err, "at most")
	_, err = Generate(Options{N: 10, Tightness: Tightness(9)})
	assert.ErrorContains(t, err, "tightness")
	_, err = ParseTightness("snug")
	assert.ErrorContains(t, err, "want none, wide, medium or tight")
	lvl, err := ParseTightness("medium")
	require.NoError(t, err)
	assert.Equal(t, Medium, lvl)
}

func TestWriteBenchmarkRefusesWhatTheFormatCannotHold(t *testing.T) {
	g, err := Generate(Options{N: 5, Seed: 1})
	require.NoError(t, err)
	in := g.Instance.Clone()
	in.Service[2] = 3
	assert.ErrorContains(t, WriteBenchmark(&bytes.Buffer{}, in, ""), "folded")
	in = g.Instance.Clone()
	in.Scale = 100
	assert.ErrorContains(t, WriteBenchmark(&bytes.Buffer{}, in, ""), "whole-unit")
}

func TestSolveKeepsEveryWindowOnGeneratedInstances(t *testing.T) {
	for _, lvl := range Levels {
		g, err := Generate(Options{N: 60, Tightness: lvl, Seed: 8})
		require.NoError(t, err)
		res, err := solver.Solve(context.Background(), g.Instance, solver.Settings{Iterations: 300, Seed: 1})
		require.NoError(t, err)
		require.NoError(t, solver.CheckRoute(g.Instance, res.Best.Route))
		s := solver.Evaluate(g.Instance, res.Best.Route)
		assert.True(t, s.Feasible, "%s: the engine's plan is late by %d", lvl, s.TotalLateness)
		assert.Equal(t, s.Travel, res.Best.Cost, "%s: engine cost equals the evaluator's", lvl)
	}
}
