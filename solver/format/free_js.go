//go:build js

package format

import "runtime"

// freeMemory collects the garbage (see Load). A WebAssembly memory cannot
// shrink, so there is nothing to hand back (runtime/debug, which would,
// brings fmt and os into the worker's build); collecting it now lets the
// engine's matrix reuse the space.
func freeMemory() { runtime.GC() }
