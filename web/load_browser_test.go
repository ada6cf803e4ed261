package web_test

// Browser tests of reading a large paste: the page says how far the
// reading has got, offers Cancel, and after Cancel is as it was before,
// the pasted text kept exactly as typed.

import (
	"context"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"visitline/solver/gen"
)

var bigDay struct {
	once sync.Once
	text string
	err  error
}

// bigPaste is `visitline gen --n 3000 --tightness medium --seed 1`: 34 MB
// of text in the benchmark matrix format.
func bigPaste(t *testing.T) string {
	bigDay.once.Do(func() {
		g, err := gen.Generate(gen.Options{N: 3000, Tightness: gen.Medium, Seed: 1, ServiceMax: 10})
		if err != nil {
			bigDay.err = err
			return
		}
		var b strings.Builder
		bigDay.err = gen.WriteBenchmark(&b, g.Instance, "invented instance: visitline gen --n 3000 --tightness medium --seed 1")
		bigDay.text = b.String()
	})
	require.NoError(t, bigDay.err)
	return bigDay.text
}

// pasteBig puts the big day in the text box as a paste would (keeping a
// copy in window.__big to compare with), records every status line in
// window.__statuses, and presses "Read the text".
func pasteBig(t *testing.T, ctx context.Context) {
	t.Helper()
	eval[bool](t, ctx, `window.__big = `+jsString(bigPaste(t))+`; true`)
	eval[bool](t, ctx, `(() => { const e = document.querySelector('[data-testid=paste-input]'); e.value = window.__big;
	  e.dispatchEvent(new Event('input', {bubbles: true})); return true; })()`)
	eval[bool](t, ctx, `(() => { window.__statuses = []; const s = document.querySelector('[data-testid=status]');
	  new MutationObserver(() => window.__statuses.push(s.textContent)).observe(s, {childList: true, characterData: true, subtree: true}); return true; })()`)
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(byTestID("paste-load"))))
}

// percents are the reading shares the status line showed, in order.
func percents(t *testing.T, ctx context.Context) []int {
	return eval[[]int](t, ctx, `window.__statuses.map(s => /^Reading .*?(\d+) % of/.exec(s)).filter(m => m).map(m => Number(m[1]))`)
}

func TestPageBigPasteCancelKeepsTextAndTheDataBefore(t *testing.T) {
	ctx, _ := tabFor(t, 5*time.Minute)
	openPage(t, ctx, "")
	loadExample(t, ctx, "bakery/sites.csv")
	before := eval[string](t, ctx, `document.getElementById('summary').textContent`)
	eval[bool](t, ctx, `VisitlineEngine.last.trace = []; true`)
	pasteBig(t, ctx)
	// Progress shows while it reads, with a way to cancel.
	waitFor(t, ctx, `Number(document.body.dataset.reading) > 0.05`, 3*time.Minute)
	assert.True(t, eval[bool](t, ctx, `document.querySelector('[data-testid=cancel-load]').checkVisibility()`))
	assert.True(t, eval[bool](t, ctx, `document.querySelector('[data-testid=start]').disabled`), "no start on data half read")
	require.NotEmpty(t, percents(t, ctx))
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(byTestID("cancel-load"))))

	// Back as it was: the bakery loaded, Start ready, the text as typed.
	waitFor(t, ctx, `document.querySelector('[data-testid=status]').textContent.startsWith('Stopped reading')`, 10*time.Second)
	assert.True(t, eval[bool](t, ctx, `document.querySelector('[data-testid=paste-input]').value === window.__big`), "the pasted text is kept exactly")
	// The workers gave the reading up (they did not read on to the end).
	waitFor(t, ctx, `VisitlineEngine.last.trace.some(e => e[1] === "search0" && e[2] === "load_cancelled")`, 10*time.Second)
	assert.Equal(t, before, eval[string](t, ctx, `document.getElementById('summary').textContent`))
	assert.False(t, eval[bool](t, ctx, `document.querySelector('[data-testid=start]').disabled`))
	assert.False(t, eval[bool](t, ctx, `document.querySelector('[data-testid=cancel-load]').checkVisibility()`))
	// Nothing of the cancelled load comes in later.
	time.Sleep(2 * time.Second)
	assert.NotContains(t, eval[string](t, ctx, `document.querySelector('[data-testid=status]').textContent`), "2,999")
	assert.Equal(t, before, eval[string](t, ctx, `document.getElementById('summary').textContent`))

	// And the page works on: a search of the bakery's day.
	run(t, ctx, "0.5")
	rows := eval[int](t, ctx, `document.querySelectorAll('[data-testid=plan-table] tbody tr').length`)
	assert.Greater(t, rows, 2)
	assert.Less(t, rows, 50, "the plan is the bakery's, not the big day's")
	assert.True(t, eval[bool](t, ctx, `document.querySelector('[data-testid=paste-input]').value === window.__big`))
}

func TestPageBigPasteReadsWithProgress(t *testing.T) {
	ctx, _ := tabFor(t, 5*time.Minute)
	openPage(t, ctx, "")
	pasteBig(t, ctx)
	waitFor(t, ctx, `document.body.dataset.loaded === "yes"`, 4*time.Minute)
	status := eval[string](t, ctx, `document.querySelector('[data-testid=status]').textContent`)
	assert.Regexp(t, `Loaded 2.?999 visits`, status)
	ps := percents(t, ctx)
	require.GreaterOrEqual(t, len(ps), 3, "the share read was shown as it grew")
	for i := 1; i < len(ps); i++ {
		assert.GreaterOrEqual(t, ps[i], ps[i-1], "progress never goes back")
	}
	assert.Greater(t, ps[len(ps)-1], ps[0])
	assert.False(t, eval[bool](t, ctx, `document.querySelector('[data-testid=cancel-load]').checkVisibility()`))
	assert.True(t, eval[bool](t, ctx, `document.querySelector('[data-testid=paste-input]').value === window.__big`))
	assert.Contains(t, eval[string](t, ctx, `document.getElementById('summary').textContent`), "Visits2999")
	t.Logf("%d bytes read; the first search worker's WebAssembly memory after reading: %s MB", len(bigPaste(t)), eval[string](t, ctx, `document.body.dataset.loadedMb || "?"`))
}
