//go:build standin

package main

// Built with -tags standin, the worker runs standinSolve instead of
// solver.Solve (see standin.go for why).
func init() { solve = standinSolve }
