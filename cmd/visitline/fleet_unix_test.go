//go:build unix

package main

import (
	"os"
	"path/filepath"
	"syscall"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// A one-vehicle day read from a pipe is read whole by the one-vehicle
// reader: the check for Solomon's format peeks at regular files only.
func TestSolveFromPipe(t *testing.T) {
	fifo := filepath.Join(t.TempDir(), "sites.fifo")
	require.NoError(t, syscall.Mkfifo(fifo, 0o600))
	go func() {
		fh, err := os.OpenFile(fifo, os.O_WRONLY, 0)
		if err != nil {
			return
		}
		defer fh.Close()
		fh.WriteString(vanSites)
	}()
	type result struct {
		code     int
		out, err string
	}
	done := make(chan result, 1)
	go func() {
		code, out, errOut := runCmd(solveArgs("--speed", "60", "--bound=false", fifo)...)
		done <- result{code, out, errOut}
	}()
	select {
	case r := <-done:
		require.Equal(t, 0, r.code, r.err)
		assert.Contains(t, r.out, "P4")
	case <-time.After(2 * time.Minute):
		// A guard against a hang, not a timing: a second open of the
		// pipe waits for a writer forever.
		t.Fatal("solve did not return: the pipe was opened twice")
	}
}
