package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"os"

	"visitline/solver"
	"visitline/solver/format"
)

func runCheck(args []string, stdout, stderr io.Writer) error {
	fs := flag.NewFlagSet("check", flag.ContinueOnError)
	fs.SetOutput(stderr)
	var lf loadFlags
	lf.register(fs)
	fs.Usage = func() {
		fmt.Fprintln(stderr, "usage: visitline check [flags] SITES.csv|BENCHMARK.txt PLAN.json\n(give the flags the plan was solved with)")
		fs.PrintDefaults()
	}
	args, err := parseArgs(fs, args)
	if err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return nil
		}
		return usageError{err.Error()}
	}
	if len(args) != 2 {
		return usageError{"usage: visitline check [flags] FILE PLAN.json"}
	}
	opt, err := lf.options()
	if err != nil {
		return err
	}
	d, err := loadDataset(args[0], opt)
	if err != nil {
		return err
	}
	in := d.Instance
	fh, err := os.Open(args[1])
	if err != nil {
		return fmt.Errorf("%s: cannot open: %w", args[1], unwrapPath(err))
	}
	defer fh.Close()
	route, err := format.ReadPlanRouteFor(fh, args[1], in)
	if err != nil {
		return err
	}
	if err := solver.CheckRoute(in, route); err != nil {
		fmt.Fprintf(stdout, "%s: not a valid route: %v\n", args[1], err)
		return errSilent
	}
	s := solver.Evaluate(in, route)
	if s.Feasible {
		fmt.Fprintf(stdout, "%s: feasible; travel %s, completion %s\n", args[1], d.FormatDuration(s.Travel), d.FormatTime(s.Completion))
		return nil
	}
	fmt.Fprintf(stdout, "%s: infeasible: %d late, total lateness %s; travel %s\n", args[1], s.LateVisits, d.FormatDuration(s.TotalLateness), d.FormatDuration(s.Travel))
	all := s.Visits
	if s.Return.Node >= 0 {
		all = append(all, s.Return)
	}
	for k, v := range all {
		if v.Lateness > 0 {
			what := fmt.Sprintf("visit %d (%s)", k, in.ID(v.Node))
			if k == len(s.Visits) {
				what = "the return to " + in.ID(v.Node)
			}
			fmt.Fprintf(stdout, "  %s starts at %s, after its latest %s, late by %s\n", what, d.FormatTime(v.Start), d.FormatTime(in.Late[v.Node]), d.FormatDuration(v.Lateness))
		}
	}
	return errSilent
}
