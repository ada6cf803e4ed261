package format

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// bigBenchmark is a benchmark-format day of n nodes (travel 1 + |i-j|,
// windows open), large enough that its reading takes many Reads.
func bigBenchmark(n int) string {
	var b strings.Builder
	fmt.Fprintf(&b, "%d\n", n)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			v := 0
			if i != j {
				v = 1 + max(i-j, j-i)
			}
			fmt.Fprintf(&b, "%d ", v)
		}
		b.WriteByte('\n')
	}
	for i := 0; i < n; i++ {
		b.WriteString("0 100000\n")
	}
	return b.String()
}

func readFixture(t *testing.T, rel string) string {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "..", "testdata", rel))
	require.NoError(t, err)
	return string(b)
}

// TestLoadReportsProgressToTheEnd: the counts grow, never pass the total,
// and end at it: the sites input once, a matrix twice (two passes).
func TestLoadReportsProgressToTheEnd(t *testing.T) {
	cases := []struct {
		name, sites, matrix string
	}{
		{"benchmark file", bigBenchmark(300), ""},
		{"sites file with a matrix", readFixture(t, "sites/minutes.csv"), readFixture(t, "matrix/ids-shuffled.csv")},
		{"sites file with a spaced matrix", readFixture(t, "sites/minutes.csv"), readFixture(t, "matrix/plain-spaces.txt")},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var calls int
			var last, total int64
			opt := Options{Progress: func(done, tot int64) error {
				calls++
				assert.GreaterOrEqual(t, done, last, "progress never goes back")
				assert.LessOrEqual(t, done, tot)
				last, total = done, tot
				return nil
			}}
			var mx *strings.Reader
			if c.matrix != "" {
				mx = strings.NewReader(c.matrix)
			}
			var d *Dataset
			var err error
			if mx != nil {
				d, err = Load(strings.NewReader(c.sites), mx, opt)
			} else {
				d, err = Load(strings.NewReader(c.sites), nil, opt)
			}
			require.NoError(t, err)
			require.NotNil(t, d)
			want := int64(len(c.sites) + 2*len(c.matrix))
			assert.Equal(t, want, total)
			assert.Equal(t, want, last, "the last report is the whole input")
			assert.Greater(t, calls, 1)
		})
	}
}

// TestLoadStopsWhenProgressSaysSo: the error Progress gives ends the load
// with that very error (a cancel is not reported as bad data), before the
// rest of the input is read.
func TestLoadStopsWhenProgressSaysSo(t *testing.T) {
	cases := []struct {
		name, sites, matrix string
	}{
		{"benchmark file", bigBenchmark(300), ""},
		{"matrix, first pass", readFixture(t, "sites/minutes.csv"), readFixture(t, "matrix/ids-shuffled.csv")},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			ctx, cancel := context.WithCancel(context.Background())
			half := int64(len(c.sites)+2*len(c.matrix)) / 2
			var stoppedAt int64
			opt := Options{Progress: func(done, total int64) error {
				if done >= half && ctx.Err() == nil {
					stoppedAt = done
					cancel()
				}
				return ctx.Err()
			}}
			var err error
			var d *Dataset
			if c.matrix != "" {
				d, err = Load(strings.NewReader(c.sites), strings.NewReader(c.matrix), opt)
			} else {
				d, err = Load(strings.NewReader(c.sites), nil, opt)
			}
			assert.Nil(t, d)
			require.Error(t, err)
			assert.True(t, errors.Is(err, context.Canceled), "got %v", err)
			assert.Less(t, stoppedAt, int64(len(c.sites)+2*len(c.matrix)))
		})
	}
}
