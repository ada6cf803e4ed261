package fleet

import (
	"strconv"

	"visitline/solver"
	"visitline/solver/fmtlite"
)

// Plan is a set of routes, one per vehicle (empty: the vehicle stays
// home), and the visits left unserved.
type Plan struct {
	// Routes[k] lists the visits of vehicle k in order, start and end
	// excluded.
	Routes   [][]int
	Unserved []int
}

// Clone returns a deep copy.
func (pl Plan) Clone() Plan {
	c := Plan{Routes: make([][]int, len(pl.Routes)), Unserved: append([]int(nil), pl.Unserved...)}
	for k, r := range pl.Routes {
		c.Routes[k] = append([]int(nil), r...)
	}
	return c
}

// Objective says what the plan minimises once the weight served is
// maximal (and, with MinimizeVehicles, the vehicles used are fewest).
type Objective = solver.Objective

// Value is a plan's place in the hierarchical objective: first the
// priority weight left unserved, then (when vehicles are minimised) the
// vehicles used, then the cost.
type Value struct {
	Unserved int64
	Vehicles int
	Cost     int64
}

// text writes v as fmt's %+v does, {Unserved:0 Vehicles:3 Cost:1234},
// for the engine's internal errors.
func (v Value) text() string {
	return "{Unserved:" + strconv.FormatInt(v.Unserved, 10) + " Vehicles:" + strconv.Itoa(v.Vehicles) + " Cost:" + strconv.FormatInt(v.Cost, 10) + "}"
}

// Better reports whether a is strictly better than b.
func (a Value) Better(b Value, minimizeVehicles bool) bool {
	if a.Unserved != b.Unserved {
		return a.Unserved < b.Unserved
	}
	if minimizeVehicles && a.Vehicles != b.Vehicles {
		return a.Vehicles < b.Vehicles
	}
	return a.Cost < b.Cost
}

// Stop is one stop of a route's schedule.
type Stop = solver.Visit

// RouteReport is the schedule of one vehicle's route, worked out from
// scratch by Evaluate.
type RouteReport struct {
	Vehicle int
	Visits  []int
	// Begin is when the vehicle begins at its start: the latest begin
	// that keeps every window (so that the day is as short as the route
	// allows).
	Begin int64
	// Stops are the visits in order, then (Node = the end, or -1 for a
	// free end) the arrival at the end.
	Stops []Stop
	End   Stop
	// Travel is the sum of the arcs driven; Duration the working day from
	// Begin to the end; Load the sum of the demands; Completion the end's
	// time when leaving at the shift start (the earliest the route can
	// end).
	Travel, Duration, Load, Completion int64
	// Problems says what the route breaks (empty: nothing).
	Problems []string
}

// Report is the evaluation of a whole plan.
type Report struct {
	Routes       []RouteReport // one per vehicle, in the vehicles' order
	VehiclesUsed int
	Unserved     []int
	// UnservedWeight sums the priorities of the unserved visits.
	UnservedWeight int64
	// Travel and Completion sum over the routes used.
	Travel, Completion int64
	// Feasible: every window, capacity, shift and longest day holds.
	Feasible bool
	Problems []string
}

// Cost is the report's cost under obj.
func (r *Report) Cost(obj Objective) int64 {
	if obj == solver.CompletionTime {
		return r.Completion
	}
	return r.Travel
}

// Value is the report's place in the hierarchical objective.
func (r *Report) Value(obj Objective) Value {
	return Value{Unserved: r.UnservedWeight, Vehicles: r.VehiclesUsed, Cost: r.Cost(obj)}
}

// Evaluate checks a plan against the problem from scratch, one stop after
// another, with no use of the search's summaries: it is the independent
// check the tests trust. It returns an error when the plan is not a plan
// of this problem at all (a visit twice, a visit missing from both the
// routes and the unserved list, a depot visited, a route for a vehicle
// that does not exist); a plan that breaks a window, capacity, shift or
// longest day comes back with Feasible false and the problems named.
func Evaluate(p *Problem, pl Plan) (Report, error) {
	if len(pl.Routes) != len(p.Vehicles) {
		return Report{}, fmtlite.Errorf("plan has %d routes, want one per vehicle (%d)", len(pl.Routes), len(p.Vehicles))
	}
	depot := p.Depots()
	seen := make([]int, p.N) // 0 unseen, 1 served, 2 unserved
	for k, r := range pl.Routes {
		for _, v := range r {
			if v < 0 || v >= p.N {
				return Report{}, fmtlite.Errorf("route of vehicle %d holds node %d, outside 0..%d", k, v, p.N-1)
			}
			if depot[v] {
				return Report{}, fmtlite.Errorf("route of vehicle %d visits %s, which is a vehicle's start or end", k, p.ID(v))
			}
			if seen[v] != 0 {
				return Report{}, fmtlite.Errorf("%s is served twice", p.ID(v))
			}
			seen[v] = 1
		}
	}
	rep := Report{Feasible: true}
	for _, v := range pl.Unserved {
		if v < 0 || v >= p.N || depot[v] {
			return Report{}, fmtlite.Errorf("unserved list holds %d, which is not a visit", v)
		}
		if seen[v] != 0 {
			return Report{}, fmtlite.Errorf("%s is both served and unserved, or unserved twice", p.ID(v))
		}
		seen[v] = 2
		rep.Unserved = append(rep.Unserved, v)
		rep.UnservedWeight += p.Weight(v)
	}
	for i := 0; i < p.N; i++ {
		if !depot[i] && seen[i] == 0 {
			return Report{}, fmtlite.Errorf("%s is neither served nor listed unserved", p.ID(i))
		}
	}
	for k, r := range pl.Routes {
		rr := evaluateRoute(p, k, r)
		if len(r) > 0 {
			rep.VehiclesUsed++
			rep.Travel += rr.Travel
			rep.Completion += rr.Completion
		}
		if len(rr.Problems) > 0 {
			rep.Feasible = false
			for _, s := range rr.Problems {
				rep.Problems = append(rep.Problems, fmtlite.Sprintf("vehicle %s: %s", vehicleName(p, k), s))
			}
		}
		rep.Routes = append(rep.Routes, rr)
	}
	return rep, nil
}

func vehicleName(p *Problem, k int) string {
	if id := p.Vehicles[k].ID; id != "" {
		return id
	}
	return fmtlite.Sprint(k + 1)
}

// forward drives route r of vehicle v beginning at begin and returns the
// stops, the end, and the first window missed (-1 none).
func forward(p *Problem, v Vehicle, r []int, begin int64) (stops []Stop, end Stop, travel int64) {
	t := begin + p.Service[v.Start]
	prev := v.Start
	for _, i := range r {
		arr := t + p.T(prev, i)
		travel += p.T(prev, i)
		st := max(arr, p.Early[i])
		s := Stop{Node: i, Arrival: arr, Start: st, Wait: st - arr, Departure: st + p.Service[i], Slack: p.Late[i] - st}
		if st > p.Late[i] {
			s.Lateness = st - p.Late[i]
		}
		stops = append(stops, s)
		t = s.Departure
		prev = i
	}
	end = Stop{Node: v.End, Arrival: t, Start: t, Departure: t}
	if v.End != FreeEnd {
		end.Arrival = t + p.T(prev, v.End)
		travel += p.T(prev, v.End)
		end.Start, end.Departure = end.Arrival, end.Arrival
	}
	end.Slack = v.ShiftEnd - end.Arrival
	if end.Arrival > v.ShiftEnd {
		end.Lateness = end.Arrival - v.ShiftEnd
	}
	return stops, end, travel
}

func evaluateRoute(p *Problem, k int, r []int) RouteReport {
	v := p.Vehicles[k]
	rr := RouteReport{Vehicle: k, Visits: append([]int(nil), r...), Begin: v.ShiftStart}
	if len(r) == 0 {
		rr.End = Stop{Node: v.End}
		return rr
	}
	for _, i := range r {
		rr.Load += p.DemandOf(i)
	}
	if rr.Load > v.Capacity {
		rr.Problems = append(rr.Problems, fmtlite.Sprintf("load %d is over the capacity %d", rr.Load, v.Capacity))
	}
	// Earliest schedule: begin at the shift start.
	stops, end, travel := forward(p, v, r, v.ShiftStart)
	rr.Travel, rr.Completion = travel, end.Arrival
	late := false
	for _, s := range stops {
		if s.Lateness > 0 {
			late = true
			rr.Problems = append(rr.Problems, fmtlite.Sprintf("%s starts %d after its latest", p.ID(s.Node), s.Lateness))
		}
	}
	if end.Lateness > 0 {
		late = true
		rr.Problems = append(rr.Problems, fmtlite.Sprintf("ends %d after the shift end", end.Lateness))
	}
	if late {
		rr.Stops, rr.End = stops, end
		rr.Duration = end.Arrival - v.ShiftStart
		return rr
	}
	// The latest begin that keeps every window: walk back from the end.
	// Beginning later never ends the day later by more than the delay, so
	// the latest begin gives the shortest day.
	latest := v.ShiftEnd // latest arrival at the end (or leaving the last visit)
	next := v.End
	for x := len(r) - 1; x >= 0; x-- {
		i := r[x]
		back := latest - p.Service[i]
		if next != FreeEnd {
			back = latest - p.T(i, next) - p.Service[i]
		}
		latest = min(p.Late[i], back)
		next = i
	}
	begin := latest - p.T(v.Start, r[0]) - p.Service[v.Start]
	begin = min(begin, v.ShiftEnd)
	stops, end, _ = forward(p, v, r, begin)
	rr.Begin, rr.Stops, rr.End = begin, stops, end
	rr.Duration = end.Arrival - begin
	if rr.Duration > v.MaxDuration {
		rr.Problems = append(rr.Problems, fmtlite.Sprintf("working day %d is over the longest day %d", rr.Duration, v.MaxDuration))
	}
	return rr
}
