package lab

import (
	"context"
	"time"

	"visitline/solver"
)

// cpuLimit makes a run stop once this process has used limit seconds of
// CPU time. Two ways, since neither suffices alone: a goroutine that polls
// (it also ends construction, which reports no progress), and a check at
// every progress report (in WebAssembly goroutines are not preempted, so
// the poller only runs when the search yields).
func cpuLimit(ctx context.Context, cancel context.CancelFunc, s *solver.Settings, limit float64) {
	go stopAtCPU(ctx, cancel, limit)
	s.ProgressEvery = 20 * time.Millisecond
	prev := s.OnProgress
	s.OnProgress = func(p solver.Progress) {
		if prev != nil {
			prev(p)
		}
		if processCPU() >= limit {
			cancel()
		}
	}
}

// stopAtCPU cancels once this process has used limit seconds of CPU time,
// or returns when ctx ends first.
func stopAtCPU(ctx context.Context, cancel context.CancelFunc, limit float64) {
	tk := time.NewTicker(5 * time.Millisecond)
	defer tk.Stop()
	for {
		select {
		case <-ctx.Done():
			return
		case <-tk.C:
			if processCPU() >= limit {
				cancel()
				return
			}
		}
	}
}
