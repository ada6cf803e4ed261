package lab

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"time"

	"visitline/solver/fleet"
	"visitline/solver/format"
)

// fleetBenchRow is one run of the engine on a Solomon-format instance.
type fleetBenchRow struct {
	Group       string  `json:"group"`
	Instance    string  `json:"instance"`
	Seed        int64   `json:"seed"`
	Customers   int     `json:"customers"`
	Served      int     `json:"served"`
	Vehicles    int     `json:"vehicles"`
	Distance    float64 `json:"distance"`
	BKVehicles  int     `json:"best_known_vehicles"`
	BKDistance  float64 `json:"best_known_distance"`
	HasBK       bool    `json:"has_best_known"`
	GapPct      float64 `json:"distance_gap_pct"`
	Checked     bool    `json:"checked"`
	Seconds     float64 `json:"seconds"`
	CPUSeconds  float64 `json:"cpu_seconds"`
	Iterations  int     `json:"iterations"`
	SecondsBest float64 `json:"seconds_to_best"`
}

type fleetBenchKnown struct {
	vehicles int
	distance float64
}

// isFleetBench says whether the files are in Solomon's format (by content
// of the first).
func isFleetBench(files []string) bool {
	if len(files) == 0 {
		return false
	}
	fh, err := os.Open(files[0])
	if err != nil {
		return false
	}
	defer fh.Close()
	head := make([]byte, 4096)
	n, _ := io.ReadFull(fh, head)
	return format.IsSolomon(string(head[:n]))
}

// readFleetBestKnown reads instance,customers,vehicles,distance[,found].
func readFleetBestKnown(path string) (map[string]fleetBenchKnown, error) {
	fh, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("%s: cannot open: %w", path, unwrapPath(err))
	}
	defer fh.Close()
	r := csv.NewReader(fh)
	r.FieldsPerRecord = -1
	recs, err := r.ReadAll()
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	out := map[string]fleetBenchKnown{}
	for i, rec := range recs {
		if i == 0 && len(rec) > 0 && rec[0] == "instance" {
			continue
		}
		if len(rec) < 4 {
			return nil, fmt.Errorf("%s:%d: want instance,customers,vehicles,distance", path, i+1)
		}
		v, err1 := strconv.Atoi(rec[2])
		d, err2 := strconv.ParseFloat(rec[3], 64)
		if err1 != nil || err2 != nil {
			return nil, fmt.Errorf("%s:%d: vehicles %q or distance %q is not a number", path, i+1, rec[2], rec[3])
		}
		out[strings.ToLower(rec[0])] = fleetBenchKnown{v, d}
	}
	return out, nil
}

// fleetGroup is the Solomon group of an instance name: c1, c2, r1, r2,
// rc1 or rc2 (C1_2_1 → C1).
func fleetGroup(name string) string {
	g, _, _ := strings.Cut(strings.ToLower(name), "_")
	return strings.ToUpper(g)
}

type fleetBenchOptions struct {
	budget     time.Duration
	iterations int
	seeds      int
	bounds     string
	jsonOut    string
	quiet      bool
	cpuBudget  bool
	command    string
}

// benchFleet runs the fleet engine on Solomon-format instances, vehicles
// minimised first, then distance, as the field ranks them, and prints a
// line per run and a table per group.
func benchFleet(files []string, o fleetBenchOptions, stdout io.Writer) error {
	known := map[string]fleetBenchKnown{}
	if o.bounds != "" {
		var err error
		if known, err = readFleetBestKnown(o.bounds); err != nil {
			return err
		}
	}
	if o.cpuBudget && processCPU() < 0 {
		return fmt.Errorf("--cpu-budget: this system does not report CPU time")
	}
	var rows []fleetBenchRow
	if !o.quiet {
		fmt.Fprintf(stdout, "%-6s %-12s %4s %9s %9s %11s %11s %7s %7s %s\n", "group", "instance", "seed", "vehicles", "best-known", "distance", "best-known", "gap %", "CPU s", "check")
	}
	for _, file := range files {
		data, err := os.ReadFile(file)
		if err != nil {
			return fmt.Errorf("%s: cannot open: %w", file, unwrapPath(err))
		}
		p, err := format.ReadSolomon(strings.NewReader(string(data)), file)
		if err != nil {
			return err
		}
		name := strings.TrimSuffix(filepath.Base(file), filepath.Ext(file))
		for seed := 1; seed <= o.seeds; seed++ {
			s := fleet.Settings{Budget: o.budget, Iterations: o.iterations, Seed: int64(seed), MinimizeVehicles: true}
			cpu0 := processCPU()
			if o.cpuBudget {
				// The engine's clock counts this process's CPU time, so
				// the budget and the phases follow the CPU the run had.
				base := time.Now()
				s.Now = func() time.Time { return base.Add(time.Duration((processCPU() - cpu0) * float64(time.Second))) }
			}
			t0 := time.Now()
			res, err := fleet.Solve(context.Background(), p, s)
			if err != nil {
				return fmt.Errorf("%s: %w", file, err)
			}
			row := fleetBenchRow{Group: fleetGroup(name), Instance: name, Seed: int64(seed), Customers: len(p.Visits()), Seconds: time.Since(t0).Seconds(),
				CPUSeconds: -1, Iterations: res.Iterations, SecondsBest: res.ToBest.Seconds()}
			if cpu0 >= 0 {
				row.CPUSeconds = processCPU() - cpu0
			}
			// The independent evaluator decides.
			rep, err := fleet.Evaluate(p, res.Best)
			row.Checked = err == nil && rep.Feasible && rep.Value(0) == res.Value
			row.Served = row.Customers - len(rep.Unserved)
			row.Vehicles = rep.VehiclesUsed
			row.Distance = p.InputUnits(rep.Travel)
			if bk, ok := known[strings.ToLower(name)]; ok {
				row.HasBK, row.BKVehicles, row.BKDistance = true, bk.vehicles, bk.distance
				row.GapPct = 100 * (row.Distance - bk.distance) / bk.distance
			}
			rows = append(rows, row)
			if !o.quiet {
				state := "ok"
				if !row.Checked {
					state = "MISMATCH"
				}
				if row.Served < row.Customers {
					state += fmt.Sprintf(", %d unserved", row.Customers-row.Served)
				}
				fmt.Fprintf(stdout, "%-6s %-12s %4d %9d %9d %11.4f %11.4f %7.2f %7.2f %s\n", row.Group, name, seed, row.Vehicles, row.BKVehicles, row.Distance, row.BKDistance, row.GapPct, row.CPUSeconds, state)
			}
		}
		if o.jsonOut != "" {
			if err := writeFleetBench(o, rows); err != nil {
				return err
			}
		}
	}
	fmt.Fprint(stdout, "\n"+fleetBenchTable(o, rows))
	for _, r := range rows {
		if !r.Checked {
			return fmt.Errorf("%s: the engine's plan disagrees with the independent evaluator", r.Instance)
		}
	}
	return nil
}

func writeFleetBench(o fleetBenchOptions, rows []fleetBenchRow) error {
	data, err := json.MarshalIndent(map[string]any{"command": o.command, "machine": machine(), "budget": o.budget.String(), "cpu_budget": o.cpuBudget,
		"iterations": o.iterations, "runs": rows}, "", "  ")
	if err != nil {
		return err
	}
	return os.WriteFile(o.jsonOut, append(data, '\n'), 0o644)
}

// fleetBenchTable is the summary per group, as Markdown.
func fleetBenchTable(o fleetBenchOptions, rows []fleetBenchRow) string {
	groups := map[string][]fleetBenchRow{}
	var names []string
	for _, r := range rows {
		if _, ok := groups[r.Group]; !ok {
			names = append(names, r.Group)
		}
		groups[r.Group] = append(groups[r.Group], r)
	}
	order := map[string]int{"C1": 0, "C2": 1, "R1": 2, "R2": 3, "RC1": 4, "RC2": 5}
	sort.Slice(names, func(a, b int) bool {
		oa, okA := order[names[a]]
		ob, okB := order[names[b]]
		if okA && okB {
			return oa < ob
		}
		return names[a] < names[b]
	})
	budget := o.budget.String() + " wall-clock"
	if o.cpuBudget {
		budget = o.budget.String() + " CPU"
	}
	if o.iterations > 0 {
		budget += fmt.Sprintf(", %d iterations", o.iterations)
	}
	var b strings.Builder
	fmt.Fprintf(&b, "`%s`: %s; one thread, vehicles minimised first, then distance.\n\n", o.command, machine())
	b.WriteString("| group | budget | runs | all served | checked | vehicles = best-known | within one vehicle | vehicles found / best-known | mean distance gap % at best-known vehicles | mean gap % all | mean CPU s |\n")
	b.WriteString("|---|---|---|---|---|---|---|---|---|---|---|\n")
	all := []fleetBenchRow{}
	line := func(name string, rs []fleetBenchRow) {
		var served, checked, atV, within1, sumV, sumBK int
		var gapAt, gapAll, cpu float64
		var nAt, nGap int
		for _, r := range rs {
			if r.Served == r.Customers {
				served++
			}
			if r.Checked {
				checked++
			}
			cpu += r.CPUSeconds
			if !r.HasBK {
				continue
			}
			sumV += r.Vehicles
			sumBK += r.BKVehicles
			if r.Served == r.Customers && r.Vehicles <= r.BKVehicles {
				atV++
				gapAt += r.GapPct
				nAt++
			}
			if r.Served == r.Customers && r.Vehicles <= r.BKVehicles+1 {
				within1++
			}
			gapAll += r.GapPct
			nGap++
		}
		at := "-"
		if nAt > 0 {
			at = fmt.Sprintf("%.2f", gapAt/float64(nAt))
		}
		ga := "-"
		if nGap > 0 {
			ga = fmt.Sprintf("%.2f", gapAll/float64(nGap))
		}
		fmt.Fprintf(&b, "| %s | %s | %d | %d | %d | %d | %d | %d / %d | %s | %s | %.1f |\n", name, budget, len(rs), served, checked, atV, within1, sumV, sumBK, at, ga, cpu/float64(len(rs)))
	}
	for _, g := range names {
		line(g, groups[g])
		all = append(all, groups[g]...)
	}
	if len(names) > 1 {
		line("all", all)
	}
	return b.String()
}
