package bound

import (
	"context"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/stretchr/testify/require"

	"visitline/solver"
	"visitline/solver/benchdata"
	"visitline/solver/format"
)

// benchDir is the shared benchmark collection (shared/benchmarks/tsptw).
const benchDir = "../../../shared/benchmarks/tsptw"

type known struct {
	family, instance string
	best, lower      float64
	source           string
}

// loadKnown reads best-known.csv, skipping the test when the collection is
// absent (and failing under CI=true, where it must be there).
func loadKnown(t testing.TB) []known {
	t.Helper()
	path := filepath.Join(benchDir, "best-known.csv")
	fh, err := os.Open(path)
	if err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("benchmark collection missing under CI: %v", err)
		}
		t.Skipf("benchmark collection not found at %s: %v", benchDir, err)
	}
	defer fh.Close()
	ks, err := benchdata.Read(fh, path)
	require.NoError(t, err)
	var out []known
	for _, k := range ks {
		require.True(t, k.HasLower, "%s: no lower bound", k.Key())
		out = append(out, known{k.Family, k.Instance, k.Best, k.Lower, k.Source})
	}
	return out
}

func loadBench(t testing.TB, k known) *solver.Instance {
	t.Helper()
	path := filepath.Join(benchDir, k.family, k.instance)
	fh, err := os.Open(path)
	require.NoError(t, err)
	defer fh.Close()
	in, err := format.ReadBenchmark(fh, path)
	require.NoError(t, err)
	return in
}

// reportOptions reads VISITLINE_BOUND_RELAX (the share of the time for the
// penalty ascent), VISITLINE_BOUND_STATE (labels per state),
// VISITLINE_BOUND_NG (the ng-neighbourhoods' size), VISITLINE_BOUND_STAGE
// and VISITLINE_BOUND_STAGEMAX (labels per stage of the exact search, and
// how far a run with time left may double them) and
// VISITLINE_BOUND_NGMAX (the largest ng-neighbourhood
// the ascent may grow to) for experiments; the default options otherwise.
func reportOptions(t *testing.T) Options {
	var o Options
	if v := os.Getenv("VISITLINE_BOUND_RELAX"); v != "" {
		f, err := strconv.ParseFloat(v, 64)
		require.NoError(t, err)
		o.RelaxShare = f
	}
	if v := os.Getenv("VISITLINE_BOUND_STATE"); v != "" {
		k, err := strconv.Atoi(v)
		require.NoError(t, err)
		o.StateLabels = k
	}
	if v := os.Getenv("VISITLINE_BOUND_NG"); v != "" {
		k, err := strconv.Atoi(v)
		require.NoError(t, err)
		o.Neighbours = k
	}
	if os.Getenv("VISITLINE_BOUND_ELIM") == "1" {
		o.ArcElimination = true
	}
	if v := os.Getenv("VISITLINE_BOUND_STAGE"); v != "" {
		k, err := strconv.Atoi(v)
		require.NoError(t, err)
		o.StageLabels = k
	}
	if v := os.Getenv("VISITLINE_BOUND_STAGEMAX"); v != "" {
		k, err := strconv.Atoi(v)
		require.NoError(t, err)
		o.StageLabelsMax = k
	}
	if v := os.Getenv("VISITLINE_BOUND_NGMAX"); v != "" {
		k, err := strconv.Atoi(v)
		require.NoError(t, err)
		o.NeighboursMax = k
	}
	return o
}

// TestBoundReport runs the exact search on whole families with a time limit
// per instance and prints the proven count and mean bound gap. It is a
// measurement, not a test: it runs only with VISITLINE_BOUND_REPORT set, to
// a comma-separated list of families (or "all"), and VISITLINE_BOUND_BUDGET
// (default 10s), of CPU time with VISITLINE_BOUND_CPU=1. Run it with
// GOMAXPROCS=1 on a shared machine.
func TestBoundReport(t *testing.T) {
	fams := os.Getenv("VISITLINE_BOUND_REPORT")
	if fams == "" {
		t.Skip("set VISITLINE_BOUND_REPORT=Dumas,GendreauDumasExtended (or all) to run the bound report")
	}
	budget := 10 * time.Second
	if v := os.Getenv("VISITLINE_BOUND_BUDGET"); v != "" {
		d, err := time.ParseDuration(v)
		require.NoError(t, err)
		budget = d
	}
	filter := os.Getenv("VISITLINE_BOUND_FILTER")
	// VISITLINE_BOUND_CPU=1: the budget is of CPU time (seconds reported
	// are CPU seconds too), for a machine shared with other work.
	cpu := os.Getenv("VISITLINE_BOUND_CPU") != ""
	type sum struct {
		runs, proven     int
		gap, gapInc, sec float64
		maxGap           float64
		proofSec         []float64
	}
	sums := map[string]*sum{}
	var order []string
	for _, k := range loadKnown(t) {
		if fams != "all" && !strings.Contains(","+fams+",", ","+k.family+",") {
			continue
		}
		if filter != "" && !slices.ContainsFunc(strings.Split(filter, ","), func(f string) bool { return strings.Contains(k.instance, f) }) {
			continue
		}
		in := loadBench(t, k)
		var ctx context.Context
		var cancel context.CancelFunc
		if cpu {
			ctx, cancel = WithCPUBudget(context.Background(), budget, processCPU)
		} else {
			ctx, cancel = context.WithTimeout(context.Background(), budget)
		}
		start, startCPU := time.Now(), processCPU()
		b := Exact(ctx, in, reportOptions(t))
		cancel()
		el := time.Since(start).Seconds()
		if cpu {
			el = (processCPU() - startCPU).Seconds()
		}
		lb := in.InputUnits(b.Value)
		require.LessOrEqual(t, lb, k.best+0.01, "%s/%s: bound above best-known (%s)", k.family, k.instance, b.Method)
		gap := 100 * (k.best - lb) / math.Max(lb, 1e-9)
		if gap < 0 {
			gap = 0
		}
		gapInc := math.NaN()
		if b.Route != nil {
			gapInc = 100 * (in.InputUnits(b.Cost) - lb) / math.Max(lb, 1e-9)
		}
		if b.ProvenOptimal {
			require.InDelta(t, k.best, in.InputUnits(b.Cost), 0.011, "%s/%s: proven optimum differs from best-known (%s)", k.family, k.instance, k.source)
		}
		// One summary per family and one per family and size.
		for _, key := range []string{k.family, fmt.Sprintf("%s n=%d", k.family, in.N)} {
			s := sums[key]
			if s == nil {
				s = &sum{}
				sums[key] = s
				order = append(order, key)
			}
			s.runs++
			if b.ProvenOptimal {
				s.proven++
				s.proofSec = append(s.proofSec, el)
			}
			s.gap += gap
			s.maxGap = max(s.maxGap, gap)
			s.sec += el
		}
		fmt.Printf("%-22s %-18s n=%3d best=%8.2f lb=%8.2f (%-11s) route=%8.2f gap=%6.2f%% proven=%-5v %5.2fs labels=%d %s\n",
			k.family, k.instance, in.N, k.best, lb, b.Method, in.InputUnits(b.Cost), gap, b.ProvenOptimal, el, b.Labels, strings.Join(b.Notes, "; "))
		_ = gapInc
	}
	for _, f := range order {
		s := sums[f]
		med := math.NaN()
		if len(s.proofSec) > 0 {
			slices.Sort(s.proofSec)
			med = s.proofSec[len(s.proofSec)/2]
		}
		fmt.Printf("SUMMARY %-28s runs=%d proven=%d mean-gap-to-best-known=%.3f%% max-gap=%.2f%% mean-seconds=%.2f median-seconds-to-proof=%.2f budget=%v cpu=%v\n",
			f, s.runs, s.proven, s.gap/float64(s.runs), s.maxGap, s.sec/float64(s.runs), med, budget, cpu)
	}
}

// BenchmarkExact proves one mid-sized tight-window instance optimal per
// iteration (Dumas n60w40.001, optimum 591 per best-known.csv: Dumas et al.
// (1995)).
func BenchmarkExact(b *testing.B) {
	var k known
	for _, x := range loadKnown(b) {
		if x.family == "Dumas" && x.instance == "n60w40.001.txt" {
			k = x
		}
	}
	in := loadBench(b, k)
	for b.Loop() {
		r := Exact(context.Background(), in, Options{})
		if !r.ProvenOptimal || in.InputUnits(r.Cost) != k.best {
			b.Fatalf("not proven: %+v", r.Notes)
		}
	}
}

// BenchmarkRelaxation builds the state-space relaxation of a wide-window
// instance once per iteration (GendreauDumasExtended n60w120.001).
func BenchmarkRelaxation(b *testing.B) {
	var k known
	for _, x := range loadKnown(b) {
		if x.family == "GendreauDumasExtended" && x.instance == "n60w120.001.txt" {
			k = x
		}
	}
	in := loadBench(b, k)
	p := newProb(in)
	lam := make([]int64, in.N)
	for b.Loop() {
		if rx := buildRelax(context.Background(), p, solver.TravelTime, lam, nil, 24, 6<<20, &yielder{}); rx == nil {
			b.Fatal("no table")
		}
	}
}
