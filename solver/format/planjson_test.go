package format

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"math/rand"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/require"

	"visitline/solver"
	"visitline/solver/fleet"
	"visitline/solver/gen"
)

// stdJSON is what encoding/json writes for v as WriteJSON lays it out.
func stdJSON(t *testing.T, v any) string {
	t.Helper()
	var b bytes.Buffer
	enc := json.NewEncoder(&b)
	enc.SetIndent("", "  ")
	if err := enc.Encode(v); err != nil {
		t.Fatal(err)
	}
	return b.String()
}

func comparePlanJSON(t *testing.T, what string, j PlanReport) {
	t.Helper()
	var got bytes.Buffer
	require.NoError(t, WriteJSON(&got, j), what)
	if want := stdJSON(t, j); got.String() != want {
		t.Fatalf("%s: WriteJSON differs from encoding/json\ngot:\n%s\nwant:\n%s", what, got.String(), want)
	}
}

func compareFleetJSON(t *testing.T, what string, j FleetPlanReport) {
	t.Helper()
	var got bytes.Buffer
	require.NoError(t, WriteFleetJSON(&got, j), what)
	if want := stdJSON(t, j); got.String() != want {
		t.Fatalf("%s: WriteFleetJSON differs from encoding/json\ngot:\n%s\nwant:\n%s", what, got.String(), want)
	}
}

// The hand-written plan JSON is encoding/json's, byte for byte, on the
// plans of every example (one met, one overbooked), of the sites files of
// every dialect, of generated days of four tightness levels, with a bound
// and an explanation filled in, and with the dataset's warnings.
func TestPlanJSONAsEncodingJSON(t *testing.T) {
	n := 0
	for _, c := range exampleCases {
		d := loadExample(t, c)
		for _, obj := range []solver.Objective{solver.TravelTime, solver.CompletionTime} {
			res, err := solver.Solve(context.Background(), d.Instance, solver.Settings{Iterations: 50, Seed: 1, Objective: obj})
			require.NoError(t, err)
			j := d.PlanReport(obj, res.Best, &res)
			comparePlanJSON(t, c.dir+"/"+c.sites, j)
			lb, gap := j.Cost*0.9, 11.111111111111111
			j.LowerBound, j.GapBoundPct, j.Conflict, j.Reason = &lb, &gap, []string{"A", "B <&>"}, "they \"clash\"\n"
			comparePlanJSON(t, c.dir+" with a bound", j)
			n += 2
		}
	}
	files, err := filepath.Glob(filepath.Join("..", "..", "testdata", "sites", "*"))
	require.NoError(t, err)
	require.NotEmpty(t, files)
	for _, f := range files {
		data, err := os.ReadFile(f)
		require.NoError(t, err)
		mf, err := os.ReadFile(filepath.Join("..", "..", "testdata", "matrix", "ids-shuffled.csv"))
		require.NoError(t, err)
		d, err := Load(bytes.NewReader(data), bytes.NewReader(mf), Options{SitesName: f, MatrixName: "ids-shuffled.csv"})
		require.NoError(t, err, f)
		res, err := solver.Solve(context.Background(), d.Instance, solver.Settings{Iterations: 30, Seed: 2})
		require.NoError(t, err)
		comparePlanJSON(t, f, d.PlanReport(solver.TravelTime, res.Best, &res))
		n++
	}
	for _, tight := range []gen.Tightness{gen.None, gen.Wide, gen.Medium, gen.Tight} {
		for _, size := range []int{2, 12, 60} {
			g, err := gen.Generate(gen.Options{N: size, Tightness: tight, Seed: int64(size)})
			require.NoError(t, err)
			res, err := solver.Solve(context.Background(), g.Instance, solver.Settings{Iterations: 40, Seed: 1})
			require.NoError(t, err)
			comparePlanJSON(t, g.Instance.Name, NewPlanReport(g.Instance, solver.TravelTime, res.Best, &res))
			comparePlanJSON(t, g.Instance.Name+" without a result", NewPlanReport(g.Instance, solver.CompletionTime, res.Best, nil))
			n += 2
		}
	}
	require.Greater(t, n, 30)
}

// oddText is text to trip an encoder: quotes, backslashes, control
// characters, HTML, separators, invalid UTF-8, scripts and emoji.
var oddText = []string{"", "plain", `a "quoted" \ name`, "tab\tline\nfeed\rcr", "\x00\x01\x1b[2J\x7f", "<script>&amp;</script>", "\u2028\u2029",
	"bad\xffutf8\xc3", "Café Zürich 東京 🚚", "=cmd|' /C calc'!A0", "\u009b31m", "'", "\\u0041"}

// Reports filled at random (every field, odd text, null and absent
// bounds, NaN-free numbers of every size) write as encoding/json writes
// them, and a NaN is encoding/json's error.
func TestRandomReportsAsEncodingJSON(t *testing.T) {
	rng := rand.New(rand.NewSource(7))
	str := func() string { return oddText[rng.Intn(len(oddText))] }
	num := func() float64 {
		switch rng.Intn(6) {
		case 0:
			return 0
		case 1:
			return float64(rng.Intn(2000)) - 500
		case 2:
			return math.Round(rng.Float64()*1e6) / 100
		case 3:
			return rng.Float64() * 1e-8
		case 4:
			return rng.NormFloat64() * 1e22
		}
		return rng.NormFloat64()
	}
	ptr := func() *float64 {
		if rng.Intn(3) == 0 {
			return nil
		}
		v := num()
		return &v
	}
	strs := func() []string {
		switch rng.Intn(3) {
		case 0:
			return nil
		case 1:
			return []string{}
		}
		out := make([]string, 1+rng.Intn(3))
		for i := range out {
			out[i] = str()
		}
		return out
	}
	ints := func() []int {
		switch rng.Intn(3) {
		case 0:
			return nil
		case 1:
			return []int{}
		}
		out := make([]int, 1+rng.Intn(4))
		for i := range out {
			out[i] = rng.Intn(300) - 5
		}
		return out
	}
	visit := func() PlanVisit {
		v := PlanVisit{Node: rng.Intn(100), ID: str(), Arrival: num(), Start: num(), Wait: num(), Departure: num(), Earliest: num(),
			Latest: ptr(), Slack: ptr(), Lateness: num(), Name: str(), ArrivalClock: str(), StartClock: str()}
		if rng.Intn(2) == 0 {
			v.DepartureClock, v.EarliestClock, v.LatestClock = str(), str(), str()
		}
		return v
	}
	visits := func() []PlanVisit {
		if rng.Intn(4) == 0 {
			return nil
		}
		out := make([]PlanVisit, rng.Intn(4))
		for i := range out {
			out[i] = visit()
		}
		return out
	}
	for k := 0; k < 3000; k++ {
		j := PlanReport{Instance: str(), Objective: str(), Cost: num(), Feasible: rng.Intn(2) == 0, Route: ints(), RouteIDs: strs(),
			Shape: str(), RouteStart: str(), RouteEnd: str(), Schedule: visits(), Travel: num(), Completion: num(), TotalLateness: num(),
			Iterations: rng.Intn(1e6), Seconds: num(), SecondsToBest: num(), Improvements: rng.Intn(100), FoundBy: str(), Stop: str(),
			LowerBound: ptr(), GapBoundPct: ptr(), ProvenOptimal: rng.Intn(2) == 0, Conflict: strs(), Reason: str(), Unit: str(), Times: str(),
			TimeOrigin: str(), TravelSource: str(), Done: strs(), At: str(), Now: ptr(), NowClock: str(), Warnings: strs()}
		if rng.Intn(2) == 0 {
			r := visit()
			j.Return = &r
		}
		switch rng.Intn(3) {
		case 1:
			j.Late = []Late{}
		case 2:
			j.Late = []Late{{ID: str(), Node: 3, By: num()}, {ID: str(), By: num()}}
		}
		comparePlanJSON(t, "random report", j)

		f := FleetPlanReport{Instance: str(), Objective: str(), MinimizeVehicles: rng.Intn(2) == 0, Cost: num(), Feasible: rng.Intn(2) == 0,
			Vehicles: rng.Intn(30), VehiclesUsed: rng.Intn(30), Served: rng.Intn(300), Unserved: ints(), UnservedIDs: strs(),
			UnservedPriority: rng.Int63n(1e12) - 5, Reason: str(), Route: ints(), RouteIDs: strs(), Iterations: rng.Intn(1e6), Seconds: num(),
			SecondsToBest: num(), Improvements: rng.Intn(50), Unit: str(), Times: str(), TimeOrigin: str(), TravelSource: str(), Warnings: strs()}
		if rng.Intn(4) > 0 {
			f.Routes = []FleetRouteJSON{}
			for r := rng.Intn(3); r > 0; r-- {
				f.Routes = append(f.Routes, FleetRouteJSON{Vehicle: str(), VehicleName: str(), Visits: ints(), VisitIDs: strs(), Start: str(), End: str(),
					Begin: num(), BeginClock: str(), Travel: num(), Duration: num(), Load: num(), Capacity: ptr(), Schedule: visits(), Arrival: num(), ArrivalClock: str()})
			}
		}
		if rng.Intn(4) > 0 {
			f.UnservedWhy = []UnservedJSON{}
			for r := rng.Intn(3); r > 0; r-- {
				f.UnservedWhy = append(f.UnservedWhy, UnservedJSON{Node: rng.Intn(9), ID: str(), Name: str(), Reason: str(), Why: str()})
			}
		}
		compareFleetJSON(t, "random fleet report", f)
	}
	bad := math.NaN()
	var got bytes.Buffer
	err := WriteJSON(&got, PlanReport{LowerBound: &bad})
	_, werr := json.Marshal(PlanReport{LowerBound: &bad})
	require.Error(t, err)
	require.Error(t, werr)
	require.Equal(t, werr.Error(), err.Error())
	require.Zero(t, got.Len(), "nothing written on an error")
}

// Fleet plans: the team day of testdata, the invented day with an
// unserved visit, and Solomon files of the shared benchmarks (when there).
func TestFleetPlanJSONAsEncodingJSON(t *testing.T) {
	sites := fleetSites + "Z;Early;07:00;07:05;5;5;5;1;\n"
	fd, err := loadFleetDay(t, sites, fleetVehicles)
	require.NoError(t, err)
	for _, minVeh := range []bool{false, true} {
		res, err := fleet.Solve(context.Background(), fd.Problem, fleet.Settings{Iterations: 200, Seed: 1})
		require.NoError(t, err)
		compareFleetJSON(t, "invented fleet day", fd.PlanReport(solver.TravelTime, minVeh, &res))
	}
	one := "id;name;start;end;shift start;shift end;capacity;max duration\nV1;Ana;HUB;;07:30;17:00;;\n"
	fd1, err := loadFleetDay(t, fleetSites, one)
	require.NoError(t, err)
	res, err := fleet.Solve(context.Background(), fd1.Problem, fleet.Settings{Iterations: 100, Seed: 1})
	require.NoError(t, err)
	j1 := fd1.PlanReport(solver.CompletionTime, false, &res)
	require.NotEmpty(t, j1.Route, "a fleet of one writes the route")
	compareFleetJSON(t, "fleet of one", j1)

	dir := filepath.Join("..", "..", "testdata", "fleet")
	sf, err := os.ReadFile(filepath.Join(dir, "boiler-team-sites.csv"))
	require.NoError(t, err)
	vf, err := os.ReadFile(filepath.Join(dir, "boiler-team-vehicles.csv"))
	require.NoError(t, err)
	fdt, err := loadTeam(string(sf), string(vf))
	require.NoError(t, err)
	res, err = fleet.Solve(context.Background(), fdt.Problem, fleet.Settings{Iterations: 200, Seed: 3})
	require.NoError(t, err)
	compareFleetJSON(t, "boiler team", fdt.PlanReport(solver.TravelTime, true, &res))

	vrp := filepath.Join("..", "..", "..", "shared", "benchmarks", "vrptw", "gh200")
	for _, name := range []string{"c1_2_1.txt", "r2_2_3.txt", "rc1_2_5.txt"} {
		data, err := os.ReadFile(filepath.Join(vrp, name))
		if err != nil {
			t.Logf("%s not found: Solomon files skipped", name)
			break
		}
		p, err := ReadSolomon(strings.NewReader(string(data)), name)
		require.NoError(t, err)
		sd := &FleetDataset{Problem: p, Names: make([]string, p.N), VehicleNames: make([]string, len(p.Vehicles))}
		res, err := fleet.Solve(context.Background(), p, fleet.Settings{Iterations: 20, Seed: 1})
		require.NoError(t, err)
		compareFleetJSON(t, name, sd.PlanReport(solver.TravelTime, true, &res))
	}
}

func loadTeam(sites, vehicles string) (*FleetDataset, error) {
	d, err := Load(strings.NewReader(sites), nil, Options{SitesName: "team.csv"})
	if err != nil {
		return nil, err
	}
	v, err := ReadVehicles(strings.NewReader(vehicles), "vehicles.csv")
	if err != nil {
		return nil, err
	}
	return FleetFromDataset(d, FleetOptions{Vehicles: v, SitesText: sites})
}
