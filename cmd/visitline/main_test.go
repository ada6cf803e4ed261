package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"visitline/solver"
	"visitline/solver/format"
)

func ex(parts ...string) string {
	return filepath.Join(append([]string{"..", "..", "examples"}, parts...)...)
}

func runCmd(args ...string) (code int, stdout, stderr string) {
	var o, e bytes.Buffer
	code = run(args, &o, &e)
	return code, o.String(), e.String()
}

// Deterministic and quick: an iteration budget, no time budget.
var quick = []string{"--budget", "0", "--iterations", "50", "--seed", "1", "--quiet"}

func solveArgs(extra ...string) []string {
	return append(append([]string{"solve"}, quick...), extra...)
}

func TestSolveBakeryJSON(t *testing.T) {
	code, out, errOut := runCmd(solveArgs("--format", "json", "--matrix", ex("bakery", "travel.csv"), ex("bakery", "sites.csv"))...)
	require.Equal(t, 0, code, errOut)
	var j map[string]any
	require.NoError(t, json.Unmarshal([]byte(out), &j))
	assert.Equal(t, true, j["feasible"])
	assert.Equal(t, "min", j["unit"])
	assert.Equal(t, "clock", j["times"])
	ids := j["route_ids"].([]any)
	assert.Len(t, ids, 13)
	assert.Equal(t, "BAK", ids[0])
	sched := j["schedule"].([]any)
	assert.Equal(t, "04:35", sched[0].(map[string]any)["start_clock"])
}

func TestSolveFlagsAfterFile(t *testing.T) {
	code, out, errOut := runCmd(solveArgs(ex("art", "sites.csv"), "--matrix", ex("art", "travel.tsv"), "--end", "SOUTH", "--format", "csv")...)
	require.Equal(t, 0, code, errOut)
	lines := strings.Split(strings.TrimSpace(out), "\n")
	assert.Equal(t, "order,site,name,arrival,start,wait,departure,earliest,latest,slack,lateness", lines[0])
	assert.Len(t, lines, 9, "header and eight stops; an open path has no return row")
	assert.True(t, strings.HasPrefix(lines[8], "7,SOUTH,"), lines[8])
	assert.Contains(t, lines[1], "2026-12-03 07:00")
}

func TestSolveBoilerICS(t *testing.T) {
	code, out, errOut := runCmd(solveArgs("--format", "ics", "--date", "2026-12-01", ex("boiler", "sites.csv"))...)
	require.Equal(t, 0, code, errOut)
	assert.True(t, strings.HasPrefix(out, "BEGIN:VCALENDAR\r\nVERSION:2.0\r\n"))
	assert.Equal(t, 10, strings.Count(out, "BEGIN:VEVENT"), "nine visits and the yard's loading time")
	assert.Contains(t, out, "DTSTART:20261201T08")
}

func TestSolveOverbookedShowsLate(t *testing.T) {
	// The lateness search of a day that cannot be met is costly per
	// iteration: a small budget keeps the test quick. The table's LATE rows,
	// its headline and check (which re-evaluates the saved plan) must agree.
	args := []string{"solve", "--budget", "0", "--iterations", "5", "--seed", "1", "--quiet", ex("boiler", "sites-overbooked.csv")}
	code, out, errOut := runCmd(args...)
	require.Equal(t, 0, code, errOut)
	late := 0
	for _, line := range strings.Split(out, "\n") {
		if strings.Contains(line, "LATE by") {
			late++
			f := strings.Fields(line)
			require.GreaterOrEqual(t, len(f), 9, line)
			assert.True(t, strings.HasPrefix(f[8], "-"), "a late visit has negative slack: %s", line)
		}
	}
	require.Positive(t, late, out)
	assert.Contains(t, out, fmt.Sprintf("(%d late, total lateness ", late))
	assert.Contains(t, out, "why: ")

	plan := filepath.Join(t.TempDir(), "plan.json")
	code, js, errOut := runCmd(append(args[:len(args)-1:len(args)-1], "--format", "json", ex("boiler", "sites-overbooked.csv"))...)
	require.Equal(t, 0, code, errOut)
	require.NoError(t, os.WriteFile(plan, []byte(js), 0o644))
	code, chk, _ := runCmd("check", ex("boiler", "sites-overbooked.csv"), plan)
	assert.Equal(t, 1, code)
	assert.Contains(t, chk, fmt.Sprintf("infeasible: %d late", late))
}

func TestSolveReplan(t *testing.T) {
	code, out, errOut := runCmd(solveArgs("--matrix", ex("bakery", "travel.csv"), "--done", "C07,C10,C06", "--now", "05:50", ex("bakery", "sites.csv"))...)
	require.Equal(t, 0, code, errOut)
	assert.Contains(t, out, "re-planned from C06 at 05:50; done: C07, C10, C06")
	assert.NotContains(t, out, " C07 ")
}

func TestSolveThenCheck(t *testing.T) {
	dir := t.TempDir()
	plan := filepath.Join(dir, "plan.json")
	args := []string{"--matrix", ex("art", "travel.tsv"), "--end", "SOUTH"}
	code, out, errOut := runCmd(solveArgs(append(append([]string{"--format", "json"}, args...), ex("art", "sites.csv"))...)...)
	require.Equal(t, 0, code, errOut)
	require.NoError(t, os.WriteFile(plan, []byte(out), 0o644))
	code, out, errOut = runCmd(append(append([]string{"check"}, args...), ex("art", "sites.csv"), plan)...)
	assert.Equal(t, 0, code, errOut)
	assert.Contains(t, out, "feasible; travel")
	// Checked against the data read another way, the plan's ids disagree.
	code, out, errOut = runCmd("check", "--matrix", ex("art", "travel.tsv"), "--end", "SOUTH", "--done", "G1", ex("art", "sites.csv"), plan)
	assert.Equal(t, 1, code)
	assert.Contains(t, out+errOut, "route_ids")
}

// TestSolveBenchmarkFileByHand solves testdata/benchmark/forced-order.txt,
// whose windows leave one feasible order, worked by hand: leave 0 at 0;
// 3 at 0+7 = 7, waits to 10; 1 at 10+6 = 16, waits to 25; 4 at 25+9 = 34,
// waits to 40; 2 at 40+4 = 44, waits to 55; back at 55+12 = 67. Travel
// 7+6+9+4+12 = 38. (3 must come first: any other visit before it ends at
// 10 or later and 3 is 10 further, after its latest 15; the same argument
// puts 1 before 4 and 4 before 2.)
func TestSolveBenchmarkFileByHand(t *testing.T) {
	code, out, errOut := runCmd(solveArgs(fixture("benchmark", "forced-order.txt"))...)
	require.Equal(t, 0, code, errOut)
	assert.Contains(t, out, "cost 38  (all windows met)")
	// order, site, arrival, start, wait, departure of each row.
	want := [][]string{
		{"0", "0", "0", "0", "0", "0"},
		{"1", "3", "7", "10", "3", "10"},
		{"2", "1", "16", "25", "9", "25"},
		{"3", "4", "34", "40", "6", "40"},
		{"4", "2", "44", "55", "11", "55"},
		{"back", "0", "67", "67", "0", "67"},
	}
	var rows [][]string
	for _, line := range strings.Split(out, "\n") {
		f := strings.Fields(line)
		if len(f) >= 6 && (f[0] == "back" || f[0] >= "0" && f[0] <= "9") {
			rows = append(rows, f[:6])
		}
	}
	assert.Equal(t, want, rows)
	assert.Contains(t, out, "travel 38  completion 67")
}

func TestSolveErrors(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.csv")
	require.NoError(t, os.WriteFile(bad, []byte("id,open,close\nA,08:00,07:00\n"), 0o644))
	cases := []struct {
		name string
		args []string
		code int
		want string
	}{
		{"unknown end", []string{"--matrix", ex("bakery", "travel.csv"), "--end", "NOPE", ex("bakery", "sites.csv")}, 2, `--end "NOPE": no site has this id`},
		{"matrix unit", []string{"--matrix-unit", "hours", ex("boiler", "sites.csv")}, 2, `--matrix-unit "hours": want minutes or seconds`},
		{"bad window", []string{bad}, 1, bad + `:2:3: latest (column "close"): 07:00 is before the earliest 08:00`},
		{"missing matrix", []string{"--matrix", filepath.Join(dir, "none.csv"), bad}, 1, "none.csv: cannot open: no such file or directory"},
		{"bad date", []string{"--format", "ics", "--date", "1.12.2026", ex("boiler", "sites.csv")}, 2, `--date "1.12.2026": want YYYY-MM-DD`},
		{"matrix for a benchmark", []string{"--matrix", ex("bakery", "travel.csv"), ex("warehouse", "picks.txt")}, 1, "is in the benchmark matrix format"},
		{"ics of a benchmark", []string{"--format", "ics", ex("warehouse", "picks.txt")}, 1, "a calendar needs a sites file with clock times"},
		{"two files", []string{ex("boiler", "sites.csv"), ex("boiler", "sites.csv")}, 2, "want exactly one input FILE"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, _, errOut := runCmd(solveArgs(c.args...)...)
			assert.Equal(t, c.code, code)
			assert.Contains(t, errOut, c.want)
			assert.NotContains(t, errOut, "goroutine", "no stack traces")
		})
	}
}

func TestSolvePrintsWarnings(t *testing.T) {
	dir := t.TempDir()
	sites := filepath.Join(dir, "s.csv")
	require.NoError(t, os.WriteFile(sites, []byte("id,open,close,x,y\nD,08:00,12:00,0,0\nA,08:05,08:10,50,0\n"), 0o644))
	code, _, errOut := runCmd(solveArgs(sites)...)
	assert.Equal(t, 0, code)
	assert.Contains(t, errOut, "warning: "+sites+":3: A: cannot be reached in time even as the first visit")
}

func TestGenCommandWritesReadableInstance(t *testing.T) {
	var out, errb bytes.Buffer
	code := run([]string{"gen", "--n", "25", "--tightness", "tight", "--seed", "4"}, &out, &errb)
	require.Equal(t, 0, code, errb.String())
	in, err := format.ReadBenchmark(bytes.NewReader(out.Bytes()), "gen.txt")
	require.NoError(t, err)
	assert.Equal(t, 25, in.N)
	res, err := solver.Solve(t.Context(), in, solver.Settings{Iterations: 100, Seed: 1})
	require.NoError(t, err)
	assert.True(t, solver.Evaluate(in, res.Best.Route).Feasible)

	var again bytes.Buffer
	require.Equal(t, 0, run([]string{"gen", "--n", "25", "--tightness", "tight", "--seed", "4"}, &again, &errb))
	assert.Equal(t, out.String(), again.String(), "a seed gives the same file")

	errb.Reset()
	assert.Equal(t, 2, run([]string{"gen", "--tightness", "snug"}, &out, &errb))
	assert.Contains(t, errb.String(), "want none, wide, medium or tight")
	errb.Reset()
	assert.Equal(t, 2, run([]string{"gen", "--n", "1"}, &out, &errb))
	assert.Contains(t, errb.String(), "--n 1: want 2 to")
}

func fixture(parts ...string) string {
	return filepath.Join(append([]string{"..", "..", "testdata"}, parts...)...)
}

// TestCheckHandMadePlans checks the plans of testdata/plans against the
// piano tuner's day (testdata/README.md), with every figure worked by hand
// from the sites file and the matrix (minutes; leave D at 08:00).
func TestCheckHandMadePlans(t *testing.T) {
	day := []string{"--matrix", fixture("matrix", "ids-shuffled.csv"), fixture("sites", "comma-clock.csv")}
	cases := []struct {
		plan string
		code int
		want []string
	}{
		// D 08:00 -20-> A 08:20, wait to 08:30, +30 = 09:00 -10-> B 09:10,
		// +45 = 09:55 -9-> C 10:04, +7.5 = 10:11:30 -21-> E 10:32:30, +20 =
		// 10:52:30 -16-> D 11:08:30. Travel 20+10+9+21+16 = 76.
		{"feasible.json", 0, []string{"feasible; travel 76, completion 11:08:30"}},
		// D 08:00 -25-> B 08:25, wait to 09:00, +45 = 09:45 -11-> A 09:56:
		// A's latest is 09:00, late by 56. A +30 = 10:26 -18-> C 10:44 (by
		// 11:00), +7.5 -21-> E 11:12:30, +20 -16-> D 11:48:30 (by 13:00).
		// Travel 25+11+18+21+16 = 91.
		{"late.json", 1, []string{"infeasible: 1 late, total lateness 56; travel 91", "visit 2 (A) starts at 09:56, after its latest 09:00, late by 56"}},
	}
	for _, c := range cases {
		t.Run(c.plan, func(t *testing.T) {
			code, out, errOut := runCmd(append(append([]string{"check"}, day...), fixture("plans", c.plan))...)
			assert.Equal(t, c.code, code, errOut)
			for _, w := range c.want {
				assert.Contains(t, out, w)
			}
		})
	}
	// A plan whose ids do not match the data is refused, naming the place.
	code, out, errOut := runCmd(append(append([]string{"check"}, day...), fixture("plans", "other-data.json"))...)
	assert.Equal(t, 1, code)
	assert.Contains(t, out+errOut, `route_ids: place 3 is node 3, which is C here, but the plan says E`)
}

// TestHelpShowsTheProductAlone: the help names the users' commands and
// none of the lab's, which point to visitline-lab when asked for.
func TestHelpShowsTheProductAlone(t *testing.T) {
	code, out, _ := runCmd("--help")
	require.Equal(t, 0, code)
	for _, c := range []string{"solve", "check", "serve", "gen", "site"} {
		assert.Contains(t, out, "visitline "+c+" ")
	}
	for _, c := range []string{"bench", "scale", "wasm-speed", "case"} {
		assert.NotContains(t, out, c)
		code, _, errOut := runCmd(c)
		assert.Equal(t, 2, code, c)
		if c != "case" {
			assert.Contains(t, errOut, "visitline-lab "+c, c)
		}
	}
}
