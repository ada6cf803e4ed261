package format

import (
	"context"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"visitline/solver/fleet"
)

// A small file in Solomon's layout (as in the Gehring and Homberger 1999
// files: name, VEHICLE, NUMBER CAPACITY, CUSTOMER, header, rows), made up
// for the test: depot at the origin, customers on a 3-4-5 triangle and at
// (1,1).
const tinySolomon = `tiny3

VEHICLE
NUMBER     CAPACITY
  2          15

CUSTOMER
CUST NO.  XCOORD.    YCOORD.    DEMAND   READY TIME  DUE DATE   SERVICE TIME

    0       0          0          0          0        200          0
    1       3          4         10         10         50          5
    2       1          1          8          0         30          2
    3       0          4          4         20        100          0
`

func TestReadSolomon(t *testing.T) {
	p, err := ReadSolomon(strings.NewReader(tinySolomon), "tiny.txt")
	require.NoError(t, err)
	assert.Equal(t, "tiny3", p.Name)
	assert.Equal(t, 4, p.N)
	require.Len(t, p.Vehicles, 2)
	for _, v := range p.Vehicles {
		assert.Equal(t, int64(15), v.Capacity)
		assert.Equal(t, 0, v.Start)
		assert.Equal(t, 0, v.End)
		assert.Equal(t, int64(0), v.ShiftStart)
		assert.Equal(t, int64(200*SolomonScale), v.ShiftEnd)
	}
	assert.Equal(t, []int64{0, 10, 8, 4}, p.Demand)
	assert.Equal(t, int64(10*SolomonScale), p.Early[1])
	assert.Equal(t, int64(50*SolomonScale), p.Late[1])
	assert.Equal(t, int64(5*SolomonScale), p.Service[1])
	// Worked by hand: |(0,0)-(3,4)| = 5 exactly; |(0,0)-(1,1)| = √2 =
	// 1.41421356237..., rounded up to the millionth: 1.414214;
	// |(1,1)-(0,4)| = √10 = 3.16227766016..., up: 3.162278.
	assert.Equal(t, int64(5_000_000), p.T(0, 1))
	assert.Equal(t, int64(5_000_000), p.T(1, 0))
	assert.Equal(t, int64(1_414_214), p.T(0, 2))
	assert.Equal(t, int64(3_162_278), p.T(2, 3))
	assert.Equal(t, int64(3_000_000), p.T(1, 3))
	assert.Equal(t, []int{1, 2, 3}, p.Visits())
	assert.True(t, IsSolomon(tinySolomon))
	assert.False(t, IsSolomon("id,name\nA,x\n"))
	assert.False(t, IsSolomon("3\n0 1 2\n"))
}

func TestReadSolomonBadInput(t *testing.T) {
	cases := []struct {
		name, edit, with, want string
	}{
		{"no vehicle line", "VEHICLE", "VEHICLES", "tiny.txt:3:1: VEHICLE:"},
		{"bad header", "NUMBER     CAPACITY", "COUNT CAPACITY", "tiny.txt:4:1: NUMBER CAPACITY:"},
		{"negative capacity", "  2          15", "  2          -15", "tiny.txt:5:2: capacity:"},
		{"no vehicles", "  2          15", "  0          15", "tiny.txt:5:1: number of vehicles:"},
		{"customer out of order", "    2       1          1", "    5       1          1", "tiny.txt:12:1: customer number:"},
		{"due before ready", "10         50          5", "60         50          5", "tiny.txt:11:6: due date:"},
		{"bad x", "    3       0          4", "    3       zero          4", "tiny.txt:13:2: x:"},
		{"short row", "    3       0          4          4         20        100          0", "    3       0          4          4", "tiny.txt:13: customer: 4 fields, want 7"},
		{"fractional demand", "    1       3          4         10", "    1       3          4         10.5", "tiny.txt:11:4: demand:"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			require.Contains(t, tinySolomon, c.edit)
			src := strings.Replace(tinySolomon, c.edit, c.with, 1)
			_, err := ReadSolomon(strings.NewReader(src), "tiny.txt")
			require.Error(t, err)
			assert.Contains(t, err.Error(), c.want)
		})
	}
}

// sharedVRPTW is ../shared/benchmarks/vrptw, skipped where absent (but
// not under CI=true).
func sharedVRPTW(t *testing.T) string {
	dir := filepath.Join("..", "..", "..", "shared", "benchmarks", "vrptw")
	if _, err := os.Stat(dir); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("benchmark data missing at %s", dir)
		}
		t.Skipf("benchmark data not found at %s", dir)
	}
	return dir
}

// Every Gehring and Homberger (1999) file of the shared set reads, with
// the fleet and size its README states: 200 customers and a depot.
func TestReadSolomonShared(t *testing.T) {
	dir := sharedVRPTW(t)
	files, err := filepath.Glob(filepath.Join(dir, "gh200", "*.txt"))
	require.NoError(t, err)
	require.Len(t, files, 60)
	for _, f := range files {
		data, err := os.ReadFile(f)
		require.NoError(t, err)
		require.True(t, IsSolomon(string(data)), f)
		p, err := ReadSolomon(strings.NewReader(string(data)), f)
		require.NoError(t, err, f)
		assert.Equal(t, 201, p.N, f)
		assert.Len(t, p.Visits(), 200, f)
	}
	// c1_2_1: depot (70,70), customer 1 (33,78), as in the file; the
	// distance √(37² + 8²) = √1433 in floating point, rounded up.
	data, err := os.ReadFile(filepath.Join(dir, "gh200", "c1_2_1.txt"))
	require.NoError(t, err)
	p, err := ReadSolomon(strings.NewReader(string(data)), "c1_2_1")
	require.NoError(t, err)
	assert.Len(t, p.Vehicles, 50)
	assert.Equal(t, int64(200), p.Vehicles[0].Capacity)
	assert.Equal(t, int64(math.Ceil(math.Sqrt(1433)*1e6)), p.T(0, 1))
}

const fleetSites = `id;name;earliest;latest;service;x;y;demand;priority
HUB;Depot;07:00;18:00;0;0;0;;
NORTH;North yard;07:00;18:00;0;0;30;;
A;Bakery;08:00;09:00;10;10;0;2,5;
B;Cafe;08:30;10:00;5;20;0;1;3
C;School;09:00;12:00;15;0;20;4;
`

const fleetVehicles = `id;name;start;end;shift start;shift end;capacity;max duration
V1;Ana;HUB;;07:30;17:00;5;8:00
V2;Ben;NORTH;free;08:00;16:00;;
`

func loadFleetDay(t *testing.T, sites, vehicles string) (*FleetDataset, error) {
	t.Helper()
	d, err := Load(strings.NewReader(sites), nil, Options{SitesName: "s.csv", Speed: 60})
	require.NoError(t, err)
	v, err := ReadVehicles(strings.NewReader(vehicles), "v.csv")
	if err != nil {
		return nil, err
	}
	return FleetFromDataset(d, FleetOptions{Vehicles: v, SitesText: sites})
}

func TestFleetFromVehiclesFile(t *testing.T) {
	fd, err := loadFleetDay(t, fleetSites, fleetVehicles)
	require.NoError(t, err)
	p := fd.Problem
	require.Len(t, p.Vehicles, 2)
	v1, v2 := p.Vehicles[0], p.Vehicles[1]
	assert.Equal(t, "V1", v1.ID)
	assert.Equal(t, "Ana", fd.VehicleNames[0])
	assert.Equal(t, 0, v1.Start)
	assert.Equal(t, 0, v1.End) // empty end: back to the start
	assert.Equal(t, int64(7*60+30)*SitesScale, v1.ShiftStart)
	assert.Equal(t, int64(17*60)*SitesScale, v1.ShiftEnd)
	assert.Equal(t, int64(5*LoadScale), v1.Capacity)
	assert.Equal(t, int64(8*60)*SitesScale, v1.MaxDuration)
	assert.Equal(t, 1, v2.Start)
	assert.Equal(t, fleet.FreeEnd, v2.End)
	assert.Equal(t, fleet.NoLimit, v2.Capacity)
	assert.Equal(t, fleet.NoLimit, v2.MaxDuration)
	// Demand with a decimal comma (semicolon file), priority default 1.
	assert.Equal(t, []int64{0, 0, 2500, 1000, 4000}, p.Demand)
	assert.Equal(t, []int64{1, 1, 1, 3, 1}, p.Priority)
	assert.Equal(t, []int{2, 3, 4}, p.Visits())
	for _, w := range fd.Warnings {
		assert.NotContains(t, w.String(), "demand")
		assert.NotContains(t, w.String(), "priority")
	}
	// Travel at 60 units per hour: one unit is a minute; A is 10 from HUB.
	assert.Equal(t, int64(10*SitesScale), p.T(0, 2))
}

func TestFleetBadInput(t *testing.T) {
	cases := []struct {
		name, sites, vehicles, want string
	}{
		{"start not a site", fleetSites, strings.Replace(fleetVehicles, "V2;Ben;NORTH", "V2;Ben;SOUTH", 1), `v.csv:3:3: start: "SOUTH" is not a site of s.csv`},
		{"end not a site", fleetSites, strings.Replace(fleetVehicles, "NORTH;free", "NORTH;DOCK", 1), `v.csv:3:4: end: "DOCK" is not a site`},
		{"shift ends before it starts", fleetSites, strings.Replace(fleetVehicles, "07:30;17:00", "17:30;17:00", 1), "v.csv:2:6: shift end: 17:00 is before the shift start 17:30"},
		{"negative capacity", fleetSites, strings.Replace(fleetVehicles, "17:00;5;", "17:00;-5;", 1), `v.csv:2:7: capacity: "-5" is negative`},
		{"bad capacity", fleetSites, strings.Replace(fleetVehicles, "17:00;5;", "17:00;five;", 1), `v.csv:2:7: capacity: "five" is not a number`},
		{"bad max duration", fleetSites, strings.Replace(fleetVehicles, ";8:00", ";long", 1), `v.csv:2:8: max duration:`},
		{"bad shift time", fleetSites, strings.Replace(fleetVehicles, "07:30;", "7h30;", 1), "v.csv:2:5: shift start:"},
		{"duplicate id", fleetSites, strings.Replace(fleetVehicles, "V2;", "V1;", 1), `v.csv:3:1: id: "V1" is used twice`},
		{"unknown column", fleetSites, strings.Replace(fleetVehicles, "max duration", "colour", 1), `v.csv:1:8: header: column "colour"`},
		{"negative demand", strings.Replace(fleetSites, ";2,5;", ";-1;", 1), fleetVehicles, `s.csv:4:8: demand:`},
		{"priority zero", strings.Replace(fleetSites, ";1;3", ";1;0", 1), fleetVehicles, `s.csv:5:9: priority:`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			require.NotEqual(t, fleetSites+fleetVehicles, c.sites+c.vehicles, "the case must change the input")
			_, err := loadFleetDay(t, c.sites, c.vehicles)
			require.Error(t, err)
			assert.Contains(t, err.Error(), c.want)
		})
	}
}

// The JSON contract of a fleet day: one route per vehicle used in the
// vehicles' order, visits as 0-based node indices without start and end,
// unserved visits with ids and reasons, cost the sum of the routes.
func TestFleetPlanJSONContract(t *testing.T) {
	// V1 cannot carry all three (2.5 + 1 + 4 over 5); Z closes before any
	// shift begins.
	sites := fleetSites + "Z;Early;07:00;07:05;5;5;5;1;\n"
	fd, err := loadFleetDay(t, sites, fleetVehicles)
	require.NoError(t, err)
	res, err := fleet.Solve(context.Background(), fd.Problem, fleet.Settings{Iterations: 300, Seed: 1})
	require.NoError(t, err)
	j := fd.PlanReport(0, false, &res)
	data, err := json.Marshal(j)
	require.NoError(t, err)
	var m map[string]any
	require.NoError(t, json.Unmarshal(data, &m))
	for _, k := range []string{"vehicles_used", "routes", "unserved", "unserved_ids", "unserved_reasons", "cost", "feasible"} {
		assert.Contains(t, m, k)
	}
	assert.True(t, j.Feasible)
	assert.Equal(t, []string{"Z"}, j.UnservedIDs)
	assert.Equal(t, []int{5}, j.Unserved)
	require.Len(t, j.UnservedWhy, 1)
	assert.Equal(t, "window", j.UnservedWhy[0].Reason)
	var sum float64
	served := map[int]bool{}
	last := -1
	for _, r := range j.Routes {
		sum += r.Travel
		idx := -1
		for k, v := range fd.Problem.Vehicles {
			if v.ID == r.Vehicle {
				idx = k
			}
		}
		require.Greater(t, idx, last, "routes in the vehicles' order")
		last = idx
		for k, v := range r.Visits {
			served[v] = true
			assert.Equal(t, fd.Problem.IDs[v], r.VisitIDs[k])
			assert.NotContains(t, []int{0, 1}, v, "start and end are not visits")
		}
	}
	assert.InDelta(t, j.Cost, sum, 1e-9)
	assert.Len(t, served, 3)
	assert.Equal(t, 2, len(j.Routes))
	var b strings.Builder
	require.NoError(t, WriteFleetTable(&b, j))
	assert.Contains(t, b.String(), "vehicle V1 (Ana)")
	assert.Contains(t, b.String(), "Z: no vehicle can reach it within its window")
}

func FuzzReadSolomon(f *testing.F) {
	f.Add(tinySolomon)
	f.Add("x\nVEHICLE\nNUMBER CAPACITY\n1 0\nCUSTOMER\n0 0 0 0 0 0 0\n")
	f.Add("x\nVEHICLE\nNUMBER CAPACITY\n1 5\nCUSTOMER\nCUST\n0 1e9 -1e9 0 0 10 0\n1 0.5 0.25 3 1 2 0\n")
	f.Fuzz(func(t *testing.T, src string) {
		p, err := ReadSolomon(strings.NewReader(src), "fuzz")
		if err == nil {
			require.NoError(t, p.Validate())
		}
	})
}

func FuzzReadVehicles(f *testing.F) {
	f.Add(fleetVehicles)
	f.Add("id,capacity\nA,1.5\nB,\n")
	f.Add("vehicle;max duration\nX;1:30\nY;7,5\n")
	f.Fuzz(func(t *testing.T, src string) {
		v, err := ReadVehicles(strings.NewReader(src), "fuzz")
		if err != nil {
			return
		}
		d, err := Load(strings.NewReader(fleetSites), nil, Options{SitesName: "s.csv", Speed: 60})
		require.NoError(t, err)
		fd, err := FleetFromDataset(d, FleetOptions{Vehicles: v, SitesText: fleetSites})
		if err == nil {
			require.NoError(t, fd.Problem.Validate())
		}
	})
}
