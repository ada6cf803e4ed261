//go:build !js

package format

import "runtime/debug"

// freeMemory hands the garbage back to the system (see Load).
func freeMemory() { debug.FreeOSMemory() }
