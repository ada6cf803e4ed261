package main

import (
	"bytes"
	"encoding/json"
	"os"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestSolveBudgetIsReportedAsBudget: a run that uses its whole budget says
// "budget" in its JSON, with the bound on (whose timeout once raced the
// engine's deadline and was reported as a cancel) and off. A published
// 150-node instance (../shared/benchmarks; see its README) that no side
// proves optimal in a fraction of a second.
func TestSolveBudgetIsReportedAsBudget(t *testing.T) {
	file := "../../../shared/benchmarks/tsptw/OhlmannThomas/n150w120.001.txt"
	if _, err := os.Stat(file); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("published instance missing: %v", err)
		}
		t.Skip(err)
	}
	for _, bound := range []string{"--bound=true", "--bound=false"} {
		t.Run(bound, func(t *testing.T) {
			for i := 0; i < 3; i++ {
				var out, errb bytes.Buffer
				require.NoError(t, runSolve([]string{"--budget", "300ms", "--workers", "1", bound, "--quiet", "--format", "json", file}, &out, &errb))
				var j struct {
					Stop string `json:"stop"`
				}
				require.NoError(t, json.Unmarshal(out.Bytes(), &j))
				assert.Equal(t, "budget", j.Stop)
			}
		})
	}
}

// TestSolveSaysWhenTheBudgetIsTooShort: a budget that ends before the
// first plan is ready gives that plan with a note on stderr.
func TestSolveSaysWhenTheBudgetIsTooShort(t *testing.T) {
	file := writeTemp(t, "line.txt", "4\n0 10 20 30\n10 0 10 20\n20 10 0 10\n30 20 10 0\n0 1000\n0 1000\n0 1000\n0 1000\n")
	var out, errb bytes.Buffer
	require.NoError(t, runSolve([]string{"--budget", "1ns", "--quiet", "--format", "json", file}, &out, &errb))
	assert.Contains(t, errb.String(), "ended before the first plan")
	var j struct {
		Stop  string `json:"stop"`
		Route []int  `json:"route"`
	}
	require.NoError(t, json.Unmarshal(out.Bytes(), &j))
	assert.Equal(t, "budget", j.Stop)
	assert.Len(t, j.Route, 4)
}
