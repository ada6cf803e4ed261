// Package solver is the Visitline engine: it orders one vehicle's visits to
// sites with service times and time windows over an asymmetric travel matrix.
//
// The engine never prints, never reads files and never knows whether it runs
// in a terminal or a browser. It takes an Instance and a context.Context and
// reports through the callbacks in Settings.
//
// Numbers. Every time and duration is an int64 in a fixed scale: one unit of
// the input is Instance.Scale internal units (Scale is a power of ten chosen by
// the reader from the most decimals it saw, so that 45.1774 with Scale 10000 is
// exactly 451774). Feasibility and cost comparisons are exact integer
// arithmetic and never depend on floating-point rounding; InputUnits converts back
// to input units only for display.
package solver

import (
	"errors"
	"math"

	"visitline/solver/fmtlite"
	"visitline/solver/turn"
)

// Shape says how a route ends.
type Shape int

const (
	// Closed tours return to the start node; the return arrival must meet the
	// start node's window.
	Closed Shape = iota
	// OpenFree paths end at whichever node is visited last.
	OpenFree
	// OpenFixed paths end at the node Instance.End.
	OpenFixed
)

func (s Shape) String() string {
	switch s {
	case Closed:
		return "closed"
	case OpenFree:
		return "open"
	case OpenFixed:
		return "open-fixed-end"
	}
	return fmtlite.Sprintf("Shape(%d)", int(s))
}

// Objective says what a plan minimises once every window is met.
type Objective int

const (
	// TravelTime is the sum of the arcs driven; waiting is not counted.
	TravelTime Objective = iota
	// CompletionTime is the time the route ends, waiting counted: the return
	// to the start for a closed tour, the departure from the last visit
	// otherwise.
	CompletionTime
)

func (o Objective) String() string {
	if o == CompletionTime {
		return "completion"
	}
	return "travel"
}

// ParseObjective reads "travel" or "completion".
func ParseObjective(s string) (Objective, error) {
	switch s {
	case "travel", "":
		return TravelTime, nil
	case "completion":
		return CompletionTime, nil
	}
	return 0, fmtlite.Errorf("objective %q: want travel or completion", s)
}

// Horizon is the latest time used for an open window: far enough to never
// bind, small enough that sums of a few thousand of them cannot overflow.
const Horizon int64 = 1 << 50

// OpenEnd says whether a window bound is absent: only Horizon (and above)
// is, so that every output, the explanation and the page agree; a large
// bound that a user wrote is a number, never "open".
func OpenEnd(v int64) bool { return v >= Horizon }

// Instance is one sequencing problem. Build it with a reader from
// solver/format or by hand, then call Prepare (Solve does so itself).
// An Instance must not be changed once solving has begun.
type Instance struct {
	Name string
	// IDs are the site ids in input order; empty means "0", "1", ...
	IDs []string
	// N is the number of nodes, start (and end) included.
	N int
	// Start is the node the route leaves from, at time Early[Start].
	Start int
	// End is the final node of an OpenFixed path; ignored otherwise.
	End   int
	Shape Shape
	// Travel is the N×N row-major matrix: Travel[i*N+j] is the time from i to j.
	Travel []int64
	// Service is the service duration at each node.
	Service []int64
	// Early and Late bound the start of service at each node. For a closed
	// tour, Late[Start] bounds the return.
	Early, Late []int64
	// Scale is the number of internal units in one input unit (1, 10, 100...).
	Scale int64
	// Position pins a node to a place in the route: Position[i] = k > 0 means
	// node i must be the k-th visit after the start; 0 means free. Nil means
	// no pins.
	Position []int
	// Fixed is a prefix of the route that is already driven (the start node
	// first). The engine keeps it as it is and plans the rest after it.
	Fixed []int
}

// T is the travel time from i to j.
func (in *Instance) T(i, j int) int64 { return in.Travel[i*in.N+j] }

// ID is the display id of node i.
func (in *Instance) ID(i int) string {
	if i >= 0 && i < len(in.IDs) && in.IDs[i] != "" {
		return in.IDs[i]
	}
	return fmtlite.Sprint(i)
}

// InputUnits converts an internal value to input units (minutes for a
// sites file, the file's own unit for a benchmark file).
func (in *Instance) InputUnits(v int64) float64 {
	if in.Scale <= 1 {
		return float64(v)
	}
	return float64(v) / float64(in.Scale)
}

// InternalUnits converts a value in input units to internal units,
// rounding to the nearest unit.
func (in *Instance) InternalUnits(f float64) int64 {
	s := in.Scale
	if s < 1 {
		s = 1
	}
	return int64(math.Round(f * float64(s)))
}

// Validate reports the first structural problem of the instance, or nil.
func (in *Instance) Validate() error {
	n := in.N
	if n < 1 {
		return errors.New("instance has no nodes")
	}
	if len(in.Travel) != n*n {
		return fmtlite.Errorf("travel matrix has %d entries, want %d×%d", len(in.Travel), n, n)
	}
	if len(in.Service) != n || len(in.Early) != n || len(in.Late) != n {
		return fmtlite.Errorf("service and windows need %d entries each", n)
	}
	if in.Start < 0 || in.Start >= n {
		return fmtlite.Errorf("start node %d out of range 0..%d", in.Start, n-1)
	}
	if in.Shape == OpenFixed && (in.End < 0 || in.End >= n) {
		return fmtlite.Errorf("end node %d out of range 0..%d", in.End, n-1)
	}
	if in.Shape == OpenFixed && in.End == in.Start && n > 1 {
		return errors.New("an open route cannot end where it starts: use a closed tour")
	}
	// One unsigned comparison per pair (a negative time is a huge
	// unsigned one): this pass is over n² times, 25 million at 5,000 sites.
	// Row by row, giving the host a turn when one is due (GOOS=js).
	for i := 0; i < n; i++ {
		turn.Due()
		for j, v := range in.Travel[i*n : (i+1)*n] {
			if uint64(v) > uint64(Horizon) {
				if v < 0 {
					return fmtlite.Errorf("travel time from %s to %s is negative", in.ID(i), in.ID(j))
				}
				return fmtlite.Errorf("travel time from %s to %s is too large", in.ID(i), in.ID(j))
			}
		}
	}
	for i := 0; i < n; i++ {
		if in.Service[i] < 0 {
			return fmtlite.Errorf("service time at %s is negative", in.ID(i))
		}
		if in.Late[i] < in.Early[i] {
			return fmtlite.Errorf("window of %s ends before it starts", in.ID(i))
		}
	}
	if in.Position != nil && len(in.Position) != n {
		return fmtlite.Errorf("positions need %d entries", n)
	}
	seen := make([]bool, n)
	for k, v := range in.Fixed {
		if v < 0 || v >= n || seen[v] {
			return fmtlite.Errorf("fixed prefix entry %d (%d) is out of range or repeated", k, v)
		}
		seen[v] = true
	}
	if len(in.Fixed) > 0 && in.Fixed[0] != in.Start {
		return errors.New("fixed prefix must begin with the start node")
	}
	return nil
}

// Clone returns a deep copy.
func (in *Instance) Clone() *Instance {
	c := *in
	c.IDs = append([]string(nil), in.IDs...)
	c.Travel = append([]int64(nil), in.Travel...)
	c.Service = append([]int64(nil), in.Service...)
	c.Early = append([]int64(nil), in.Early...)
	c.Late = append([]int64(nil), in.Late...)
	if in.Position != nil {
		c.Position = append([]int(nil), in.Position...)
	}
	c.Fixed = append([]int(nil), in.Fixed...)
	return &c
}
