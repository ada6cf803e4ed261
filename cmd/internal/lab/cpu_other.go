//go:build !unix && !js

package lab

import "os"

// processCPU is unknown here (-1).
func processCPU() float64 { return -1 }

// childPeakMB is unknown here (-1).
func childPeakMB(ps *os.ProcessState) float64 { return -1 }
