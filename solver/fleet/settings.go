package fleet

import (
	"time"

	"visitline/solver"
)

// Settings are the limits and choices of one Solve. The zero value runs
// for one second with seed 0, minimising travel, vehicles not minimised.
type Settings struct {
	// Budget is the wall-clock budget (0 with Iterations set: none; both
	// 0: one second).
	Budget time.Duration
	// Iterations caps the search iterations (0: none). With a seed it
	// reproduces a run, whatever the machine's load.
	Iterations int
	Seed       int64
	// Objective is what the routes minimise once the weight served (and,
	// with MinimizeVehicles, the vehicles used) is best: their total
	// travel, or the sum of their earliest completions.
	Objective solver.Objective
	// MinimizeVehicles puts the number of vehicles used before the cost.
	MinimizeVehicles bool
	// RouteMinShare is the share of the budget given to the
	// route-minimisation phase when vehicles are minimised (0: 0.6).
	RouteMinShare float64
	// OnImprove, when set, is called with every new best plan (from the
	// solving goroutine; keep it quick).
	OnImprove func(Progress)
	// Now is the clock (nil: time.Now); tests need not set it.
	Now func() time.Time
}

// Progress is a new best plan as it is found.
type Progress struct {
	Value     Value
	Iteration int
	Elapsed   time.Duration
	// Phase is "construction", "vehicles" (route minimisation) or "cost".
	Phase string
	// Plan returns a copy of the new best plan. It is set only on the
	// Progress handed to OnImprove and valid only during that call (the
	// search goes on changing its best afterwards); nil in Result.Trace.
	Plan func() Plan
}

// Result is what Solve found.
type Result struct {
	Best Plan
	// Report is Best evaluated from scratch by Evaluate.
	Report Report
	Value  Value
	// Reasons says for each unserved visit why it is left out, in the
	// order of Report.Unserved.
	Reasons    []Reason
	Iterations int
	Elapsed    time.Duration
	// ToBest is when the best plan was found.
	ToBest time.Duration
	// Trace is every improvement of the best plan, in order.
	Trace []Progress
}
