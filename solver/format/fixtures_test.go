package format_test

import (
	"os"
	"path/filepath"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"visitline/solver/format"
)

// fixtures is the repository's testdata/ (see its README.md).
var fixtures = filepath.Join("..", "..", "testdata")

func loadFixture(t *testing.T, sites, matrix string) *format.Dataset {
	t.Helper()
	sf, err := os.Open(filepath.Join(fixtures, "sites", sites))
	require.NoError(t, err)
	defer sf.Close()
	mf, err := os.Open(filepath.Join(fixtures, "matrix", matrix))
	require.NoError(t, err)
	defer mf.Close()
	d, err := format.Load(sf, mf, format.Options{SitesName: sites, MatrixName: matrix})
	require.NoError(t, err, sites+" with "+matrix)
	return d
}

// TestEveryDialectReadsTheSameDay: the piano tuner's day of testdata/ is
// written in every way a sites file may be (delimiters, header names,
// clock, minute or dated times, H:MM or decimal-comma service, byte order
// marks, UTF-16, a sep= line, quoting) and its matrix two ways (ids in
// another order, plain rows in the sites' order). Each pair must give the
// day as written in testdata/README.md, worked out here by hand: minutes
// from midnight, times 6000 units per minute (format.SitesScale).
func TestEveryDialectReadsTheSameDay(t *testing.T) {
	const u = 6000 // units per minute
	wantIDs := []string{"D", "A", "B", "C", "E"}
	// 08:00 = 8*60 = 480 min, 08:30 = 510, 09:00 = 540, 10:00 = 600.
	wantEarly := []int64{480 * u, 510 * u, 540 * u, 600 * u}
	// 13:00 = 780, 09:00 = 540, 10:30 = 630, 11:00 = 660, 12:00 = 720.
	wantLate := []int64{780 * u, 540 * u, 630 * u, 660 * u, 720 * u}
	// 0, 30, 45 (0:45), 7.5 (7,5), 20 (0:20) minutes.
	wantService := []int64{0, 30 * u, 45 * u, 7.5 * u, 20 * u}
	// Rows from, columns to, in the order D A B C E (matrix/plain-spaces.txt).
	wantTravel := [][]int64{
		{0, 20, 25, 30, 15},
		{22, 0, 10, 18, 12},
		{27, 11, 0, 9, 14},
		{31, 17, 8, 0, 21},
		{16, 13, 15, 20, 0},
	}
	sites := []string{"comma-clock.csv", "semicolon-decimal-comma.csv", "tab-hmm.tsv", "sep-line-quoted.csv",
		"bom-utf8.csv", "utf16le-bom.csv", "minutes.csv", "dated.csv"}
	var eEarly []int64
	for _, s := range sites {
		for _, m := range []string{"ids-shuffled.csv", "plain-spaces.txt"} {
			t.Run(s+"+"+m, func(t *testing.T) {
				d := loadFixture(t, s, m)
				in := d.Instance
				assert.Empty(t, d.Warnings)
				require.Equal(t, 5, in.N)
				assert.Equal(t, wantIDs, in.IDs)
				assert.Equal(t, int64(u), in.Scale)
				assert.Equal(t, wantEarly, in.Early[:4])
				eEarly = append(eEarly, in.Early[4])
				assert.LessOrEqual(t, in.Early[4], in.Early[0], "E has no earliest: open from the start of the day")
				assert.Equal(t, wantLate, in.Late)
				assert.Equal(t, wantService, in.Service)
				for i := range wantTravel {
					for j := range wantTravel[i] {
						assert.Equal(t, wantTravel[i][j]*u, in.T(i, j), "%s to %s", wantIDs[i], wantIDs[j])
					}
				}
			})
		}
	}
	for _, e := range eEarly {
		assert.Equal(t, eEarly[0], e, "an empty earliest reads the same in every dialect")
	}
}

// TestFixtureNames: names come through the dialects, quoting included.
func TestFixtureNames(t *testing.T) {
	assert.Equal(t, "Alder House", loadFixture(t, "utf16le-bom.csv", "ids-shuffled.csv").Name(1))
	assert.Equal(t, "Cedar School", loadFixture(t, "tab-hmm.tsv", "plain-spaces.txt").Name(3))
	q := loadFixture(t, "sep-line-quoted.csv", "plain-spaces.txt")
	assert.Equal(t, "Workshop; yard", q.Name(0))
	assert.Equal(t, `Alder House; "blue door"`, q.Name(1))
}
