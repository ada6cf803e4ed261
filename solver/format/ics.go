package format

import (
	"errors"
	"hash/fnv"
	"io"
	"strings"
	"time"
	"unicode/utf8"

	"visitline/solver"
	"visitline/solver/fmtlite"
)

// ICSOptions say how to place a plan on the calendar.
type ICSOptions struct {
	// Date is the day of a plan whose times carry no date (clock times, or
	// minutes: time 0 is midnight of Date). Dated files ignore it.
	Date time.Time
	// Stamp is written as every event's DTSTAMP: when the file was made.
	Stamp time.Time
}

// WriteICS writes plan p of d as an iCalendar file (RFC 5545) with one
// event per visit, from the start of service to its end: the start site
// only when it has a service time, the return of a closed tour never.
// Times are floating local times (RFC 5545 section 3.3.5, form 1), as in
// the sites file. Lines end in CRLF and are folded at 75 octets (3.1).
func WriteICS(w io.Writer, d *Dataset, p solver.Plan, o ICSOptions) error {
	in := d.Instance
	base, err := icsDay(d.Unit, d.Time, o)
	if err != nil {
		return err
	}
	at := func(v int64) time.Time {
		return base.Add(time.Duration((v+perSecond/2)/perSecond) * time.Second)
	}
	var b strings.Builder
	line := func(name, value string) { writeFolded(&b, name+":"+value) }
	stamp, day := icsHeader(line, "route", base, o)
	for k, v := range p.Schedule.Visits {
		node := v.Node
		if k == 0 && in.Service[node] == 0 {
			continue
		}
		icsEventStart(line, in.ID(node), day, stamp, at(v.Start), at(v.Departure))
		summary := d.Name(node)
		if v.Lateness > 0 {
			summary = "LATE: " + summary
		}
		line("SUMMARY", escapeText(summary))
		var desc []string
		desc = append(desc, "Site "+in.ID(node))
		win := "open"
		if in.Early[node] > 0 || !OpenBound(in.Late[node]) {
			win = d.FormatTime(in.Early[node]) + " to " + d.FormatTime(in.Late[node])
		}
		desc = append(desc, "Window "+win)
		arr := "Arrive " + d.FormatTime(v.Arrival)
		if v.Wait > 0 {
			arr += ", wait " + FormatMinutes(v.Wait) + " min"
		}
		desc = append(desc, arr)
		if v.Lateness > 0 {
			desc = append(desc, "Late by "+FormatMinutes(v.Lateness)+" min")
		}
		desc = append(desc, "Travel times are estimates: obey traffic law and working-time rules.")
		line("DESCRIPTION", escapeText(strings.Join(desc, "\n")))
		if d.LatLon != nil {
			line("GEO", fmtlite.Sprintf("%.6f;%.6f", d.LatLon[node][0], d.LatLon[node][1]))
		}
		line("END", "VEVENT")
	}
	line("END", "VCALENDAR")
	_, err = io.WriteString(w, b.String())
	return err
}

// localForm is a floating local date-time (RFC 5545 section 3.3.5, form 1).
const localForm = "20060102T150405"

// icsDay checks what a calendar needs (clock times, a DTSTAMP) and gives
// the midnight that report times count from: the file's own day, or
// o.Date for files whose times carry no date.
func icsDay(unit string, tb TimeBase, o ICSOptions) (time.Time, error) {
	if unit == "" {
		return time.Time{}, errors.New("a calendar needs a sites file with clock times; a benchmark file does not say what its times are")
	}
	if o.Stamp.IsZero() {
		return time.Time{}, errors.New("a calendar needs the time it was made (DTSTAMP)")
	}
	if tb.Mode == Dated {
		return tb.Origin, nil
	}
	if o.Date.IsZero() {
		return time.Time{}, errors.New("the sites file has no dates: say which day the plan is for")
	}
	y, m, dd := o.Date.Date()
	return time.Date(y, m, dd, 0, 0, 0, 0, time.UTC), nil
}

// icsHeader writes the VCALENDAR lines (section 3.6) and returns the
// DTSTAMP value and the day as UIDs carry it.
func icsHeader(line func(name, value string), what string, base time.Time, o ICSOptions) (stamp, day string) {
	line("BEGIN", "VCALENDAR")
	line("VERSION", "2.0")
	line("PRODID", "-//Visitline//Visitline "+what+" plan//EN")
	line("CALSCALE", "GREGORIAN")
	line("METHOD", "PUBLISH")
	return o.Stamp.UTC().Format("20060102T150405Z"), base.Format("20060102")
}

// icsEventStart opens a VEVENT: a UID from key (stable for the same visit
// on the same day), DTSTAMP, DTSTART and, when the service takes time,
// DTEND.
func icsEventStart(line func(name, value string), key, day, stamp string, start, end time.Time) {
	h := fnv.New64a()
	h.Write([]byte(key))
	line("BEGIN", "VEVENT")
	line("UID", fmtlite.Sprintf("%s-%016x@visitline.invalid", day, h.Sum64()))
	line("DTSTAMP", stamp)
	line("DTSTART", start.Format(localForm))
	if end.After(start) {
		// DTEND must be later than DTSTART (3.8.2.2); without it the
		// event ends when it starts (3.6.1).
		line("DTEND", end.Format(localForm))
	}
}

// escapeText escapes a TEXT value (RFC 5545 section 3.3.11): backslash,
// semicolon and comma get a backslash, a newline becomes \n. Other control
// characters, which TEXT does not allow, are dropped.
func escapeText(s string) string {
	var b strings.Builder
	s = strings.ReplaceAll(s, "\r\n", "\n")
	for _, c := range s {
		switch {
		case c == '\\' || c == ';' || c == ',':
			b.WriteByte('\\')
			b.WriteRune(c)
		case c == '\n':
			b.WriteString(`\n`)
		case c == '\t':
			b.WriteRune(c)
		case c < 0x20 || c == 0x7f:
		default:
			b.WriteRune(c)
		}
	}
	return b.String()
}

// writeFolded writes one content line, folded so that no line is longer
// than 75 octets without its CRLF; a continuation starts with one space
// (RFC 5545 section 3.1). UTF-8 sequences are never split.
func writeFolded(b *strings.Builder, s string) {
	limit := 75
	for len(s) > limit {
		cut := limit
		for cut > 0 && !utf8.RuneStart(s[cut]) {
			cut--
		}
		b.WriteString(s[:cut])
		b.WriteString("\r\n ")
		s = s[cut:]
		limit = 74 // the leading space counts
	}
	b.WriteString(s)
	b.WriteString("\r\n")
}
