package format

import (
	"io"
	"strconv"
)

// FleetCSVHeader is the header of a fleet plan's CSV: the one-vehicle
// columns after the vehicle's id and name, then the unserved visits with
// "unserved" as their order and the reason in the last column.
var FleetCSVHeader = []string{"vehicle", "vehicle_name", "order", "site", "name", "arrival", "start", "wait", "departure", "earliest", "latest", "slack", "reason"}

// WriteFleetCSV writes one row per visit of each route, in the vehicles'
// order and the route's order (order counts from 1 in each route), then
// one row per unserved visit with an empty vehicle and the reason. Times
// are written as WriteCSV writes them; every cell goes through CSVCell.
func WriteFleetCSV(w io.Writer, j FleetPlanReport) error {
	cw := newCSVWriter(w)
	if err := cw.Write(FleetCSVHeader); err != nil {
		return err
	}
	pj := PlanReport{Unit: j.Unit, Times: j.Times}
	write := func(row []string) error {
		for i := range row {
			row[i] = CSVCell(row[i])
		}
		return cw.Write(row)
	}
	for _, r := range j.Routes {
		for k, v := range r.Schedule {
			tm := v.times(pj)
			if err := write([]string{r.Vehicle, r.VehicleName, strconv.Itoa(k + 1), v.ID, v.Name, tm[0], tm[1], pj.dur(v.Wait), tm[2], tm[3], tm[4], pj.durOpen(v.Slack), ""}); err != nil {
				return err
			}
		}
	}
	for _, u := range j.UnservedWhy {
		if err := write([]string{"", "", "unserved", u.ID, u.Name, "", "", "", "", "", "", "", u.Why}); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}
