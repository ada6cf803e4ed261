// Command visitline orders one vehicle's visits to sites with time
// windows: solve a day, check a plan against it, serve the planner page,
// write the static page, or write an invented day of any size. It parses
// flags and prints; the work is done in solver/... and web. (The
// measurement lab is a command of its own, visitline-lab.)
package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"strconv"
	"strings"
)

const usage = `visitline: order one vehicle's visits to sites with time windows

usage:
  visitline solve [flags] FILE         find a plan (visitline solve -h for flags)
  visitline check FILE PLAN.json       validate a plan against an instance
  visitline serve [flags]              serve the planner page on 127.0.0.1
  visitline gen [flags] > FILE         write an invented, feasible instance of any size
  visitline site [--engine F] DIR      write the static page into DIR
`

func main() {
	os.Exit(run(os.Args[1:], os.Stdout, os.Stderr))
}

// run dispatches a command and returns the exit code: 0 success, 1 a failed
// run (bad input, infeasible check), 2 wrong usage.
func run(args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		fmt.Fprint(stderr, usage)
		return 2
	}
	var err error
	switch args[0] {
	case "solve":
		err = runSolve(args[1:], stdout, stderr)
	case "check":
		err = runCheck(args[1:], stdout, stderr)
	case "gen":
		err = runGen(args[1:], stdout, stderr)
	case "serve":
		err = runServe(args[1:], stdout, stderr)
	case "site":
		err = runSite(args[1:], stdout, stderr)
	case "-h", "--help", "help":
		fmt.Fprint(stdout, usage)
		return 0
	case "bench", "scale", "wasm-speed":
		fmt.Fprintf(stderr, "visitline: %s is a command of the measurement lab: visitline-lab %s (make lab builds bin/visitline-lab)\n", args[0], args[0])
		return 2
	default:
		fmt.Fprintf(stderr, "visitline: unknown command %q\n%s", args[0], usage)
		return 2
	}
	if err != nil {
		if ue, ok := err.(usageError); ok {
			fmt.Fprintf(stderr, "visitline %s: %s\n", args[0], ue.msg)
			return 2
		}
		if err == errSilent {
			return 1
		}
		fmt.Fprintf(stderr, "visitline %s: %v\n", args[0], err)
		return 1
	}
	return 0
}

type usageError struct{ msg string }

func (u usageError) Error() string { return u.msg }

// errSilent ends a command with exit code 1 after it printed its own report.
var errSilent = fmt.Errorf("failed")

// parseArgs parses flags wherever they stand among the arguments
// ("solve sites.csv --matrix t.csv" as well as "solve --matrix t.csv
// sites.csv") and returns the positional arguments. After "--" every
// argument is positional.
//
// A bad flag value is returned as a usageError naming the flag, the value
// and what is wanted, without the whole usage text; -h prints the usage.
func parseArgs(fs *flag.FlagSet, args []string) ([]string, error) {
	var pos []string
	out, usage := fs.Output(), fs.Usage
	fs.SetOutput(io.Discard)
	fs.Usage = func() {}
	defer func() { fs.SetOutput(out); fs.Usage = usage }()
	for {
		if err := fs.Parse(args); err != nil {
			if errors.Is(err, flag.ErrHelp) {
				fs.SetOutput(out)
				usage()
				return nil, err
			}
			return nil, flagError(fs, err)
		}
		rest := fs.Args()
		if len(rest) == 0 {
			return pos, nil
		}
		if len(args) > len(rest) && args[len(args)-len(rest)-1] == "--" {
			return append(pos, rest...), nil
		}
		pos = append(pos, rest[0])
		args = rest[1:]
	}
}

// flagError rewrites the flag package's error for a bad value ("invalid
// value "-1" for flag -budget: parse error") as "--budget -1: want ...".
func flagError(fs *flag.FlagSet, err error) error {
	msg := err.Error()
	const pre = "invalid value "
	if !strings.HasPrefix(msg, pre) {
		return usageError{msg + " (see visitline " + fs.Name() + " -h)"}
	}
	rest := msg[len(pre):]
	value, err2 := strconv.QuotedPrefix(rest)
	if err2 != nil {
		return usageError{msg}
	}
	rest = strings.TrimPrefix(rest[len(value):], " for flag -")
	name, cause, _ := strings.Cut(rest, ": ")
	value, _ = strconv.Unquote(value)
	if cause == "parse error" || cause == "value out of range" {
		cause = "want " + kindOf(fs.Lookup(name))
	}
	return usageError{fmt.Sprintf("--%s %s: %s", name, value, cause)}
}

// kindOf says what a flag takes, from its default value.
func kindOf(f *flag.Flag) string {
	if f == nil {
		return "a valid value"
	}
	switch fmt.Sprintf("%T", f.Value) {
	case "*flag.intValue", "*flag.int64Value", "*flag.uintValue", "*flag.uint64Value":
		return "a whole number"
	case "*flag.float64Value":
		return "a number such as 50 or 1.3"
	case "*flag.boolValue":
		return "true or false"
	case "*flag.durationValue":
		return "a time such as 10s or 2m"
	}
	return "a valid value"
}
