package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"
	"time"

	"visitline/solver"
	"visitline/solver/bound"
	"visitline/solver/format"
)

type solveFlags struct {
	budget     time.Duration
	iterations int
	seed       int64
	mix        string
	fixedMix   bool
	objective  string
	format     string
	quiet      bool
	bound      bool
}

func runSolve(args []string, stdout, stderr io.Writer) error {
	fs := flag.NewFlagSet("solve", flag.ContinueOnError)
	fs.SetOutput(stderr)
	var f solveFlags
	fs.DurationVar(&f.budget, "budget", 10*time.Second, "time budget (0 for none: then --iterations must be set)")
	fs.IntVar(&f.iterations, "iterations", 0, "iteration budget (0: none)")
	fs.Int64Var(&f.seed, "seed", 1, "random seed; a seed with an iteration budget reproduces a run")
	fs.StringVar(&f.mix, "mix", "", "starting weights of the destroy operators, e.g. random=1,slice=1,related=1,worst=1")
	fs.BoolVar(&f.fixedMix, "fixed-mix", false, "keep the mix as given instead of adapting it")
	fs.StringVar(&f.objective, "objective", "travel", "travel (sum of arcs) or completion (end time, waiting counted)")
	fs.StringVar(&f.format, "format", "table", "output: table, json or csv")
	fs.BoolVar(&f.quiet, "quiet", false, "no progress on stderr")
	fs.BoolVar(&f.bound, "bound", true, "compute a lower bound beside the search and prove the plan optimal where the exact search can")
	fs.Usage = func() {
		fmt.Fprintln(stderr, "usage: visitline solve [flags] FILE")
		fs.PrintDefaults()
	}
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return nil
		}
		return usageError{err.Error()}
	}
	if fs.NArg() != 1 {
		return usageError{"want exactly one input FILE (see visitline solve -h)"}
	}
	switch f.format {
	case "table", "json", "csv":
	default:
		return usageError{fmt.Sprintf("--format %q: want table, json or csv", f.format)}
	}
	if f.budget <= 0 && f.iterations <= 0 {
		return usageError{"set a --budget above 0 or an --iterations count, or the search never stops"}
	}
	obj, err := solver.ParseObjective(f.objective)
	if err != nil {
		return usageError{err.Error()}
	}
	mix, err := solver.ParseMix(f.mix)
	if err != nil {
		return usageError{"--mix: " + err.Error()}
	}
	in, err := loadInstance(fs.Arg(0))
	if err != nil {
		return err
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	s := solver.Settings{Budget: f.budget, Iterations: f.iterations, Seed: f.seed, Mix: mix, FixedMix: f.fixedMix, Objective: obj}
	if !f.quiet {
		s.OnImprove = func(p solver.Plan) {
			state := "feasible"
			if !p.Feasible {
				state = fmt.Sprintf("lateness %g", in.Float(p.Schedule.TotalLateness))
			}
			fmt.Fprintf(stderr, "%8.3fs  iter %-8d cost %-12g %s (%s)\n", p.Elapsed.Seconds(), p.Iteration, in.Float(p.Cost), state, p.Operator)
		}
	}
	var res solver.Result
	var b bound.Bound
	if f.bound {
		res, b, err = bound.Solve(ctx, in, s)
	} else {
		res, err = solver.Solve(ctx, in, s)
	}
	if err != nil {
		return err
	}
	j := format.NewPlanJSON(in, obj, res.Best, &res)
	if f.bound {
		fillBound(&j, in, b, res.Best)
		if !res.Best.Feasible {
			explain(ctx, &j, in, f.budget)
		}
	}
	switch f.format {
	case "json":
		return format.WriteJSON(stdout, j)
	case "csv":
		return format.WriteCSV(stdout, in, j)
	}
	return format.WriteTable(stdout, j)
}

// fillBound adds the bound side's verdict to the plan's JSON.
func fillBound(j *format.PlanJSON, in *solver.Instance, b bound.Bound, best solver.Plan) {
	r := bound.ReportFor(b, best)
	if r.HasBound {
		lb := in.Float(r.LowerBound)
		j.LowerBound = &lb
	}
	if r.HasGap {
		g := r.GapPct
		j.GapBoundPct = &g
	}
	j.ProvenOptimal = r.ProvenOptimal
}

// explain says why a day with no feasible plan is infeasible, within a
// share of the budget (at least a few seconds).
func explain(ctx context.Context, j *format.PlanJSON, in *solver.Instance, budget time.Duration) {
	limit := max(budget/2, 5*time.Second)
	ctx, cancel := context.WithTimeout(ctx, limit)
	defer cancel()
	ex, err := bound.Explain(ctx, in)
	if err != nil {
		if errors.Is(err, bound.ErrUndecided) {
			j.Reason = "no plan meets every window within the search limits, and no short explanation was found in time"
		}
		return
	}
	j.Conflict = ex.ConflictIDs
	j.Reason = ex.Reason
}

// loadInstance opens and reads an instance file, naming it in every error.
func loadInstance(path string) (*solver.Instance, error) {
	fh, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("%s: cannot open: %w", path, unwrapPath(err))
	}
	defer fh.Close()
	return format.ReadBenchmark(fh, path)
}

func unwrapPath(err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}
