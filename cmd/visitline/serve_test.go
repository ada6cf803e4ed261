package main

import (
	"bytes"
	"context"
	"io"
	"net/http"
	"strings"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"visitline/web"
)

// builtSite writes a site with a stand-in engine file: serving does not
// look inside engine.wasm.
func builtSite(t *testing.T) string {
	dir := t.TempDir()
	require.NoError(t, web.Build(dir, web.Options{Engine: []byte("\x00asm\x01\x00\x00\x00"), WasmExec: []byte("// wasm_exec.js\n")}))
	return dir
}

func get(t *testing.T, url string) (*http.Response, string) {
	t.Helper()
	resp, err := http.Get(url)
	require.NoError(t, err)
	body, _ := io.ReadAll(resp.Body)
	resp.Body.Close()
	return resp, string(body)
}

func TestServePrintsAddressAndServesWithPolicy(t *testing.T) {
	// No go tool at run time: serve must not need one.
	t.Setenv("PATH", "")
	cfg, err := serveFlags([]string{"--site", builtSite(t), "--port", "0", "--open-example", "warehouse"}, io.Discard)
	require.NoError(t, err)
	ctx, cancel := context.WithCancel(context.Background())
	addrc := make(chan string, 1)
	var out bytes.Buffer
	done := make(chan error, 1)
	go func() { done <- serve(ctx, cfg, &out, func(a string) { addrc <- a }) }()
	var addr string
	select {
	case addr = <-addrc:
	case <-time.After(5 * time.Second):
		t.Fatal("serve did not start")
	}
	assert.True(t, strings.HasPrefix(addr, "http://127.0.0.1:"), addr)
	assert.True(t, strings.HasSuffix(addr, "/?example=warehouse"), addr)
	base := strings.TrimSuffix(addr, "?example=warehouse")

	resp, body := get(t, addr)
	assert.Equal(t, 200, resp.StatusCode)
	assert.Contains(t, resp.Header.Get("Content-Security-Policy"), "connect-src 'self'")
	assert.Equal(t, "nosniff", resp.Header.Get("X-Content-Type-Options"))
	assert.Contains(t, body, `data-testid="timeline"`)

	resp, _ = get(t, base+"engine.wasm")
	assert.Equal(t, 200, resp.StatusCode)
	assert.Equal(t, "application/wasm", resp.Header.Get("Content-Type"))
	resp, _ = get(t, base+"app.js")
	assert.Equal(t, "text/javascript; charset=utf-8", resp.Header.Get("Content-Type"))
	resp, body = get(t, base+"examples/bakery/sites.csv")
	assert.Equal(t, 200, resp.StatusCode)
	assert.Equal(t, "text/plain; charset=utf-8", resp.Header.Get("Content-Type"))
	assert.Contains(t, body, "id")
	resp, _ = get(t, base+"examples/")
	assert.Equal(t, 404, resp.StatusCode, "no folder listings")
	resp, _ = get(t, base+"nosuch.js")
	assert.Equal(t, 404, resp.StatusCode)
	req, _ := http.NewRequest(http.MethodPost, base, nil)
	r, err := http.DefaultClient.Do(req)
	require.NoError(t, err)
	r.Body.Close()
	assert.Equal(t, http.StatusMethodNotAllowed, r.StatusCode)

	cancel()
	require.NoError(t, <-done)
	assert.Contains(t, out.String(), addr)
}

func TestServeRejectsUnknownExample(t *testing.T) {
	var stdout, stderr bytes.Buffer
	code := run([]string{"serve", "--site", builtSite(t), "--open-example", "nosuch"}, &stdout, &stderr)
	assert.Equal(t, 2, code)
	assert.Contains(t, stderr.String(), `--open-example "nosuch": no such example; the site has art, bakery, boiler, warehouse`)
}

func TestServeRejectsFolderWithoutSite(t *testing.T) {
	var stdout, stderr bytes.Buffer
	dir := t.TempDir()
	code := run([]string{"serve", "--site", dir}, &stdout, &stderr)
	assert.Equal(t, 1, code)
	assert.Contains(t, stderr.String(), dir+" holds no built site (no index.html): run make site first")

	// The default is dist, relative to the working folder.
	t.Chdir(t.TempDir())
	stderr.Reset()
	code = run([]string{"serve"}, &stdout, &stderr)
	assert.Equal(t, 1, code)
	assert.Contains(t, stderr.String(), "visitline serve: dist holds no built site (no index.html): run make site first")
}
