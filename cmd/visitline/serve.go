package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"io/fs"
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

// serveConfig is what serve needs, read from its flags.
type serveConfig struct {
	site    fs.FS
	port    int
	example string
}

func runServe(args []string, stdout, stderr io.Writer) error {
	cfg, err := serveFlags(args, stderr)
	if err != nil || cfg.site == nil {
		return err
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	return serve(ctx, cfg, stdout, nil)
}

// serveFlags reads serve's flags and checks that the folder holds a built
// site; a nil site with no error means -h was asked for.
func serveFlags(args []string, stderr io.Writer) (serveConfig, error) {
	flags := flag.NewFlagSet("serve", flag.ContinueOnError)
	flags.SetOutput(stderr)
	port := flags.Int("port", 8080, "port on 127.0.0.1 (0: any free port)")
	site := flags.String("site", "dist", "the built site to serve (make site writes it into dist)")
	example := flags.String("open-example", "", "print an address that opens with this example loaded (a folder name in examples/, e.g. warehouse)")
	flags.Usage = func() {
		fmt.Fprintln(stderr, "usage: visitline serve [--port N] [--site DIR] [--open-example NAME]")
		flags.PrintDefaults()
	}
	if err := flags.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return serveConfig{}, nil
		}
		return serveConfig{}, usageError{err.Error()}
	}
	if flags.NArg() != 0 {
		return serveConfig{}, usageError{"serve takes no arguments besides flags"}
	}
	if *port < 0 || *port > 65535 {
		return serveConfig{}, usageError{fmt.Sprintf("--port %d: want 0 to 65535", *port)}
	}
	dir := os.DirFS(*site)
	if _, err := fs.Stat(dir, "index.html"); err != nil {
		return serveConfig{}, fmt.Errorf("%s holds no built site (no index.html): run make site first, or visitline site %s", *site, *site)
	}
	if *example != "" && !hasExample(dir, *example) {
		return serveConfig{}, usageError{fmt.Sprintf("--open-example %q: no such example; the site has %s", *example, strings.Join(exampleNames(dir), ", "))}
	}
	return serveConfig{site: dir, port: *port, example: *example}, nil
}

// serve listens on 127.0.0.1 and serves the site until ctx ends. ready,
// when set, receives the page address once the server listens.
func serve(ctx context.Context, cfg serveConfig, stdout io.Writer, ready func(string)) error {
	ln, err := net.Listen("tcp", fmt.Sprintf("127.0.0.1:%d", cfg.port))
	if err != nil {
		return fmt.Errorf("cannot listen on 127.0.0.1:%d: %w (try --port 0 for any free port)", cfg.port, err)
	}
	addr := "http://" + ln.Addr().String() + "/"
	if cfg.example != "" {
		addr += "?example=" + url.QueryEscape(cfg.example)
	}
	fmt.Fprintf(stdout, "Visitline is at %s\n(only this computer can reach it; press Ctrl+C to stop)\n", addr)
	if ready != nil {
		ready(addr)
	}
	srv := &http.Server{Handler: web.ServeFS(cfg.site), ReadHeaderTimeout: 10 * time.Second}
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

// exampleNames lists the scenario folders of a built site.
func exampleNames(site fs.FS) []string {
	entries, _ := fs.ReadDir(site, "examples")
	var out []string
	for _, e := range entries {
		if e.IsDir() {
			out = append(out, e.Name())
		}
	}
	sort.Strings(out)
	return out
}

// hasExample says whether name is a scenario folder or an example file
// (e.g. "bakery/sites.csv") of the site.
func hasExample(site fs.FS, name string) bool {
	if !fs.ValidPath(name) {
		return false
	}
	_, err := fs.Stat(site, "examples/"+name)
	return err == nil
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
