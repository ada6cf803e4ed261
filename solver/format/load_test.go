package format

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"visitline/solver"
)

// A depot D and four visits with a matrix in minutes (asymmetric).
const fiveSites = `id,name,earliest,latest,service,position
D,Depot,07:00,18:00,10,
A,Alpha,08:00,12:00,20,
B,Beta,09:00,13:00,15,
C,Gamma,,,30,
E,Epsilon,10:00,16:00,5,
`

const fiveMatrix = `,D,A,B,C,E
D,0,10,20,15,24
A,11,0,12,18,20
B,19,12,0,10,14
C,15,17,11,0,9
E,23,21,13,8,0
`

func loadFive(t *testing.T, sites string, opt Options) *Dataset {
	t.Helper()
	opt.SitesName, opt.MatrixName = "s.csv", "m.csv"
	d, err := Load(strings.NewReader(sites), strings.NewReader(fiveMatrix), opt)
	require.NoError(t, err)
	require.NoError(t, d.Instance.Validate())
	return d
}

func loadFiveErr(t *testing.T, sites string, opt Options) error {
	t.Helper()
	opt.SitesName, opt.MatrixName = "s.csv", "m.csv"
	_, err := Load(strings.NewReader(sites), strings.NewReader(fiveMatrix), opt)
	require.Error(t, err)
	return err
}

// withPins sets the position column of fiveSites: pins maps id to text.
func withPins(pins map[string]string) string {
	var out []string
	for _, l := range strings.Split(strings.TrimSpace(fiveSites), "\n") {
		id, _, _ := strings.Cut(l, ",")
		out = append(out, l+pins[id])
	}
	return strings.Join(out, "\n") + "\n"
}

func TestLoadSitesAndMatrix(t *testing.T) {
	d := loadFive(t, fiveSites, Options{})
	in := d.Instance
	assert.Equal(t, 5, in.N)
	assert.Equal(t, SitesScale, in.Scale)
	assert.Equal(t, []string{"D", "A", "B", "C", "E"}, in.IDs)
	assert.Equal(t, "Gamma", d.Name(3))
	assert.Equal(t, solver.Closed, in.Shape)
	assert.Equal(t, 0, in.Start)
	assert.Equal(t, 7*60*min, in.Early[0])
	assert.Equal(t, 12*min, in.T(1, 2))
	assert.Equal(t, 19*min, in.T(2, 0))
	assert.Equal(t, horizon, in.Late[3])
	assert.Equal(t, 20*min, in.Service[1])
	assert.Nil(t, in.Position)
	assert.Equal(t, "matrix", d.Travel)
	assert.Equal(t, "min", d.Unit)
	assert.Equal(t, []int{2, 3, 4, 5, 6}, d.Lines)
	assert.Empty(t, d.Warnings)
}

func TestLoadShapes(t *testing.T) {
	cases := []struct {
		end   string
		shape solver.Shape
		endAt int
	}{
		{"", solver.Closed, 0},
		{"start", solver.Closed, 0},
		{"free", solver.OpenFree, 0},
		{"C", solver.OpenFixed, 3},
	}
	for _, c := range cases {
		t.Run(c.end, func(t *testing.T) {
			in := loadFive(t, fiveSites, Options{End: c.end}).Instance
			assert.Equal(t, c.shape, in.Shape)
			if c.shape == solver.OpenFixed {
				assert.Equal(t, c.endAt, in.End)
			}
		})
	}
	in := loadFive(t, fiveSites, Options{Start: "B", End: "D"}).Instance
	assert.Equal(t, 2, in.Start)
	assert.Equal(t, 0, in.End)
}

func TestLoadShiftStart(t *testing.T) {
	in := loadFive(t, fiveSites, Options{ShiftStart: "06:15"}).Instance
	assert.Equal(t, (6*60+15)*min, in.Early[0])
}

func TestLoadPins(t *testing.T) {
	cases := []struct {
		name string
		end  string
		pins map[string]string
		want []int
	}{
		{"closed", "", map[string]string{"A": "first", "B": "last", "C": "2"}, []int{0, 1, 4, 2, 0}},
		{"open free: last ends the path", "free", map[string]string{"B": "last"}, []int{0, 0, 4, 0, 0}},
		{"open fixed: last is before the end", "E", map[string]string{"B": "last", "A": "1"}, []int{0, 1, 3, 0, 0}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			in := loadFive(t, withPins(c.pins), Options{End: c.end}).Instance
			assert.Equal(t, c.want, in.Position)
		})
	}
}

func TestLoadDoneReplansClosedTour(t *testing.T) {
	d := loadFive(t, withPins(map[string]string{"C": "3", "B": "1", "E": "last"}), Options{Done: []string{"A", "B"}, Now: "11:20"})
	in := d.Instance
	assert.Equal(t, []string{"B", "D", "C", "E"}, in.IDs)
	assert.Equal(t, 0, in.Start)
	assert.Equal(t, solver.OpenFixed, in.Shape, "a closed tour becomes a path back to the depot")
	assert.Equal(t, 1, in.End)
	assert.Equal(t, (11*60+20)*min, in.Early[0])
	assert.Equal(t, int64(0), in.Service[0])
	assert.Equal(t, 18*60*min, in.Late[1], "the depot's latest still bounds the return")
	assert.Equal(t, 10*min, in.T(0, 2), "B to C as in the matrix")
	assert.Equal(t, 9*min, in.T(2, 3), "C to E as in the matrix")
	assert.Equal(t, []string{"Beta", "Depot", "Gamma", "Epsilon"}, d.Names)
	// C was visit 3; two visits are done, so it is now visit 1. E stays
	// the last visit before the return. B's pin has passed.
	assert.Equal(t, []int{0, 0, 1, 2}, in.Position)
	assert.Equal(t, []string{"A", "B"}, d.Done)
	assert.Equal(t, "B", d.At)
	assert.Empty(t, d.Warnings, "B's pin is gone with B, which is done")
}

func TestLoadDonePinPassed(t *testing.T) {
	d := loadFive(t, withPins(map[string]string{"E": "1"}), Options{Done: []string{"A"}})
	assert.Nil(t, d.Instance.Position)
	found := false
	for _, w := range d.Warnings {
		if strings.Contains(w.String(), "E was pinned to a place already passed (1 visits are done); the pin is dropped") {
			found = true
		}
	}
	assert.True(t, found, "%v", d.Warnings)
}

func TestLoadDoneDefaultNow(t *testing.T) {
	// Leave D at 07:00 + 10 service, 10 to A: arrive 07:20, wait to
	// 08:00, 20 service, 12 to B: 08:32, wait to 09:00, 15 service: 09:15.
	d := loadFive(t, fiveSites, Options{Done: []string{"D", "A", "B"}})
	assert.Equal(t, (9*60+15)*min, d.Now)
	assert.Equal(t, (9*60+15)*min, d.Instance.Early[0])
	assert.Equal(t, []string{"A", "B"}, d.Done, "the start is left, not done")
}

func TestLoadDoneOpenShapes(t *testing.T) {
	d := loadFive(t, fiveSites, Options{End: "free", Done: []string{"A"}, Now: "09:00"})
	assert.Equal(t, []string{"A", "B", "C", "E"}, d.Instance.IDs, "an open route has left its start")
	assert.Equal(t, solver.OpenFree, d.Instance.Shape)
	d = loadFive(t, fiveSites, Options{End: "E", Done: []string{"A", "C"}, Now: "10:00"})
	assert.Equal(t, []string{"C", "B", "E"}, d.Instance.IDs)
	assert.Equal(t, solver.OpenFixed, d.Instance.Shape)
	assert.Equal(t, 2, d.Instance.End)
	d = loadFive(t, fiveSites, Options{Now: "08:45"})
	assert.Equal(t, 5, d.Instance.N, "nothing done: only the start time moves")
	assert.Equal(t, (8*60+45)*min, d.Instance.Early[0])
	assert.Equal(t, "D", d.At)
}

func TestLoadOptionErrors(t *testing.T) {
	cases := []struct {
		name  string
		sites string
		opt   Options
		want  string
	}{
		{"unknown end", fiveSites, Options{End: "Z"}, `end "Z": no site has this id; the ids are D, A, B, C, E`},
		{"end at start", fiveSites, Options{End: "D"}, `end "D": is the start site; for a route back to the start use start`},
		{"unknown start", fiveSites, Options{Start: "Q"}, `start "Q": no site has this id`},
		{"shift start format", fiveSites, Options{ShiftStart: "6h"}, `shift-start "6h": "6h" is not a clock time`},
		{"shift start too late", fiveSites, Options{ShiftStart: "19:00"}, `shift-start "19:00": is after the latest return to D (18:00)`},
		{"unknown done", fiveSites, Options{Done: []string{"A", "Q"}}, `done "Q": no site has this id`},
		{"done twice", fiveSites, Options{Done: []string{"A", "A"}}, `done "A": is listed twice`},
		{"done end", fiveSites, Options{End: "E", Done: []string{"E"}}, `done "E": is the end of the route`},
		{"bad now", fiveSites, Options{Done: []string{"A"}, Now: "lunch"}, `now "lunch": "lunch" is not a clock time`},
		{"now after return", fiveSites, Options{Now: "18:30"}, `now "18:30": is after the latest return to D (18:00)`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err := loadFiveErr(t, c.sites, c.opt)
			assert.ErrorContains(t, err, c.want)
			var oe *OptionError
			assert.ErrorAs(t, err, &oe)
		})
	}
}

func TestLoadPinErrors(t *testing.T) {
	cases := []struct {
		name string
		pins map[string]string
		opt  Options
		want string
	}{
		{"start pinned", map[string]string{"D": "2"}, Options{}, "s.csv:2:6: position: D is the start of the route and cannot be pinned"},
		{"end pinned", map[string]string{"E": "first"}, Options{End: "E"}, "s.csv:6:6: position: E is the fixed end of the route and cannot be pinned"},
		{"two on one place", map[string]string{"A": "first", "B": "1"}, Options{}, "s.csv:4:6: position: B and A (line 3) are both pinned to visit 1"},
		{"past the end", map[string]string{"A": "5"}, Options{}, "s.csv:3:6: position: 5 is past the end of the route, which has 4 visits after the start"},
		{"past a fixed end", map[string]string{"A": "4"}, Options{End: "E"}, "s.csv:3:6: position: 4 is past the end of the route, which has 3 visits"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			assert.ErrorContains(t, loadFiveErr(t, withPins(c.pins), c.opt), c.want)
		})
	}
}

func TestLoadErrors(t *testing.T) {
	cases := []struct {
		name, sites string
		matrix      *string
		opt         Options
		want        string
	}{
		{"no travel", "id,name\nA,x\nB,y\n", nil, Options{}, "s.csv:1: travel: no travel times: give a travel matrix, or lat,lon (or x,y) columns"},
		{"missing coordinates", "id,lat,lon\nA,45,3\nB,,\n", nil, Options{}, "s.csv:3:2: lat: missing; travel times come from lat,lon, so every site needs them"},
		{"bad speed", "id,x,y\nA,0,0\nB,1,1\n", nil, Options{Speed: -3}, `speed "-3": want a speed above 0`},
		{"bad road factor", "id,lat,lon\nA,45,3\nB,45,4\n", nil, Options{RoadFactor: 0.5}, `road-factor "0.5": want 1 or more`},
		{"coordinates too far for the speed", "id,lat,lon\nA,45,3\nB,-45,-170\n", nil, Options{Speed: 1e-9}, `speed "1e-09": travel times from the coordinates are too large; check the units`},
		{"matrix error names the matrix", "id\nA\nB\n", ptr("0,1\n1\n"), Options{}, "m.csv:2: travel matrix: row 2 of the times has 1 travel times; want 2"},
		{"benchmark with a matrix", "2\n0 1\n1 0\n0 10\n0 10\n", ptr("0,1\n1,0\n"), Options{}, "m.csv: travel matrix: s.csv is in the benchmark matrix format"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			c.opt.SitesName, c.opt.MatrixName = "s.csv", "m.csv"
			var m *strings.Reader
			if c.matrix != nil {
				m = strings.NewReader(*c.matrix)
			}
			var err error
			if m != nil {
				_, err = Load(strings.NewReader(c.sites), m, c.opt)
			} else {
				_, err = Load(strings.NewReader(c.sites), nil, c.opt)
			}
			assert.ErrorContains(t, err, c.want)
		})
	}
}

func ptr(s string) *string { return &s }

func TestRouteIDsOfAPlan(t *testing.T) {
	d := loadFive(t, fiveSites, Options{})
	cases := []struct{ name, plan, want string }{
		{"ids agree", `{"route":[0,1,2,3,4],"route_ids":["D","A","B","C","E"]}`, ""},
		{"route_ids are optional", `{"route":[0,2,1,3,4]}`, ""},
		{"count differs", `{"route":[0,1],"route_ids":["D"]}`, "p.json: route_ids: has 1 ids but route has 2 nodes"},
		{"other data", `{"route":[0,1],"route_ids":["D","B"]}`, `p.json: route_ids: place 1 is node 1, which is A here, but the plan says B`},
		{"no route", `{"route_ids":["D"]}`, "p.json: route: missing"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			cl, err := ReadClaims(strings.NewReader(c.plan), "p.json")
			if err == nil {
				err = d.RouteIDsProblem(cl, "p.json")
			}
			if c.want == "" {
				require.NoError(t, err)
				return
			}
			assert.ErrorContains(t, err, c.want)
		})
	}
}

func TestLoadPastedText(t *testing.T) {
	_, err := Load(strings.NewReader("id,open\nA,8:00\nB,8:61\n"), strings.NewReader("0,1\n1,0\n"), Options{})
	assert.EqualError(t, err, `pasted text:3:2: earliest (column "open"): "8:61" is not a time of day; want 00:00 to 23:59 (or 24:00 for the end of the day)`)
	_, err = Load(strings.NewReader("id\nA\nB\n"), strings.NewReader("0,1\n-1,0\n"), Options{})
	assert.EqualError(t, err, `pasted text:2:1: travel time from B to A: "-1" is negative; travel times must be 0 or more`)
}

func TestLoadBenchmark(t *testing.T) {
	src := "# tiny\n3\n0 1.5 2\n1 0 3\n2 3.25 0\n0 100\n1 10\n2 20\n"
	assert.True(t, IsBenchmark(src))
	assert.False(t, IsBenchmark("id,name\nA,x\n"))
	assert.False(t, IsBenchmark("0,1\n1,0\n"))
	d, err := Load(strings.NewReader(src), nil, Options{SitesName: "b.txt", End: "free"})
	require.NoError(t, err)
	assert.Equal(t, "", d.Unit)
	assert.Equal(t, int64(100), d.Instance.Scale)
	assert.Equal(t, []string{"0", "1", "2"}, d.Instance.IDs)
	assert.Equal(t, solver.OpenFree, d.Instance.Shape)
	assert.Equal(t, "3.25", d.FormatTime(325))
	d, err = Load(strings.NewReader(src), nil, Options{Done: []string{"2"}, Now: "5.5"})
	require.NoError(t, err)
	assert.Equal(t, int64(550), d.Instance.Early[0])
	assert.Equal(t, []string{"2", "0", "1"}, d.Instance.IDs)
}

func TestLoadWarnings(t *testing.T) {
	sites := "id,earliest,latest,service\nD,08:00,09:00,0\nA,08:10,08:10,0\nB,08:00,08:15,0\nC,,,0\n"
	matrix := ",D,A,B,C\nD,0,20,30,5\nA,30,0,5,5\nB,30,5,0,5\nC,5,5,5,0\n"
	d, err := Load(strings.NewReader(sites), strings.NewReader(matrix), Options{SitesName: "s.csv", MatrixName: "m.csv"})
	require.NoError(t, err)
	var got []string
	for _, w := range d.Warnings {
		got = append(got, w.String())
	}
	all := strings.Join(got, "\n")
	assert.Contains(t, all, "m.csv:2:4: travel time from D to B: 30 min direct, but 10 min by way of C (5 + 5): check for a typo or mixed units")
	assert.Contains(t, all, "m.csv:4:2: travel time from B to D: 30 min direct")
	assert.Contains(t, all, "m.csv: travel matrix: 1 more pairs are quicker by a detour than direct")
	assert.Contains(t, all, "s.csv:3: A: the window opens and closes at 08:10: service must start at exactly that time")
	assert.Contains(t, all, "s.csv:4: B: cannot be reached in time even as the first visit: leaving D at 08:00, the earliest arrival is 08:30, after the latest 08:15")
	assert.NotContains(t, all, "s.csv:5: C: cannot be reached")
}

func TestLoadWarnsNoWayBack(t *testing.T) {
	sites := "id,earliest,latest,service\nD,08:00,09:00,0\nA,08:50,08:55,20\n"
	d, err := Load(strings.NewReader(sites), strings.NewReader("0,10\n10,0\n"), Options{SitesName: "s.csv"})
	require.NoError(t, err)
	require.Len(t, d.Warnings, 1)
	assert.Equal(t, "s.csv:3: A: even as the first visit, the route cannot reach D by its latest 09:00 afterwards (earliest 09:20)", d.Warnings[0].String())
}

func TestLoadCleanHasNoWarnings(t *testing.T) {
	d := loadFive(t, fiveSites, Options{})
	assert.Empty(t, d.Warnings)
}

// Every published benchmark file is told from a sites file by content, so
// that Load (and the command line's bench and check) reads it as before.
func TestLoadTellsEveryBenchmarkFile(t *testing.T) {
	dir := sharedDir(t)
	files, err := filepath.Glob(filepath.Join(dir, "*", "*"))
	require.NoError(t, err)
	require.NotEmpty(t, files)
	for _, f := range files {
		data, err := os.ReadFile(f)
		require.NoError(t, err)
		require.True(t, IsBenchmark(string(data)), f)
	}
}
