package format

import (
	"math"
	"strconv"
	"strings"

	"visitline/solver"
	"visitline/solver/fmtlite"
)

// Claims are the figures a plan's JSON states (see PlanReport). A check
// recomputes every one of them from the data and the route; fields the
// JSON leaves out are not compared.
type Claims struct {
	Objective     string       `json:"objective"`
	Cost          *float64     `json:"cost"`
	Feasible      *bool        `json:"feasible"`
	Route         []int        `json:"route"`
	RouteIDs      []string     `json:"route_ids"`
	Schedule      []ClaimVisit `json:"schedule"`
	Return        *ClaimVisit  `json:"return"`
	Travel        *float64     `json:"travel"`
	Completion    *float64     `json:"completion"`
	TotalLateness *float64     `json:"total_lateness"`
	Shape         string       `json:"shape"`
	RouteStart    string       `json:"route_start"`
	RouteEnd      string       `json:"route_end"`
	Done          []string     `json:"done"`
	Late          []Late       `json:"late"`
}

// ClaimVisit is one stop as a plan states it.
type ClaimVisit struct {
	Node      *int     `json:"node"`
	ID        *string  `json:"id"`
	Arrival   *float64 `json:"arrival"`
	Start     *float64 `json:"start"`
	Wait      *float64 `json:"wait"`
	Departure *float64 `json:"departure"`
	Lateness  *float64 `json:"lateness"`
}

// RouteIDsProblem checks that the plan's route_ids name d's sites at the
// same places (when the plan has them): a plan made from other data, or
// with other options (--done), is refused. name is the plan's file name.
func (d *Dataset) RouteIDsProblem(c *Claims, name string) error {
	in := d.Instance
	if c.RouteIDs == nil {
		return nil
	}
	if len(c.RouteIDs) != len(c.Route) {
		return &ParseError{File: name, Field: "route_ids", Msg: fmtlite.Sprintf("has %d ids but route has %d nodes", len(c.RouteIDs), len(c.Route))}
	}
	for k, v := range c.Route {
		if v >= 0 && v < in.N && in.ID(v) != c.RouteIDs[k] {
			return &ParseError{File: name, Field: "route_ids",
				Msg: fmtlite.Sprintf("place %d is node %d, which is %s here, but the plan says %s: was the plan made from other data or other options (--done)?",
					k, v, Printable(clip(in.ID(v))), Printable(clip(c.RouteIDs[k])))}
		}
	}
	return nil
}

// RouteProblems names, by site id, what makes route no order of d's
// sites: nodes out of range, sites visited twice, sites missing, a wrong
// start or end. It says nothing of windows.
func (d *Dataset) RouteProblems(route []int) []string {
	in := d.Instance
	var out []string
	places := make([][]int, in.N)
	for k, v := range route {
		if v < 0 || v >= in.N {
			out = append(out, fmtlite.Sprintf("place %d holds node %d, but the nodes are 0 to %d", k, v, in.N-1))
			continue
		}
		places[v] = append(places[v], k)
	}
	for i, p := range places {
		if len(out) == maxErrors {
			out = append(out, "and more: the route is not an order of this data's sites (made from other data?)")
			break
		}
		switch {
		case len(p) == 0:
			out = append(out, fmtlite.Sprintf("%s is missing from the route", Printable(clip(d.label(i)))))
		case len(p) > 1:
			ks := make([]string, len(p))
			for x, k := range p {
				ks[x] = strconv.Itoa(k)
			}
			what := "twice"
			if len(p) > 2 {
				what = fmtlite.Sprintf("%d times", len(p))
			}
			out = append(out, fmtlite.Sprintf("%s is visited %s (places %s)", Printable(clip(d.label(i))), what, strings.Join(ks, ", ")))
		}
	}
	if len(out) > 0 {
		return out
	}
	if err := solver.CheckRoute(in, route); err != nil {
		out = append(out, err.Error())
	}
	return out
}

// label is a node's id, with its name when it has one.
func (d *Dataset) label(i int) string {
	id := d.Instance.ID(i)
	if i < len(d.Names) && d.Names[i] != "" && d.Names[i] != id {
		return fmtlite.Sprintf("%s (%s)", id, d.Names[i])
	}
	return id
}

// Mismatch is a figure a plan claims that differs from the one recomputed.
type Mismatch struct {
	What                string
	Claimed, Recomputed string
}

func (m Mismatch) String() string {
	return fmtlite.Sprintf("%s: the plan says %s, recomputed %s", m.What, m.Claimed, m.Recomputed)
}

// CompareClaims recomputes the plan's figures from d and the schedule s
// (worked out by solver.Evaluate from the route) and lists each one that
// differs by more than half an internal unit.
func (d *Dataset) CompareClaims(c *Claims, s solver.Schedule) []Mismatch {
	in := d.Instance
	var out []Mismatch
	tol := 0.5 / float64(in.Scale)
	num := func(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) }
	cmp := func(what string, claimed *float64, v int64) {
		if claimed == nil {
			return
		}
		if r := in.InputUnits(v); math.IsNaN(*claimed) || math.Abs(*claimed-r) > tol {
			out = append(out, Mismatch{what, num(*claimed), num(r)})
		}
	}
	if c.Shape != "" && c.Shape != in.Shape.String() {
		out = append(out, Mismatch{"shape of the route", c.Shape, in.Shape.String() + " (from the options given to check)"})
	}
	obj, err := solver.ParseObjective(c.Objective)
	if c.Objective != "" && err != nil {
		out = append(out, Mismatch{"objective", strconv.Quote(clip(c.Objective)), "travel or completion"})
	}
	if c.Objective != "" && err == nil {
		cmp("cost ("+obj.String()+")", c.Cost, s.Cost(obj))
	}
	cmp("travel", c.Travel, s.Travel)
	cmp("completion", c.Completion, s.Completion)
	cmp("total lateness", c.TotalLateness, s.TotalLateness)
	if c.Feasible != nil && *c.Feasible != s.Feasible {
		out = append(out, Mismatch{"feasible", strconv.FormatBool(*c.Feasible), strconv.FormatBool(s.Feasible)})
	}
	if c.Late != nil && len(c.Late) != s.LateVisits {
		out = append(out, Mismatch{"late visits", strconv.Itoa(len(c.Late)), strconv.Itoa(s.LateVisits)})
	}
	visit := func(what string, cv ClaimVisit, v solver.Visit) {
		if cv.Node != nil && *cv.Node != v.Node {
			out = append(out, Mismatch{what + " node", strconv.Itoa(*cv.Node), strconv.Itoa(v.Node)})
		}
		if cv.ID != nil && *cv.ID != in.ID(v.Node) {
			out = append(out, Mismatch{what + " id", strconv.Quote(clip(*cv.ID)), strconv.Quote(in.ID(v.Node))})
		}
		cmp(what+" arrival", cv.Arrival, v.Arrival)
		cmp(what+" start", cv.Start, v.Start)
		cmp(what+" wait", cv.Wait, v.Wait)
		cmp(what+" departure", cv.Departure, v.Departure)
		cmp(what+" lateness", cv.Lateness, v.Lateness)
	}
	if c.Schedule != nil {
		if len(c.Schedule) != len(s.Visits) {
			out = append(out, Mismatch{"visits in the schedule", strconv.Itoa(len(c.Schedule)), strconv.Itoa(len(s.Visits))})
		} else {
			for k, cv := range c.Schedule {
				visit(fmtlite.Sprintf("visit %d (%s)", k, Printable(clip(in.ID(s.Visits[k].Node)))), cv, s.Visits[k])
			}
		}
	}
	hasReturn := s.Return.Node >= 0 && in.Shape == solver.Closed
	switch {
	case c.Return != nil && hasReturn:
		visit("return", *c.Return, s.Return)
	case c.Return != nil && c.Schedule != nil:
		out = append(out, Mismatch{"return to the start", "a return", "none: the route is " + in.Shape.String()})
	case c.Return == nil && hasReturn && c.Schedule != nil:
		out = append(out, Mismatch{"return to the start", "none", "a return at " + num(in.InputUnits(s.Return.Arrival))})
	}
	return out
}

// routeEnd writes where a route ends as the --end option does.
func routeEnd(in *solver.Instance) string {
	switch in.Shape {
	case solver.OpenFree:
		return "free"
	case solver.OpenFixed:
		return in.ID(in.End)
	}
	return "start"
}

// DescribeEnd says in words what an --end value means.
func DescribeEnd(end string) string {
	switch end {
	case "", "start":
		return "a closed tour back to the start"
	case "free":
		return "an open path that ends at its last visit"
	}
	return "an open path that ends at " + Printable(clip(end))
}
