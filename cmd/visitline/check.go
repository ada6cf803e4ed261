package main

import (
	"fmt"
	"io"
	"os"

	"visitline/solver"
	"visitline/solver/format"
)

func runCheck(args []string, stdout, stderr io.Writer) error {
	if len(args) != 2 {
		return usageError{"usage: visitline check FILE PLAN.json"}
	}
	in, err := loadInstance(args[0])
	if err != nil {
		return err
	}
	fh, err := os.Open(args[1])
	if err != nil {
		return fmt.Errorf("%s: cannot open: %w", args[1], unwrapPath(err))
	}
	defer fh.Close()
	route, err := format.ReadPlanRoute(fh, args[1])
	if err != nil {
		return err
	}
	if err := solver.CheckRoute(in, route); err != nil {
		fmt.Fprintf(stdout, "%s: not a valid route: %v\n", args[1], err)
		return errSilent
	}
	s := solver.Evaluate(in, route)
	if s.Feasible {
		fmt.Fprintf(stdout, "%s: feasible; travel %g, completion %g\n", args[1], in.Float(s.Travel), in.Float(s.Completion))
		return nil
	}
	fmt.Fprintf(stdout, "%s: infeasible: %d late, total lateness %g; travel %g\n", args[1], s.LateVisits, in.Float(s.TotalLateness), in.Float(s.Travel))
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
			fmt.Fprintf(stdout, "  %s starts at %g, after its latest %g, late by %g\n", what, in.Float(v.Start), in.Float(in.Late[v.Node]), in.Float(v.Lateness))
		}
	}
	return errSilent
}
