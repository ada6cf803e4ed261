//go:build !js

package format

// The table is the command line's: the web worker's build leaves it out
// (with text/tabwriter, which imports fmt).

import (
	"io"
	"text/tabwriter"

	"visitline/solver"
	"visitline/solver/fmtlite"
)

// WriteFleetTable writes a fleet plan for reading: a summary, then one
// block per vehicle used, then the unserved visits with their reasons.
func WriteFleetTable(w io.Writer, j FleetPlanReport) error {
	unit := ""
	if j.Unit != "" {
		unit = " " + j.Unit
	}
	fmtlite.Fprintf(w, "%s: %d of %d vehicles, %d visits served, %d unserved, %s %s%s", j.Instance, j.VehiclesUsed, j.Vehicles, j.Served, len(j.Unserved), j.Objective, fnum(round2(j.Cost)), unit)
	if !j.Feasible {
		fmtlite.Fprint(w, ", NOT FEASIBLE")
	}
	fmtlite.Fprintln(w)
	clock := j.Times == "clock" || j.Times == "dated"
	tm := func(v float64, c string) string {
		if clock && c != "" {
			return c
		}
		if v > 1e12 {
			return "open"
		}
		return fnum(round2(v))
	}
	for _, r := range j.Routes {
		name := r.Vehicle
		if r.VehicleName != "" {
			name += " (" + r.VehicleName + ")"
		}
		end := r.End
		if end == "" {
			end = "last visit"
		}
		load := fnum(round2(r.Load))
		if r.Capacity != nil {
			load += " of " + fnum(round2(*r.Capacity))
		}
		fmtlite.Fprintf(w, "\nvehicle %s: %d visits, from %s at %s to %s at %s, travel %s%s, working day %s%s, load %s\n", name, len(r.Visits), r.Start, tm(r.Begin, r.BeginClock),
			end, tm(r.Arrival, r.ArrivalClock), fnum(round2(r.Travel)), unit, fnum(round2(r.Duration)), unit, load)
		tw := tabwriter.NewWriter(w, 2, 4, 2, ' ', 0)
		fmtlite.Fprintln(tw, "  #\tsite\tname\tarrival\tstart\twait\tdeparture\twindow\tslack")
		for k, v := range r.Schedule {
			fmtlite.Fprintf(tw, "  %d\t%s\t%s\t%s\t%s\t%s\t%s\t%s-%s\t%s\n", k+1, v.ID, v.Name, tm(v.Arrival, v.ArrivalClock), tm(v.Start, v.StartClock), fnum(round2(v.Wait)),
				tm(v.Departure, v.DepartureClock), tm(v.Earliest, v.EarliestClock), latestText(v, tm), slackText(v))
		}
		if err := tw.Flush(); err != nil {
			return err
		}
	}
	if len(j.UnservedWhy) > 0 {
		fmtlite.Fprintln(w, "\nunserved:")
		for _, u := range j.UnservedWhy {
			fmtlite.Fprintf(w, "  %s: %s\n", u.ID, u.Why)
		}
	}
	for _, s := range j.Warnings {
		fmtlite.Fprintf(w, "warning: %s\n", s)
	}
	return nil
}

func round2(v float64) float64 {
	if v >= float64(solver.Horizon)/2 {
		return v
	}
	return float64(int64(v*100+sign(v)*0.5)) / 100
}

func sign(v float64) float64 {
	if v < 0 {
		return -1
	}
	return 1
}

// latestText and slackText write a bound that may be absent as "open",
// as the one-vehicle table does.
func latestText(v PlanVisit, tm func(float64, string) string) string {
	if v.Latest == nil {
		return "open"
	}
	return tm(*v.Latest, v.LatestClock)
}

func slackText(v PlanVisit) string {
	if v.Slack == nil {
		return "open"
	}
	return fnum(round2(*v.Slack))
}
