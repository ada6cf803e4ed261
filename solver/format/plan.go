package format

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"strconv"
	"strings"
	"time"

	"visitline/solver"
)

// PlanVisit is one stop of a plan as written out, in input units.
type PlanVisit struct {
	Node      int     `json:"node"`
	ID        string  `json:"id"`
	Arrival   float64 `json:"arrival"`
	Start     float64 `json:"start"`
	Wait      float64 `json:"wait"`
	Departure float64 `json:"departure"`
	Earliest  float64 `json:"earliest"`
	Latest    float64 `json:"latest"`
	Slack     float64 `json:"slack"`
	Lateness  float64 `json:"lateness,omitempty"`
}

// Late names a visit that misses its window and by how much (input units).
type Late struct {
	ID   string  `json:"id"`
	Node int     `json:"node"`
	By   float64 `json:"by"`
}

// PlanJSON is the JSON form of a plan: the contract of `solve --format json`
// and the input of `check`.
type PlanJSON struct {
	Instance      string      `json:"instance,omitempty"`
	Objective     string      `json:"objective"`
	Cost          float64     `json:"cost"`
	Feasible      bool        `json:"feasible"`
	Route         []int       `json:"route"`
	RouteIDs      []string    `json:"route_ids"`
	Schedule      []PlanVisit `json:"schedule"`
	Return        *PlanVisit  `json:"return,omitempty"`
	Travel        float64     `json:"travel"`
	Completion    float64     `json:"completion"`
	TotalLateness float64     `json:"total_lateness"`
	Late          []Late      `json:"late"`
	Iterations    int         `json:"iterations"`
	Seconds       float64     `json:"seconds"`
	SecondsToBest float64     `json:"seconds_to_best"`
	Improvements  int         `json:"improvements"`
	FoundBy       string      `json:"found_by,omitempty"`
	Stop          string      `json:"stop,omitempty"`
	// Filled when a lower bound was computed.
	LowerBound    *float64 `json:"lower_bound,omitempty"`
	GapBoundPct   *float64 `json:"gap_bound_pct,omitempty"`
	ProvenOptimal bool     `json:"proven_optimal"`
	// Filled when the windows cannot all be met.
	Conflict []string `json:"conflict,omitempty"`
	Reason   string   `json:"reason,omitempty"`
}

// NewPlanJSON converts a plan of in (and the run's statistics) for output.
func NewPlanJSON(in *solver.Instance, obj solver.Objective, p solver.Plan, res *solver.Result) PlanJSON {
	f := in.Float
	j := PlanJSON{Instance: in.Name, Objective: obj.String(), Cost: f(p.Cost), Feasible: p.Feasible,
		Route: append([]int(nil), p.Route...), Travel: f(p.Schedule.Travel), Completion: f(p.Schedule.Completion),
		TotalLateness: f(p.Schedule.TotalLateness), Late: []Late{}, FoundBy: p.Operator, SecondsToBest: p.Elapsed.Seconds()}
	for _, v := range p.Route {
		j.RouteIDs = append(j.RouteIDs, in.ID(v))
	}
	conv := func(v solver.Visit) PlanVisit {
		return PlanVisit{Node: v.Node, ID: in.ID(v.Node), Arrival: f(v.Arrival), Start: f(v.Start), Wait: f(v.Wait),
			Departure: f(v.Departure), Earliest: f(in.Early[v.Node]), Latest: f(in.Late[v.Node]), Slack: f(v.Slack), Lateness: f(v.Lateness)}
	}
	for _, v := range p.Schedule.Visits {
		j.Schedule = append(j.Schedule, conv(v))
		if v.Lateness > 0 {
			j.Late = append(j.Late, Late{ID: in.ID(v.Node), Node: v.Node, By: f(v.Lateness)})
		}
	}
	if p.Schedule.Return.Node >= 0 && in.Shape == solver.Closed {
		r := conv(p.Schedule.Return)
		j.Return = &r
		if r.Lateness > 0 {
			j.Late = append(j.Late, Late{ID: in.ID(r.Node) + " (return)", Node: r.Node, By: r.Lateness})
		}
	}
	if res != nil {
		j.Iterations, j.Seconds, j.Improvements, j.Stop = res.Iterations, res.Elapsed.Seconds(), res.Improvements, res.Stop
	}
	return j
}

// WriteJSON writes the plan as one indented JSON object.
func WriteJSON(w io.Writer, j PlanJSON) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(j)
}

// ReadPlanRoute reads the route of a plan written by WriteJSON (only
// "route" is needed). name is used in errors.
func ReadPlanRoute(r io.Reader, name string) ([]int, error) {
	var j struct {
		Route []int `json:"route"`
	}
	dec := json.NewDecoder(r)
	if err := dec.Decode(&j); err != nil {
		var se *json.SyntaxError
		var te *json.UnmarshalTypeError
		switch {
		case asErr(err, &se):
			return nil, &ParseError{File: name, Field: "plan JSON", Msg: fmt.Sprintf("not valid JSON at byte %d: %v", se.Offset, err), Err: err}
		case asErr(err, &te):
			return nil, &ParseError{File: name, Field: te.Field, Msg: "want a list of node numbers (0-based)", Err: err}
		}
		return nil, &ParseError{File: name, Field: "plan JSON", Msg: err.Error(), Err: err}
	}
	if j.Route == nil {
		return nil, &ParseError{File: name, Field: "route", Msg: `missing; want "route": [0, ...] with 0-based node numbers`}
	}
	return j.Route, nil
}

// CSVHeader is the header row of WriteCSV.
var CSVHeader = []string{"order", "site", "arrival", "start", "wait", "departure", "earliest", "latest", "slack", "lateness"}

// WriteCSV writes one row per visit (and the return of a closed tour).
func WriteCSV(w io.Writer, in *solver.Instance, j PlanJSON) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(CSVHeader); err != nil {
		return err
	}
	num := func(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) }
	rows := j.Schedule
	if j.Return != nil {
		rows = append(append([]PlanVisit(nil), rows...), *j.Return)
	}
	for k, v := range rows {
		order := strconv.Itoa(k)
		if j.Return != nil && k == len(rows)-1 {
			order = "return"
		}
		if err := cw.Write([]string{order, v.ID, num(v.Arrival), num(v.Start), num(v.Wait), num(v.Departure),
			num(v.Earliest), num(v.Latest), num(v.Slack), num(v.Lateness)}); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// WriteTable writes a plain-text table for a terminal.
func WriteTable(w io.Writer, j PlanJSON) error {
	var b strings.Builder
	status := "all windows met"
	if !j.Feasible {
		status = fmt.Sprintf("%d late, total lateness %s", len(j.Late), fnum(j.TotalLateness))
	}
	fmt.Fprintf(&b, "%s  objective %s  cost %s  (%s)\n", j.Instance, j.Objective, fnum(j.Cost), status)
	if j.LowerBound != nil {
		if j.ProvenOptimal {
			fmt.Fprintf(&b, "lower bound %s: optimal\n", fnum(*j.LowerBound))
		} else if j.GapBoundPct != nil {
			fmt.Fprintf(&b, "lower bound %s: at most %.2f%% above optimal\n", fnum(*j.LowerBound), *j.GapBoundPct)
		}
	}
	fmt.Fprintf(&b, "%5s  %-12s %10s %10s %8s %10s %21s %8s\n", "order", "site", "arrival", "start", "wait", "departure", "window", "slack")
	rows := j.Schedule
	if j.Return != nil {
		rows = append(append([]PlanVisit(nil), rows...), *j.Return)
	}
	for k, v := range rows {
		order := strconv.Itoa(k)
		if j.Return != nil && k == len(rows)-1 {
			order = "back"
		}
		mark := ""
		if v.Lateness > 0 {
			mark = "  LATE by " + fnum(v.Lateness)
		}
		fmt.Fprintf(&b, "%5s  %-12s %10s %10s %8s %10s %21s %8s%s\n", order, v.ID, fnum(v.Arrival), fnum(v.Start), fnum(v.Wait),
			fnum(v.Departure), "["+fnum(v.Earliest)+", "+fnum(v.Latest)+"]", fnum(v.Slack), mark)
	}
	fmt.Fprintf(&b, "travel %s  completion %s  iterations %d  %.2fs (best at %.2fs, by %s)\n", fnum(j.Travel), fnum(j.Completion), j.Iterations, j.Seconds, j.SecondsToBest, j.FoundBy)
	if j.Reason != "" {
		fmt.Fprintf(&b, "why: %s\n", j.Reason)
	}
	_, err := io.WriteString(w, b.String())
	return err
}

func fnum(v float64) string {
	if v >= float64(solver.Horizon)/2 {
		return "open"
	}
	return strconv.FormatFloat(v, 'f', -1, 64)
}

// Seconds is a helper for durations in JSON.
func Seconds(d time.Duration) float64 { return d.Seconds() }
