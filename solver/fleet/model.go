// Package fleet plans the day of several vehicles: which vehicle serves
// which visits, in which order, and which visits cannot be served today.
// Each vehicle has a start and an end (or a free end), a shift, a capacity
// and a longest working day; each visit a demand and a priority, beside the
// service time and time window of the single-vehicle engine.
//
// It is the several-vehicle counterpart of package solver and follows its
// rules: it never prints, never reads files, takes a context and reports
// through callbacks. Every time is an int64 in a fixed scale
// (Problem.Scale units per input unit), so that feasibility is exact
// integer arithmetic. Routes are judged with solver's segment summaries
// (solver.JoinSeg), the one concatenation of the project.
package fleet

import (
	"errors"
	"math"

	"visitline/solver"
	"visitline/solver/fmtlite"
)

// NoLimit is the capacity or longest day of a vehicle without one.
const NoLimit int64 = math.MaxInt64 / 4

// FreeEnd as a Vehicle's End means the route ends wherever its last visit
// is (the shift bounds the departure from that visit).
const FreeEnd = -1

// Vehicle is one vehicle of the fleet.
type Vehicle struct {
	ID, Name string
	// Start is the node the vehicle leaves from; End the node it must
	// reach, or FreeEnd.
	Start, End int
	// ShiftStart is the earliest time the vehicle may begin at its start
	// (service at the start, if the start node has one, then leaving);
	// ShiftEnd the latest time it may reach its end (for a free end: leave
	// its last visit). A vehicle's start and end follow its shift, not the
	// windows of those nodes.
	ShiftStart, ShiftEnd int64
	// Capacity bounds the sum of the demands on its route (NoLimit: none).
	Capacity int64
	// MaxDuration bounds its working day, from the begin at the start to
	// the arrival at the end, waiting included (NoLimit: none). The vehicle
	// may begin as late as its windows allow, so the day counted is the
	// shortest one the route permits.
	MaxDuration int64
}

// Problem is one day of a fleet.
type Problem struct {
	Name string
	// IDs are the node ids in input order ("" means the index).
	IDs []string
	N   int
	// Travel is the N×N row-major travel matrix.
	Travel []int64
	// Service, Early and Late are per node, as in solver.Instance.
	Service, Early, Late []int64
	// Demand is what a visit takes from its vehicle's capacity (nil: 0).
	Demand []int64
	// Priority weighs a visit in the first objective, the weight served
	// (nil: 1 each; every value must be 1 or more).
	Priority []int64
	// Scale is the number of internal units in one input unit.
	Scale    int64
	Vehicles []Vehicle
}

// T is the travel time from i to j.
func (p *Problem) T(i, j int) int64 { return p.Travel[i*p.N+j] }

// ID is the display id of node i.
func (p *Problem) ID(i int) string {
	if i >= 0 && i < len(p.IDs) && p.IDs[i] != "" {
		return p.IDs[i]
	}
	return fmtlite.Sprint(i)
}

// InputUnits converts an internal value to input units (minutes for a
// sites file, the file's own unit for a benchmark file).
func (p *Problem) InputUnits(v int64) float64 {
	if p.Scale <= 1 {
		return float64(v)
	}
	return float64(v) / float64(p.Scale)
}

// DemandOf is the demand of node i.
func (p *Problem) DemandOf(i int) int64 {
	if p.Demand == nil {
		return 0
	}
	return p.Demand[i]
}

// Weight is the priority of node i (1 without priorities).
func (p *Problem) Weight(i int) int64 {
	if p.Priority == nil {
		return 1
	}
	return p.Priority[i]
}

// Depots marks the nodes that are a vehicle's start or end: they are not
// visits.
func (p *Problem) Depots() []bool {
	d := make([]bool, p.N)
	for _, v := range p.Vehicles {
		if v.Start >= 0 && v.Start < p.N {
			d[v.Start] = true
		}
		if v.End >= 0 && v.End < p.N {
			d[v.End] = true
		}
	}
	return d
}

// Visits lists the nodes to be served: every node that is no vehicle's
// start or end, in input order.
func (p *Problem) Visits() []int {
	d := p.Depots()
	var out []int
	for i := 0; i < p.N; i++ {
		if !d[i] {
			out = append(out, i)
		}
	}
	return out
}

// maxValue bounds every time, demand and priority so that sums over a few
// thousand of them stay far inside int64.
const maxValue = solver.Horizon

// Validate reports the first structural problem, or nil.
func (p *Problem) Validate() error {
	n := p.N
	if n < 1 {
		return errors.New("problem has no nodes")
	}
	if len(p.Travel) != n*n {
		return fmtlite.Errorf("travel matrix has %d entries, want %d×%d", len(p.Travel), n, n)
	}
	if len(p.Service) != n || len(p.Early) != n || len(p.Late) != n {
		return fmtlite.Errorf("service and windows need %d entries each", n)
	}
	if p.Demand != nil && len(p.Demand) != n {
		return fmtlite.Errorf("demands need %d entries", n)
	}
	if p.Priority != nil && len(p.Priority) != n {
		return fmtlite.Errorf("priorities need %d entries", n)
	}
	for k, v := range p.Travel {
		if v < 0 || v > maxValue {
			return fmtlite.Errorf("travel time from %s to %s is negative or too large", p.ID(k/n), p.ID(k%n))
		}
	}
	for i := 0; i < n; i++ {
		if p.Service[i] < 0 || p.Service[i] > maxValue {
			return fmtlite.Errorf("service time at %s is negative or too large", p.ID(i))
		}
		if p.Late[i] < p.Early[i] {
			return fmtlite.Errorf("window of %s ends before it starts", p.ID(i))
		}
		if d := p.DemandOf(i); d < 0 || d > maxValue {
			return fmtlite.Errorf("demand of %s is negative or too large", p.ID(i))
		}
		if w := p.Weight(i); w < 1 || w > 1_000_000 {
			return fmtlite.Errorf("priority of %s is %d; want 1 to 1000000", p.ID(i), w)
		}
	}
	if len(p.Vehicles) == 0 {
		return errors.New("no vehicles")
	}
	for k, v := range p.Vehicles {
		name := v.ID
		if name == "" {
			name = fmtlite.Sprint(k)
		}
		if v.Start < 0 || v.Start >= n {
			return fmtlite.Errorf("vehicle %s starts at node %d, outside 0..%d", name, v.Start, n-1)
		}
		if v.End != FreeEnd && (v.End < 0 || v.End >= n) {
			return fmtlite.Errorf("vehicle %s ends at node %d, outside 0..%d", name, v.End, n-1)
		}
		if v.ShiftEnd < v.ShiftStart {
			return fmtlite.Errorf("vehicle %s: shift ends before it starts", name)
		}
		if v.Capacity < 0 || v.MaxDuration < 0 {
			return fmtlite.Errorf("vehicle %s: negative capacity or longest day", name)
		}
	}
	return nil
}
