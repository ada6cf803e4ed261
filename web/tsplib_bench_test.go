package web_test

// The TSPLIB days in the browser: the page's engine with one search worker
// and no bound, 30 s per instance (VISITLINE_BENCH_TSPLIB_BUDGET), the plan
// checked natively by solver.Evaluate and its length set against the
// published optimal tour length (TSPLIB, G. Reinelt 1991, the shared
// optimal.csv). Figures, not assertions (the machine may be shared): run
// with VISITLINE_BENCH_TSPLIB=1.

import (
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/stretchr/testify/require"

	"visitline/solver"
	"visitline/solver/app"
	"visitline/solver/benchdata"
)

func TestBenchBrowserTSPLIB(t *testing.T) {
	if os.Getenv("VISITLINE_BENCH_TSPLIB") == "" {
		t.Skip("set VISITLINE_BENCH_TSPLIB=1")
	}
	dir := filepath.Join("..", "..", "shared", "benchmarks", "tsplib")
	ks, err := benchdata.Load(filepath.Join(dir, "optimal.csv"))
	require.NoError(t, err)
	optimal := map[string]float64{}
	for _, k := range ks {
		optimal[k.Key()[strings.LastIndexByte(k.Key(), '/')+1:]] = k.Best
	}
	budget := 30.0
	if v, err := strconv.ParseFloat(os.Getenv("VISITLINE_BENCH_TSPLIB_BUDGET"), 64); err == nil && v > 0 {
		budget = v
	}
	files := []string{"pcb442.tsp", "pr1002.tsp", "vm1084.tsp", "fl1400.tsp", "d2103.tsp", "pr2392.tsp"}
	if v := os.Getenv("VISITLINE_BENCH_TSPLIB_FILES"); v != "" {
		files = strings.Split(v, ",")
	}
	// VISITLINE_BENCH_TSPLIB_BOUND=1 runs the bound worker beside the
	// search (for its memory; the plans then depend on timing).
	withBound := os.Getenv("VISITLINE_BENCH_TSPLIB_BOUND") == "1"
	ctx := longTab(t, time.Hour)
	site(t)
	for _, f := range files {
		b, err := os.ReadFile(filepath.Join(dir, f))
		require.NoError(t, err)
		text := string(b)
		d, err := app.Load(strings.NewReader(text), nil, f, "", app.LoadOptions{})
		require.NoError(t, err)
		benchOpen(t, ctx)
		c0 := browserCPU(t)
		w0 := time.Now()
		plan, _, fin := engineRun(t, ctx, map[string]any{"type": "load", "text": text},
			map[string]any{"type": "start", "budget": budget, "seed": 1, "no_bound": !withBound}, 1)
		wall := time.Since(w0)
		cpu := browserCPU(t) - c0
		require.NotNil(t, fin, "%s: finished", f)
		route := routeOf(t, plan)
		require.NoError(t, solver.CheckRoute(d.Instance, route))
		sch := solver.Evaluate(d.Instance, route)
		require.True(t, sch.Feasible)
		length := d.Instance.InputUnits(sch.Travel)
		opt := optimal[strings.TrimSuffix(f, filepath.Ext(f))]
		require.Greater(t, opt, 0.0, "%s in optimal.csv", f)
		require.GreaterOrEqual(t, length, opt-1e-9, "%s: a tour below the published optimum would be news", f)
		mem := ""
		for _, w := range fin["workers"].([]any) {
			mem += fmt.Sprintf(" search worker %.0f MB", w.(map[string]any)["memory_mb"].(float64))
		}
		if b, ok := fin["bound"].(map[string]any); ok {
			if mb, ok := b["memory_mb"].(float64); ok {
				mem += fmt.Sprintf(", bound worker %.0f MB", mb)
			}
		}
		t.Logf("%s: page, 1 search worker, bound %v, %g s: tour %g, optimal %g (TSPLIB), %.2f %% above; %.1f s wall, browser CPU %.1f s (all its processes, loading included), %v; WebAssembly memory:%s",
			f, withBound, budget, length, opt, 100*(length-opt)/opt, wall.Seconds(), cpu.Seconds(), fin["why"], mem)
	}
}
