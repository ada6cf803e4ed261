package web_test

// Browser tests of the page's obedience: Stop and a weight change land
// promptly at every size, with the bound on and off; a run whose budget
// runs out says so. They reuse browser_test.go's helpers (tab, openPage,
// waitFor, eval) and drive the page through its test ids only.

import (
	"context"
	"fmt"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// benchDir is the shared published benchmark collection (see its README
// for the sources), relative to this package's directory.
const benchDir = "../../shared/benchmarks/tsptw"

// publishedOrSkip reads a published instance; outside CI a missing
// collection skips the test, under CI it fails it.
func publishedOrSkip(t *testing.T, rel string) string {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(benchDir, rel))
	if err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("published instance %s is missing: %v", rel, err)
		}
		t.Skipf("published instance %s not found (%v)", rel, err)
	}
	return string(b)
}

// sitesDay is an invented day of n sites on an x,y plane (travel from
// coordinates), with windows loose enough to be feasible: a large day that
// is cheap to paste.
func sitesDay(n int, seed uint64) string {
	rng := rand.New(rand.NewPCG(seed, 3))
	var b strings.Builder
	b.WriteString("id,name,x,y,open,close,service\n")
	b.WriteString("D,Depot,50,50,0,100000,0\n")
	for i := 1; i <= n; i++ {
		open := rng.IntN(4000)
		fmt.Fprintf(&b, "S%d,Stop %d,%.2f,%.2f,%d,%d,%d\n", i, i, rng.Float64()*100, rng.Float64()*100, open, open+2000+rng.IntN(4000), 1+rng.IntN(5))
	}
	return b.String()
}

// loadPaste pastes text into the page and waits until Start is enabled.
func loadPaste(t *testing.T, ctx context.Context, text string) {
	t.Helper()
	require.NoError(t, chromedp.Do(ctx,
		chromedp.SetValue(byTestID("paste-input"), text),
		chromedp.Click(byTestID("paste-load"))))
	waitFor(t, ctx, `!document.querySelector('[data-testid=start]').disabled`, 60*time.Second)
}

// startRun sets the budget and the bound checkbox and starts; it waits
// until the search reports iterations.
func startRun(t *testing.T, ctx context.Context, budget string, withBound bool) {
	t.Helper()
	clickStart(t, ctx, budget, withBound)
	waitFor(t, ctx, `document.body.dataset.run === "running" && Number(document.getElementById('iterations').textContent.replace(/[^0-9]/g,'')) > 0`, 60*time.Second)
}

// clickStart sets the budget and the bound checkbox and clicks Start.
func clickStart(t *testing.T, ctx context.Context, budget string, withBound bool) {
	t.Helper()
	eval[bool](t, ctx, fmt.Sprintf(`(() => { const b = document.querySelector('[data-testid=with-bound]'); if (b.checked !== %v) b.click(); return true })()`, withBound))
	require.NoError(t, chromedp.Do(ctx,
		chromedp.SetValue(byTestID("budget"), budget),
		chromedp.Click(byTestID("start"))))
}

// mixAck changes the random weight and returns the milliseconds until the
// page shows the engine's acknowledgement (or -1 after limit ms).
func mixAck(t *testing.T, ctx context.Context, value string, limit float64) float64 {
	t.Helper()
	return eval[float64](t, ctx, fmt.Sprintf(`new Promise(res => {
	  const st = document.querySelector('[data-testid=status]');
	  const n0 = Number(st.dataset.mixAcks || "0");
	  const el = document.querySelector('[data-testid=mix-random]');
	  const t0 = performance.now();
	  el.value = %q; el.dispatchEvent(new Event('input', {bubbles:true})); el.dispatchEvent(new Event('change', {bubbles:true}));
	  const iv = setInterval(() => {
	    const dt = performance.now() - t0;
	    if (Number(st.dataset.mixAcks || "0") > n0) { clearInterval(iv); res(dt); }
	    else if (dt > %v) { clearInterval(iv); res(-1); }
	  }, 2);
	})`, value, limit))
}

// stopRun clicks Stop and returns the milliseconds until the page says the
// run finished (or -1 after limit ms).
func stopRun(t *testing.T, ctx context.Context, limit float64) float64 {
	t.Helper()
	return eval[float64](t, ctx, fmt.Sprintf(`new Promise(res => {
	  const t0 = performance.now();
	  document.querySelector('[data-testid=stop]').click();
	  const iv = setInterval(() => {
	    const dt = performance.now() - t0;
	    if (document.body.dataset.run === "finished") { clearInterval(iv); res(dt); }
	    else if (dt > %v) { clearInterval(iv); res(-1); }
	  }, 2);
	})`, limit))
}

func TestPageObeysStopAndMix(t *testing.T) {
	cases := []struct {
		name  string
		text  func(t *testing.T) string
		bound bool
	}{
		{"published n200 with bound", func(t *testing.T) string { return publishedOrSkip(t, "OhlmannThomas/n200w120.002.txt") }, true},
		{"published n200 without bound", func(t *testing.T) string { return publishedOrSkip(t, "OhlmannThomas/n200w120.002.txt") }, false},
		{"generated 1000 sites with bound", func(*testing.T) string { return sitesDay(1000, 5) }, true},
		{"generated 1000 sites without bound", func(*testing.T) string { return sitesDay(1000, 5) }, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			text := c.text(t)
			ctx, _ := tab(t)
			openPage(t, ctx, "")
			loadPaste(t, ctx, text)
			startRun(t, ctx, "60", c.bound)
			// Let the bound side get going before steering.
			time.Sleep(700 * time.Millisecond)
			ack := mixAck(t, ctx, "0", 2000)
			t.Logf("weight change acknowledged after %.0f ms", ack)
			require.True(t, ack >= 0 && ack <= 2000, "the weight change was not acknowledged within 2 s (%.0f ms)", ack)
			took := stopRun(t, ctx, 2000)
			t.Logf("stop took %.0f ms", took)
			require.True(t, took >= 0 && took <= 2000, "the run did not finish within 2 s of Stop (%.0f ms)", took)
			assert.Equal(t, "stopped", eval[string](t, ctx, `document.querySelector('[data-testid=status]').dataset.why`))
		})
	}
}

// TestPageBudgetEndsAsBudget checks that a run that used its whole budget
// says so, with the bound on (whose timeout once raced the engine's and was
// reported as a stop).
func TestPageBudgetEndsAsBudget(t *testing.T) {
	text := publishedOrSkip(t, "OhlmannThomas/n150w120.001.txt")
	ctx, _ := tab(t)
	openPage(t, ctx, "")
	loadPaste(t, ctx, text)
	clickStart(t, ctx, "1", true)
	waitFor(t, ctx, `document.body.dataset.run === "finished"`, 20*time.Second)
	assert.Equal(t, "budget", eval[string](t, ctx, `document.querySelector('[data-testid=status]').dataset.why`))
}
