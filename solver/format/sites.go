package format

import (
	"io"
	"math"
	"sort"
	"strconv"
	"strings"
	"time"
	"unicode"

	"visitline/solver/fmtlite"
)

// Column names a sites file may use, by field. Matching ignores case,
// spaces, underscores, hyphens and dots, and anything in parentheses or
// brackets, so "Window start", "window_start" and "Service (min)" all match.
var siteColumns = []struct {
	field    string
	synonyms []string
}{
	{"id", []string{"id", "site", "code", "siteid", "sitecode", "ref", "key", "customer", "customerid", "client", "clientid", "stop", "stopid"}},
	{"name", []string{"name", "sitename", "label", "title", "customername", "clientname", "stopname"}},
	{"earliest", []string{"earliest", "open", "opens", "from", "windowstart", "ready", "readytime", "earlieststart", "slotstart",
		"earliestarrival", "timewindowstart", "twstart", "openfrom", "opensat", "windowopen"}},
	{"latest", []string{"latest", "close", "closes", "to", "windowend", "due", "duetime", "lateststart", "slotend",
		"latestarrival", "timewindowend", "twend", "openuntil", "opento", "closesat", "windowclose"}},
	{"service", []string{"service", "duration", "servicetime", "serviceduration", "dwell", "dwelltime", "servicemin", "serviceminutes"}},
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
	if len(header) > maxHeaderCell {
		return ""
	}
	h := normHeader(header)
	for _, c := range siteColumns {
		for _, s := range c.synonyms {
			if s == h {
				return c.field
			}
		}
	}
	return ""
}

// maxHeaderCell is the longest header cell looked up: no column name is
// longer, and a long cell is not read letter by letter for each name.
const maxHeaderCell = 100

// maxColumns bounds the header of a sites file. The reader uses a dozen
// columns; a file far wider is not a sites file (or lost its line ends).
const maxColumns = 200

// maxColumnWarnings bounds the warnings about ignored columns.
const maxColumnWarnings = 10

// windowWords are words of a header that suggest a time window or a
// service time. A column that holds one but is not a name Visitline reads
// stops the load: skipping it would plan a day with no windows (or no
// service) and call the plan good.
var windowWords = map[string]bool{
	"window": true, "tw": true, "open": true, "opens": true, "opening": true, "close": true, "closes": true, "closing": true,
	"earliest": true, "latest": true, "from": true, "until": true, "till": true, "start": true, "starts": true,
	"end": true, "ends": true, "begin": true, "begins": true, "arrival": true, "arrive": true, "due": true, "ready": true,
	"deadline": true, "slot": true, "service": true, "duration": true, "dwell": true,
}

// looksLikeWindow says whether an unknown header names a window or
// service column in words Visitline does not read.
func looksLikeWindow(h string) bool {
	if len(h) > maxHeaderCell {
		return false
	}
	for _, w := range strings.FieldsFunc(strings.ToLower(h), func(r rune) bool { return !unicode.IsLetter(r) }) {
		if windowWords[w] {
			return true
		}
	}
	return false
}

// acceptedNames lists the names read for the window and service fields,
// for the message that refuses a column.
func acceptedNames() string {
	var parts []string
	for _, c := range siteColumns {
		if c.field != "earliest" && c.field != "latest" && c.field != "service" {
			continue
		}
		parts = append(parts, fmtlite.Sprintf("%s (%s)", c.field, strings.Join(readableNames(c.synonyms), ", ")))
	}
	return strings.Join(parts, "; ")
}

// readableNames writes the synonyms as people would write them.
func readableNames(syn []string) []string {
	spell := map[string]string{"windowstart": "window start", "windowend": "window end", "readytime": "ready time",
		"earlieststart": "earliest start", "lateststart": "latest start", "slotstart": "slot start", "slotend": "slot end",
		"earliestarrival": "earliest arrival", "latestarrival": "latest arrival", "timewindowstart": "time window start",
		"timewindowend": "time window end", "twstart": "tw start", "twend": "tw end", "openfrom": "open from",
		"openuntil": "open until", "opento": "open to", "opensat": "opens at", "closesat": "closes at",
		"windowopen": "window open", "windowclose": "window close", "duetime": "due time", "servicetime": "service time",
		"serviceduration": "service duration", "dwelltime": "dwell time", "servicemin": "service min", "serviceminutes": "service minutes"}
	out := make([]string, len(syn))
	for i, s := range syn {
		if v, ok := spell[s]; ok {
			s = v
		}
		out[i] = s
	}
	return out
}

func isQuiet(h string) bool {
	if len(h) > maxHeaderCell {
		return false
	}
	n := normHeader(h)
	for _, q := range quietColumns {
		if n == q {
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
		return fmtlite.Sprintf("%s (column %q)", field, h)
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
		return nil, tidy(err)
	}
	s, err := parseSites(text, sr.Name, sr.Comma)
	if err != nil {
		return nil, tidy(err)
	}
	tidyWarnings(s.Warnings)
	return s, nil
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
	if line, cols := firstLineColumns(text, comma); cols > maxColumns {
		// Refused before the CSV reader splits a huge line into cells.
		return nil, &ParseError{File: name, Line: line, Field: "header",
			Msg: fmtlite.Sprintf("the first row has %d columns; a sites file has a dozen or so (at most %d). Is this a sites file, and does it have line ends?", cols, maxColumns)}
	}
	var recs []record
	err := eachRecord(text, name, comma, nil, func(line int, f []string) error {
		if len(recs) == 0 && len(f) > maxColumns {
			return &ParseError{File: name, Line: line, Field: "header",
				Msg: fmtlite.Sprintf("the first row has %d columns; a sites file has a dozen or so (at most %d). Is this a sites file, and does it have line ends?", len(f), maxColumns)}
		}
		recs = append(recs, record{line: line, fields: append([]string(nil), f...)})
		return nil
	})
	if err != nil {
		return nil, err
	}
	if len(recs) == 0 {
		return nil, &ParseError{File: name, Line: 1, Field: "header",
			Msg: "no data; want a header row such as id,name,earliest,latest,service then one row per site"}
	}
	s := &Sites{Name: name, Comma: comma, Columns: map[string]int{}, Header: recs[0].fields}
	hl := recs[0].line
	if len(recs[0].fields) > maxColumns {
		return nil, &ParseError{File: name, Line: hl, Field: "header",
			Msg: fmtlite.Sprintf("the first row has %d columns; a sites file has a dozen or so (at most %d). Is this a sites file, and does it have line ends?", len(recs[0].fields), maxColumns)}
	}
	ignored := 0
	for c, h := range recs[0].fields {
		f := fieldOf(h)
		if f == "" {
			if h == "" || isQuiet(h) {
				continue
			}
			if looksLikeWindow(h) {
				return nil, &ParseError{File: name, Line: hl, Column: c + 1, Field: "header",
					Msg: fmtlite.Sprintf("column %s looks like a time window or service time, but it is not a name Visitline reads, and planning without it would be wrong; rename it to one of: %s", clipQ(h), acceptedNames())}
			}
			ignored++
			if ignored <= maxColumnWarnings {
				s.Warnings = append(s.Warnings, Warning{File: name, Line: hl, Column: c + 1, Field: "header",
					Msg: fmtlite.Sprintf("column %s is not one Visitline reads; it is ignored (see the README for the column names)", clipQ(h))})
			}
			continue
		}
		if prev, dup := s.Columns[f]; dup {
			return nil, &ParseError{File: name, Line: hl, Column: c + 1, Field: "header",
				Msg: fmtlite.Sprintf("columns %s and %s both give the %s; keep one", clipQ(recs[0].fields[prev]), clipQ(h), f)}
		}
		s.Columns[f] = c
	}
	if ignored > maxColumnWarnings {
		s.Warnings = append(s.Warnings, Warning{File: name, Line: hl, Field: "header",
			Msg: fmtlite.Sprintf("%d more columns are not ones Visitline reads; they are ignored", ignored-maxColumnWarnings)})
	}
	if len(s.Columns) == 0 {
		return nil, &ParseError{File: name, Line: hl, Field: "header",
			Msg: fmtlite.Sprintf("the first row %s names no known column; want a header row such as id,name,earliest,latest,service", clipQ(strings.Join(recs[0].fields, string(comma))))}
	}
	if !s.Has("id") {
		if !s.Has("name") {
			return nil, &ParseError{File: name, Line: hl, Field: "header",
				Msg: "no id column; want a column named id (or site, code, customer, client or stop) with a unique id per site"}
		}
		s.Columns["id"] = s.Columns["name"]
	}
	for _, pair := range [][2]string{{"x", "y"}, {"y", "x"}, {"lat", "lon"}, {"lon", "lat"}} {
		if s.Has(pair[0]) && !s.Has(pair[1]) {
			return nil, &ParseError{File: name, Line: hl, Column: s.Columns[pair[0]] + 1, Field: "header",
				Msg: fmtlite.Sprintf("a %s column needs a %s column beside it", pair[0], pair[1])}
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
			Msg: fmtlite.Sprintf("more than %d sites; this reader accepts at most %d (see Size limits in the README)", MaxSites, MaxSites)}
	}
	commaDecimal := comma != ','
	width := len(s.Header)
	// read lists the columns Visitline reads, in column order, for the
	// message about a short row.
	type readCol struct {
		col   int
		field string
	}
	var readCols []readCol
	taken := map[int]bool{}
	for _, c := range siteColumns {
		if col, ok := s.Columns[c.field]; ok && !taken[col] {
			taken[col] = true
			readCols = append(readCols, readCol{col, c.field})
		}
	}
	sort.Slice(readCols, func(a, b int) bool { return readCols[a].col < readCols[b].col })
	cell := func(r record, field string) (string, int) {
		c, ok := s.Columns[field]
		if !ok || c >= len(r.fields) {
			return "", c + 1
		}
		return r.fields[c], c + 1
	}
	// Every data error is listed, up to maxErrors; a row with an error is
	// left out of the later checks.
	var errs ErrorList
	fail := func(pe *ParseError) bool {
		errs = append(errs, pe)
		return len(errs) >= maxErrors
	}
	bad := map[int]bool{}
	byID := map[string]int{}
	// Times are read in two passes: the mode and, for dated files, the
	// origin day are known only once every cell has been seen.
	var times []timeCell
	var modeCell *timeCell
rowLoop:
	for _, r := range rows {
		k := len(s.Sites)
		site := Site{Line: r.line, Latest: horizon}
		rowErr := func(col int, field, msg string) bool {
			bad[k] = true
			return fail(&ParseError{File: name, Line: r.line, Column: col, Field: field, Msg: msg})
		}
		for c := width; c < len(r.fields); c++ {
			if r.fields[c] != "" {
				if rowErr(c+1, "row", fmtlite.Sprintf("%d fields but the header names %d columns; quote fields that hold the delimiter %q", len(r.fields), width, string(comma))) {
					break rowLoop
				}
				break
			}
		}
		if len(r.fields) < width {
			// A row that ends early: an error when it leaves out a column
			// Visitline reads (an empty latest would read as "no bound",
			// an empty service as 0); columns Visitline ignores may be
			// left off.
			var missing []string
			for _, rc := range readCols {
				if rc.col >= len(r.fields) {
					missing = append(missing, fmtlite.Sprintf("%s (column %d)", s.colLabel(rc.field), rc.col+1))
				}
			}
			if len(missing) > 0 {
				if rowErr(len(r.fields)+1, "row", fmtlite.Sprintf("%d fields but the header names %d columns; missing %s. Give every column (an empty cell is fine: empty means no bound, or no service)", len(r.fields), width, strings.Join(missing, ", "))) {
					break rowLoop
				}
			}
		}
		id, col := cell(r, "id")
		if id == "" {
			if rowErr(col, s.colLabel("id"), "missing; every site needs a unique id") {
				break rowLoop
			}
		} else if prev, dup := byID[id]; dup {
			if rowErr(col, s.colLabel("id"), fmtlite.Sprintf("%s is used twice (first on line %d); ids must be unique", clipQ(id), s.Sites[prev].Line)) {
				break rowLoop
			}
		} else {
			byID[id] = k
		}
		site.ID = id
		site.Name, _ = cell(r, "name")
		for _, f := range []string{"earliest", "latest"} {
			t, col := cell(r, f)
			if t == "" || t == "-" {
				continue
			}
			tc := timeCell{site: k, field: f, text: t, line: r.line, col: col}
			mode := modeOf(t)
			if mode == Minutes {
				if _, msg := parseMinutesTime(t, commaDecimal); msg != "" {
					if rowErr(col, s.colLabel(f), msg) {
						break rowLoop
					}
					continue
				}
			}
			if modeCell == nil {
				modeCell = &tc
				s.Time.Mode = mode
			} else if mode != s.Time.Mode {
				if rowErr(col, s.colLabel(f), mixMessage(t, mode, *modeCell, s.Time.Mode)) {
					break rowLoop
				}
				continue
			}
			if mode != Minutes {
				st, msg := parseClock(t)
				if msg != "" {
					if rowErr(col, s.colLabel(f), msg) {
						break rowLoop
					}
					continue
				}
				tc.st = st
			}
			times = append(times, tc)
		}
		if t, col := cell(r, "service"); t != "" {
			v, msg := parseDuration(t, commaDecimal)
			if msg != "" {
				if rowErr(col, s.colLabel("service"), msg) {
					break rowLoop
				}
			}
			site.Service = v
		}
		if s.Has("x") {
			x, y, ok, e := readPair(r, s, "x", "y", commaDecimal, math.Inf(1))
			if e != nil && rowErr(e.col, e.field, e.msg) {
				break rowLoop
			}
			site.X, site.Y, site.HasXY = x, y, ok
		}
		if s.Has("lat") {
			lat, lon, ok, e := readPair(r, s, "lat", "lon", commaDecimal, 0)
			if e != nil && rowErr(e.col, e.field, e.msg) {
				break rowLoop
			}
			site.Lat, site.Lon, site.HasLatLon = lat, lon, ok
		}
		if t, col := cell(r, "position"); t != "" {
			p, msg := parsePin(t)
			if msg != "" && rowErr(col, s.colLabel("position"), msg) {
				break rowLoop
			}
			site.Pin = p
		}
		s.Sites = append(s.Sites, site)
	}
	if len(errs) >= maxErrors {
		errs = append(errs, &ParseError{File: name, Field: "sites", Msg: fmtlite.Sprintf("more errors follow; the first %d are listed: fix these and read again", maxErrors)})
		return nil, errs
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
			v, _ = parseMinutesTime(tc.text, commaDecimal) // checked in the first pass
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
		if st.Latest < st.Earliest && !bad[k] {
			line, col := s.pos(k, "latest")
			hint := ""
			if s.Time.Mode == Clock {
				hint = "; a window past midnight needs dates (2026-12-01 23:30)"
			}
			errs = append(errs, &ParseError{File: name, Line: line, Column: col, Field: s.colLabel("latest"),
				Msg: fmtlite.Sprintf("%s is before the earliest %s; want latest at or after earliest%s", s.Time.Format(st.Latest), s.Time.Format(st.Earliest), hint)})
		}
	}
	if len(errs) > 0 {
		sort.SliceStable(errs, func(a, b int) bool { return errs[a].Line < errs[b].Line })
		if len(errs) == 1 {
			return nil, errs[0]
		}
		return nil, errs
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
	return fmtlite.Sprintf("%q is written as %s, but line %d has %q (%s); write every time in the file the same way",
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
		return 0, 0, false, &cellErr{r.line, ca, s.colLabel(fa), fmtlite.Sprintf("missing while %s is given; give both or neither", fb)}
	}
	if tb == "" {
		return 0, 0, false, &cellErr{r.line, cb, s.colLabel(fb), fmtlite.Sprintf("missing while %s is given; give both or neither", fa)}
	}
	num := func(t string, f string, col int, lim float64) (float64, *cellErr) {
		rat, ok := parseDecimal(t, commaDecimal)
		if !ok {
			return 0, &cellErr{r.line, col, s.colLabel(f), fmtlite.Sprintf("%q is not a number; want a decimal number such as 12.5", t)}
		}
		v := rat.Float64()
		if math.Abs(v) > lim {
			return 0, &cellErr{r.line, col, s.colLabel(f), fmtlite.Sprintf("%q is out of range; want -%g to %g in decimal degrees", t, lim, lim)}
		}
		if math.Abs(v) > 1e9 {
			return 0, &cellErr{r.line, col, s.colLabel(f), fmtlite.Sprintf("%q is too large for a coordinate", t)}
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
		return Pin{}, fmtlite.Sprintf("%q: want first, last, or the visit number (1 for the first visit after the start)", t)
	}
	if n > MaxSites {
		return Pin{}, fmtlite.Sprintf("%q is larger than any route can be", t)
	}
	return Pin{Kind: "number", N: n}, ""
}

// firstLineColumns counts the fields of the first line that is not blank
// or a comment, skipping quoted stretches (a quoted field may hold line
// ends: the count then runs on, which only makes it larger).
func firstLineColumns(text string, comma rune) (line, cols int) {
	line = 1
	for text != "" {
		l, rest, _ := strings.Cut(text, "\n")
		t := strings.TrimSpace(l)
		if t == "" || strings.HasPrefix(t, "#") {
			text = rest
			line++
			continue
		}
		cols = 1
		quoted := false
		for _, c := range text {
			switch {
			case c == '"':
				quoted = !quoted
			case c == '\n' && !quoted:
				return line, cols
			case c == comma && !quoted:
				cols++
			}
		}
		return line, cols
	}
	return line, 0
}
