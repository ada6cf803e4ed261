//go:build !unix

package bound

import "time"

var processStart = time.Now()

// processCPU falls back to the wall clock where there is no rusage.
func processCPU() time.Duration { return time.Since(processStart) }
