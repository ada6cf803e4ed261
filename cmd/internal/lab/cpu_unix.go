//go:build unix

package lab

import (
	"os"
	"syscall"
)

// processCPU is the CPU time this process has used, in seconds (user and
// system), or -1 where the system does not tell. On a shared machine it
// shows how much of a core a timed run really had.
func processCPU() float64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return -1
	}
	return float64(ru.Utime.Sec+ru.Stime.Sec) + float64(ru.Utime.Usec+ru.Stime.Usec)/1e6
}

// childPeakMB is the resident high-water of a finished child process in
// MiB (Linux reports ru_maxrss in KiB), or -1.
func childPeakMB(ps *os.ProcessState) float64 {
	if ru, ok := ps.SysUsage().(*syscall.Rusage); ok && ru.Maxrss > 0 {
		return float64(ru.Maxrss) / 1024
	}
	return -1
}
