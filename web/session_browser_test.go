package web_test

// Browser tests of keeping and sharing: nothing kept unless asked, per
// tab, links opened beside the kept session, capped and plainly refused
// when bad; and of loading one's own data after an example.

import (
	"bytes"
	"compress/flate"
	"context"
	"encoding/base64"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func makeLink(t *testing.T, ctx context.Context) string {
	t.Helper()
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(byTestID("share-link"))))
	waitFor(t, ctx, `!document.querySelector('[data-testid=share-url]').hidden`, 5*time.Second)
	return eval[string](t, ctx, `document.querySelector('[data-testid=share-url]').value`)
}

func TestSessionIsPerTabAndALinkOpensBesideIt(t *testing.T) {
	ctx, _ := tab(t)
	openPage(t, ctx, "")
	loadExample(t, ctx, "bakery/sites.csv")
	run(t, ctx, "0.3")
	link := makeLink(t, ctx)
	assert.Zero(t, eval[int](t, ctx, `sessionStorage.length + localStorage.length`), "nothing is kept until asked")

	// Keep a session of the warehouse in this tab.
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(byTestID("keep-session"))))
	loadExample(t, ctx, "warehouse/picks.txt")
	assert.NotEmpty(t, eval[string](t, ctx, `document.getElementById('keep-help').textContent`), "one sentence says what is kept where")
	// Typed but not read: it must come back as typed.
	setField(t, ctx, "paste-input", "typed, never read")
	time.Sleep(1200 * time.Millisecond) // the page saves typing after 0.8 s
	openPage(t, ctx, "")
	waitFor(t, ctx, `document.getElementById('summary').textContent.includes('picks.txt')`, 10*time.Second)
	assert.Equal(t, "typed, never read", eval[string](t, ctx, `document.querySelector('[data-testid=paste-input]').value`))

	// Another tab of the same browser does not see this tab's session.
	other, cancel := chromedp.NewContext(ctx)
	defer cancel()
	require.NoError(t, chromedp.Do(other, chromedp.Navigate(shared.srv.URL+"/")))
	waitFor(t, other, `document.body.dataset.engine === "ready"`, 20*time.Second)
	time.Sleep(300 * time.Millisecond)
	assert.Equal(t, "", eval[string](t, other, `document.querySelector('[data-testid=paste-input]').value`))
	assert.False(t, eval[bool](t, other, `document.querySelector('[data-testid=keep-session]').checked`))

	// The link opens beside the kept session, not over it.
	require.NoError(t, chromedp.Do(ctx, chromedp.Navigate(link)))
	waitFor(t, ctx, `document.body.dataset.engine === "ready" && document.getElementById('summary').textContent.includes('sites.csv')`, 20*time.Second)
	assert.Contains(t, eval[string](t, ctx, `document.querySelector('[data-testid=keep-note]').textContent`), "left as it was")
	// Edits after opening the link survive a reload.
	setField(t, ctx, "seed", "42")
	setField(t, ctx, "paste-input", "edited after the link")
	time.Sleep(1200 * time.Millisecond)
	require.NoError(t, chromedp.Do(ctx, chromedp.Navigate(link)))
	waitFor(t, ctx, `document.body.dataset.engine === "ready" && document.getElementById('summary').textContent.includes('sites.csv')`, 20*time.Second)
	assert.Equal(t, "42", eval[string](t, ctx, `document.querySelector('[data-testid=seed]').value`))
	assert.Equal(t, "edited after the link", eval[string](t, ctx, `document.querySelector('[data-testid=paste-input]').value`))
	// And the kept session is still there.
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(byTestID("open-kept"))))
	waitFor(t, ctx, `document.getElementById('summary').textContent.includes('picks.txt')`, 10*time.Second)
}

func deflateLink(t *testing.T, payload []byte) string {
	var b bytes.Buffer
	w, err := flate.NewWriter(&b, flate.BestCompression)
	require.NoError(t, err)
	_, err = w.Write(payload)
	require.NoError(t, err)
	require.NoError(t, w.Close())
	return shared.srv.URL + "/#data=" + base64.RawURLEncoding.EncodeToString(b.Bytes())
}

func TestShareLinksThatAreTooBigOrBadSayPlainlyWhy(t *testing.T) {
	ctx, _ := tab(t)
	openPage(t, ctx, "")
	cases := []struct {
		name, link, want string
	}{
		{"inflates past the cap", deflateLink(t, []byte(`{"text":"`+strings.Repeat(" ", 20<<20)+`"}`)), "more than 8 MB"},
		{"wrong types", deflateLink(t, []byte(`{"text":"x","name":{"a":1}}`)), ""},
		{"wrong option types", deflateLink(t, []byte(`{"text":"3\n0 1 1\n1 0 1\n1 1 0\n0 100\n0 100\n0 100\n","options":{"speed":"fast","done":"A","end":7},"settings":{"seed":{"x":1}}}`)), "Loaded 2 visits"},
		{"not JSON", deflateLink(t, []byte(`{"text":`)), "damaged"},
		{"no data", deflateLink(t, []byte(`[1,2]`)), "does not hold Visitline data"},
		{"cut short", shared.srv.URL + "/#data=AAAAx", "damaged"},
	}
	for _, c := range cases {
		require.NoError(t, chromedp.Do(ctx, chromedp.Navigate("about:blank")))
		require.NoError(t, chromedp.Do(ctx, chromedp.Navigate(c.link)))
		waitFor(t, ctx, `document.body.dataset.engine === "ready"`, 20*time.Second)
		if c.want != "" {
			// The worker's answer, however long a loaded machine takes.
			waitFor(t, ctx, `document.querySelector('[data-testid=status]').textContent.includes(`+jsString(c.want)+`)`, 20*time.Second)
		} else {
			// The link is read once the engine is ready: wait until the
			// status has moved past reading it.
			time.Sleep(300 * time.Millisecond)
			waitFor(t, ctx, `!document.querySelector('[data-testid=status]').textContent.startsWith("Reading shared data")`, 20*time.Second)
		}
		status := eval[string](t, ctx, `document.querySelector('[data-testid=status]').textContent`)
		if c.want != "" {
			assert.Contains(t, status, c.want, c.name)
		}
		for _, internal := range []string{"struct", "unmarshal", "SyntaxError", "TypeError"} {
			assert.NotContains(t, status, internal, c.name)
		}
	}
}

func TestSingleFileKeepsNothingOtherLocalFilesCanRead(t *testing.T) {
	ctx, _ := tab(t)
	dir := t.TempDir()
	p := filepath.Join(dir, "visitline.html")
	require.NoError(t, os.WriteFile(p, shared.files["visitline.html"], 0o644))
	spy := filepath.Join(dir, "other.html")
	require.NoError(t, os.WriteFile(spy, []byte("<!doctype html><title>other</title><p>another local file"), 0o644))
	require.NoError(t, chromedp.Do(ctx, chromedp.Navigate("file://"+p)))
	waitFor(t, ctx, `document.body.dataset.engine === "ready"`, 30*time.Second)
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(byTestID("keep-session"))))
	loadExample(t, ctx, "bakery/sites.csv")
	time.Sleep(300 * time.Millisecond)
	other, cancel := chromedp.NewContext(ctx)
	defer cancel()
	require.NoError(t, chromedp.Do(other, chromedp.Navigate("file://"+spy)))
	assert.Equal(t, "", eval[string](t, other, `(() => { let s = ""; for (const st of [localStorage, sessionStorage]) for (let i = 0; i < st.length; i++) s += st.getItem(st.key(i)); return s; })()`),
		"another local page reads nothing of the session")
}

// Defect 8: after the bakery example, one's own benchmark file was
// refused (the example's matrix stayed), its description stayed, and a
// CSV error's place selected the whole line.
func TestOwnDataAfterAnExample(t *testing.T) {
	ctx, _ := tab(t)
	openPage(t, ctx, "")
	loadExample(t, ctx, "bakery/sites.csv")
	assert.True(t, eval[bool](t, ctx, `document.querySelector('[data-testid=example-about]').checkVisibility()`))
	paste(t, ctx, string(shared.files["examples/warehouse/picks.txt"]))
	waitFor(t, ctx, `document.getElementById('summary').textContent.includes('pasted text')`, 10*time.Second)
	assert.True(t, eval[bool](t, ctx, `document.querySelector('[data-testid=errors]').hidden`))
	assert.Equal(t, "", eval[string](t, ctx, `document.querySelector('[data-testid=matrix-input]').value`))
	assert.Contains(t, eval[string](t, ctx, `document.querySelector('[data-testid=warnings]').textContent`), "matrix was cleared")
	assert.False(t, eval[bool](t, ctx, `document.querySelector('[data-testid=example-about]').checkVisibility()`))

	paste(t, ctx, "id,name,open,close,service,x,y\nD,Depot,07:00,18:00,0,0,0\nA,Alpha,08:00,9x,10,3,4\n")
	waitFor(t, ctx, `!document.querySelector('[data-testid=errors]').hidden`, 10*time.Second)
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(chromedp.CSS(`[data-testid=errors] button`))))
	sel := eval[string](t, ctx, `(() => { const t = document.querySelector('[data-testid=paste-input]'); return t.value.slice(t.selectionStart, t.selectionEnd); })()`)
	assert.Equal(t, "9x", sel, "the place selects the field, not the line")

	// Every problem is listed, each place selecting its own field.
	paste(t, ctx, "id,name,open,close,service,x,y\nD,Depot,07:00,18:00,0,0,0\nA,Alpha,08:00,9x,10,3,4\nB,Beta,08:00,09:00,ten,3,4\n")
	waitFor(t, ctx, `!document.querySelector('[data-testid=errors]').hidden && document.querySelectorAll('[data-testid=errors] li').length > 1`, 10*time.Second)
	n := eval[int](t, ctx, `document.querySelectorAll('[data-testid=errors] li').length`)
	require.NoError(t, chromedp.Do(ctx, chromedp.Click(chromedp.CSS(`[data-testid=errors] li:nth-child(2) button`))))
	sel = eval[string](t, ctx, `(() => { const t = document.querySelector('[data-testid=paste-input]'); return t.value.slice(t.selectionStart, t.selectionEnd); })()`)
	assert.Equal(t, "ten", sel, "the second of %d problems selects its own field", n)
}
