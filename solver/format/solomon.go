package format

import (
	"io"
	"math"
	"strconv"
	"strings"

	"visitline/solver/fleet"
	"visitline/solver/fmtlite"
)

// SolomonScale is the fixed scale of a Solomon file: one unit of the file
// (time or distance) is a million internal units. Service times, windows
// and demands are whole numbers in the published sets and so are exact;
// travel is the Euclidean distance unrounded, as the research community
// uses it since Solomon (1987), and is stored rounded UP to the next
// millionth (exactly, with integer square roots for whole-number
// coordinates). Rounding up keeps feasibility conservative: every plan
// that meets the windows in these integers meets them with the exact real
// distances too. The cost of a plan of 200 customers is then at most
// 0.0003 above its real-valued length, below the four decimals to which
// best-known distances are published.
const SolomonScale = 1_000_000

// IsSolomon reports whether text is in Solomon's text format: a name line,
// then a line holding VEHICLE.
func IsSolomon(text string) bool {
	text = strings.TrimPrefix(text, "\ufeff")
	k := 0
	// Line by line up to the second: a large paste is not split whole.
	for rest := text; rest != ""; {
		var l string
		l, rest, _ = strings.Cut(rest, "\n")
		t := strings.TrimSpace(l)
		if t == "" {
			continue
		}
		k++
		if k == 2 {
			return strings.EqualFold(t, "VEHICLE")
		}
	}
	return false
}

// solomonColumns are the fields of a CUSTOMER row, in order.
var solomonColumns = []string{"customer number", "x", "y", "demand", "ready time", "due date", "service time"}

// ReadSolomon reads a file in Solomon's text format (Solomon 1987; the
// layout of the Gehring and Homberger 1999 extended sets): a name line;
// VEHICLE, a NUMBER CAPACITY header and one line with the number of
// vehicles and the capacity of each; CUSTOMER, a header line, then one
// line per node: number, x, y, demand, ready time, due date, service time.
// Node 0 is the depot: the vehicles leave it no earlier than its ready
// time and return by its due date. Customer numbers must be 0, 1, 2, ...
// in order, so that a node's index is its customer number. name is used
// in errors.
func ReadSolomon(r io.Reader, name string) (*fleet.Problem, error) {
	text, err := readText(r, name)
	if err != nil {
		return nil, err
	}
	type line struct {
		n    int
		text string
	}
	var lines []line
	for k, l := range strings.Split(text, "\n") {
		if t := strings.TrimSpace(l); t != "" {
			lines = append(lines, line{k + 1, t})
		}
	}
	perr := func(ln, col int, field, msg string) error {
		return &ParseError{File: name, Line: ln, Column: col, Field: field, Msg: msg}
	}
	lastLine := strings.Count(text, "\n") + 1
	need := func(k int, what string) error {
		if k >= len(lines) {
			return perr(lastLine, 0, what, "file ends early; want Solomon's layout: name, VEHICLE, NUMBER CAPACITY, a line with both numbers, CUSTOMER, a header, one line per node")
		}
		return nil
	}
	if err := need(1, "VEHICLE"); err != nil {
		return nil, err
	}
	p := &fleet.Problem{Name: lines[0].text, Scale: SolomonScale}
	if !strings.EqualFold(lines[1].text, "VEHICLE") {
		return nil, perr(lines[1].n, 1, "VEHICLE", fmtlite.Sprintf("%q: want the line VEHICLE after the name", lines[1].text))
	}
	if err := need(2, "NUMBER CAPACITY"); err != nil {
		return nil, err
	}
	if h := strings.Fields(strings.ToUpper(lines[2].text)); len(h) != 2 || h[0] != "NUMBER" || h[1] != "CAPACITY" {
		return nil, perr(lines[2].n, 1, "NUMBER CAPACITY", fmtlite.Sprintf("%q: want the header NUMBER CAPACITY", lines[2].text))
	}
	if err := need(3, "number of vehicles"); err != nil {
		return nil, err
	}
	vf := strings.Fields(lines[3].text)
	if len(vf) != 2 {
		return nil, perr(lines[3].n, 1, "number of vehicles", fmtlite.Sprintf("%q: want two whole numbers, the number of vehicles and the capacity of each", lines[3].text))
	}
	count, err := strconv.Atoi(vf[0])
	if err != nil || count < 1 || count > MaxNodes {
		return nil, perr(lines[3].n, 1, "number of vehicles", fmtlite.Sprintf("%q: want a whole number from 1 to %d", vf[0], MaxNodes))
	}
	capacity, err := strconv.ParseInt(vf[1], 10, 64)
	if err != nil || capacity < 0 || capacity > solverHorizonUnits {
		return nil, perr(lines[3].n, 2, "capacity", fmtlite.Sprintf("%q: want a whole number of 0 or more", vf[1]))
	}
	if err := need(4, "CUSTOMER"); err != nil {
		return nil, err
	}
	if !strings.EqualFold(lines[4].text, "CUSTOMER") {
		return nil, perr(lines[4].n, 1, "CUSTOMER", fmtlite.Sprintf("%q: want the line CUSTOMER before the table of nodes", lines[4].text))
	}
	if err := need(5, "CUSTOMER header"); err != nil {
		return nil, err
	}
	rows := lines[6:]
	if _, err := strconv.ParseFloat(strings.Fields(lines[5].text)[0], 64); err == nil {
		// No header line: the table starts at once.
		rows = lines[5:]
	}
	if len(rows) == 0 {
		return nil, perr(lastLine, 0, "customer number", "no nodes after the CUSTOMER header; want one line per node, the depot first")
	}
	if len(rows) > MaxNodes {
		return nil, perr(rows[MaxNodes].n, 0, "customer number", fmtlite.Sprintf("more than %d nodes", MaxNodes))
	}
	n := len(rows)
	p.N = n
	p.IDs = make([]string, n)
	p.Service, p.Early, p.Late, p.Demand = make([]int64, n), make([]int64, n), make([]int64, n), make([]int64, n)
	xs, ys := make([]coord, n), make([]coord, n)
	for k, row := range rows {
		f := strings.Fields(row.text)
		if len(f) != len(solomonColumns) {
			return nil, perr(row.n, 0, "customer", fmtlite.Sprintf("%d fields, want 7: number, x, y, demand, ready time, due date, service time", len(f)))
		}
		num, err := strconv.Atoi(f[0])
		if err != nil || num != k {
			return nil, perr(row.n, 1, "customer number", fmtlite.Sprintf("%q: want %d (the depot is 0, the customers 1, 2, ... in order)", f[0], k))
		}
		p.IDs[k] = f[0]
		for c := 1; c <= 2; c++ {
			v, ok := parseDecimal(f[c], false)
			if !ok {
				return nil, perr(row.n, c+1, solomonColumns[c], fmtlite.Sprintf("%q is not a number", f[c]))
			}
			if math.Abs(v.Float64()) > 1e9 {
				return nil, perr(row.n, c+1, solomonColumns[c], fmtlite.Sprintf("%q is too large for a coordinate", f[c]))
			}
			cv, ok := coordOf(v)
			if !ok {
				return nil, perr(row.n, c+1, solomonColumns[c], fmtlite.Sprintf("%q has more than %d decimals; want at most %d (distances are worked exactly at that precision)", f[c], maxCoordDecimals, maxCoordDecimals))
			}
			if c == 1 {
				xs[k] = cv
			} else {
				ys[k] = cv
			}
		}
		vals := make([]int64, 4)
		for c := 3; c <= 6; c++ {
			v, err := parseFixed(f[c], 6)
			if err != nil || v < 0 || v > solverHorizonUnits {
				return nil, perr(row.n, c+1, solomonColumns[c], fmtlite.Sprintf("%q: want a number of 0 or more (at most 6 decimals)", f[c]))
			}
			vals[c-3] = v
		}
		if vals[0]%SolomonScale != 0 {
			return nil, perr(row.n, 4, "demand", fmtlite.Sprintf("%q: want a whole number", f[3]))
		}
		p.Demand[k] = vals[0] / SolomonScale
		p.Early[k], p.Late[k], p.Service[k] = vals[1], vals[2], vals[3]
		if p.Late[k] < p.Early[k] {
			return nil, perr(row.n, 6, "due date", fmtlite.Sprintf("%s is before the ready time %s; want a due date at or after it", f[5], f[4]))
		}
		if k == 0 && p.Demand[0] != 0 {
			return nil, perr(row.n, 4, "demand", "the depot (node 0) has a demand; want 0")
		}
	}
	p.Travel = make([]int64, n*n)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			if i != j {
				p.Travel[i*n+j] = euclidUp(xs[i], ys[i], xs[j], ys[j])
			}
		}
	}
	for k := 0; k < count; k++ {
		p.Vehicles = append(p.Vehicles, fleet.Vehicle{ID: strconv.Itoa(k + 1), Start: 0, End: 0,
			ShiftStart: p.Early[0], ShiftEnd: p.Late[0], Capacity: capacity, MaxDuration: fleet.NoLimit})
	}
	// Depot's own window is the shift; its service (0 in the published
	// sets) is kept as the time spent at the start.
	if err := p.Validate(); err != nil {
		return nil, &ParseError{File: name, Msg: err.Error(), Err: err}
	}
	return p, nil
}

// solverHorizonUnits bounds numbers read into internal units.
const solverHorizonUnits = 1 << 50
