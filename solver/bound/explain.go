package bound

import (
	"context"
	"errors"
	"sort"
	"strconv"
	"strings"

	"visitline/solver"
	"visitline/solver/fmtlite"
)

// FeasibleExists decides whether some route meets every window (and the
// shape, the done visits and the pins). proven is false when the search hit
// its limits or ctx ended before deciding; feasible is then false too.
func FeasibleExists(ctx context.Context, in *solver.Instance) (feasible, proven bool) {
	if in.Validate() != nil {
		return false, true
	}
	ok, pr, _ := decide(ctx, in, 1<<19)
	return ok, pr
}

// decide is FeasibleExists with a stage cap; it also returns a feasible
// route when it finds one.
func decide(ctx context.Context, in *solver.Instance, stageCap int) (feasible, proven bool, route []int) {
	p := newProbCtx(ctx, in)
	if p.cut {
		return false, false, nil
	}
	if p.infeasible {
		return false, true, nil
	}
	y := &yielder{}
	if in.N == 1 {
		return true, true, []int{in.Start}
	}
	// A quick greedy try first: most feasible days are found at once.
	if r := runDP(ctx, p, dpConfig{kind: dpFeasible, beam: 16, y: y}); r.found {
		return true, true, r.route
	}
	// No relaxed path at all proves infeasibility cheaply.
	rx := buildRelax(ctx, p, solver.TravelTime, make([]int64, in.N), nil, 4, 4<<20, y)
	if rx != nil && rx.z == inf {
		return false, true, nil
	}
	for beam := 1024; ; beam *= 16 {
		last := beam >= stageCap
		if last {
			beam = stageCap
		}
		r := runDP(ctx, p, dpConfig{kind: dpFeasible, beam: beam, rx: rx, y: y, maxHistory: 1 << 25})
		if r.found {
			return true, true, r.route
		}
		if !r.complete {
			return false, false, nil
		}
		if !r.dropped {
			return false, true, nil
		}
		if last {
			return false, false, nil
		}
	}
}

// Explanation says why no plan meets every window.
type Explanation struct {
	// Conflict is a small set of visits (node indices, in route-relevant
	// order: by latest start) whose windows and travel times cannot all be
	// honoured together, even with every other visit left out: the start
	// (and the done visits, and the end of a fixed-end route) are always
	// part of the day. Minimal says each set one smaller was proven
	// feasible.
	Conflict    []int
	ConflictIDs []string
	Minimal     bool
	// Widen is the visit whose latest start, moved WidenBy later (internal
	// units), makes the whole day feasible with the least move among the
	// conflict's visits; -1 when none does. WidenExact says WidenBy is the
	// least such move (not only one that works).
	Widen      int
	WidenBy    int64
	WidenExact bool
	// Drop is a visit of the conflict whose removal makes the whole day
	// feasible; -1 when none does (then at least two must go).
	Drop int
	// Pins says the windows could all be met but for the position pins.
	Pins bool
	// Reason says it in one or two plain sentences, with site ids.
	Reason string
}

// ErrFeasible is returned by Explain when the day has a feasible plan.
var ErrFeasible = errors.New("the windows can all be met: there is nothing to explain")

// ErrUndecided is returned by Explain when the search ran out of limits or
// time before it could decide whether the day is feasible.
var ErrUndecided = errors.New("could not decide within the limits whether the windows can all be met")

// Explain finds why an instance with no feasible plan is infeasible: a
// conflict set shrunk until removing any one of its visits makes the rest
// feasible (a deletion filter over sub-instances: the start, the done
// visits and a fixed end plus a subset of the visits, same shape; each
// decided by the exact search), the least widening of one window and the one
// visit to drop that would make the day feasible, and a sentence saying so.
// Position pins are left out of the sub-instances (positions shift when
// visits are removed); when only the pins make the day infeasible, Pins says
// so.
func Explain(ctx context.Context, in *solver.Instance) (Explanation, error) {
	return ExplainWith(ctx, in, ExplainOptions{})
}

// ExplainOptions say how the Reason writes times and sites. Nil functions
// write internal times in input units and sites by id.
type ExplainOptions struct {
	// FormatTime writes a point in time (a window bound, a departure).
	FormatTime func(int64) string
	// FormatDuration writes a length of time (a widening).
	FormatDuration func(int64) string
	// Name names a node in the sentence (for example its site name).
	Name func(int) string
}

// ExplainWith is Explain with the Reason written the caller's way.
func ExplainWith(ctx context.Context, in *solver.Instance, eo ExplainOptions) (Explanation, error) {
	ex := Explanation{Widen: -1, Drop: -1}
	if err := in.Validate(); err != nil {
		return ex, err
	}
	ok, proven, _ := decide(ctx, in, 1<<19) // FeasibleExists, in validated
	if ok {
		return ex, ErrFeasible
	}
	if !proven {
		return ex, ErrUndecided
	}
	free := in
	if hasPins(in) {
		free = in.Clone()
		free.Position = nil
		ok, proven := FeasibleExists(ctx, free)
		if !proven {
			return ex, ErrUndecided
		}
		if ok {
			ex.Pins = true
			for v, k := range in.Position {
				if k > 0 {
					ex.Conflict = append(ex.Conflict, v)
					ex.ConflictIDs = append(ex.ConflictIDs, in.ID(v))
				}
			}
			ex.Reason = fmtlite.Sprintf("The windows can all be met, but not with the pinned positions of %s: free one of the pins.", joinIDs(ex.ConflictIDs))
			return ex, nil
		}
	}
	frame, cands := splitFrame(free)
	// Order the candidates by tightened latest start: conflicts are mostly
	// among visits with neighbouring deadlines.
	p := newProbCtx(ctx, free)
	if p.cut {
		return ex, ErrUndecided
	}
	sort.SliceStable(cands, func(a, b int) bool {
		if p.lt[cands[a]] != p.lt[cands[b]] {
			return p.lt[cands[a]] < p.lt[cands[b]]
		}
		return cands[a] < cands[b]
	})
	// test reports whether the sub-day with these visits is proven
	// infeasible (known: the answer is proven either way).
	test := func(set []int) (infeasible, known bool) {
		ok, pr, _ := decide(ctx, subInstance(free, frame, set), 1<<17)
		return !ok && pr, pr
	}
	conflict := smallConflict(ctx, cands, test)
	if conflict == nil {
		conflict = growConflict(ctx, cands, test)
	}
	if conflict == nil {
		if ctx.Err() != nil {
			return ex, ErrUndecided
		}
		conflict = append([]int(nil), cands...)
	}
	conflict, ex.Minimal = shrink(ctx, conflict, test)
	ex.Conflict = conflict
	for _, v := range conflict {
		ex.ConflictIDs = append(ex.ConflictIDs, in.ID(v))
	}
	// The least widening of one window of the conflict.
	for _, v := range conflict {
		by, exact, ok := widening(ctx, in, v)
		if ok && (ex.Widen < 0 || by < ex.WidenBy || by == ex.WidenBy && exact && !ex.WidenExact) {
			ex.Widen, ex.WidenBy, ex.WidenExact = v, by, exact
		}
	}
	// One visit to drop.
	for _, v := range conflict {
		rest := make([]int, 0, len(cands))
		for _, c := range cands {
			if c != v {
				rest = append(rest, c)
			}
		}
		if ok, pr, _ := decide(ctx, subInstance(free, frame, rest), 1<<19); ok && pr {
			ex.Drop = v
			break
		}
	}
	ex.Reason = reason(in, ex, eo)
	return ex, nil
}

func hasPins(in *solver.Instance) bool {
	for _, k := range in.Position {
		if k > 0 {
			return true
		}
	}
	return false
}

// splitFrame separates the nodes every sub-day keeps (the start, the done
// visits, a fixed end) from the visits a conflict is drawn from.
func splitFrame(in *solver.Instance) (frame, cands []int) {
	inFrame := make([]bool, in.N)
	frame = append(frame, in.Start)
	inFrame[in.Start] = true
	for _, v := range in.Fixed {
		if !inFrame[v] {
			frame = append(frame, v)
			inFrame[v] = true
		}
	}
	if in.Shape == solver.OpenFixed && !inFrame[in.End] {
		frame = append(frame, in.End)
		inFrame[in.End] = true
	}
	for v := 0; v < in.N; v++ {
		if !inFrame[v] {
			cands = append(cands, v)
		}
	}
	return frame, cands
}

// subInstance is the day with only the frame and the given visits, same
// shape, times and ids; the done prefix is kept.
func subInstance(in *solver.Instance, frame, set []int) *solver.Instance {
	nodes := append(append([]int(nil), frame...), set...)
	m := len(nodes)
	idx := make(map[int]int, m)
	for k, v := range nodes {
		idx[v] = k
	}
	s := &solver.Instance{Name: in.Name, N: m, Scale: in.Scale, Shape: in.Shape, Start: idx[in.Start],
		Travel: make([]int64, m*m), Service: make([]int64, m), Early: make([]int64, m), Late: make([]int64, m), IDs: make([]string, m)}
	if in.Shape == solver.OpenFixed {
		s.End = idx[in.End]
	}
	for a, u := range nodes {
		s.IDs[a] = in.ID(u)
		s.Service[a], s.Early[a], s.Late[a] = in.Service[u], in.Early[u], in.Late[u]
		for b, v := range nodes {
			s.Travel[a*m+b] = in.T(u, v)
		}
	}
	for _, v := range in.Fixed {
		s.Fixed = append(s.Fixed, idx[v])
	}
	return s
}

// smallConflict looks for an infeasible set of one, two or (for small days)
// three visits; sets found this way are minimal by construction, since every
// smaller set was tested first.
func smallConflict(ctx context.Context, cands []int, test func([]int) (bool, bool)) []int {
	for _, v := range cands {
		if bad, _ := test([]int{v}); bad {
			return []int{v}
		}
	}
	if len(cands) > 120 || ctx.Err() != nil {
		return nil
	}
	for a := 0; a < len(cands); a++ {
		for b := a + 1; b < len(cands); b++ {
			if bad, _ := test([]int{cands[a], cands[b]}); bad {
				return []int{cands[a], cands[b]}
			}
		}
		if ctx.Err() != nil {
			return nil
		}
	}
	if len(cands) > 30 {
		return nil
	}
	for a := 0; a < len(cands); a++ {
		for b := a + 1; b < len(cands); b++ {
			for c := b + 1; c < len(cands); c++ {
				if bad, _ := test([]int{cands[a], cands[b], cands[c]}); bad {
					return []int{cands[a], cands[b], cands[c]}
				}
			}
		}
		if ctx.Err() != nil {
			return nil
		}
	}
	return nil
}

// growConflict adds visits in deadline order until the sub-day becomes
// infeasible (doubling, then bisecting the prefix length), and returns that
// prefix. Removing a visit can make travel longer when times break the
// triangle inequality, so infeasibility of prefixes need not be monotone:
// the result is checked, not assumed.
func growConflict(ctx context.Context, cands []int, test func([]int) (bool, bool)) []int {
	hi := 4
	for ; ; hi *= 2 {
		if hi >= len(cands) {
			hi = len(cands)
		}
		if bad, _ := test(cands[:hi]); bad {
			break
		}
		if hi == len(cands) || ctx.Err() != nil {
			return nil
		}
	}
	lo := hi / 2 // cands[:lo] was found feasible (or is the first try)
	for lo+1 < hi && ctx.Err() == nil {
		mid := (lo + hi) / 2
		if bad, _ := test(cands[:mid]); bad {
			hi = mid
		} else {
			lo = mid
		}
	}
	return append([]int(nil), cands[:hi]...)
}

// shrink is the deletion filter: drop each visit whose removal leaves the
// set infeasible, and repeat until a whole pass drops nothing, so that at
// the end each removal was tested against the final set. minimal says each
// of those tests proved the smaller set feasible.
func shrink(ctx context.Context, set []int, test func([]int) (bool, bool)) ([]int, bool) {
	set = append([]int(nil), set...)
	for pass := 0; pass < 10; pass++ {
		removed := false
		minimal := true
		for k := 0; k < len(set); {
			if ctx.Err() != nil {
				return set, false
			}
			rest := append(append([]int(nil), set[:k]...), set[k+1:]...)
			bad, known := test(rest)
			if bad {
				set = rest
				removed = true
				continue
			}
			if !known {
				minimal = false
			}
			k++
		}
		if !removed {
			return set, minimal
		}
	}
	return set, false
}

// widening finds the least move of v's latest start that makes the whole day
// feasible: the least start of service at v over routes that meet every
// other window. exact is false when the search had to cut labels.
func widening(ctx context.Context, in *solver.Instance, v int) (by int64, exact, ok bool) {
	w := in.Clone()
	w.Late[v] = solver.Horizon
	if v == w.Start {
		return 0, false, false
	}
	p := newProbCtx(ctx, w)
	if p.cut || p.infeasible {
		return 0, false, false
	}
	y := &yielder{}
	for beam := 4096; ; beam *= 16 {
		last := beam >= 1<<19
		if last {
			beam = 1 << 19
		}
		r := runDP(ctx, p, dpConfig{kind: dpMinStart, target: v, beam: beam, y: y, maxHistory: 1 << 25})
		if !r.complete {
			return 0, false, false
		}
		if r.found && (!r.dropped || last) {
			sch := solver.Evaluate(in, r.route)
			for _, vis := range sch.Visits {
				if vis.Node == v {
					return vis.Start - in.Late[v], !r.dropped, true
				}
			}
			return 0, false, false
		}
		if !r.dropped {
			return 0, true, false // no widening of v alone helps
		}
		if last {
			return 0, false, false
		}
	}
}

// reason writes the explanation as plain sentences with site names.
func reason(in *solver.Instance, ex Explanation, eo ExplainOptions) string {
	plain := func(v int64) string { return strconv.FormatFloat(in.InputUnits(v), 'f', -1, 64) }
	ft, fd, name := eo.FormatTime, eo.FormatDuration, eo.Name
	if ft == nil {
		ft = plain
	}
	if fd == nil {
		fd = plain
	}
	if name == nil {
		name = in.ID
	}
	num := func(v int64) string {
		if solver.OpenEnd(v) {
			return "open"
		}
		return ft(v)
	}
	win := func(v int) string {
		return fmtlite.Sprintf("%s [%s, %s]", name(v), num(in.Early[v]), num(in.Late[v]))
	}
	var parts []string
	for _, v := range ex.Conflict {
		parts = append(parts, win(v))
	}
	var b strings.Builder
	from := "leaving the start " + name(in.Start) + " at " + num(in.Early[in.Start])
	if len(in.Fixed) > 1 {
		from = "after the visits already done"
	}
	switch len(ex.Conflict) {
	case 0:
		fmtlite.Fprintf(&b, "No visit can be added to the route as it stands (%s).", from)
	case 1:
		fmtlite.Fprintf(&b, "The window of %s cannot be met even with no other visit, %s", win(ex.Conflict[0]), from)
	default:
		fmtlite.Fprintf(&b, "The windows of %s cannot all be met together, in any order, %s", joinIDs(parts), from)
	}
	if len(ex.Conflict) > 0 {
		switch {
		case in.Shape == solver.Closed && !solver.OpenEnd(in.Late[in.Start]):
			fmtlite.Fprintf(&b, " and returning by %s.", num(in.Late[in.Start]))
		case in.Shape == solver.OpenFixed:
			fmtlite.Fprintf(&b, " and ending at %s.", win(in.End))
		default:
			b.WriteString(".")
		}
	}
	var fixes []string
	if ex.Widen >= 0 {
		q := ""
		if !ex.WidenExact {
			q = " (perhaps less)"
		}
		fixes = append(fixes, fmtlite.Sprintf("moving the latest start of %s later by %s%s", name(ex.Widen), fd(ex.WidenBy), q))
	}
	if ex.Drop >= 0 {
		fixes = append(fixes, "leaving out "+name(ex.Drop))
	}
	if len(fixes) > 0 {
		fmtlite.Fprintf(&b, " The day becomes feasible by %s.", strings.Join(fixes, ", or by "))
	} else if len(ex.Conflict) > 1 {
		b.WriteString(" No single widening or dropped visit among them is enough.")
	}
	return b.String()
}

func joinIDs(ids []string) string {
	switch len(ids) {
	case 0:
		return ""
	case 1:
		return ids[0]
	}
	return strings.Join(ids[:len(ids)-1], ", ") + " and " + ids[len(ids)-1]
}
