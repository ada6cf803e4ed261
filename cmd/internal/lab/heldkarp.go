package lab

import (
	"context"
	"flag"
	"fmt"
	"io"
	"path/filepath"
	"strings"
	"time"

	"visitline/solver"
	"visitline/solver/heldkarp"
)

// runHeldKarp prints the Held-Karp lower bound of each instance's closed
// tour (windows ignored, so it bounds the travel of every plan of a closed
// day), beside the published optimum when --bounds names one and beside a
// plan's cost when --plan gives it.
func runHeldKarp(args []string, stdout, stderr io.Writer) error {
	fs := flag.NewFlagSet("heldkarp", flag.ContinueOnError)
	fs.SetOutput(stderr)
	iterations := fs.Int("iterations", 1000, "subgradient steps at most")
	budget := fs.Duration("budget", 0, "CPU-time budget per instance (0: none)")
	upper := fs.Float64("upper", 0, "length of a known tour, in the file's units, for the step size (0: nearest neighbour)")
	plan := fs.Float64("plan", 0, "a plan's cost to compare with the bound, in the file's units (0: none)")
	bounds := fs.String("bounds", "", "published values: CSV with family,instance,best_known (or TSPLIB's optimal.csv)")
	if err := fs.Parse(args); err != nil {
		return usageError{err.Error()}
	}
	if fs.NArg() == 0 {
		return usageError{"want at least one instance file"}
	}
	var known map[string]bestKnown
	if *bounds != "" {
		var err error
		if known, err = readBestKnown(*bounds); err != nil {
			return err
		}
	}
	fmt.Fprintf(stdout, "# %s\n", machine())
	for _, file := range fs.Args() {
		in, err := loadInstance(file)
		if err != nil {
			return err
		}
		if in.Shape != solver.Closed {
			return fmt.Errorf("%s: the bound is for closed tours; this day is %s", file, in.Shape)
		}
		ctx, cancel := context.WithCancel(context.Background())
		if *budget > 0 {
			go stopAtCPU(ctx, cancel, processCPU()+budget.Seconds())
		}
		cpu0 := processCPU()
		wall := time.Now()
		r, err := heldkarp.Bound(ctx, in.N, in.Travel, heldkarp.Options{Iterations: *iterations, Upper: in.InternalUnits(*upper)})
		cancel()
		if err != nil {
			return fmt.Errorf("%s: %w", file, err)
		}
		method := "1-tree"
		if !r.Symmetric {
			method = "2n 1-tree (asymmetric)"
		}
		fmt.Fprintf(stdout, "%s: %d nodes, %s, bound %s after %d iterations (%.1f CPU s, %.1f s wall), steps aimed at %s",
			file, in.N, method, num(in.InputUnits(r.Value)), r.Iterations, processCPU()-cpu0, time.Since(wall).Seconds(), num(in.InputUnits(r.Upper)))
		if r.Tour {
			fmt.Fprint(stdout, "; the 1-tree is a tour: optimal")
		}
		fam, name := filepath.Base(filepath.Dir(file)), filepath.Base(file)
		bk, ok := known[fam+"/"+name]
		if !ok {
			bk, ok = known[fam+"/"+strings.TrimSuffix(name, filepath.Ext(name))]
		}
		if ok {
			fmt.Fprintf(stdout, "; published %s, bound %.2f %% below it", num(bk.value), 100*(bk.value-in.InputUnits(r.Value))/bk.value)
		}
		if *plan > 0 {
			fmt.Fprintf(stdout, "; plan %s is %.2f %% above the bound", num(*plan), 100*(*plan-in.InputUnits(r.Value))/in.InputUnits(r.Value))
		}
		fmt.Fprintln(stdout)
	}
	return nil
}

func num(v float64) string {
	return strings.TrimSuffix(strings.TrimRight(fmt.Sprintf("%.4f", v), "0"), ".")
}
