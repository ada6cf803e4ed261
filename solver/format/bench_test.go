package format

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// sharedDir is where the published benchmark instances live beside the repo.
func sharedDir(t testing.TB) string {
	t.Helper()
	d := filepath.Join("..", "..", "..", "shared", "benchmarks", "tsptw")
	if _, err := os.Stat(d); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("shared benchmarks missing at %s (required under CI)", d)
		}
		t.Skipf("shared benchmarks not found at %s", d)
	}
	return d
}

func TestReadBenchmarkSmall(t *testing.T) {
	src := "3\n0 1.5 2\n1 0 3\n2 3.25 0\n0 100\n1 10\n2 20\n# comment\n"
	in, err := ReadBenchmark(strings.NewReader(src), "x.txt")
	require.NoError(t, err)
	assert.Equal(t, 3, in.N)
	assert.Equal(t, int64(100), in.Scale)
	assert.Equal(t, int64(150), in.T(0, 1))
	assert.Equal(t, int64(325), in.T(2, 1))
	assert.Equal(t, int64(2000), in.Late[2])
}

func TestReadBenchmarkErrors(t *testing.T) {
	cases := []struct{ name, src, want string }{
		{"empty", "", "x.txt:1: node count: file is empty"},
		{"count", "abc\n", "x.txt:1:1: node count"},
		{"not square", "2\n0 1 5\n1 0\n0 1\n0 1\n", "x.txt:2: travel matrix: row 1 has 3 numbers, want 2"},
		{"non-number", "2\n0 x\n1 0\n0 1\n0 1\n", "x.txt:2:2: travel time row 1 column 2: \"x\" is not a number"},
		{"negative", "2\n0 -1\n1 0\n0 1\n0 1\n", "x.txt:2:2: travel time row 1 column 2: \"-1\" is negative"},
		{"window", "2\n0 1\n1 0\n0 10\n5 1\n", "x.txt:5:2: latest of node 1: 1 is before the earliest 5"},
		{"truncated", "2\n0 1\n1 0\n0 10\n", "x.txt:5: time window: file ends early"},
		{"extra", "2\n0 1\n1 0\n0 10\n0 10\n7\n", "x.txt:6:1: end of data"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := ReadBenchmark(strings.NewReader(c.src), "x.txt")
			require.Error(t, err)
			assert.Contains(t, err.Error(), c.want)
		})
	}
}

func TestReadBenchmarkAllShared(t *testing.T) {
	dir := sharedDir(t)
	files, err := filepath.Glob(filepath.Join(dir, "*", "*"))
	require.NoError(t, err)
	count := 0
	for _, f := range files {
		fh, err := os.Open(f)
		require.NoError(t, err)
		in, err := ReadBenchmark(fh, f)
		fh.Close()
		require.NoError(t, err, f)
		require.GreaterOrEqual(t, in.N, 2)
		count++
	}
	// 417 instances across six families (shared/benchmarks/tsptw/README.md).
	assert.Equal(t, 417, count)
}

func FuzzReadBenchmark(f *testing.F) {
	f.Add("3\n0 1.5 2\n1 0 3\n2 3.25 0\n0 100\n1 10\n2 20\n")
	f.Add("2\n0 1\n1 0\n0 10\n5 1\n")
	f.Add("1\n0\n0 0\n")
	f.Add("99999999999\n")
	f.Add("2\n0 1e400\n1 0\n0 1\n0 1\n")
	f.Add("2\r0 1\r1 0\r0 10\r0 10\r")
	f.Add("2\n0 1.123456789\n1 0\n0 10 0 10\n")
	f.Fuzz(func(t *testing.T, src string) {
		in, err := ReadBenchmark(strings.NewReader(src), "fuzz")
		if err != nil {
			var pe *ParseError
			require.ErrorAs(t, err, &pe)
			require.Less(t, len(err.Error()), 2000)
			return
		}
		require.NoError(t, in.Validate())
		require.Contains(t, []int64{1, 10, 100, 1000, 10000, 100000, 1000000}, in.Scale)
	})
}
