package web

import (
	"io/fs"
	"net/http"
	"path"
	"strings"
)

// ServeFS serves a built site (the folder make site writes, or any fs.FS
// holding the same files) with http.FileServerFS, adding the site's
// Content-Security-Policy and the headers that keep the page to itself. It
// needs neither the go tool nor the source tree: only the built files.
// Folders without an index.html are not listed.
func ServeFS(site fs.FS) http.Handler {
	files := http.FileServerFS(site)
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		if r.Method != http.MethodGet && r.Method != http.MethodHead {
			http.Error(w, "only GET and HEAD", http.StatusMethodNotAllowed)
			return
		}
		name := strings.TrimPrefix(path.Clean("/"+r.URL.Path), "/")
		if name != "" {
			if fi, err := fs.Stat(site, name); err == nil && fi.IsDir() {
				if _, err := fs.Stat(site, name+"/index.html"); err != nil {
					http.NotFound(w, r)
					return
				}
			}
		}
		h := w.Header()
		switch path.Ext(name) {
		case ".wasm":
			h.Set("Content-Type", "application/wasm")
		case ".js":
			h.Set("Content-Type", "text/javascript; charset=utf-8")
		case ".txt", ".csv", ".tsv":
			h.Set("Content-Type", "text/plain; charset=utf-8")
		}
		h.Set("Content-Security-Policy", ServedCSP+"; frame-ancestors 'none'")
		h.Set("X-Content-Type-Options", "nosniff")
		h.Set("Referrer-Policy", "no-referrer")
		h.Set("Cache-Control", "no-cache")
		files.ServeHTTP(w, r)
	})
}
