//go:build !unix && !js

package main

import "os"

// processCPU is unknown here (-1).
func processCPU() float64 { return -1 }

// childPeakMB is unknown here (-1).
func childPeakMB(ps *os.ProcessState) float64 { return -1 }
