package web_test

// A team's day at the size of the research benchmark on the page: a
// Gehring and Homberger 200-customer instance (read by content from
// ../shared/benchmarks/vrptw, never copied) with 20 vehicles, the
// best-known count of c1_2_1 (best-known.csv of the collection). Figures,
// not assertions (the machine is shared): how long each new plan takes to
// draw (the lanes with the layout forced, and the table), the longest
// tasks on the page's main thread while the search runs, the page's
// answer to a script while it runs, and Stop from the click to the
// finished run, with its last plan drawn. Run with
// VISITLINE_MEASURE_FLEET=1 go test -count=1 -run TestMeasureFleetDrawing -v ./web

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/stretchr/testify/require"
)

func TestMeasureFleetDrawing(t *testing.T) {
	if os.Getenv("VISITLINE_MEASURE_FLEET") == "" {
		t.Skip("set VISITLINE_MEASURE_FLEET=1 to measure a 200-customer, 20-vehicle day on the page")
	}
	path := filepath.Join("..", "..", "shared", "benchmarks", "vrptw", "gh200", "c1_2_1.txt")
	if v := os.Getenv("VISITLINE_FLEET_FILE"); v != "" {
		path = v
	}
	text, err := os.ReadFile(path)
	if err != nil {
		t.Skipf("no benchmark file: %v", err)
	}
	ctx := longTab(t, 10*time.Minute)
	viewport(t, ctx, 1366, 768)
	benchOpen(t, ctx)
	setField(t, ctx, "paste-input", string(text))
	setField(t, ctx, "fleet-size", "20")
	eval[bool](t, ctx, `document.querySelector('[data-testid=paste-load]').click(); true`)
	waitFor(t, ctx, `!!document.querySelector('[data-testid=team-summary]')`, 30*time.Second)
	load, _ := os.ReadFile("/proc/loadavg")
	t.Logf("load average at start: %s", strings.TrimSpace(string(load)))

	// Every drawing: the lanes' time with the layout forced
	// (#timeline[data-draw-ms]) and the table's (#plan-table[data-draw-ms]),
	// taken by an observer; long tasks by the browser's own account.
	// Past fleet.mjs's TABLE_NOW rows the table is drawn a task after the
	// lanes, and times itself in data-rows-ms.
	eval[bool](t, ctx, `window.__draws = []; window.__tables = []; window.__long = [];
	  new MutationObserver(() => { const tl = document.getElementById('timeline');
	    if (tl.dataset.lanes) window.__draws.push([Number(tl.dataset.drawMs), Number(tl.dataset.count)]); })
	    .observe(document.getElementById('timeline'), {attributes: true, attributeFilter: ['data-draw-ms']});
	  new MutationObserver(() => window.__tables.push(Number(document.getElementById('plan-table').dataset.rowsMs)))
	    .observe(document.getElementById('plan-table'), {attributes: true, attributeFilter: ['data-rows-ms']});
	  new PerformanceObserver((l) => { for (const e of l.getEntries()) window.__long.push(e.duration); }).observe({type: 'longtask', buffered: false});
	  true`)
	var lanes, table, answers, longest stats
	var stops stats
	for try := 0; try < 5; try++ {
		setField(t, ctx, "budget", "20")
		eval[bool](t, ctx, `window.__draws = []; window.__tables = []; window.__long = []; delete document.body.dataset.run; document.querySelector('[data-testid=start]').click(); true`)
		waitFor(t, ctx, `document.body.dataset.run === "running"`, 20*time.Second)
		// While it runs: the page's answer to a trivial script, every 200 ms.
		deadline := time.Now().Add(6 * time.Second)
		for time.Now().Before(deadline) {
			t0 := time.Now()
			eval[bool](t, ctx, `true`)
			answers.add(float64(time.Since(t0).Microseconds()) / 1000)
			time.Sleep(200 * time.Millisecond)
		}
		stops.add(stopRun(t, ctx, 20000))
		d := eval[[][]float64](t, ctx, `window.__draws`)
		for _, x := range d {
			lanes.add(x[0])
		}
		for _, x := range eval[[]float64](t, ctx, `window.__tables`) {
			table.add(x)
		}
		for _, x := range eval[[]float64](t, ctx, `window.__long`) {
			longest.add(x)
		}
		require.NotEmpty(t, d, "plans were drawn")
		t.Logf("try %d: %d plans drawn, the last with %v visits", try+1, len(d), d[len(d)-1][1])
	}
	load, _ = os.ReadFile("/proc/loadavg")
	t.Logf("load average at the end: %s", strings.TrimSpace(string(load)))
	t.Logf("lanes drawn (layout forced): %v", lanes)
	t.Logf("table drawn, a task after the lanes (layout forced): %v", table)
	t.Logf("long tasks on the main thread (over 50 ms): %v", longest)
	t.Logf("page answers while searching: %v", answers)
	t.Logf("Stop to finished on the page (last plan drawn): %v", stops)
	t.Logf("compact lanes: %d, blocks: %d", eval[int](t, ctx, `document.querySelectorAll('[data-testid=timeline] .lane-head.compact').length`),
		eval[int](t, ctx, `document.querySelectorAll('[data-testid=timeline] .lane-head .block').length`))
	screenshot(t, ctx, "fleet-200x20-1366")
}
