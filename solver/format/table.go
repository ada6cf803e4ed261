//go:build !js

package format

// The table is the command line's: the web worker's build leaves it out.

import (
	"io"
	"strconv"
	"strings"

	"visitline/solver/fmtlite"
)

// WriteTable writes a plain-text table for a terminal.
func WriteTable(w io.Writer, j PlanReport) error {
	var b strings.Builder
	status := "all windows met"
	if !j.Feasible {
		status = fmtlite.Sprintf("%d late, total lateness %s", len(j.Late), j.dur(j.TotalLateness))
	}
	unit := ""
	if j.Unit != "" {
		unit = " " + j.Unit
	}
	fmtlite.Fprintf(&b, "%s  objective %s  cost %s%s  (%s)\n", Printable(j.Instance), j.Objective, j.dur(j.Cost), unit, status)
	if j.At != "" {
		now := j.NowClock
		if now == "" && j.Now != nil {
			now = j.dur(*j.Now)
		}
		fmtlite.Fprintf(&b, "re-planned from %s at %s; done: %s\n", Printable(j.At), now, Printable(strings.Join(j.Done, ", ")))
	}
	if j.LowerBound != nil {
		if j.ProvenOptimal {
			fmtlite.Fprintf(&b, "lower bound %s: optimal\n", j.dur(*j.LowerBound))
		} else if j.GapBoundPct != nil {
			fmtlite.Fprintf(&b, "lower bound %s: at most %.2f%% above optimal\n", j.dur(*j.LowerBound), *j.GapBoundPct)
		}
	}
	rows := j.Schedule
	if j.Return != nil {
		rows = append(append([]PlanVisit(nil), rows...), *j.Return)
	}
	// A dated plan on one day prints the date once, above the table.
	times := make([][5]string, len(rows))
	day := ""
	for k, v := range rows {
		times[k] = v.times(j)
		for _, t := range times[k] {
			if d, _, ok := strings.Cut(t, " "); ok && len(d) == 10 && d[4] == '-' && (day == "" || day == d) {
				day = d
			} else if t != "open" {
				day = "-"
			}
		}
	}
	if day != "" && day != "-" {
		fmtlite.Fprintf(&b, "date %s\n", day)
		for k := range times {
			for i, t := range times[k] {
				times[k][i] = strings.TrimPrefix(t, day+" ")
			}
		}
	}
	names := false
	tw := 10
	for k, v := range rows {
		names = names || v.Name != ""
		for _, t := range times[k] {
			if len(t) > tw {
				tw = len(t)
			}
		}
	}
	fmtlite.Fprintf(&b, "%5s  %-12s %*s %*s %8s %*s %*s %8s", "order", "site", tw, "arrival", tw, "start", "wait", tw, "departure", 2*tw+4, "window", "slack")
	if names {
		b.WriteString("  name")
	}
	b.WriteString("\n")
	for k, v := range rows {
		order := strconv.Itoa(k)
		if j.Return != nil && k == len(rows)-1 {
			order = "back"
		}
		tm := times[k]
		fmtlite.Fprintf(&b, "%5s  %-12s %*s %*s %8s %*s %*s %8s", order, Printable(v.ID), tw, tm[0], tw, tm[1], j.dur(v.Wait),
			tw, tm[2], 2*tw+4, "["+tm[3]+", "+tm[4]+"]", j.durOpen(v.Slack))
		if names {
			b.WriteString("  " + Printable(v.Name))
		}
		if v.Lateness > 0 {
			b.WriteString("  LATE by " + j.dur(v.Lateness))
		}
		b.WriteString("\n")
	}
	fmtlite.Fprintf(&b, "travel %s  completion %s  iterations %d  %.2fs (best at %.2fs, by %s)\n", j.dur(j.Travel),
		completion(j), j.Iterations, j.Seconds, j.SecondsToBest, j.FoundBy)
	if j.Reason != "" {
		fmtlite.Fprintf(&b, "why: %s\n", Printable(j.Reason))
	}
	_, err := io.WriteString(w, b.String())
	return err
}

// completion writes the end time as the schedule's times are written.
func completion(j PlanReport) string {
	if n := len(j.Schedule); n > 0 && j.Schedule[0].StartClock != "" {
		if j.Return != nil {
			return j.Return.ArrivalClock
		}
		return j.Schedule[n-1].DepartureClock
	}
	return j.dur(j.Completion)
}
