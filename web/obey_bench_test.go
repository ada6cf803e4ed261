package web_test

// make bench-browser: how promptly the page obeys at 60 to 2,000 sites,
// the engine's ready time, the per-worker iteration rate against native by
// CPU time, and the time to the best-known value with 1 and 2 search
// workers against native solve with one. Figures, not assertions (the
// machine may be shared): run with VISITLINE_BENCH_BROWSER=1.

import (
	"context"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
	"github.com/stretchr/testify/require"

	"visitline/solver"
	"visitline/solver/app"
	"visitline/solver/benchdata"
)

// browserCPU is the CPU time used so far by the test's browser (every
// process whose command line names the test's profile), from /proc.
func browserCPU(t *testing.T) time.Duration {
	var ticks int64
	ents, err := os.ReadDir("/proc")
	require.NoError(t, err)
	for _, e := range ents {
		pid := e.Name()
		if pid[0] < '0' || pid[0] > '9' {
			continue
		}
		cmd, err := os.ReadFile(filepath.Join("/proc", pid, "cmdline"))
		if err != nil || !strings.Contains(string(cmd), shared.tmp) {
			continue
		}
		st, err := os.ReadFile(filepath.Join("/proc", pid, "stat"))
		if err != nil {
			continue
		}
		s := string(st)
		f := strings.Fields(s[strings.LastIndexByte(s, ')')+2:])
		u, _ := strconv.ParseInt(f[11], 10, 64)
		k, _ := strconv.ParseInt(f[12], 10, 64)
		ticks += u + k
	}
	return time.Duration(ticks) * 10 * time.Millisecond // USER_HZ 100
}

func selfCPU() time.Duration {
	var ru syscall.Rusage
	syscall.Getrusage(syscall.RUSAGE_SELF, &ru)
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

type stats struct{ v []float64 }

func (s *stats) add(x float64) { s.v = append(s.v, x) }
func (s stats) String() string {
	if len(s.v) == 0 {
		return "no tries"
	}
	v := append([]float64(nil), s.v...)
	sort.Float64s(v)
	bad := 0
	for _, x := range v {
		if x < 0 {
			bad++
		}
	}
	med := v[len(v)/2]
	if len(v)%2 == 0 {
		med = (v[len(v)/2-1] + v[len(v)/2]) / 2
	}
	out := fmt.Sprintf("median %.0f ms, worst %.0f ms (%d tries)", med, v[len(v)-1], len(v))
	if bad > 0 {
		out += fmt.Sprintf(", %d with no reply in 20 s", bad)
	}
	return out
}

// longTab is tab with a time limit for measurements (tab's is 90 s).
func longTab(t *testing.T, d time.Duration) context.Context {
	t.Helper()
	tab(t) // starts the shared browser
	ctx, cancel := chromedp.NewContext(shared.browser, chromedp.WithNewBrowserContext())
	t.Cleanup(cancel)
	ctx, cancel2 := context.WithTimeout(ctx, d)
	t.Cleanup(cancel2)
	require.NoError(t, chromedp.Do(ctx, chromedp.Navigate("about:blank")))
	return ctx
}

// benchOpen is openPage that waits for the document first (a poll begun
// while the previous page is still being replaced can lose its context).
func benchOpen(t *testing.T, ctx context.Context) {
	t.Helper()
	require.NoError(t, chromedp.Do(ctx, chromedp.Navigate(shared.srv.URL+"/")))
	require.NoError(t, chromedp.Do(ctx, chromedp.WaitReady("body")))
	time.Sleep(200 * time.Millisecond)
	waitFor(t, ctx, `document.body.dataset.engine === "ready"`, 60*time.Second)
}

func TestBenchBrowser(t *testing.T) {
	if os.Getenv("VISITLINE_BENCH_BROWSER") == "" {
		t.Skip("set VISITLINE_BENCH_BROWSER=1 (make bench-browser)")
	}
	tries := 10
	if n, err := strconv.Atoi(os.Getenv("VISITLINE_BENCH_TRIES")); err == nil && n > 0 {
		tries = n
	}
	ctx := longTab(t, 3*time.Hour)
	files := site(t)
	t.Logf("engine.wasm: %d bytes raw", len(files["engine.wasm"]))
	var ready stats
	for i := 0; i < 3; i++ {
		benchOpen(t, ctx)
		ready.add(eval[float64](t, ctx, `Number(document.body.dataset.readyMs)`))
	}
	t.Logf("engine ready after page start: %v", ready)

	sizes := []struct {
		name string
		text func() string
	}{
		{"60 sites (GendreauDumasExtended n60w160.001)", func() string { return publishedOrSkip(t, "GendreauDumasExtended/n60w160.001.txt") }},
		{"200 sites (OhlmannThomas n200w120.002)", func() string { return publishedOrSkip(t, "OhlmannThomas/n200w120.002.txt") }},
		{"1000 sites", func() string { return sitesDay(1000, 5) }},
		{"2000 sites", func() string { return sitesDay(2000, 6) }},
		// Only when VISITLINE_BENCH_SIZES names them (up to the sites
		// file's limit of 5,000).
		{"3000 sites", func() string { return sitesDay(3000, 7) }},
		{"5000 sites", func() string { return sitesDay(4999, 8) }}, // the depot and 4,999 stops
	}
	if os.Getenv("VISITLINE_BENCH_SIZES") == "" {
		sizes = sizes[:4]
	}
	if s := os.Getenv("VISITLINE_BENCH_SIZES"); s != "" {
		var keep []struct {
			name string
			text func() string
		}
		// Whole sizes of the comma-separated list: "2000" is not "200".
		want := map[string]bool{}
		for _, f := range strings.Split(s, ",") {
			want[strings.TrimSpace(f)] = true
		}
		for _, c := range sizes {
			if want[strings.Fields(c.name)[0]] {
				keep = append(keep, c)
			}
		}
		sizes = keep
	}
	for _, c := range sizes {
		benchOpen(t, ctx)
		loadPaste(t, ctx, c.text())
		var stop, mix, stopEng, mixEng, stopSearch, stopBound stats
		ended := 0
		for i := 0; i < tries; i++ {
			clickStart(t, ctx, "300", true)
			waitFor(t, ctx, `document.body.dataset.run === "finished" || document.body.dataset.run === "running" && Number(document.getElementById('iterations').textContent.replace(/[^0-9]/g,'')) > 0`, 240*time.Second)
			eval[bool](t, ctx, `(VisitlineEngine.last.trace = [], true)`)
			time.Sleep(time.Duration(500+100*i) * time.Millisecond)
			if eval[string](t, ctx, `document.body.dataset.run`) != "running" {
				ended++ // proven optimal before it could be steered
				continue
			}
			mix.add(mixAck(t, ctx, []string{"0", "1"}[i%2], 20000))
			time.Sleep(300 * time.Millisecond)
			stop.add(stopRun(t, ctx, 20000))
			tr := clientTrace(t, ctx)
			mixEng.add(latency(tr, "search0", "mix", "mix"))
			ls, lb := latency(tr, "search0", "stop", "finished"), latency(tr, "bound0", "stop", "finished")
			stopSearch.add(ls)
			stopBound.add(lb)
			stopEng.add(math.Max(ls, lb))
		}
		if ended > 0 {
			t.Logf("%s: %d of %d runs ended with a proof before they could be steered", c.name, ended, tries)
		}
		t.Logf("%s, bound on, 1 search worker: Stop to finished on the page %v; by the workers' stamps %v (search worker %v; bound worker %v)", c.name, stop, stopEng, stopSearch, stopBound)
		t.Logf("%s, bound on, 1 search worker: weight change to acknowledgement on the page %v; by the worker's stamp %v", c.name, mix, mixEng)
	}

	// Memory at 2,000 sites with 4 search workers and the bound worker.
	if os.Getenv("VISITLINE_BENCH_MEMORY") != "0" {
		benchOpen(t, ctx)
		_, _, fin := engineRun(t, ctx, map[string]any{"type": "load", "text": sitesDay(2000, 6)},
			map[string]any{"type": "start", "budget": 20, "seed": 1}, 4)
		total := 0.0
		var per []string
		for _, w := range fin["workers"].([]any) {
			mb := w.(map[string]any)["memory_mb"].(float64)
			total += mb
			per = append(per, fmt.Sprintf("%.0f", mb))
		}
		bmb := 0.0
		if b, ok := fin["bound"].(map[string]any); ok {
			bmb, _ = b["memory_mb"].(float64)
		}
		total += bmb
		heap := eval[float64](t, ctx, `performance.memory ? performance.memory.usedJSHeapSize / 1048576 : 0`)
		t.Logf("2000 sites, 4 search workers + bound, 20 s: WebAssembly memory per search worker %s MB, bound worker %.0f MB; page heap %.0f MB; in all %.0f MB",
			strings.Join(per, ", "), bmb, heap, total+heap)
	}

	// Per-worker rate against native, by CPU time: the same instance, seed
	// and iteration budget; the browser's CPU is that of all its
	// processes (the page draws nothing here: a client of its own). Each
	// side runs N and 2N iterations: the whole 2N run (loading, building
	// the model and construction included), and the difference of the
	// two, which is iterations N+1..2N alone (as visitline-lab wasm-speed
	// measures): the search's own rate, which the fixed costs hide once
	// the iterations are fast.
	rateCases := []struct {
		name  string
		text  string
		iters int
	}{
		{"OhlmannThomas n200w120.001", publishedOrSkip(t, "OhlmannThomas/n200w120.001.txt"), 1000},
		{"GendreauDumasExtended n100w100.001", publishedOrSkip(t, "GendreauDumasExtended/n100w100.001.txt"), 1000},
		{"generated 1000 sites", sitesDay(1000, 5), 300},
	}
	for _, rc := range rateCases {
		var native, browser, wall [2]time.Duration
		for h, iters := range []int{rc.iters, 2 * rc.iters} {
			d, err := app.Load(strings.NewReader(rc.text), nil, rc.name, "", app.LoadOptions{})
			require.NoError(t, err)
			c0 := selfCPU()
			_, err = app.Run(context.Background(), d, app.RunOptions{Iterations: iters, Seed: 1, NoBound: true}, app.Hooks{})
			require.NoError(t, err)
			native[h] = selfCPU() - c0
			benchOpen(t, ctx)
			b0 := browserCPU(t)
			w0 := time.Now()
			_, _, fin := engineRun(t, ctx, map[string]any{"type": "load", "text": rc.text},
				map[string]any{"type": "start", "budget": 0, "iterations": iters, "seed": 1, "no_bound": true}, 1)
			wall[h] = time.Since(w0)
			browser[h] = browserCPU(t) - b0
			require.Equal(t, "iterations", fin["why"])
		}
		dn, db := native[1]-native[0], browser[1]-browser[0]
		t.Logf("%s, %d iterations: native %.2f s CPU, browser %.2f s CPU (%.2f s wall, loading included): wasm rate %.2f of native; iterations %d..%d alone: native %.2f s CPU, browser %.2f s CPU: wasm rate %.2f of native",
			rc.name, 2*rc.iters, native[1].Seconds(), browser[1].Seconds(), wall[1].Seconds(), native[1].Seconds()/browser[1].Seconds(),
			rc.iters+1, 2*rc.iters, dn.Seconds(), db.Seconds(), dn.Seconds()/db.Seconds())
	}

	if b := os.Getenv("VISITLINE_BENCH_BEST"); b == "" || b == "0" { // make bench-browser BENCH_BEST=0 passes "0"
		t.Log("time to best-known skipped (set VISITLINE_BENCH_BEST=1)")
		return
	}
	best := bestKnown(t)
	for _, f := range []string{"OhlmannThomas/n150w120.002.txt", "OhlmannThomas/n150w140.001.txt", "OhlmannThomas/n150w160.003.txt",
		"OhlmannThomas/n200w120.005.txt", "OhlmannThomas/n200w140.005.txt", "GendreauDumasExtended/n100w120.004.txt"} {
		text := publishedOrSkip(t, f)
		target := best[f]
		d, err := app.Load(strings.NewReader(text), nil, f, "", app.LoadOptions{})
		require.NoError(t, err)
		limit := 30.0
		if v, err := strconv.ParseFloat(os.Getenv("VISITLINE_BENCH_BEST_LIMIT"), 64); err == nil && v > 0 {
			limit = v
		}
		nctx, cancel := context.WithCancel(context.Background())
		reached := -1.0
		t0 := time.Now()
		app.Run(nctx, d, app.RunOptions{Budget: limit, Seed: 1, Workers: 1}, app.Hooks{OnImprove: func(p solver.Plan) {
			if p.Feasible && d.Instance.InputUnits(p.Cost) <= target+1e-9 && reached < 0 {
				reached = time.Since(t0).Seconds()
				cancel()
			}
		}})
		cancel()
		line := fmt.Sprintf("%s (best known %g): native --workers 1 %s", f, target, secondsOr(reached, limit))
		for _, cores := range []int{1, 2} {
			benchOpen(t, ctx)
			got := eval[float64](t, ctx, fmt.Sprintf(`new Promise(res => {
			  let t0 = 0, done = false;
			  const c = VisitlineEngine.create({ cores: %d, onMessage: m => {
			    if (m.type === "loaded") { t0 = performance.now(); c.send({type: "start", budget: %v, seed: 1}); }
			    else if (m.type === "plan" && m.plan.feasible && m.plan.cost <= %v + 1e-9 && !done) { done = true; res((performance.now() - t0) / 1000); c.terminate(); }
			    else if (m.type === "finished" && !done) { done = true; res(-1); c.terminate(); }
			  }});
			  c.send({type: "load", text: %q});
			})`, cores, limit, target, text))
			line += fmt.Sprintf("; page %d worker(s) %s", cores, secondsOr(got, limit))
		}
		t.Log(line)
	}
}

func secondsOr(s, limit float64) string {
	if s < 0 {
		return fmt.Sprintf("not within %g s", limit)
	}
	return fmt.Sprintf("%.1f s", s)
}

// bestKnown reads the published best-known values (best-known.csv of the
// shared collection; its README names the sources).
func bestKnown(t *testing.T) map[string]float64 {
	ks, err := benchdata.Load(filepath.Join(benchDir, "best-known.csv"))
	require.NoError(t, err)
	out := map[string]float64{}
	for _, k := range ks {
		out[k.Key()] = k.Best
	}
	return out
}
