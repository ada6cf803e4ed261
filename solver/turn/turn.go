// Package turn gives the host a turn during long work. In the WebAssembly
// build Go runs on the worker's one thread, and the worker's event loop (so
// the page's messages: stop, a weight change) runs only when every goroutine
// is blocked; a loop that merely calls runtime.Gosched keeps it out. Every
// long loop of the engine and the bound therefore holds a Pacer and calls
// Step once per unit of work: under GOOS=js, Step blocks in Give about every
// Every of work, until the host has run; natively it only counts, so that
// the caller checks its context about every thousand steps, and costs
// nothing else.
package turn

import (
	"runtime"
	"time"
)

// Enabled says whether this build gives the host turns (GOOS=js).
const Enabled = runtime.GOOS == "js"

// Every is the longest stretch of work between two turns when Enabled.
// Goroutines that are due block in turn, and each is woken by a callback
// of its own, so the event loop gets a pass between any two stints.
const Every = 20 * time.Millisecond

// Host blocks until the host's event loop has had a turn. The worker sets
// it (a message-channel callback that wakes a Go channel); the default parks
// the goroutine for a millisecond, which is a turn only when no other
// goroutine is runnable.
var Host = func() { time.Sleep(time.Millisecond) }

// Now reads the clock for deadlines and turns. Under GOOS=js time.Now
// asks JavaScript twice (the wall clock and the monotonic clock), and the
// search reads the clock often; Now asks once, for the monotonic clock,
// and dates it from a base read at start-up. Its wall-clock reading is the
// base's plus the time elapsed, which is all that durations, deadlines and
// Before need (they compare the monotonic readings). Natively it is
// time.Now.
func Now() time.Time {
	if Enabled {
		return base.Add(time.Since(base))
	}
	return time.Now()
}

var base = time.Now()

// Give hands the host a turn now (when Enabled; natively it returns at once).
func Give() {
	if Enabled {
		Host()
		last = Now()
	}
}

// checkEvery is the number of steps between two looks at the clock: a step
// is one label expansion, one table row, one insertion: a microsecond or so.
const checkEvery = 1024

// last is when the host last had a turn. One per program, not per loop:
// a chain of short calls (the explanation's many small tests) must add up
// to a turn too. Only read and written when Enabled, where Go runs on one
// thread and switches goroutines only where they block.
var last time.Time

// Pacer paces one loop. The zero value is ready; it is not safe for use by
// several goroutines at once.
type Pacer struct {
	n int
}

// Step counts one unit of work. Every checkEvery steps it returns true, so
// that the caller checks its context then; when Enabled it also gives the
// host a turn if Every has passed since the last one.
func (p *Pacer) Step() bool { return p.Add(1) }

// Add counts k units of work at once, for a step whose cost varies (a
// state of a table with its many candidates), as Step does for one.
func (p *Pacer) Add(k int) bool {
	p.n += k
	if p.n < checkEvery {
		return false
	}
	p.n = 0
	if Enabled {
		Due()
	}
	return true
}

// Due gives the host a turn when Every has passed since the last one, and
// reports whether it did. Loops with coarse steps call it directly; it
// reads the clock, so only when Enabled (natively it returns false at once).
func Due() bool {
	if !Enabled {
		return false
	}
	return DueAt(Now())
}

// DueAt is Due for a caller that has just read the clock (now): in
// WebAssembly every reading is a call into JavaScript, dear in a loop.
func DueAt(now time.Time) bool {
	if !Enabled {
		return false
	}
	if last.IsZero() {
		last = now
		return false
	}
	if now.Sub(last) < Every {
		return false
	}
	Host()
	last = Now()
	return true
}
