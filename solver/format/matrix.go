package format

import (
	"errors"
	"io"
	"strings"

	"visitline/solver/fmtlite"
)

// Unit is the unit of the numbers in a travel matrix.
type Unit int

const (
	// UnitMinutes: plain numbers are minutes; H:MM is also read.
	UnitMinutes Unit = iota
	// UnitSeconds: plain numbers are seconds.
	UnitSeconds
)

func (u Unit) String() string {
	if u == UnitSeconds {
		return "seconds"
	}
	return "minutes"
}

// ParseUnit reads "minutes" (or "min", "") and "seconds" (or "s", "sec").
func ParseUnit(s string) (Unit, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "", "minutes", "minute", "min", "m":
		return UnitMinutes, nil
	case "seconds", "second", "sec", "s":
		return UnitSeconds, nil
	}
	return 0, &OptionError{Option: "matrix-unit", Value: s, Msg: "want minutes or seconds"}
}

// Matrix is a travel matrix matched to the sites: Travel[i*N+j] is the
// time from site i to site j in internal units (SitesScale per minute).
type Matrix struct {
	Name   string
	N      int
	Travel []int64
	// rowLine[i] is the line of site i's row; col[j] the 1-based column of
	// site j's times. Warnings use them to point at a cell.
	rowLine []int
	col     []int
}

// Pos returns the line and column of the cell from site i to site j.
func (m *Matrix) Pos(i, j int) (line, col int) { return m.rowLine[i], m.col[j] }

// MatrixReader reads a square travel matrix as pasted from a spreadsheet:
// n rows of n times, optionally with a header row of site ids and a first
// column of site ids, which may list the sites in any order. Without ids
// the rows and columns follow the order of the sites file. The matrix may
// be asymmetric; the diagonal may be empty.
type MatrixReader struct {
	// Name is the file name used in errors ("" for pasted text).
	Name string
	// Comma is the field delimiter; 0 picks tab, semicolon or comma, or
	// runs of spaces when none of them occurs.
	Comma rune
	// Unit of the numbers.
	Unit  Unit
	r     io.Reader
	meter *meter // counts the two passes for Options.Progress
}

// NewMatrixReader returns a reader of r.
func NewMatrixReader(r io.Reader) *MatrixReader { return &MatrixReader{r: r} }

// ReadMatrix reads a travel matrix for the sites ids.
func ReadMatrix(r io.Reader, name string, unit Unit, ids []string) (*Matrix, error) {
	mr := NewMatrixReader(r)
	mr.Name, mr.Unit = name, unit
	return mr.Read(ids)
}

// readMatrixWith reads a travel matrix as Load does, counting its passes
// for opt.Progress.
func readMatrixWith(r io.Reader, opt Options, ids []string) (*Matrix, error) {
	mr := NewMatrixReader(r)
	mr.Name, mr.Unit, mr.meter = opt.MatrixName, opt.MatrixUnit, opt.meter
	return mr.Read(ids)
}

// Read reads the matrix and matches it to ids (the sites in file order).
func (mr *MatrixReader) Read(ids []string) (*Matrix, error) {
	m, err := mr.read(ids)
	if err != nil {
		return nil, tidy(err)
	}
	return m, nil
}

func (mr *MatrixReader) read(ids []string) (*Matrix, error) {
	text, err := readText(mr.r, mr.Name)
	if err != nil {
		return nil, err
	}
	comma := mr.Comma
	if c, t := sepLine(text); c != 0 {
		text = t
		if comma == 0 {
			comma = c
		}
	}
	if comma == 0 {
		comma = sniffComma(text)
	}
	return parseMatrix(text, mr.Name, comma, mr.Unit, ids, mr.meter)
}

// rowShape is what the first pass of parseMatrix keeps of a row: not its
// cells, which the second pass reads straight into the matrix.
type rowShape struct {
	line, width int
	trailing    int    // empty cells at the end
	label       string // the first cell
}

// parseMatrix reads the matrix in two passes over text: the first learns
// the shape (header, labels, widths) keeping a few numbers per row, the
// second reads the cells into the matrix. Memory is the text and the
// matrix, not a string per cell.
func parseMatrix(text, name string, comma rune, unit Unit, ids []string, mt *meter) (*Matrix, error) {
	n := len(ids)
	commaDecimal := comma != ','
	var shapes []rowShape
	var firstRows [][]string // the cells of the first two rows
	err := eachRecord(text, name, comma, mt.pass(), func(line int, f []string) error {
		te := 0
		for te < len(f) && f[len(f)-1-te] == "" {
			te++
		}
		rs := rowShape{line: line, width: len(f), trailing: te}
		if len(f) > 0 {
			rs.label = strings.Clone(f[0])
		}
		shapes = append(shapes, rs)
		if len(firstRows) < 2 {
			row := make([]string, len(f))
			for i, c := range f {
				row[i] = strings.Clone(c)
			}
			firstRows = append(firstRows, row)
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	if len(shapes) == 0 {
		return nil, &ParseError{File: name, Line: 1, Field: "travel matrix", Msg: fmtlite.Sprintf("no data; want %d rows of %d travel times", n, n)}
	}
	isNum := func(s string) bool {
		if s == "" || s == "-" {
			return true
		}
		_, msg := travelValue(s, unit, commaDecimal)
		return msg == ""
	}
	// Spreadsheets may end every row with an empty cell: drop such
	// trailing columns while the rows are wider than they need be.
	trim := shapes[0].trailing
	for _, r := range shapes {
		k := r.trailing
		if r.width-n < k {
			k = r.width - n
		}
		if k < trim {
			trim = k
		}
	}
	if trim < 0 {
		trim = 0
	}
	for k := range shapes {
		shapes[k].width -= trim
	}
	for k := range firstRows {
		firstRows[k] = firstRows[k][:len(firstRows[k])-trim]
	}
	recs := make([]record, len(shapes))
	for k, r := range shapes {
		recs[k].line = r.line
		if k < len(firstRows) {
			recs[k].fields = firstRows[k]
		}
	}
	byID := make(map[string]int, n)
	for i, id := range ids {
		byID[id] = i
	}
	// A header row is there if the first row holds something that is not a
	// time, or if the row count says so (ids may be numbers).
	first := recs[0].fields
	headerByText := false
	for c, f := range first {
		if c == 0 && len(first) == n+1 {
			continue // the corner cell may hold anything ("from\to")
		}
		if !isNum(f) {
			headerByText = true
			break
		}
	}
	hasHeader := len(recs) == n+1 || headerByText
	data := recs
	var header record
	if hasHeader {
		header, data = recs[0], recs[1:]
	}
	shapeErr := func(line int, msg string) error {
		return &ParseError{File: name, Line: line, Field: "travel matrix",
			Msg: msg + fmtlite.Sprintf("; the sites file has %d sites, so want %d rows of %d travel times (optionally with a header row and a first column of site ids)", n, n, n)}
	}
	if len(data) != n {
		line := recs[len(recs)-1].line
		if len(data) > n {
			line = data[n].line
		}
		msg := fmtlite.Sprintf("%d rows of times", len(data))
		if headerByText && len(recs) == n {
			msg += fmtlite.Sprintf(" (line %d was taken as a header of site ids because it holds %q, which is not a travel time)", recs[0].line, firstNonTime(first, isNum))
		}
		return nil, shapeErr(line, msg)
	}
	dataShapes := shapes
	if hasHeader {
		dataShapes = shapes[1:]
	}
	width := len(data[0].fields)
	hasLabels := width == n+1 || !isNum(data[0].fields[0]) && width > 1
	times := func(w int) int {
		if hasLabels {
			return w - 1
		}
		return w
	}
	if hasHeader && hasLabels && len(header.fields) == width && width == n {
		// The header names one site column too few, and the rows agree.
		named := map[string]bool{}
		for _, h := range header.fields[1:] {
			named[h] = true
		}
		var lost []string
		for _, id := range ids {
			if !named[id] {
				lost = append(lost, id)
			}
		}
		miss := ""
		if len(lost) > 0 && len(lost) <= 5 {
			miss = fmtlite.Sprintf("; no column for %s", clip(strings.Join(lost, ", ")))
		}
		return nil, &ParseError{File: name, Line: header.line, Field: "travel matrix",
			Msg: fmtlite.Sprintf("the header names %d site columns and each row has %d travel times, but the sites file has %d sites: want %d, one column per site%s", n-1, n-1, n, n, miss)}
	}
	if hasLabels && width != n+1 || !hasLabels && width != n {
		what := fmtlite.Sprintf("%d travel times", times(width))
		if hasLabels {
			what = fmtlite.Sprintf("a site id and %d travel times", times(width))
		}
		return nil, &ParseError{File: name, Line: data[0].line, Field: "travel matrix",
			Msg: fmtlite.Sprintf("the first row of times has %s; the sites file has %d sites, so want %d, one per site", what, n, n)}
	}
	for r, rec := range dataShapes {
		if rec.width != width {
			row := fmtlite.Sprintf("row %d of the times", r+1)
			if hasLabels {
				row = "row " + clip(rec.label)
			}
			return nil, &ParseError{File: name, Line: rec.line, Field: "travel matrix",
				Msg: fmtlite.Sprintf("%s has %d travel times; want %d, one per site (the matrix must be square, %d×%d)", row, times(rec.width), n, n, n)}
		}
	}
	off := 0
	if hasLabels {
		off = 1
	}
	m := &Matrix{Name: name, N: n, Travel: make([]int64, n*n), rowLine: make([]int, n), col: make([]int, n)}
	// Column c of the times (0-based, labels excluded) belongs to site colSite[c].
	colSite := make([]int, n)
	rowSite := make([]int, n)
	for c := range colSite {
		colSite[c] = c
		rowSite[c] = c
	}
	// seen maps a site to where it was first named ("column 3", "line 4").
	match := func(label string, line, col int, what string, seen map[int]string, here string) (int, error) {
		i, ok := byID[label]
		if !ok {
			hint := ""
			for _, id := range ids {
				if strings.EqualFold(id, label) {
					hint = fmtlite.Sprintf(" (did you mean %q? ids match exactly)", id)
				}
			}
			return 0, &ParseError{File: name, Line: line, Column: col, Field: what,
				Msg: fmtlite.Sprintf("%q is not a site id of the sites file%s; every row and column must name a site", label, hint)}
		}
		if prev, dup := seen[i]; dup {
			return 0, &ParseError{File: name, Line: line, Column: col, Field: what,
				Msg: fmtlite.Sprintf("%q appears twice (first at %s); each site gets one row and one column", label, prev)}
		}
		seen[i] = here
		return i, nil
	}
	if hasHeader {
		labels := header.fields
		start := 0
		switch {
		case len(labels) == n+1:
			start = 1
		case len(labels) == n:
		default:
			return nil, shapeErr(header.line, fmtlite.Sprintf("the header row has %d cells", len(labels)))
		}
		if start == 1 && !hasLabels {
			return nil, &ParseError{File: name, Line: header.line, Field: "travel matrix",
				Msg: fmtlite.Sprintf("the header row has %d cells but the rows have no site id in front; drop the first header cell or add the ids", len(labels))}
		}
		seen := map[int]string{}
		for c := 0; c < n; c++ {
			i, err := match(labels[start+c], header.line, start+c+1, "header", seen, fmtlite.Sprintf("column %d", start+c+1))
			if err != nil {
				return nil, err
			}
			colSite[c] = i
		}
	}
	if hasLabels {
		seen := map[int]string{}
		for r, rec := range dataShapes {
			i, err := match(rec.label, rec.line, 1, "row id", seen, fmtlite.Sprintf("line %d", rec.line))
			if err != nil {
				return nil, err
			}
			rowSite[r] = i
		}
		if !hasHeader {
			// Rows named, columns not: the columns follow the rows' order.
			copy(colSite, rowSite)
		}
	} else if hasHeader {
		copy(rowSite, colSite)
	}
	for c := 0; c < n; c++ {
		m.col[colSite[c]] = c + off + 1
	}
	skip := 0
	if hasHeader {
		skip = 1
	}
	// Every bad cell is listed, up to maxErrors, as the sites reader does.
	var errs ErrorList
	errFull := errors.New("too many errors")
	fail := func(pe *ParseError) error {
		errs = append(errs, pe)
		if len(errs) >= maxErrors {
			return errFull
		}
		return nil
	}
	r := -1
	err = eachRecord(text, name, comma, mt.pass(), func(line int, f []string) error {
		r++
		if r < skip {
			return nil
		}
		i := rowSite[r-skip]
		m.rowLine[i] = line
		row := m.Travel[i*n : i*n+n]
		for c := 0; c < n; c++ {
			j := colSite[c]
			t := f[c+off]
			if i == j && (t == "" || t == "-") {
				continue
			}
			field := func() string { return fmtlite.Sprintf("travel time from %s to %s", ids[i], ids[j]) }
			if t == "" {
				if err := fail(&ParseError{File: name, Line: line, Column: c + off + 1, Field: field(),
					Msg: fmtlite.Sprintf("missing; want %s (0 or more)", unit)}); err != nil {
					return err
				}
				continue
			}
			v, msg := travelValue(t, unit, commaDecimal)
			if msg != "" {
				if err := fail(&ParseError{File: name, Line: line, Column: c + off + 1, Field: field(), Msg: msg}); err != nil {
					return err
				}
				continue
			}
			if i != j {
				row[j] = v
			}
		}
		return nil
	})
	if err == errFull {
		errs = append(errs, &ParseError{File: name, Field: "travel matrix", Msg: fmtlite.Sprintf("more errors follow; the first %d are listed: fix these and read again", maxErrors)})
	} else if err != nil {
		return nil, err
	}
	switch len(errs) {
	case 0:
		return m, nil
	case 1:
		return nil, errs[0]
	default:
		return nil, errs
	}
}

func firstNonTime(fields []string, isNum func(string) bool) string {
	for _, f := range fields {
		if !isNum(f) {
			return f
		}
	}
	return ""
}

// travelValue reads one travel time in unit.
func travelValue(s string, unit Unit, commaDecimal bool) (int64, string) {
	if unit == UnitMinutes {
		v, msg := parseDuration(s, commaDecimal)
		if msg != "" {
			if strings.HasPrefix(strings.TrimSpace(s), "-") {
				return 0, fmtlite.Sprintf("%q is negative; travel times must be 0 or more", s)
			}
			return 0, fmtlite.Sprintf("%q is not a travel time; want minutes (12 or 12.5) or H:MM", s)
		}
		return v, ""
	}
	if v, ok := fastUnits(s, perSecond, commaDecimal); ok {
		return v, ""
	}
	r, ok := parseDecimal(s, commaDecimal)
	if !ok {
		return 0, fmtlite.Sprintf("%q is not a travel time; want seconds (720 or 720.5)", s)
	}
	if r.Sign() < 0 {
		return 0, fmtlite.Sprintf("%q is negative; travel times must be 0 or more", s)
	}
	v, ok := ratUnits(r, perSecond)
	if !ok {
		return 0, fmtlite.Sprintf("%q seconds is too large", s)
	}
	return v, ""
}
