// Package app is Visitline's one application layer: load, solve (with the
// bound beside the search), report and explain, with one options type.
// The command line (`visitline solve`) and the web worker (wasm/) both run
// through it, so that the same data, options, seed and iteration budget
// give the same plan in either.
package app

import (
	"context"
	"errors"
	"io"
	"math"
	"strings"
	"time"

	"visitline/solver"
	"visitline/solver/bound"
	"visitline/solver/fmtlite"
	"visitline/solver/format"
)

// LoadOptions say how to read an instance: the command line's flags of the
// same names, and the "options" of the worker's load message. Zero values
// are the defaults.
type LoadOptions struct {
	// Start is the id of the site the route leaves from ("": the first).
	Start string `json:"start,omitempty"`
	// End is "start" or "" (closed tour), "free" (open) or a site id.
	End string `json:"end,omitempty"`
	// ShiftStart is the time the route leaves the start, as the file
	// writes times.
	ShiftStart string `json:"shift_start,omitempty"`
	// MatrixUnit is minutes (default) or seconds.
	MatrixUnit string `json:"matrix_unit,omitempty"`
	// Speed (km/h, or x,y units per hour) and RoadFactor for travel from
	// coordinates; 0: the defaults.
	Speed      float64 `json:"speed,omitempty"`
	RoadFactor float64 `json:"road_factor,omitempty"`
	// Done lists the visits already made, in order; Now is when the
	// vehicle leaves the last one.
	Done []string `json:"done,omitempty"`
	Now  string   `json:"now,omitempty"`
}

// Format turns the options into the readers' options, naming the files.
func (o LoadOptions) Format(sitesName, matrixName string) (format.Options, error) {
	unit, err := format.ParseUnit(o.MatrixUnit)
	if err != nil {
		return format.Options{}, err
	}
	f := format.Options{SitesName: sitesName, MatrixName: matrixName, MatrixUnit: unit, Speed: o.Speed, RoadFactor: o.RoadFactor,
		Start: strings.TrimSpace(o.Start), End: strings.TrimSpace(o.End), ShiftStart: strings.TrimSpace(o.ShiftStart), Now: strings.TrimSpace(o.Now)}
	for _, id := range o.Done {
		if id = strings.TrimSpace(id); id != "" {
			f.Done = append(f.Done, id)
		}
	}
	return f, nil
}

// Load reads a sites file or a benchmark matrix file (told apart by
// content) with an optional travel matrix (nil: none).
func Load(sites, matrix io.Reader, sitesName, matrixName string, o LoadOptions) (*format.Dataset, error) {
	f, err := o.Format(sitesName, matrixName)
	if err != nil {
		return nil, err
	}
	return format.Load(sites, matrix, f)
}

// LoadProgress is Load with progress: progress is called as the readers
// get through the input (see format.Options.Progress), and an error it
// returns ends the load with that error (the web worker's cancel).
func LoadProgress(sites, matrix io.Reader, sitesName, matrixName string, o LoadOptions, progress func(done, total int64) error) (*format.Dataset, error) {
	f, err := o.Format(sitesName, matrixName)
	if err != nil {
		return nil, err
	}
	f.Progress = progress
	return format.Load(sites, matrix, f)
}

// RunOptions say how to search: the command line's flags of the same
// names, and the fields of the worker's start message.
type RunOptions struct {
	// Budget is the time budget in seconds (0: none, then Iterations must
	// be set). Reading the model and the bound count against it.
	Budget float64 `json:"budget"`
	// Iterations is the iteration budget (0: none).
	Iterations int `json:"iterations,omitempty"`
	// Seed drives every random choice.
	Seed int64 `json:"seed"`
	// Mix is the starting weight per destroy operator (nil: even).
	Mix map[string]float64 `json:"mix,omitempty"`
	// Fixed keeps the weights as given (--fixed-mix).
	Fixed bool `json:"fixed,omitempty"`
	// Objective is travel (default) or completion.
	Objective string `json:"objective,omitempty"`
	// FewestLate ranks days that cannot be met by late visits first.
	FewestLate bool `json:"fewest_late,omitempty"`
	// NoBound leaves out the lower bound and the exact search (--bound=false).
	NoBound bool `json:"no_bound,omitempty"`
	// Workers is the number of searches side by side in this process (0
	// or 1: one, reproducible).
	Workers int `json:"workers,omitempty"`
}

// Settings checks the options and turns them into the engine's settings.
func (o RunOptions) Settings() (solver.Settings, error) {
	if math.IsNaN(o.Budget) || o.Budget < 0 || o.Budget > 1e6 {
		return solver.Settings{}, fmtlite.Errorf("budget %g s: want seconds from 0 up", o.Budget)
	}
	if o.Iterations < 0 {
		return solver.Settings{}, fmtlite.Errorf("iterations %d: want 0 (none) or more", o.Iterations)
	}
	if o.Budget == 0 && o.Iterations == 0 {
		return solver.Settings{}, errors.New("set a budget above 0 or an iteration count, or the search never stops")
	}
	if o.Workers < 0 {
		return solver.Settings{}, fmtlite.Errorf("workers %d: want 1 or more", o.Workers)
	}
	obj, err := solver.ParseObjective(o.Objective)
	if err != nil {
		return solver.Settings{}, err
	}
	var mix solver.Mix
	if len(o.Mix) > 0 {
		// The same text goes through the same parser as --mix.
		if mix, err = solver.ParseMix(solver.Mix(o.Mix).String()); err != nil {
			return solver.Settings{}, fmtlite.Errorf("mix: %w", err)
		}
	}
	return solver.Settings{Budget: time.Duration(o.Budget * float64(time.Second)), Iterations: o.Iterations, Seed: o.Seed,
		Mix: mix, FixedMix: o.Fixed, Objective: obj, FewestLate: o.FewestLate, Workers: o.Workers}, nil
}

// Hooks receive a run's news; any may be nil. OnImprove and OnProgress run
// on the search's goroutines (with the bound, OnImprove may come from the
// exact search's too, never at the same time).
type Hooks struct {
	OnImprove  func(solver.Plan)
	OnProgress func(solver.Progress)
	// MixUpdates replaces the weights of the running search.
	MixUpdates <-chan solver.Mix
	// Adopt hands the search better routes found elsewhere (Settings.Adopt).
	Adopt <-chan []int
	// ProgressEvery defaults to 50 ms.
	ProgressEvery time.Duration
	// OnExplaining says the search is over and the day cannot be met: the
	// explanation starts.
	OnExplaining func()
}

// Outcome is a finished run: the engine's result, the plan as `solve
// --format json` writes it (with what the bound says and, for a day that
// cannot be met, why), and why the run ended.
type Outcome struct {
	Result solver.Result
	Bound  bound.Bound
	Plan   format.PlanReport
	Why    solver.Stop
	// Note is a plain sentence for the user when the run did less than
	// asked (the budget was too short for a first plan); "" otherwise.
	Note string
}

// Run searches d under o until the budget, the iterations or ctx end.
// An error is bad options or a failed search; a cancelled ctx is not an
// error (Why is then solver.StopStopped).
func Run(ctx context.Context, d *format.Dataset, o RunOptions, h Hooks) (Outcome, error) {
	s, err := o.Settings()
	if err != nil {
		return Outcome{Why: solver.StopError}, err
	}
	s.OnImprove, s.OnProgress, s.MixUpdates, s.Adopt, s.ProgressEvery = h.OnImprove, h.OnProgress, h.MixUpdates, h.Adopt, h.ProgressEvery
	in := d.Instance
	var out Outcome
	began := time.Now()
	if o.NoBound {
		out.Result, err = solver.Solve(ctx, in, s)
	} else {
		out.Result, out.Bound, err = bound.Solve(ctx, in, s)
	}
	if err != nil {
		return Outcome{Why: solver.StopError}, err
	}
	res := out.Result
	out.Why = res.Stop
	out.Plan = d.PlanReport(s.Objective, res.Best, &res)
	if !o.NoBound {
		fillBound(&out.Plan, in, out.Bound, res.Best)
		if !res.Best.Feasible && ctx.Err() == nil {
			if h.OnExplaining != nil {
				h.OnExplaining()
			}
			if limit := ExplainTime(s.Budget, time.Since(began)); limit > 0 {
				Explain(ctx, &out.Plan, d, limit)
			}
		}
	}
	if s.Budget > 0 && res.FirstPlan > s.Budget {
		out.Note = fmtlite.Sprintf("The budget of %s ended before the first plan was ready (after %s): the plan is the first one built, not searched; give it more time.",
			seconds(s.Budget), seconds(res.FirstPlan))
	}
	return out, nil
}

func seconds(d time.Duration) string {
	return fmtlite.Sprintf("%.1f s", d.Seconds())
}

// ExplainLimit is the time the explanation of a day that cannot be met may
// take after the search: a tenth of the budget, from 0.4 s to 5 s (5 s
// with only an iteration budget), so that the run keeps to its budget
// within half a second or a tenth.
func ExplainLimit(budget time.Duration) time.Duration {
	if budget <= 0 {
		return 5 * time.Second
	}
	return min(max(budget/10, 400*time.Millisecond), 5*time.Second)
}

// ExplainTime is how long the explanation may take when the search has
// taken used of budget: ExplainLimit, cut to what is left of the leeway a
// budget has (a tenth of it or half a second, whichever is more), less
// 100 ms for writing the plan. 0 or less: no time for it.
func ExplainTime(budget, used time.Duration) time.Duration {
	if budget <= 0 {
		return ExplainLimit(budget)
	}
	left := budget + max(budget/10, 500*time.Millisecond) - 100*time.Millisecond - used
	return min(ExplainLimit(budget), left)
}

// fillBound adds the bound side's verdict to the plan's JSON.
func fillBound(j *format.PlanReport, in *solver.Instance, b bound.Bound, best solver.Plan) {
	r := bound.ReportFor(b, best)
	if r.HasBound {
		lb := in.InputUnits(r.LowerBound)
		j.LowerBound = &lb
	}
	if r.HasGap {
		g := r.GapPct
		j.GapBoundPct = &g
	}
	j.ProvenOptimal = r.ProvenOptimal
}

// Explain says in j why a day with no feasible plan is infeasible (its
// conflict and reason), in the file's own times, within limit.
func Explain(ctx context.Context, j *format.PlanReport, d *format.Dataset, limit time.Duration) {
	ctx, cancel := context.WithTimeout(ctx, limit)
	defer cancel()
	dur := d.FormatDuration
	if d.Unit != "" {
		dur = func(v int64) string { return d.FormatDuration(v) + " " + d.Unit }
	}
	ex, err := bound.ExplainWith(ctx, d.Instance, bound.ExplainOptions{FormatTime: d.FormatTime, FormatDuration: dur, Name: d.Name})
	if err != nil {
		if errors.Is(err, bound.ErrUndecided) {
			j.Reason = "No plan meets every window within the search limits, and no short explanation was found in time."
		}
		return
	}
	j.Conflict = ex.ConflictIDs
	j.Reason = ex.Reason
}
