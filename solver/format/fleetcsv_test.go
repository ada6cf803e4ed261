package format

import (
	"bytes"
	"encoding/csv"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func TestWriteFleetCSV(t *testing.T) {
	sl := 5.0
	j := FleetPlanReport{Unit: "min", Times: "clock", Routes: []FleetRouteJSON{{Vehicle: "T1", VehicleName: "=cmd()", Schedule: []PlanVisit{
		{ID: "A", Name: "@risk", ArrivalClock: "08:10", StartClock: "08:30", DepartureClock: "09:00", EarliestClock: "08:30", LatestClock: "09:00", Latest: &sl, Wait: 20, Slack: &sl},
		{ID: "B", Name: "Bakery", ArrivalClock: "09:10", StartClock: "09:10", DepartureClock: "09:40", EarliestClock: "08:00", Wait: 0},
	}}}, UnservedWhy: []UnservedJSON{{ID: "C", Name: "+SUM(1)", Why: "no vehicle can reach it within its window"}}}
	var b bytes.Buffer
	require.NoError(t, WriteFleetCSV(&b, j))
	rows, err := csv.NewReader(&b).ReadAll()
	require.NoError(t, err)
	assert.Equal(t, FleetCSVHeader, rows[0])
	assert.Equal(t, []string{"T1", "'=cmd()", "1", "A", "'@risk", "08:10", "08:30", "20", "09:00", "08:30", "09:00", "5", ""}, rows[1])
	assert.Equal(t, []string{"T1", "'=cmd()", "2", "B", "Bakery", "09:10", "09:10", "0", "09:40", "08:00", "open", "open", ""}, rows[2])
	assert.Equal(t, []string{"", "", "unserved", "C", "'+SUM(1)", "", "", "", "", "", "", "", "no vehicle can reach it within its window"}, rows[3])
}
