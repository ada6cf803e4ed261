package format

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"strings"
	"testing"
	"time"
	"unicode/utf8"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"visitline/solver"
)

// planOf builds the plan of route on d by the plain evaluator, so that
// writer tests do not depend on the search.
func planOf(d *Dataset, route []int) solver.Plan {
	s := solver.Evaluate(d.Instance, route)
	return solver.Plan{Route: route, Schedule: s, Cost: s.Travel, Feasible: s.Feasible, Operator: "test"}
}

const icsSites = `id;name;earliest;latest;service;lat;lon
DEP;Depot;07:30;18:00;0;45.0;3.0
A;Back\slash; semi; and, comma;08:00;10:00;45;45.01;3.02
B;"Two
lines";10:00;12:00;1:00;45.03;3.01
C;Très très long nom de café à la gare centrale, quai numéro deux, entrée côté parc;08:00;16:00;0:30;44.99;2.98
`

func icsDataset(t *testing.T) *Dataset {
	t.Helper()
	// The name cell of A holds a semicolon, so quote it as a spreadsheet would.
	src := strings.Replace(icsSites, `A;Back\slash; semi; and, comma;`, `A;"Back\slash; semi; and, comma";`, 1)
	d, err := Load(strings.NewReader(src), nil, Options{SitesName: "s.csv"})
	require.NoError(t, err)
	return d
}

var icsStamp = time.Date(2026, 11, 30, 18, 5, 0, 0, time.UTC)

func writeICS(t *testing.T, d *Dataset, route []int) string {
	t.Helper()
	var b bytes.Buffer
	require.NoError(t, WriteICS(&b, d, planOf(d, route), ICSOptions{Date: time.Date(2026, 12, 1, 0, 0, 0, 0, time.UTC), Stamp: icsStamp}))
	return b.String()
}

// unfold undoes RFC 5545 section 3.1 folding: a CRLF followed by one space
// or tab is removed.
func unfold(s string) []string {
	s = strings.ReplaceAll(s, "\r\n ", "")
	s = strings.ReplaceAll(s, "\r\n\t", "")
	return strings.Split(strings.TrimSuffix(s, "\r\n"), "\r\n")
}

// unescape undoes RFC 5545 section 3.3.11 TEXT escaping.
func unescape(s string) string {
	var b strings.Builder
	for i := 0; i < len(s); i++ {
		if s[i] == '\\' && i+1 < len(s) {
			i++
			switch s[i] {
			case 'n', 'N':
				b.WriteByte('\n')
			default:
				b.WriteByte(s[i])
			}
			continue
		}
		b.WriteByte(s[i])
	}
	return b.String()
}

type icsEvent map[string][]string

func parseICS(t *testing.T, s string) (cal map[string][]string, events []icsEvent) {
	t.Helper()
	cal = map[string][]string{}
	var cur icsEvent
	for _, l := range unfold(s) {
		name, value, ok := strings.Cut(l, ":")
		require.True(t, ok, "content line without a colon: %q", l)
		switch {
		case name == "BEGIN" && value == "VEVENT":
			cur = icsEvent{}
		case name == "END" && value == "VEVENT":
			events = append(events, cur)
			cur = nil
		case cur != nil:
			cur[name] = append(cur[name], value)
		default:
			cal[name] = append(cal[name], value)
		}
	}
	return cal, events
}

// RFC 5545 section 3.1: content lines are delimited by CRLF, and lines
// longer than 75 octets are folded.
func TestICSLineEndsAndFolding(t *testing.T) {
	out := writeICS(t, icsDataset(t), []int{0, 1, 2, 3})
	require.True(t, strings.HasSuffix(out, "\r\n"))
	for i, l := range strings.Split(strings.TrimSuffix(out, "\r\n"), "\r\n") {
		assert.NotContains(t, l, "\n", "bare LF on line %d", i+1)
		assert.NotContains(t, l, "\r", "bare CR on line %d", i+1)
		assert.LessOrEqual(t, len(l), 75, "line %d is %d octets: %q", i+1, len(l), l)
		assert.True(t, utf8.ValidString(l), "line %d splits a UTF-8 sequence", i+1)
	}
	assert.Contains(t, out, "\r\n ", "the long name must have been folded")
}

// RFC 5545 sections 3.4, 3.6, 3.7.3 and 3.7.4: one VCALENDAR with VERSION
// 2.0 and a PRODID, each exactly once.
func TestICSCalendarProperties(t *testing.T) {
	out := writeICS(t, icsDataset(t), []int{0, 1, 2, 3})
	assert.True(t, strings.HasPrefix(out, "BEGIN:VCALENDAR\r\n"))
	assert.True(t, strings.HasSuffix(out, "END:VCALENDAR\r\n"))
	cal, _ := parseICS(t, out)
	assert.Equal(t, []string{"2.0"}, cal["VERSION"])
	require.Len(t, cal["PRODID"], 1)
	assert.NotEmpty(t, cal["PRODID"][0])
}

// RFC 5545 section 3.6.1: each VEVENT has UID and DTSTAMP, each once;
// DTSTAMP is in UTC (3.8.7.2); DTSTART is a floating local date-time
// (3.3.5 form 1); DTEND is later than DTSTART (3.8.2.2) or absent.
func TestICSEvents(t *testing.T) {
	d := icsDataset(t)
	out := writeICS(t, d, []int{0, 1, 2, 3})
	_, ev := parseICS(t, out)
	require.Len(t, ev, 3, "one event per visit; the depot has no service")
	uids := map[string]bool{}
	for _, e := range ev {
		require.Len(t, e["UID"], 1)
		require.Len(t, e["DTSTAMP"], 1)
		assert.Equal(t, "20261130T180500Z", e["DTSTAMP"][0])
		assert.False(t, uids[e["UID"][0]], "UIDs must be unique")
		uids[e["UID"][0]] = true
		require.Len(t, e["DTSTART"], 1)
		start, err := time.Parse("20060102T150405", e["DTSTART"][0])
		require.NoError(t, err, "floating DATE-TIME without Z")
		require.Len(t, e["DTEND"], 1)
		end, err := time.Parse("20060102T150405", e["DTEND"][0])
		require.NoError(t, err)
		assert.True(t, end.After(start))
	}
	// Visit A starts at 08:00 (its window opens) for 45 minutes.
	assert.Equal(t, "20261201T080000", ev[0]["DTSTART"][0])
	assert.Equal(t, "20261201T084500", ev[0]["DTEND"][0])
	assert.Equal(t, []string{"45.010000;3.020000"}, ev[0]["GEO"], "GEO is latitude;longitude (3.8.1.6)")
}

// RFC 5545 section 3.3.11: backslash, semicolon and comma are escaped with
// a backslash and a newline is written \n.
func TestICSTextEscaping(t *testing.T) {
	out := writeICS(t, icsDataset(t), []int{0, 1, 2, 3})
	_, ev := parseICS(t, out)
	assert.Equal(t, []string{`Back\\slash\; semi\; and\, comma`}, ev[0]["SUMMARY"])
	assert.Equal(t, "Back\\slash; semi; and, comma", unescape(ev[0]["SUMMARY"][0]))
	assert.Equal(t, []string{`Two\nlines`}, ev[1]["SUMMARY"])
	desc := unescape(ev[0]["DESCRIPTION"][0])
	assert.Contains(t, desc, "Site A\nWindow 08:00 to 10:00\nArrive ")
	assert.Equal(t, "Très très long nom de café à la gare centrale, quai numéro deux, entrée côté parc", unescape(ev[2]["SUMMARY"][0]))
	for _, e := range ev {
		for _, v := range e["DESCRIPTION"] {
			// Every ; and , in a TEXT value is escaped.
			for i := 0; i < len(v); i++ {
				if v[i] == '\\' {
					i++
					continue
				}
				assert.NotContains(t, ";,", string(v[i]), "unescaped %q in %q", v[i], v)
			}
		}
	}
	assert.Equal(t, "a\\nb\tc", escapeText("a\r\nb\tc\x01"))
}

func TestICSLateAndZeroService(t *testing.T) {
	src := "id,name,earliest,latest,service,x,y\nD,Depot,08:00,20:00,15,0,0\nA,Early bird,08:00,08:05,0,60,0\n"
	d, err := Load(strings.NewReader(src), nil, Options{Speed: 60})
	require.NoError(t, err)
	_, ev := parseICS(t, writeICS(t, d, []int{0, 1}))
	require.Len(t, ev, 2, "the start has a service time, so it gets an event")
	assert.Equal(t, []string{"Depot"}, ev[0]["SUMMARY"])
	assert.Equal(t, []string{"LATE: Early bird"}, ev[1]["SUMMARY"])
	assert.Nil(t, ev[1]["DTEND"], "no service: the event ends when it starts (3.6.1)")
	assert.Contains(t, unescape(ev[1]["DESCRIPTION"][0]), "Late by 70 min")
}

func TestICSDatedFile(t *testing.T) {
	src := "id,earliest,latest,service,x,y\nD,2026-12-03 07:00,2026-12-03 18:00,0,0,0\nA,2026-12-04 09:00,2026-12-04 10:00,30,10,0\n"
	d, err := Load(strings.NewReader(src), nil, Options{Speed: 60})
	require.NoError(t, err)
	var b bytes.Buffer
	require.NoError(t, WriteICS(&b, d, planOf(d, []int{0, 1}), ICSOptions{Stamp: icsStamp}))
	_, ev := parseICS(t, b.String())
	require.Len(t, ev, 1)
	assert.Equal(t, "20261204T090000", ev[0]["DTSTART"][0], "the file's own date, not ICSOptions.Date")
}

func TestICSRefusals(t *testing.T) {
	bench, err := Load(strings.NewReader("2\n0 1\n1 0\n0 10\n0 10\n"), nil, Options{})
	require.NoError(t, err)
	var b bytes.Buffer
	assert.ErrorContains(t, WriteICS(&b, bench, planOf(bench, []int{0, 1}), ICSOptions{Stamp: icsStamp, Date: icsStamp}), "a calendar needs a sites file with clock times")
	d := icsDataset(t)
	assert.ErrorContains(t, WriteICS(&b, d, planOf(d, []int{0, 1, 2, 3}), ICSOptions{Stamp: icsStamp}), "say which day")
	assert.ErrorContains(t, WriteICS(&b, d, planOf(d, []int{0, 1, 2, 3}), ICSOptions{Date: icsStamp}), "DTSTAMP")
}

func TestFoldLongUTF8(t *testing.T) {
	var b strings.Builder
	long := "SUMMARY:" + strings.Repeat("é", 100)
	writeFolded(&b, long)
	lines := strings.Split(strings.TrimSuffix(b.String(), "\r\n"), "\r\n")
	require.Greater(t, len(lines), 2)
	for _, l := range lines {
		assert.LessOrEqual(t, len(l), 75)
		assert.True(t, utf8.ValidString(l))
	}
	assert.Equal(t, []string{long}, unfold(b.String()))
}

func TestPlanJSONClockFields(t *testing.T) {
	d := icsDataset(t)
	j := d.PlanReport(solver.TravelTime, planOf(d, []int{0, 1, 2, 3}), nil)
	assert.Equal(t, "min", j.Unit)
	assert.Equal(t, "clock", j.Times)
	assert.Equal(t, "00:00", j.TimeOrigin)
	assert.Equal(t, []string{"DEP", "A", "B", "C"}, j.RouteIDs)
	assert.Equal(t, "07:30", j.Schedule[0].StartClock)
	assert.Equal(t, "08:00", j.Schedule[1].StartClock)
	assert.Equal(t, 480.0, j.Schedule[1].Start, "JSON numbers stay minutes")
	assert.Equal(t, "10:00", j.Schedule[1].LatestClock)
	assert.Equal(t, "Back\\slash; semi; and, comma", j.Schedule[1].Name)
	require.NotNil(t, j.Return)
	assert.Equal(t, "DEP", j.Return.ID)
	var buf bytes.Buffer
	require.NoError(t, WriteJSON(&buf, j))
	var back map[string]any
	require.NoError(t, json.Unmarshal(buf.Bytes(), &back))
	assert.Equal(t, "clock", back["times"])
}

func TestWriteCSVClockTimes(t *testing.T) {
	d := icsDataset(t)
	j := d.PlanReport(solver.TravelTime, planOf(d, []int{0, 1, 2, 3}), nil)
	var buf bytes.Buffer
	require.NoError(t, WriteCSV(&buf, d.Instance, j))
	recs, err := csv.NewReader(&buf).ReadAll()
	require.NoError(t, err)
	assert.Equal(t, CSVHeader, recs[0])
	require.Len(t, recs, 6, "header, four visits, the return")
	assert.Equal(t, []string{"1", "A", "Back\\slash; semi; and, comma"}, recs[2][:3])
	assert.Equal(t, "08:00", recs[2][4], "start")
	assert.Equal(t, "08:45", recs[2][6], "departure")
	assert.Equal(t, "08:00", recs[2][7], "earliest")
	assert.Equal(t, "10:00", recs[2][8], "latest")
	assert.Equal(t, "120", recs[2][9], "slack in minutes")
	assert.Equal(t, "return", recs[5][0])
	assert.Equal(t, "16:00", recs[4][8], "C closes at 16:00")
}

func TestWriteTableDatedOneDay(t *testing.T) {
	src := "id,name,earliest,latest,service,x,y\nD,Depot,2026-12-03 07:00,2026-12-03 18:00,0,0,0\nA,Alpha,2026-12-03 09:00,2026-12-03 10:00,30,10,0\n"
	d, err := Load(strings.NewReader(src), nil, Options{Speed: 60})
	require.NoError(t, err)
	var buf bytes.Buffer
	require.NoError(t, WriteTable(&buf, d.PlanReport(solver.TravelTime, planOf(d, []int{0, 1}), nil)))
	out := buf.String()
	assert.Contains(t, out, "date 2026-12-03\n")
	assert.Contains(t, out, "[09:00, 10:00]")
	assert.Contains(t, out, "Alpha")
	assert.Contains(t, out, "cost 20 min")
}
