package format

import (
	"bytes"
	"encoding/csv"
	"errors"
	"strings"
	"testing"
	"time"

	"github.com/stretchr/testify/require"

	"visitline/solver"
)

// Seed corpora also live in testdata/fuzz/<FuzzName>/.

// requirePositioned checks that a reader's error is one of ours, never a
// bare error from below.
func requirePositioned(t *testing.T, err error) {
	var pe *ParseError
	var oe *OptionError
	require.True(t, errors.As(err, &pe) || errors.As(err, &oe), "error without a place: %v", err)
}

func FuzzReadSites(f *testing.F) {
	f.Add(fiveSites)
	f.Add(icsSites)
	f.Add("id;open;close\nA;2026-12-01 08:00;2026-12-01T09:00\n")
	f.Add("\ufeffname\tservice\tlat\tlong\nX\t1:30\t45,5\t3,25\n")
	f.Add("id,position\nA,first\nB,last\nC,3\n")
	f.Fuzz(func(t *testing.T, src string) {
		s, err := ReadSites(strings.NewReader(src), "f.csv")
		if err != nil {
			requirePositioned(t, err)
			return
		}
		seen := map[string]bool{}
		for _, st := range s.Sites {
			require.NotEmpty(t, st.ID)
			require.False(t, seen[st.ID], "duplicate id %q accepted", st.ID)
			seen[st.ID] = true
			require.GreaterOrEqual(t, st.Latest, st.Earliest)
			require.GreaterOrEqual(t, st.Earliest, int64(0))
			require.LessOrEqual(t, st.Latest, horizon)
			require.GreaterOrEqual(t, st.Service, int64(0))
		}
	})
}

func FuzzReadMatrix(f *testing.F) {
	f.Add(",A,B,C\nA,0,5,7\nB,6,0,4\nC,8,3,0\n", false)
	f.Add("0;5,5;7\n6;0;4\n8;3;0\n", false)
	f.Add("B,0,6,4\nA,5,0,7\nC,3,8,0\n", true)
	f.Add("0 300 420\n360 0 240\n480 180 0\n", true)
	f.Add("A\tB\tC\n\t0:05\t0:07\n0:06\t\t4\n8\t3\t-\n", false)
	f.Fuzz(func(t *testing.T, src string, seconds bool) {
		unit := UnitMinutes
		if seconds {
			unit = UnitSeconds
		}
		m, err := ReadMatrix(strings.NewReader(src), "f.csv", unit, abc)
		if err != nil {
			requirePositioned(t, err)
			return
		}
		require.Len(t, m.Travel, 9)
		for i, v := range m.Travel {
			require.GreaterOrEqual(t, v, int64(0))
			require.Less(t, v, horizon)
			if i%4 == 0 {
				require.Zero(t, v, "diagonal")
			}
		}
	})
}

// FuzzLoad drives the whole path a user's paste takes: sites, matrix,
// route options, and every writer on a plan of the loaded instance.
func FuzzLoad(f *testing.F) {
	f.Add(fiveSites, fiveMatrix, "", "")
	f.Add(fiveSites, fiveMatrix, "E", "A,B")
	f.Add("id,lat,lon\nA,45,3\nB,45.1,3.1\n", "", "free", "")
	f.Add("3\n0 1 2\n1 0 3\n2 3 0\n0 100\n1 10\n2 20\n", "", "2", "1")
	f.Fuzz(func(t *testing.T, sites, matrix, end, done string) {
		opt := Options{End: end}
		if done != "" {
			opt.Done = strings.Split(done, ",")
		}
		var d *Dataset
		var err error
		if matrix != "" {
			d, err = Load(strings.NewReader(sites), strings.NewReader(matrix), opt)
		} else {
			d, err = Load(strings.NewReader(sites), nil, opt)
		}
		if err != nil {
			requirePositioned(t, err)
			for _, l := range strings.Split(err.Error(), "\n") {
				require.Less(t, len(l), 2000, "a message line of %d bytes", len(l))
			}
			return
		}
		in := d.Instance
		require.NoError(t, in.Validate())
		// A route in input order that honours the shape.
		route := []int{in.Start}
		for i := 0; i < in.N; i++ {
			if i != in.Start && !(in.Shape == solver.OpenFixed && i == in.End) {
				route = append(route, i)
			}
		}
		if in.Shape == solver.OpenFixed {
			route = append(route, in.End)
		}
		s := solver.Evaluate(in, route)
		p := solver.Plan{Route: route, Schedule: s, Cost: s.Travel, Feasible: s.Feasible}
		j := d.PlanReport(solver.TravelTime, p, nil)
		var b bytes.Buffer
		require.NoError(t, WriteJSON(&b, j))
		// The plan's own JSON passes check: every figure recomputes.
		c, err := ReadClaims(bytes.NewReader(b.Bytes()), "plan.json")
		require.NoError(t, err)
		require.Equal(t, route, c.Route)
		// The route in input order may break a pin; the figures still
		// recompute.
		require.Empty(t, d.CompareClaims(c, solver.Evaluate(in, c.Route)))
		b.Reset()
		require.NoError(t, WriteCSV(&b, in, j))
		rows, err := csv.NewReader(bytes.NewReader(b.Bytes())).ReadAll()
		require.NoError(t, err)
		for _, row := range rows {
			for _, cell := range row {
				require.Equal(t, CSVCell(cell), cell, "a CSV cell that could run: %q", cell)
			}
		}
		b.Reset()
		require.NoError(t, WriteTable(&b, j))
		for _, r := range b.String() {
			require.False(t, r != '\n' && isControl(r), "raw control character %U in the table", r)
		}
		if d.Unit != "" {
			require.NoError(t, WriteICS(&b, d, p, ICSOptions{Date: time.Date(2026, 12, 1, 0, 0, 0, 0, time.UTC), Stamp: icsStamp}))
		}
	})
}

// FuzzReadClaims feeds check any plan JSON for one small dataset: it must
// answer with a positioned error or a list of differences, never panic.
func FuzzReadClaims(f *testing.F) {
	f.Add(`{"route":[0,1,2,3,4],"cost":1}`)
	f.Add(`{"route":[0,1,1,3,4],"schedule":[{"node":0,"start":-5}]}`)
	f.Add(`{"route":[0,9,-1],"objective":"nope","shape":"open"}`)
	f.Add(`{"route":[0,1,2,3,4],"return":{"node":0,"arrival":1e308}}`)
	f.Add(`{"name":{"a":1}}`)
	f.Fuzz(func(t *testing.T, src string) {
		d, err := Load(strings.NewReader(fiveSites), strings.NewReader(fiveMatrix), Options{})
		require.NoError(t, err)
		c, err := ReadClaims(strings.NewReader(src), "plan.json")
		if err != nil {
			requirePositioned(t, err)
			require.NotContains(t, err.Error(), "Go struct")
			return
		}
		if len(d.RouteProblems(c.Route)) > 0 {
			return
		}
		_ = d.CompareClaims(c, solver.Evaluate(d.Instance, c.Route))
	})
}
