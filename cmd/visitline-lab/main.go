// Command visitline-lab measures the Visitline engine: bench (the published
// benchmark collections), scale (generated days of growing size) and
// wasm-speed (the WebAssembly build against the native one). It writes the
// tables and charts of docs/results.md; see DEVELOPERS.md for the make
// targets that run it.
package main

import (
	"os"

	"visitline/cmd/internal/lab"
)

func main() {
	os.Exit(lab.Main(os.Args[1:], os.Stdout, os.Stderr))
}
