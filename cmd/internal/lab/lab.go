// Package lab measures the engine: it runs it on the published benchmark
// collections (bench), on generated days of growing size (scale), compares
// the WebAssembly build with the native one (wasm-speed), bounds a tour
// from below (heldkarp), draws the charts
// and rewrites the tables of docs/results.md between their marker
// comments. It is the body of the visitline-lab command; the product
// command, visitline, never imports it.
package lab

import (
	"errors"
	"fmt"
	"io"
	"os"

	"visitline/solver"
	"visitline/solver/format"
)

const usage = `visitline-lab: measure the Visitline engine

usage:
  visitline-lab bench [flags] FILES_OR_DIRS...
                                       run the engine on benchmark instances, summarise per family
  visitline-lab scale [flags]          solve generated instances of growing size
  visitline-lab wasm-speed [flags] FILES
                                       compare the WebAssembly build's iteration rate with the native one
  visitline-lab heldkarp [flags] FILES
                                       Held-Karp (1-tree) lower bound on each closed tour's travel

Each command takes -h for its flags. --readme FILE rewrites the part of FILE
(docs/results.md) between the command's marker comments.
`

// Main runs a lab command and returns the exit code: 0 success, 1 a failed
// run, 2 wrong usage.
func Main(args []string, stdout, stderr io.Writer) int {
	return run(args, stdout, stderr)
}

func run(args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		fmt.Fprint(stderr, usage)
		return 2
	}
	var err error
	switch args[0] {
	case "bench":
		err = runBench(args[1:], stdout, stderr)
	case "scale":
		err = runScale(args[1:], stdout, stderr)
	case "wasm-speed":
		err = runSpeed(args[1:], stdout, stderr)
	case "heldkarp":
		err = runHeldKarp(args[1:], stdout, stderr)
	case "-h", "--help", "help":
		fmt.Fprint(stdout, usage)
		return 0
	default:
		fmt.Fprintf(stderr, "visitline-lab: unknown command %q\n%s", args[0], usage)
		return 2
	}
	if err != nil {
		var ue usageError
		if errors.As(err, &ue) {
			fmt.Fprintf(stderr, "visitline-lab %s: %s\n", args[0], ue.msg)
			return 2
		}
		fmt.Fprintf(stderr, "visitline-lab %s: %v\n", args[0], err)
		return 1
	}
	return 0
}

type usageError struct{ msg string }

func (u usageError) Error() string { return u.msg }

// loadInstance reads an instance file (a benchmark file or a sites file)
// with default options, naming the file in every error.
func loadInstance(path string) (*solver.Instance, error) {
	fh, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("%s: cannot open: %w", path, unwrapPath(err))
	}
	defer fh.Close()
	d, err := format.Load(fh, nil, format.Options{SitesName: path})
	if err != nil {
		return nil, err
	}
	return d.Instance, nil
}

func unwrapPath(err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}
