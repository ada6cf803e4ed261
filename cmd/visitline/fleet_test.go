package main

import (
	"encoding/csv"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// An invented day: two vans from one hub, sites on a line.
const vanSites = `id,name,earliest,latest,service,x,y,demand
HUB,Hub,08:00,18:00,0,0,0,
P1,Florist,08:30,10:00,10,10,0,3
P2,Pharmacy,09:00,12:00,10,20,0,3
P3,Library,08:30,11:00,10,0,15,3
P4,Garage,13:00,15:00,10,0,25,3
`

const vanFleet = `id,name,start,end,shift start,shift end,capacity
V1,Ada,HUB,,08:00,17:00,6
V2,Bo,HUB,,08:00,17:00,6
`

func writeFiles(t *testing.T, files map[string]string) string {
	dir := t.TempDir()
	for name, text := range files {
		require.NoError(t, os.WriteFile(filepath.Join(dir, name), []byte(text), 0o644))
	}
	return dir
}

func TestSolveVehiclesJSON(t *testing.T) {
	dir := writeFiles(t, map[string]string{"sites.csv": vanSites, "vans.csv": vanFleet})
	code, out, errOut := runCmd(solveArgs("--format", "json", "--speed", "60", "--vehicles", filepath.Join(dir, "vans.csv"), filepath.Join(dir, "sites.csv"))...)
	require.Equal(t, 0, code, errOut)
	var j map[string]any
	require.NoError(t, json.Unmarshal([]byte(out), &j))
	assert.Equal(t, true, j["feasible"])
	assert.Equal(t, float64(2), j["vehicles_used"], "12 units of demand on vans of 6")
	assert.Empty(t, j["unserved"])
	routes := j["routes"].([]any)
	require.Len(t, routes, 2)
	assert.Equal(t, "V1", routes[0].(map[string]any)["vehicle"])
	assert.Nil(t, j["route"], "route is for a fleet of one")
}

// --format csv on a team day: one row per visit with its vehicle first,
// the unserved visits last, and a cell that a spreadsheet would run as a
// formula neutralised with a leading apostrophe (OWASP, "CSV Injection").
func TestSolveVehiclesCSV(t *testing.T) {
	sites := strings.Replace(vanSites, "P2,Pharmacy,", "P2,=SUM(A1:A9),", 1) + "P5,Too late,06:00,06:30,10,5,5,1\n"
	dir := writeFiles(t, map[string]string{"sites.csv": sites, "vans.csv": vanFleet})
	code, out, errOut := runCmd(solveArgs("--format", "csv", "--speed", "60", "--vehicles", filepath.Join(dir, "vans.csv"), filepath.Join(dir, "sites.csv"))...)
	require.Equal(t, 0, code, errOut)
	rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	require.NoError(t, err, out)
	require.Greater(t, len(rows), 2)
	assert.Equal(t, "vehicle", rows[0][0])
	byVehicle := map[string]int{}
	for _, r := range rows[1:] {
		byVehicle[r[0]]++
	}
	assert.Greater(t, byVehicle["V1"], 0, out)
	assert.Greater(t, byVehicle["V2"], 0, out)
	assert.Contains(t, out, "'=SUM", "formula neutralised")
	assert.NotContains(t, strings.ReplaceAll(out, "'=SUM", ""), "=SUM")
	assert.Contains(t, rows[len(rows)-1], "P5", "the visit no shift can reach is listed last")
}

// --format ics on a team's day: an iCalendar file (RFC 5545: CRLF line
// ends, section 3.1; VCALENDAR with VERSION and PRODID, 3.6) with one event
// per served visit, the vehicle's name first in its summary; --vehicle
// writes one vehicle's visits only.
func TestSolveVehiclesICS(t *testing.T) {
	dir := writeFiles(t, map[string]string{"sites.csv": vanSites, "vans.csv": vanFleet})
	run := func(extra ...string) string {
		args := append([]string{"--format", "ics", "--date", "2026-12-03", "--speed", "60", "--vehicles", filepath.Join(dir, "vans.csv")}, extra...)
		code, out, errOut := runCmd(solveArgs(append(args, filepath.Join(dir, "sites.csv"))...)...)
		require.Equal(t, 0, code, errOut)
		return out
	}
	all := run()
	assert.True(t, strings.HasPrefix(all, "BEGIN:VCALENDAR\r\nVERSION:2.0\r\nPRODID:"), all)
	assert.True(t, strings.HasSuffix(all, "END:VCALENDAR\r\n"))
	assert.NotContains(t, strings.ReplaceAll(all, "\r\n", ""), "\n", "every line ends in CRLF")
	assert.Equal(t, 4, strings.Count(all, "BEGIN:VEVENT"), "the four visits, none for the hub")
	assert.Equal(t, 2, strings.Count(all, "SUMMARY:Ada: "), all)
	assert.Equal(t, 2, strings.Count(all, "SUMMARY:Bo: "), all)
	assert.Contains(t, all, "DTSTART:20261203T")

	one := run("--vehicle", "V2")
	assert.Equal(t, 2, strings.Count(one, "BEGIN:VEVENT"), one)
	assert.NotContains(t, one, "SUMMARY:Ada: ")

	code, _, errOut := runCmd(solveArgs("--format", "ics", "--speed", "60", "--vehicles", filepath.Join(dir, "vans.csv"), "--vehicle", "V9", filepath.Join(dir, "sites.csv"))...)
	assert.Equal(t, 2, code)
	assert.Contains(t, errOut, "--vehicle V9: not a vehicle of this day; want one of V1, V2")
}

func TestSolveFleetOfOneKeepsRoute(t *testing.T) {
	dir := writeFiles(t, map[string]string{"sites.csv": vanSites})
	code, out, errOut := runCmd(solveArgs("--format", "json", "--speed", "60", "--fleet", "1", filepath.Join(dir, "sites.csv"))...)
	require.Equal(t, 0, code, errOut)
	var j map[string]any
	require.NoError(t, json.Unmarshal([]byte(out), &j))
	ids := j["route_ids"].([]any)
	assert.Equal(t, "HUB", ids[0])
	assert.Len(t, ids, 5)
}

func TestSolveSolomonByContent(t *testing.T) {
	dir := writeFiles(t, map[string]string{"day.txt": "tiny\n\nVEHICLE\nNUMBER CAPACITY\n 3 10\n\nCUSTOMER\nCUST NO. XCOORD. YCOORD. DEMAND READY TIME DUE DATE SERVICE TIME\n" +
		" 0 0 0 0 0 100 0\n 1 3 4 6 0 50 1\n 2 -3 -4 6 0 50 1\n"})
	code, out, errOut := runCmd(solveArgs("--format", "json", "--minimize", "vehicles", filepath.Join(dir, "day.txt"))...)
	require.Equal(t, 0, code, errOut)
	var j map[string]any
	require.NoError(t, json.Unmarshal([]byte(out), &j))
	// Worked by hand: demands 6 + 6 exceed one capacity of 10, so two
	// routes out and back, 2 × 5 + 2 × 5 = 20.
	assert.Equal(t, float64(2), j["vehicles_used"])
	assert.InDelta(t, 20, j["cost"], 1e-9)
}

func TestSolveFleetErrors(t *testing.T) {
	dir := writeFiles(t, map[string]string{"sites.csv": vanSites, "bad.csv": "id,start,capacity\nV1,DEPOT,5\n", "neg.csv": "id,start,capacity\nV1,HUB,-5\n"})
	cases := []struct {
		name string
		args []string
		code int
		want string
	}{
		{"start not a site", []string{"--vehicles", filepath.Join(dir, "bad.csv")}, 1, "bad.csv:2:2: start: \"DEPOT\" is not a site"},
		{"negative capacity", []string{"--vehicles", filepath.Join(dir, "neg.csv")}, 1, "neg.csv:2:3: capacity:"},
		{"vehicle without calendar", []string{"--fleet", "2", "--vehicle", "V1"}, 2, "--vehicle V1: picks one vehicle's calendar; use it with --format ics"},
		{"minimize what", []string{"--fleet", "2", "--minimize", "travel"}, 2, "--minimize \"travel\""},
		{"minimize without fleet", []string{"--minimize", "vehicles"}, 2, "needs a fleet"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			args := solveArgs(append(c.args, "--speed", "60", filepath.Join(dir, "sites.csv"))...)
			code, _, errOut := runCmd(args...)
			assert.Equal(t, c.code, code, errOut)
			assert.Contains(t, errOut, c.want)
		})
	}
}

// The command line writes testdata/fleet/boiler-team-plan.json for the
// invented boiler firm's day; the worker's test (wasm) compares its own
// plan with the same file, so that the two plan alike.
func TestSolveFleetGolden(t *testing.T) {
	t.Chdir("../..") // the file names in the plan are the repository's
	code, out, errOut := runCmd("solve", "--budget", "0", "--iterations", "400", "--seed", "3", "--quiet", "--format", "json",
		"--vehicles", "testdata/fleet/boiler-team-vehicles.csv", "testdata/fleet/boiler-team-sites.csv")
	require.Equal(t, 0, code, errOut)
	golden, err := os.ReadFile("testdata/fleet/boiler-team-plan.json")
	require.NoError(t, err)
	var got, want map[string]any
	require.NoError(t, json.Unmarshal([]byte(out), &got))
	require.NoError(t, json.Unmarshal(golden, &want))
	for _, k := range []string{"seconds", "seconds_to_best"} {
		delete(got, k)
		delete(want, k)
	}
	assert.Equal(t, want, got)
}
