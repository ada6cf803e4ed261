package lab

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"sort"
	"strings"
	"time"
)

// budgetFor holds --budget-for FAMILY=DURATION entries.
type budgetFor map[string]time.Duration

func (b budgetFor) String() string {
	keys := make([]string, 0, len(b))
	for k := range b {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	parts := make([]string, len(keys))
	for i, k := range keys {
		parts[i] = k + "=" + b[k].String()
	}
	return strings.Join(parts, ",")
}

func (b budgetFor) Set(v string) error {
	for _, part := range strings.Split(v, ",") {
		fam, d, ok := strings.Cut(strings.TrimSpace(part), "=")
		if !ok || strings.TrimSpace(fam) == "" {
			return fmt.Errorf("%q: want FAMILY=DURATION, e.g. OhlmannThomas=30s", part)
		}
		dur, err := time.ParseDuration(strings.TrimSpace(d))
		if err != nil || dur <= 0 {
			return fmt.Errorf("%q: duration %q is not a positive time such as 10s or 1m", part, d)
		}
		b[strings.TrimSpace(fam)] = dur
	}
	return nil
}

// of is the budget of family fam, def when it has none of its own.
func (b budgetFor) of(fam string, def time.Duration) time.Duration {
	if d, ok := b[fam]; ok {
		return d
	}
	return def
}

// atBestKnown says whether a found value counts as the best-known one.
// Published values of the real-valued families are rounded to two decimals
// (shared/benchmarks/tsptw/README.md): a tolerance of 0.01, or 0.05 %
// relative where the input has decimals.
func atBestKnown(found, known float64, scale int64) bool {
	if found <= known+0.01+1e-9 {
		return true
	}
	return scale > 1 && known > 0 && 100*(found-known)/known <= 0.05
}

// timeToValue is the first time in trace (seconds, cost) at which the cost
// counts as the best-known value, or -1.
func timeToValue(trace [][2]float64, known float64, scale int64) float64 {
	for _, p := range trace {
		if atBestKnown(p[1], known, scale) {
			return p[0]
		}
	}
	return -1
}

// median of xs, -1 when empty (JSON has no NaN).
func median(xs []float64) float64 {
	if len(xs) == 0 {
		return -1
	}
	s := append([]float64(nil), xs...)
	sort.Float64s(s)
	m := len(s) / 2
	if len(s)%2 == 1 {
		return s[m]
	}
	return (s[m-1] + s[m]) / 2
}

func benchCommand(args []string) string {
	return "visitline-lab bench " + strings.Join(args, " ")
}

// benchReport is what bench writes as JSON and renders into docs/results.md.
type benchReport struct {
	// CPUBudget: the budgets were CPU time, not wall-clock time.
	CPUBudget  bool            `json:"cpu_budget,omitempty"`
	Budget     string          `json:"budget"`
	PerFamily  string          `json:"budget_per_family,omitempty"`
	Iterations int             `json:"iterations,omitempty"`
	Workers    int             `json:"workers"`
	Machine    string          `json:"machine"`
	Command    string          `json:"command"`
	Families   []familySummary `json:"families"`
	Runs       []benchRow      `json:"runs"`
}

func (r *benchReport) write(path string) error {
	data, err := json.MarshalIndent(r, "", " ")
	if err != nil {
		return err
	}
	tmp := path + ".tmp"
	if err := os.WriteFile(tmp, append(data, '\n'), 0o644); err != nil {
		return err
	}
	return os.Rename(tmp, path)
}

func (r *benchReport) table() string {
	var b strings.Builder
	threads := "one thread"
	if r.Workers > 1 {
		threads = fmt.Sprintf("%d workers", r.Workers)
	}
	lim := ""
	if r.Iterations > 0 {
		lim = fmt.Sprintf(", at most %d iterations", r.Iterations)
	}
	clock := "wall-clock budgets"
	if r.CPUBudget {
		clock = "budgets in CPU time"
	}
	fmt.Fprintf(&b, "`%s`: %s per run%s, %s; %s.\n\n", r.Command, threads, lim, clock, r.Machine)
	b.WriteString("| family | budget | runs | feasible | at best-known | mean gap % | max gap % | median s to best-known | median CPU s to best-known | iterations/s | CPU share |\n")
	b.WriteString("|---|---|---|---|---|---|---|---|---|---|---|\n")
	for _, s := range r.Families {
		med := "-"
		if s.MedianToBestKnown >= 0 {
			med = fmt.Sprintf("%.3f", s.MedianToBestKnown)
		}
		cmed := "-"
		if s.MedianCPUToBestKnown >= 0 {
			cmed = fmt.Sprintf("%.3f", s.MedianCPUToBestKnown)
		}
		share := "-"
		if s.CPUShare > 0 {
			share = fmt.Sprintf("%.0f%%", 100*s.CPUShare)
		}
		fmt.Fprintf(&b, "| %s | %s | %d | %d | %d of %d (%.0f%%) | %.3f | %.3f | %s | %s | %.0f | %s |\n", s.Family, s.Budget, s.Runs, s.Feasible, s.AtBest, s.WithBestKnown,
			100*float64(s.AtBest)/math.Max(1, float64(s.WithBestKnown)), s.MeanGapPct, s.MaxGapPct, med, cmed, s.MeanIterRate, share)
	}
	if r.CPUBudget {
		b.WriteString("\nCPU share: the CPU time the runs had over their wall-clock time; each run stopped at its budget of CPU time, so a low share made it take longer, not search less. Iterations/s are per wall-clock second.\n")
	} else {
		b.WriteString("\nCPU share: the CPU time the runs had over their wall-clock time (the budgets are wall-clock: below 100% the machine was shared and the runs searched for less CPU time than their budget says). Iterations/s are per wall-clock second.\n")
	}
	return b.String()
}

// publish rewrites the results table and draws the chart, where asked.
func (r *benchReport) publish(readme, chart string) error {
	if chart != "" {
		if err := os.WriteFile(chart, []byte(drawChart(r.Runs)), 0o644); err != nil {
			return err
		}
	}
	if readme != "" {
		if err := replaceBetween(readme, "<!-- bench:start -->", "<!-- bench:end -->", r.table()); err != nil {
			return err
		}
	}
	return nil
}

func benchFromJSON(path, readme, chart string, stdout io.Writer) error {
	data, err := os.ReadFile(path)
	if err != nil {
		return fmt.Errorf("%s: cannot open: %w", path, unwrapPath(err))
	}
	var r benchReport
	if err := json.Unmarshal(data, &r); err != nil {
		return fmt.Errorf("%s: not a bench result file: %w", path, err)
	}
	if len(r.Runs) == 0 {
		return fmt.Errorf("%s: holds no runs", path)
	}
	// Summaries are worked out again from the runs, so that a file written
	// by a run that was stopped halfway renders like a finished one.
	r.Families = summarise(r.Runs)
	fmt.Fprint(stdout, r.table())
	return r.publish(readme, chart)
}

// speedupMinCPU is the one-worker CPU time to best-known (seconds) above
// which an instance counts for the speed-up target.
const speedupMinCPU = 1.0

// speedupFromJSON compares the time to the best-known value, instance by
// instance (median over the seeds), of two bench runs: base (one worker)
// and with (several). A run that never reached the best-known value counts
// as its whole budget, and its row says so.
func speedupFromJSON(basePath, withPath, readme string, stdout io.Writer) error {
	load := func(path string) (*benchReport, error) {
		data, err := os.ReadFile(path)
		if err != nil {
			return nil, fmt.Errorf("%s: cannot open: %w", path, unwrapPath(err))
		}
		var r benchReport
		if err := json.Unmarshal(data, &r); err != nil {
			return nil, fmt.Errorf("%s: not a bench result file: %w", path, err)
		}
		return &r, nil
	}
	base, err := load(basePath)
	if err != nil {
		return err
	}
	with, err := load(withPath)
	if err != nil {
		return err
	}
	type agg struct {
		wall, cpu []float64
		missed    int
		workers   int
	}
	group := func(r *benchReport) (map[string]*agg, []string) {
		m := map[string]*agg{}
		var order []string
		for _, row := range r.Runs {
			if !row.HasBest {
				continue
			}
			k := row.Family + "/" + row.Instance
			a, ok := m[k]
			if !ok {
				a = &agg{workers: max(1, row.Workers)}
				m[k] = a
				order = append(order, k)
			}
			w, c := row.SecondsToBestKnown, row.CPUToBestKnown
			if w < 0 {
				a.missed++
				w, c = row.Seconds, row.CPUSeconds
			}
			a.wall = append(a.wall, w)
			a.cpu = append(a.cpu, c)
		}
		return m, order
	}
	bm, order := group(base)
	wm, _ := group(with)
	var b strings.Builder
	fmt.Fprintf(&b, "Baseline `%s`; compared `%s`; %s.\n\n", base.Command, with.Command, with.Machine)
	b.WriteString("| instance | seeds | workers | median s to best-known, base / with | speed-up (wall) | median CPU s to best-known, base / with | CPU-based speed-up | missed (base / with) |\n")
	b.WriteString("|---|---|---|---|---|---|---|---|\n")
	var walls, cpus, qWalls, qCPUs []float64
	for _, k := range order {
		a, c := bm[k], wm[k]
		if c == nil {
			continue
		}
		mb, mw := median(a.wall), median(c.wall)
		sw := mb / mw
		// Had each worker a core of its own, the wall-clock time with k
		// workers would be their CPU time over k: this estimate does not
		// depend on how busy the shared machine was.
		cb, cw := median(a.cpu), median(c.cpu)
		sc := math.NaN()
		if cb > 0 && cw > 0 {
			sc = cb / (cw / float64(c.workers))
		}
		walls = append(walls, sw)
		if !math.IsNaN(sc) {
			cpus = append(cpus, sc)
		}
		// The target is about instances that take one worker over a second.
		if cb > speedupMinCPU {
			qWalls = append(qWalls, sw)
			if !math.IsNaN(sc) {
				qCPUs = append(qCPUs, sc)
			}
		}
		fmt.Fprintf(&b, "| %s | %d | %d | %.2f / %.2f | %.2f | %.2f / %.2f | %.2f | %d / %d |\n", k, len(c.wall), c.workers, mb, mw, sw, cb, cw, sc, a.missed, c.missed)
	}
	if len(walls) > 0 {
		fmt.Fprintf(&b, "\nMedian speed-up over all %d instances: %.2f wall-clock, %.2f CPU-based. ", len(walls), median(walls), median(cpus))
		if len(qWalls) > 0 {
			fmt.Fprintf(&b, "Over the %d that take one worker more than %.0f s of CPU: %.2f wall-clock, %.2f CPU-based (target at least 1.6).\n", len(qWalls), speedupMinCPU, median(qWalls), median(qCPUs))
		} else {
			fmt.Fprintf(&b, "None takes one worker more than %.0f s of CPU.\n", speedupMinCPU)
		}
		b.WriteString("\nCPU-based speed-up: the one-worker CPU time over the two-worker CPU time divided by two, i.e. what the wall-clock ratio would be with a core per worker and nothing else running.\n")
	}
	fmt.Fprint(stdout, b.String())
	if readme != "" {
		return replaceBetween(readme, "<!-- workers:start -->", "<!-- workers:end -->", b.String())
	}
	return nil
}
