package format

import (
	"io"
	"math"
	"strings"
	"time"

	"visitline/solver/fmtlite"
)

// WriteFleetICS writes a team's plan as an iCalendar file (RFC 5545), one
// event per visit from the start of service to its end, with the vehicle's
// name (or id) first in each event's summary. vehicle, when not empty, is
// the id of the one vehicle whose visits are written (a calendar to hand to
// that driver or technician). Times are floating local times (section
// 3.3.5, form 1), lines end in CRLF and are folded at 75 octets (3.1), as
// WriteICS does for one vehicle.
func WriteFleetICS(w io.Writer, d *FleetDataset, j FleetPlanReport, vehicle string, o ICSOptions) error {
	base, err := icsDay(d.Unit, d.Time, o)
	if err != nil {
		return err
	}
	if vehicle != "" {
		found := false
		for _, v := range d.Problem.Vehicles {
			found = found || v.ID == vehicle
		}
		if !found {
			return fmtlite.Errorf("vehicle %s: not a vehicle of this day", clipQ(vehicle))
		}
	}
	// Report times are minutes from the day's origin.
	at := func(min float64) time.Time { return base.Add(time.Duration(math.Round(min*60)) * time.Second) }
	var b strings.Builder
	line := func(name, value string) { writeFolded(&b, name+":"+value) }
	stamp, day := icsHeader(line, "team", base, o)
	for _, r := range j.Routes {
		if vehicle != "" && r.Vehicle != vehicle {
			continue
		}
		who := r.VehicleName
		if who == "" {
			who = r.Vehicle
		}
		for k, v := range r.Schedule {
			icsEventStart(line, r.Vehicle+"\x00"+v.ID, day, stamp, at(v.Start), at(v.Departure))
			name := v.Name
			if name == "" {
				name = v.ID
			}
			line("SUMMARY", escapeText(fmtlite.Sprintf("%s: %s", who, name)))
			desc := []string{fmtlite.Sprintf("Vehicle %s, visit %d of %d", r.Vehicle, k+1, len(r.Schedule)), "Site " + v.ID}
			win := v.EarliestClock + " to " + v.LatestClock
			if v.Latest == nil {
				win = "from " + v.EarliestClock + ", no latest"
			}
			desc = append(desc, "Window "+win)
			arr := "Arrive " + v.ArrivalClock
			if v.ArrivalClock == "" {
				arr = "Arrive " + at(v.Arrival).Format("15:04")
			}
			if v.Wait > 0 {
				arr += fmtlite.Sprintf(", wait %s min", strings.TrimSuffix(strings.TrimRight(fmtlite.Sprintf("%.2f", v.Wait), "0"), "."))
			}
			desc = append(desc, arr, "Travel times are estimates: obey traffic law and working-time rules.")
			line("DESCRIPTION", escapeText(strings.Join(desc, "\n")))
			line("END", "VEVENT")
		}
	}
	line("END", "VCALENDAR")
	_, err = io.WriteString(w, b.String())
	return err
}
