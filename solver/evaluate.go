package solver

import "visitline/solver/fmtlite"

// Visit is one stop of a schedule. All times are in internal units.
type Visit struct {
	Node      int
	Arrival   int64 // when the vehicle gets there
	Start     int64 // when service starts: max(Arrival, Early)
	Wait      int64 // Start - Arrival
	Departure int64 // Start + Service
	// Slack is Late - Start: how much later service could have started
	// within this visit's own window (negative when late).
	Slack int64
	// Lateness is how far Start is past Late (0 when on time).
	Lateness int64
}

// Schedule is the timing of one route, worked out by Evaluate.
type Schedule struct {
	Visits []Visit
	// Return is the arrival back at the start of a closed tour (nil otherwise
	// has Node = -1).
	Return Visit
	// Travel is the sum of the arcs driven, the return of a closed tour included.
	Travel int64
	// Completion is when the route ends: the return to the start of a closed
	// tour, the departure from the last visit of an open one.
	Completion int64
	// TotalLateness sums Lateness over the visits and the return.
	TotalLateness int64
	// LateVisits counts visits (and a late return) with Lateness > 0.
	LateVisits int
	Feasible   bool
}

// Cost is the schedule's value under an objective.
func (s *Schedule) Cost(o Objective) int64 {
	if o == CompletionTime {
		return s.Completion
	}
	return s.Travel
}

// CheckRoute reports why route is not a valid order of the instance's nodes:
// it must start at the start node, hold every node once, and end at the end
// node of a fixed-end path. Windows are not checked here.
func CheckRoute(in *Instance, route []int) error {
	if len(route) != in.N {
		return fmtlite.Errorf("route has %d nodes, want %d", len(route), in.N)
	}
	if route[0] != in.Start {
		return fmtlite.Errorf("route starts at %s, want the start %s", in.ID(route[0]), in.ID(in.Start))
	}
	seen := make([]bool, in.N)
	for k, v := range route {
		if v < 0 || v >= in.N {
			return fmtlite.Errorf("route position %d holds node %d, outside 0..%d", k, v, in.N-1)
		}
		if seen[v] {
			return fmtlite.Errorf("route visits %s twice", in.ID(v))
		}
		seen[v] = true
	}
	if in.Shape == OpenFixed && route[len(route)-1] != in.End {
		return fmtlite.Errorf("route ends at %s, want the end %s", in.ID(route[len(route)-1]), in.ID(in.End))
	}
	for k, v := range in.Fixed {
		if route[k] != v {
			return fmtlite.Errorf("route position %d is %s, but the done visits fix %s there", k, in.ID(route[k]), in.ID(v))
		}
	}
	if in.Position != nil {
		for k, v := range route {
			if p := in.Position[v]; p > 0 && p != k {
				return fmtlite.Errorf("%s is pinned to position %d but is at %d", in.ID(v), p, k)
			}
		}
	}
	return nil
}

// Evaluate works out the schedule of route from scratch, one visit after
// another. It is deliberately plain: the tests use it as the independent
// check of everything the search computes incrementally. The route must pass
// CheckRoute.
//
// Service at a node starts at max(arrival, Early); a start after Late counts
// as lateness and the schedule goes on from that late start.
func Evaluate(in *Instance, route []int) Schedule {
	s := Schedule{Visits: make([]Visit, 0, len(route)), Return: Visit{Node: -1}}
	if len(route) == 0 {
		return s
	}
	t := in.Early[route[0]]
	var prev int = -1
	for _, v := range route {
		arr := t
		if prev >= 0 {
			arr = t + in.T(prev, v)
			s.Travel += in.T(prev, v)
		}
		vis := visitAt(in, v, arr)
		s.TotalLateness += vis.Lateness
		if vis.Lateness > 0 {
			s.LateVisits++
		}
		s.Visits = append(s.Visits, vis)
		t = vis.Departure
		prev = v
	}
	s.Completion = t
	if in.Shape == Closed && len(route) > 1 {
		arr := t + in.T(prev, route[0])
		s.Travel += in.T(prev, route[0])
		r := Visit{Node: route[0], Arrival: arr, Start: arr, Departure: arr, Slack: in.Late[route[0]] - arr}
		if arr > in.Late[route[0]] {
			r.Lateness = arr - in.Late[route[0]]
			s.TotalLateness += r.Lateness
			s.LateVisits++
		}
		s.Return = r
		s.Completion = arr
	}
	s.Feasible = s.TotalLateness == 0
	return s
}

func visitAt(in *Instance, v int, arr int64) Visit {
	st := arr
	if st < in.Early[v] {
		st = in.Early[v]
	}
	vis := Visit{Node: v, Arrival: arr, Start: st, Wait: st - arr, Departure: st + in.Service[v], Slack: in.Late[v] - st}
	if st > in.Late[v] {
		vis.Lateness = st - in.Late[v]
	}
	return vis
}
