package main

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"testing"

	"github.com/stretchr/testify/require"
)

func writeTemp(t *testing.T, name, body string) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), name)
	require.NoError(t, os.WriteFile(p, []byte(body), 0o644))
	return p
}

func TestSolveJSONCarriesProof(t *testing.T) {
	// Three visits on a line 0-1-2-3, 10 apart, open windows, closed tour:
	// the optimum is 0,1,2,3 and back, 10+10+10+30 = 60, and the bound side
	// proves it.
	file := writeTemp(t, "line.txt", "4\n0 10 20 30\n10 0 10 20\n20 10 0 10\n30 20 10 0\n0 1000\n0 1000\n0 1000\n0 1000\n")
	var out, errb bytes.Buffer
	require.NoError(t, runSolve([]string{"--budget", "60s", "--quiet", "--format", "json", file}, &out, &errb))
	var j struct {
		Cost          float64  `json:"cost"`
		LowerBound    *float64 `json:"lower_bound"`
		GapBoundPct   *float64 `json:"gap_bound_pct"`
		ProvenOptimal bool     `json:"proven_optimal"`
	}
	require.NoError(t, json.Unmarshal(out.Bytes(), &j))
	require.Equal(t, 60.0, j.Cost)
	require.NotNil(t, j.LowerBound)
	require.Equal(t, 60.0, *j.LowerBound)
	require.NotNil(t, j.GapBoundPct)
	require.Equal(t, 0.0, *j.GapBoundPct)
	require.True(t, j.ProvenOptimal)
}

func TestSolveJSONExplainsInfeasibleDay(t *testing.T) {
	// Nodes 1 and 2 both open [10, 12], 5 apart and 10 from the depot: the
	// second one served is reached at 15. The conflict is {1, 2}.
	file := writeTemp(t, "tight.txt", "4\n0 10 10 10\n10 0 5 10\n10 5 0 10\n10 10 10 0\n0 1000\n10 12\n10 12\n0 1000\n")
	var out, errb bytes.Buffer
	require.NoError(t, runSolve([]string{"--iterations", "50", "--budget", "0", "--quiet", "--format", "json", file}, &out, &errb))
	var j struct {
		Feasible      bool     `json:"feasible"`
		ProvenOptimal bool     `json:"proven_optimal"`
		Conflict      []string `json:"conflict"`
		Reason        string   `json:"reason"`
	}
	require.NoError(t, json.Unmarshal(out.Bytes(), &j))
	require.False(t, j.Feasible)
	require.False(t, j.ProvenOptimal)
	require.ElementsMatch(t, []string{"1", "2"}, j.Conflict)
	require.Contains(t, j.Reason, "later by 3")
}
