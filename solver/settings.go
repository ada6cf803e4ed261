package solver

import (
	"sort"
	"strconv"
	"strings"
	"time"

	"visitline/solver/fmtlite"
)

// Operators names the destroy operators of the large neighbourhood search,
// as --mix and the page name them.
//
//	random   free visits chosen at random
//	slice    free a consecutive stretch of the route
//	related  free visits close to a seed visit in travel and in window (Shaw removal)
//	worst    free the visits whose removal saves the most
var Operators = []string{"random", "slice", "related", "worst"}

// Mix is a weight per destroy operator. A nil Mix weighs every operator 1; a
// missing name weighs 0.
type Mix map[string]float64

// ParseMix reads "random=1,slice=2,related=1,worst=0".
func ParseMix(s string) (Mix, error) {
	m := Mix{}
	s = strings.TrimSpace(s)
	if s == "" {
		return nil, nil
	}
	for _, part := range strings.Split(s, ",") {
		k, v, ok := strings.Cut(strings.TrimSpace(part), "=")
		if !ok {
			return nil, fmtlite.Errorf("mix entry %q: want name=weight", part)
		}
		k = strings.TrimSpace(k)
		if !isOperator(k) {
			return nil, fmtlite.Errorf("mix entry %q: unknown operator %q, want one of %s", part, k, strings.Join(Operators, ", "))
		}
		w, err := strconv.ParseFloat(strings.TrimSpace(v), 64)
		if err != nil || w < 0 || w != w || w > 1e9 {
			return nil, fmtlite.Errorf("mix entry %q: weight must be a number from 0 up", part)
		}
		m[k] = w
	}
	var sum float64
	for _, w := range m {
		sum += w
	}
	if sum <= 0 {
		return nil, fmtlite.Errorf("mix %q: at least one weight must be above 0", s)
	}
	return m, nil
}

func (m Mix) String() string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	var b strings.Builder
	for i, k := range keys {
		if i > 0 {
			b.WriteByte(',')
		}
		fmtlite.Fprintf(&b, "%s=%g", k, m[k])
	}
	return b.String()
}

func isOperator(k string) bool {
	for _, o := range Operators {
		if o == k {
			return true
		}
	}
	return false
}

// weights turns a Mix into one weight per entry of Operators.
func (m Mix) weights() []float64 {
	w := make([]float64, len(Operators))
	for i, o := range Operators {
		if m == nil {
			w[i] = 1
		} else {
			w[i] = m[o]
		}
	}
	return w
}

// Settings say how long to search and how to report. The zero value searches
// until the context is cancelled, with seed 0 and an even mix.
type Settings struct {
	// Budget stops the search after this long (0: no time limit).
	Budget time.Duration
	// Iterations stops the search after this many LNS iterations (0: no
	// limit). With a fixed seed and no time budget a run is reproducible.
	Iterations int
	// Seed drives every random choice.
	Seed int64
	// Mix is the starting weight of each destroy operator.
	Mix Mix
	// FixedMix keeps the weights as given instead of adapting them to the
	// operators' successes.
	FixedMix bool
	// Objective to minimise once every window is met.
	Objective Objective
	// FewestLate ranks plans that cannot meet every window by the number of
	// late visits first (then total lateness) instead of total lateness.
	FewestLate bool
	// Workers is how many searches run side by side, sharing the best plan
	// (0 or 1: one, which is reproducible; more are not, since they race).
	Workers int
	// OnImprove receives every new best plan. It runs on the search's
	// goroutine: keep it quick, and do not keep the Plan's slices past the
	// call unless you copy them (Plan is already a copy; it is yours).
	OnImprove func(Plan)
	// OnProgress is called about every ProgressEvery while searching.
	OnProgress func(Progress)
	// ProgressEvery defaults to 50 ms.
	ProgressEvery time.Duration
	// MixUpdates, when set, is polled between iterations; a Mix received
	// replaces the weights (and restarts their adaptation from it).
	MixUpdates <-chan Mix
	// Adopt, when set, is polled between iterations: a route received
	// (another search's best, as the page shares it between its workers)
	// becomes this run's best when it is better, and the search restarts
	// from it at its next restart, as workers of one run share their best.
	// It is not reported to OnImprove: the sender has it already.
	Adopt <-chan []int
}

// Plan is one route with its schedule and where it came from.
type Plan struct {
	Route    []int
	Schedule Schedule
	// Cost is the objective value in internal units.
	Cost     int64
	Feasible bool
	// Iteration, Elapsed and Operator say when and how the plan was found.
	Iteration int
	Elapsed   time.Duration
	Operator  string
}

// Progress is a periodic report of a running search.
type Progress struct {
	Iteration int
	Elapsed   time.Duration
	BestCost  int64
	Feasible  bool
	// Weights are the current operator weights, normalised to sum to 1.
	Weights Mix
}

// Result is what Solve returns.
type Result struct {
	Best         Plan
	Iterations   int
	Elapsed      time.Duration
	Improvements int
	// Stop says why the search ended (never StopError: Solve returns an
	// error then).
	Stop Stop
	// FirstPlan is when the first plan was ready, from the call: when it
	// is past the budget, the budget was too short for a first plan and
	// the plan returned is the construction's.
	FirstPlan time.Duration
}
