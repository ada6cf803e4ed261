package main

import (
	"errors"
	"flag"
	"fmt"
	"io"

	"visitline/solver/gen"
)

func runGen(args []string, stdout, stderr io.Writer) error {
	fs := flag.NewFlagSet("gen", flag.ContinueOnError)
	fs.SetOutput(stderr)
	n := fs.Int("n", 100, "number of nodes, the depot included")
	tight := fs.String("tightness", "medium", "time windows: none, wide (240-480 min), medium (90-180), tight (30-60)")
	seed := fs.Int64("seed", 1, "random seed: the same seed gives the same instance")
	service := fs.Int64("service-max", 10, "longest service time in minutes (folded into travel); -1 for none")
	fs.Usage = func() {
		fmt.Fprintln(stderr, "usage: visitline gen [flags] > FILE\n\nwrites an invented, feasible instance in the benchmark matrix format")
		fs.PrintDefaults()
	}
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return nil
		}
		return usageError{err.Error()}
	}
	if fs.NArg() != 0 {
		return usageError{fmt.Sprintf("unexpected argument %q: gen writes to standard output", fs.Arg(0))}
	}
	lvl, err := gen.ParseTightness(*tight)
	if err != nil {
		return usageError{"--tightness: " + err.Error()}
	}
	if *n < 2 || *n > gen.MaxSites {
		return usageError{fmt.Sprintf("--n %d: want 2 to %d", *n, gen.MaxSites)}
	}
	if *service < -1 || *service > 600 {
		return usageError{fmt.Sprintf("--service-max %d: want -1 (none) to 600 minutes", *service)}
	}
	if *service == 0 {
		*service = -1
	}
	g, err := gen.Generate(gen.Options{N: *n, Tightness: lvl, Seed: *seed, ServiceMax: *service})
	if err != nil {
		return err
	}
	comment := fmt.Sprintf("invented instance: visitline gen --n %d --tightness %s --seed %d --service-max %d\ntimes in minutes; service folded into travel; node 0 is the depot", *n, lvl, *seed, *service)
	return gen.WriteBenchmark(stdout, g.Instance, comment)
}
