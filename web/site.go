// Package web renders the Visitline page and writes the static site: the
// page (index.html, rendered here with gomponents), its script, worker and
// style (embedded), the engine (engine.wasm with Go's wasm_exec.js), the
// examples, and visitline.html, the same page as one self-contained file.
//
// The site is static and talks to nothing: its Content-Security-Policy
// allows no connection beyond its own origin (the single file allows none
// at all). This package never runs the engine; it only ships it.
package web

import (
	"bytes"
	"context"
	"embed"
	"fmt"
	"io/fs"
	"maps"
	"mime"
	"net/http"
	"os"
	"os/exec"
	"path"
	"path/filepath"
	"strings"

	"visitline/examples"
)

//go:embed assets
var assets embed.FS

// Options say what goes into the site.
type Options struct {
	// Engine is engine.wasm, built with GOOS=js GOARCH=wasm from ./wasm.
	Engine []byte
	// WasmExec is wasm_exec.js from the lib/wasm folder of the Go that
	// built Engine (the two must match).
	WasmExec []byte
	// Examples holds the scenario folders; nil means the embedded
	// examples.FS.
	Examples fs.FS
}

// Example is one invented scenario the page offers, as examples.List
// names it: a sites file (or a benchmark matrix file), an optional travel
// matrix, and its route options, with the files' text.
type Example struct {
	// Key is the data file's path inside the examples, e.g.
	// "bakery/sites.csv"; the page's ?example= takes the folder name or
	// the key.
	Key        string            `json:"key"`
	Title      string            `json:"title"`
	About      string            `json:"about"`
	Text       string            `json:"text"`
	MatrixName string            `json:"matrix_name,omitempty"`
	Matrix     string            `json:"matrix,omitempty"`
	Options    map[string]string `json:"options,omitempty"`
}

// ListExamples reads the data of every demo of examples.List from fsys
// (nil: the embedded examples.FS). The list is the examples package's
// manifest; the scenarios' READMEs are for people and are not read.
func ListExamples(fsys fs.FS) ([]Example, error) {
	if fsys == nil {
		fsys = examples.FS
	}
	out := make([]Example, 0, len(examples.List))
	for _, e := range examples.List {
		text, err := fs.ReadFile(fsys, e.Key)
		if err != nil {
			return nil, fmt.Errorf("example %s: %w", e.Key, err)
		}
		ex := Example{Key: e.Key, Title: e.Title, About: e.About, Text: string(text), MatrixName: e.Matrix}
		if e.Matrix != "" {
			m, err := fs.ReadFile(fsys, path.Dir(e.Key)+"/"+e.Matrix)
			if err != nil {
				return nil, fmt.Errorf("example %s: matrix: %w", e.Key, err)
			}
			ex.Matrix = string(m)
		}
		if len(e.Options) > 0 {
			ex.Options = maps.Clone(e.Options)
		}
		out = append(out, ex)
	}
	return out, nil
}

func asset(name string) []byte {
	b, err := assets.ReadFile("assets/" + name)
	if err != nil {
		panic("web: missing embedded asset " + name) // a build defect, not user input
	}
	return b
}

// Files renders every file of the site, keyed by its path in the site.
func Files(opts Options) (map[string][]byte, error) {
	if len(opts.Engine) == 0 {
		return nil, fmt.Errorf("web: no engine.wasm given: build it with GOOS=js GOARCH=wasm go build -o engine.wasm ./wasm")
	}
	if len(opts.WasmExec) == 0 {
		return nil, fmt.Errorf("web: no wasm_exec.js given: copy it from $(go env GOROOT)/lib/wasm/")
	}
	ex, err := ListExamples(opts.Examples)
	if err != nil {
		return nil, fmt.Errorf("web: reading the examples: %w", err)
	}
	files := map[string][]byte{
		"app.js":           asset("app.js"),
		"engine-client.js": asset("engine-client.js"),
		"worker.js":        asset("worker.js"),
		"style.css":        asset("style.css"),
		"engine.wasm":      opts.Engine,
		"wasm_exec.js":     opts.WasmExec,
	}
	for _, m := range moduleFiles() {
		files[m] = asset(m)
	}
	for _, e := range ex {
		files["examples/"+e.Key] = []byte(e.Text)
		if e.MatrixName != "" {
			files["examples/"+path.Dir(e.Key)+"/"+e.MatrixName] = []byte(e.Matrix)
		}
	}
	var b bytes.Buffer
	if err := Page(PageData{Examples: ex}).Render(&b); err != nil {
		return nil, err
	}
	files["index.html"] = b.Bytes()
	single, err := SingleFile(opts, ex)
	if err != nil {
		return nil, err
	}
	files["visitline.html"] = single
	return files, nil
}

// Build writes the site into dir (created if missing).
func Build(dir string, opts Options) error {
	files, err := Files(opts)
	if err != nil {
		return err
	}
	for name, b := range files {
		p := filepath.Join(dir, filepath.FromSlash(name))
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			return err
		}
		if err := os.WriteFile(p, b, 0o644); err != nil {
			return err
		}
	}
	return nil
}

// ReadDir reads a built site back into memory.
func ReadDir(dir string) (map[string][]byte, error) {
	files := map[string][]byte{}
	err := filepath.WalkDir(dir, func(p string, d fs.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		rel, err := filepath.Rel(dir, p)
		if err != nil {
			return err
		}
		b, err := os.ReadFile(p)
		files[filepath.ToSlash(rel)] = b
		return err
	})
	if err != nil {
		return nil, err
	}
	if _, ok := files["index.html"]; !ok {
		return nil, fmt.Errorf("%s holds no index.html: build the site first (make site)", dir)
	}
	return files, nil
}

// Handler serves the site's files with its Content-Security-Policy.
func Handler(files map[string][]byte) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		if r.Method != http.MethodGet && r.Method != http.MethodHead {
			http.Error(w, "only GET and HEAD", http.StatusMethodNotAllowed)
			return
		}
		name := strings.TrimPrefix(path.Clean(r.URL.Path), "/")
		if name == "" {
			name = "index.html"
		}
		b, ok := files[name]
		if !ok {
			http.NotFound(w, r)
			return
		}
		ct := mime.TypeByExtension(path.Ext(name))
		switch path.Ext(name) {
		case ".wasm":
			ct = "application/wasm"
		case ".js", ".mjs":
			ct = "text/javascript; charset=utf-8"
		case ".txt", ".csv", ".tsv":
			ct = "text/plain; charset=utf-8"
		}
		if ct == "" {
			ct = "application/octet-stream"
		}
		h := w.Header()
		h.Set("Content-Type", ct)
		h.Set("Content-Security-Policy", ServedCSP+"; frame-ancestors 'none'")
		h.Set("X-Content-Type-Options", "nosniff")
		h.Set("Referrer-Policy", "no-referrer")
		h.Set("Cache-Control", "no-cache")
		w.Write(b)
	})
}

// CompileEngine builds engine.wasm from the module at moduleDir into out,
// with the go tool on PATH; tags are extra build tags.
func CompileEngine(ctx context.Context, moduleDir, out string, tags ...string) error {
	args := []string{"build", "-trimpath", "-ldflags=-s -w", "-o", out}
	if len(tags) > 0 {
		args = append(args, "-tags", strings.Join(tags, ","))
	}
	args = append(args, "./wasm")
	cmd := exec.CommandContext(ctx, "go", args...)
	cmd.Dir = moduleDir
	cmd.Env = append(os.Environ(), "GOOS=js", "GOARCH=wasm")
	if b, err := cmd.CombinedOutput(); err != nil {
		return fmt.Errorf("building engine.wasm: %v\n%s", err, b)
	}
	return nil
}

// WasmExec reads wasm_exec.js of the go tool on PATH.
func WasmExec(ctx context.Context) ([]byte, error) {
	b, err := exec.CommandContext(ctx, "go", "env", "GOROOT").Output()
	if err != nil {
		return nil, fmt.Errorf("go env GOROOT: %w", err)
	}
	root := strings.TrimSpace(string(b))
	js, err := os.ReadFile(filepath.Join(root, "lib", "wasm", "wasm_exec.js"))
	if err != nil {
		// Go before 1.24 kept it in misc/wasm.
		if old, err2 := os.ReadFile(filepath.Join(root, "misc", "wasm", "wasm_exec.js")); err2 == nil {
			return old, nil
		}
		return nil, err
	}
	return js, nil
}
