package format

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"visitline/solver"
)

func tsplibDir(t testing.TB) string {
	t.Helper()
	d := filepath.Join("..", "..", "..", "shared", "benchmarks", "tsplib")
	if _, err := os.Stat(d); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("shared benchmarks missing at %s (required under CI)", d)
		}
		t.Skipf("shared benchmarks not found at %s", d)
	}
	return d
}

func coordFile(kind string, pts ...[2]float64) string {
	var b strings.Builder
	fmt.Fprintf(&b, "NAME : t\nTYPE : TSP\nDIMENSION : %d\nEDGE_WEIGHT_TYPE : %s\nNODE_COORD_SECTION\n", len(pts), kind)
	for i, p := range pts {
		fmt.Fprintf(&b, "%d %g %g\n", i+1, p[0], p[1])
	}
	b.WriteString("EOF\n")
	return b.String()
}

// Each distance function of TSPLIB 95 (G. Reinelt, "TSPLIB 95", Universität
// Heidelberg, 1995), section 2, on values worked by hand from the
// section's formula.
func TestTSPLIBDistanceFunctions(t *testing.T) {
	cases := []struct {
		name, kind, section string
		a, b                [2]float64
		want                int64
	}{
		// 2.1 Euclidean: nint(sqrt(dx²+dy²)), nint(x) = (int)(x+0.5).
		{"euc 3-4-5", "EUC_2D", "2.1", [2]float64{0, 0}, [2]float64{3, 4}, 5},
		{"euc rounds down", "EUC_2D", "2.1", [2]float64{0, 0}, [2]float64{1, 1}, 1},      // 1.414
		{"euc half rounds up", "EUC_2D", "2.1", [2]float64{0, 0}, [2]float64{1.5, 2}, 3}, // 2.5
		{"euc exponent notation", "EUC_2D", "2.1", [2]float64{200, 400}, [2]float64{200, 500}, 100},
		// 2.2 Manhattan: nint(|dx|+|dy|).
		{"manhattan", "MAN_2D", "2.2", [2]float64{0, 0}, [2]float64{1.2, 2.4}, 4}, // 3.6
		// 2.3 Maximum: max(nint|dx|, nint|dy|).
		{"maximum", "MAX_2D", "2.3", [2]float64{0, 0}, [2]float64{1.2, 2.4}, 2},
		// 2.4 Geographical: one degree of longitude on the equator is
		// 6378.388·3.141592/180 = 111.32 km, and (int)(111.32 + 1.0) = 112.
		{"geo one degree", "GEO", "2.4", [2]float64{0, 0}, [2]float64{0, 1}, 112},
		// 2.4: DDD.MM is degrees and minutes: 0.30 is half a degree, 55.66 km,
		// (int)(55.66 + 1) = 56 (a decimal reading of 0.30 would give 34).
		{"geo minutes", "GEO", "2.4", [2]float64{0, 0}, [2]float64{0, 0.30}, 56},
		// 2.5 Pseudo-Euclidean (ATT): r = sqrt((dx²+dy²)/10), t = nint(r),
		// t+1 when t < r: sqrt(10) = 3.162, t = 3 < r, so 4.
		{"att rounds up", "ATT", "2.5", [2]float64{0, 0}, [2]float64{10, 0}, 4},
		// sqrt(2500/10) = 15.81, t = 16 ≥ r, so 16.
		{"att nint above", "ATT", "2.5", [2]float64{0, 0}, [2]float64{30, 40}, 16},
		// 2.6 Ceiling of the Euclidean distance.
		{"ceil", "CEIL_2D", "2.6", [2]float64{0, 0}, [2]float64{1, 1}, 2},
		{"ceil exact", "CEIL_2D", "2.6", [2]float64{0, 0}, [2]float64{3, 4}, 5},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			in, err := ReadTSPLIB(strings.NewReader(coordFile(c.kind, c.a, c.b)), "t.tsp")
			require.NoError(t, err)
			assert.Equal(t, c.want, in.T(0, 1), "TSPLIB 95 section %s", c.section)
			assert.Equal(t, c.want, in.T(1, 0), "symmetric")
			assert.Equal(t, int64(0), in.T(0, 0))
		})
	}
}

// TSPLIB 95 section 2.4: GEO coordinates are DDD.MM and the degrees are
// whole; 10.53 is 10°53′ (the documentation's Augsburg example, 48.23 N
// 10.53 E), i.e. 10.8833°, not 11° less 47′.
func TestTSPLIBGeoDegreesAndMinutes(t *testing.T) {
	assert.InDelta(t, 3.141592*(10+53.0/60)/180, geoRadians(10.53), 1e-12)
	assert.InDelta(t, -3.141592*(33+52.0/60)/180, geoRadians(-33.52), 1e-12)
}

func TestTSPLIBExplicitFormats(t *testing.T) {
	// One symmetric 4-node matrix written in every triangular format
	// (TSPLIB 95 section 1.1, EDGE_WEIGHT_FORMAT):
	//    0 1 2 3
	//    1 0 4 5
	//    2 4 0 6
	//    3 5 6 0
	want := [][]int64{{0, 1, 2, 3}, {1, 0, 4, 5}, {2, 4, 0, 6}, {3, 5, 6, 0}}
	forms := map[string]string{
		"FULL_MATRIX":    "0 1 2 3\n1 0 4 5\n2 4 0 6\n3 5 6 0",
		"UPPER_ROW":      "1 2 3\n4 5\n6",
		"LOWER_ROW":      "1\n2 4\n3 5 6",
		"UPPER_DIAG_ROW": "0 1 2 3\n0 4 5\n0 6\n0",
		"LOWER_DIAG_ROW": "0\n1 0\n2 4 0\n3 5 6 0",
		"UPPER_COL":      "1\n2 4\n3 5 6",
		"LOWER_COL":      "1 2 3\n4 5\n6",
		"UPPER_DIAG_COL": "0\n1 0\n2 4 0\n3 5 6 0",
		"LOWER_DIAG_COL": "0 1 2 3\n0 4 5\n0 6\n0",
		"FULL_MATRIX  ":  "9999 1 2 3 1 9999 4 5 2 4 9999 6 3 5 6 9999", // diagonal unused, lines free
	}
	for form, data := range forms {
		t.Run(strings.TrimSpace(form), func(t *testing.T) {
			src := "NAME: m\nTYPE: TSP\nDIMENSION: 4\nEDGE_WEIGHT_TYPE: EXPLICIT\nEDGE_WEIGHT_FORMAT: " + form + "\nEDGE_WEIGHT_SECTION\n" + data + "\nEOF\n"
			require.True(t, IsTSPLIB(src))
			in, err := ReadTSPLIB(strings.NewReader(src), "m.tsp")
			require.NoError(t, err)
			for i := range want {
				for j := range want[i] {
					assert.Equal(t, want[i][j], in.T(i, j), "row %d column %d", i+1, j+1)
				}
			}
		})
	}
}

func TestTSPLIBAsymmetricFullMatrix(t *testing.T) {
	src := "NAME: a\nTYPE: ATSP\nDIMENSION: 3\nEDGE_WEIGHT_TYPE: EXPLICIT\nEDGE_WEIGHT_FORMAT: FULL_MATRIX\nEDGE_WEIGHT_SECTION\n 9999 1 7\n 2 9999 3\n 4 8 9999\nEOF\n"
	in, err := ReadTSPLIB(strings.NewReader(src), "a.atsp")
	require.NoError(t, err)
	assert.Equal(t, int64(1), in.T(0, 1))
	assert.Equal(t, int64(2), in.T(1, 0))
	assert.Equal(t, int64(8), in.T(2, 1))
	assert.Equal(t, solver.Closed, in.Shape)
	assert.Equal(t, "1", in.ID(0), "TSPLIB numbers nodes from 1")
	// An open day: the tour 1-2-3-1 costs 1+3+4 and meets every window.
	sch := solver.Evaluate(in, []int{0, 1, 2})
	assert.True(t, sch.Feasible)
	assert.Equal(t, int64(8), sch.Travel)
}

func TestTSPLIBErrors(t *testing.T) {
	head := "NAME: e\nTYPE: TSP\nDIMENSION: 2\nEDGE_WEIGHT_TYPE: EUC_2D\n"
	cases := []struct{ name, src, want string }{
		{"type", "NAME: e\nTYPE: CVRP\n", "e.tsp:2: TYPE: \"CVRP\" is not a travelling salesman instance"},
		{"dimension", "NAME: e\nDIMENSION: many\n", "e.tsp:2: DIMENSION: \"many\" is not a whole number"},
		{"weight type", "NAME: e\nEDGE_WEIGHT_TYPE: XRAY1\n", "e.tsp:2: EDGE_WEIGHT_TYPE: \"XRAY1\" is not supported"},
		{"format", "NAME: e\nEDGE_WEIGHT_FORMAT: FUNNY\n", "e.tsp:2: EDGE_WEIGHT_FORMAT: \"FUNNY\" is not supported"},
		{"node number", head + "NODE_COORD_SECTION\n1 0 0\n3 1 1\n", "e.tsp:7:1: node number: \"3\" is not a node number from 1 to 2"},
		{"twice", head + "NODE_COORD_SECTION\n1 0 0\n1 1 1\n", "e.tsp:7:1: node number: node 1 is given twice"},
		{"coordinate", head + "NODE_COORD_SECTION\n1 0 0\n2 x 1\n", "e.tsp:7:2: coordinates: \"x\" is not a number"},
		{"short line", head + "NODE_COORD_SECTION\n1 0\n2 1 1\n", "e.tsp:6: coordinates: node 1 has 1 coordinates, want 2"},
		{"ends early", head + "NODE_COORD_SECTION\n1 0 0\n", "e.tsp:7: NODE_COORD_SECTION: file ends after 1 of 2 nodes"},
		{"no coords", head + "EOF\n", "NODE_COORD_SECTION: missing"},
		{"no dimension", "NAME: e\nEDGE_WEIGHT_TYPE: EUC_2D\nNODE_COORD_SECTION\n", "e.tsp:3: NODE_COORD_SECTION: comes before DIMENSION"},
		{"unknown line", head + "SOMETHING\n", "e.tsp:5:1: specification: \"SOMETHING\" is not a TSPLIB keyword"},
		{"extra number", head + "NODE_COORD_SECTION\n1 0 0\n2 1 1 7\n", "e.tsp:7:4: NODE_COORD_SECTION: unexpected \"7\""},
		{"matrix without explicit", head + "EDGE_WEIGHT_SECTION\n1\n", "EDGE_WEIGHT_SECTION: given with EDGE_WEIGHT_TYPE \"EUC_2D\""},
		{"weight not integer", "NAME: e\nTYPE: TSP\nDIMENSION: 2\nEDGE_WEIGHT_TYPE: EXPLICIT\nEDGE_WEIGHT_FORMAT: UPPER_ROW\nEDGE_WEIGHT_SECTION\n1.5\n", "e.tsp:7:1: travel row 1 column 2: \"1.5\" is not a whole number"},
		{"weight negative", "NAME: e\nTYPE: TSP\nDIMENSION: 2\nEDGE_WEIGHT_TYPE: EXPLICIT\nEDGE_WEIGHT_FORMAT: UPPER_ROW\nEDGE_WEIGHT_SECTION\n-1\n", "e.tsp:7:1: travel row 1 column 2: \"-1\" is negative"},
		{"weights short", "NAME: e\nTYPE: ATSP\nDIMENSION: 2\nEDGE_WEIGHT_TYPE: EXPLICIT\nEDGE_WEIGHT_FORMAT: FULL_MATRIX\nEDGE_WEIGHT_SECTION\n0 1 2\n", "e.tsp:8: EDGE_WEIGHT_SECTION: file ends early, at row 2 column 2"},
		{"no format", "NAME: e\nTYPE: ATSP\nDIMENSION: 2\nEDGE_WEIGHT_TYPE: EXPLICIT\nEDGE_WEIGHT_SECTION\n0 1 2 0\n", "EDGE_WEIGHT_SECTION: needs an EDGE_WEIGHT_FORMAT"},
		{"fixed edges", head + "FIXED_EDGES_SECTION\n1 2\n-1\n", "e.tsp:5: FIXED_EDGES_SECTION: is not supported"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := ReadTSPLIB(strings.NewReader(c.src), "e.tsp")
			require.Error(t, err)
			assert.Contains(t, err.Error(), c.want)
		})
	}
}

func TestIsTSPLIB(t *testing.T) {
	assert.True(t, IsTSPLIB("\ufeffNAME : x\n"))
	assert.True(t, IsTSPLIB("\n\nTYPE: ATSP\n"))
	assert.False(t, IsTSPLIB("3\n0 1 2\n"), "the benchmark matrix format")
	assert.False(t, IsTSPLIB("id,name,earliest\n"), "a sites file")
	assert.False(t, IsTSPLIB("name: something\n"), "keywords are upper case words followed by a colon")
}

// Load tells a TSPLIB file by content, as solve and bench do.
func TestLoadTSPLIB(t *testing.T) {
	d, err := Load(strings.NewReader(coordFile("EUC_2D", [2]float64{0, 0}, [2]float64{3, 4}, [2]float64{0, 4})), nil, Options{SitesName: "x.tsp"})
	require.NoError(t, err)
	assert.Equal(t, 3, d.Instance.N)
	assert.Equal(t, "TSPLIB", d.Travel)
	assert.Equal(t, int64(12), solver.Evaluate(d.Instance, []int{0, 1, 2}).Travel)
	_, err = Load(strings.NewReader(coordFile("EUC_2D", [2]float64{0, 0})), strings.NewReader("0"), Options{SitesName: "x.tsp"})
	require.Error(t, err)
	assert.Contains(t, err.Error(), "TSPLIB file, which holds its own travel")
}

// The shared TSPLIB files load with the dimension optimal.csv names, and
// with the travel of the first entries worked by hand from the files.
func TestTSPLIBShared(t *testing.T) {
	dir := tsplibDir(t)
	cases := []struct {
		file     string
		n        int
		from, to int
		want     int64
	}{
		{"pcb442.tsp", 442, 0, 1, 100},   // (200,400) to (200,500): section 2.1
		{"pr1002.tsp", 1002, 0, 1, 1254}, // (1150,4000) to (1050,2750): sqrt(100²+1250²) = 1253.99
		{"ft70.atsp", 70, 0, 1, 375},     // row 1 column 2 of the matrix
		{"ftv170.atsp", 171, 0, 1, 9},
		{"kro124p.atsp", 100, 0, 1, 1890},
		{"rbg443.atsp", 443, 0, 1, 11},
		{"vm1084.tsp", 1084, 0, 1, 1374}, // (4080,5236) to (4688,6468): sqrt(608²+1232²) = 1373.86
		{"fl1400.tsp", 1400, 0, 1, 1736}, // (2104.61,1968.35) to (2104.61,232.264): 1736.086
		{"d2103.tsp", 2103, 0, 1, 1101},  // (0,0) to (691.1,856.7): 1100.71
		{"pr2392.tsp", 2392, 0, 1, 804},  // (1639,2156) to (1875,2925): sqrt(236²+769²) = 804.4
	}
	for _, c := range cases {
		t.Run(c.file, func(t *testing.T) {
			fh, err := os.Open(filepath.Join(dir, c.file))
			require.NoError(t, err)
			defer fh.Close()
			d, err := Load(fh, nil, Options{SitesName: c.file})
			require.NoError(t, err)
			assert.Equal(t, c.n, d.Instance.N)
			assert.Equal(t, c.want, d.Instance.T(c.from, c.to))
		})
	}
}

// ft70 and kro124p (TSPLIB, Reinelt 1991, asymmetric): the engine reaches
// the published optimal tour lengths within an iteration budget, and the
// plan passes the independent evaluator.
func TestTSPLIBAsymmetricOptimal(t *testing.T) {
	dir := tsplibDir(t)
	for _, c := range []struct {
		file       string
		iterations int
		optimal    int64
	}{{"ft70.atsp", 5000, 38673}, {"kro124p.atsp", 20000, 36230}} {
		t.Run(c.file, func(t *testing.T) {
			fh, err := os.Open(filepath.Join(dir, c.file))
			require.NoError(t, err)
			defer fh.Close()
			d, err := Load(fh, nil, Options{SitesName: c.file})
			require.NoError(t, err)
			res, err := solver.Solve(context.Background(), d.Instance, solver.Settings{Iterations: c.iterations, Seed: 1, Workers: 1})
			require.NoError(t, err)
			require.NoError(t, solver.CheckRoute(d.Instance, res.Best.Route))
			sch := solver.Evaluate(d.Instance, res.Best.Route)
			require.True(t, sch.Feasible)
			assert.Equal(t, sch.Travel, res.Best.Cost)
			assert.Equal(t, c.optimal, sch.Travel, "published optimal tour length (TSPLIB, shared optimal.csv)")
		})
	}
}

// A short file that claims many nodes fails at its end without asking for
// the memory of the matrix it claims.
func TestTSPLIBShortFileLargeDimension(t *testing.T) {
	for _, form := range []string{"FULL_MATRIX", "UPPER_ROW"} {
		src := "NAME: big\nTYPE: ATSP\nDIMENSION: 20000\nEDGE_WEIGHT_TYPE: EXPLICIT\nEDGE_WEIGHT_FORMAT: " + form + "\nEDGE_WEIGHT_SECTION\n1 2 3\n"
		var before, after runtime.MemStats
		runtime.ReadMemStats(&before)
		_, err := ReadTSPLIB(strings.NewReader(src), "big.atsp")
		runtime.ReadMemStats(&after)
		require.Error(t, err)
		assert.Less(t, after.TotalAlloc-before.TotalAlloc, uint64(16<<20), "%s: bytes allocated (the claimed matrix is 3.2 GB)", form)
	}
}

func FuzzReadTSPLIB(f *testing.F) {
	f.Add(coordFile("EUC_2D", [2]float64{0, 0}, [2]float64{3, 4}, [2]float64{1, 1}))
	f.Add(coordFile("GEO", [2]float64{48.23, 10.53}, [2]float64{-33.52, 151.13}))
	f.Add("NAME: m\nTYPE: TSP\nDIMENSION: 3\nEDGE_WEIGHT_TYPE: EXPLICIT\nEDGE_WEIGHT_FORMAT: LOWER_DIAG_ROW\nEDGE_WEIGHT_SECTION\n0\n1 0\n2 3 0\nEOF\n")
	f.Add("NAME: a\nTYPE: ATSP\nDIMENSION: 2\nEDGE_WEIGHT_TYPE: EXPLICIT\nEDGE_WEIGHT_FORMAT: FULL_MATRIX\nEDGE_WEIGHT_SECTION\n0 1\n2 0\nEOF\n")
	f.Fuzz(func(t *testing.T, src string) {
		in, err := ReadTSPLIB(strings.NewReader(src), "f.tsp")
		if err != nil {
			var pe *ParseError
			require.ErrorAs(t, err, &pe)
			return
		}
		require.NoError(t, in.Validate())
		sch := solver.Evaluate(in, identity(in.N))
		require.True(t, sch.Feasible, "a TSPLIB day has no windows")
	})
}

func identity(n int) []int {
	r := make([]int, n)
	for i := range r {
		r[i] = i
	}
	return r
}
