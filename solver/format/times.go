package format

import (
	"math"
	"strconv"
	"strings"
	"time"

	"visitline/solver"
	"visitline/solver/fmtlite"
)

// SitesScale is Instance.Scale of everything read from a sites file: the
// input unit is the minute and one internal unit is a hundredth of a
// second, so 6000 internal units make a minute. Clock times (to the
// second), whole or fractional seconds to two decimals, and minutes to
// three decimals are all exact; finer values are rounded to the nearest
// hundredth of a second. See DEVELOPERS.md, "Numbers".
const SitesScale int64 = 6000

// perSecond is the number of internal units in a second of a sites file.
const perSecond = SitesScale / 60

const horizon = solver.Horizon

// TimeMode says how the times of a sites file are written.
type TimeMode int

const (
	// Minutes: plain numbers, minutes from a reference chosen by the user
	// (time 0).
	Minutes TimeMode = iota
	// Clock: 24-hour clock times HH:MM on one day; time 0 is midnight.
	Clock
	// Dated: a date and a clock time, 2026-12-01 08:30 or
	// 2026-12-01T08:30; time 0 is midnight of the earliest date in the file.
	Dated
)

func (m TimeMode) String() string {
	switch m {
	case Clock:
		return "clock"
	case Dated:
		return "dated"
	}
	return "minutes"
}

// TimeBase says what internal time 0 is and how to write times back.
type TimeBase struct {
	Mode TimeMode
	// Origin is the day whose midnight is time 0, in Dated mode (a floating
	// local date, held in UTC). Zero otherwise.
	Origin time.Time
}

// stamp is a time as written: an optional day (days since 1970-01-01) and
// the seconds of that day.
type stamp struct {
	dated bool
	day   int64
	sec   int64
}

// parseClock reads H:MM, HH:MM or HH:MM:SS (24-hour clock; 24:00 is the
// end of the day), optionally after a date YYYY-MM-DD and a space or 'T'.
// The error text says what is wrong and what would be right.
func parseClock(s string) (stamp, string) {
	var st stamp
	t := s
	if len(t) >= 10 && t[4] == '-' && t[7] == '-' {
		d, err := time.Parse("2006-01-02", t[:10])
		if err != nil {
			return st, fmtlite.Sprintf("%q has no valid date; want YYYY-MM-DD HH:MM, e.g. 2026-12-01 08:30", s)
		}
		st.dated, st.day = true, d.Unix()/86400
		t = t[10:]
		if t == "" {
			return st, fmtlite.Sprintf("%q is a date without a time; want YYYY-MM-DD HH:MM, e.g. %s 08:30", s, s)
		}
		if t[0] != ' ' && t[0] != 'T' {
			return st, fmtlite.Sprintf("%q: want a space or T between the date and the time, e.g. 2026-12-01 08:30", s)
		}
		t = strings.TrimSpace(t[1:])
	} else if strings.Count(t, "/") == 2 || strings.Count(t, ".") == 2 {
		return st, fmtlite.Sprintf("%q: write dates as YYYY-MM-DD (ISO 8601), e.g. 2026-12-01 08:30", s)
	}
	low := strings.ToLower(t)
	if strings.HasSuffix(low, "am") || strings.HasSuffix(low, "pm") {
		return st, fmtlite.Sprintf("%q: write times on the 24-hour clock, e.g. 14:30 for 2:30 pm", s)
	}
	if strings.HasSuffix(t, "Z") || strings.LastIndexAny(t, "+-") > 0 {
		return st, fmtlite.Sprintf("%q: write local time without a zone or offset, e.g. 08:30", s)
	}
	h, m, sec, ok := splitHMS(t)
	if !ok {
		return st, fmtlite.Sprintf("%q is not a clock time; want HH:MM on the 24-hour clock, e.g. 08:30", s)
	}
	if h > 24 || m > 59 || sec > 59 || h == 24 && (m > 0 || sec > 0) {
		return st, fmtlite.Sprintf("%q is not a time of day; want 00:00 to 23:59 (or 24:00 for the end of the day)", s)
	}
	st.sec = h*3600 + m*60 + sec
	return st, ""
}

// splitHMS reads H:MM or H:MM:SS with any number of hour digits (up to 6)
// and two digits each for minutes and seconds.
func splitHMS(t string) (h, m, s int64, ok bool) {
	parts := strings.Split(t, ":")
	if len(parts) < 2 || len(parts) > 3 {
		return 0, 0, 0, false
	}
	digits := func(p string, min, max int) (int64, bool) {
		if len(p) < min || len(p) > max {
			return 0, false
		}
		for _, c := range p {
			if c < '0' || c > '9' {
				return 0, false
			}
		}
		v, err := strconv.ParseInt(p, 10, 64)
		return v, err == nil
	}
	var okh, okm, oks bool
	h, okh = digits(parts[0], 1, 6)
	m, okm = digits(parts[1], 2, 2)
	oks = true
	if len(parts) == 3 {
		s, oks = digits(parts[2], 2, 2)
	}
	return h, m, s, okh && okm && oks
}

// parseDuration reads a duration: minutes as a plain number (15, 7.5, or
// 7,5 when commaDecimal) or hours and minutes H:MM (1:30) or H:MM:SS.
func parseDuration(s string, commaDecimal bool) (int64, string) {
	if strings.Contains(s, ":") {
		h, m, sec, ok := splitHMS(s)
		if !ok || m > 59 || sec > 59 {
			return 0, fmtlite.Sprintf("%q is not a duration; want minutes (15 or 7.5) or hours and minutes H:MM (1:30)", s)
		}
		return (h*3600 + m*60 + sec) * perSecond, ""
	}
	if v, ok := fastUnits(s, SitesScale, commaDecimal); ok {
		return v, ""
	}
	r, ok := parseDecimal(s, commaDecimal)
	if !ok {
		return 0, fmtlite.Sprintf("%q is not a duration; want minutes (15 or 7.5) or hours and minutes H:MM (1:30)", s)
	}
	if r.Sign() < 0 {
		return 0, fmtlite.Sprintf("%q is negative; want a duration of 0 or more minutes", s)
	}
	v, ok := ratUnits(r, SitesScale)
	if !ok {
		return 0, fmtlite.Sprintf("%q minutes is too large", s)
	}
	return v, ""
}

// parseMinutesTime reads a time in Minutes mode: minutes from the reference.
func parseMinutesTime(s string, commaDecimal bool) (int64, string) {
	if v, ok := fastUnits(s, SitesScale, commaDecimal); ok {
		return v, ""
	}
	r, ok := parseDecimal(s, commaDecimal)
	if !ok {
		if len(s) >= 10 && s[4] == '-' && s[7] == '-' {
			_, msg := parseClock(s)
			return 0, msg
		}
		return 0, fmtlite.Sprintf("%s is not a time; want a clock time such as 08:00 (or 2026-12-01 08:00), or minutes from the day's reference (0, 90, 612.5)", clipQ(s))
	}
	if r.Sign() < 0 {
		return 0, fmtlite.Sprintf("%s is negative; want minutes from the reference, 0 or more", clipQ(s))
	}
	v, ok := ratUnits(r, SitesScale)
	if !ok {
		return 0, fmtlite.Sprintf("%q minutes is too large", s)
	}
	return v, ""
}

// modeOf says which mode a time cell is written in.
func modeOf(s string) TimeMode {
	if !strings.Contains(s, ":") {
		return Minutes
	}
	if len(s) >= 10 && s[4] == '-' && s[7] == '-' {
		return Dated
	}
	return Clock
}

// units converts a stamp to internal units from the origin day.
func (st stamp) units(originDay int64) int64 {
	return ((st.day-originDay)*86400 + st.sec) * perSecond
}

// Parse reads a time given outside the file (a shift start, "now") in the
// file's mode. In Dated mode a clock time without a date is taken on the
// origin day.
func (tb TimeBase) Parse(s string) (int64, error) {
	s = strings.TrimSpace(s)
	if tb.Mode == Minutes {
		if strings.Contains(s, ":") {
			return 0, fmtlite.Errorf("%q is a clock time, but the sites file gives times as minutes from a reference; give minutes", s)
		}
		v, msg := parseMinutesTime(s, true)
		if msg != "" {
			return 0, fmtlite.Errorf("%s", msg)
		}
		return v, nil
	}
	st, msg := parseClock(s)
	if msg != "" {
		return 0, fmtlite.Errorf("%s", msg)
	}
	origin := int64(0)
	if tb.Mode == Dated {
		origin = tb.Origin.Unix() / 86400
		if !st.dated {
			st.day = origin
		}
	} else if st.dated {
		return 0, fmtlite.Errorf("%q has a date, but the sites file's times have none; give the clock time alone, e.g. 11:20", s)
	}
	v := st.units(origin)
	if v < 0 {
		return 0, fmtlite.Errorf("%q is before the first day of the sites file (%s)", s, tb.Origin.Format("2006-01-02"))
	}
	return v, nil
}

// Format writes internal time v as the file wrote its times: minutes, a
// clock time (with +Nd past midnight of the day), or a date and clock time.
// Seconds show only when they are not zero; hundredths are rounded away.
// An absent bound (solver.Horizon, see OpenBound) is "open".
func (tb TimeBase) Format(v int64) string {
	if OpenBound(v) {
		return "open"
	}
	if tb.Mode == Minutes || v < 0 {
		return FormatMinutes(v)
	}
	sec := (v + perSecond/2) / perSecond
	days, rest := sec/86400, sec%86400
	clock := fmtlite.Sprintf("%02d:%02d", rest/3600, rest/60%60)
	if rest%60 != 0 {
		clock += fmtlite.Sprintf(":%02d", rest%60)
	}
	if tb.Mode == Dated {
		return tb.Origin.AddDate(0, 0, int(days)).Format("2006-01-02") + " " + clock
	}
	if days > 0 {
		clock += fmtlite.Sprintf(" +%dd", days)
	}
	return clock
}

// FormatMinutes writes a duration or minute-mode time of a sites file in
// minutes, rounded to two decimals for reading.
func FormatMinutes(v int64) string {
	return strconv.FormatFloat(math.Round(float64(v)/float64(SitesScale)*100)/100, 'f', -1, 64)
}
