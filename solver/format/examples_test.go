package format

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"visitline/solver"
)

// exampleCase is one invented scenario of examples/, loaded as its README
// says to run it.
type exampleCase struct {
	dir, sites, matrix string
	opt                Options
	feasible           bool
}

var exampleCases = []exampleCase{
	{"bakery", "sites.csv", "travel.csv", Options{}, true},
	{"boiler", "sites.csv", "", Options{}, true},
	{"boiler", "sites-overbooked.csv", "", Options{}, false},
	{"art", "sites.csv", "travel.tsv", Options{End: "SOUTH"}, true},
}

func loadExample(t *testing.T, c exampleCase) *Dataset {
	t.Helper()
	dir := filepath.Join("..", "..", "examples", c.dir)
	sf, err := os.Open(filepath.Join(dir, c.sites))
	require.NoError(t, err)
	defer sf.Close()
	opt := c.opt
	opt.SitesName = filepath.Join(dir, c.sites)
	var d *Dataset
	if c.matrix != "" {
		mf, err := os.Open(filepath.Join(dir, c.matrix))
		require.NoError(t, err)
		defer mf.Close()
		opt.MatrixName = filepath.Join(dir, c.matrix)
		d, err = Load(sf, mf, opt)
		require.NoError(t, err)
	} else {
		d, err = Load(sf, nil, opt)
		require.NoError(t, err)
	}
	return d
}

// exactFeasible searches every order of the visits depth first, cutting a
// branch as soon as a window is missed, and returns a route that meets
// every window, or nil when there is none. It is exponential: for the
// small examples only.
func exactFeasible(in *solver.Instance) []int {
	route := []int{in.Start}
	used := make([]bool, in.N)
	used[in.Start] = true
	var dfs func(t int64) bool
	dfs = func(t int64) bool {
		if len(route) == in.N {
			if in.Shape == solver.Closed {
				return t+in.T(route[len(route)-1], in.Start) <= in.Late[in.Start]
			}
			return true
		}
		last := route[len(route)-1]
		for v := 0; v < in.N; v++ {
			if used[v] || in.Shape == solver.OpenFixed && v == in.End && len(route) < in.N-1 {
				continue
			}
			if in.Position != nil && in.Position[v] > 0 && in.Position[v] != len(route) {
				continue
			}
			st := t + in.T(last, v)
			if st < in.Early[v] {
				st = in.Early[v]
			}
			if st > in.Late[v] {
				continue
			}
			used[v] = true
			route = append(route, v)
			if dfs(st + in.Service[v]) {
				return true
			}
			route = route[:len(route)-1]
			used[v] = false
		}
		return false
	}
	if dfs(in.Early[in.Start] + in.Service[in.Start]) {
		return route
	}
	return nil
}

func TestExamplesLoad(t *testing.T) {
	for _, c := range exampleCases {
		t.Run(c.dir+"/"+c.sites, func(t *testing.T) {
			d := loadExample(t, c)
			require.NoError(t, d.Instance.Validate())
			assert.Empty(t, d.Warnings, "the examples are clean data")
			assert.Equal(t, "min", d.Unit)
			_, err := os.Stat(filepath.Join("..", "..", "examples", c.dir, "README.md"))
			assert.NoError(t, err, "each example has a README")
		})
	}
}

func TestExamplesFeasibilityByExactSearch(t *testing.T) {
	for _, c := range exampleCases {
		t.Run(c.dir+"/"+c.sites, func(t *testing.T) {
			in := loadExample(t, c).Instance
			route := exactFeasible(in)
			if !c.feasible {
				assert.Nil(t, route, "no order meets every window")
				return
			}
			require.NotNil(t, route)
			require.NoError(t, solver.CheckRoute(in, route))
			assert.True(t, solver.Evaluate(in, route).Feasible)
		})
	}
}

func TestExamplesSolveEndToEnd(t *testing.T) {
	for _, c := range exampleCases {
		t.Run(c.dir+"/"+c.sites, func(t *testing.T) {
			d := loadExample(t, c)
			in := d.Instance
			// An iteration of the engine's lateness search on a day that
			// cannot be met is costly: keep that budget small.
			iters := 200
			if !c.feasible {
				iters = 5
			}
			res, err := solver.Solve(context.Background(), in, solver.Settings{Iterations: iters, Seed: 1})
			require.NoError(t, err)
			p := res.Best
			require.NoError(t, solver.CheckRoute(in, p.Route))
			chk := solver.Evaluate(in, p.Route)
			assert.Equal(t, chk.Feasible, p.Feasible)
			assert.Equal(t, chk.Travel, p.Cost)
			if c.feasible {
				assert.True(t, p.Feasible, "the engine meets every window of a feasible example")
			} else {
				assert.False(t, p.Feasible)
				assert.Positive(t, chk.LateVisits)
			}
			j := d.PlanReport(solver.TravelTime, p, &res)
			var out bytes.Buffer
			require.NoError(t, WriteJSON(&out, j))
			require.NoError(t, WriteCSV(&out, in, j))
			require.NoError(t, WriteTable(&out, j))
			require.NoError(t, WriteICS(&out, d, p, ICSOptions{Date: time.Date(2026, 12, 1, 0, 0, 0, 0, time.UTC), Stamp: icsStamp}))
			if c.feasible {
				assert.NotContains(t, out.String(), "LATE")
			}
		})
	}
}

// The page passes pasted text: the same files without names load the same.
func TestExamplesPasted(t *testing.T) {
	for _, c := range exampleCases {
		t.Run(c.dir+"/"+c.sites, func(t *testing.T) {
			want := loadExample(t, c).Instance
			dir := filepath.Join("..", "..", "examples", c.dir)
			sites, err := os.ReadFile(filepath.Join(dir, c.sites))
			require.NoError(t, err)
			var d *Dataset
			if c.matrix != "" {
				m, err := os.ReadFile(filepath.Join(dir, c.matrix))
				require.NoError(t, err)
				d, err = Load(bytes.NewReader(sites), bytes.NewReader(m), c.opt)
				require.NoError(t, err)
			} else {
				d, err = Load(bytes.NewReader(sites), nil, c.opt)
				require.NoError(t, err)
			}
			assert.Equal(t, want.Travel, d.Instance.Travel)
			assert.Equal(t, want.Early, d.Instance.Early)
			assert.Equal(t, want.Late, d.Instance.Late)
			assert.Equal(t, "pasted sites", d.Instance.Name)
		})
	}
}
