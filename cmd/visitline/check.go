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

// maxMismatches bounds the differences check lists.
const maxMismatches = 12

func runCheck(args []string, stdout, stderr io.Writer) error {
	fs := flag.NewFlagSet("check", flag.ContinueOnError)
	fs.SetOutput(stderr)
	var lf loadFlags
	lf.register(fs)
	fs.Usage = func() {
		fmt.Fprintln(stderr, "usage: visitline check [flags] SITES.csv|BENCHMARK.txt PLAN.json\n(the plan's --start and --end are read from its JSON; give the other flags it was solved with)")
		fs.PrintDefaults()
	}
	args, err := parseArgs(fs, args)
	if err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return nil
		}
		return err
	}
	if len(args) != 2 {
		return usageError{"usage: visitline check [flags] FILE PLAN.json"}
	}
	if err := lf.validate(); err != nil {
		return err
	}
	fh, err := os.Open(args[1])
	if err != nil {
		return fmt.Errorf("%s: cannot open: %w", args[1], unwrapPath(err))
	}
	claims, err := format.ReadClaims(fh, args[1])
	fh.Close()
	if err != nil {
		return err
	}
	// The route's start and end come from the plan unless given; given
	// ones that differ from the plan's are a different question, refused.
	for _, o := range []struct {
		flag  string
		value *string
		plan  string
	}{{"start", &lf.start, claims.RouteStart}, {"end", &lf.end, claims.RouteEnd}} {
		if o.plan == "" || len(claims.Done) > 0 {
			continue
		}
		if !isSet(fs, o.flag) {
			*o.value = o.plan
			continue
		}
		if *o.value != o.plan && !(o.flag == "end" && (*o.value == "" || *o.value == "start") && o.plan == "start") {
			what := fmt.Sprintf("--%s %s", o.flag, *o.value)
			if o.flag == "end" {
				fmt.Fprintf(stdout, "%s: refused: the plan is %s (solved with --end %s), but check was asked for %s (%s); leave --end out to check the plan as it was solved\n",
					args[1], format.DescribeEnd(o.plan), format.Printable(o.plan), format.DescribeEnd(*o.value), what)
			} else {
				fmt.Fprintf(stdout, "%s: refused: the plan starts at %s, but check was given %s; leave --start out to check the plan as it was solved\n",
					args[1], format.Printable(o.plan), format.Printable(what))
			}
			return errSilent
		}
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
	if err := d.RouteIDsProblem(claims, args[1]); err != nil {
		fmt.Fprintf(stdout, "refused: %s\n", err)
		return errSilent
	}
	if probs := d.RouteProblems(claims.Route); len(probs) > 0 {
		fmt.Fprintf(stdout, "%s: not a valid route:\n", args[1])
		for _, p := range probs {
			fmt.Fprintf(stdout, "  %s\n", p)
		}
		return errSilent
	}
	s := solver.Evaluate(in, claims.Route)
	if ms := d.CompareClaims(claims, s); len(ms) > 0 {
		fmt.Fprintf(stdout, "%s: refused: %d figures of the plan differ from the ones recomputed from the data and the route:\n", args[1], len(ms))
		for k, m := range ms {
			if k == maxMismatches {
				fmt.Fprintf(stdout, "  ... and %d more\n", len(ms)-maxMismatches)
				break
			}
			fmt.Fprintf(stdout, "  %s\n", m)
		}
		return errSilent
	}
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
			what := fmt.Sprintf("visit %d (%s)", k, format.Printable(in.ID(v.Node)))
			if k == len(s.Visits) {
				what = "the return to " + format.Printable(in.ID(v.Node))
			}
			fmt.Fprintf(stdout, "  %s starts at %s, after its latest %s, late by %s\n", what, d.FormatTime(v.Start), d.FormatTime(in.Late[v.Node]), d.FormatDuration(v.Lateness))
		}
	}
	return errSilent
}
