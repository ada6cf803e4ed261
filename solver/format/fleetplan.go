package format

import (
	"fmt"
	"io"
	"strings"
	"text/tabwriter"

	"visitline/internal/jsonlite"
	"visitline/solver"
	"visitline/solver/fleet"
)

// FleetRouteJSON is one vehicle's route in a fleet plan.
type FleetRouteJSON struct {
	// Vehicle is the vehicle's id; VehicleName its name.
	Vehicle     string `json:"vehicle"`
	VehicleName string `json:"vehicle_name,omitempty"`
	// Visits are 0-based node indices in input order, start and end left
	// out (for a Solomon file the index is the customer number).
	Visits   []int    `json:"visits"`
	VisitIDs []string `json:"visit_ids"`
	// Start and End are the ids of where the vehicle begins and ends ("" for
	// a free end).
	Start string `json:"start"`
	End   string `json:"end"`
	// Begin is when the vehicle begins at its start (the latest begin that
	// keeps every window, so that the day is as short as it can be).
	Begin      float64 `json:"begin"`
	BeginClock string  `json:"begin_clock,omitempty"`
	Travel     float64 `json:"travel"`
	// Duration is the working day from Begin to the end, waiting included.
	Duration float64 `json:"duration"`
	// Load is the sum of the demands; Capacity the vehicle's (omitted when
	// it has none).
	Load     float64     `json:"load"`
	Capacity *float64    `json:"capacity,omitempty"`
	Schedule []PlanVisit `json:"schedule"`
	// Arrival is the arrival at the end (the departure from the last visit
	// for a free end).
	Arrival      float64 `json:"arrival"`
	ArrivalClock string  `json:"arrival_clock,omitempty"`
}

// UnservedJSON says why a visit is unserved.
type UnservedJSON struct {
	Node   int    `json:"node"`
	ID     string `json:"id"`
	Name   string `json:"name,omitempty"`
	Reason string `json:"reason"`
	Why    string `json:"why"`
}

// FleetPlanReport is the JSON form of a fleet plan: the contract of
// `solve --format json` on a fleet day. Routes come in the vehicles'
// order, one per vehicle used.
type FleetPlanReport struct {
	Instance  string `json:"instance,omitempty"`
	Objective string `json:"objective"`
	// MinimizeVehicles says whether the vehicles used came before the cost.
	MinimizeVehicles bool `json:"minimize_vehicles"`
	// Cost is the total travel (or completion) of all routes.
	Cost float64 `json:"cost"`
	// Feasible: every window, capacity and shift holds (unserved visits
	// are listed, not hidden).
	Feasible     bool             `json:"feasible"`
	Vehicles     int              `json:"vehicles"`
	VehiclesUsed int              `json:"vehicles_used"`
	Routes       []FleetRouteJSON `json:"routes"`
	Served       int              `json:"served"`
	Unserved     []int            `json:"unserved"`
	UnservedIDs  []string         `json:"unserved_ids"`
	// UnservedWhy has one entry per unserved visit, in the same order.
	UnservedWhy []UnservedJSON `json:"unserved_reasons"`
	// UnservedPriority sums the priorities of the unserved visits.
	UnservedPriority int64 `json:"unserved_priority"`
	// Reason says in a sentence what is left out, when anything is.
	Reason string `json:"reason,omitempty"`
	// Route and RouteIDs, for a fleet of one vehicle: the route as the
	// single-vehicle plan writes it (the start first).
	Route         []int    `json:"route,omitempty"`
	RouteIDs      []string `json:"route_ids,omitempty"`
	Iterations    int      `json:"iterations"`
	Seconds       float64  `json:"seconds"`
	SecondsToBest float64  `json:"seconds_to_best"`
	Improvements  int      `json:"improvements"`
	Unit          string   `json:"unit,omitempty"`
	Times         string   `json:"times,omitempty"`
	TimeOrigin    string   `json:"time_origin,omitempty"`
	TravelSource  string   `json:"travel_source,omitempty"`
	Warnings      []string `json:"warnings,omitempty"`
}

// PlanReport converts a fleet result for output.
func (d *FleetDataset) PlanReport(obj solver.Objective, minVeh bool, res *fleet.Result) FleetPlanReport {
	p := d.Problem
	f := p.InputUnits
	rep := res.Report
	j := FleetPlanReport{Instance: p.Name, Objective: obj.String(), MinimizeVehicles: minVeh, Cost: f(rep.Cost(obj)), Feasible: rep.Feasible,
		Vehicles: len(p.Vehicles), VehiclesUsed: rep.VehiclesUsed, Routes: []FleetRouteJSON{}, Unserved: []int{}, UnservedIDs: []string{},
		UnservedWhy: []UnservedJSON{}, UnservedPriority: rep.UnservedWeight,
		Iterations: res.Iterations, Seconds: res.Elapsed.Seconds(), SecondsToBest: res.ToBest.Seconds(), Improvements: len(res.Trace)}
	for _, w := range d.Warnings {
		j.Warnings = append(j.Warnings, w.String())
	}
	clock := d.Unit != "" && d.Time.Mode != Minutes
	if d.Unit != "" {
		j.Unit, j.Times, j.TravelSource = d.Unit, d.Time.Mode.String(), d.Travel
		switch d.Time.Mode {
		case Minutes:
			j.TimeOrigin = "reference"
		case Clock:
			j.TimeOrigin = "00:00"
		case Dated:
			j.TimeOrigin = d.Time.Origin.Format("2006-01-02") + " 00:00"
		}
	}
	load := func(v int64) float64 { return float64(v) / float64(loadScale(d.LoadScale)) }
	for _, rr := range rep.Routes {
		if len(rr.Visits) == 0 {
			continue
		}
		v := p.Vehicles[rr.Vehicle]
		fr := FleetRouteJSON{Vehicle: v.ID, VehicleName: d.VehicleNames[rr.Vehicle], Visits: append([]int{}, rr.Visits...),
			Start: p.ID(v.Start), Begin: f(rr.Begin), Travel: f(rr.Travel), Duration: f(rr.Duration), Load: load(rr.Load), Arrival: f(rr.End.Arrival)}
		if v.End != fleet.FreeEnd {
			fr.End = p.ID(v.End)
		}
		if v.Capacity < fleet.NoLimit {
			c := load(v.Capacity)
			fr.Capacity = &c
		}
		if clock {
			fr.BeginClock, fr.ArrivalClock = d.Time.Format(rr.Begin), d.Time.Format(rr.End.Arrival)
		}
		for _, s := range rr.Stops {
			pv := PlanVisit{Node: s.Node, ID: p.ID(s.Node), Arrival: f(s.Arrival), Start: f(s.Start), Wait: f(s.Wait), Departure: f(s.Departure),
				Earliest: f(p.Early[s.Node]), Lateness: f(s.Lateness), Name: d.Names[s.Node]}
			if !OpenBound(p.Late[s.Node]) {
				l, sl := f(p.Late[s.Node]), f(s.Slack)
				pv.Latest, pv.Slack = &l, &sl
			}
			if clock {
				pv.ArrivalClock, pv.StartClock, pv.DepartureClock = d.Time.Format(s.Arrival), d.Time.Format(s.Start), d.Time.Format(s.Departure)
				pv.EarliestClock, pv.LatestClock = d.Time.Format(p.Early[s.Node]), d.Time.Format(p.Late[s.Node])
			}
			fr.Schedule = append(fr.Schedule, pv)
			fr.VisitIDs = append(fr.VisitIDs, p.ID(s.Node))
		}
		j.Served += len(rr.Visits)
		j.Routes = append(j.Routes, fr)
	}
	for x, u := range rep.Unserved {
		j.Unserved = append(j.Unserved, u)
		j.UnservedIDs = append(j.UnservedIDs, p.ID(u))
		r := res.Reasons[x]
		j.UnservedWhy = append(j.UnservedWhy, UnservedJSON{Node: u, ID: p.ID(u), Name: d.Names[u], Reason: r.String(), Why: r.Sentence()})
	}
	if n := len(rep.Unserved); n > 0 {
		what := "visits are"
		if n == 1 {
			what = "visit is"
		}
		j.Reason = fmt.Sprintf("%d %s left unserved: %s", n, what, strings.Join(j.UnservedIDs, ", "))
	}
	if len(p.Vehicles) == 1 {
		j.Route = append([]int{p.Vehicles[0].Start}, rep.Routes[0].Visits...)
		for _, v := range j.Route {
			j.RouteIDs = append(j.RouteIDs, p.ID(v))
		}
	}
	return j
}

// WriteFleetJSON writes a fleet plan as one indented JSON object (the
// bytes encoding/json's Encoder writes with SetIndent("", "  ")).
func WriteFleetJSON(w io.Writer, j FleetPlanReport) error {
	jw := jsonlite.NewWriter(true, true)
	j.EncodeJSON(jw)
	return jw.Encode(w)
}

// WriteFleetTable writes a fleet plan for reading: a summary, then one
// block per vehicle used, then the unserved visits with their reasons.
func WriteFleetTable(w io.Writer, j FleetPlanReport) error {
	unit := ""
	if j.Unit != "" {
		unit = " " + j.Unit
	}
	fmt.Fprintf(w, "%s: %d of %d vehicles, %d visits served, %d unserved, %s %s%s", j.Instance, j.VehiclesUsed, j.Vehicles, j.Served, len(j.Unserved), j.Objective, fnum(round2(j.Cost)), unit)
	if !j.Feasible {
		fmt.Fprint(w, ", NOT FEASIBLE")
	}
	fmt.Fprintln(w)
	clock := j.Times == "clock" || j.Times == "dated"
	tm := func(v float64, c string) string {
		if clock && c != "" {
			return c
		}
		if v > 1e12 {
			return "open"
		}
		return fnum(round2(v))
	}
	for _, r := range j.Routes {
		name := r.Vehicle
		if r.VehicleName != "" {
			name += " (" + r.VehicleName + ")"
		}
		end := r.End
		if end == "" {
			end = "last visit"
		}
		load := fnum(round2(r.Load))
		if r.Capacity != nil {
			load += " of " + fnum(round2(*r.Capacity))
		}
		fmt.Fprintf(w, "\nvehicle %s: %d visits, from %s at %s to %s at %s, travel %s%s, working day %s%s, load %s\n", name, len(r.Visits), r.Start, tm(r.Begin, r.BeginClock),
			end, tm(r.Arrival, r.ArrivalClock), fnum(round2(r.Travel)), unit, fnum(round2(r.Duration)), unit, load)
		tw := tabwriter.NewWriter(w, 2, 4, 2, ' ', 0)
		fmt.Fprintln(tw, "  #\tsite\tname\tarrival\tstart\twait\tdeparture\twindow\tslack")
		for k, v := range r.Schedule {
			fmt.Fprintf(tw, "  %d\t%s\t%s\t%s\t%s\t%s\t%s\t%s-%s\t%s\n", k+1, v.ID, v.Name, tm(v.Arrival, v.ArrivalClock), tm(v.Start, v.StartClock), fnum(round2(v.Wait)),
				tm(v.Departure, v.DepartureClock), tm(v.Earliest, v.EarliestClock), latestText(v, tm), slackText(v))
		}
		if err := tw.Flush(); err != nil {
			return err
		}
	}
	if len(j.UnservedWhy) > 0 {
		fmt.Fprintln(w, "\nunserved:")
		for _, u := range j.UnservedWhy {
			fmt.Fprintf(w, "  %s: %s\n", u.ID, u.Why)
		}
	}
	for _, s := range j.Warnings {
		fmt.Fprintf(w, "warning: %s\n", s)
	}
	return nil
}

func round2(v float64) float64 {
	if v >= float64(solver.Horizon)/2 {
		return v
	}
	return float64(int64(v*100+sign(v)*0.5)) / 100
}

func sign(v float64) float64 {
	if v < 0 {
		return -1
	}
	return 1
}

// latestText and slackText write a bound that may be absent as "open",
// as the one-vehicle table does.
func latestText(v PlanVisit, tm func(float64, string) string) string {
	if v.Latest == nil {
		return "open"
	}
	return tm(*v.Latest, v.LatestClock)
}

func slackText(v PlanVisit) string {
	if v.Slack == nil {
		return "open"
	}
	return fnum(round2(*v.Slack))
}
