package main

import (
	"fmt"
	"strings"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// bigDay is a benchmark-format day of n nodes (travel 1 + |i-j|, windows
// open): megabytes of text, read in many steps.
func bigDay(n int) string {
	var b strings.Builder
	fmt.Fprintf(&b, "# invented: %d nodes in a row\n%d\n", n, n)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			v := 0
			if i != j {
				v = 1 + max(i-j, j-i)
			}
			fmt.Fprintf(&b, "%d ", v)
		}
		b.WriteByte('\n')
	}
	for i := 0; i < n; i++ {
		b.WriteString("0 1000000\n")
	}
	return b.String()
}

// everyStep makes the engine report at every step of a load, so that the
// tests do not depend on how fast this machine reads.
func everyStep(t *testing.T) {
	old := readingEvery
	readingEvery = 0
	t.Cleanup(func() { readingEvery = old })
}

// loadJSON is a load message as worker.js passes it: the texts apart.
func loadJSON(t *testing.T, id int, name string) string {
	return msg(t, map[string]any{"type": "load", "load_id": id, "name": name, "text": "", "matrix": ""})
}

// TestEngineLoadReportsHowFarItRead: a large load says how far it has
// read, in bytes of the whole, growing, before it says loaded.
func TestEngineLoadReportsHowFarItRead(t *testing.T) {
	everyStep(t)
	r := newRecorder()
	e := NewEngine(r.post)
	text := bigDay(1200)
	e.HandleLoad(loadJSON(t, 1, "big.txt"), text, "")
	loaded := r.wait(t, "loaded")
	assert.EqualValues(t, 1, loaded["load_id"])
	assert.EqualValues(t, 1200, loaded["summary"].(map[string]any)["nodes"])
	reading := r.all("reading")
	require.NotEmpty(t, reading)
	last := -1.0
	for _, m := range reading {
		assert.EqualValues(t, 1, m["load_id"])
		assert.EqualValues(t, len(text), m["total"])
		assert.GreaterOrEqual(t, m["done"].(float64), last)
		assert.LessOrEqual(t, m["done"].(float64), float64(len(text)))
		last = m["done"].(float64)
	}
}

// TestEngineCancelledLoadKeepsTheDataBefore: a load cancelled while it
// reads ends with load_cancelled, not loaded or errors, and a search then
// runs on the data loaded before it; a load cancelled before it began is
// not read at all.
func TestEngineCancelledLoadKeepsTheDataBefore(t *testing.T) {
	everyStep(t)
	r := newRecorder()
	e := NewEngine(r.post)
	e.Handle(msg(t, map[string]any{"type": "load", "load_id": 1, "name": "picks.txt", "text": example(t)}))
	r.wait(t, "loaded")

	done := make(chan struct{})
	big := bigDay(1500)
	go func() {
		defer close(done)
		e.HandleLoad(loadJSON(t, 2, "big.txt"), big, "")
	}()
	deadline := time.Now().Add(10 * time.Second)
	for r.count("reading") == 0 || r.all("reading")[r.count("reading")-1]["load_id"] != 2.0 {
		require.True(t, time.Now().Before(deadline), "no reading of load 2")
		time.Sleep(time.Millisecond)
	}
	e.CancelLoad(2)
	<-done
	c := r.wait(t, "load_cancelled")
	assert.EqualValues(t, 2, c["load_id"])
	assert.Equal(t, 1, r.count("loaded"), "the cancelled load says neither loaded")
	assert.Zero(t, r.count("errors"), "nor errors")
	rd := r.all("reading")
	assert.Less(t, rd[len(rd)-1]["done"].(float64), float64(len(big)), "the reading stopped short of the end")

	// Cancelled before it was handled (it waited behind another message).
	e.CancelLoad(3)
	e.HandleLoad(loadJSON(t, 3, "bad.txt"), "2\n0 x\n", "")
	assert.Equal(t, 2, r.count("load_cancelled"))
	assert.Zero(t, r.count("errors"))

	// The warehouse day is still the one loaded: 16 nodes.
	e.Handle(msg(t, map[string]any{"type": "start", "budget": 0, "iterations": 50, "seed": 1, "no_bound": true}))
	r.wait(t, "finished")
	plans := r.all("plan")
	require.NotEmpty(t, plans)
	assert.Len(t, plans[len(plans)-1]["plan"].(map[string]any)["route"], 16)

	// A cancel through a message (as the page sends it, when it is not
	// taken at once) of a load already over changes nothing.
	e.Handle(msg(t, map[string]any{"type": "cancel_load", "load_id": 1}))
	assert.Zero(t, r.count("failed"))
	e.HandleLoad(loadJSON(t, 4, "picks.txt"), example(t), "")
	assert.Equal(t, 2, r.count("loaded"), "a later load reads as usual")
}
