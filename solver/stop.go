package solver

import (
	"context"
	"errors"

	"visitline/solver/fmtlite"
)

// Stop says why a run ended. It is decided in one place, the engine's
// finish (with StopOf for a context that ended), and written as its String
// by the command line's JSON and the page's "finished" message.
type Stop int

const (
	// StopBudget: the time budget ran out (the engine's deadline or a
	// context deadline: a deadline is a budget, never a stop).
	StopBudget Stop = iota
	// StopIterations: the iteration budget ran out.
	StopIterations
	// StopComplete: nothing is left to search (the plan is proven best,
	// or the day is too small to search).
	StopComplete
	// StopStopped: the user (or the caller) cancelled the run.
	StopStopped
	// StopError: the run failed; the error says why.
	StopError
)

var stopNames = [...]string{"budget", "iterations", "complete", "stopped", "error"}

func (s Stop) String() string {
	if s >= 0 && int(s) < len(stopNames) {
		return stopNames[s]
	}
	return fmtlite.Sprintf("Stop(%d)", int(s))
}

// MarshalText writes the name, so that JSON carries "budget", not 0.
func (s Stop) MarshalText() ([]byte, error) { return []byte(s.String()), nil }

// UnmarshalText reads a name written by MarshalText.
func (s *Stop) UnmarshalText(b []byte) error {
	for i, n := range stopNames {
		if n == string(b) {
			*s = Stop(i)
			return nil
		}
	}
	return fmtlite.Errorf("stop reason %q: want budget, iterations, complete, stopped or error", b)
}

// StopOf says why a context that has ended ended: a deadline (the budget
// given to context.WithTimeout) is StopBudget, anything else (a cancel)
// is StopStopped.
func StopOf(ctx context.Context) Stop {
	if errors.Is(context.Cause(ctx), context.DeadlineExceeded) {
		return StopBudget
	}
	return StopStopped
}
