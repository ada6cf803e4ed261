package format

import (
	"io"
	"math"
	"strconv"
	"strings"
	"unicode/utf8"

	"visitline/solver"
	"visitline/solver/fmtlite"
	"visitline/solver/jsonlite"
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
	// Latest is null when the window has no upper end, and so is Slack:
	// an absent bound is never a large number.
	Latest   *float64 `json:"latest"`
	Slack    *float64 `json:"slack"`
	Lateness float64  `json:"lateness,omitempty"`
	// Filled for sites files: the site name, and for clock-time files the
	// times as written there (08:30, or 2026-12-01 08:30; "open").
	Name           string `json:"name,omitempty"`
	ArrivalClock   string `json:"arrival_clock,omitempty"`
	StartClock     string `json:"start_clock,omitempty"`
	DepartureClock string `json:"departure_clock,omitempty"`
	EarliestClock  string `json:"earliest_clock,omitempty"`
	LatestClock    string `json:"latest_clock,omitempty"`
}

// Late names a visit that misses its window and by how much (input units).
type Late struct {
	ID   string  `json:"id"`
	Node int     `json:"node"`
	By   float64 `json:"by"`
}

// PlanReport is a plan as every writer reports it: its fields are the
// contract of `solve --format json` and the input of `check`, and the CSV
// and table writers print from it too.
type PlanReport struct {
	Instance  string   `json:"instance,omitempty"`
	Objective string   `json:"objective"`
	Cost      float64  `json:"cost"`
	Feasible  bool     `json:"feasible"`
	Route     []int    `json:"route"`
	RouteIDs  []string `json:"route_ids"`
	// Shape is the route's shape (closed, open, open-fixed-end);
	// RouteStart and RouteEnd are the --start and --end it was solved
	// with (RouteEnd: start, free or a site id), so that check can take
	// them from the plan.
	Shape         string      `json:"shape,omitempty"`
	RouteStart    string      `json:"route_start,omitempty"`
	RouteEnd      string      `json:"route_end,omitempty"`
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
	// Filled for sites files. Unit is "min": every number above is in
	// minutes. Times is "minutes", "clock" or "dated"; TimeOrigin is what
	// time 0 is (the reference, midnight, or midnight of a date).
	Unit         string `json:"unit,omitempty"`
	Times        string `json:"times,omitempty"`
	TimeOrigin   string `json:"time_origin,omitempty"`
	TravelSource string `json:"travel_source,omitempty"`
	// Filled when done visits were re-planned away: the route starts at At
	// (the last done visit) at Now.
	Done     []string `json:"done,omitempty"`
	At       string   `json:"at,omitempty"`
	Now      *float64 `json:"now,omitempty"`
	NowClock string   `json:"now_clock,omitempty"`
	Warnings []string `json:"warnings,omitempty"`
}

// NewPlanReport converts a plan of in (and the run's statistics) for output.
func NewPlanReport(in *solver.Instance, obj solver.Objective, p solver.Plan, res *solver.Result) PlanReport {
	f := in.InputUnits
	j := PlanReport{Instance: in.Name, Objective: obj.String(), Cost: f(p.Cost), Feasible: p.Feasible,
		Route: append([]int(nil), p.Route...), Travel: f(p.Schedule.Travel), Completion: f(p.Schedule.Completion),
		TotalLateness: f(p.Schedule.TotalLateness), Late: []Late{}, FoundBy: p.Operator, SecondsToBest: p.Elapsed.Seconds()}
	for _, v := range p.Route {
		j.RouteIDs = append(j.RouteIDs, in.ID(v))
	}
	j.Shape, j.RouteStart, j.RouteEnd = in.Shape.String(), in.ID(in.Start), routeEnd(in)
	conv := func(v solver.Visit) PlanVisit {
		pv := PlanVisit{Node: v.Node, ID: in.ID(v.Node), Arrival: f(v.Arrival), Start: f(v.Start), Wait: f(v.Wait),
			Departure: f(v.Departure), Earliest: f(in.Early[v.Node]), Lateness: f(v.Lateness)}
		if !OpenBound(in.Late[v.Node]) {
			l, sl := f(in.Late[v.Node]), f(v.Slack)
			pv.Latest, pv.Slack = &l, &sl
		}
		return pv
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
		j.Iterations, j.Seconds, j.Improvements, j.Stop = res.Iterations, res.Elapsed.Seconds(), res.Improvements, res.Stop.String()
	}
	return j
}

// PlanReport converts a plan of d's instance for output, with site names,
// clock times and the dataset's warnings.
func (d *Dataset) PlanReport(obj solver.Objective, p solver.Plan, res *solver.Result) PlanReport {
	in := d.Instance
	j := NewPlanReport(in, obj, p, res)
	for _, w := range d.Warnings {
		j.Warnings = append(j.Warnings, w.String())
	}
	if d.RouteStart != "" {
		j.RouteStart, j.RouteEnd = d.RouteStart, d.RouteEnd
	}
	if d.Unit == "" {
		return j
	}
	j.Unit, j.Times, j.TravelSource = d.Unit, d.Time.Mode.String(), d.Travel
	switch d.Time.Mode {
	case Minutes:
		j.TimeOrigin = "reference"
	case Clock:
		j.TimeOrigin = "00:00"
	case Dated:
		j.TimeOrigin = d.Time.Origin.Format("2006-01-02") + " 00:00"
	}
	clock := d.Time.Mode != Minutes
	fill := func(pv *PlanVisit, v solver.Visit) {
		pv.Name = d.Names[v.Node]
		if clock {
			pv.ArrivalClock, pv.StartClock, pv.DepartureClock = d.Time.Format(v.Arrival), d.Time.Format(v.Start), d.Time.Format(v.Departure)
			pv.EarliestClock = d.Time.Format(in.Early[v.Node])
			if !OpenBound(in.Late[v.Node]) {
				pv.LatestClock = d.Time.Format(in.Late[v.Node])
			}
		}
	}
	for k, v := range p.Schedule.Visits {
		fill(&j.Schedule[k], v)
	}
	if j.Return != nil {
		fill(j.Return, p.Schedule.Return)
	}
	if d.At != "" {
		j.Done, j.At = append([]string{}, d.Done...), d.At
		now := in.InputUnits(d.Now)
		j.Now = &now
		if clock {
			j.NowClock = d.Time.Format(d.Now)
		}
	}
	return j
}

// WriteJSON writes the plan as one indented JSON object (the bytes
// encoding/json's Encoder writes with SetIndent("", "  ")).
func WriteJSON(w io.Writer, j PlanReport) error {
	jw := jsonlite.NewWriter(true, true)
	j.EncodeJSON(jw)
	return jw.Encode(w)
}

// CSVHeader is the header row of WriteCSV.
var CSVHeader = []string{"order", "site", "name", "arrival", "start", "wait", "departure", "earliest", "latest", "slack", "lateness"}

// WriteCSV writes one row per visit (and the return of a closed tour). Times
// are clock times where the sites file had them; durations are in the
// input's unit (minutes for sites files, rounded to two decimals).
func WriteCSV(w io.Writer, in *solver.Instance, j PlanReport) error {
	cw := newCSVWriter(w)
	if err := cw.Write(CSVHeader); err != nil {
		return err
	}
	rows := j.Schedule
	if j.Return != nil {
		rows = append(append([]PlanVisit(nil), rows...), *j.Return)
	}
	for k, v := range rows {
		order := strconv.Itoa(k)
		if j.Return != nil && k == len(rows)-1 {
			order = "return"
		}
		tm := v.times(j)
		row := []string{order, v.ID, v.Name, tm[0], tm[1], j.dur(v.Wait), tm[2], tm[3], tm[4], j.durOpen(v.Slack), j.dur(v.Lateness)}
		for i := range row {
			row[i] = CSVCell(row[i])
		}
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// times are arrival, start, departure, earliest and latest as written.
func (v PlanVisit) times(j PlanReport) [5]string {
	if v.StartClock != "" {
		latest := v.LatestClock
		if v.Latest == nil {
			latest = "open"
		}
		return [5]string{v.ArrivalClock, v.StartClock, v.DepartureClock, v.EarliestClock, latest}
	}
	return [5]string{j.dur(v.Arrival), j.dur(v.Start), j.dur(v.Departure), j.dur(v.Earliest), j.durOpen(v.Latest)}
}

// durOpen writes a bound that may be absent: "open" when it is.
func (j PlanReport) durOpen(v *float64) string {
	if v == nil {
		return "open"
	}
	return j.dur(*v)
}

// OpenBound says whether a window end is absent: an empty cell in a sites
// file reads as solver.Horizon, and only that value is open. Outputs write
// it as JSON null or "open", never as the number.
func OpenBound(v int64) bool { return solver.OpenEnd(v) }

// CSVCell neutralises a cell that a spreadsheet would run as a formula: a
// cell beginning with =, +, -, @, tab or carriage return gets a leading
// apostrophe, as the OWASP guidance "CSV Injection" recommends
// (owasp.org/www-community/attacks/CSV_Injection). Plain numbers such as
// -5 or +2.5 are left as they are: they cannot run, and our own negative
// slack is one.
func CSVCell(s string) string {
	if s == "" {
		return s
	}
	switch s[0] {
	case '=', '+', '-', '@', '\t', '\r':
		if s[0] == '-' || s[0] == '+' {
			if _, ok := parseDecimal(s, false); ok {
				return s
			}
		}
		return "'" + s
	}
	return s
}

// dur writes a number of the plan's unit: minutes of a sites file rounded
// to two decimals, benchmark units as they are.
func (j PlanReport) dur(v float64) string {
	if j.Unit != "min" {
		return fnum(v)
	}
	return strconv.FormatFloat(math.Round(v*100)/100, 'f', -1, 64)
}

func fnum(v float64) string {
	return strconv.FormatFloat(v, 'f', -1, 64)
}

// Printable writes s for a terminal: control characters (C0 such as ESC,
// BEL, CR and LF; DEL; C1 such as CSI U+009B) are shown escaped as Go
// writes them (\x1b, \u009b), so that a site name cannot move the
// cursor, set the window title or clear the screen. Other text, accents
// and scripts included, is kept as it is.
func Printable(s string) string {
	clean := true
	for _, r := range s {
		if isControl(r) {
			clean = false
			break
		}
	}
	if clean {
		return s
	}
	var b strings.Builder
	for _, r := range s {
		switch {
		case r == '\n':
			b.WriteString(`\n`)
		case r == '\r':
			b.WriteString(`\r`)
		case r == '\t':
			b.WriteString(`\t`)
		case r < 0x80 && isControl(r):
			fmtlite.Fprintf(&b, `\x%02x`, r)
		case isControl(r):
			fmtlite.Fprintf(&b, `\u%04x`, r)
		default:
			b.WriteRune(r)
		}
	}
	return b.String()
}

func isControl(r rune) bool {
	return r < 0x20 || r == 0x7f || r >= 0x80 && r < 0xa0 || r == utf8.RuneError
}
