package main

import (
	"strings"

	"visitline/solver"
	"visitline/solver/format"
)

// loadInstance reads pasted or dropped text. Today it knows the plain matrix
// format of the benchmark collections; the sites and matrix CSV readers of
// solver/format take over here through one shared entry point once they exist.
func loadInstance(name, text string) (*solver.Instance, error) {
	return format.ReadBenchmark(strings.NewReader(text), name)
}
