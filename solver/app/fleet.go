package app

import (
	"context"
	"errors"
	"io"
	"strings"
	"time"

	"visitline/solver"
	"visitline/solver/fleet"
	"visitline/solver/fmtlite"
	"visitline/solver/format"
	"visitline/solver/turn"
)

// FleetInput is a day for several vehicles as text: the command line reads
// its files into one, the worker's load message is one.
type FleetInput struct {
	// Sites is a sites file, or a file in Solomon's format (told apart by
	// content), named SitesName.
	Sites, SitesName string
	// Matrix is an optional travel matrix ("" none).
	Matrix, MatrixName string
	// Vehicles is a vehicles file ("" none, then Count identical vehicles).
	Vehicles, VehiclesName string
	// Count is the fleet size (--fleet); for a Solomon file it trims or
	// repeats the file's vehicles.
	Count   int
	Options LoadOptions
}

// UsageError is a fleet day asked for in a way that cannot work (both a
// vehicles file and a fleet size, a vehicles file for a Solomon file): the
// command line shows it as a usage error.
type UsageError struct{ Msg string }

func (e *UsageError) Error() string { return e.Msg }

// FleetWanted says whether a load is a fleet day: a vehicles file, a fleet
// size, or a text in Solomon's format.
func FleetWanted(sites, vehicles string, count int) bool {
	return strings.TrimSpace(vehicles) != "" || count > 0 || format.IsSolomon(sites)
}

// LoadFleet reads a fleet day: a Solomon file, or a sites file (with its
// matrix) and a vehicles file or a fleet size. For a sites file it returns
// the one-vehicle dataset too (nil for a Solomon file).
func LoadFleet(in FleetInput) (*format.FleetDataset, *format.Dataset, error) {
	if in.Count < 0 {
		return nil, nil, &UsageError{fmtlite.Sprintf("fleet %d: want 1 or more vehicles", in.Count)}
	}
	hasVeh := strings.TrimSpace(in.Vehicles) != ""
	if format.IsSolomon(in.Sites) {
		if hasVeh {
			return nil, nil, &UsageError{"vehicles: " + in.SitesName + " is in Solomon's format, which gives its own vehicles; leave the vehicles file out"}
		}
		p, err := format.ReadSolomon(strings.NewReader(in.Sites), in.SitesName)
		if err != nil {
			return nil, nil, err
		}
		if in.Count > 0 {
			for len(p.Vehicles) > in.Count {
				p.Vehicles = p.Vehicles[:in.Count]
			}
			for len(p.Vehicles) < in.Count {
				v := p.Vehicles[0]
				v.ID = fmtlite.Sprint(len(p.Vehicles) + 1)
				p.Vehicles = append(p.Vehicles, v)
			}
		}
		return format.SolomonDataset(p), nil, nil
	}
	if !hasVeh && in.Count <= 0 {
		return nil, nil, &UsageError{"minimizing vehicles needs a fleet: give a vehicles file or a fleet size"}
	}
	if hasVeh && in.Count > 0 {
		return nil, nil, &UsageError{"give a vehicles file or a fleet size, not both"}
	}
	var matrix io.Reader
	if strings.TrimSpace(in.Matrix) != "" {
		matrix = strings.NewReader(in.Matrix)
	}
	d, err := Load(strings.NewReader(in.Sites), matrix, in.SitesName, in.MatrixName, in.Options)
	if err != nil {
		return nil, nil, err
	}
	fo := format.FleetOptions{Count: in.Count, SitesText: in.Sites}
	if hasVeh {
		if fo.Vehicles, err = format.ReadVehicles(strings.NewReader(in.Vehicles), in.VehiclesName); err != nil {
			return nil, nil, err
		}
	}
	fd, err := format.FleetFromDataset(d, fo)
	if err != nil {
		return nil, nil, err
	}
	return fd, d, nil
}

// FleetRun is a finished fleet search: the engine's result and the plan as
// `solve --format json` writes it for a fleet day.
type FleetRun struct {
	Result fleet.Result
	Plan   format.FleetPlanReport
}

// RunFleet searches a fleet day under o (budget, iterations, seed,
// objective; the mix, bound and workers are for one vehicle and are not
// used). minVeh puts the vehicles used before the cost. onImprove, when
// set, is called with each new best on the search's goroutine. In the
// WebAssembly build the search gives the host a turn about every 20 ms
// (through the clock it reads each iteration), so that a stop is taken.
func RunFleet(ctx context.Context, fd *format.FleetDataset, o RunOptions, minVeh bool, onImprove func(fleet.Progress)) (FleetRun, error) {
	if o.Budget < 0 || o.Budget > 1e6 || o.Budget != o.Budget {
		return FleetRun{}, fmtlite.Errorf("budget %g s: want seconds from 0 up", o.Budget)
	}
	if o.Iterations < 0 {
		return FleetRun{}, fmtlite.Errorf("iterations %d: want 0 (none) or more", o.Iterations)
	}
	if o.Budget == 0 && o.Iterations == 0 {
		return FleetRun{}, errors.New("set a budget above 0 or an iteration count, or the search never stops")
	}
	obj, err := solver.ParseObjective(o.Objective)
	if err != nil {
		return FleetRun{}, err
	}
	s := fleet.Settings{Budget: time.Duration(o.Budget * float64(time.Second)), Iterations: o.Iterations, Seed: o.Seed, Objective: obj,
		MinimizeVehicles: minVeh, OnImprove: onImprove}
	if turn.Enabled {
		s.Now = func() time.Time {
			turn.Due()
			return time.Now()
		}
	}
	res, err := fleet.Solve(ctx, fd.Problem, s)
	if err != nil {
		return FleetRun{}, err
	}
	return FleetRun{Result: res, Plan: fd.PlanReport(obj, minVeh, &res)}, nil
}
