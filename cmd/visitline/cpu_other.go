//go:build !unix

package main

import (
	"context"
	"os"
)

// processCPU is unknown here (-1).
func processCPU() float64 { return -1 }

// stopAtCPU cannot measure here: it leaves the run to its other limits.
func stopAtCPU(ctx context.Context, cancel context.CancelFunc, limit float64) {}

// childPeakMB is unknown here (-1).
func childPeakMB(ps *os.ProcessState) float64 { return -1 }
