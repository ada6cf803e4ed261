// Command wasm is the Visitline engine as a web worker: built with
// GOOS=js GOARCH=wasm, it runs inside a dedicated worker (web/assets/worker.js
// starts it) and speaks a small message protocol with the page. It is the
// only package besides the browser tests that touches syscall/js, and it
// does so in main_js.go alone: everything else here is plain Go, tested
// natively.
//
// # Message protocol
//
// Every message is a JSON object with a "type" field. The page posts
// objects to the worker; worker.js hands them to the engine as JSON text and
// posts the engine's JSON replies back to the page as objects.
//
// Page to worker:
//
//	{"type":"load", "name":"sites.csv", "text":"id,name,open,...", "matrix_name":"travel.csv", "matrix":"...",
//	 "options":{"start":"", "end":"start|free|ID", "shift_start":"", "matrix_unit":"minutes|seconds",
//	            "speed":0, "road_factor":0, "done":["C01"], "now":"09:10"}}
//	    Read a sites file or a benchmark matrix file (told apart by content)
//	    with an optional travel matrix, through format.Load, the same path
//	    as the command line; options mean what the flags of the same names
//	    of `visitline solve` mean (zero values: the defaults). Stops a
//	    running search first. Replies "loaded" or "errors".
//	    A fleet day: "vehicles" (a vehicles file's text) and
//	    "vehicles_name", or "fleet" (N identical vehicles), as --vehicles
//	    and --fleet; a text in Solomon's format is one by content. Its
//	    summary carries "fleet" (the vehicles), through app.LoadFleet.
//	    Also "load_id", the page's number for this load, echoed in every
//	    reply to it. While it reads, the worker replies "reading" about
//	    every 100 ms, and gives the event loop a turn about every 20 ms so
//	    that a "cancel_load" is taken at once.
//	    worker.js passes "text" and "matrix" to the engine apart from the
//	    rest of the message (Engine.HandleLoad), so that a large paste is
//	    not decoded from JSON.
//	{"type":"cancel_load", "load_id":3}
//	    Give up the load with that number (and any earlier one), whether it
//	    is reading or still waiting: the data loaded before it stays
//	    loaded, as if the load had never been asked for. worker.js hands it
//	    to the engine at once (Engine.CancelLoad), not behind the load.
//	    Replies "load_cancelled" if the load was given up (nothing if it
//	    had already ended: its "loaded" or "errors" went first).
//	{"type":"start", "budget":10, "seed":1, "mix":{"random":1,...}, "fixed":false, "objective":"travel",
//	 "fewest_late":false, "no_bound":false}
//	    Search the loaded instance for budget seconds (0 < budget <= 3600)
//	    with that seed and starting mix (omitted: even mix); fixed keeps the
//	    weights as given instead of adapting them (--fixed-mix); objective is
//	    travel or completion; fewest_late ranks a day that cannot be met by
//	    its number of late visits (--fewest-late); no_bound leaves out the
//	    lower bound and exact search that run beside the engine as with
//	    `solve` (--bound=false). Stops a running search first. Replies "started", then "plan" and "progress" while it
//	    runs, and "finished" at the end.
//	    Also: "iterations" (an iteration budget; with it budget may be 0),
//	    "role" ("" both the search and the bound in this worker; "search"
//	    the search alone; "bound" the bound, the exact search and the
//	    explanation alone) and "worker" (the number of a search worker
//	    of one run: its seed is seed + 7919·worker, as with --workers).
//	    The options are app.RunOptions, those of `visitline solve`, so the
//	    same options, seed and iteration budget give solve's plan.
//	    A fleet day is searched by fleet.Solve through app.RunFleet (the
//	    mix, the bound and the role do not apply: run one worker);
//	    "minimize":"vehicles" is --minimize vehicles.
//	{"type":"mix", "mix":{"random":2,"slice":0,...}}
//	    Replace the operator weights of the running search. Replies "mix".
//	{"type":"adopt", "route":[0,3,1,...]}
//	    A better plan found by another worker: a search takes it as its
//	    best and restarts from it at its next restart; the bound worker
//	    prunes with its cost. No reply.
//	{"type":"stop"}
//	    Cancel the running search. Replies "finished" with why "stopped".
//	{"type":"export", "format":"ics", "route":[0,3,1,...], "date":"2026-12-01", "objective":"travel"}
//	    Write a plan of the loaded data (its route, 0-based nodes as in a
//	    plan's "route") as an iCalendar file; date is the day for files
//	    whose times carry no date. Replies "export".
//	    A fleet day: "routes" ([{"vehicle":"T1","visits":[3,5]}, ...], as
//	    in its plan) instead of "route", and "vehicle" (an id) for one
//	    vehicle's calendar, else every vehicle's visits, each event's
//	    summary beginning with the vehicle's name. The plan is checked
//	    with fleet.Evaluate and its times recomputed.
//
// Worker to page:
//
//	{"type":"ready", "operators":["random",...]}
//	    The engine is up; operators are the names of the --mix weights.
//	{"type":"reading", "load_id":3, "done":1048576, "total":33743601}
//	    How far a load has got: bytes of the input read (a travel matrix
//	    counts twice: it is read in two passes); total is 0 when unknown.
//	{"type":"load_cancelled", "load_id":3}
//	    The load was given up; the data loaded before it is still loaded.
//	{"type":"loaded", "summary":{...}}
//	    See Summary; its warnings are suspicious but legal input.
//	{"type":"errors", "errors":[{"file","line","column","field","message","text"}]}
//	    The input could not be read; line and column are 1-based (0: unknown).
//	{"type":"started", "run":1, "budget":10, "seed":1, "mix":{...}}
//	{"type":"plan", "run":1, "plan":{...}, "csv":"...", "json":"..."}
//	    A new best plan: plan is the object of `visitline solve --format
//	    json`; csv and json are the exports, written by the same code as
//	    the command line (for days over 300 nodes only in the last plan of
//	    a run: writing them takes a tenth of a second or more). Plans found
//	    in a burst are coalesced so that at most one is sent every 50 ms
//	    (every n/2 ms for n nodes above 100). The best plan is sent once more just before
//	    "finished", with lower_bound, gap_bound_pct and proven_optimal from
//	    the bound, and for a day that cannot be met conflict and reason.
//	    A fleet day's progress comes with each new best and carries
//	    vehicles_used, unserved_priority and phase; its plans stream as the
//	    search finds them (the construction's at once, then as often as
//	    one-vehicle plans, each checked by fleet.Evaluate first), and the best
//	    comes once more at the end.
//	    For a fleet day, plan is the object `solve --format json` prints
//	    for it (format.FleetPlanReport: vehicles_used, routes, unserved,
//	    unserved_reasons...), csv has a vehicle column
//	    (format.WriteFleetCSV); both exports come with every plan of a day
//	    up to 300 nodes, and with the last plan on larger days.
//	{"type":"progress", "run":1, "iterations":1234, "elapsed":1.5, "best_cost":812, "feasible":true, "weights":{...}}
//	    About every 50 ms while searching; elapsed in seconds. One with
//	    "explaining":true says the search is over and the worker is looking
//	    for why the windows cannot all be met (a few seconds at most).
//	{"type":"mix", "run":1, "mix":{...}, "running":true, "elapsed":2.1}
//	    Acknowledges a mix change: running says whether a search was
//	    running to take it (if not, the page keeps it for the next start).
//	{"type":"bound", "run":1, "lower_bound":812.5, "method":"state-space", "proven_optimal":false, "infeasible":false,
//	 "conflict":["C03","C07"], "reason":"..."}
//	    The bound worker's verdict (role "bound"), just before its
//	    "finished": lower_bound is null when unknown; proven_optimal says
//	    the best plan it was given (or found, then sent as a "plan" first)
//	    is proven best; conflict and reason explain a day that cannot be
//	    met.
//	{"type":"finished", "run":1, "why":"budget", "iterations":..., "elapsed":..., "improvements":..., "message":"", "note":""}
//	    The search ended; why is one of budget, iterations, stopped,
//	    complete or error (then message says what went wrong): solver.Stop,
//	    decided by the engine. note says, when it happened, that the budget
//	    ended before the first plan was ready.
//	{"type":"export", "format":"ics", "text":"BEGIN:VCALENDAR...", "error":""}
//	    The file asked for, or in error why it cannot be written.
//	{"type":"failed", "message":"..."}
//	    A message the engine could not act on (no data loaded, bad budget).
//
// The engine runs solver.Solve on its own goroutine. Go's wasm runs on one
// thread, so the search and the bound each block until the event loop has
// had a turn about every 20 ms of work (package solver/turn; main_js.go
// sets the host pause); a mix change or a stop is taken at the next turn.
package main

import (
	"errors"
	"math"

	"visitline/solver"
	"visitline/solver/app"
	"visitline/solver/format"
)

// inbound is any message from the page; fields unused by a type stay zero.
type inbound struct {
	Type string `json:"type"`
	// load: the sites or benchmark text, an optional travel matrix, and
	// the route and travel options (the command line's flags).
	Name       string          `json:"name"`
	Text       string          `json:"text"`
	Matrix     string          `json:"matrix"`
	MatrixName string          `json:"matrix_name"`
	Options    app.LoadOptions `json:"options"`
	// load, a day for several vehicles: a vehicles file (and its name) or
	// a fleet size, as --vehicles and --fleet; a text in Solomon's format
	// is a fleet day by content.
	Vehicles     string `json:"vehicles"`
	VehiclesName string `json:"vehicles_name"`
	Fleet        int    `json:"fleet"`
	// load, cancel_load: the page's number for this load, echoed in the
	// replies ("reading", "loaded", "errors", "load_cancelled").
	LoadID int `json:"load_id"`
	// start, a fleet day: "vehicles" uses as few vehicles as it can
	// before the travel (--minimize vehicles).
	Minimize string `json:"minimize"`
	// start: the search options (budget, iterations, seed, mix, fixed,
	// objective, fewest_late, no_bound), as solve's flags.
	app.RunOptions
	// start: what this worker does: "" both the search and the bound (one
	// worker), "search" the search alone, "bound" the bound, the exact
	// search and the explanation alone. Worker numbers the search workers
	// of one run (their seeds are seed + 7919·worker, as --workers).
	Role   string `json:"role"`
	Worker int    `json:"worker"`
	// start: when the user asked for the run, in milliseconds since the
	// Unix epoch by the page's clock (Date.now(), the clock the workers
	// share); the time the message waited comes off the budget, so that
	// the budget counts from the click. 0: from the message's arrival.
	ClickedAt float64 `json:"clicked_at"`
	// adopt, export: a plan's route, 0-based nodes as in a plan's "route".
	Route []int `json:"route"`
	// export, a fleet day: the plan's routes (vehicle id and visits, as in
	// its "routes") and, when not empty, the one vehicle to write.
	Routes  []routeIn `json:"routes"`
	Vehicle string    `json:"vehicle"`
	// export: the format (ics) and the day of the plan, YYYY-MM-DD, for
	// sites files whose times carry no date.
	Format string `json:"format"`
	Date   string `json:"date"`
}

// routeIn is one route of a fleet plan sent back for export.
type routeIn struct {
	Vehicle string `json:"vehicle"`
	Visits  []int  `json:"visits"`
}

// Worker-to-page messages, one type each.
type (
	readyMsg struct {
		Type      string   `json:"type"`
		Operators []string `json:"operators"`
	}
	loadedMsg struct {
		Type    string  `json:"type"`
		LoadID  int     `json:"load_id,omitempty"`
		Summary Summary `json:"summary"`
	}
	errorsMsg struct {
		Type   string       `json:"type"`
		LoadID int          `json:"load_id,omitempty"`
		Errors []InputError `json:"errors"`
	}
	readingMsg struct {
		Type   string `json:"type"`
		LoadID int    `json:"load_id,omitempty"`
		Done   int64  `json:"done"`
		Total  int64  `json:"total"`
	}
	loadCancelledMsg struct {
		Type   string `json:"type"`
		LoadID int    `json:"load_id,omitempty"`
	}
	startedMsg struct {
		Type      string             `json:"type"`
		Run       int                `json:"run"`
		Role      string             `json:"role,omitempty"`
		Budget    float64            `json:"budget"`
		Seed      int64              `json:"seed"`
		Mix       map[string]float64 `json:"mix"`
		Fixed     bool               `json:"fixed"`
		Objective string             `json:"objective"`
	}
	planMsg struct {
		Type string `json:"type"`
		Run  int    `json:"run"`
		Plan any    `json:"plan"` // a format.PlanReport, or its JSON export as is
		CSV  string `json:"csv,omitempty"`
		JSON string `json:"json,omitempty"`
	}
	progressMsg struct {
		Type       string     `json:"type"`
		Run        int        `json:"run"`
		Iterations int        `json:"iterations"`
		Elapsed    float64    `json:"elapsed"`
		BestCost   float64    `json:"best_cost"`
		Feasible   bool       `json:"feasible"`
		Weights    solver.Mix `json:"weights,omitempty"`
		Explaining bool       `json:"explaining,omitempty"`
		// A fleet day's search: the vehicles used, the priority left
		// unserved and the phase of the best plan so far.
		VehiclesUsed     int    `json:"vehicles_used,omitempty"`
		UnservedPriority int64  `json:"unserved_priority,omitempty"`
		Phase            string `json:"phase,omitempty"`
	}
	// boundMsg is the bound worker's verdict: a lower bound (absent when
	// unknown), whether the plan it was given is proven best, whether no
	// plan meets every window, and for such a day the conflict.
	boundMsg struct {
		Type          string   `json:"type"`
		Run           int      `json:"run"`
		LowerBound    *float64 `json:"lower_bound"`
		Method        string   `json:"method,omitempty"`
		ProvenOptimal bool     `json:"proven_optimal"`
		Infeasible    bool     `json:"infeasible"`
		Conflict      []string `json:"conflict,omitempty"`
		Reason        string   `json:"reason,omitempty"`
	}
	mixMsg struct {
		Type    string             `json:"type"`
		Run     int                `json:"run"`
		Mix     map[string]float64 `json:"mix"`
		Running bool               `json:"running"`
		Elapsed float64            `json:"elapsed"`
	}
	finishedMsg struct {
		Type         string      `json:"type"`
		Run          int         `json:"run"`
		Why          solver.Stop `json:"why"`
		Message      string      `json:"message,omitempty"`
		Note         string      `json:"note,omitempty"`
		Iterations   int         `json:"iterations"`
		Elapsed      float64     `json:"elapsed"`
		Improvements int         `json:"improvements"`
		BestCost     *float64    `json:"best_cost,omitempty"`
		Feasible     bool        `json:"feasible"`
	}
	exportMsg struct {
		Type   string `json:"type"`
		Format string `json:"format"`
		Text   string `json:"text"`
		Error  string `json:"error"`
	}
	failedMsg struct {
		Type    string `json:"type"`
		Message string `json:"message"`
	}
)

// InputError is one problem with the input, placed for the page.
type InputError struct {
	File    string `json:"file"`
	Line    int    `json:"line"`
	Column  int    `json:"column"`
	Field   string `json:"field"`
	Message string `json:"message"`
	// Text is the whole error as the command line prints it.
	Text string `json:"text"`
}

// Summary describes a loaded instance at a glance.
type Summary struct {
	Name string `json:"name"`
	// Sites counts the visits to plan: nodes other than the start (and the
	// fixed end of an open path).
	Sites int    `json:"sites"`
	Nodes int    `json:"nodes"`
	Start string `json:"start"`
	End   string `json:"end,omitempty"`
	// Shape is closed, open or open-fixed-end (solver.Shape's names).
	Shape string `json:"shape"`
	// DayStart and DayEnd are the span the windows live in (input units):
	// the start's earliest time to the latest finite window end.
	DayStart float64 `json:"day_start"`
	DayEnd   float64 `json:"day_end"`
	// Tightness is the mean share of the day a visit's window leaves open
	// (window width / day length, over visits with a finite window): near
	// 0 the windows are tight, near 1 they hardly bind.
	Tightness float64 `json:"tightness"`
	// NarrowestWindow and WidestWindow are window widths in input units.
	NarrowestWindow float64 `json:"narrowest_window"`
	WidestWindow    float64 `json:"widest_window"`
	// OpenWindows counts visits whose window has no upper end.
	OpenWindows int `json:"open_windows"`
	// Asymmetry is the mean of |t(i,j) - t(j,i)| / max(t(i,j), t(j,i)) over
	// the pairs with any travel: 0 for a symmetric matrix.
	Asymmetry float64 `json:"asymmetry"`
	// AsymmetricPairs counts pairs with t(i,j) != t(j,i), out of Pairs.
	AsymmetricPairs int `json:"asymmetric_pairs"`
	Pairs           int `json:"pairs"`
	// Scale is the number of internal units per input unit.
	Scale int64 `json:"scale"`
	// For sites files: Unit is "min"; Times is minutes, clock or dated;
	// DayStartText and DayEndText are written as the file writes times;
	// Travel says where the travel times came from.
	Unit         string       `json:"unit,omitempty"`
	Times        string       `json:"times,omitempty"`
	TimeOrigin   string       `json:"time_origin,omitempty"`
	DayStartText string       `json:"day_start_text"`
	DayEndText   string       `json:"day_end_text"`
	Travel       string       `json:"travel,omitempty"`
	Warnings     []InputError `json:"warnings"`
	// Done and At say which visits were already made and where the
	// re-planned route leaves from.
	Done []string `json:"done,omitempty"`
	At   string   `json:"at,omitempty"`
	// Fleet is set for a day of several vehicles: its vehicles.
	Fleet *FleetSummary `json:"fleet,omitempty"`
}

// SummariseDataset adds what a sites file tells to Summarise.
func SummariseDataset(d *format.Dataset) Summary {
	in := d.Instance
	s := Summarise(in)
	s.Warnings = []InputError{}
	dayStart, dayEnd := in.InternalUnits(s.DayStart), in.InternalUnits(s.DayEnd)
	s.DayStartText, s.DayEndText = d.FormatTime(dayStart), d.FormatTime(dayEnd)
	s.Travel = d.Travel
	for _, w := range d.Warnings {
		s.Warnings = append(s.Warnings, InputError{File: w.File, Line: w.Line, Column: w.Column, Field: w.Field, Message: w.Msg, Text: w.String()})
	}
	if d.Unit != "" {
		s.Unit, s.Times = d.Unit, d.Time.Mode.String()
		switch d.Time.Mode {
		case format.Clock:
			s.TimeOrigin = "00:00"
		case format.Dated:
			s.TimeOrigin = d.Time.Origin.Format("2006-01-02") + " 00:00"
		}
	}
	if d.At != "" {
		s.Done, s.At = append([]string{}, d.Done...), d.At
	}
	return s
}

// openLate says whether a window end is "no limit" for display.
func openLate(v int64) bool { return solver.OpenEnd(v) }

// Summarise works out the Summary of an instance.
func Summarise(in *solver.Instance) Summary {
	s := Summary{Name: in.Name, Nodes: in.N, Start: in.ID(in.Start), Shape: in.Shape.String(), Scale: in.Scale}
	if in.Shape == solver.OpenFixed {
		s.End = in.ID(in.End)
	}
	isVisit := func(i int) bool {
		return i != in.Start && !(in.Shape == solver.OpenFixed && i == in.End)
	}
	dayStart := in.Early[in.Start]
	dayEnd := dayStart
	for i := 0; i < in.N; i++ {
		if !openLate(in.Late[i]) && in.Late[i] > dayEnd {
			dayEnd = in.Late[i]
		}
	}
	s.DayStart, s.DayEnd = in.InputUnits(dayStart), in.InputUnits(dayEnd)
	day := float64(dayEnd - dayStart)
	var sumShare float64
	finite := 0
	s.NarrowestWindow = math.Inf(1)
	for i := 0; i < in.N; i++ {
		if !isVisit(i) {
			continue
		}
		s.Sites++
		if openLate(in.Late[i]) {
			s.OpenWindows++
			continue
		}
		w := in.Late[i] - in.Early[i]
		finite++
		if day > 0 {
			sumShare += math.Min(1, float64(w)/day)
		}
		s.NarrowestWindow = math.Min(s.NarrowestWindow, in.InputUnits(w))
		s.WidestWindow = math.Max(s.WidestWindow, in.InputUnits(w))
	}
	if finite > 0 {
		s.Tightness = sumShare / float64(finite)
		if day <= 0 {
			s.Tightness = 0
		}
	} else {
		s.NarrowestWindow = 0
		s.Tightness = 1
	}
	var sumAsym float64
	for i := 0; i < in.N; i++ {
		for j := i + 1; j < in.N; j++ {
			a, b := in.T(i, j), in.T(j, i)
			m := max(a, b)
			if m == 0 {
				continue
			}
			s.Pairs++
			if a != b {
				s.AsymmetricPairs++
				d := a - b
				if d < 0 {
					d = -d
				}
				sumAsym += float64(d) / float64(m)
			}
		}
	}
	if s.Pairs > 0 {
		s.Asymmetry = sumAsym / float64(s.Pairs)
	}
	return s
}

// inputErrors turns a reader's error into the page's error list.
func inputErrors(err error, name string) []InputError {
	var list []InputError
	for _, e := range flatten(err) {
		var pe *format.ParseError
		if errors.As(e, &pe) {
			list = append(list, InputError{File: pe.File, Line: pe.Line, Column: pe.Column, Field: pe.Field, Message: pe.Msg, Text: pe.Error()})
			continue
		}
		list = append(list, InputError{File: name, Message: e.Error(), Text: e.Error()})
	}
	return list
}

// flatten splits an errors.Join result into its parts, so that a reader
// that reports several problems at once shows each one.
func flatten(err error) []error {
	if j, ok := err.(interface{ Unwrap() []error }); ok {
		var out []error
		for _, e := range j.Unwrap() {
			out = append(out, flatten(e)...)
		}
		return out
	}
	return []error{err}
}

// checkMix validates a mix sent by the page, as strictly as --mix: the
// same text goes through the same parser.
func checkMix(m map[string]float64) (solver.Mix, error) {
	if len(m) == 0 {
		return nil, nil
	}
	return solver.ParseMix(solver.Mix(m).String())
}
