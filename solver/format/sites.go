package format

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"time"
	"unicode"
)

// Column names a sites file may use, by field. Matching ignores case,
// spaces, underscores, hyphens and dots, and anything in parentheses or
// brackets, so "Window start", "window_start" and "Service (min)" all match.
var siteColumns = []struct {
	field    string
	synonyms []string
}{
	{"id", []string{"id", "site", "code", "siteid", "sitecode", "ref", "key"}},
	{"name", []string{"name", "sitename", "label", "title"}},
	{"earliest", []string{"earliest", "open", "opens", "from", "windowstart", "ready", "readytime", "earlieststart", "slotstart"}},
	{"latest", []string{"latest", "close", "closes", "to", "windowend", "due", "duetime", "lateststart", "slotend"}},
	{"service", []string{"service", "duration", "servicetime", "serviceduration", "dwell"}},
	{"x", []string{"x"}},
	{"y", []string{"y"}},
	{"lat", []string{"lat", "latitude"}},
	{"lon", []string{"lon", "lng", "long", "longitude"}},
	{"position", []string{"position", "pos", "pin"}},
}

// SiteColumnNames lists, for documentation and error messages, each field
// and the column names accepted for it.
func SiteColumnNames() map[string][]string {
	m := map[string][]string{}
	for _, c := range siteColumns {
		m[c.field] = append([]string(nil), c.synonyms...)
	}
	return m
}

func normHeader(h string) string {
	var b strings.Builder
	depth := 0
	for _, c := range strings.ToLower(h) {
		switch {
		case c == '(' || c == '[':
			depth++
		case c == ')' || c == ']':
			if depth > 0 {
				depth--
			}
		case depth > 0:
		case unicode.IsLetter(c) || unicode.IsDigit(c):
			b.WriteRune(c)
		}
	}
	return b.String()
}

// quietColumns are columns people keep beside their sites that Visitline
// does not read; they are skipped without a warning.
var quietColumns = []string{"notes", "note", "comment", "comments", "remarks", "address", "phone", "contact", "description"}

func fieldOf(header string) string {
	h := normHeader(header)
	for _, c := range siteColumns {
		for _, s := range c.synonyms {
			if normHeader(s) == h {
				return c.field
			}
		}
	}
	return ""
}

func isQuiet(h string) bool {
	for _, q := range quietColumns {
		if normHeader(h) == q {
			return true
		}
	}
	return false
}

// Pin is a position pin as written in a sites file.
type Pin struct {
	// Kind is "" (free), "first", "last" or "number".
	Kind string
	// N is the visit number for Kind "number" (1 = first visit after the start).
	N int
}

// Site is one row of a sites file. Times are internal units (SitesScale
// per minute) from the file's time origin.
type Site struct {
	ID, Name string
	// Line is the line the row starts on.
	Line int
	// Earliest and Latest bound the start of service; an empty cell gives
	// 0 and solver.Horizon.
	Earliest, Latest int64
	Service          int64
	X, Y             float64
	Lat, Lon         float64
	HasXY, HasLatLon bool
	Pin              Pin
}

// Sites is the content of a sites file.
type Sites struct {
	// Name is the file name as given ("" for pasted text).
	Name  string
	Sites []Site
	Time  TimeBase
	// Columns maps each field found to its 0-based column; Header holds the
	// header cells as written.
	Columns map[string]int
	Header  []string
	// Comma is the delimiter used.
	Comma    rune
	Warnings []Warning
}

// Has reports whether the file has a column for field.
func (s *Sites) Has(field string) bool { _, ok := s.Columns[field]; return ok }

// pos returns the error position of field in site k.
func (s *Sites) pos(k int, field string) (line, col int) {
	return s.Sites[k].Line, s.Columns[field] + 1
}

// colLabel names a field in a message as the header wrote it.
func (s *Sites) colLabel(field string) string {
	c, ok := s.Columns[field]
	if !ok {
		return field
	}
	if h := s.Header[c]; normHeader(h) != normHeader(field) {
		return fmt.Sprintf("%s (column %q)", field, h)
	}
	return field
}

// MaxSites bounds the sites a file may hold: the travel matrix grows with
// the square of it.
const MaxSites = 5000

// SitesReader reads a sites file: a header row naming the columns, then one
// row per site. The first site is where the route starts unless the caller
// chooses another. Modelled on encoding/csv: set the fields, then Read.
type SitesReader struct {
	// Name is the file name used in errors ("" for pasted text).
	Name string
	// Comma is the field delimiter. 0 picks tab, semicolon or comma from
	// the first lines.
	Comma rune
	r     io.Reader
}

// NewSitesReader returns a reader of r.
func NewSitesReader(r io.Reader) *SitesReader { return &SitesReader{r: r} }

// ReadSites reads a sites file from r; name is used in errors.
func ReadSites(r io.Reader, name string) (*Sites, error) {
	sr := NewSitesReader(r)
	sr.Name = name
	return sr.Read()
}

// Read reads the whole file.
func (sr *SitesReader) Read() (*Sites, error) {
	text, err := readText(sr.r, sr.Name)
	if err != nil {
		return nil, err
	}
	return parseSites(text, sr.Name, sr.Comma)
}

type cellErr struct {
	line, col int
	field     string
	msg       string
}

func parseSites(text, name string, comma rune) (*Sites, error) {
	if c, t := sepLine(text); c != 0 {
		text = t
		if comma == 0 {
			comma = c
		}
	}
	if comma == 0 {
		comma = sniffComma(text)
		if comma == 0 {
			comma = ','
		}
	}
	recs, err := readRecords(text, name, comma)
	if err != nil {
		return nil, err
	}
	if len(recs) == 0 {
		return nil, &ParseError{File: name, Line: 1, Field: "header",
			Msg: "no data; want a header row such as id,name,earliest,latest,service then one row per site"}
	}
	s := &Sites{Name: name, Comma: comma, Columns: map[string]int{}, Header: recs[0].fields}
	hl := recs[0].line
	for c, h := range recs[0].fields {
		f := fieldOf(h)
		if f == "" {
			if h != "" && !isQuiet(h) {
				s.Warnings = append(s.Warnings, Warning{File: name, Line: hl, Column: c + 1, Field: "header",
					Msg: fmt.Sprintf("column %q is not one Visitline reads; it is ignored (see the README for the column names)", h)})
			}
			continue
		}
		if prev, dup := s.Columns[f]; dup {
			return nil, &ParseError{File: name, Line: hl, Column: c + 1, Field: "header",
				Msg: fmt.Sprintf("columns %q and %q both give the %s; keep one", recs[0].fields[prev], h, f)}
		}
		s.Columns[f] = c
	}
	if len(s.Columns) == 0 {
		return nil, &ParseError{File: name, Line: hl, Field: "header",
			Msg: fmt.Sprintf("the first row %q names no known column; want a header row such as id,name,earliest,latest,service", strings.Join(recs[0].fields, string(comma)))}
	}
	if !s.Has("id") {
		if !s.Has("name") {
			return nil, &ParseError{File: name, Line: hl, Field: "header",
				Msg: "no id column; want a column named id (or site or code) with a unique id per site"}
		}
		s.Columns["id"] = s.Columns["name"]
	}
	for _, pair := range [][2]string{{"x", "y"}, {"y", "x"}, {"lat", "lon"}, {"lon", "lat"}} {
		if s.Has(pair[0]) && !s.Has(pair[1]) {
			return nil, &ParseError{File: name, Line: hl, Column: s.Columns[pair[0]] + 1, Field: "header",
				Msg: fmt.Sprintf("a %s column needs a %s column beside it", pair[0], pair[1])}
		}
	}
	if s.Has("lat") && s.Has("x") {
		s.Warnings = append(s.Warnings, Warning{File: name, Line: hl, Column: s.Columns["x"] + 1, Field: "header",
			Msg: "both x,y and lat,lon are given: travel times use lat,lon and x,y are ignored"})
	}
	rows := recs[1:]
	if len(rows) == 0 {
		return nil, &ParseError{File: name, Line: hl + 1, Field: "sites", Msg: "the header has no sites below it; want one row per site"}
	}
	if len(rows) > MaxSites {
		return nil, &ParseError{File: name, Line: rows[MaxSites].line, Field: "sites",
			Msg: fmt.Sprintf("more than %d sites; this reader accepts at most %d", MaxSites, MaxSites)}
	}
	commaDecimal := comma != ','
	width := len(s.Header)
	cell := func(r record, field string) (string, int) {
		c, ok := s.Columns[field]
		if !ok || c >= len(r.fields) {
			return "", c + 1
		}
		return r.fields[c], c + 1
	}
	byID := map[string]int{}
	// Times are read in two passes: the mode and, for dated files, the
	// origin day are known only once every cell has been seen.
	var times []timeCell
	var modeCell *timeCell
	for k, r := range rows {
		for c := width; c < len(r.fields); c++ {
			if r.fields[c] != "" {
				return nil, &ParseError{File: name, Line: r.line, Column: c + 1, Field: "row",
					Msg: fmt.Sprintf("%d fields but the header names %d columns; quote fields that hold the delimiter %q", len(r.fields), width, string(comma))}
			}
		}
		site := Site{Line: r.line, Latest: horizon}
		id, col := cell(r, "id")
		if id == "" {
			return nil, &ParseError{File: name, Line: r.line, Column: col, Field: s.colLabel("id"), Msg: "missing; every site needs a unique id"}
		}
		if prev, dup := byID[id]; dup {
			return nil, &ParseError{File: name, Line: r.line, Column: col, Field: s.colLabel("id"),
				Msg: fmt.Sprintf("%q is used twice (first on line %d); ids must be unique", id, rows[prev].line)}
		}
		byID[id] = k
		site.ID = id
		site.Name, _ = cell(r, "name")
		for _, f := range []string{"earliest", "latest"} {
			t, col := cell(r, f)
			if t == "" || t == "-" {
				continue
			}
			tc := timeCell{site: k, field: f, text: t, line: r.line, col: col}
			mode := modeOf(t)
			if modeCell == nil {
				modeCell = &tc
				s.Time.Mode = mode
			} else if mode != s.Time.Mode {
				return nil, &ParseError{File: name, Line: r.line, Column: col, Field: s.colLabel(f), Msg: mixMessage(t, mode, *modeCell, s.Time.Mode)}
			}
			if mode != Minutes {
				st, msg := parseClock(t)
				if msg != "" {
					return nil, &ParseError{File: name, Line: r.line, Column: col, Field: s.colLabel(f), Msg: msg}
				}
				tc.st = st
			}
			times = append(times, tc)
		}
		if t, col := cell(r, "service"); t != "" {
			v, msg := parseDuration(t, commaDecimal)
			if msg != "" {
				return nil, &ParseError{File: name, Line: r.line, Column: col, Field: s.colLabel("service"), Msg: msg}
			}
			site.Service = v
		}
		if s.Has("x") {
			x, y, ok, e := readPair(r, s, "x", "y", commaDecimal, math.Inf(1))
			if e != nil {
				return nil, &ParseError{File: name, Line: e.line, Column: e.col, Field: e.field, Msg: e.msg}
			}
			site.X, site.Y, site.HasXY = x, y, ok
		}
		if s.Has("lat") {
			lat, lon, ok, e := readPair(r, s, "lat", "lon", commaDecimal, 0)
			if e != nil {
				return nil, &ParseError{File: name, Line: e.line, Column: e.col, Field: e.field, Msg: e.msg}
			}
			site.Lat, site.Lon, site.HasLatLon = lat, lon, ok
		}
		if t, col := cell(r, "position"); t != "" {
			p, msg := parsePin(t)
			if msg != "" {
				return nil, &ParseError{File: name, Line: r.line, Column: col, Field: s.colLabel("position"), Msg: msg}
			}
			site.Pin = p
		}
		s.Sites = append(s.Sites, site)
	}
	if s.Time.Mode == Dated {
		min := int64(math.MaxInt64)
		for _, tc := range times {
			if tc.st.day < min {
				min = tc.st.day
			}
		}
		s.Time.Origin = unixDay(min)
	}
	origin := int64(0)
	if s.Time.Mode == Dated {
		origin = s.Time.Origin.Unix() / 86400
	}
	for _, tc := range times {
		var v int64
		if s.Time.Mode == Minutes {
			var msg string
			v, msg = parseMinutesTime(tc.text, commaDecimal)
			if msg != "" {
				return nil, &ParseError{File: name, Line: tc.line, Column: tc.col, Field: s.colLabel(tc.field), Msg: msg}
			}
		} else {
			v = tc.st.units(origin)
		}
		// Dates run from year 0 to 9999: ten thousand years is far below
		// solver.Horizon at this scale, and minutes were checked on parsing.
		if tc.field == "earliest" {
			s.Sites[tc.site].Earliest = v
		} else {
			s.Sites[tc.site].Latest = v
		}
	}
	for k := range s.Sites {
		st := &s.Sites[k]
		if st.Latest < st.Earliest {
			line, col := s.pos(k, "latest")
			hint := ""
			if s.Time.Mode == Clock {
				hint = "; a window past midnight needs dates (2026-12-01 23:30)"
			}
			return nil, &ParseError{File: name, Line: line, Column: col, Field: s.colLabel("latest"),
				Msg: fmt.Sprintf("%s is before the earliest %s; want latest at or after earliest%s", s.Time.Format(st.Latest), s.Time.Format(st.Earliest), hint)}
		}
	}
	if s.Time.Mode == Minutes && modeCell != nil {
		maxT := int64(0)
		for _, st := range s.Sites {
			if st.Latest < horizon && st.Latest > maxT {
				maxT = st.Latest
			}
			if st.Earliest > maxT {
				maxT = st.Earliest
			}
		}
		if maxT <= 24*SitesScale {
			s.Warnings = append(s.Warnings, Warning{File: name, Line: modeCell.line, Column: modeCell.col, Field: s.colLabel(modeCell.field),
				Msg: "times are read as minutes from a reference, and every window lies within the first 24 minutes: if these are hours of the day, write them as clock times (08:30)"})
		}
	}
	return s, nil
}

// timeCell is a time cell read in the first pass of parseSites.
type timeCell struct {
	site  int
	field string
	text  string
	line  int
	col   int
	st    stamp
}

func mixMessage(t string, mode TimeMode, first timeCell, fileMode TimeMode) string {
	what := map[TimeMode]string{Minutes: "plain minutes", Clock: "clock times without a date", Dated: "dates with clock times"}
	return fmt.Sprintf("%q is written as %s, but line %d has %q (%s); write every time in the file the same way",
		t, what[mode], first.line, first.text, what[fileMode])
}

func unixDay(day int64) time.Time { return time.Unix(day*86400, 0).UTC() }

// readPair reads a coordinate pair; both cells empty is no pair. limit is
// the largest absolute value allowed for lat (90, lon 180) or +Inf for x,y;
// 0 means latitude and longitude.
func readPair(r record, s *Sites, fa, fb string, commaDecimal bool, limit float64) (a, b float64, ok bool, e *cellErr) {
	get := func(f string) (string, int) {
		c := s.Columns[f]
		if c >= len(r.fields) {
			return "", c + 1
		}
		return r.fields[c], c + 1
	}
	ta, ca := get(fa)
	tb, cb := get(fb)
	if ta == "" && tb == "" {
		return 0, 0, false, nil
	}
	if ta == "" {
		return 0, 0, false, &cellErr{r.line, ca, s.colLabel(fa), fmt.Sprintf("missing while %s is given; give both or neither", fb)}
	}
	if tb == "" {
		return 0, 0, false, &cellErr{r.line, cb, s.colLabel(fb), fmt.Sprintf("missing while %s is given; give both or neither", fa)}
	}
	num := func(t string, f string, col int, lim float64) (float64, *cellErr) {
		rat, ok := parseDecimal(t, commaDecimal)
		if !ok {
			return 0, &cellErr{r.line, col, s.colLabel(f), fmt.Sprintf("%q is not a number; want a decimal number such as 12.5", t)}
		}
		v, _ := rat.Float64()
		if math.Abs(v) > lim {
			return 0, &cellErr{r.line, col, s.colLabel(f), fmt.Sprintf("%q is out of range; want -%g to %g in decimal degrees", t, lim, lim)}
		}
		if math.Abs(v) > 1e9 {
			return 0, &cellErr{r.line, col, s.colLabel(f), fmt.Sprintf("%q is too large for a coordinate", t)}
		}
		return v, nil
	}
	la, lb := limit, limit
	if limit == 0 {
		la, lb = 90, 180
	}
	if a, e = num(ta, fa, ca, la); e != nil {
		return
	}
	if b, e = num(tb, fb, cb, lb); e != nil {
		return
	}
	return a, b, true, nil
}

// parsePin reads a position: first, last, or the visit number (1 is the
// first visit after the start).
func parsePin(t string) (Pin, string) {
	switch strings.ToLower(t) {
	case "first":
		return Pin{Kind: "first"}, ""
	case "last":
		return Pin{Kind: "last"}, ""
	}
	n, err := strconv.Atoi(t)
	if err != nil || n < 1 {
		return Pin{}, fmt.Sprintf("%q: want first, last, or the visit number (1 for the first visit after the start)", t)
	}
	if n > MaxSites {
		return Pin{}, fmt.Sprintf("%q is larger than any route can be", t)
	}
	return Pin{Kind: "number", N: n}, ""
}
