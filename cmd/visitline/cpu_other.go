//go:build !unix

package main

// processCPU is unknown here (-1).
func processCPU() float64 { return -1 }
