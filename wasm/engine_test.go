package main

import (
	"encoding/json"
	"fmt"
	"os"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"visitline/solver"
	"visitline/solver/app"
	"visitline/solver/format"
)

// recorder collects the engine's messages.
type recorder struct {
	mu   sync.Mutex
	msgs []map[string]any
	cond *sync.Cond
}

func newRecorder() *recorder {
	r := &recorder{}
	r.cond = sync.NewCond(&r.mu)
	return r
}

func (r *recorder) post(b []byte) {
	var m map[string]any
	if err := json.Unmarshal(b, &m); err != nil {
		panic("engine posted invalid JSON: " + string(b))
	}
	r.mu.Lock()
	r.msgs = append(r.msgs, m)
	r.cond.Broadcast()
	r.mu.Unlock()
}

// wait returns the first message of type typ, waiting up to 10 s.
func (r *recorder) wait(t *testing.T, typ string) map[string]any {
	t.Helper()
	deadline := time.Now().Add(10 * time.Second)
	r.mu.Lock()
	defer r.mu.Unlock()
	for {
		for _, m := range r.msgs {
			if m["type"] == typ {
				return m
			}
		}
		if time.Now().After(deadline) {
			t.Fatalf("no %q message; got %v", typ, r.msgs)
		}
		r.mu.Unlock()
		time.Sleep(5 * time.Millisecond)
		r.mu.Lock()
	}
}

// all returns the messages of type typ so far, in order ("" every one).
func (r *recorder) all(typ string) []map[string]any {
	r.mu.Lock()
	defer r.mu.Unlock()
	var out []map[string]any
	for _, m := range r.msgs {
		if typ == "" || m["type"] == typ {
			out = append(out, m)
		}
	}
	return out
}

func (r *recorder) count(typ string) int {
	r.mu.Lock()
	defer r.mu.Unlock()
	n := 0
	for _, m := range r.msgs {
		if m["type"] == typ {
			n++
		}
	}
	return n
}

func msg(t *testing.T, v map[string]any) string {
	b, err := json.Marshal(v)
	require.NoError(t, err)
	return string(b)
}

func example(t *testing.T) string {
	b, err := os.ReadFile("../examples/warehouse/picks.txt")
	require.NoError(t, err)
	return string(b)
}

func TestEngineLoadSummary(t *testing.T) {
	r := newRecorder()
	e := NewEngine(r.post)
	e.Handle(msg(t, map[string]any{"type": "load", "name": "picks.txt", "text": example(t)}))
	m := r.wait(t, "loaded")
	s := m["summary"].(map[string]any)
	assert.EqualValues(t, 15, s["sites"])
	assert.EqualValues(t, 16, s["nodes"])
	assert.Equal(t, "closed", s["shape"])
	assert.Equal(t, "0", s["start"])
	assert.Greater(t, s["asymmetry"].(float64), 0.0)
	assert.Greater(t, s["tightness"].(float64), 0.0)
	assert.Less(t, s["tightness"].(float64), 1.0)
}

func TestEngineBadPasteNamesLineAndColumn(t *testing.T) {
	r := newRecorder()
	e := NewEngine(r.post)
	e.Handle(msg(t, map[string]any{"type": "load", "text": "2\n0 x\n1 0\n0 10\n0 10\n"}))
	m := r.wait(t, "errors")
	list := m["errors"].([]any)
	require.Len(t, list, 1)
	first := list[0].(map[string]any)
	assert.EqualValues(t, 2, first["line"])
	assert.EqualValues(t, 2, first["column"])
	assert.Contains(t, first["text"], `"x" is not a number`)
	// Starting without data is refused with a message, not a crash.
	e.Handle(msg(t, map[string]any{"type": "start", "budget": 1}))
	assert.Contains(t, r.wait(t, "failed")["message"], "no data is loaded")
}

func TestEngineEmptyPaste(t *testing.T) {
	r := newRecorder()
	e := NewEngine(r.post)
	e.Handle(msg(t, map[string]any{"type": "load", "text": "  \n"}))
	list := r.wait(t, "errors")["errors"].([]any)
	assert.Contains(t, list[0].(map[string]any)["message"], "there is no data")
}

func TestEngineRunSendsPlanAndFinished(t *testing.T) {
	r := newRecorder()
	e := NewEngine(r.post)
	e.Handle(msg(t, map[string]any{"type": "load", "name": "picks.txt", "text": example(t)}))
	e.Handle(msg(t, map[string]any{"type": "start", "budget": 0.3, "seed": 1}))
	fin := r.wait(t, "finished")
	assert.NotEqual(t, "error", fin["why"])
	p := r.wait(t, "plan")
	plan := p["plan"].(map[string]any)
	assert.Len(t, plan["route"], 16)
	assert.Contains(t, p["csv"], "order,site,name,arrival")
	e.Handle(msg(t, map[string]any{"type": "export", "format": "ics", "route": plan["route"]}))
	assert.Contains(t, r.wait(t, "export")["error"], "clock times", "a benchmark file says nothing of clock times")
	assert.Contains(t, p["json"], `"route"`)
}

func TestEngineRejectsBadStart(t *testing.T) {
	cases := []struct {
		name string
		msg  map[string]any
		want string
	}{
		{"zero budget", map[string]any{"type": "start", "budget": 0}, "budget 0 s"},
		{"huge budget", map[string]any{"type": "start", "budget": 7200}, "at most 3600"},
		{"unknown operator", map[string]any{"type": "start", "budget": 1, "mix": map[string]any{"nosuch": 1}}, "unknown operator"},
		{"all zero", map[string]any{"type": "start", "budget": 1, "mix": map[string]any{"random": 0}}, "at least one weight"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := newRecorder()
			e := NewEngine(r.post)
			e.Handle(msg(t, map[string]any{"type": "load", "text": example(t)}))
			e.Handle(msg(t, c.msg))
			assert.Contains(t, r.wait(t, "failed")["message"], c.want)
			assert.Zero(t, r.count("started"))
		})
	}
}

func TestEngineMixChangeMidRun(t *testing.T) {
	r := newRecorder()
	e := NewEngine(r.post)
	e.Handle(msg(t, map[string]any{"type": "load", "text": example(t)}))
	// Without the bound, which proves this small day optimal at once.
	e.Handle(msg(t, map[string]any{"type": "start", "budget": 30, "seed": 3, "fixed": true, "no_bound": true}))
	r.wait(t, "progress")
	e.Handle(msg(t, map[string]any{"type": "mix", "mix": map[string]any{"random": 3, "slice": 1, "related": 0, "worst": 0}}))
	ack := r.wait(t, "mix")
	assert.Equal(t, true, ack["running"])
	assert.EqualValues(t, 3, ack["mix"].(map[string]any)["random"])
	// The search takes the new weights: a later progress report shows them.
	deadline := time.Now().Add(5 * time.Second)
	for {
		r.mu.Lock()
		last := r.msgs[len(r.msgs)-1]
		r.mu.Unlock()
		if last["type"] == "progress" {
			w := last["weights"].(map[string]any)
			if w["random"].(float64) == 0.75 {
				break
			}
		}
		require.True(t, time.Now().Before(deadline), "no progress with the new weights")
		time.Sleep(10 * time.Millisecond)
	}
	e.Handle(msg(t, map[string]any{"type": "stop"}))
	assert.Equal(t, "stopped", r.wait(t, "finished")["why"])
}

func TestEngineStopIsPrompt(t *testing.T) {
	r := newRecorder()
	e := NewEngine(r.post)
	e.Handle(msg(t, map[string]any{"type": "load", "text": example(t)}))
	e.Handle(msg(t, map[string]any{"type": "start", "budget": 60, "seed": 1, "no_bound": true}))
	r.wait(t, "progress")
	t0 := time.Now()
	e.Handle(msg(t, map[string]any{"type": "stop"}))
	fin := r.wait(t, "finished")
	// Loose bound for a shared machine; the browser test holds the page to 1 s.
	assert.Less(t, time.Since(t0), 2*time.Second)
	assert.Equal(t, "stopped", fin["why"])
	assert.GreaterOrEqual(t, r.count("plan"), 1)
	// A mix sent after the stop is answered as not running.
	e.Handle(msg(t, map[string]any{"type": "mix", "mix": map[string]any{"random": 1}}))
	assert.Equal(t, false, r.wait(t, "mix")["running"])
}

// TestSummariseHandWorked checks the summary on a 3-node instance worked out
// by hand: day [0,100]; windows of node 1 [10,30] (20% of the day) and
// node 2 [0,60] (60%): tightness 0.4. Pairs: (0,1) 10/10 symmetric,
// (0,2) 20 vs 10 → 0.5, (1,2) 5 vs 0 → 1: asymmetry (0+0.5+1)/3 = 0.5.
func TestSummariseHandWorked(t *testing.T) {
	in := &solver.Instance{N: 3, Scale: 1, Shape: solver.Closed,
		Travel:  []int64{0, 10, 20, 10, 0, 5, 10, 0, 0},
		Service: []int64{0, 1, 1}, Early: []int64{0, 10, 0}, Late: []int64{100, 30, 60}}
	s := Summarise(in)
	assert.Equal(t, 2, s.Sites)
	assert.InDelta(t, 0.4, s.Tightness, 1e-9)
	assert.InDelta(t, 0.5, s.Asymmetry, 1e-9)
	assert.Equal(t, 2, s.AsymmetricPairs)
	assert.Equal(t, 3, s.Pairs)
	assert.Equal(t, 20.0, s.NarrowestWindow)
	assert.Equal(t, 60.0, s.WidestWindow)
}

func readExample(t *testing.T, path string) string {
	b, err := os.ReadFile("../examples/" + path)
	require.NoError(t, err)
	return string(b)
}

func TestEngineSitesAndMatrix(t *testing.T) {
	r := newRecorder()
	e := NewEngine(r.post)
	e.Handle(msg(t, map[string]any{"type": "load", "name": "sites.csv", "text": readExample(t, "bakery/sites.csv"),
		"matrix_name": "travel.csv", "matrix": readExample(t, "bakery/travel.csv")}))
	s := r.wait(t, "loaded")["summary"].(map[string]any)
	assert.Equal(t, "min", s["unit"])
	assert.Equal(t, "clock", s["times"])
	assert.Equal(t, "04:35", s["day_start_text"])
	assert.Equal(t, "matrix", s["travel"])
	assert.Equal(t, "BAK", s["start"])
	e.Handle(msg(t, map[string]any{"type": "start", "budget": 0.3, "seed": 1}))
	r.wait(t, "finished")
	p := r.wait(t, "plan")
	plan := p["plan"].(map[string]any)
	e.Handle(msg(t, map[string]any{"type": "export", "format": "ics", "route": plan["route"], "date": "2026-12-01"}))
	x := r.wait(t, "export")
	assert.Equal(t, "", x["error"])
	assert.Contains(t, x["text"], "BEGIN:VCALENDAR")
	assert.Contains(t, x["text"], "DTSTART:20261201T")
	first := plan["schedule"].([]any)[0].(map[string]any)
	assert.Equal(t, "Crumb & Crust Bakery", first["name"])
	assert.Equal(t, "04:35", first["start_clock"])
	// A route that does not fit is refused, not written.
	e.Handle(msg(t, map[string]any{"type": "export", "format": "ics", "route": []int{0, 1}, "date": "2026-12-01"}))
	r.mu.Lock()
	r.msgs = nil
	r.mu.Unlock()
	e.Handle(msg(t, map[string]any{"type": "export", "format": "ics", "route": []int{0, 1}, "date": "2026-12-01"}))
	assert.Contains(t, r.wait(t, "export")["error"], "does not fit")
}

func TestEngineRouteOptions(t *testing.T) {
	r := newRecorder()
	e := NewEngine(r.post)
	e.Handle(msg(t, map[string]any{"type": "load", "name": "sites.csv", "text": readExample(t, "art/sites.csv"),
		"matrix_name": "travel.tsv", "matrix": readExample(t, "art/travel.tsv"), "options": map[string]any{"end": "SOUTH"}}))
	s := r.wait(t, "loaded")["summary"].(map[string]any)
	assert.Equal(t, "open-fixed-end", s["shape"])
	assert.Equal(t, "SOUTH", s["end"])
	assert.Equal(t, "dated", s["times"])
}

func TestEngineBadOptionIsAnError(t *testing.T) {
	r := newRecorder()
	e := NewEngine(r.post)
	e.Handle(msg(t, map[string]any{"type": "load", "name": "sites.csv", "text": readExample(t, "bakery/sites.csv"),
		"matrix": readExample(t, "bakery/travel.csv"), "options": map[string]any{"end": "NOWHERE"}}))
	list := r.wait(t, "errors")["errors"].([]any)
	assert.Contains(t, list[0].(map[string]any)["text"], "NOWHERE")
}

func TestEngineReplansAfterDoneVisits(t *testing.T) {
	r := newRecorder()
	e := NewEngine(r.post)
	e.Handle(msg(t, map[string]any{"type": "load", "name": "sites.csv", "text": readExample(t, "bakery/sites.csv"),
		"matrix": readExample(t, "bakery/travel.csv"), "options": map[string]any{"done": []string{"C07"}, "now": "05:20"}}))
	s := r.wait(t, "loaded")["summary"].(map[string]any)
	assert.Equal(t, "C07", s["at"])
	assert.Equal(t, []any{"C07"}, s["done"])
	assert.EqualValues(t, 11, s["sites"], "twelve cafés less the one done")
	assert.Equal(t, "05:20", s["day_start_text"])
}

// lastPlan is the plan of the last "plan" message.
func (r *recorder) lastPlan() map[string]any {
	r.mu.Lock()
	defer r.mu.Unlock()
	for i := len(r.msgs) - 1; i >= 0; i-- {
		if r.msgs[i]["type"] == "plan" {
			return r.msgs[i]["plan"].(map[string]any)
		}
	}
	return nil
}

func TestEngineBoundProvesSmallDay(t *testing.T) {
	r := newRecorder()
	e := NewEngine(r.post)
	e.Handle(msg(t, map[string]any{"type": "load", "text": example(t)}))
	e.Handle(msg(t, map[string]any{"type": "start", "budget": 20, "seed": 1}))
	fin := r.wait(t, "finished")
	assert.Equal(t, "complete", fin["why"], "the exact search proves the 15 pick faces and ends the run")
	p := r.lastPlan()
	assert.Equal(t, true, p["proven_optimal"])
	assert.Equal(t, p["cost"], p["lower_bound"])
}

func TestEngineExplainsDayThatCannotBeMet(t *testing.T) {
	r := newRecorder()
	e := NewEngine(r.post)
	// 1 must start by 10 and 2 by 12, 5 from the start and 20 apart.
	e.Handle(msg(t, map[string]any{"type": "load", "text": "3\n0 5 5\n5 0 20\n5 20 0\n0 100\n0 10\n0 12\n"}))
	e.Handle(msg(t, map[string]any{"type": "start", "budget": 1, "seed": 1}))
	r.wait(t, "finished")
	p := r.lastPlan()
	assert.Equal(t, false, p["feasible"])
	assert.ElementsMatch(t, []any{"1", "2"}, p["conflict"])
	assert.NotEmpty(t, p["reason"])
}

// TestEngineBoundRole: a worker with role "bound" runs the bound and the
// exact search alone, takes the plans sent to it with "adopt", and ends
// with its verdict: on this small day (examples/warehouse) it proves the
// adopted plan optimal, or finds the optimum itself and sends it.
func TestEngineBoundRole(t *testing.T) {
	r := newRecorder()
	e := NewEngine(r.post)
	e.Handle(msg(t, map[string]any{"type": "load", "name": "picks.txt", "text": example(t)}))
	r.wait(t, "loaded")
	// The search's plan first, from a plain search worker.
	e.Handle(msg(t, map[string]any{"type": "start", "budget": 0, "iterations": 2000, "seed": 1, "role": "search"}))
	fin := r.wait(t, "finished")
	assert.Equal(t, "iterations", fin["why"])
	first := r.wait(t, "plan")["plan"].(map[string]any)
	route, cost := first["route"], first["cost"]
	r.mu.Lock()
	r.msgs = nil
	r.mu.Unlock()
	e.Handle(msg(t, map[string]any{"type": "start", "budget": 20, "seed": 1, "role": "bound"}))
	e.Handle(msg(t, map[string]any{"type": "adopt", "route": []int{0, 1}})) // does not fit: ignored
	e.Handle(msg(t, map[string]any{"type": "adopt", "route": route}))
	v := r.wait(t, "bound")
	require.NotNil(t, v["lower_bound"])
	assert.Equal(t, true, v["proven_optimal"])
	assert.Equal(t, "complete", r.wait(t, "finished")["why"])
	assert.Zero(t, r.count("progress"), "the bound worker does not search")
	// The adopt may come after the bound has finished its exact search on
	// its own (start and adopt race): then it sends the optimum it found,
	// which is no worse than the adopted plan.
	if n := r.count("plan"); n > 0 {
		assert.Equal(t, 1, n)
		assert.LessOrEqual(t, r.lastPlan()["cost"].(float64), cost.(float64), "the bound's plan is the optimum")
	}
}

func TestEngineRejectsUnknownRole(t *testing.T) {
	r := newRecorder()
	e := NewEngine(r.post)
	e.Handle(msg(t, map[string]any{"type": "load", "text": example(t)}))
	e.Handle(msg(t, map[string]any{"type": "start", "budget": 1, "role": "helper"}))
	assert.Contains(t, r.wait(t, "failed")["message"], `role "helper"`)
}

// The hand-written plan message decodes to what encoding/json makes of
// the same message, for texts with every kind of character a JSON string
// must escape (and some it need not).
func TestPlanMessageIsTheEncodedMessage(t *testing.T) {
	js := []byte("{\n  \"cost\": 12.5,\n  \"route_ids\": [\"D\", \"a\\\"b\"],\n  \"name\": \"Caf\u00e9 \\\\ \\u001b\"\n}\n")
	csv := []byte("order,site,name\r\n1,\"a\"\"b\",\"two\nlines\ttab\x01\x1b \\ caf\u00e9 \u2028 <&>\"\r\n")
	got := map[string]any{}
	require.NoError(t, json.Unmarshal(planMessage(7, js, csv), &got))
	b, err := json.Marshal(planMsg{Type: "plan", Run: 7, Plan: json.RawMessage(js), CSV: string(csv), JSON: string(js)})
	require.NoError(t, err)
	want := map[string]any{}
	require.NoError(t, json.Unmarshal(b, &want))
	assert.Equal(t, want, got)
	assert.Equal(t, string(csv), got["csv"])
	assert.Equal(t, string(js), got["json"])
}

// A day over exportsUpTo nodes: the run's last plan carries no exports;
// the CSV export comes on asking ("export", format csv, the plan's route):
// one row per visit and the return, the same rows as the CSV export of
// the same plan on a small day would have (WriteCSV of its report).
func TestEngineLargeDayCSVOnAsking(t *testing.T) {
	var b strings.Builder
	b.WriteString("id,x,y,open,close,service\nD,50,50,0,100000,0\n")
	for i := 1; i <= exportsUpTo+20; i++ {
		fmt.Fprintf(&b, "S%d,%d,%d,0,100000,1\n", i, (i*37)%100, (i*61)%100)
	}
	r := newRecorder()
	e := NewEngine(r.post)
	e.Handle(msg(t, map[string]any{"type": "load", "name": "big.csv", "text": b.String()}))
	r.wait(t, "loaded")
	e.Handle(msg(t, map[string]any{"type": "start", "budget": 0, "iterations": 3, "seed": 1, "role": "search"}))
	fin := r.wait(t, "finished")
	assert.Equal(t, "iterations", fin["why"])
	r.mu.Lock()
	var last map[string]any
	for _, m := range r.msgs {
		if m["type"] == "plan" {
			last = m
		}
	}
	r.mu.Unlock()
	require.NotNil(t, last)
	assert.NotContains(t, last, "json")
	assert.NotContains(t, last, "csv")
	plan := last["plan"].(map[string]any)
	assert.Len(t, plan["route"], exportsUpTo+21)
	e.Handle(msg(t, map[string]any{"type": "export", "format": "csv", "route": plan["route"], "objective": "travel"}))
	ex := r.wait(t, "export")
	assert.Empty(t, ex["error"])
	assert.Equal(t, "csv", ex["format"])
	rows := strings.Split(strings.TrimSpace(ex["text"].(string)), "\n")
	assert.True(t, strings.HasPrefix(rows[0], "order,site,name,arrival"), rows[0])
	assert.Len(t, rows, 1+exportsUpTo+22, "header, the start, every visit and the return")
	// The same text as the command line's writer gives for that plan.
	d, err := app.Load(strings.NewReader(b.String()), nil, "big.csv", "", app.LoadOptions{})
	require.NoError(t, err)
	route := toInts(plan["route"].([]any))
	sch := solver.Evaluate(d.Instance, route)
	var want strings.Builder
	require.NoError(t, format.WriteCSV(&want, d.Instance, d.PlanReport(solver.TravelTime, solver.Plan{Route: route, Schedule: sch, Cost: sch.Cost(solver.TravelTime), Feasible: sch.Feasible}, nil)))
	assert.Equal(t, want.String(), ex["text"])
}

// TestEngineBoundStopsExplainingForAFeasiblePlan: the bound worker's time
// ends before any search worker has handed it a plan (on a large day the
// first plan may come after the bound's budget), so it starts explaining
// why no plan meets every window; a feasible plan adopted then ends the
// explanation, and the verdict gives no reason against a day that can be
// met.
func TestEngineBoundStopsExplainingForAFeasiblePlan(t *testing.T) {
	var b strings.Builder
	b.WriteString("id,x,y,open,close,service\nD,50,50,0,100000,0\n")
	for i := 1; i <= 320; i++ {
		fmt.Fprintf(&b, "S%d,%d,%d,0,100000,1\n", i, (i*37)%100, (i*61)%100)
	}
	r := newRecorder()
	e := NewEngine(r.post)
	e.Handle(msg(t, map[string]any{"type": "load", "name": "big.csv", "text": b.String()}))
	r.wait(t, "loaded")
	e.Handle(msg(t, map[string]any{"type": "start", "budget": 0, "iterations": 3, "seed": 1, "role": "search"}))
	r.wait(t, "finished")
	first := r.lastPlan()
	require.Equal(t, true, first["feasible"])
	r.mu.Lock()
	r.msgs = nil
	r.mu.Unlock()
	e.Handle(msg(t, map[string]any{"type": "start", "budget": 0.2, "seed": 1, "role": "bound"}))
	ex := r.wait(t, "progress")
	require.Equal(t, true, ex["explaining"], "no plan was adopted within the bound's time: it explains")
	e.Handle(msg(t, map[string]any{"type": "adopt", "route": first["route"]}))
	v := r.wait(t, "bound")
	assert.Empty(t, v["reason"], "a feasible plan came: nothing to explain")
	assert.Empty(t, v["conflict"])
	assert.Equal(t, "budget", r.wait(t, "finished")["why"])
}

// The budget counts from the click: the time a start message waited comes
// off it, within reason.
func TestWaitedComesOffTheBudget(t *testing.T) {
	now := float64(time.Now().UnixMilli())
	assert.InDelta(t, 0.5, waited(now-500, 3), 0.2, "half a second in the queue")
	assert.Zero(t, waited(0, 3), "no stamp")
	assert.Zero(t, waited(now+5000, 3), "a stamp from the future: the clock is off")
	assert.Zero(t, waited(now-2000, 3), "more than half the budget: the clock is off, or the tab slept")
	assert.Zero(t, waited(now-500, 0), "an iteration budget alone")
	r := newRecorder()
	e := NewEngine(r.post)
	e.Handle(msg(t, map[string]any{"type": "load", "name": "picks.txt", "text": example(t)}))
	r.wait(t, "loaded")
	e.Handle(msg(t, map[string]any{"type": "start", "budget": 1, "seed": 1, "role": "search", "clicked_at": float64(time.Now().UnixMilli() - 400)}))
	assert.EqualValues(t, 1, r.wait(t, "started")["budget"], "the budget asked for is echoed")
	assert.Equal(t, "budget", r.wait(t, "finished")["why"])
}

func toInts(v []any) []int {
	out := make([]int, len(v))
	for i, x := range v {
		out[i] = int(x.(float64))
	}
	return out
}
