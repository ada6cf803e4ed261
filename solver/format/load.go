package format

import (
	"bufio"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"

	"visitline/solver"
	"visitline/solver/fmtlite"
)

// Options say how to turn a sites file (and a travel matrix) into an
// instance. The zero value reads a closed tour from the first site, a
// matrix in minutes, and travel from coordinates at DefaultSpeedKmh with
// DefaultRoadFactor for lat,lon.
type Options struct {
	// SitesName and MatrixName are the file names used in errors and
	// warnings ("" for pasted text).
	SitesName, MatrixName string
	// MatrixUnit is the unit of the matrix's plain numbers.
	MatrixUnit Unit
	// Speed is the travel speed for coordinates, in km/h for lat,lon and
	// in x,y units per hour for x,y. 0 means DefaultSpeedKmh.
	Speed float64
	// RoadFactor multiplies straight-line distances. 0 means
	// DefaultRoadFactor for lat,lon and 1 for x,y; otherwise at least 1.
	RoadFactor float64
	// Start is the id of the site the route leaves from; "" is the first site.
	Start string
	// End says where the route ends: "" or "start" for a closed tour back to
	// the start, "free" for an open path that ends at its last visit, or a
	// site id for an open path that ends there.
	End string
	// ShiftStart, when set, is the time the route leaves the start, written
	// like the file's times (08:00, or minutes). Default: the start site's
	// earliest.
	ShiftStart string
	// Done lists the ids of visits already made, in the order made; the
	// vehicle is at the last one. The rest is planned again from there
	// (see Load).
	Done []string
	// Now is the time the vehicle leaves the last done visit. Default: the
	// departure worked out by driving the done visits in order from the
	// start.
	Now string
	// Progress, when set, is called as the readers get through the input:
	// done bytes of total (the sites input once, a travel matrix twice,
	// for its two passes; total is 0 when the readers cannot tell the
	// sizes, as for a pipe). An error it returns ends the load with that
	// error: the web worker reports progress and takes a cancel through it.
	// It is called often (about every 4 KiB and every row): it should be
	// cheap.
	Progress func(done, total int64) error

	meter *meter
}

// Dataset is an instance with what the plan writers need to speak the
// user's language: site names, how times are written, the warnings.
type Dataset struct {
	Instance *solver.Instance
	// Names are the site names by node ("" when none).
	Names []string
	// Time says what time 0 is and how to write times back.
	Time TimeBase
	// Unit is "min" for sites files. Benchmark files leave it "": their
	// unit is not stated.
	Unit string
	// Sites is the parsed sites file (nil for a benchmark file).
	Sites *Sites
	// Lines is the sites-file line of each node (0 when unknown).
	Lines []int
	// LatLon holds [lat, lon] per node when travel came from lat,lon.
	LatLon [][2]float64
	// Done lists the ids of visits already made (re-planned away); At is
	// the id of the site the re-planned route leaves from, Now when.
	Done []string
	At   string
	Now  int64
	// Travel says where the travel times came from, for display:
	// "matrix", "lat,lon at 50 km/h, road factor 1.3", "x,y ...",
	// "benchmark".
	Travel   string
	Warnings []Warning
	// RouteStart and RouteEnd are the start and end asked for (RouteEnd:
	// start, free or a site id), before any re-planning after done visits.
	RouteStart, RouteEnd string
}

// Name of a node: its site name, else its id.
func (d *Dataset) Name(i int) string {
	if i >= 0 && i < len(d.Names) && d.Names[i] != "" {
		return d.Names[i]
	}
	return d.Instance.ID(i)
}

// FormatTime writes an internal time as the input wrote its times.
func (d *Dataset) FormatTime(v int64) string {
	if d.Unit == "" {
		return fnum(d.Instance.InputUnits(v))
	}
	return d.Time.Format(v)
}

// FormatDuration writes an internal duration in the input's unit.
func (d *Dataset) FormatDuration(v int64) string {
	if d.Unit == "" {
		return fnum(d.Instance.InputUnits(v))
	}
	return FormatMinutes(v)
}

// ParseTime reads a time written like the input's times.
func (d *Dataset) ParseTime(s string) (int64, error) {
	if d.Unit == "" {
		v, err := parseFixed(strings.TrimSpace(s), decimalsOf(d.Instance.Scale))
		if err != nil || v < 0 {
			return 0, fmtlite.Errorf("%q: want a time of 0 or more in the file's units", s)
		}
		return v, nil
	}
	return d.Time.Parse(s)
}

func decimalsOf(scale int64) int {
	d := 0
	for s := scale; s >= 10; s /= 10 {
		d++
	}
	return d
}

// IsBenchmark reports whether text is in the plain benchmark matrix
// format: its first line that is not blank or a '#' comment holds a whole
// number alone.
func IsBenchmark(text string) bool {
	text = strings.TrimPrefix(text, "\ufeff")
	for _, l := range strings.FieldsFunc(text, func(r rune) bool { return r == '\n' || r == '\r' }) {
		t := strings.TrimSpace(l)
		if t == "" || strings.HasPrefix(t, "#") {
			continue
		}
		_, err := strconv.Atoi(t)
		return err == nil
	}
	return false
}

// Load reads sites (a sites file, or a file in the benchmark matrix
// format, told apart by content) and matrix (nil: travel from the sites'
// coordinates) into a Dataset, applying opt. The command line and the web
// worker both call it: the command line opens files, the worker passes
// pasted text.
//
// Done visits are re-planned rather than kept as a fixed prefix: the new
// instance starts at the last done site at time Now, holds only the visits
// still to make, and ends where the original route ends (a closed tour
// becomes a path back to the original start). Pins by number count from
// the original start, so each moves forward by the number of visits done;
// a pin whose place has passed is dropped with a warning.
func Load(sites io.Reader, matrix io.Reader, opt Options) (*Dataset, error) {
	opt.meter = newMeter(opt.Progress, sites, matrix)
	if opt.meter != nil {
		sites = opt.meter.reader(sites)
	}
	d, err := load(sites, matrix, opt)
	if e := opt.meter.failed(); e != nil {
		// Progress said stop: that is the answer, not what a reader made of it.
		return nil, e
	}
	if err != nil {
		return nil, tidy(err)
	}
	tidyWarnings(d.Warnings)
	if d.Instance != nil && d.Instance.N >= 1000 {
		// Hand the readers' garbage (the lines of text, 96 MB for a
		// 5,000-site benchmark file) back to the system now: freed but kept,
		// it would stay resident beside the engine's copy of the matrix,
		// which cannot reuse its scattered small pieces.
		freeMemory()
	}
	return d, nil
}

// peekSize is how much of the input Load looks at to tell a benchmark
// file from a sites file without reading it all.
const peekSize = 64 << 10

func load(sites io.Reader, matrix io.Reader, opt Options) (*Dataset, error) {
	br := bufio.NewReaderSize(sites, peekSize)
	head, _ := br.Peek(peekSize)
	// A TSPLIB file says so in its first line; then it is neither of the
	// other two formats.
	tsp := IsTSPLIB(string(head))
	bench, sure := false, true
	if !tsp {
		bench, sure = benchmarkHead(head, len(head) < peekSize)
	}
	var d *Dataset
	if tsp {
		if matrix != nil {
			return nil, &ParseError{File: opt.MatrixName, Field: "travel matrix",
				Msg: fmtlite.Sprintf("%s is a TSPLIB file, which holds its own travel; give no separate matrix", nameOr(opt.SitesName))}
		}
		in, err := ReadTSPLIB(br, opt.SitesName)
		if err != nil {
			return nil, err
		}
		d = &Dataset{Instance: in, Names: make([]string, in.N), Lines: make([]int, in.N), Travel: "TSPLIB"}
	}
	if !sure {
		// The first line that says what the file is lies beyond the
		// look-ahead: read it all to decide.
		text, err := readText(br, opt.SitesName)
		if err != nil {
			return nil, err
		}
		bench = IsBenchmark(text)
		if !bench {
			s, err := parseSites(text, opt.SitesName, 0)
			if err != nil {
				return nil, err
			}
			if d, err = fromSites(s, matrix, opt); err != nil {
				return nil, err
			}
		}
		br = bufio.NewReader(strings.NewReader(text))
	}
	if bench {
		if matrix != nil {
			return nil, &ParseError{File: opt.MatrixName, Field: "travel matrix",
				Msg: fmtlite.Sprintf("%s is in the benchmark matrix format, which holds its own travel times; give no separate matrix", nameOr(opt.SitesName))}
		}
		in, err := readBenchmark(br, opt.SitesName)
		if err != nil {
			return nil, err
		}
		d = &Dataset{Instance: in, Names: make([]string, in.N), Lines: make([]int, in.N), Travel: "benchmark"}
		in.IDs = make([]string, in.N)
		for i := range in.IDs {
			in.IDs[i] = strconv.Itoa(i)
		}
	} else if d == nil {
		text, err := readText(br, opt.SitesName)
		if err != nil {
			return nil, err
		}
		s, err := parseSites(text, opt.SitesName, 0)
		if err != nil {
			return nil, err
		}
		if d, err = fromSites(s, matrix, opt); err != nil {
			return nil, err
		}
	}
	if err := d.applyRoute(opt); err != nil {
		return nil, err
	}
	if err := d.Instance.Validate(); err != nil {
		return nil, &ParseError{File: opt.SitesName, Msg: err.Error(), Err: err}
	}
	d.checkReach()
	return d, nil
}

// benchmarkHead says from the first bytes of a file whether it is in the
// benchmark matrix format (see IsBenchmark); sure is false when the first
// line that tells lies past head (and the file goes on: !all).
func benchmarkHead(head []byte, all bool) (bench, sure bool) {
	text := strings.TrimPrefix(string(head), "\ufeff")
	for text != "" {
		i := strings.IndexAny(text, "\r\n")
		if i < 0 && !all {
			return false, false
		}
		l := text
		if i >= 0 {
			l, text = text[:i], text[i+1:]
		} else {
			text = ""
		}
		t := strings.TrimSpace(l)
		if t == "" || strings.HasPrefix(t, "#") {
			continue
		}
		_, err := strconv.Atoi(t)
		return err == nil, true
	}
	return false, all
}

func nameOr(name string) string {
	if name == "" {
		return "the pasted text"
	}
	return name
}

// fromSites builds the instance of a sites file, with travel from matrix
// or from coordinates.
func fromSites(s *Sites, matrix io.Reader, opt Options) (*Dataset, error) {
	n := len(s.Sites)
	in := &solver.Instance{Name: s.Name, N: n, Scale: SitesScale, Shape: solver.Closed,
		IDs: make([]string, n), Service: make([]int64, n), Early: make([]int64, n), Late: make([]int64, n)}
	if in.Name == "" {
		in.Name = "pasted sites"
	}
	d := &Dataset{Instance: in, Names: make([]string, n), Lines: make([]int, n), Time: s.Time, Unit: "min", Sites: s,
		Warnings: append([]Warning(nil), s.Warnings...)}
	for i, st := range s.Sites {
		in.IDs[i], d.Names[i], d.Lines[i] = st.ID, st.Name, st.Line
		in.Service[i], in.Early[i], in.Late[i] = st.Service, st.Earliest, st.Latest
	}
	if matrix != nil {
		m, err := readMatrixWith(matrix, opt, in.IDs)
		if err != nil {
			return nil, err
		}
		in.Travel = m.Travel
		d.Travel = "matrix"
		d.Warnings = append(d.Warnings, triangleWarnings(in, m)...)
		return d, nil
	}
	latlon := s.Has("lat")
	if !latlon && !s.Has("x") {
		return nil, &ParseError{File: s.Name, Line: 1, Field: "travel",
			Msg: "no travel times: give a travel matrix, or lat,lon (or x,y) columns to compute them from"}
	}
	a, b := "x", "y"
	if latlon {
		a, b = "lat", "lon"
	}
	var missing ErrorList
	for k, st := range s.Sites {
		if latlon && !st.HasLatLon || !latlon && !st.HasXY {
			line, col := s.pos(k, a)
			missing = append(missing, &ParseError{File: s.Name, Line: line, Column: col, Field: s.colLabel(a),
				Msg: fmtlite.Sprintf("missing; travel times come from %s,%s, so every site needs them (or give a travel matrix)", a, b)})
			if len(missing) == maxErrors {
				break
			}
		}
	}
	switch len(missing) {
	case 0:
	case 1:
		return nil, missing[0]
	default:
		return nil, missing
	}
	speed := opt.Speed
	if speed == 0 {
		speed = DefaultSpeedKmh
	}
	if !(speed > 0) || math.IsInf(speed, 0) || speed > 1e6 {
		return nil, &OptionError{Option: "speed", Value: fmtlite.Sprint(opt.Speed), Msg: "want a speed above 0 (km/h for lat,lon)"}
	}
	factor := opt.RoadFactor
	if factor == 0 {
		factor = 1
		if latlon {
			factor = DefaultRoadFactor
		}
	}
	if !(factor >= 1) || math.IsInf(factor, 0) || factor > 100 {
		return nil, &OptionError{Option: "road-factor", Value: fmtlite.Sprint(opt.RoadFactor), Msg: "want 1 or more: roads are never shorter than the straight line"}
	}
	in.Travel = coordTravel(s, latlon, speed, factor)
	if latlon {
		d.LatLon = make([][2]float64, n)
		for i, st := range s.Sites {
			d.LatLon[i] = [2]float64{st.Lat, st.Lon}
		}
		d.Travel = fmtlite.Sprintf("lat,lon (haversine) × road factor %g at %g km/h", factor, speed)
	} else {
		d.Travel = fmtlite.Sprintf("x,y (Euclidean) × %g at %g units/h", factor, speed)
	}
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			if in.Travel[i*n+j] >= horizon {
				return nil, &OptionError{Option: "speed", Value: fmtlite.Sprint(speed), Msg: "travel times from the coordinates are too large; check the units"}
			}
		}
	}
	return d, nil
}

// siteErr is an error at the sites-file row of node i.
func (d *Dataset) siteErr(i int, field, msg string) error {
	pe := &ParseError{File: d.fileName(), Field: field, Msg: msg}
	if i >= 0 && i < len(d.Lines) {
		pe.Line = d.Lines[i]
		if d.Sites != nil {
			if c, ok := d.Sites.Columns[field]; ok {
				pe.Column = c + 1
				pe.Field = d.Sites.colLabel(field)
			}
		}
	}
	return pe
}

func (d *Dataset) fileName() string {
	if d.Sites != nil {
		return d.Sites.Name
	}
	if d.Instance.Name == "pasted sites" {
		return ""
	}
	return d.Instance.Name
}

func (d *Dataset) node(id string) (int, bool) {
	for i, v := range d.Instance.IDs {
		if v == id {
			return i, true
		}
	}
	return 0, false
}

func (d *Dataset) unknown(option, id string) error {
	ids := d.Instance.IDs
	sample := ids
	if len(sample) > 6 {
		sample = sample[:6]
	}
	more := ""
	if len(ids) > len(sample) {
		more = ", ..."
	}
	return &OptionError{Option: option, Value: id, Msg: fmtlite.Sprintf("no site has this id; the ids are %s%s", strings.Join(sample, ", "), more)}
}

// applyRoute sets the start, the shape, the shift start and the pins, and
// re-plans after done visits.
func (d *Dataset) applyRoute(opt Options) error {
	in := d.Instance
	if opt.Start != "" {
		s, ok := d.node(opt.Start)
		if !ok {
			return d.unknown("start", opt.Start)
		}
		in.Start = s
	}
	switch opt.End {
	case "", "start":
		in.Shape = solver.Closed
	case "free":
		in.Shape = solver.OpenFree
	default:
		e, ok := d.node(opt.End)
		if !ok {
			return d.unknown("end", opt.End)
		}
		if e == in.Start {
			return &OptionError{Option: "end", Value: opt.End, Msg: "is the start site; for a route back to the start use start (a closed tour)"}
		}
		in.Shape, in.End = solver.OpenFixed, e
	}
	if opt.ShiftStart != "" {
		v, err := d.ParseTime(opt.ShiftStart)
		if err != nil {
			return &OptionError{Option: "shift-start", Value: opt.ShiftStart, Msg: err.Error()}
		}
		if v > in.Late[in.Start] {
			what := "the latest time of the start"
			if in.Shape == solver.Closed {
				what = "the latest return to"
			}
			return &OptionError{Option: "shift-start", Value: opt.ShiftStart,
				Msg: fmtlite.Sprintf("is after %s %s (%s)", what, in.ID(in.Start), d.FormatTime(in.Late[in.Start]))}
		}
		in.Early[in.Start] = v
	}
	d.RouteStart, d.RouteEnd = in.ID(in.Start), routeEnd(in)
	pins, err := d.readPins()
	if err != nil {
		return err
	}
	if len(opt.Done) > 0 || opt.Now != "" {
		if err := d.replan(opt, pins); err != nil {
			return err
		}
		return nil
	}
	return d.setPins(pins, 0)
}

// pin is a site's pin with the node it belongs to.
type pin struct {
	node int
	Pin
}

func (d *Dataset) readPins() ([]pin, error) {
	var out []pin
	if d.Sites == nil {
		return nil, nil
	}
	for i, st := range d.Sites.Sites {
		if st.Pin.Kind == "" {
			continue
		}
		// A mark true by definition is accepted: the start is first, a
		// fixed end is last.
		if i == d.Instance.Start && st.Pin.Kind == "first" || d.Instance.Shape == solver.OpenFixed && i == d.Instance.End && st.Pin.Kind == "last" {
			continue
		}
		if i == d.Instance.Start {
			return nil, d.siteErr(i, "position", fmtlite.Sprintf("%s is the start of the route and cannot be pinned; leave its position empty", st.ID))
		}
		if d.Instance.Shape == solver.OpenFixed && i == d.Instance.End {
			return nil, d.siteErr(i, "position", fmtlite.Sprintf("%s is the fixed end of the route and cannot be pinned; leave its position empty", st.ID))
		}
		out = append(out, pin{i, st.Pin})
	}
	return out, nil
}

// setPins fills Instance.Position. shift is how many visits are already
// done: numbered pins move forward by it. first is position 1, last the
// last visit before the return (closed), the end of the path (open free:
// a pin to last makes that site the end), or the last visit before the
// fixed end.
func (d *Dataset) setPins(pins []pin, shift int) error {
	in := d.Instance
	if len(pins) == 0 {
		in.Position = nil
		return nil
	}
	maxPos := in.N - 1
	if in.Shape == solver.OpenFixed {
		maxPos = in.N - 2
	}
	in.Position = make([]int, in.N)
	byPos := map[int]int{}
	for _, p := range pins {
		var k int
		switch p.Kind {
		case "first":
			k = 1 - shift
		case "last":
			k = maxPos
		default:
			k = p.N - shift
			if p.N > maxPos+shift {
				return d.siteErr(p.node, "position", fmtlite.Sprintf("%d is past the end of the route, which has %d visits after the start", p.N, maxPos+shift))
			}
		}
		if k < 1 {
			d.Warnings = append(d.Warnings, Warning{File: d.fileName(), Line: d.Lines[p.node], Field: "position",
				Msg: fmtlite.Sprintf("%s was pinned to a place already passed (%d visits are done); the pin is dropped", in.ID(p.node), shift)})
			continue
		}
		if prev, dup := byPos[k]; dup {
			return d.siteErr(p.node, "position", fmtlite.Sprintf("%s and %s (line %d) are both pinned to visit %d; pin one site per place", in.ID(p.node), in.ID(prev), d.Lines[prev], k+shift))
		}
		byPos[k] = p.node
		in.Position[p.node] = k
	}
	if len(byPos) == 0 {
		in.Position = nil
	}
	return nil
}

// replan removes the done visits and starts the route again at the last
// of them, at Now.
func (d *Dataset) replan(opt Options, pins []pin) error {
	in := d.Instance
	var done []int
	seen := map[int]bool{}
	for _, id := range opt.Done {
		id = strings.TrimSpace(id)
		if id == "" {
			continue
		}
		i, ok := d.node(id)
		if !ok {
			return d.unknown("done", id)
		}
		if seen[i] {
			return &OptionError{Option: "done", Value: id, Msg: "is listed twice; list each visit made once, in the order made"}
		}
		seen[i] = true
		if i == in.Start {
			continue // the start is left, not visited
		}
		if in.Shape == solver.OpenFixed && i == in.End {
			return &OptionError{Option: "done", Value: id, Msg: "is the end of the route; it cannot be done while other visits remain"}
		}
		done = append(done, i)
	}
	// Drive the done visits in order from the start: their departure is
	// the default Now, and the check that Now is not before it.
	t := in.Early[in.Start] + in.Service[in.Start]
	prev := in.Start
	for _, v := range done {
		t += in.T(prev, v)
		if t < in.Early[v] {
			t = in.Early[v]
		}
		t += in.Service[v]
		prev = v
	}
	now := t
	if opt.Now != "" {
		v, err := d.ParseTime(opt.Now)
		if err != nil {
			return &OptionError{Option: "now", Value: opt.Now, Msg: err.Error()}
		}
		now = v
	}
	at := in.Start
	if len(done) > 0 {
		at = done[len(done)-1]
	}
	d.Now, d.At = now, in.ID(at)
	for _, v := range done {
		d.Done = append(d.Done, in.ID(v))
	}
	if len(done) == 0 {
		// Still at the start: only the time changes.
		if in.Shape == solver.Closed && now > in.Late[in.Start] {
			return &OptionError{Option: "now", Value: opt.Now, Msg: fmtlite.Sprintf("is after the latest return to %s (%s)", in.ID(in.Start), d.FormatTime(in.Late[in.Start]))}
		}
		in.Early[in.Start] = now
		if in.Late[in.Start] < now {
			in.Late[in.Start] = now
		}
		return d.setPins(pins, 0)
	}
	// The new node set: the current site first, then every site not done,
	// in the original order.
	keep := []int{at}
	for i := 0; i < in.N; i++ {
		switch {
		case i == at:
		case i == in.Start:
			// A closed tour still returns there; an open route has left it.
			if in.Shape == solver.Closed {
				keep = append(keep, i)
			}
		case !seen[i]:
			keep = append(keep, i)
		}
	}
	newIdx := make(map[int]int, len(keep))
	for k, i := range keep {
		newIdx[i] = k
	}
	n := len(keep)
	out := &solver.Instance{Name: in.Name, N: n, Scale: in.Scale, IDs: make([]string, n), Travel: make([]int64, n*n),
		Service: make([]int64, n), Early: make([]int64, n), Late: make([]int64, n)}
	names := make([]string, n)
	lines := make([]int, n)
	var ll [][2]float64
	if d.LatLon != nil {
		ll = make([][2]float64, n)
	}
	for k, i := range keep {
		out.IDs[k], names[k], lines[k] = in.IDs[i], d.Names[i], d.Lines[i]
		out.Service[k], out.Early[k], out.Late[k] = in.Service[i], in.Early[i], in.Late[i]
		if ll != nil {
			ll[k] = d.LatLon[i]
		}
		for m, j := range keep {
			out.Travel[k*n+m] = in.T(i, j)
		}
	}
	// The current site: service done, leave at now.
	out.Service[0], out.Early[0], out.Late[0] = 0, now, horizon
	switch in.Shape {
	case solver.Closed:
		// Back to the original start, now the fixed end of a path. Its
		// latest still bounds the return; arriving never waits.
		e := newIdx[in.Start]
		out.Shape, out.End = solver.OpenFixed, e
		out.Service[e] = 0
		if out.Early[e] > now {
			out.Early[e] = now
		}
	case solver.OpenFixed:
		out.Shape, out.End = solver.OpenFixed, newIdx[in.End]
	default:
		out.Shape = solver.OpenFree
	}
	d.Instance, d.Names, d.Lines, d.LatLon = out, names, lines, ll
	var kept []pin
	for _, p := range pins {
		if k, ok := newIdx[p.node]; ok && k != 0 {
			p.node = k
			kept = append(kept, p)
		}
	}
	return d.setPins(kept, len(done))
}

// maxTriangleSites bounds the O(n³) triangle check.
const maxTriangleSites = 400

// triangleTolerance is how much a direct time may exceed a detour before
// it is reported: half a minute, so that matrices rounded to whole minutes
// do not flood the report.
const triangleTolerance = SitesScale / 2

// triangleWarnings reports the few worst breaches of the triangle
// inequality t(i,k) ≤ t(i,j) + t(j,k) in a given matrix: legal, but a sign
// of a typo or of times in mixed units.
func triangleWarnings(in *solver.Instance, m *Matrix) []Warning {
	n := in.N
	if n > maxTriangleSites {
		return nil
	}
	type breach struct {
		i, j, k int
		excess  int64
	}
	var worst []breach
	for i := 0; i < n; i++ {
		for k := 0; k < n; k++ {
			if i == k {
				continue
			}
			direct := in.T(i, k)
			bj, best := -1, direct
			for j := 0; j < n; j++ {
				if j == i || j == k {
					continue
				}
				if v := in.T(i, j) + in.T(j, k); v < best {
					bj, best = j, v
				}
			}
			if bj >= 0 && direct-best > triangleTolerance {
				worst = append(worst, breach{i, bj, k, direct - best})
			}
		}
	}
	sort.SliceStable(worst, func(a, b int) bool { return worst[a].excess > worst[b].excess })
	var out []Warning
	for x, b := range worst {
		if x == 3 {
			out = append(out, Warning{File: m.Name, Field: "travel matrix",
				Msg: fmtlite.Sprintf("%d more pairs are quicker by a detour than direct", len(worst)-3)})
			break
		}
		line, col := m.Pos(b.i, b.k)
		out = append(out, Warning{File: m.Name, Line: line, Column: col, Field: fmtlite.Sprintf("travel time from %s to %s", in.ID(b.i), in.ID(b.k)),
			Msg: fmtlite.Sprintf("%s min direct, but %s min by way of %s (%s + %s): check for a typo or mixed units",
				FormatMinutes(in.T(b.i, b.k)), FormatMinutes(in.T(b.i, b.j)+in.T(b.j, b.k)), in.ID(b.j), FormatMinutes(in.T(b.i, b.j)), FormatMinutes(in.T(b.j, b.k)))})
	}
	return out
}

// checkReach warns of zero-width windows and of windows that cannot be met
// even as the first visit (or with no way back in time): the plan will be
// late there whatever the order.
func (d *Dataset) checkReach() {
	in := d.Instance
	s := in.Start
	leave := in.Early[s] + in.Service[s]
	for i := 0; i < in.N; i++ {
		if i == s {
			continue
		}
		w := Warning{File: d.fileName(), Line: d.Lines[i], Field: in.ID(i)}
		if in.Early[i] == in.Late[i] && !(in.Shape == solver.OpenFixed && i == in.End) {
			ww := w
			ww.Msg = fmtlite.Sprintf("the window opens and closes at %s: service must start at exactly that time", d.FormatTime(in.Early[i]))
			d.Warnings = append(d.Warnings, ww)
		}
		arr := leave + in.T(s, i)
		if arr > in.Late[i] {
			ww := w
			ww.Msg = fmtlite.Sprintf("cannot be reached in time even as the first visit: leaving %s at %s, the earliest arrival is %s, after the latest %s",
				in.ID(s), d.FormatTime(in.Early[s]), d.FormatTime(arr), d.FormatTime(in.Late[i]))
			d.Warnings = append(d.Warnings, ww)
			continue
		}
		back, backTo := int64(-1), -1
		if in.Shape == solver.Closed {
			backTo = s
		} else if in.Shape == solver.OpenFixed && i != in.End {
			backTo = in.End
		}
		if backTo >= 0 {
			st := arr
			if st < in.Early[i] {
				st = in.Early[i]
			}
			back = st + in.Service[i] + in.T(i, backTo)
			if back > in.Late[backTo] {
				ww := w
				ww.Msg = fmtlite.Sprintf("even as the first visit, the route cannot reach %s by its latest %s afterwards (earliest %s)",
					in.ID(backTo), d.FormatTime(in.Late[backTo]), d.FormatTime(back))
				d.Warnings = append(d.Warnings, ww)
			}
		}
	}
}
