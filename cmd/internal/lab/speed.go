package lab

import (
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"slices"
	"strconv"
	"strings"
)

// Every run uses seed 1 (bench's first seed).

// speedRow compares one instance solved natively and in WebAssembly with
// the same seed and iteration budget, so that both do the same work.
type speedRow struct {
	File       string  `json:"file"`
	Nodes      int     `json:"nodes"`
	Iterations int     `json:"iterations"`
	Repeats    int     `json:"repeats"`
	NativeSec  float64 `json:"native_seconds"`
	WasmSec    float64 `json:"wasm_seconds"`
	NativeCPU  float64 `json:"native_cpu_seconds_second_half"`
	WasmCPU    float64 `json:"wasm_cpu_seconds_second_half"`
	NativeCost float64 `json:"native_cost"`
	WasmCost   float64 `json:"wasm_cost"`
	// Ratio is the WebAssembly iteration rate over the native one (wall
	// clock inside the run, median of the repeats): 1 is as fast.
	Ratio float64 `json:"rate_ratio"`
	// CPURatio is the native CPU time of iterations N+1..2N over the
	// WebAssembly one: the rate ratio measured in CPU time.
	CPURatio float64 `json:"cpu_ratio"`
	// CPURatioBest is the same from the least CPU time of each side over
	// the repeats: on a shared machine other work only adds CPU time to a
	// run (caches and cores shared), so the least is the steadiest figure.
	CPURatioBest float64 `json:"cpu_ratio_best"`
	// NativeCPUs and WasmCPUs are the CPU times of every repeat.
	NativeCPUs []float64 `json:"native_cpu_repeats,omitempty"`
	WasmCPUs   []float64 `json:"wasm_cpu_repeats,omitempty"`
	SameCost   bool      `json:"same_cost"`
}

type speedReport struct {
	Command string     `json:"command"`
	Machine string     `json:"machine"`
	Runner  string     `json:"runner"`
	Rows    []speedRow `json:"rows"`
}

func runSpeed(args []string, stdout, stderr io.Writer) error {
	fs := flag.NewFlagSet("wasm-speed", flag.ContinueOnError)
	fs.SetOutput(stderr)
	wasm := fs.String("wasm", "bin/visitline-lab.wasm", "this program built with GOOS=js GOARCH=wasm")
	runner := fs.String("runner", defaultWasmRunner(), "command that runs a js/wasm program (its arguments follow)")
	iters := fs.Int("iterations", 1000, "N: each side runs N and 2N iterations")
	repeats := fs.Int("repeats", 3, "runs of each side per instance (alternating; the median counts)")
	jsonOut := fs.String("json", "", "write the rows as JSON to this file")
	readme := fs.String("readme", "", "rewrite this Markdown file (docs/results.md) between its wasm-speed markers")
	from := fs.String("from", "", "render the rows of an earlier --json file instead of running")
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return nil
		}
		return usageError{err.Error()}
	}
	rep := speedReport{Command: "visitline-lab wasm-speed " + strings.Join(args, " "), Machine: machine(), Runner: *runner}
	if *from != "" {
		data, err := os.ReadFile(*from)
		if err != nil {
			return fmt.Errorf("%s: cannot open: %w", *from, unwrapPath(err))
		}
		if err := json.Unmarshal(data, &rep); err != nil {
			return fmt.Errorf("%s: not a wasm-speed result file: %w", *from, err)
		}
		return publishSpeed(rep, *readme, stdout)
	}
	if fs.NArg() == 0 {
		return usageError{"want instance files (see visitline-lab wasm-speed -h)"}
	}
	if *iters < 1 || *repeats < 1 {
		return usageError{"--iterations and --repeats must be 1 or more"}
	}
	if _, err := os.Stat(*wasm); err != nil {
		return fmt.Errorf("%s: %w (build it with GOOS=js GOARCH=wasm go build -o %s ./cmd/visitline-lab)", *wasm, unwrapPath(err), *wasm)
	}
	self, err := os.Executable()
	if err != nil {
		return err
	}
	run := strings.Fields(*runner)
	if len(run) == 0 {
		return usageError{"--runner is empty"}
	}
	tmp, err := os.MkdirTemp("", "visitline-speed-")
	if err != nil {
		return err
	}
	defer os.RemoveAll(tmp)
	fmt.Fprintf(stdout, "%-44s %5s %10s %10s %7s %7s %s\n", "instance", "nodes", "native s", "wasm s", "ratio", "CPU", "same plan")
	for _, file := range fs.Args() {
		abs, err := filepath.Abs(file)
		if err != nil {
			return err
		}
		row := speedRow{File: file, Iterations: *iters, Repeats: *repeats}
		var nSec, wSec, nCPU, wCPU []float64
		// Each side runs N and 2N iterations: the difference of their
		// process CPU times is the CPU of iterations N+1..2N alone, free of
		// start-up, reading the file and compiling the module, and of how
		// busy the machine is.
		side := func(prog string, pre []string, tag string, k int) (sec, dcpu, cost float64, nodes int, err error) {
			var cpus [2]float64
			for h, it := range []int{*iters, 2 * *iters} {
				out := filepath.Join(tmp, fmt.Sprintf("%s%d-%d.json", tag, k, h))
				benchArgs := []string{"bench", "--budget", "0", "--iterations", strconv.Itoa(it), "--seeds", "1", "--quiet", "--json", out, abs}
				r, cpu, err := speedChild(prog, pre, benchArgs, out, stderr)
				if err != nil {
					return 0, 0, 0, 0, err
				}
				// The difference of N and 2N only measures iterations when
				// both runs use their whole budget (a search that proves its
				// plan optimal stops early).
				if r.Iterations < it {
					return 0, 0, 0, 0, fmt.Errorf("the run stopped after %d of %d iterations; the comparison needs runs that use their whole budget (pick an instance that is not solved to optimality this quickly)", r.Iterations, it)
				}
				cpus[h] = cpu
				if h == 1 {
					sec, cost, nodes = r.Seconds, r.Found, r.Nodes
				}
			}
			return sec, cpus[1] - cpus[0], cost, nodes, nil
		}
		for k := 0; k < *repeats; k++ {
			sec, cpu, cost, nodes, err := side(self, nil, "n", k)
			if err != nil {
				return fmt.Errorf("%s native: %w", file, err)
			}
			nSec, nCPU, row.NativeCost, row.Nodes = append(nSec, sec), append(nCPU, cpu), cost, nodes
			sec, cpu, cost, _, err = side(run[0], append(run[1:len(run):len(run)], *wasm), "w", k)
			if err != nil {
				return fmt.Errorf("%s wasm: %w", file, err)
			}
			wSec, wCPU, row.WasmCost = append(wSec, sec), append(wCPU, cpu), cost
		}
		row.NativeSec, row.WasmSec = median(nSec), median(wSec)
		row.NativeCPU, row.WasmCPU = median(nCPU), median(wCPU)
		if row.WasmSec > 0 {
			row.Ratio = row.NativeSec / row.WasmSec
		}
		if row.WasmCPU > 0 {
			row.CPURatio = row.NativeCPU / row.WasmCPU
		}
		row.NativeCPUs, row.WasmCPUs = nCPU, wCPU
		if w := slices.Min(wCPU); w > 0 {
			row.CPURatioBest = slices.Min(nCPU) / w
		}
		row.SameCost = row.NativeCost == row.WasmCost
		rep.Rows = append(rep.Rows, row)
		fmt.Fprintf(stdout, "%-44s %5d %10.3f %10.3f %7.2f %7.2f %v\n", file, row.Nodes, row.NativeSec, row.WasmSec, row.Ratio, row.CPURatio, row.SameCost)
		if *jsonOut != "" {
			data, _ := json.MarshalIndent(rep, "", " ")
			if err := os.WriteFile(*jsonOut, append(data, '\n'), 0o644); err != nil {
				return err
			}
		}
	}
	return publishSpeed(rep, *readme, stdout)
}

// speedChild runs prog (with pre before args) and reads the single run of
// the bench JSON it wrote; cpu is the child's user and system time.
func speedChild(prog string, pre, args []string, out string, stderr io.Writer) (benchRow, float64, error) {
	cmd := exec.Command(prog, append(append([]string(nil), pre...), args...)...)
	cmd.Stdout, cmd.Stderr = io.Discard, stderr
	if err := cmd.Run(); err != nil {
		return benchRow{}, 0, err
	}
	cpu := (cmd.ProcessState.UserTime() + cmd.ProcessState.SystemTime()).Seconds()
	data, err := os.ReadFile(out)
	if err != nil {
		return benchRow{}, 0, err
	}
	var rep benchReport
	if err := json.Unmarshal(data, &rep); err != nil || len(rep.Runs) != 1 {
		return benchRow{}, 0, fmt.Errorf("%s: want one run in the bench output", out)
	}
	if !rep.Runs[0].Checked {
		return benchRow{}, 0, fmt.Errorf("the plan disagrees with the independent evaluator")
	}
	return rep.Runs[0], cpu, nil
}

func defaultWasmRunner() string {
	root := runtime.GOROOT()
	if out, err := exec.Command("go", "env", "GOROOT").Output(); err == nil && len(strings.TrimSpace(string(out))) > 0 {
		root = strings.TrimSpace(string(out))
	}
	return "node " + filepath.Join(root, "lib", "wasm", "wasm_exec_node.js")
}

func publishSpeed(rep speedReport, readme string, stdout io.Writer) error {
	var b strings.Builder
	fmt.Fprintf(&b, "`%s`: runner `%s`; %s. Same seed and iteration budgets on both sides, so both do the same work. Each side runs N and 2N iterations; \"s\" is the wall-clock time of the 2N run inside the run (start-up and reading the file left out), \"CPU\" the process CPU time of the 2N run less that of the N run (iterations N+1..2N alone, whatever the load on the machine); medians of the repeats, and the CPU ratio also from the least CPU time of each side over the repeats (\"best\": on a shared machine other work only adds CPU time to a run).\n\n",
		rep.Command, filepath.Base(strings.Fields(rep.Runner + " x")[0]), rep.Machine)
	b.WriteString("| instance | nodes | N | native s | wasm s | rate ratio (wall) | native CPU s | wasm CPU s | rate ratio (CPU) | rate ratio (CPU, best) | same plan |\n")
	b.WriteString("|---|---|---|---|---|---|---|---|---|---|---|\n")
	var ratios, cpuRatios, bestRatios []float64
	for _, r := range rep.Rows {
		best := "-" // a result file from before the best of the repeats was kept
		if r.CPURatioBest > 0 {
			best = fmt.Sprintf("%.2f", r.CPURatioBest)
			bestRatios = append(bestRatios, r.CPURatioBest)
		}
		fmt.Fprintf(&b, "| %s | %d | %d | %.3f | %.3f | %.2f | %.3f | %.3f | %.2f | %s | %s |\n", strings.TrimPrefix(r.File, "../shared/benchmarks/tsptw/"), r.Nodes, r.Iterations,
			r.NativeSec, r.WasmSec, r.Ratio, r.NativeCPU, r.WasmCPU, r.CPURatio, best, yesNo(r.SameCost))
		ratios = append(ratios, r.Ratio)
		cpuRatios = append(cpuRatios, r.CPURatio)
	}
	if len(ratios) > 0 {
		fmt.Fprintf(&b, "\nMedian wasm rate / native rate: %.2f by CPU time", median(cpuRatios))
		if len(bestRatios) > 0 {
			fmt.Fprintf(&b, " (%.2f from the best of the repeats)", median(bestRatios))
		}
		fmt.Fprintf(&b, ", %.2f by wall clock (target at least 0.6, and 0.5 at 1,000 sites).\n", median(ratios))
	}
	fmt.Fprint(stdout, "\n"+b.String())
	if readme != "" {
		return replaceBetween(readme, "<!-- wasm-speed:start -->", "<!-- wasm-speed:end -->", b.String())
	}
	return nil
}

func yesNo(b bool) string {
	if b {
		return "yes"
	}
	return "no"
}
