package web_test

// The page's budgets on large days (issue "Hostile and careless input"):
// from the click on Start to the finished run, with a 3 s budget, at
// 3,000 and 5,000 sites, bound on. A measurement, not a test: it runs
// with VISITLINE_MEASURE_BUDGET=1 and logs the figures.

import (
	"fmt"
	"math/rand"
	"os"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
	"github.com/stretchr/testify/require"

	"visitline/solver/gen"
)

// spreadSitesDay is an invented sites file of n sites on x,y (0-100), windows
// 20,000 minutes wide opening within the first 20,000, services 1 to 5
// minutes, the depot open 60,000 minutes.
func spreadSitesDay(n int, seed int64) string {
	r := rand.New(rand.NewSource(seed))
	var b strings.Builder
	b.WriteString("id,name,x,y,earliest,latest,service\nD,Depot,50,50,0,60000,0\n")
	for i := 1; i < n; i++ {
		e := r.Intn(20001)
		fmt.Fprintf(&b, "S%d,Site %d,%.2f,%.2f,%d,%d,%d\n", i, i, r.Float64()*100, r.Float64()*100, e, e+20000, 1+r.Intn(5))
	}
	return b.String()
}

func tries() int {
	if os.Getenv("VISITLINE_MEASURE_TRIES") == "1" {
		return 1
	}
	return 3
}

func TestMeasurePageBudgetOnLargeDays(t *testing.T) {
	if os.Getenv("VISITLINE_MEASURE_BUDGET") == "" {
		t.Skip("a measurement: set VISITLINE_MEASURE_BUDGET=1")
	}
	g, err := gen.Generate(gen.Options{N: 3000, Tightness: gen.Tight, Seed: 1, ServiceMax: 10})
	require.NoError(t, err)
	var b strings.Builder
	require.NoError(t, gen.WriteBenchmark(&b, g.Instance, "gen --n 3000 --tightness tight --seed 1"))
	days := []struct{ name, text string }{
		{"gen --n 3000 --tightness tight --seed 1", b.String()},
		{"5,000 sites (x,y, windows 20,000 min wide)", spreadSitesDay(5000, 5)},
	}
	for _, d := range days {
		ctx, _ := tabFor(t, 8*time.Minute)
		openPage(t, ctx, "")
		eval[bool](t, ctx, `(() => { const e = document.querySelector('[data-testid=paste-input]'); e.value = `+jsString(d.text)+`;
		  e.dispatchEvent(new Event('input', {bubbles: true})); return true; })()`)
		require.NoError(t, chromedp.Do(ctx, chromedp.Click(byTestID("paste-load"))))
		waitFor(t, ctx, `document.body.dataset.loaded === "yes" && !document.querySelector('[data-testid=start]').disabled`, 6*time.Minute)
		for try := 0; try < tries(); try++ {
			// The page at rest: the last run's plan drawn.
			waitFor(t, ctx, `!document.body.dataset.drawing`, time.Minute)
			setField(t, ctx, "budget", "3")
			eval[bool](t, ctx, `delete document.body.dataset.run; VisitlineEngine.last.trace = []; window.__t0 = performance.now(); window.__e0 = performance.timeOrigin + window.__t0; new MutationObserver((_, o) => { if (document.body.dataset.run === "finished") { window.__t1 = performance.now(); o.disconnect(); } }).observe(document.body, {attributes: true}); true`)
			require.NoError(t, chromedp.Do(ctx, chromedp.Click(byTestID("start"))))
			waitFor(t, ctx, `document.body.dataset.run === "finished" && window.__t1 !== undefined`, 3*time.Minute)
			ms := eval[float64](t, ctx, `window.__t1 - window.__t0`)
			status := eval[string](t, ctx, `document.querySelector('[data-testid=status]').textContent`)
			trace := eval[string](t, ctx, `JSON.stringify(VisitlineEngine.last.trace.filter(e => e[2] !== "progress" || e[1] === "bound0").map(e => [Math.round(e[0] - window.__e0), e[1], e[2]]))`)
			t.Logf("%s, try %d: Start to finished %.2f s; %s; trace (ms from the click): %s", d.name, try+1, ms/1000, status, trace)
		}
	}
}
