package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"net"
	"net/http"
	"net/url"
	"os"
	"os/signal"
	"path/filepath"
	"sort"
	"strings"
	"time"

	"visitline/web"
)

func runServe(args []string, stdout, stderr io.Writer) error {
	fs := flag.NewFlagSet("serve", flag.ContinueOnError)
	fs.SetOutput(stderr)
	port := fs.Int("port", 8080, "port on 127.0.0.1 (0: any free port)")
	site := fs.String("site", "", "serve this built site folder (from make site); empty: build the site in memory from the source tree, which needs the go tool")
	example := fs.String("open-example", "", "print an address that opens with this example loaded (a folder name in examples/, e.g. warehouse)")
	fs.Usage = func() {
		fmt.Fprintln(stderr, "usage: visitline serve [--port N] [--site DIR] [--open-example NAME]")
		fs.PrintDefaults()
	}
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return nil
		}
		return usageError{err.Error()}
	}
	if fs.NArg() != 0 {
		return usageError{"serve takes no arguments besides flags"}
	}
	if *port < 0 || *port > 65535 {
		return usageError{fmt.Sprintf("--port %d: want 0 to 65535", *port)}
	}
	var files map[string][]byte
	var err error
	if *site != "" {
		files, err = web.ReadDir(*site)
	} else {
		fmt.Fprintln(stderr, "building the site in memory (engine.wasm from ./wasm)…")
		files, err = buildInMemory()
	}
	if err != nil {
		return err
	}
	if *example != "" && !hasExample(files, *example) {
		return usageError{fmt.Sprintf("--open-example %q: no such example; the site has %s", *example, strings.Join(exampleNames(files), ", "))}
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	return serve(ctx, files, *port, *example, stdout, nil)
}

// serve listens on 127.0.0.1:port and serves files until ctx ends. ready,
// when set, receives the page address once the server listens.
func serve(ctx context.Context, files map[string][]byte, port int, example string, stdout io.Writer, ready func(string)) error {
	ln, err := net.Listen("tcp", fmt.Sprintf("127.0.0.1:%d", port))
	if err != nil {
		return fmt.Errorf("cannot listen on 127.0.0.1:%d: %w (try --port 0 for any free port)", port, err)
	}
	addr := "http://" + ln.Addr().String() + "/"
	if example != "" {
		addr += "?example=" + url.QueryEscape(example)
	}
	fmt.Fprintf(stdout, "Visitline is at %s\n(only this computer can reach it; press Ctrl+C to stop)\n", addr)
	if ready != nil {
		ready(addr)
	}
	srv := &http.Server{Handler: web.Handler(files), ReadHeaderTimeout: 10 * time.Second}
	errc := make(chan error, 1)
	go func() { errc <- srv.Serve(ln) }()
	select {
	case <-ctx.Done():
		sctx, cancel := context.WithTimeout(context.Background(), 2*time.Second)
		defer cancel()
		return srv.Shutdown(sctx)
	case err := <-errc:
		return err
	}
}

func exampleNames(files map[string][]byte) []string {
	seen := map[string]bool{}
	var out []string
	for name := range files {
		if rest, ok := strings.CutPrefix(name, "examples/"); ok {
			dir, _, _ := strings.Cut(rest, "/")
			if !seen[dir] {
				seen[dir] = true
				out = append(out, dir)
			}
		}
	}
	sort.Strings(out)
	return out
}

func hasExample(files map[string][]byte, name string) bool {
	if _, ok := files["examples/"+name]; ok {
		return true
	}
	for _, n := range exampleNames(files) {
		if n == name {
			return true
		}
	}
	return false
}

// buildInMemory compiles the engine from the source tree around the
// working directory and renders the site.
func buildInMemory() (map[string][]byte, error) {
	root, err := moduleRoot()
	if err != nil {
		return nil, err
	}
	ctx := context.Background()
	tmp, err := os.MkdirTemp("", "visitline-engine-")
	if err != nil {
		return nil, err
	}
	defer os.RemoveAll(tmp)
	out := filepath.Join(tmp, "engine.wasm")
	if err := web.CompileEngine(ctx, root, out); err != nil {
		return nil, fmt.Errorf("%w\n(or build the site with make site and serve it with --site dist)", err)
	}
	return siteFiles(ctx, out)
}

func siteFiles(ctx context.Context, enginePath string) (map[string][]byte, error) {
	eng, err := os.ReadFile(enginePath)
	if err != nil {
		return nil, fmt.Errorf("%s: cannot read the engine: %w", enginePath, unwrapPath(err))
	}
	wexec, err := web.WasmExec(ctx)
	if err != nil {
		return nil, fmt.Errorf("cannot find wasm_exec.js of the go tool: %w", err)
	}
	return web.Files(web.Options{Engine: eng, WasmExec: wexec})
}

// moduleRoot finds the folder of visitline's go.mod from the working
// directory up.
func moduleRoot() (string, error) {
	dir, err := os.Getwd()
	if err != nil {
		return "", err
	}
	for {
		b, err := os.ReadFile(filepath.Join(dir, "go.mod"))
		if err == nil && strings.HasPrefix(strings.TrimSpace(string(b)), "module visitline") {
			return dir, nil
		}
		parent := filepath.Dir(dir)
		if parent == dir {
			return "", errors.New("not inside the visitline source tree: build the site with make site and serve it with --site dist")
		}
		dir = parent
	}
}

func runSite(args []string, stdout, stderr io.Writer) error {
	fs := flag.NewFlagSet("site", flag.ContinueOnError)
	fs.SetOutput(stderr)
	engine := fs.String("engine", "", "engine.wasm built with GOOS=js GOARCH=wasm (empty: build it now with the go tool)")
	fs.Usage = func() {
		fmt.Fprintln(stderr, "usage: visitline site [--engine engine.wasm] DIR")
		fs.PrintDefaults()
	}
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return nil
		}
		return usageError{err.Error()}
	}
	if fs.NArg() != 1 {
		return usageError{"want the folder to write the site into (see visitline site -h)"}
	}
	var files map[string][]byte
	var err error
	if *engine != "" {
		files, err = siteFiles(context.Background(), *engine)
	} else {
		files, err = buildInMemory()
	}
	if err != nil {
		return err
	}
	dir := fs.Arg(0)
	for name, b := range files {
		p := filepath.Join(dir, filepath.FromSlash(name))
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			return err
		}
		if err := os.WriteFile(p, b, 0o644); err != nil {
			return err
		}
	}
	fmt.Fprintf(stdout, "wrote %d files to %s (open %s, or serve it with visitline serve --site %s)\n", len(files), dir,
		filepath.Join(dir, "visitline.html"), dir)
	return nil
}
