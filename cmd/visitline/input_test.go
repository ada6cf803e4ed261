package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// square is four sites on the corners of a 12×12 square at one unit per
// minute: the closed tour drives 48 minutes, an open path 36 (worked by
// hand in testdata/input/README.md).
var square = filepath.Join("..", "..", "testdata", "input", "square.csv")

// solvedPlan solves square with extra flags and returns the plan's JSON
// as a generic map, to be edited as a careless or hostile user would.
func solvedPlan(t *testing.T, extra ...string) map[string]any {
	t.Helper()
	args := append(solveArgs("--format", "json", "--speed", "60"), extra...)
	code, out, errOut := runCmd(append(args, square)...)
	require.Equal(t, 0, code, errOut)
	var j map[string]any
	require.NoError(t, json.Unmarshal([]byte(out), &j))
	return j
}

func writePlan(t *testing.T, j map[string]any) string {
	t.Helper()
	b, err := json.Marshal(j)
	require.NoError(t, err)
	p := filepath.Join(t.TempDir(), "plan.json")
	require.NoError(t, os.WriteFile(p, b, 0o644))
	return p
}

func TestCheckRecomputesEverything(t *testing.T) {
	cases := []struct {
		name    string
		solve   []string // flags the plan was solved with
		edit    func(j map[string]any)
		check   []string // flags given to check
		code    int
		want    []string
		notWant []string
	}{
		{name: "untouched plan", edit: func(map[string]any) {}, code: 0, want: []string{"feasible; travel 48"}},
		{name: "claimed cost 1 where the travel is 48", edit: func(j map[string]any) { j["cost"] = 1.0 },
			code: 1, want: []string{"cost", "the plan says 1", "recomputed 48"}},
		{name: "claimed travel 1", edit: func(j map[string]any) { j["travel"] = 1.0 },
			code: 1, want: []string{"travel", "the plan says 1", "recomputed 48"}},
		{name: "start times moved 100 minutes earlier", edit: func(j map[string]any) {
			for _, v := range j["schedule"].([]any) {
				m := v.(map[string]any)
				m["start"] = m["start"].(float64) - 100
			}
		}, code: 1, want: []string{"start", "the plan says 380", "recomputed 480"}},
		{name: "claimed feasible when late", edit: func(j map[string]any) { j["feasible"] = false },
			code: 1, want: []string{"feasible", "the plan says false", "recomputed true"}},
		{name: "claimed late visit on a day that is met", edit: func(j map[string]any) { j["late"] = []any{map[string]any{"id": "A", "node": 1, "by": 5}} },
			code: 1, want: []string{"late visits", "the plan says 1", "recomputed 0"}},
		{name: "open path checked as a closed tour", solve: []string{"--end", "free"}, check: []string{"--end", "start"},
			edit: func(map[string]any) {}, code: 1, want: []string{"open", "closed"}},
		{name: "open path checked with the plan's own options", solve: []string{"--end", "free"},
			edit: func(map[string]any) {}, code: 0, want: []string{"feasible; travel 36"}},
		{name: "duplicate visit named", edit: func(j map[string]any) {
			r := j["route"].([]any)
			r[2] = r[1]
			delete(j, "route_ids")
		}, code: 1, want: []string{"twice", "missing"}, notWant: []string{"want 4"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			j := solvedPlan(t, c.solve...)
			c.edit(j)
			plan := writePlan(t, j)
			args := append([]string{"check", "--speed", "60"}, c.check...)
			code, out, errOut := runCmd(append(args, square, plan)...)
			all := out + errOut
			assert.Equal(t, c.code, code, all)
			for _, w := range c.want {
				assert.Contains(t, all, w)
			}
			for _, w := range c.notWant {
				assert.NotContains(t, all, w)
			}
		})
	}
}

func TestCheckNamesDuplicateAndMissingSites(t *testing.T) {
	j := solvedPlan(t)
	ids := []string{}
	for _, v := range j["route_ids"].([]any) {
		ids = append(ids, v.(string))
	}
	r := j["route"].([]any)
	dup, lost := ids[1], ids[2]
	r[2] = r[1]
	delete(j, "route_ids")
	code, out, errOut := runCmd("check", "--speed", "60", square, writePlan(t, j))
	require.Equal(t, 1, code)
	all := out + errOut
	assert.Regexp(t, `\n  `+dup+` .*is visited twice \(places 1, 2\)`, all)
	assert.Regexp(t, `\n  `+lost+` .*is missing`, all)
}

func TestSolveFlagsRefused(t *testing.T) {
	cases := []struct {
		name string
		args []string
		want string
	}{
		{"negative iterations", []string{"--iterations", "-5"}, "--iterations -5: want 0 (no limit) or more"},
		{"zero speed", []string{"--speed", "0"}, "--speed 0: want a speed above 0"},
		{"negative speed", []string{"--speed", "-3"}, "--speed -3: want a speed above 0"},
		{"negative budget", []string{"--budget", "-1"}, "--budget -1: want a time such as 10s, 2m or 1m30s, 0 or more"},
		{"budget without unit", []string{"--budget", "10"}, "--budget 10: want a time such as 10s"},
		{"negative budget with unit", []string{"--budget", "-1s"}, "--budget -1s: want a time such as 10s, 2m or 1m30s, 0 or more"},
		{"road factor below 1", []string{"--road-factor", "0.5"}, "road-factor"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			args := append([]string{"solve", "--quiet", "--iterations", "10"}, c.args...)
			code, _, errOut := runCmd(append(args, square)...)
			assert.Equal(t, 2, code, errOut)
			assert.Contains(t, errOut, c.want)
			assert.NotContains(t, errOut, "parse error")
			assert.Less(t, strings.Count(errOut, "\n"), 3, "a message, not the usage text: %s", errOut)
		})
	}
	// check shares the load flags.
	code, _, errOut := runCmd("check", "--speed", "0", square, "plan.json")
	assert.Equal(t, 2, code)
	assert.Contains(t, errOut, "--speed 0: want a speed above 0")
}

func TestTableAndCSVFromHostileNames(t *testing.T) {
	dir := t.TempDir()
	sites := filepath.Join(dir, "s.csv")
	require.NoError(t, os.WriteFile(sites, []byte("id,name,x,y\nD,Depot,0,0\nA,\"=HYPERLINK(\"\"http://x.invalid\"\")\",1,0\nB,\"\x1b]0;owned\x07Evil\",2,0\n"), 0o644))
	code, out, errOut := runCmd(solveArgs("--format", "csv", "--speed", "60", sites)...)
	require.Equal(t, 0, code, errOut)
	assert.Contains(t, out, `"'=HYPERLINK(""http://x.invalid"")"`)
	code, out, errOut = runCmd(solveArgs("--speed", "60", sites)...)
	require.Equal(t, 0, code, errOut)
	assert.NotContains(t, out, "\x1b")
	assert.NotContains(t, out, "\x07")
	assert.Contains(t, out, `\x1b]0;owned\x07Evil`)
}
