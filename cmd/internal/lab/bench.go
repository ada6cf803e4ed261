package lab

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"runtime/pprof"
	"sort"
	"strconv"
	"strings"
	"time"

	"visitline/solver"
	"visitline/solver/benchdata"
)

type benchRow struct {
	Family        string  `json:"family"`
	Instance      string  `json:"instance"`
	Nodes         int     `json:"nodes"`
	Seed          int64   `json:"seed"`
	BestKnown     float64 `json:"best_known,omitempty"`
	HasBest       bool    `json:"has_best_known"`
	Found         float64 `json:"found"`
	Feasible      bool    `json:"feasible"`
	Checked       bool    `json:"checked"`
	GapPct        float64 `json:"gap_pct"`
	AtBest        bool    `json:"at_best_known"`
	SecondsToBest float64 `json:"seconds_to_best"`
	Seconds       float64 `json:"seconds"`
	Iterations    int     `json:"iterations"`
	// Budget is the time budget of this run in seconds (per family).
	Budget float64 `json:"budget_seconds"`
	// SecondsToBestKnown is when the run first reached the best-known value
	// (-1: never, or no best-known value).
	SecondsToBestKnown float64 `json:"seconds_to_best_known"`
	// CPUSeconds is the CPU time the process used during the run (-1:
	// unknown); below Seconds when the machine was shared.
	CPUSeconds float64 `json:"cpu_seconds"`
	// CPUToBestKnown is the process CPU time until the best-known value
	// was first reached (-1: never, or unknown).
	CPUToBestKnown float64 `json:"cpu_to_best_known"`
	// Workers is the number of searches side by side.
	Workers int `json:"workers"`
	// Trace is (seconds, cost) of every improvement, for the chart.
	Trace [][2]float64 `json:"trace,omitempty"`
}

type familySummary struct {
	Family       string  `json:"family"`
	Runs         int     `json:"runs"`
	Feasible     int     `json:"feasible"`
	AtBest       int     `json:"at_best_known"`
	MeanGapPct   float64 `json:"mean_gap_pct"`
	MaxGapPct    float64 `json:"max_gap_pct"`
	MedianToBest float64 `json:"median_seconds_to_best"`
	// MedianToBestKnown is the median over the runs at best-known of the
	// time they first reached it.
	MedianToBestKnown float64 `json:"median_seconds_to_best_known"`
	// MedianCPUToBestKnown is the same in CPU seconds of the process.
	MedianCPUToBestKnown float64 `json:"median_cpu_to_best_known"`
	Budget               string  `json:"budget"`
	MeanIterRate         float64 `json:"iterations_per_second"`
	WithBestKnown        int     `json:"with_best_known"`
	// CPUShare is the CPU time over the wall-clock time of the runs: 1 when
	// the run had a whole core to itself (one worker).
	CPUShare float64 `json:"cpu_share"`
}

type bestKnown struct{ value float64 }

func runBench(args []string, stdout, stderr io.Writer) error {
	fs := flag.NewFlagSet("bench", flag.ContinueOnError)
	fs.SetOutput(stderr)
	budget := fs.Duration("budget", 5*time.Second, "time budget per instance and seed")
	iterations := fs.Int("iterations", 0, "iteration budget per run (0: none)")
	seeds := fs.Int("seeds", 1, "seeds per instance (1, 2, ...)")
	bounds := fs.String("bounds", "", "best-known values: CSV with family,instance,best_known")
	jsonOut := fs.String("json", "", "write every run as JSON to this file")
	readme := fs.String("readme", "", "rewrite the results table of this Markdown file (docs/results.md) between its bench markers")
	quiet := fs.Bool("quiet", false, "print only the family summary")
	workers := fs.Int("workers", 1, "searches side by side per run (1: one thread, reproducible at an iteration budget)")
	chart := fs.String("chart", "", "draw the share of instances at best-known against time as SVG into this file")
	from := fs.String("from", "", "re-render the summary, results table and chart from the JSON of an earlier run instead of solving")
	cpuBudget := fs.Bool("cpu-budget", false, "count the budgets in CPU time of this process instead of wall-clock time (fairer on a shared machine; needs a system that reports CPU time)")
	stopAtBest := fs.Bool("stop-at-best", false, "end a run as soon as it reaches the best-known value (for time-to-target measurements)")
	baseline := fs.String("baseline", "", "with --from: compare the time to best-known per instance against this earlier JSON (e.g. one worker)")
	cpuProfile := fs.String("cpuprofile", "", "write a CPU profile of the runs to this file (for go tool pprof, or as default.pgo for profile-guided builds)")
	famBudget := budgetFor{}
	fs.Var(famBudget, "budget-for", "time budget for one family, FAMILY=DURATION (repeatable), e.g. OhlmannThomas=30s")
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return nil
		}
		return usageError{err.Error()}
	}
	if *from != "" {
		if *baseline != "" {
			return speedupFromJSON(*baseline, *from, *readme, stdout)
		}
		return benchFromJSON(*from, *readme, *chart, stdout)
	}
	if fs.NArg() == 0 {
		return usageError{"want instance files or folders (see visitline-lab bench -h)"}
	}
	if *workers < 1 {
		return usageError{fmt.Sprintf("--workers %d: want 1 or more", *workers)}
	}
	if *budget <= 0 && *iterations <= 0 {
		return usageError{"set a --budget above 0 or an --iterations count"}
	}
	// The instances first: a path that does not exist is named as such,
	// before the best-known file is read in the format the instances ask for.
	files, err := collectFiles(fs.Args())
	if err != nil {
		return err
	}
	if isFleetBench(files) {
		return benchFleet(files, fleetBenchOptions{budget: *budget, iterations: *iterations, seeds: *seeds, bounds: *bounds, jsonOut: *jsonOut,
			quiet: *quiet, cpuBudget: *cpuBudget, command: benchCommand(args)}, stdout)
	}
	known := map[string]bestKnown{}
	if *bounds != "" {
		var err error
		if known, err = readBestKnown(*bounds); err != nil {
			return err
		}
	}
	if len(files) == 0 {
		return errors.New("no instance files found in the given paths")
	}
	if *cpuProfile != "" {
		fh, err := os.Create(*cpuProfile)
		if err != nil {
			return err
		}
		defer fh.Close()
		if err := pprof.StartCPUProfile(fh); err != nil {
			return fmt.Errorf("--cpuprofile: %w", err)
		}
		defer pprof.StopCPUProfile()
	}
	var rows []benchRow
	if !*quiet {
		fmt.Fprintf(stdout, "%-22s %-18s %5s %4s %10s %10s %8s %8s %s\n", "family", "instance", "nodes", "seed", "best-known", "found", "gap %", "to best", "check")
	}
	for _, file := range files {
		in, err := loadInstance(file)
		if err != nil {
			return err
		}
		fam := filepath.Base(filepath.Dir(file))
		name := filepath.Base(file)
		runBudget := famBudget.of(fam, *budget)
		for seed := 1; seed <= *seeds; seed++ {
			row := benchRow{Family: fam, Instance: name, Nodes: in.N, Seed: int64(seed), Budget: runBudget.Seconds(), SecondsToBestKnown: -1, Workers: *workers}
			var trace [][2]float64
			s := solver.Settings{Budget: runBudget, Iterations: *iterations, Seed: int64(seed), Workers: *workers}
			bk, hasBK := known[fam+"/"+name]
			if !hasBK { // TSPLIB's optimal.csv names instances without the extension
				bk, hasBK = known[fam+"/"+strings.TrimSuffix(name, filepath.Ext(name))]
			}
			ctx, cancel := context.WithCancel(context.Background())
			cpu0 := processCPU()
			var called time.Time
			row.CPUToBestKnown = -1
			s.OnImprove = func(p solver.Plan) {
				if !p.Feasible {
					return
				}
				// Seconds from the call, preprocessing included
				// (Plan.Elapsed starts after it).
				trace = append(trace, [2]float64{time.Since(called).Seconds(), in.InputUnits(p.Cost)})
				if hasBK && row.CPUToBestKnown < 0 && atBestKnown(in.InputUnits(p.Cost), bk.value, in.Scale) {
					if cpu0 >= 0 {
						row.CPUToBestKnown = processCPU() - cpu0
					}
					if *stopAtBest {
						cancel()
					}
				}
			}
			if *cpuBudget && runBudget > 0 {
				if cpu0 < 0 {
					cancel()
					return errors.New("--cpu-budget: this system does not report CPU time")
				}
				// The wall-clock budget stays as a backstop.
				s.Budget = 20 * runBudget
				cpuLimit(ctx, cancel, &s, cpu0+runBudget.Seconds())
			}
			called = time.Now()
			res, err := solver.Solve(ctx, in, s)
			wall := time.Since(called)
			cancel()
			if err != nil {
				return fmt.Errorf("%s: %w", file, err)
			}
			row.CPUSeconds = -1
			if cpu0 >= 0 {
				row.CPUSeconds = processCPU() - cpu0
			}
			// The independent evaluator decides, not the engine's own numbers.
			chk := solver.Evaluate(in, res.Best.Route)
			row.Checked = solver.CheckRoute(in, res.Best.Route) == nil && chk.Feasible == res.Best.Feasible && chk.Cost(solver.TravelTime) == res.Best.Cost
			row.Feasible = chk.Feasible && row.Checked
			row.Found = in.InputUnits(chk.Travel)
			row.SecondsToBest = res.Best.Elapsed.Seconds()
			row.Seconds = wall.Seconds()
			row.Iterations = res.Iterations
			row.Trace = trace
			if hasBK {
				row.HasBest, row.BestKnown = true, bk.value
				if row.Feasible {
					row.GapPct = 100 * (row.Found - bk.value) / bk.value
					// Published values of the real-valued families are rounded
					// to two decimals (shared/benchmarks/tsptw/README.md).
					row.AtBest = atBestKnown(row.Found, bk.value, in.Scale)
				}
				if row.AtBest {
					row.SecondsToBestKnown = timeToValue(trace, bk.value, in.Scale)
				}
			}
			rows = append(rows, row)
			if !*quiet {
				bk, gap := "-", "-"
				if row.HasBest {
					bk = strconv.FormatFloat(row.BestKnown, 'f', -1, 64)
					gap = fmt.Sprintf("%.2f", row.GapPct)
				}
				state := "ok"
				if !row.Checked {
					state = "MISMATCH"
				} else if !row.Feasible {
					state = "infeasible"
				}
				fmt.Fprintf(stdout, "%-22s %-18s %5d %4d %10s %10s %8s %8.2f %s\n", fam, name, in.N, seed, bk, strconv.FormatFloat(row.Found, 'f', 2, 64), gap, row.SecondsToBest, state)
			}
		}
		// Written after every instance, so that a long run that is stopped
		// keeps what it measured.
		if *jsonOut != "" {
			rep := benchReport{CPUBudget: *cpuBudget, Budget: budget.String(), PerFamily: famBudget.String(), Iterations: *iterations, Workers: *workers,
				Machine: machine(), Command: benchCommand(args), Families: summarise(rows), Runs: rows}
			if err := rep.write(*jsonOut); err != nil {
				return err
			}
		}
	}
	rep := benchReport{CPUBudget: *cpuBudget, Budget: budget.String(), PerFamily: famBudget.String(), Iterations: *iterations, Workers: *workers,
		Machine: machine(), Command: benchCommand(args), Families: summarise(rows), Runs: rows}
	table := rep.table()
	fmt.Fprint(stdout, "\n"+table)
	if err := rep.publish(*readme, *chart); err != nil {
		return err
	}
	for _, r := range rows {
		if !r.Checked {
			return fmt.Errorf("%s/%s: the engine's plan disagrees with the independent evaluator", r.Family, r.Instance)
		}
	}
	return nil
}

func summarise(rows []benchRow) []familySummary {
	by := map[string][]benchRow{}
	var order []string
	for _, r := range rows {
		if _, ok := by[r.Family]; !ok {
			order = append(order, r.Family)
		}
		by[r.Family] = append(by[r.Family], r)
	}
	var out []familySummary
	for _, fam := range order {
		rs := by[fam]
		s := familySummary{Family: fam, Runs: len(rs), Budget: (time.Duration(rs[0].Budget * float64(time.Second))).String()}
		var times, toKnown, cpuToKnown []float64
		var cpu, wall float64
		var rate float64
		gapN := 0
		for _, r := range rs {
			if r.Feasible {
				s.Feasible++
			}
			if r.HasBest {
				s.WithBestKnown++
			}
			if r.AtBest {
				s.AtBest++
			}
			if r.HasBest && r.Feasible {
				g := math.Max(r.GapPct, 0)
				s.MeanGapPct += g
				s.MaxGapPct = math.Max(s.MaxGapPct, g)
				gapN++
			}
			times = append(times, r.SecondsToBest)
			if r.CPUSeconds >= 0 {
				cpu += r.CPUSeconds
				wall += r.Seconds
			}
			if r.AtBest && r.SecondsToBestKnown >= 0 {
				toKnown = append(toKnown, r.SecondsToBestKnown)
				if r.CPUToBestKnown >= 0 {
					cpuToKnown = append(cpuToKnown, r.CPUToBestKnown)
				}
			}
			if r.Seconds > 0 {
				rate += float64(r.Iterations) / r.Seconds
			}
		}
		if gapN > 0 {
			s.MeanGapPct /= float64(gapN)
		}
		sort.Float64s(times)
		if len(times) > 0 {
			s.MedianToBest = times[len(times)/2]
		}
		s.MedianToBestKnown = median(toKnown)
		s.MedianCPUToBestKnown = median(cpuToKnown)
		if wall > 0 {
			s.CPUShare = cpu / wall
		}
		s.MeanIterRate = rate / float64(len(rs))
		out = append(out, s)
	}
	return out
}

func machine() string {
	host := runtime.GOOS + "/" + runtime.GOARCH
	cpu := ""
	if data, err := os.ReadFile("/proc/cpuinfo"); err == nil {
		for _, line := range strings.Split(string(data), "\n") {
			if strings.HasPrefix(line, "model name") {
				_, v, _ := strings.Cut(line, ":")
				cpu = strings.TrimSpace(v)
				break
			}
		}
	}
	if cpu != "" {
		host += ", " + cpu
	}
	if runtime.GOOS == "js" {
		return fmt.Sprintf("%s (one thread), %s", host, runtime.Version())
	}
	return fmt.Sprintf("%s, %d cores, %s", host, runtime.NumCPU(), runtime.Version())
}

func readBestKnown(path string) (map[string]bestKnown, error) {
	ks, err := benchdata.Load(path)
	if errors.Is(err, os.ErrNotExist) || errors.Is(err, os.ErrPermission) {
		return nil, fmt.Errorf("%s: cannot open: %w", path, unwrapPath(err))
	}
	if err != nil {
		return nil, err
	}
	out := map[string]bestKnown{}
	for _, k := range ks {
		out[k.Key()] = bestKnown{k.Best}
	}
	return out, nil
}

func collectFiles(paths []string) ([]string, error) {
	var out []string
	for _, p := range paths {
		st, err := os.Stat(p)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", p, unwrapPath(err))
		}
		if !st.IsDir() {
			out = append(out, p)
			continue
		}
		err = filepath.WalkDir(p, func(path string, d os.DirEntry, err error) error {
			if err != nil {
				return err
			}
			if d.IsDir() {
				return nil
			}
			base := d.Name()
			if strings.HasSuffix(base, ".md") || strings.HasSuffix(base, ".csv") || strings.HasPrefix(base, ".") {
				return nil
			}
			out = append(out, path)
			return nil
		})
		if err != nil {
			return nil, err
		}
	}
	sort.Strings(out)
	return out, nil
}

// replaceBetween rewrites the text between two marker lines of a file.
// A marker counts only alone on its line, so that a README may mention the
// markers in its prose.
func replaceBetween(path, startMark, endMark, body string) error {
	data, err := os.ReadFile(path)
	if err != nil {
		return err
	}
	lines := strings.SplitAfter(string(data), "\n")
	from, to := -1, -1
	for k, l := range lines {
		t := strings.TrimSpace(l)
		if t == startMark && from < 0 {
			from = k
		} else if t == endMark && from >= 0 && to < 0 {
			to = k
		}
	}
	if from < 0 || to < 0 {
		return fmt.Errorf("%s: no line %s followed by a line %s", path, startMark, endMark)
	}
	if body != "" && !strings.HasSuffix(body, "\n") {
		body += "\n"
	}
	out := strings.Join(lines[:from+1], "") + body + strings.Join(lines[to:], "")
	return os.WriteFile(path, []byte(out), 0o644)
}
