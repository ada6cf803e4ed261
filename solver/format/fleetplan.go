package format

import (
	"io"
	"strings"

	"visitline/solver"
	"visitline/solver/fleet"
	"visitline/solver/fmtlite"
	"visitline/solver/jsonlite"
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
		j.Reason = fmtlite.Sprintf("%d %s left unserved: %s", n, what, strings.Join(j.UnservedIDs, ", "))
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
