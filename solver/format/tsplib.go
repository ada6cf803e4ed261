package format

import (
	"bufio"
	"io"
	"math"
	"strconv"
	"strings"

	"visitline/solver"
	"visitline/solver/fmtlite"
)

// TSPLIB reader. TSPLIB (G. Reinelt, ORSA Journal on Computing 3(4), 1991)
// is the research community's open text format for travelling salesman
// instances: a specification part of "KEYWORD : value" lines, then data
// sections (TSPLIB 95 documentation, sections 1.1 and 1.2). A TSPLIB day has
// no time windows and no service times: a closed tour from the first node.
//
// The reader streams: it keeps the coordinates (or the travel matrix) and
// nothing of the text.

// tsplibKeywords are the specification keywords of TSPLIB 95 (section 1.1)
// and the section names of its data part (section 1.2).
var tsplibKeywords = map[string]bool{
	"NAME": true, "TYPE": true, "COMMENT": true, "DIMENSION": true, "CAPACITY": true,
	"EDGE_WEIGHT_TYPE": true, "EDGE_WEIGHT_FORMAT": true, "EDGE_DATA_FORMAT": true,
	"NODE_COORD_TYPE": true, "DISPLAY_DATA_TYPE": true,
}

// IsTSPLIB reports whether text is a TSPLIB file: its first line that is not
// blank starts with a TSPLIB specification keyword (upper case, as the
// format writes them) and a colon.
func IsTSPLIB(text string) bool {
	text = strings.TrimPrefix(text, "\ufeff")
	for len(text) > 0 {
		line, rest, _ := strings.Cut(text, "\n")
		text = rest
		t := strings.TrimSpace(line)
		if t == "" {
			continue
		}
		key, _, ok := strings.Cut(t, ":")
		return ok && tsplibKeywords[strings.TrimSpace(key)]
	}
	return false
}

// tsplibFile is what the specification part said.
type tsplibFile struct {
	name, typ, weightType, weightFormat string
	dim                                 int
	dimLine                             int
}

// tokenReader hands out the white-space separated tokens of a stream with
// their line and column (the token's number on its line).
type tokenReader struct {
	sc     *bufio.Scanner
	line   int
	fields []string
	next   int
	file   string
}

// nextLine advances to the next line and returns it whole.
func (t *tokenReader) nextLine() (string, bool) {
	if !t.sc.Scan() {
		return "", false
	}
	t.line++
	text := t.sc.Text()
	if t.line == 1 {
		text = strings.TrimPrefix(text, "\ufeff")
	}
	t.fields, t.next = t.fields[:0], 0
	return text, true
}

// token returns the next token of the data part, reading lines as needed.
func (t *tokenReader) token() (tok token, ok bool) {
	for t.next >= len(t.fields) {
		text, ok := t.nextLine()
		if !ok {
			return token{}, false
		}
		t.fields = appendFields(t.fields, text)
	}
	tok = token{t.fields[t.next], t.line, t.next + 1}
	t.next++
	return tok, true
}

// ReadTSPLIB reads a TSPLIB file of TYPE TSP or ATSP with EDGE_WEIGHT_TYPE
// EUC_2D, EUC_3D, MAN_2D, MAN_3D, MAX_2D, MAX_3D, CEIL_2D, ATT, GEO, or
// EXPLICIT (FULL_MATRIX, UPPER_ROW, LOWER_ROW, UPPER_DIAG_ROW,
// LOWER_DIAG_ROW and their column forms), with travel rounded as TSPLIB 95
// defines it (section 2). Every window is open and every service time 0;
// the route is a closed tour from the first node. name is used in errors.
func ReadTSPLIB(r io.Reader, name string) (*solver.Instance, error) {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 64*1024), 64*1024*1024)
	tr := &tokenReader{sc: sc, file: name}
	perr := func(line, col int, field, format string, a ...any) error {
		return &ParseError{File: name, Line: line, Column: col, Field: field, Msg: fmtlite.Sprintf(format, a...)}
	}
	var f tsplibFile
	var coords [][3]float64
	var travel []int64
	haveCoords, haveWeights := false, false
	dims := 0 // coordinates per node
	for {
		text, ok := tr.nextLine()
		if !ok {
			break
		}
		t := strings.TrimSpace(text)
		if t == "" {
			continue
		}
		key, val, hasColon := strings.Cut(t, ":")
		key = strings.ToUpper(strings.TrimSpace(key))
		val = strings.TrimSpace(val)
		if hasColon && tsplibKeywords[key] {
			switch key {
			case "NAME":
				f.name = val
			case "TYPE":
				f.typ = strings.ToUpper(val)
				if f.typ != "TSP" && f.typ != "ATSP" {
					return nil, perr(tr.line, 0, "TYPE", "%q is not a travelling salesman instance; want TSP or ATSP", val)
				}
			case "DIMENSION":
				d, err := strconv.Atoi(val)
				if err != nil || d < 1 {
					return nil, perr(tr.line, 0, "DIMENSION", "%q is not a whole number of nodes of 1 or more", val)
				}
				if d > MaxNodes {
					return nil, perr(tr.line, 0, "DIMENSION", "%d nodes is more than the %d this reader accepts", d, MaxNodes)
				}
				f.dim, f.dimLine = d, tr.line
			case "EDGE_WEIGHT_TYPE":
				f.weightType = strings.ToUpper(val)
				switch f.weightType {
				case "EUC_2D", "MAN_2D", "MAX_2D", "CEIL_2D", "ATT", "GEO":
					dims = 2
				case "EUC_3D", "MAN_3D", "MAX_3D":
					dims = 3
				case "EXPLICIT":
				default:
					return nil, perr(tr.line, 0, "EDGE_WEIGHT_TYPE", "%q is not supported; want EUC_2D, EUC_3D, MAN_2D, MAN_3D, MAX_2D, MAX_3D, CEIL_2D, ATT, GEO or EXPLICIT", val)
				}
			case "EDGE_WEIGHT_FORMAT":
				f.weightFormat = strings.ToUpper(val)
				if _, ok := triangleOf(f.weightFormat); !ok && f.weightFormat != "FULL_MATRIX" && f.weightFormat != "FUNCTION" {
					return nil, perr(tr.line, 0, "EDGE_WEIGHT_FORMAT", "%q is not supported; want FULL_MATRIX, UPPER_ROW, LOWER_ROW, UPPER_DIAG_ROW, LOWER_DIAG_ROW, UPPER_COL, LOWER_COL, UPPER_DIAG_COL or LOWER_DIAG_COL", val)
				}
			}
			continue
		}
		section := strings.ToUpper(strings.TrimSpace(strings.TrimSuffix(t, ":")))
		switch section {
		case "EOF":
			goto done
		case "NODE_COORD_SECTION":
			if f.dim == 0 {
				return nil, perr(tr.line, 0, "NODE_COORD_SECTION", "comes before DIMENSION; want the node count first")
			}
			if dims == 0 {
				if f.weightType == "" {
					return nil, perr(tr.line, 0, "NODE_COORD_SECTION", "comes before EDGE_WEIGHT_TYPE; want the distance function first")
				}
				// EXPLICIT with coordinates: they are for display only.
				if err := skipTokens(tr, f.dim*3, name, "NODE_COORD_SECTION"); err != nil {
					return nil, err
				}
				continue
			}
			var err error
			if coords, err = readCoords(tr, f.dim, dims, name); err != nil {
				return nil, err
			}
			if err := sectionEnd(tr, name, section); err != nil {
				return nil, err
			}
			haveCoords = true
		case "DISPLAY_DATA_SECTION":
			if f.dim == 0 {
				return nil, perr(tr.line, 0, section, "comes before DIMENSION; want the node count first")
			}
			if err := skipTokens(tr, f.dim*3, name, section); err != nil {
				return nil, err
			}
		case "EDGE_WEIGHT_SECTION":
			if f.dim == 0 {
				return nil, perr(tr.line, 0, section, "comes before DIMENSION; want the node count first")
			}
			if f.weightType != "EXPLICIT" {
				return nil, perr(tr.line, 0, section, "given with EDGE_WEIGHT_TYPE %q; want EXPLICIT for a matrix", f.weightType)
			}
			if f.weightFormat == "" || f.weightFormat == "FUNCTION" {
				return nil, perr(tr.line, 0, section, "needs an EDGE_WEIGHT_FORMAT such as FULL_MATRIX or UPPER_ROW before it")
			}
			var err error
			if travel, err = readWeights(tr, f.dim, f.weightFormat, name); err != nil {
				return nil, err
			}
			if err := sectionEnd(tr, name, section); err != nil {
				return nil, err
			}
			haveWeights = true
		case "FIXED_EDGES_SECTION", "TOUR_SECTION", "DEPOT_SECTION", "DEMAND_SECTION", "EDGE_DATA_SECTION":
			return nil, perr(tr.line, 0, section, "is not supported; a travelling salesman day needs only NODE_COORD_SECTION or EDGE_WEIGHT_SECTION")
		default:
			return nil, perr(tr.line, 1, "specification", "%q is not a TSPLIB keyword or section; want lines such as \"DIMENSION : 100\" and a NODE_COORD_SECTION or EDGE_WEIGHT_SECTION", firstField(t))
		}
	}
done:
	if err := sc.Err(); err != nil {
		return nil, &ParseError{File: name, Line: tr.line + 1, Msg: "cannot read: " + err.Error(), Err: err}
	}
	if f.dim == 0 {
		return nil, perr(tr.line+1, 0, "DIMENSION", "missing; want a line \"DIMENSION : n\"")
	}
	if f.weightType == "" {
		return nil, perr(tr.line+1, 0, "EDGE_WEIGHT_TYPE", "missing; want a line such as \"EDGE_WEIGHT_TYPE : EUC_2D\"")
	}
	n := f.dim
	switch {
	case f.weightType == "EXPLICIT" && !haveWeights:
		return nil, perr(tr.line+1, 0, "EDGE_WEIGHT_SECTION", "missing; EDGE_WEIGHT_TYPE EXPLICIT wants the matrix in an EDGE_WEIGHT_SECTION")
	case f.weightType != "EXPLICIT" && !haveCoords:
		return nil, perr(tr.line+1, 0, "NODE_COORD_SECTION", "missing; EDGE_WEIGHT_TYPE %s wants node coordinates", f.weightType)
	case f.weightType != "EXPLICIT":
		travel = make([]int64, n*n)
		dist := tsplibDistance(f.weightType)
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				if i != j {
					travel[i*n+j] = dist(coords[i], coords[j])
				}
			}
		}
	}
	for i := 0; i < n; i++ {
		travel[i*n+i] = 0 // never driven; TSPLIB files often hold a large number
	}
	in := &solver.Instance{Name: name, N: n, Scale: 1, Shape: solver.Closed, Travel: travel,
		Service: make([]int64, n), Early: make([]int64, n), Late: make([]int64, n), IDs: make([]string, n)}
	for i := 0; i < n; i++ {
		in.Late[i] = solver.Horizon
		in.IDs[i] = strconv.Itoa(i + 1) // TSPLIB numbers nodes from 1
	}
	if err := in.Validate(); err != nil {
		return nil, &ParseError{File: name, Msg: err.Error(), Err: err}
	}
	return in, nil
}

func firstField(s string) string {
	if f := strings.Fields(s); len(f) > 0 {
		return f[0]
	}
	return s
}

// sectionEnd refuses numbers left on the line where a section's data ended.
func sectionEnd(tr *tokenReader, name, section string) error {
	if tr.next < len(tr.fields) {
		return &ParseError{File: name, Line: tr.line, Column: tr.next + 1, Field: section,
			Msg: fmtlite.Sprintf("unexpected %q after the section's last number", tr.fields[tr.next])}
	}
	return nil
}

func skipTokens(tr *tokenReader, k int, name, section string) error {
	for i := 0; i < k; i++ {
		if _, ok := tr.token(); !ok {
			return &ParseError{File: name, Line: tr.line + 1, Field: section, Msg: "file ends inside the section"}
		}
	}
	return nil
}

// readCoords reads n lines "node x y [z]" of a NODE_COORD_SECTION.
func readCoords(tr *tokenReader, n, dims int, name string) ([][3]float64, error) {
	coords := make([][3]float64, n)
	seen := make([]bool, n)
	for k := 0; k < n; k++ {
		idx, ok := tr.token()
		if !ok {
			return nil, &ParseError{File: name, Line: tr.line + 1, Field: "NODE_COORD_SECTION",
				Msg: fmtlite.Sprintf("file ends after %d of %d nodes", k, n)}
		}
		i, err := strconv.Atoi(idx.text)
		if err != nil || i < 1 || i > n {
			return nil, &ParseError{File: name, Line: idx.line, Column: idx.col, Field: "node number",
				Msg: fmtlite.Sprintf("%q is not a node number from 1 to %d", idx.text, n)}
		}
		if seen[i-1] {
			return nil, &ParseError{File: name, Line: idx.line, Column: idx.col, Field: "node number",
				Msg: fmtlite.Sprintf("node %d is given twice", i)}
		}
		seen[i-1] = true
		for d := 0; d < dims; d++ {
			c, ok := tr.token()
			if !ok || c.line != idx.line {
				return nil, &ParseError{File: name, Line: idx.line, Field: "coordinates",
					Msg: fmtlite.Sprintf("node %d has %d coordinates, want %d on its line", i, d, dims)}
			}
			v, err := strconv.ParseFloat(c.text, 64)
			if err != nil || math.IsNaN(v) || math.IsInf(v, 0) || math.Abs(v) > 1e12 {
				return nil, &ParseError{File: name, Line: c.line, Column: c.col, Field: "coordinates",
					Msg: fmtlite.Sprintf("%q is not a number", c.text)}
			}
			coords[i-1][d] = v
		}
	}
	return coords, nil
}

// triangleOf says, for a triangular EDGE_WEIGHT_FORMAT, whether rows list
// the upper triangle (j > i) and whether the diagonal is included. A
// column-wise format of a symmetric matrix lists the same numbers as the
// row-wise format of the other triangle (TSPLIB 95, section 1.1,
// EDGE_WEIGHT_FORMAT).
func triangleOf(format string) (t struct{ upper, diag bool }, ok bool) {
	switch format {
	case "UPPER_ROW", "LOWER_COL":
		t.upper = true
	case "LOWER_ROW", "UPPER_COL":
	case "UPPER_DIAG_ROW", "LOWER_DIAG_COL":
		t.upper, t.diag = true, true
	case "LOWER_DIAG_ROW", "UPPER_DIAG_COL":
		t.diag = true
	default:
		return t, false
	}
	return t, true
}

// readWeights reads an EDGE_WEIGHT_SECTION of n nodes in the given format.
//
// The numbers are gathered as they come and the matrix is made only once
// they are all there, so that a short file claiming a large DIMENSION
// costs no more memory than its text.
func readWeights(tr *tokenReader, n int, format, name string) ([]int64, error) {
	read := func(i, j int) (int64, error) {
		t, ok := tr.token()
		if !ok {
			return 0, &ParseError{File: name, Line: tr.line + 1, Field: "EDGE_WEIGHT_SECTION",
				Msg: fmtlite.Sprintf("file ends early, at row %d column %d of the %s matrix of %d nodes", i+1, j+1, format, n)}
		}
		field := fmtlite.Sprintf("travel row %d column %d", i+1, j+1)
		v, err := strconv.ParseInt(t.text, 10, 64)
		if err != nil {
			f, ferr := strconv.ParseFloat(t.text, 64)
			if ferr != nil || f != math.Trunc(f) || math.Abs(f) > 1e15 {
				return 0, &ParseError{File: name, Line: t.line, Column: t.col, Field: field,
					Msg: fmtlite.Sprintf("%q is not a whole number; TSPLIB edge weights are integers", t.text)}
			}
			v = int64(f)
		}
		if v < 0 && i != j {
			return 0, &ParseError{File: name, Line: t.line, Column: t.col, Field: field,
				Msg: fmtlite.Sprintf("%q is negative; travel must be 0 or more", t.text)}
		}
		if v > solver.Horizon && i != j {
			return 0, &ParseError{File: name, Line: t.line, Column: t.col, Field: field,
				Msg: fmtlite.Sprintf("%q is too large (at most %d)", t.text, solver.Horizon)}
		}
		return v, nil
	}
	if format == "FULL_MATRIX" {
		var travel []int64
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				v, err := read(i, j)
				if err != nil {
					return nil, err
				}
				travel = append(travel, v)
			}
		}
		return travel, nil
	}
	tri, _ := triangleOf(format)
	var vals []int64
	for i := 0; i < n; i++ {
		lo, hi := 0, i // lower triangle: j < i (or ≤ i with the diagonal)
		if tri.upper {
			lo, hi = i+1, n
		}
		if tri.diag {
			if tri.upper {
				lo = i
			} else {
				hi = i + 1
			}
		}
		for j := lo; j < hi; j++ {
			v, err := read(i, j)
			if err != nil {
				return nil, err
			}
			vals = append(vals, v)
		}
	}
	travel := make([]int64, n*n)
	k := 0
	for i := 0; i < n; i++ {
		lo, hi := 0, i
		if tri.upper {
			lo, hi = i+1, n
		}
		if tri.diag {
			if tri.upper {
				lo = i
			} else {
				hi = i + 1
			}
		}
		for j := lo; j < hi; j++ {
			travel[i*n+j], travel[j*n+i] = vals[k], vals[k]
			k++
		}
	}
	return travel, nil
}

// nint rounds to the nearest integer as TSPLIB 95 writes it, (int)(x + 0.5)
// (section 2.1).
func nint(x float64) int64 { return int64(x + 0.5) }

// tsplibDistance is the distance function of an EDGE_WEIGHT_TYPE, as
// TSPLIB 95 section 2 defines it.
func tsplibDistance(kind string) func(a, b [3]float64) int64 {
	switch kind {
	case "EUC_2D": // section 2.1
		return func(a, b [3]float64) int64 { return nint(math.Hypot(a[0]-b[0], a[1]-b[1])) }
	case "EUC_3D": // section 2.1
		return func(a, b [3]float64) int64 {
			dx, dy, dz := a[0]-b[0], a[1]-b[1], a[2]-b[2]
			return nint(math.Sqrt(dx*dx + dy*dy + dz*dz))
		}
	case "MAN_2D": // section 2.2
		return func(a, b [3]float64) int64 { return nint(math.Abs(a[0]-b[0]) + math.Abs(a[1]-b[1])) }
	case "MAN_3D": // section 2.2
		return func(a, b [3]float64) int64 {
			return nint(math.Abs(a[0]-b[0]) + math.Abs(a[1]-b[1]) + math.Abs(a[2]-b[2]))
		}
	case "MAX_2D": // section 2.3
		return func(a, b [3]float64) int64 { return max(nint(math.Abs(a[0]-b[0])), nint(math.Abs(a[1]-b[1]))) }
	case "MAX_3D": // section 2.3
		return func(a, b [3]float64) int64 {
			return max(nint(math.Abs(a[0]-b[0])), nint(math.Abs(a[1]-b[1])), nint(math.Abs(a[2]-b[2])))
		}
	case "GEO": // section 2.4
		return geoDistance
	case "ATT": // section 2.5
		return func(a, b [3]float64) int64 {
			dx, dy := a[0]-b[0], a[1]-b[1]
			r := math.Sqrt((dx*dx + dy*dy) / 10.0)
			t := nint(r)
			if float64(t) < r {
				return t + 1
			}
			return t
		}
	case "CEIL_2D": // section 2.6
		return func(a, b [3]float64) int64 { return int64(math.Ceil(math.Hypot(a[0]-b[0], a[1]-b[1]))) }
	}
	panic("tsplibDistance: unchecked EDGE_WEIGHT_TYPE " + kind)
}

// geoRadians turns TSPLIB's DDD.MM (degrees and minutes) into radians with
// TSPLIB's own value of pi (section 2.4). The whole degrees are the
// truncated value: the reading that reproduces the published optimal tour
// lengths of the GEO instances (the section's text writes nint, which
// differs from truncation for 30 minutes or more; that the published values
// rest on truncation is from memory).
func geoRadians(x float64) float64 {
	const pi = 3.141592
	deg := math.Trunc(x)
	min := x - deg
	return pi * (deg + 5.0*min/3.0) / 180.0
}

// geoDistance is TSPLIB's GEO distance in kilometres on the idealised
// sphere of radius 6378.388 km (section 2.4), x the latitude and y the
// longitude.
func geoDistance(a, b [3]float64) int64 {
	const rrr = 6378.388
	latA, lonA := geoRadians(a[0]), geoRadians(a[1])
	latB, lonB := geoRadians(b[0]), geoRadians(b[1])
	q1 := math.Cos(lonA - lonB)
	q2 := math.Cos(latA - latB)
	q3 := math.Cos(latA + latB)
	return int64(rrr*math.Acos(0.5*((1.0+q1)*q2-(1.0-q1)*q3)) + 1.0)
}
