package bound

import "runtime"

// yielder gives other goroutines a turn every so many steps of work. In the
// WebAssembly build goroutines are cooperative, so a long loop that never
// yields would starve the engine and the worker's message loop.
type yielder struct {
	n    int
	hook func()
}

// tickEvery is the number of steps between turns: a step is one label
// expansion or one table row, a microsecond or so.
const tickEvery = 1024

// tick counts one step; every tickEvery steps it yields (and calls the hook)
// and returns true, so that the caller checks its context then.
func (y *yielder) tick() bool {
	y.n++
	if y.n < tickEvery {
		return false
	}
	y.n = 0
	if y.hook != nil {
		y.hook()
	}
	runtime.Gosched()
	return true
}
