package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math/rand"
	"os"
	"reflect"
	"strings"
	"sync"
	"testing"

	"visitline/solver"
	"visitline/solver/format"
)

// Every message any test makes the engine send is also written by
// encoding/json from the same value; a difference fails the run (see
// TestMain). Tests of their own below cover values the engine tests do
// not reach.
var (
	encMu       sync.Mutex
	encChecked  = map[string]int{}
	encMismatch []string
)

func stdMessage(m outMessage) ([]byte, error) {
	var b bytes.Buffer
	enc := json.NewEncoder(&b)
	enc.SetEscapeHTML(false)
	if err := enc.Encode(m); err != nil {
		return nil, err
	}
	return bytes.TrimSpace(b.Bytes()), nil
}

func checkEncoding(m outMessage, got []byte, err error) {
	want, werr := stdMessage(m)
	encMu.Lock()
	defer encMu.Unlock()
	encChecked[fmt.Sprintf("%T", m)]++
	switch {
	case werr != nil || err != nil:
		if werr == nil || err == nil || werr.Error() != err.Error() {
			encMismatch = append(encMismatch, fmt.Sprintf("%T: error %v, encoding/json %v", m, err, werr))
		}
	case !bytes.Equal(got, want):
		encMismatch = append(encMismatch, fmt.Sprintf("%T:\ngot  %s\nwant %s", m, got, want))
	}
}

func TestMain(m *testing.M) {
	sendCheck = checkEncoding
	code := m.Run()
	encMu.Lock()
	for _, s := range encMismatch {
		fmt.Fprintln(os.Stderr, "message written unlike encoding/json:", s)
	}
	if len(encMismatch) > 0 && code == 0 {
		code = 1
	}
	encMu.Unlock()
	os.Exit(code)
}

// The engine tests above send every kind of message; a run of the whole
// package checks each against encoding/json (this test, last in the file
// order of go test, says which kinds were seen).
func TestMessagesAsEncodingJSON(t *testing.T) {
	one, nan := 1.5, 0.0
	nan = nan / nan
	msgs := []outMessage{
		readyMsg{Type: "ready", Operators: solver.Operators}, readyMsg{Type: "ready"},
		loadedMsg{Type: "loaded", LoadID: 3, Summary: Summary{Name: "x <&>", Warnings: []InputError{{File: "a\"b", Line: 2, Message: "\u2028"}}, Done: []string{"A"},
			Fleet: &FleetSummary{Vehicles: []VehicleSummary{{ID: "T1", Capacity: &one}, {ID: "T2", MaxDuration: &one, Name: "é"}}, Demand: true}}},
		loadedMsg{Type: "loaded", Summary: Summary{Fleet: &FleetSummary{}}},
		errorsMsg{Type: "errors", Errors: []InputError{}}, errorsMsg{Type: "errors", LoadID: 1},
		readingMsg{Type: "reading", LoadID: 2, Done: 1 << 40, Total: -1}, loadCancelledMsg{Type: "load_cancelled"},
		startedMsg{Type: "started", Run: 1, Role: "bound", Budget: 0.1, Seed: -5, Mix: map[string]float64{"b": 2, "a": 1e-9, "c": 1e21}, Fixed: true, Objective: "travel"},
		startedMsg{Type: "started"},
		planMsg{Type: "plan", Run: 2, Plan: format.PlanReport{Objective: "travel", Route: []int{0, 2, 1}, Reason: "<b>"}, CSV: "a,b\n", JSON: "{\n}"},
		planMsg{Type: "plan", Plan: rawJSON("{\n  \"a\": [\n    1,\n    \"x y\"\n  ],\n  \"b\": \"\\u003c\"\n}")},
		planMsg{Type: "plan"},
		progressMsg{Type: "progress", Run: 1, Iterations: 5, Elapsed: 0.05, BestCost: 812.5, Feasible: true, Weights: solver.Mix{"random": 1, "slice": 0}},
		progressMsg{Type: "progress", Explaining: true, VehiclesUsed: 3, UnservedPriority: 7, Phase: "vehicles"},
		progressMsg{Type: "progress", Weights: solver.Mix{}},
		boundMsg{Type: "bound", Run: 1, LowerBound: &one, Method: "ng", ProvenOptimal: true, Conflict: []string{"C03"}, Reason: "r"},
		boundMsg{Type: "bound", Conflict: []string{}},
		mixMsg{Type: "mix", Mix: map[string]float64{}, Running: true, Elapsed: 2.1}, mixMsg{Type: "mix"},
		finishedMsg{Type: "finished", Run: 1, Why: solver.StopStopped, Message: "m", Note: "n", BestCost: &one, Feasible: true},
		finishedMsg{Type: "finished", Why: solver.StopBudget},
		exportMsg{Type: "export", Format: "ics", Text: "BEGIN:VCALENDAR\r\n"}, failedMsg{Type: "failed", Message: "x\x00y"},
		boundMsg{Type: "bound", LowerBound: &nan},
	}
	for _, m := range msgs {
		got, err := encodeMessage(m)
		checkEncoding(m, got, err)
	}
	encMu.Lock()
	defer encMu.Unlock()
	for _, s := range encMismatch {
		t.Error(s)
	}
	for _, want := range []string{"main.readyMsg", "main.loadedMsg", "main.errorsMsg", "main.readingMsg", "main.startedMsg", "main.planMsg",
		"main.progressMsg", "main.boundMsg", "main.mixMsg", "main.finishedMsg", "main.exportMsg", "main.failedMsg", "main.loadCancelledMsg"} {
		if encChecked[want] == 0 {
			t.Errorf("no %s compared", want)
		}
	}
}

// inboundSamples are messages of every type the page sends, with every
// field, and a few with odd values.
var inboundSamples = []string{
	`{"type":"load","name":"sites.csv","text":"id,name\nA,B","matrix_name":"travel.csv","matrix":"x","load_id":3,
	  "options":{"start":"HUB","end":"free","shift_start":"08:00","matrix_unit":"seconds","speed":40,"road_factor":1.3,"done":["C01","C02"],"now":"09:10"}}`,
	`{"type":"load","vehicles":"id;start\nT1;HUB","vehicles_name":"v.csv","fleet":3}`,
	`{"type":"cancel_load","load_id":3}`,
	`{"type":"start","budget":10,"seed":1,"mix":{"random":1,"slice":0.5},"fixed":false,"objective":"travel","fewest_late":true,"no_bound":true,
	  "iterations":500,"role":"search","worker":2,"clicked_at":1764756000123.5,"workers":4,"minimize":"vehicles"}`,
	`{"type":"mix","mix":{"random":2,"slice":0}}`, `{"type":"adopt","route":[0,3,1,2]}`, `{"type":"stop"}`,
	`{"type":"export","format":"ics","route":[0,3,1],"date":"2026-12-01","objective":"completion"}`,
	`{"type":"export","format":"ics","routes":[{"vehicle":"T1","visits":[3,5]},{"vehicle":"T2","visits":[]}],"vehicle":"T1"}`,
	`{"Type":"STOP","BUDGET":1e2,"Seed":-9223372036854775808,"unknown":{"a":[1,{"b":null}]}}`,
	`{"type":"load","name":"Café \u00e9 \ud83d\ude9a \ud800 \"q\" \\ \/","text":"tab\there\r\n"}`,
	`{"type":null,"budget":null,"mix":null,"route":null,"routes":null,"options":null,"fixed":null}`,
	`{"mix":{"a":1},"mix":{"b":2},"route":[1,2],"route":[null,5,6]}`,
	`{"routes":[{"vehicle":"A","visits":[1]}],"routes":[{"visits":null}]}`,
	`{"seed":1.5}`, `{"budget":"ten"}`, `{"name":{"x":1}}`, `{"route":[1,"2"]}`, `{"routes":[{"vehicle":7}]}`, `{"options":{"speed":true}}`,
	`{"options":{"done":"A"}}`, `{"mix":{"random":"x"}}`, `{"mix":[1]}`, `{"fleet":1e999}`, `{"budget":1e999}`, `{"load_id":99999999999999999999}`,
	`{"fixed":"yes"}`, `{"options":[]}`, `[]`, `"load"`, `7`, `null`, ``, ` `, `{"type":"load","text":"id`, `{"type":"load"} x`, `{"a":tru}`,
}

// Messages from the page are read as json.Unmarshal reads them into an
// inbound: the same fields from valid messages, and from malformed ones
// (each sample cut short at every byte, and with bytes replaced) the same
// error in the page's words.
func TestInboundAsEncodingJSON(t *testing.T) {
	bad := []byte{'x', '"', '}', ']', '{', ',', ':', '1', ' ', '\\', 0x02, 0xff, '.', 'e', '-', 'n'}
	n := 0
	check := func(data []byte) {
		n++
		var want inbound
		werr := json.Unmarshal(data, &want)
		got, gerr := decodeInbound(data)
		switch {
		case werr == nil && gerr == nil:
			if !reflect.DeepEqual(got, want) {
				t.Fatalf("%q:\ngot  %+v\nwant %+v", data, got, want)
			}
		case werr == nil || gerr == nil:
			t.Fatalf("%q: got error %v, encoding/json %v", data, gerr, werr)
		default:
			if g, w := format.JSONError(gerr), format.JSONError(werr); g != w {
				t.Fatalf("%q: got %q, encoding/json gives %q", data, g, w)
			}
		}
	}
	for _, s := range inboundSamples {
		data := []byte(s)
		check(data)
		for i := 0; i < len(data); i++ {
			check(data[:i])
			for _, c := range bad {
				m := append([]byte(nil), data...)
				m[i] = c
				check(m)
			}
		}
	}
	rng := rand.New(rand.NewSource(5))
	toks := []string{`"type"`, `"budget"`, `"mix"`, `"route"`, `"routes"`, `"options"`, `"done"`, `"visits"`, `"vehicle"`, `"seed"`, `"x"`,
		":", ",", "{", "}", "[", "]", "1", "-0.5", "2e3", "null", "true", `"s"`}
	for k := 0; k < 20000; k++ {
		var b strings.Builder
		b.WriteString("{")
		for i := rng.Intn(14); i > 0; i-- {
			b.WriteString(toks[rng.Intn(len(toks))])
		}
		b.WriteString("}")
		check([]byte(b.String()))
	}
	if n < 20000 {
		t.Fatalf("only %d messages compared", n)
	}
}
