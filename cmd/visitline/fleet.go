package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"
	"strings"
	"time"

	"visitline/solver"
	"visitline/solver/app"
	"visitline/solver/fleet"
	"visitline/solver/format"
)

// fleetFlags are the flags of a day with several vehicles.
type fleetFlags struct {
	vehicles string
	count    int
	minimize string
	vehicle  string
}

func (ff *fleetFlags) register(fs *flag.FlagSet) {
	fs.StringVar(&ff.vehicles, "vehicles", "", "vehicles CSV (id, name, start, end, shift start, shift end, capacity, max duration): plan a day for several vehicles")
	fs.IntVar(&ff.count, "fleet", 0, "plan for N identical vehicles from the start site, with its window as their shift")
	fs.StringVar(&ff.minimize, "minimize", "", "with several vehicles: vehicles (use as few vehicles as possible, before the travel)")
	fs.StringVar(&ff.vehicle, "vehicle", "", "with several vehicles and --format ics: write only this vehicle's visits (its id), a calendar for one driver or technician")
}

// wanted says whether solve plans a fleet day: a vehicles file, a fleet
// size, or an input in Solomon's format (read by content).
func (ff *fleetFlags) wanted(path string) bool {
	if ff.vehicles != "" || ff.count > 0 || ff.minimize != "" {
		return true
	}
	// Only a regular file is peeked at: reading the head of a pipe
	// (/dev/stdin) would take it from the one-vehicle reader.
	if st, err := os.Stat(path); err != nil || !st.Mode().IsRegular() {
		return false
	}
	fh, err := os.Open(path)
	if err != nil {
		return false
	}
	defer fh.Close()
	head := make([]byte, 4096)
	n, _ := io.ReadFull(fh, head)
	return format.IsSolomon(string(head[:n]))
}

// loadFleet reads the fleet day of path: a Solomon file, or a sites file
// (with its matrix) and a vehicles file or a fleet size, through the
// application layer as the page's worker does.
func loadFleet(path string, f *solveFlags) (*format.FleetDataset, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("%s: cannot open: %w", path, unwrapPath(err))
	}
	solomon := format.IsSolomon(string(data))
	switch {
	case solomon && f.fleet.vehicles != "":
		return nil, usageError{"--vehicles: " + path + " is in Solomon's format, which gives its own vehicles; leave --vehicles out"}
	case !solomon && f.fleet.vehicles == "" && f.fleet.count <= 0:
		return nil, usageError{"--minimize vehicles needs a fleet: give --vehicles FILE or --fleet N"}
	case !solomon && f.fleet.vehicles != "" && f.fleet.count > 0:
		return nil, usageError{"give --vehicles FILE or --fleet N, not both"}
	}
	in := app.FleetInput{Sites: string(data), SitesName: path, Count: f.fleet.count, Options: f.load.appOptions()}
	if !solomon {
		if _, err := f.load.options(); err != nil {
			return nil, err
		}
		if in.MatrixName = f.load.matrix; in.MatrixName != "" {
			m, err := os.ReadFile(in.MatrixName)
			if err != nil {
				return nil, fmt.Errorf("%s: cannot open: %w", in.MatrixName, unwrapPath(err))
			}
			in.Matrix = string(m)
		}
		if in.VehiclesName = f.fleet.vehicles; in.VehiclesName != "" {
			v, err := os.ReadFile(in.VehiclesName)
			if err != nil {
				return nil, fmt.Errorf("%s: cannot open: %w", in.VehiclesName, unwrapPath(err))
			}
			in.Vehicles = string(v)
		}
	}
	fd, _, err := app.LoadFleet(in)
	var oe *format.OptionError
	var ue *app.UsageError
	switch {
	case errors.As(err, &oe):
		return nil, usageError{"--" + oe.Error()}
	case errors.As(err, &ue):
		return nil, usageError{ue.Msg}
	}
	return fd, err
}

// solveFleet is solve for a day with several vehicles.
func solveFleet(path string, f *solveFlags, stdout, stderr io.Writer) error {
	switch f.fleet.minimize {
	case "", "vehicles":
	default:
		return usageError{fmt.Sprintf("--minimize %q: want vehicles (the cost after them is --objective)", f.fleet.minimize)}
	}
	if f.fleet.vehicle != "" && f.format != "ics" {
		return usageError{fmt.Sprintf("--vehicle %s: picks one vehicle's calendar; use it with --format ics", f.fleet.vehicle)}
	}
	day := time.Now()
	if f.date != "" {
		day, _ = time.Parse("2006-01-02", f.date) // checked by solve
	}
	if f.fleet.count < 0 {
		return usageError{fmt.Sprintf("--fleet %d: want 1 or more vehicles", f.fleet.count)}
	}
	obj, err := solver.ParseObjective(f.objective)
	if err != nil {
		return usageError{err.Error()}
	}
	fd, err := loadFleet(path, f)
	if err != nil {
		return err
	}
	if v := f.fleet.vehicle; v != "" {
		var ids []string
		for _, x := range fd.Problem.Vehicles {
			if x.ID == v {
				ids = nil
				break
			}
			ids = append(ids, x.ID)
		}
		if ids != nil {
			return usageError{fmt.Sprintf("--vehicle %s: not a vehicle of this day; want one of %s", format.Printable(v), strings.Join(ids, ", "))}
		}
	}
	for _, w := range fd.Warnings {
		fmt.Fprintf(stderr, "warning: %s\n", w)
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	minVeh := f.fleet.minimize == "vehicles"
	var onImprove func(fleet.Progress)
	if !f.quiet {
		onImprove = func(p fleet.Progress) {
			fmt.Fprintf(stderr, "%8.3fs  iter %-8d vehicles %-4d unserved %-4d cost %-12s (%s)\n", p.Elapsed.Seconds(), p.Iteration, p.Value.Vehicles,
				p.Value.Unserved, fd.FormatDuration(p.Value.Cost), p.Phase)
		}
	}
	run, err := app.RunFleet(ctx, fd, app.RunOptions{Budget: f.budget.Seconds(), Iterations: f.iterations, Seed: f.seed, Objective: obj.String()}, minVeh, onImprove)
	if err != nil {
		return err
	}
	j := run.Plan
	switch f.format {
	case "json":
		return format.WriteFleetJSON(stdout, j)
	case "csv":
		return format.WriteFleetCSV(stdout, j)
	case "ics":
		return format.WriteFleetICS(stdout, fd, j, f.fleet.vehicle, format.ICSOptions{Date: day, Stamp: time.Now()})
	}
	return format.WriteFleetTable(stdout, j)
}

func asOptionError(err error, oe **format.OptionError) bool {
	if err == nil {
		return false
	}
	e, ok := err.(*format.OptionError)
	if ok {
		*oe = e
	}
	return ok
}
