package lab

import (
	"bufio"
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"os/exec"
	"runtime"
	"sort"
	"strconv"
	"strings"
	"time"

	"visitline/solver"
	"visitline/solver/gen"
)

// scaleRow is one generated instance solved once.
type scaleRow struct {
	N         int     `json:"n"`
	Tightness string  `json:"tightness"`
	Seed      int64   `json:"seed"`
	Platform  string  `json:"platform"`
	Budget    float64 `json:"budget_seconds"`
	// GenSeconds is the time to generate the instance (not part of the run).
	GenSeconds float64 `json:"gen_seconds"`
	// ReferenceCost is the travel time of the route the windows were built
	// around (a feasible plan known before the search).
	ReferenceCost int64 `json:"reference_cost"`
	// FirstFeasible* describe the first plan that met every window.
	FirstFeasibleSeconds   float64 `json:"first_feasible_seconds"`
	FirstFeasibleIteration int     `json:"first_feasible_iteration"`
	FirstFeasibleCost      int64   `json:"first_feasible_cost"`
	// FirstFeasibleCPU is the process CPU time to the first feasible plan
	// (-1: none, or unknown).
	FirstFeasibleCPU float64 `json:"first_feasible_cpu"`
	// CPUSeconds is the process CPU time of the run (-1: unknown).
	CPUSeconds float64 `json:"cpu_seconds"`
	CPUBudget  bool    `json:"cpu_budget,omitempty"`
	// CPUWholeProcess: CPUSeconds is the whole child process's, start-up
	// included (a js/wasm runner cannot measure its own).
	CPUWholeProcess bool    `json:"cpu_whole_process,omitempty"`
	FinalCost       int64   `json:"final_cost"`
	ImprovementPct  float64 `json:"improvement_pct"`
	Feasible        bool    `json:"feasible"`
	Checked         bool    `json:"checked"`
	Iterations      int     `json:"iterations"`
	Seconds         float64 `json:"seconds"`
	ItersPerSecond  float64 `json:"iterations_per_second"`
	// SecondsPerIteration is measured over the search after the first
	// feasible plan, so that construction does not count; in CPU time where
	// the platform reports it, else wall-clock.
	SecondsPerIteration float64 `json:"seconds_per_iteration"`
	// PeakSysMB is the high-water of runtime.MemStats.Sys sampled during
	// the run: memory the Go runtime took from the system (in WebAssembly,
	// the linear memory).
	PeakSysMB float64 `json:"peak_sys_mb"`
	// PeakRSSMB is the process's resident high-water (VmHWM, or the
	// child's ru_maxrss as its parent saw it), where the system reports it
	// (-1 elsewhere).
	PeakRSSMB float64 `json:"peak_rss_mb"`
	Fresh     bool    `json:"fresh_process"`
	Stop      string  `json:"stop"`
}

type scaleReport struct {
	Command string     `json:"command"`
	Machine string     `json:"machine"`
	Rows    []scaleRow `json:"rows"`
}

func runScale(args []string, stdout, stderr io.Writer) error {
	fs := flag.NewFlagSet("scale", flag.ContinueOnError)
	fs.SetOutput(stderr)
	budget := fs.Duration("budget", 30*time.Second, "time budget per instance")
	iterations := fs.Int("iterations", 0, "iteration budget per instance (0: none)")
	sizes := fs.String("sizes", "100,300,1000,2000", "comma-separated node counts")
	levels := fs.String("tightness", "none,wide,medium,tight", "comma-separated window tightness levels")
	seed := fs.Int64("seed", 1, "seed of the generator and of the search")
	workers := fs.Int("workers", 1, "searches side by side")
	fresh := fs.Bool("fresh", runtime.GOOS != "js", "run each case in a fresh process, so that its memory peak is its own")
	jsonOut := fs.String("json", "", "write the rows as JSON to this file")
	appendJSON := fs.Bool("append", false, "add to the rows already in the --json file instead of replacing them")
	from := fs.String("from", "", "render the rows of an earlier --json file instead of running")
	readme := fs.String("readme", "", "rewrite this Markdown file (docs/results.md) between its scale markers")
	chart := fs.String("chart", "", "draw the time per iteration against n as SVG into this file")
	section := fs.String("section", "scale", "markers of --readme: <!-- SECTION:start --> and <!-- SECTION:end -->")
	cpuBudget := fs.Bool("cpu-budget", false, "count the budget in CPU time of the process instead of wall-clock time (fairer on a shared machine)")
	wasm := fs.String("wasm", "", "run each case in this program built for js/wasm, under --runner, in a fresh process")
	runner := fs.String("runner", defaultWasmRunner(), "with --wasm: the command that runs a js/wasm program")
	oneCase := fs.String("case", "", "internal: run one case N:TIGHTNESS and print its row as JSON")
	quiet := fs.Bool("quiet", false, "no per-case lines")
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return nil
		}
		return usageError{err.Error()}
	}
	if fs.NArg() != 0 {
		return usageError{fmt.Sprintf("unexpected argument %q", fs.Arg(0))}
	}
	if *budget <= 0 && *iterations <= 0 {
		return usageError{"set a --budget above 0 or an --iterations count"}
	}
	if *oneCase != "" {
		n, lvl, err := parseCase(*oneCase)
		if err != nil {
			return usageError{"--case: " + err.Error()}
		}
		row, err := scaleCase(n, lvl, *seed, *budget, *iterations, *workers, *cpuBudget)
		if err != nil {
			return err
		}
		data, _ := json.Marshal(row)
		fmt.Fprintln(stdout, string(data))
		return nil
	}
	rep := scaleReport{Command: "visitline-lab scale " + strings.Join(args, " "), Machine: machine()}
	if *from != "" {
		data, err := os.ReadFile(*from)
		if err != nil {
			return fmt.Errorf("%s: cannot open: %w", *from, unwrapPath(err))
		}
		if err := json.Unmarshal(data, &rep); err != nil {
			return fmt.Errorf("%s: not a scale result file: %w", *from, err)
		}
		return publishScale(rep, *readme, *section, *chart, stdout)
	}
	ns, err := parseSizes(*sizes)
	if err != nil {
		return usageError{"--sizes: " + err.Error()}
	}
	var lvls []gen.Tightness
	for _, s := range strings.Split(*levels, ",") {
		l, err := gen.ParseTightness(s)
		if err != nil {
			return usageError{"--tightness: " + err.Error()}
		}
		lvls = append(lvls, l)
	}
	if *appendJSON && *jsonOut != "" {
		if data, err := os.ReadFile(*jsonOut); err == nil {
			var old scaleReport
			if err := json.Unmarshal(data, &old); err != nil {
				return fmt.Errorf("%s: not a scale result file: %w", *jsonOut, err)
			}
			rep.Rows = old.Rows
			rep.Command = old.Command
		}
	}
	self := ""
	var pre []string
	if *wasm != "" {
		if runtime.GOOS == "js" {
			return usageError{"--wasm: run it from the native build"}
		}
		if _, err := os.Stat(*wasm); err != nil {
			return fmt.Errorf("%s: %w", *wasm, unwrapPath(err))
		}
		run := strings.Fields(*runner)
		if len(run) == 0 {
			return usageError{"--runner is empty"}
		}
		self, pre = run[0], append(run[1:len(run):len(run)], *wasm)
		*fresh = true
	} else if *fresh {
		if self, err = os.Executable(); err != nil {
			return fmt.Errorf("cannot find this program to run each case afresh: %w (use --fresh=false)", err)
		}
	}
	if !*quiet {
		fmt.Fprintln(stdout, scaleHeader)
	}
	for _, n := range ns {
		for _, lvl := range lvls {
			var row scaleRow
			if *fresh {
				row, err = scaleChild(self, pre, n, lvl, *seed, *budget, *iterations, *workers, *cpuBudget, stderr)
			} else {
				row, err = scaleCase(n, lvl, *seed, *budget, *iterations, *workers, *cpuBudget)
			}
			if err != nil {
				return fmt.Errorf("n %d, %s windows: %w", n, lvl, err)
			}
			rep.Rows = append(rep.Rows, row)
			if !*quiet {
				fmt.Fprintln(stdout, scaleLine(row))
			}
			if *jsonOut != "" {
				data, _ := json.MarshalIndent(rep, "", " ")
				if err := os.WriteFile(*jsonOut, append(data, '\n'), 0o644); err != nil {
					return err
				}
			}
		}
	}
	if err := publishScale(rep, *readme, *section, *chart, stdout); err != nil {
		return err
	}
	for _, r := range rep.Rows {
		if !r.Checked && !strings.HasPrefix(r.Stop, "killed") {
			return fmt.Errorf("n %d, %s windows: the engine's plan disagrees with the independent evaluator", r.N, r.Tightness)
		}
	}
	return nil
}

func parseCase(s string) (int, gen.Tightness, error) {
	a, b, ok := strings.Cut(s, ":")
	if !ok {
		return 0, 0, fmt.Errorf("%q: want N:TIGHTNESS, e.g. 1000:tight", s)
	}
	n, err := strconv.Atoi(a)
	if err != nil || n < 2 {
		return 0, 0, fmt.Errorf("%q: node count %q is not a whole number of 2 or more", s, a)
	}
	lvl, err := gen.ParseTightness(b)
	return n, lvl, err
}

func parseSizes(s string) ([]int, error) {
	var out []int
	for _, part := range strings.Split(s, ",") {
		n, err := strconv.Atoi(strings.TrimSpace(part))
		if err != nil || n < 2 || n > gen.MaxSites {
			return nil, fmt.Errorf("%q: want whole numbers from 2 to %d", part, gen.MaxSites)
		}
		out = append(out, n)
	}
	return out, nil
}

// scaleChild runs one case in a fresh process of this program.
func scaleChild(self string, pre []string, n int, lvl gen.Tightness, seed int64, budget time.Duration, iters, workers int, cpuBudget bool, stderr io.Writer) (scaleRow, error) {
	cmd := exec.Command(self, append(append([]string(nil), pre...), "scale", "--case", fmt.Sprintf("%d:%s", n, lvl), "--seed", strconv.FormatInt(seed, 10),
		"--budget", budget.String(), "--iterations", strconv.Itoa(iters), "--workers", strconv.Itoa(workers), "--cpu-budget="+strconv.FormatBool(cpuBudget))...)
	var out bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, stderr
	// A case that overruns its budget this far is stopped and reported as
	// such rather than holding up the rest.
	limit := 20*budget + time.Minute
	if budget <= 0 {
		limit = 30 * time.Minute
	}
	if err := cmd.Start(); err != nil {
		return scaleRow{}, fmt.Errorf("case process: %w", err)
	}
	timer := time.AfterFunc(limit, func() { cmd.Process.Kill() })
	err := cmd.Wait()
	killed := !timer.Stop()
	if killed {
		return scaleRow{N: n, Tightness: lvl.String(), Seed: seed, Budget: budget.Seconds(), FirstFeasibleSeconds: -1, FirstFeasibleCPU: -1,
			CPUSeconds: -1, PeakRSSMB: childPeakMB(cmd.ProcessState), Seconds: limit.Seconds(), Fresh: true, CPUBudget: cpuBudget,
			Stop: fmt.Sprintf("killed after %s", limit)}, nil
	}
	if err != nil {
		return scaleRow{}, fmt.Errorf("case process: %w", err)
	}
	var row scaleRow
	if err := json.Unmarshal(bytes.TrimSpace(out.Bytes()), &row); err != nil {
		return scaleRow{}, fmt.Errorf("case process printed no row: %w", err)
	}
	row.Fresh = true
	// The child's resident high-water as the system saw it (for a js/wasm
	// case, the whole runner process); its CPU time where the child could
	// not measure its own.
	if mb := childPeakMB(cmd.ProcessState); mb > 0 {
		row.PeakRSSMB = mb
	}
	if row.CPUSeconds < 0 {
		row.CPUSeconds = (cmd.ProcessState.UserTime() + cmd.ProcessState.SystemTime()).Seconds()
		row.CPUWholeProcess = true
	}
	return row, nil
}

// scaleCase generates one instance and solves it in this process.
func scaleCase(n int, lvl gen.Tightness, seed int64, budget time.Duration, iters, workers int, cpuBudget bool) (scaleRow, error) {
	t0 := time.Now()
	g, err := gen.Generate(gen.Options{N: n, Tightness: lvl, Seed: seed})
	if err != nil {
		return scaleRow{}, err
	}
	in := g.Instance
	row := scaleRow{N: n, Tightness: lvl.String(), Seed: seed, Platform: runtime.GOOS + "/" + runtime.GOARCH,
		Budget: budget.Seconds(), GenSeconds: time.Since(t0).Seconds(), FirstFeasibleSeconds: -1, FirstFeasibleCPU: -1, CPUSeconds: -1, CPUBudget: cpuBudget,
		ReferenceCost: solver.Evaluate(in, g.Reference).Travel}
	cpu0 := processCPU()
	var called time.Time
	var peak uint64
	var ms runtime.MemStats
	sample := func() {
		runtime.ReadMemStats(&ms)
		if ms.Sys > peak {
			peak = ms.Sys
		}
	}
	s := solver.Settings{Budget: budget, Iterations: iters, Seed: seed, Workers: workers, ProgressEvery: 100 * time.Millisecond,
		OnImprove: func(p solver.Plan) {
			if p.Feasible && row.FirstFeasibleSeconds < 0 {
				if cpu0 >= 0 {
					row.FirstFeasibleCPU = processCPU() - cpu0
				}
				// From the call, preprocessing included (Plan.Elapsed
				// starts after it).
				row.FirstFeasibleSeconds = time.Since(called).Seconds()
				row.FirstFeasibleIteration = p.Iteration
				row.FirstFeasibleCost = p.Cost
			}
		},
		OnProgress: func(solver.Progress) { sample() }}
	sample()
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	if cpuBudget && budget > 0 {
		if cpu0 < 0 {
			return row, errors.New("--cpu-budget: this system does not report CPU time")
		}
		s.Budget = 20 * budget // a backstop
		cpuLimit(ctx, cancel, &s, cpu0+budget.Seconds())
	}
	called = time.Now()
	res, err := solver.Solve(ctx, in, s)
	if err != nil {
		return row, err
	}
	wall := time.Since(called)
	if cpu0 >= 0 {
		row.CPUSeconds = processCPU() - cpu0
	}
	sample()
	chk := solver.Evaluate(in, res.Best.Route)
	row.Checked = solver.CheckRoute(in, res.Best.Route) == nil && chk.Feasible == res.Best.Feasible && chk.Travel == res.Best.Cost
	row.Feasible = chk.Feasible && row.Checked
	row.FinalCost = chk.Travel
	if row.FirstFeasibleCost > 0 {
		row.ImprovementPct = 100 * float64(row.FirstFeasibleCost-row.FinalCost) / float64(row.FirstFeasibleCost)
	}
	row.Iterations = res.Iterations
	row.Seconds = wall.Seconds()
	row.Stop = res.Stop.String()
	if row.Seconds > 0 {
		row.ItersPerSecond = float64(res.Iterations) / row.Seconds
	}
	// Too few iterations after the first feasible plan say nothing of the
	// cost of one.
	if row.FirstFeasibleSeconds >= 0 && res.Iterations >= row.FirstFeasibleIteration+10 {
		// CPU time where known: it does not grow with the load of a shared
		// machine.
		if row.CPUSeconds >= 0 && row.FirstFeasibleCPU >= 0 {
			row.SecondsPerIteration = (row.CPUSeconds - row.FirstFeasibleCPU) / float64(res.Iterations-row.FirstFeasibleIteration)
		} else {
			row.SecondsPerIteration = (row.Seconds - row.FirstFeasibleSeconds) / float64(res.Iterations-row.FirstFeasibleIteration)
		}
	}
	row.PeakSysMB = float64(peak) / (1 << 20)
	row.PeakRSSMB = vmHWM()
	return row, nil
}

// vmHWM reads the resident high-water of this process in MiB, or -1.
func vmHWM() float64 {
	fh, err := os.Open("/proc/self/status")
	if err != nil {
		return -1
	}
	defer fh.Close()
	sc := bufio.NewScanner(fh)
	for sc.Scan() {
		if v, ok := strings.CutPrefix(sc.Text(), "VmHWM:"); ok {
			f := strings.Fields(v)
			if len(f) >= 1 {
				kb, err := strconv.ParseFloat(f[0], 64)
				if err == nil {
					return kb / 1024
				}
			}
		}
	}
	return -1
}

const scaleHeader = "    n  windows  first feasible s  cost at first  cost at end  improv %  iterations/s  ms/iteration  peak MB  check"

func scaleLine(r scaleRow) string {
	ff := "none"
	if r.FirstFeasibleSeconds >= 0 {
		ff = fmt.Sprintf("%.3f", r.FirstFeasibleSeconds)
	}
	return fmt.Sprintf("%5d  %-7s  %16s  %13d  %11d  %8.2f  %12.0f  %12.3f  %7.0f  %s", r.N, r.Tightness, ff, r.FirstFeasibleCost, r.FinalCost,
		r.ImprovementPct, r.ItersPerSecond, 1000*r.SecondsPerIteration, peakMB(r), checkWord(r))
}

func checkWord(r scaleRow) string {
	switch {
	case strings.HasPrefix(r.Stop, "killed"):
		return r.Stop
	case !r.Checked:
		return "MISMATCH"
	case !r.Feasible:
		return "infeasible"
	}
	return "ok"
}

// peakMB is the resident high-water where known, else the runtime's.
func peakMB(r scaleRow) float64 {
	if r.PeakRSSMB > 0 {
		return r.PeakRSSMB
	}
	return r.PeakSysMB
}

// slope fits log(seconds per iteration) = a + b·log(n) by least squares
// and returns b, with the number of points used.
func slope(rows []scaleRow) (float64, int) {
	var xs, ys []float64
	for _, r := range rows {
		if r.SecondsPerIteration > 0 {
			xs = append(xs, math.Log(float64(r.N)))
			ys = append(ys, math.Log(r.SecondsPerIteration))
		}
	}
	if len(xs) < 2 {
		return math.NaN(), len(xs)
	}
	var mx, my float64
	for i := range xs {
		mx += xs[i]
		my += ys[i]
	}
	mx /= float64(len(xs))
	my /= float64(len(xs))
	var sxy, sxx float64
	for i := range xs {
		sxy += (xs[i] - mx) * (ys[i] - my)
		sxx += (xs[i] - mx) * (xs[i] - mx)
	}
	if sxx == 0 {
		return math.NaN(), len(xs)
	}
	return sxy / sxx, len(xs)
}

func scaleTable(rep scaleReport) string {
	var b strings.Builder
	plat := ""
	if len(rep.Rows) > 0 {
		plat = rep.Rows[0].Platform
	}
	fmt.Fprintf(&b, "`%s` (%s): %s.\n\n", rep.Command, plat, rep.Machine)
	clock := "wall-clock"
	if len(rep.Rows) > 0 && rep.Rows[0].CPUBudget {
		clock = "CPU time"
	}
	fmt.Fprintf(&b, "Budgets in %s; \"CPU\" columns are process CPU seconds (\"-\" where the platform does not report them), the others wall-clock.\n\n", clock)
	b.WriteString("| sites | windows | budget | first feasible (s) | first feasible (CPU s) | reference route | cost at first feasible | cost at end | improvement % | iterations/s | ms per iteration (CPU where known) | CPU share | peak memory MB | checked |\n")
	b.WriteString("|---|---|---|---|---|---|---|---|---|---|---|---|---|---|\n")
	for _, r := range rep.Rows {
		ff := "none"
		if r.FirstFeasibleSeconds >= 0 {
			ff = fmt.Sprintf("%.3f", r.FirstFeasibleSeconds)
		}
		mem := fmt.Sprintf("%.0f", peakMB(r))
		if r.PeakRSSMB <= 0 {
			mem += " (runtime)"
		}
		per := "-"
		if r.SecondsPerIteration > 0 {
			per = fmt.Sprintf("%.3f", 1000*r.SecondsPerIteration)
		}
		ffc, share := "-", "-"
		if r.FirstFeasibleCPU >= 0 {
			ffc = fmt.Sprintf("%.3f", r.FirstFeasibleCPU)
		}
		if r.CPUSeconds >= 0 && r.Seconds > 0 {
			share = fmt.Sprintf("%.0f%%", 100*r.CPUSeconds/r.Seconds)
			if r.CPUWholeProcess {
				share += " (process)"
			}
		}
		fmt.Fprintf(&b, "| %d | %s | %gs | %s | %s | %d | %d | %d | %.2f | %.0f | %s | %s | %s | %s |\n", r.N, r.Tightness, r.Budget, ff, ffc, r.ReferenceCost, r.FirstFeasibleCost, r.FinalCost,
			r.ImprovementPct, r.ItersPerSecond, per, share, mem, checkWord(r))
	}
	// Growth of the cost of one iteration with n, per tightness and over all.
	by := map[string][]scaleRow{}
	var order []string
	for _, r := range rep.Rows {
		if _, ok := by[r.Tightness]; !ok {
			order = append(order, r.Tightness)
		}
		by[r.Tightness] = append(by[r.Tightness], r)
	}
	sort.SliceStable(order, func(i, j int) bool { return tightRank(order[i]) < tightRank(order[j]) })
	b.WriteString("\nReference route: the nearest-neighbour tour the windows were laid around (a feasible plan known beforehand; travel in minutes). Improvement: from the first feasible plan to the end of the run. ")
	b.WriteString("Rows with fewer than 10 iterations after the first feasible plan show no time per iteration and are left out of the fit. ")
	b.WriteString("Time per iteration against n, least-squares slope of log(time per iteration) on log(n) (1 = linear, 2 = quadratic):")
	for _, t := range order {
		if k, m := slope(by[t]); m >= 2 {
			fmt.Fprintf(&b, " %s %.2f;", t, k)
		}
	}
	if k, m := slope(rep.Rows); m >= 2 {
		fmt.Fprintf(&b, " all %.2f.", k)
	} else {
		b.WriteString(" not enough rows to fit.")
	}
	b.WriteString("\n")
	return b.String()
}

func tightRank(s string) int {
	l, err := gen.ParseTightness(s)
	if err != nil {
		return 99
	}
	return int(l)
}

func publishScale(rep scaleReport, readme, section, chart string, stdout io.Writer) error {
	if chart != "" {
		if err := os.WriteFile(chart, []byte(drawScaleChart(rep.Rows)), 0o644); err != nil {
			return err
		}
	}
	table := scaleTable(rep)
	fmt.Fprint(stdout, "\n"+table)
	if readme != "" {
		return replaceBetween(readme, "<!-- "+section+":start -->", "<!-- "+section+":end -->", table)
	}
	return nil
}
