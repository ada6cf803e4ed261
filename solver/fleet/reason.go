package fleet

import "visitline/solver/fmtlite"

// Reason says why a visit is unserved.
type Reason int

const (
	// NoRoom: some vehicle could serve the visit alone, but not beside
	// the visits of more weight (or within the vehicles allowed).
	NoRoom Reason = iota
	// Window: no vehicle can reach the visit within its window.
	Window
	// Capacity: the visit's demand is more than any vehicle carries.
	Capacity
	// Shift: vehicles reach the visit in time, but none can serve it and
	// still end within its shift or its longest day.
	Shift
)

func (r Reason) String() string {
	switch r {
	case NoRoom:
		return "no room"
	case Window:
		return "window"
	case Capacity:
		return "capacity"
	case Shift:
		return "shift"
	}
	return fmtlite.Sprintf("Reason(%d)", int(r))
}

// Sentence says the reason in words.
func (r Reason) Sentence() string {
	switch r {
	case Window:
		return "no vehicle can reach it within its window"
	case Capacity:
		return "its demand is more than any vehicle carries"
	case Shift:
		return "no vehicle can serve it and still end within its shift or its longest day"
	}
	return "a vehicle could serve it alone, but not beside the visits of more weight within the vehicles allowed"
}

// MarshalText writes the short name, for JSON.
func (r Reason) MarshalText() ([]byte, error) { return []byte(r.String()), nil }

// Reasons works out, for each visit, why it cannot be served, by trying it
// alone in every vehicle's route (with Evaluate's plain schedule).
func Reasons(p *Problem, unserved []int) []Reason {
	out := make([]Reason, len(unserved))
	for x, v := range unserved {
		capOK, windowOK := false, false
		reason := Capacity
		for k := range p.Vehicles {
			rr := evaluateRoute(p, k, []int{v})
			if len(rr.Problems) == 0 {
				reason = NoRoom
				break
			}
			if rr.Load > p.Vehicles[k].Capacity {
				continue
			}
			capOK = true
			if len(rr.Stops) == 1 && rr.Stops[0].Lateness == 0 {
				windowOK = true
			}
		}
		if reason != NoRoom {
			switch {
			case !capOK:
				reason = Capacity
			case !windowOK:
				reason = Window
			default:
				reason = Shift
			}
		}
		out[x] = reason
	}
	return out
}
