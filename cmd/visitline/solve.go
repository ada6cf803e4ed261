package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"os/signal"
	"runtime"
	"strconv"
	"strings"
	"time"

	"visitline/solver"
	"visitline/solver/app"
	"visitline/solver/format"
)

type solveFlags struct {
	budget     time.Duration
	iterations int
	seed       int64
	mix        string
	fixedMix   bool
	fewestLate bool
	objective  string
	format     string
	date       string
	quiet      bool
	bound      bool
	workers    int
	load       loadFlags
	fleet      fleetFlags
}

// loadFlags are the flags that say how to read an instance; solve and
// check share them.
type loadFlags struct {
	matrix, matrixUnit string
	speed, roadFactor  float64
	start, end         string
	shiftStart         string
	done, now          string
}

func (l *loadFlags) register(fs *flag.FlagSet) {
	fs.StringVar(&l.matrix, "matrix", "", "travel matrix CSV/TSV for a sites file (default: travel from the sites' lat,lon or x,y)")
	fs.StringVar(&l.matrixUnit, "matrix-unit", "minutes", "unit of the matrix numbers: minutes or seconds")
	fs.Float64Var(&l.speed, "speed", format.DefaultSpeedKmh, "speed for travel from coordinates: km/h for lat,lon (x,y units per hour for x,y)")
	fs.Float64Var(&l.roadFactor, "road-factor", 0, fmt.Sprintf("road distance over straight-line distance (0: %g for lat,lon, 1 for x,y)", format.DefaultRoadFactor))
	fs.StringVar(&l.start, "start", "", "id of the start site (default: the first site)")
	fs.StringVar(&l.end, "end", "start", "where the route ends: start (closed tour), free (open, ends at the last visit) or a site id")
	fs.StringVar(&l.shiftStart, "shift-start", "", "time the route leaves the start, as the file writes times (default: the start site's earliest)")
	fs.StringVar(&l.done, "done", "", "ids of the visits already made, in order, comma-separated; the rest is planned again from the last one")
	fs.StringVar(&l.now, "now", "", "time of leaving the last done visit (default: worked out from the done visits)")
}

// validate refuses load flags that have no meaning, naming the flag.
func (l *loadFlags) validate() error {
	if !(l.speed > 0) || math.IsInf(l.speed, 0) {
		return usageError{fmt.Sprintf("--speed %s: want a speed above 0 (km/h for lat,lon; x,y units per hour for x,y)", strconv.FormatFloat(l.speed, 'g', -1, 64))}
	}
	if l.roadFactor != 0 && !(l.roadFactor >= 1) {
		return usageError{fmt.Sprintf("--road-factor %s: want 1 or more (roads are never shorter than the straight line), or 0 for the default", strconv.FormatFloat(l.roadFactor, 'g', -1, 64))}
	}
	return nil
}

// appOptions gives the flags as the application layer's load options.
func (l *loadFlags) appOptions() app.LoadOptions {
	o := app.LoadOptions{MatrixUnit: l.matrixUnit, Speed: l.speed, RoadFactor: l.roadFactor,
		Start: l.start, End: l.end, ShiftStart: l.shiftStart, Now: l.now}
	if l.done != "" {
		o.Done = strings.Split(l.done, ",")
	}
	return o
}

// options gives the flags as the application layer's options (the same
// type the page's load message carries), read as the readers want them.
func (l *loadFlags) options() (format.Options, error) {
	f, err := l.appOptions().Format("", l.matrix)
	if err != nil {
		return format.Options{}, usageError{"--" + err.Error()}
	}
	return f, nil
}

func runSolve(args []string, stdout, stderr io.Writer) error {
	fs := flag.NewFlagSet("solve", flag.ContinueOnError)
	fs.SetOutput(stderr)
	var f solveFlags
	f.budget = 10 * time.Second
	fs.Var((*budgetFlag)(&f.budget), "budget", "time budget as a `duration`, e.g. 10s, 2m or 1m30s (0 for none: then --iterations must be set)")
	fs.IntVar(&f.iterations, "iterations", 0, "iteration budget (0: none)")
	fs.Int64Var(&f.seed, "seed", 1, "random seed; a seed with an iteration budget reproduces a run")
	fs.StringVar(&f.mix, "mix", "", "starting weights of the destroy operators, e.g. random=1,slice=1,related=1,worst=1")
	fs.BoolVar(&f.fixedMix, "fixed-mix", false, "keep the mix as given instead of adapting it")
	fs.BoolVar(&f.fewestLate, "fewest-late", false, "when the windows cannot all be met, minimise the number of late visits first (default: total lateness)")
	fs.StringVar(&f.objective, "objective", "travel", "travel (sum of arcs) or completion (end time, waiting counted)")
	fs.StringVar(&f.format, "format", "table", "output: table, json, csv or ics (iCalendar)")
	fs.StringVar(&f.date, "date", "", "day of the plan for --format ics when the sites file has no dates, YYYY-MM-DD (default: today)")
	fs.BoolVar(&f.quiet, "quiet", false, "no progress on stderr")
	fs.BoolVar(&f.bound, "bound", true, "compute a lower bound beside the search and prove the plan optimal where the exact search can")
	fs.IntVar(&f.workers, "workers", 0, fmt.Sprintf("searches side by side, sharing the best plan (default: the number of cores, %d; but 1 with --iterations, so that a seed reproduces the run)", runtime.NumCPU()))
	f.load.register(fs)
	f.fleet.register(fs)
	fs.Usage = func() {
		fmt.Fprintln(stderr, "usage: visitline solve [flags] SITES.csv|BENCHMARK.txt")
		fs.PrintDefaults()
	}
	pos, err := parseArgs(fs, args)
	if err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return nil
		}
		return err
	}
	if f.iterations < 0 {
		return usageError{fmt.Sprintf("--iterations %d: want 0 (no limit) or more", f.iterations)}
	}
	if err := f.load.validate(); err != nil {
		return err
	}
	if len(pos) != 1 {
		return usageError{"want exactly one input FILE (see visitline solve -h)"}
	}
	switch f.format {
	case "table", "json", "csv", "ics":
	default:
		return usageError{fmt.Sprintf("--format %q: want table, json, csv or ics", f.format)}
	}
	day := time.Now()
	if f.date != "" {
		var err error
		if day, err = time.Parse("2006-01-02", f.date); err != nil {
			return usageError{fmt.Sprintf("--date %q: want YYYY-MM-DD, e.g. 2026-12-01", f.date)}
		}
	}
	if f.budget <= 0 && f.iterations <= 0 {
		return usageError{"set a --budget above 0 or an --iterations count, or the search never stops"}
	}
	if f.workers < 0 || f.workers == 0 && isSet(fs, "workers") {
		return usageError{fmt.Sprintf("--workers %d: want 1 or more", f.workers)}
	}
	if f.workers == 0 {
		f.workers = runtime.NumCPU()
		if f.iterations > 0 {
			f.workers = 1
		}
	}
	ro := app.RunOptions{Budget: f.budget.Seconds(), Iterations: f.iterations, Seed: f.seed, Fixed: f.fixedMix,
		Objective: f.objective, FewestLate: f.fewestLate, NoBound: !f.bound, Workers: f.workers}
	if _, err := solver.ParseObjective(f.objective); err != nil {
		return usageError{err.Error()}
	}
	mix, err := solver.ParseMix(f.mix)
	if err != nil {
		return usageError{"--mix: " + err.Error()}
	}
	ro.Mix = mix
	if f.fleet.wanted(pos[0]) {
		return solveFleet(pos[0], &f, stdout, stderr)
	}
	opt, err := f.load.options()
	if err != nil {
		return err
	}
	d, err := loadDataset(pos[0], opt)
	if err != nil {
		return err
	}
	for _, w := range d.Warnings {
		fmt.Fprintf(stderr, "warning: %s\n", w)
	}
	in := d.Instance
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	var hooks app.Hooks
	if !f.quiet {
		hooks.OnImprove = func(p solver.Plan) {
			state := "feasible"
			if !p.Feasible {
				state = "lateness " + d.FormatDuration(p.Schedule.TotalLateness)
			}
			fmt.Fprintf(stderr, "%8.3fs  iter %-8d cost %-12s %s (%s)\n", p.Elapsed.Seconds(), p.Iteration, d.FormatDuration(p.Cost), state, p.Operator)
		}
	}
	out, err := app.Run(ctx, d, ro, hooks)
	if err != nil {
		return err
	}
	if out.Note != "" {
		fmt.Fprintf(stderr, "note: %s\n", out.Note)
	}
	res, j := out.Result, out.Plan
	switch f.format {
	case "ics":
		return format.WriteICS(stdout, d, res.Best, format.ICSOptions{Date: day, Stamp: time.Now()})
	case "json":
		return format.WriteJSON(stdout, j)
	case "csv":
		return format.WriteCSV(stdout, in, j)
	}
	return format.WriteTable(stdout, j)
}

// loadDataset opens the instance file (a sites file or a benchmark file)
// and the matrix named in opt, naming them in every error; format.Load
// does the rest, as it does for the page.
func loadDataset(path string, opt format.Options) (*format.Dataset, error) {
	fh, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("%s: cannot open: %w", path, unwrapPath(err))
	}
	defer fh.Close()
	opt.SitesName = path
	var matrix io.Reader
	if opt.MatrixName != "" {
		mh, err := os.Open(opt.MatrixName)
		if err != nil {
			return nil, fmt.Errorf("%s: cannot open: %w", opt.MatrixName, unwrapPath(err))
		}
		defer mh.Close()
		matrix = mh
	}
	d, err := format.Load(fh, matrix, opt)
	var oe *format.OptionError
	if errors.As(err, &oe) {
		return nil, usageError{"--" + oe.Error()}
	}
	return d, err
}

func unwrapPath(err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}

// budgetFlag is a time budget: a Go duration (10s, 2m, 1m30s), 0 or
// more. A plain number is refused, since seconds and minutes are both
// plausible readings of it.
type budgetFlag time.Duration

func (b *budgetFlag) String() string { return time.Duration(*b).String() }

func (b *budgetFlag) Set(s string) error {
	d, err := time.ParseDuration(s)
	if err != nil || d < 0 {
		return fmt.Errorf("want a time such as 10s, 2m or 1m30s, 0 or more")
	}
	*b = budgetFlag(d)
	return nil
}

// isSet says whether the flag name was given on the command line.
func isSet(fs *flag.FlagSet, name string) bool {
	set := false
	fs.Visit(func(f *flag.Flag) {
		if f.Name == name {
			set = true
		}
	})
	return set
}
