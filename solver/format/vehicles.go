package format

import (
	"io"
	"sort"
	"strconv"
	"strings"

	"visitline/solver"
	"visitline/solver/fleet"
	"visitline/solver/fmtlite"
)

// LoadScale is the fixed scale of demands and capacities: they are read to
// three decimals (1.5 tonnes, 12 crates), so one unit of the file is a
// thousand internal units.
const LoadScale = 1000

// Column names a vehicles file may use, by field; matched as the sites
// file's columns are (case, spaces, _, - and bracketed parts ignored).
var vehicleColumns = []struct {
	field    string
	synonyms []string
}{
	{"id", []string{"id", "vehicle", "vehicleid", "code", "ref", "key"}},
	{"name", []string{"name", "vehiclename", "label", "title", "driver"}},
	{"start", []string{"start", "startsite", "from", "depot", "base"}},
	{"end", []string{"end", "endsite", "to", "return", "finish site"}},
	{"shift start", []string{"shiftstart", "starttime", "begin", "availablefrom", "on duty"}},
	{"shift end", []string{"shiftend", "endtime", "availableto", "off duty"}},
	{"capacity", []string{"capacity", "cap", "loadlimit", "maxload"}},
	{"max duration", []string{"maxduration", "longestday", "maxhours", "maxworkingtime", "maxday"}},
}

// Extra columns of a sites file read only for a fleet day.
var siteLoadColumns = []struct {
	field    string
	synonyms []string
}{
	{"demand", []string{"demand", "load", "quantity", "qty", "size", "volume"}},
	{"priority", []string{"priority", "prio", "importance"}},
}

// VehicleColumnNames lists, for documentation, each field of a vehicles
// file and the column names accepted for it.
func VehicleColumnNames() map[string][]string {
	m := map[string][]string{}
	for _, c := range vehicleColumns {
		m[c.field] = append([]string(nil), c.synonyms...)
	}
	return m
}

// VehicleRow is one row of a vehicles file as written; times are checked
// against the sites file when the fleet is built (FleetFromDataset).
type VehicleRow struct {
	ID, Name   string
	Line       int
	Start, End string
	// ShiftStart and ShiftEnd are the cells as written ("" when empty).
	ShiftStart, ShiftEnd string
	// Capacity and MaxDuration are internal units (LoadScale per unit,
	// SitesScale per minute), fleet.NoLimit when empty.
	Capacity, MaxDuration int64
}

// Vehicles is the content of a vehicles file.
type Vehicles struct {
	Name    string
	Rows    []VehicleRow
	Columns map[string]int
	Header  []string
	Comma   rune
}

func (v *Vehicles) err(row VehicleRow, field, msg string) error {
	pe := &ParseError{File: v.Name, Line: row.Line, Field: field, Msg: msg}
	if c, ok := v.Columns[field]; ok {
		pe.Column = c + 1
	}
	return pe
}

// ReadVehicles reads a vehicles file: a header row naming the columns,
// then one row per vehicle. Delimiter, quoting, comments, encodings and
// decimal commas follow the sites file's rules. name is used in errors.
func ReadVehicles(r io.Reader, name string) (*Vehicles, error) {
	text, err := readText(r, name)
	if err != nil {
		return nil, err
	}
	comma := rune(0)
	if c, t := sepLine(text); c != 0 {
		text, comma = t, c
	}
	if comma == 0 {
		if comma = sniffComma(text); comma == 0 {
			comma = ','
		}
	}
	recs, err := readRecords(text, name, comma)
	if err != nil {
		return nil, err
	}
	if len(recs) == 0 {
		return nil, &ParseError{File: name, Line: 1, Field: "header", Msg: "no data; want a header row such as id,start,shift start,shift end,capacity then one row per vehicle"}
	}
	v := &Vehicles{Name: name, Columns: map[string]int{}, Header: recs[0].fields, Comma: comma}
	hl := recs[0].line
	for c, h := range recs[0].fields {
		f := columnField(h, vehicleColumns)
		if f == "" {
			if h != "" && !isQuiet(h) {
				return nil, &ParseError{File: name, Line: hl, Column: c + 1, Field: "header",
					Msg: fmtlite.Sprintf("column %q is not one of a vehicles file: id, name, start, end, shift start, shift end, capacity, max duration", h)}
			}
			continue
		}
		if prev, dup := v.Columns[f]; dup {
			return nil, &ParseError{File: name, Line: hl, Column: c + 1, Field: "header",
				Msg: fmtlite.Sprintf("columns %q and %q both give the %s; keep one", recs[0].fields[prev], h, f)}
		}
		v.Columns[f] = c
	}
	if _, ok := v.Columns["id"]; !ok {
		if _, ok := v.Columns["name"]; !ok {
			return nil, &ParseError{File: name, Line: hl, Field: "header", Msg: "no id column; want a column named id (or vehicle) with a unique id per vehicle"}
		}
		v.Columns["id"] = v.Columns["name"]
	}
	rows := recs[1:]
	if len(rows) == 0 {
		return nil, &ParseError{File: name, Line: hl + 1, Field: "vehicles", Msg: "the header has no vehicles below it; want one row per vehicle"}
	}
	if len(rows) > MaxSites {
		return nil, &ParseError{File: name, Line: rows[MaxSites].line, Field: "vehicles", Msg: fmtlite.Sprintf("more than %d vehicles", MaxSites)}
	}
	commaDecimal := comma != ','
	width := len(v.Header)
	seen := map[string]int{}
	for _, r := range rows {
		for c := width; c < len(r.fields); c++ {
			if r.fields[c] != "" {
				return nil, &ParseError{File: name, Line: r.line, Column: c + 1, Field: "row",
					Msg: fmtlite.Sprintf("%d fields but the header names %d columns; quote fields that hold the delimiter %q", len(r.fields), width, string(comma))}
			}
		}
		cell := func(f string) string {
			c, ok := v.Columns[f]
			if !ok || c >= len(r.fields) {
				return ""
			}
			return r.fields[c]
		}
		row := VehicleRow{Line: r.line, ID: cell("id"), Name: cell("name"), Start: cell("start"), End: cell("end"),
			ShiftStart: cell("shift start"), ShiftEnd: cell("shift end"), Capacity: fleet.NoLimit, MaxDuration: fleet.NoLimit}
		if row.ID == "" {
			return nil, v.err(row, "id", "missing; every vehicle needs a unique id")
		}
		if prev, dup := seen[row.ID]; dup {
			return nil, v.err(row, "id", fmtlite.Sprintf("%q is used twice (first on line %d); vehicle ids must be unique", row.ID, prev))
		}
		seen[row.ID] = r.line
		if t := cell("capacity"); t != "" {
			q, ok := parseDecimal(t, commaDecimal)
			if !ok {
				return nil, v.err(row, "capacity", fmtlite.Sprintf("%q is not a number; want the most the vehicle carries, in the unit of the sites' demand (12, 1.5), or empty for no limit", t))
			}
			if q.Sign() < 0 {
				return nil, v.err(row, "capacity", fmtlite.Sprintf("%q is negative; want 0 or more, or empty for no limit", t))
			}
			u, ok := ratUnits(q, LoadScale)
			if !ok || u > solver.Horizon {
				return nil, v.err(row, "capacity", fmtlite.Sprintf("%q is too large", t))
			}
			row.Capacity = u
		}
		if t := cell("max duration"); t != "" {
			d, msg := parseDuration(t, commaDecimal)
			if msg != "" {
				return nil, v.err(row, "max duration", msg+", or empty for no limit")
			}
			row.MaxDuration = d
		}
		v.Rows = append(v.Rows, row)
	}
	return v, nil
}

func columnField(h string, cols []struct {
	field    string
	synonyms []string
}) string {
	n := normHeader(h)
	for _, c := range cols {
		for _, s := range c.synonyms {
			if normHeader(s) == n {
				return c.field
			}
		}
	}
	return ""
}

// FleetDataset is a fleet day with what the plan writers need.
type FleetDataset struct {
	Problem *fleet.Problem
	// Names are the node names ("" when none); Lines the sites-file line
	// of each node.
	Names []string
	Lines []int
	Time  TimeBase
	// Unit is "min" for sites files, "" for Solomon files (their unit is
	// not stated).
	Unit string
	// LoadScale is the internal units per unit of demand (1 for Solomon
	// files, LoadScale for sites files).
	LoadScale int64
	// VehicleNames by vehicle ("" when none).
	VehicleNames []string
	Travel       string
	Warnings     []Warning
}

// Name of node i: its name, else its id.
func (d *FleetDataset) Name(i int) string {
	if i >= 0 && i < len(d.Names) && d.Names[i] != "" {
		return d.Names[i]
	}
	return d.Problem.ID(i)
}

// FormatTime writes an internal time as the input wrote its times.
func (d *FleetDataset) FormatTime(v int64) string {
	if d.Unit == "" {
		return fnum(d.Problem.InputUnits(v))
	}
	return d.Time.Format(v)
}

// FormatDuration writes an internal duration in the input's unit.
func (d *FleetDataset) FormatDuration(v int64) string {
	if d.Unit == "" {
		return fnum(d.Problem.InputUnits(v))
	}
	return FormatMinutes(v)
}

// FormatLoad writes an internal load in the demand's unit.
func (d *FleetDataset) FormatLoad(v int64) string {
	if v >= fleet.NoLimit {
		return "none"
	}
	return fnum(float64(v) / float64(loadScale(d.LoadScale)))
}

// SolomonDataset wraps a problem read by ReadSolomon.
func SolomonDataset(p *fleet.Problem) *FleetDataset {
	return &FleetDataset{Problem: p, Names: make([]string, p.N), Lines: make([]int, p.N), LoadScale: 1,
		VehicleNames: make([]string, len(p.Vehicles)), Travel: "Euclidean (Solomon)"}
}

// FleetOptions say how to make a fleet of a loaded sites file.
type FleetOptions struct {
	// Vehicles is the vehicles file (nil: Count identical vehicles).
	Vehicles *Vehicles
	// Count identical vehicles from the dataset's start, ending as its
	// route does, with the start's window as their shift.
	Count int
	// SitesText is the sites file's text, for the demand and priority
	// columns.
	SitesText string
}

// FleetFromDataset makes the fleet day of a loaded sites file (Load with
// no done visits): the nodes and travel of d, the demand and priority
// columns of the sites file, and the vehicles. Errors name the vehicles
// file's line and field (a start or end that is not a site id, a shift
// that ends before it starts), or the sites file's.
func FleetFromDataset(d *Dataset, opt FleetOptions) (*FleetDataset, error) {
	in := d.Instance
	if d.At != "" || len(d.Done) > 0 {
		return nil, &OptionError{Option: "done", Value: strings.Join(d.Done, ","), Msg: "done visits are re-planned for one vehicle only; leave --done out for a fleet day"}
	}
	if in.Position != nil {
		for i, p := range in.Position {
			if p > 0 {
				return nil, d.siteErr(i, "position", "positions are for one vehicle's route; leave the position column empty for a fleet day")
			}
		}
	}
	p := &fleet.Problem{Name: in.Name, IDs: append([]string(nil), in.IDs...), N: in.N, Travel: in.Travel, Service: in.Service,
		Early: in.Early, Late: in.Late, Scale: in.Scale}
	fd := &FleetDataset{Problem: p, Names: d.Names, Lines: d.Lines, Time: d.Time, Unit: d.Unit, LoadScale: 1, Travel: d.Travel}
	if d.Unit != "" {
		fd.LoadScale = LoadScale
	}
	skip := map[int]bool{}
	if d.Sites != nil && opt.SitesText != "" {
		cols, err := readSiteLoads(opt.SitesText, d.Sites, p)
		if err != nil {
			return nil, err
		}
		for _, c := range cols {
			skip[c+1] = true
		}
	}
	for _, w := range d.Warnings {
		if w.Field == "header" && skip[w.Column] {
			continue // a demand or priority column: read here
		}
		fd.Warnings = append(fd.Warnings, w)
	}
	byID := map[string]int{}
	for i, id := range in.IDs {
		byID[id] = i
	}
	if opt.Vehicles == nil {
		if opt.Count < 1 {
			return nil, &OptionError{Option: "fleet", Value: strconv.Itoa(opt.Count), Msg: "want 1 or more vehicles"}
		}
		end := in.Start
		switch in.Shape {
		case solver.OpenFree:
			end = fleet.FreeEnd
		case solver.OpenFixed:
			end = in.End
		}
		for k := 0; k < opt.Count; k++ {
			p.Vehicles = append(p.Vehicles, fleet.Vehicle{ID: strconv.Itoa(k + 1), Start: in.Start, End: end,
				ShiftStart: in.Early[in.Start], ShiftEnd: in.Late[in.Start], Capacity: fleet.NoLimit, MaxDuration: fleet.NoLimit})
			fd.VehicleNames = append(fd.VehicleNames, "")
		}
	} else {
		vs := opt.Vehicles
		ids := in.IDs
		sample := strings.Join(ids[:sampleLen(len(ids))], ", ")
		if len(ids) > 6 {
			sample += ", ..."
		}
		site := func(row VehicleRow, field, id string) (int, error) {
			i, ok := byID[id]
			if !ok {
				return 0, vs.err(row, field, fmtlite.Sprintf("%q is not a site of %s; want a site id (%s)", id, nameOr(d.fileName()), sample))
			}
			return i, nil
		}
		for _, row := range vs.Rows {
			veh := fleet.Vehicle{ID: row.ID, Name: row.Name, Start: in.Start, Capacity: row.Capacity, MaxDuration: row.MaxDuration}
			if row.Start != "" {
				s, err := site(row, "start", row.Start)
				if err != nil {
					return nil, err
				}
				veh.Start = s
			}
			switch strings.ToLower(row.End) {
			case "", "start":
				veh.End = veh.Start
			case "free":
				veh.End = fleet.FreeEnd
			default:
				e, err := site(row, "end", row.End)
				if err != nil {
					return nil, err
				}
				veh.End = e
			}
			veh.ShiftStart, veh.ShiftEnd = in.Early[veh.Start], in.Late[veh.Start]
			for _, f := range []struct {
				field, text string
				to          *int64
			}{{"shift start", row.ShiftStart, &veh.ShiftStart}, {"shift end", row.ShiftEnd, &veh.ShiftEnd}} {
				if f.text == "" {
					continue
				}
				v, err := d.ParseTime(f.text)
				if err != nil {
					return nil, vs.err(row, f.field, err.Error())
				}
				*f.to = v
			}
			if veh.ShiftEnd < veh.ShiftStart {
				return nil, vs.err(row, "shift end", fmtlite.Sprintf("%s is before the shift start %s; want a shift end at or after its start", d.FormatTime(veh.ShiftEnd), d.FormatTime(veh.ShiftStart)))
			}
			p.Vehicles = append(p.Vehicles, veh)
			fd.VehicleNames = append(fd.VehicleNames, row.Name)
		}
	}
	if err := p.Validate(); err != nil {
		return nil, &ParseError{File: d.fileName(), Msg: err.Error(), Err: err}
	}
	return fd, nil
}

// readSiteLoads reads the demand and priority columns of a sites file
// into p and returns their 0-based columns. The sites reader has already
// checked the file's layout; this pass reads the two cells of each row.
func readSiteLoads(text string, s *Sites, p *fleet.Problem) ([]int, error) {
	if c, t := sepLine(text); c != 0 {
		text = t
	}
	recs, err := readRecords(text, s.Name, s.Comma)
	if err != nil || len(recs) < 1 {
		return nil, err
	}
	cols := map[string]int{}
	for c, h := range recs[0].fields {
		if f := columnField(h, siteLoadColumns); f != "" {
			if _, dup := cols[f]; dup {
				return nil, &ParseError{File: s.Name, Line: recs[0].line, Column: c + 1, Field: "header", Msg: fmtlite.Sprintf("two columns give the %s; keep one", f)}
			}
			cols[f] = c
		}
	}
	if len(cols) == 0 {
		return nil, nil
	}
	byLine := map[int]int{}
	for k, st := range s.Sites {
		byLine[st.Line] = k
	}
	commaDecimal := s.Comma != ','
	if _, ok := cols["demand"]; ok {
		p.Demand = make([]int64, p.N)
	}
	if _, ok := cols["priority"]; ok {
		p.Priority = make([]int64, p.N)
		for i := range p.Priority {
			p.Priority[i] = 1
		}
	}
	for _, r := range recs[1:] {
		k, ok := byLine[r.line]
		if !ok {
			continue
		}
		for f, c := range cols {
			if c >= len(r.fields) || r.fields[c] == "" {
				continue
			}
			t := r.fields[c]
			pe := &ParseError{File: s.Name, Line: r.line, Column: c + 1, Field: f}
			if f == "demand" {
				q, ok := parseDecimal(t, commaDecimal)
				if !ok || q.Sign() < 0 {
					pe.Msg = fmtlite.Sprintf("%q: want a number of 0 or more, in the unit of the vehicles' capacity (3, 0.5)", t)
					return nil, pe
				}
				u, ok := ratUnits(q, LoadScale)
				if !ok || u > solver.Horizon {
					pe.Msg = fmtlite.Sprintf("%q is too large", t)
					return nil, pe
				}
				p.Demand[k] = u
			} else {
				w, err := strconv.ParseInt(t, 10, 64)
				if err != nil || w < 1 || w > 1_000_000 {
					pe.Msg = fmtlite.Sprintf("%q: want a whole number from 1 to 1000000 (higher is more important; empty is 1)", t)
					return nil, pe
				}
				p.Priority[k] = w
			}
		}
	}
	out := make([]int, 0, len(cols))
	for _, c := range cols {
		out = append(out, c)
	}
	sort.Ints(out)
	return out, nil
}

// loadScale and sampleLen avoid the builtin min and max, which this
// package's tests shadow.
func loadScale(s int64) int64 {
	if s < 1 {
		return 1
	}
	return s
}

func sampleLen(n int) int {
	if n > 6 {
		return 6
	}
	return n
}
