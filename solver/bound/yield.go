package bound

import (
	"runtime"
	"time"
)

// yielder gives other goroutines a turn every so many steps of work, and
// calls the host's hook every hookEvery. In the WebAssembly build goroutines
// are cooperative and the JavaScript event loop only runs when every
// goroutine is blocked: runtime.Gosched lets the engine's goroutine run, and
// the hook (which should block until the event loop has had a turn) lets
// the worker's messages in.
type yielder struct {
	n    int
	hook func()
	last time.Time
}

// tickEvery is the number of steps between turns: a step is one label
// expansion or one table row, a microsecond or so.
const tickEvery = 1024

// hookEvery is how often the hook runs at most.
const hookEvery = 20 * time.Millisecond

// tick counts one step; every tickEvery steps it yields (and calls the hook
// when hookEvery has passed) and returns true, so that the caller checks its
// context then.
func (y *yielder) tick() bool {
	y.n++
	if y.n < tickEvery {
		return false
	}
	y.n = 0
	if y.hook != nil {
		if now := time.Now(); now.Sub(y.last) >= hookEvery {
			y.last = now
			y.hook()
		}
	}
	runtime.Gosched()
	return true
}
