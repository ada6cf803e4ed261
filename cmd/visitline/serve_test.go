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

func TestServePrintsAddressAndServesWithPolicy(t *testing.T) {
	files, err := web.ReadDir(builtSite(t))
	require.NoError(t, err)
	ctx, cancel := context.WithCancel(context.Background())
	addrc := make(chan string, 1)
	var out bytes.Buffer
	done := make(chan error, 1)
	go func() { done <- serve(ctx, files, 0, "warehouse", &out, func(a string) { addrc <- a }) }()
	var addr string
	select {
	case addr = <-addrc:
	case <-time.After(5 * time.Second):
		t.Fatal("serve did not start")
	}
	assert.True(t, strings.HasPrefix(addr, "http://127.0.0.1:"), addr)
	assert.True(t, strings.HasSuffix(addr, "/?example=warehouse"), addr)
	resp, err := http.Get(addr)
	require.NoError(t, err)
	body, _ := io.ReadAll(resp.Body)
	resp.Body.Close()
	assert.Equal(t, 200, resp.StatusCode)
	assert.Contains(t, resp.Header.Get("Content-Security-Policy"), "connect-src 'self'")
	assert.Contains(t, string(body), `data-testid="timeline"`)
	resp, err = http.Get(strings.TrimSuffix(addr, "?example=warehouse") + "engine.wasm")
	require.NoError(t, err)
	resp.Body.Close()
	assert.Equal(t, "application/wasm", resp.Header.Get("Content-Type"))
	cancel()
	require.NoError(t, <-done)
	assert.Contains(t, out.String(), addr)
}

func TestServeRejectsUnknownExample(t *testing.T) {
	var stdout, stderr bytes.Buffer
	code := run([]string{"serve", "--site", builtSite(t), "--open-example", "nosuch"}, &stdout, &stderr)
	assert.Equal(t, 2, code)
	assert.Contains(t, stderr.String(), `--open-example "nosuch": no such example; the site has `)
	assert.Contains(t, stderr.String(), "warehouse")
}

func TestServeRejectsFolderWithoutSite(t *testing.T) {
	var stdout, stderr bytes.Buffer
	code := run([]string{"serve", "--site", t.TempDir()}, &stdout, &stderr)
	assert.Equal(t, 1, code)
	assert.Contains(t, stderr.String(), "holds no index.html: build the site first (make site)")
}
