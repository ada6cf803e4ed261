package format

import (
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

var abc = []string{"A", "B", "C"}

// want is the matrix of abc used below, in minutes: asymmetric on purpose.
var wantABC = []int64{0, 5, 7, 6, 0, 4, 8, 3, 0}

func readMatrixText(t *testing.T, src string, unit Unit) *Matrix {
	t.Helper()
	m, err := ReadMatrix(strings.NewReader(src), "m.csv", unit, abc)
	require.NoError(t, err)
	return m
}

func TestReadMatrixForms(t *testing.T) {
	cases := []struct{ name, src string }{
		{"plain in sites order", "0,5,7\n6,0,4\n8,3,0\n"},
		{"header and ids", "from\\to,A,B,C\nA,0,5,7\nB,6,0,4\nC,8,3,0\n"},
		{"header and ids in other orders", ",C,A,B\nB,4,6,0\nC,0,8,3\nA,7,0,5\n"},
		{"header without corner cell", "A,B,C\nA,0,5,7\nB,6,0,4\nC,8,3,0\n"},
		{"header only", "A,B,C\n0,5,7\n6,0,4\n8,3,0\n"},
		{"header only, other order", "B,C,A\n0,4,6\n3,0,8\n5,7,0\n"},
		{"ids only: columns follow the rows", "B,0,6,4\nA,5,0,7\nC,3,8,0\n"},
		{"tab pasted", "\tA\tB\tC\nA\t0\t5\t7\nB\t6\t0\t4\nC\t8\t3\t0\n"},
		{"semicolons with decimal comma", "0;5,0;7\n6;0;4\n8;3;0\n"},
		{"spaces", "0  5 7\n6 0 4\n 8 3 0\n"},
		{"empty diagonal", ",5,7\n6,,4\n8,3,-\n"},
		{"H:MM", "0,0:05,0:07\n0:06,0,0:04\n0:08,0:03,0\n"},
		{"bom and crlf", "\ufeff0,5,7\r\n6,0,4\r\n8,3,0\r\n"},
		{"trailing empty cells", "0\t5\t7\t\n6\t0\t4\t\n8\t3\t0\t\n"},
		{"trailing empty cells with ids", ",A,B,C,,\nA,0,5,7,,\nB,6,0,4,,\nC,8,3,0,,\n"},
		{"sep line", "sep=;\n0;5;7\n6;0;4\n8;3;0\n"},
		{"quoted ids", "\"\",\"A\",\"B\",\"C\"\n\"A\",0,5,7\n\"B\",6,0,4\n\"C\",8,3,0\n"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			m := readMatrixText(t, c.src, UnitMinutes)
			want := make([]int64, len(wantABC))
			for i, v := range wantABC {
				want[i] = v * SitesScale
			}
			assert.Equal(t, want, m.Travel)
		})
	}
}

func TestReadMatrixNumericIDs(t *testing.T) {
	ids := []string{"10", "20"}
	m, err := ReadMatrix(strings.NewReader(",20,10\n20,0,3\n10,4,0\n"), "m.csv", UnitMinutes, ids)
	require.NoError(t, err)
	assert.Equal(t, []int64{0, 4 * SitesScale, 3 * SitesScale, 0}, m.Travel)
	// A header row of numeric ids is told from a row of times by the row count.
	m, err = ReadMatrix(strings.NewReader("20,10\n0,3\n4,0\n"), "m.csv", UnitMinutes, ids)
	require.NoError(t, err)
	assert.Equal(t, []int64{0, 4 * SitesScale, 3 * SitesScale, 0}, m.Travel)
}

func TestReadMatrixSeconds(t *testing.T) {
	m := readMatrixText(t, "0,300,420.5\n360,0,240\n480,180,0\n", UnitSeconds)
	assert.Equal(t, int64(300*perSecond), m.Travel[1])
	assert.Equal(t, int64(42050), m.Travel[2], "seconds to two decimals are exact")
	assert.Equal(t, 5*SitesScale, m.Travel[1])
}

func TestReadMatrixPositions(t *testing.T) {
	m := readMatrixText(t, ",C,A,B\nB,4,6,0\nC,0,8,3\nA,7,0,5\n", UnitMinutes)
	line, col := m.Pos(0, 2) // A to C: line 4, column 2
	assert.Equal(t, 4, line)
	assert.Equal(t, 2, col)
}

func TestParseUnit(t *testing.T) {
	for in, want := range map[string]Unit{"": UnitMinutes, "minutes": UnitMinutes, "MIN": UnitMinutes, "seconds": UnitSeconds, "s": UnitSeconds} {
		u, err := ParseUnit(in)
		require.NoError(t, err)
		assert.Equal(t, want, u, in)
	}
	_, err := ParseUnit("hours")
	assert.EqualError(t, err, `matrix-unit "hours": want minutes or seconds`)
}

func TestReadMatrixErrors(t *testing.T) {
	cases := []struct {
		name, src string
		unit      Unit
		want      string
	}{
		{"empty", "", UnitMinutes, "m.csv:1: travel matrix: no data; want 3 rows of 3 travel times"},
		{"too few rows", "0,5,7\n6,0,4\n", UnitMinutes, "m.csv:2: travel matrix: 2 rows of times; the sites file has 3 sites, so want 3 rows of 3 travel times"},
		{"too many rows", "0,5,7\n6,0,4\n8,3,0\n1,1,1\n1,1,1\n", UnitMinutes, "m.csv:4: travel matrix: 5 rows of times"},
		{"not square", "0,5\n6,0\n8,3\n", UnitMinutes, "m.csv:1: travel matrix: the first row of times has 2 travel times; the sites file has 3 sites, so want 3"},
		{"ragged", "0,5,7\n6,0\n8,3,0\n", UnitMinutes, "m.csv:2: travel matrix: row 2 of the times has 2 travel times; want 3, one per site (the matrix must be square, 3×3)"},
		{"header cells", "A,B\nA,0,5,7\nB,6,0,4\nC,8,3,0\n", UnitMinutes, "m.csv:1: travel matrix: the header row has 2 cells"},
		{"corner without ids", ",A,B,C\n0,5,7\n6,0,4\n8,3,0\n", UnitMinutes, "m.csv:1: travel matrix: the header row has 4 cells but the rows have no site id in front"},
		{"unknown id", ",A,B,D\nA,0,5,7\nB,6,0,4\nC,8,3,0\n", UnitMinutes, `m.csv:1:4: header: "D" is not a site id of the sites file`},
		{"case hint", ",A,b,C\nA,0,5,7\nB,6,0,4\nC,8,3,0\n", UnitMinutes, `m.csv:1:3: header: "b" is not a site id of the sites file (did you mean "B"? ids match exactly)`},
		{"duplicate header id", ",A,B,A\nA,0,5,7\nB,6,0,4\nC,8,3,0\n", UnitMinutes, `m.csv:1:4: header: "A" appears twice (first at column 2)`},
		{"duplicate row id", ",A,B,C\nA,0,5,7\nB,6,0,4\nB,8,3,0\n", UnitMinutes, `m.csv:4:1: row id: "B" appears twice (first at line 3)`},
		{"unknown row id", "A,0,5,7\nB,6,0,4\nX,8,3,0\n", UnitMinutes, `m.csv:3:1: row id: "X" is not a site id`},
		{"missing", "0,5,7\n6,0,\n8,3,0\n", UnitMinutes, "m.csv:2:3: travel time from B to C: missing; want minutes (0 or more)"},
		{"negative", "0,5,7\n6,0,-4\n8,3,0\n", UnitMinutes, `m.csv:2:3: travel time from B to C: "-4" is negative; travel times must be 0 or more`},
		{"not a number", "0,5,7\n6,0,4\n8,x3,0\n", UnitMinutes, `m.csv:3:2: travel time from C to B: "x3" is not a travel time`},
		{"first row not numbers", "0,x,7\n6,0,4\n8,3,0\n", UnitMinutes, `m.csv:3: travel matrix: 2 rows of times (line 1 was taken as a header of site ids because it holds "x", which is not a travel time)`},
		{"not a number in a named matrix", ",A,B,C\nA,0,5,7\nB,6,0,4\nC,8,soon,0\n", UnitMinutes, `m.csv:4:3: travel time from C to B: "soon" is not a travel time; want minutes (12 or 12.5) or H:MM`},
		{"seconds with colon", "0,5,7\n6,0,4\n8,3:00,0\n", UnitSeconds, `m.csv:3:2: travel time from C to B: "3:00" is not a travel time; want seconds`},
		{"negative seconds", "0,5,7\n6,0,4\n8,-3,0\n", UnitSeconds, `m.csv:3:2: travel time from C to B: "-3" is negative`},
		{"too large", "0,5,7\n6,0,4\n8,99999999999999999999,0\n", UnitSeconds, `"99999999999999999999" seconds is too large`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := ReadMatrix(strings.NewReader(c.src), "m.csv", c.unit, abc)
			require.Error(t, err)
			assert.Contains(t, err.Error(), c.want)
		})
	}
}

// Every bad cell of a matrix is reported, each with its place, not only the
// first; past maxErrors one more entry says that more follow.
func TestReadMatrixListsEveryBadCell(t *testing.T) {
	_, err := ReadMatrix(strings.NewReader("0,5,7\n6,0,\n8,-3,0\n"), "m.csv", UnitMinutes, abc)
	require.Error(t, err)
	var list ErrorList
	require.ErrorAs(t, err, &list, err.Error())
	require.Len(t, list, 2, err.Error())
	assert.Contains(t, list[0].Error(), "m.csv:2:3: travel time from B to C: missing")
	assert.Contains(t, list[1].Error(), `m.csv:3:2: travel time from C to B: "-3" is negative`)

	ids := make([]string, 60)
	var b strings.Builder
	for i := range ids {
		ids[i] = "S" + string(rune('A'+i/26)) + string(rune('a'+i%26))
		for j := range ids {
			if j > 0 {
				b.WriteString(",")
			}
			switch {
			case i == j:
				b.WriteString("0")
			case i == 0: // a first row of numbers: no header
				b.WriteString("1")
			default:
				b.WriteString("?")
			}
		}
		b.WriteString("\n")
	}
	_, err = ReadMatrix(strings.NewReader(b.String()), "big.csv", UnitMinutes, ids)
	require.ErrorAs(t, err, &list)
	assert.Len(t, list, maxErrors+1)
	assert.Contains(t, list[maxErrors].Error(), "more errors follow")
}
