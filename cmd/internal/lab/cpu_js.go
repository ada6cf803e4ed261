//go:build js

package lab

import (
	"os"
	"strconv"
	"strings"
)

// processCPU reads the CPU time of the process that runs this program (the
// Node.js runner of the WebAssembly build) from /proc/self/stat, where the
// runner lets the program read files and the system is Linux; -1
// elsewhere. utime and stime are in clock ticks of 1/100 s (the Linux
// default USER_HZ, common practice).
func processCPU() float64 {
	data, err := os.ReadFile("/proc/self/stat")
	if err != nil {
		return -1
	}
	s := string(data)
	i := strings.LastIndexByte(s, ')')
	if i < 0 {
		return -1
	}
	f := strings.Fields(s[i+1:])
	// After the command name: state is field 3 of the file, utime 14 and
	// stime 15, so 11 and 12 here.
	if len(f) < 13 {
		return -1
	}
	u, err1 := strconv.ParseFloat(f[11], 64)
	st, err2 := strconv.ParseFloat(f[12], 64)
	if err1 != nil || err2 != nil {
		return -1
	}
	return (u + st) / 100
}

// childPeakMB is unknown here: js/wasm starts no processes (-1).
func childPeakMB(ps *os.ProcessState) float64 { return -1 }
