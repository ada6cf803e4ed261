package gen

import (
	"bytes"
	"context"
	"fmt"
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

func TestGenerateWindowWidthsFollowTightness(t *testing.T) {
	for _, lvl := range []Tightness{Wide, Medium, Tight} {
		g, err := Generate(Options{N: 300, Tightness: lvl, Seed: 5})
		require.NoError(t, err)
		lo, hi := lvl.widths()
		in := g.Instance
		for v := 1; v < in.N; v++ {
			w := in.Late[v] - in.Early[v]
			assert.GreaterOrEqual(t, w, lo, "%s node %d", lvl, v)
			assert.LessOrEqual(t, w, hi, "%s node %d", lvl, v)
		}
	}
	g, err := Generate(Options{N: 50, Tightness: None, Seed: 5})
	require.NoError(t, err)
	for v := 1; v < 50; v++ {
		assert.Equal(t, int64(0), g.Instance.Early[v])
		assert.Equal(t, g.Instance.Late[0], g.Instance.Late[v])
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
