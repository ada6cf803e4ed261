package lab

import (
	"bytes"
	"encoding/json"
	"encoding/xml"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func TestBudgetForParsesFamilies(t *testing.T) {
	b := budgetFor{}
	require.NoError(t, b.Set("OhlmannThomas=30s"))
	require.NoError(t, b.Set("Dumas=2s, Langevin=1m"))
	assert.Equal(t, 30*time.Second, b.of("OhlmannThomas", time.Second))
	assert.Equal(t, time.Minute, b.of("Langevin", time.Second))
	assert.Equal(t, time.Second, b.of("SolomonPesant", time.Second), "a family without its own budget gets the default")
	assert.Equal(t, "Dumas=2s,Langevin=1m0s,OhlmannThomas=30s", b.String())
	for _, bad := range []string{"Dumas", "=3s", "Dumas=soon", "Dumas=-1s"} {
		assert.Error(t, budgetFor{}.Set(bad), bad)
	}
}

func TestAtBestKnownTolerance(t *testing.T) {
	// Tolerance of shared/benchmarks/tsptw/README.md: 0.01 absolute, or
	// 0.05 % relative for the real-valued families.
	assert.True(t, atBestKnown(100, 100, 1))
	assert.True(t, atBestKnown(99, 100, 1), "below the best-known counts as at it")
	assert.False(t, atBestKnown(101, 100, 1))
	assert.True(t, atBestKnown(1000.4, 1000, 100), "0.04 % with decimals")
	assert.False(t, atBestKnown(1000.4, 1000, 1), "integer family: exact")
}

func TestTimeToValueFindsFirstArrival(t *testing.T) {
	trace := [][2]float64{{0.1, 120}, {0.5, 105}, {2.0, 100}, {3.0, 99}}
	assert.Equal(t, 2.0, timeToValue(trace, 100, 1))
	assert.Equal(t, -1.0, timeToValue(trace, 90, 1))
}

func TestMedian(t *testing.T) {
	assert.Equal(t, -1.0, median(nil))
	assert.Equal(t, 2.0, median([]float64{3, 1, 2}))
	assert.Equal(t, 2.5, median([]float64{4, 1, 2, 3}))
}

func TestChartIsWellFormedSVGWithOneLinePerFamily(t *testing.T) {
	rows := []benchRow{
		{Family: "A", HasBest: true, AtBest: true, SecondsToBestKnown: 0.01, Budget: 10},
		{Family: "A", HasBest: true, AtBest: false, SecondsToBestKnown: -1, Budget: 10},
		{Family: "B<&>", HasBest: true, AtBest: true, SecondsToBestKnown: 3, Budget: 30},
		{Family: "C", HasBest: false},
	}
	svg := drawChart(rows)
	dec := xml.NewDecoder(strings.NewReader(svg))
	lines := 0
	for {
		tok, err := dec.Token()
		if err != nil {
			assert.Equal(t, "EOF", err.Error(), "the SVG parses as XML to its end")
			break
		}
		if se, ok := tok.(xml.StartElement); ok && se.Name.Local == "polyline" {
			lines++
		}
	}
	assert.Equal(t, 2, lines, "families without a best-known value draw no line")
	assert.Contains(t, svg, "A 1/2")
	assert.Contains(t, svg, "B&lt;&amp;&gt; 1/1")
	assert.Contains(t, svg, ">10 s<", "the time axis reaches the longest budget")
}

func TestChartDataSharesAndOrder(t *testing.T) {
	rows := []benchRow{
		{Family: "A", HasBest: true, AtBest: true, SecondsToBestKnown: 2},
		{Family: "A", HasBest: true, AtBest: true, SecondsToBestKnown: 1},
		{Family: "A", HasBest: true},
	}
	s := chartData(rows)
	require.Len(t, s, 1)
	assert.Equal(t, []float64{1, 2}, s[0].times)
	assert.Equal(t, 3, s[0].total)
}

func TestSummariseCountsAndMedians(t *testing.T) {
	rows := []benchRow{
		{Family: "A", HasBest: true, Feasible: true, AtBest: true, SecondsToBestKnown: 1, CPUToBestKnown: 0.5, Seconds: 10, CPUSeconds: 5, Iterations: 100, Budget: 10},
		{Family: "A", HasBest: true, Feasible: true, GapPct: 2, SecondsToBestKnown: -1, CPUToBestKnown: -1, Seconds: 10, CPUSeconds: 5, Iterations: 300, Budget: 10},
	}
	s := summarise(rows)
	require.Len(t, s, 1)
	assert.Equal(t, 1, s[0].AtBest)
	assert.Equal(t, 2, s[0].Feasible)
	assert.InDelta(t, 1.0, s[0].MeanGapPct, 1e-9)
	assert.InDelta(t, 2.0, s[0].MaxGapPct, 1e-9)
	assert.Equal(t, 1.0, s[0].MedianToBestKnown)
	assert.Equal(t, 0.5, s[0].MedianCPUToBestKnown)
	assert.InDelta(t, 0.5, s[0].CPUShare, 1e-9)
	assert.InDelta(t, 20.0, s[0].MeanIterRate, 1e-9)
	assert.Equal(t, "10s", s[0].Budget)
}

func TestBenchFromJSONRewritesReadmeAndChart(t *testing.T) {
	dir := t.TempDir()
	rep := benchReport{Budget: "10s", Workers: 1, Machine: "test machine", Command: "visitline-lab bench x",
		Runs: []benchRow{{Family: "A", Instance: "a1", HasBest: true, Feasible: true, Checked: true, AtBest: true, SecondsToBestKnown: 0.2, CPUToBestKnown: 0.1, Seconds: 10, CPUSeconds: 10, Budget: 10}}}
	js := filepath.Join(dir, "r.json")
	require.NoError(t, rep.write(js))
	readme := filepath.Join(dir, "README.md")
	require.NoError(t, os.WriteFile(readme, []byte("# T\n<!-- bench:start -->\nold\n<!-- bench:end -->\ntail\n"), 0o644))
	chart := filepath.Join(dir, "c.svg")
	var out bytes.Buffer
	require.NoError(t, benchFromJSON(js, readme, chart, &out))
	data, err := os.ReadFile(readme)
	require.NoError(t, err)
	assert.NotContains(t, string(data), "old")
	assert.Contains(t, string(data), "| A | 10s | 1 | 1 | 1 of 1 (100%) |")
	assert.True(t, strings.HasSuffix(string(data), "<!-- bench:end -->\ntail\n"))
	svg, err := os.ReadFile(chart)
	require.NoError(t, err)
	assert.Contains(t, string(svg), "<svg")

	require.NoError(t, os.WriteFile(js, []byte("{"), 0o644))
	assert.ErrorContains(t, benchFromJSON(js, "", "", &out), "not a bench result file")
}

func TestSpeedupFromJSONComparesMedians(t *testing.T) {
	dir := t.TempDir()
	mk := func(workers int, walls, cpus []float64) string {
		rep := benchReport{Workers: workers, Command: "c", Machine: "m"}
		for i := range walls {
			rep.Runs = append(rep.Runs, benchRow{Family: "F", Instance: "i", HasBest: true, Workers: workers,
				SecondsToBestKnown: walls[i], CPUToBestKnown: cpus[i], Seconds: 30, CPUSeconds: 30})
		}
		p := filepath.Join(dir, "w"+string(rune('0'+workers))+".json")
		require.NoError(t, rep.write(p))
		return p
	}
	one := mk(1, []float64{4, 2, 6}, []float64{4, 2, 6})
	two := mk(2, []float64{2, 1, -1}, []float64{4, 2, -1})
	var out bytes.Buffer
	require.NoError(t, speedupFromJSON(one, two, "", &out))
	// Base median 4; with two workers 2, 1 and a miss counted at its 30 s
	// budget: median 2; speed-up 2. CPU: base 4, two workers median 4 of
	// CPU over 2 workers = 2: 2.
	assert.Contains(t, out.String(), "| F/i | 3 | 2 | 4.00 / 2.00 | 2.00 | 4.00 / 4.00 | 2.00 | 0 / 1 |")
	assert.Contains(t, out.String(), "Over the 1 that take one worker more than 1 s of CPU: 2.00 wall-clock, 2.00 CPU-based")
}

func TestSlopeOfPowerLaw(t *testing.T) {
	var rows []scaleRow
	for _, n := range []int{100, 300, 1000, 2000} {
		rows = append(rows, scaleRow{N: n, SecondsPerIteration: 1e-6 * math.Pow(float64(n), 1.5)})
	}
	k, m := slope(rows)
	assert.Equal(t, 4, m)
	assert.InDelta(t, 1.5, k, 1e-9)
	_, m = slope(rows[:1])
	assert.Equal(t, 1, m)
}

func TestParseCaseAndSizes(t *testing.T) {
	n, lvl, err := parseCase("1000:tight")
	require.NoError(t, err)
	assert.Equal(t, 1000, n)
	assert.Equal(t, "tight", lvl.String())
	for _, bad := range []string{"1000", "x:tight", "1:tight", "10:snug"} {
		_, _, err := parseCase(bad)
		assert.Error(t, err, bad)
	}
	ns, err := parseSizes("100, 300")
	require.NoError(t, err)
	assert.Equal(t, []int{100, 300}, ns)
	_, err = parseSizes("100,lots")
	assert.ErrorContains(t, err, `"lots"`)
}

func TestScaleCaseChecksItsPlan(t *testing.T) {
	row, err := scaleCase(40, 3, 2, 0, 200, 1, false)
	require.NoError(t, err)
	assert.True(t, row.Checked)
	assert.True(t, row.Feasible)
	assert.Equal(t, 200, row.Iterations)
	assert.GreaterOrEqual(t, row.FirstFeasibleSeconds, 0.0)
	assert.LessOrEqual(t, row.FinalCost, row.FirstFeasibleCost)
	assert.Greater(t, row.PeakSysMB, 0.0)
	table := scaleTable(scaleReport{Command: "c", Machine: "m", Rows: []scaleRow{row}})
	assert.Contains(t, table, "| 40 | tight |")
}

func TestBenchRejectsBadWorkersAndBudgets(t *testing.T) {
	var out, errb bytes.Buffer
	assert.Equal(t, 2, run([]string{"bench", "--workers", "0", "x"}, &out, &errb))
	assert.Contains(t, errb.String(), "--workers 0")
	errb.Reset()
	assert.Equal(t, 2, run([]string{"bench", "--budget-for", "Dumas", "x"}, &out, &errb))
	assert.Contains(t, errb.String(), "want FAMILY=DURATION")
}

func TestBenchReportJSONRoundTrip(t *testing.T) {
	rep := benchReport{Budget: "1s", Workers: 2, Runs: []benchRow{{Family: "A", Trace: [][2]float64{{0.1, 5}}}}}
	rep.Families = summarise(rep.Runs)
	data, err := json.Marshal(rep)
	require.NoError(t, err, "no NaN may reach JSON")
	var back benchReport
	require.NoError(t, json.Unmarshal(data, &back))
	assert.Equal(t, rep.Runs[0].Trace, back.Runs[0].Trace)
}

func TestScaleChartDrawsOneLinePerTightness(t *testing.T) {
	rows := []scaleRow{
		{N: 100, Tightness: "tight", SecondsPerIteration: 0.001},
		{N: 1000, Tightness: "tight", SecondsPerIteration: 0.01},
		{N: 100, Tightness: "none", SecondsPerIteration: 0.002},
		{N: 1000, Tightness: "none", SecondsPerIteration: 0},
	}
	svg := drawScaleChart(rows)
	dec := xml.NewDecoder(strings.NewReader(svg))
	lines := 0
	for {
		tok, err := dec.Token()
		if err != nil {
			assert.Equal(t, "EOF", err.Error(), "the SVG parses as XML to its end")
			break
		}
		if se, ok := tok.(xml.StartElement); ok && se.Name.Local == "polyline" {
			lines++
		}
	}
	assert.Equal(t, 2, lines)
	assert.Contains(t, svg, "tight (slope 1.00)")
	assert.Contains(t, drawScaleChart(nil), "no rows with a time per iteration")
}

func TestReplaceBetweenOnlyUsesMarkerLines(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "R.md")
	src := "Use `<!-- bench:start -->` and `<!-- bench:end -->` in prose.\n\n<!-- bench:start -->\nold\n<!-- bench:end -->\nafter\n"
	require.NoError(t, os.WriteFile(p, []byte(src), 0o644))
	require.NoError(t, replaceBetween(p, "<!-- bench:start -->", "<!-- bench:end -->", "new table"))
	data, err := os.ReadFile(p)
	require.NoError(t, err)
	assert.Equal(t, "Use `<!-- bench:start -->` and `<!-- bench:end -->` in prose.\n\n<!-- bench:start -->\nnew table\n<!-- bench:end -->\nafter\n", string(data))
	assert.ErrorContains(t, replaceBetween(p, "<!-- x:start -->", "<!-- x:end -->", "y"), "no line <!-- x:start -->")
}

// A missing instance path is named as missing, not reported as a fault of
// the best-known file read in the wrong format for it.
func TestBenchNamesMissingInstanceBeforeReadingBounds(t *testing.T) {
	dir := t.TempDir()
	bounds := filepath.Join(dir, "best-known.csv")
	require.NoError(t, os.WriteFile(bounds, []byte("instance,customers,vehicles,distance,found\nday1,12,3,100.5,2026-01-01\n"), 0o644))
	missing := filepath.Join(dir, "nothing-here.txt")
	var out, errOut bytes.Buffer
	code := Main([]string{"bench", "--budget", "1s", "--bounds", bounds, missing}, &out, &errOut)
	assert.Equal(t, 1, code)
	assert.Contains(t, errOut.String(), "nothing-here.txt: no such file or directory")
	assert.NotContains(t, errOut.String(), "not a number")
}
