package web

import (
	"fmt"
	"io/fs"
	"path"
	"regexp"
	"sort"
	"strings"
)

// The page's script is a set of ES modules (app.js and the *.mjs files it
// imports). The served site loads them as modules; visitline.html, opened
// from disk, cannot (browsers load no module from file://), so Bundle
// turns them into one classic script at build time: each module becomes a
// function whose result holds its exports, in dependency order, and each
// import becomes a destructuring of that result. The modules keep to a
// small subset of the syntax so that this stays a rewrite of lines, not a
// parser: `import { a, b } from "./x.mjs";` on one line at the top, and
// `export` only before `function`, `async function`, `const`, `let` or
// `class` at the start of a line.

var (
	importLine = regexp.MustCompile(`^import\s*\{([^}]*)\}\s*from\s*"\./([A-Za-z0-9_-]+\.mjs)";\s*$`)
	exportLine = regexp.MustCompile(`^export\s+(async\s+function\*?|function\*?|const|let|class)\s+([A-Za-z_$][A-Za-z0-9_$]*)`)
	anyImport  = regexp.MustCompile(`^\s*import[\s{*"']`)
	anyExport  = regexp.MustCompile(`^\s*export\b`)
)

type jsModule struct {
	name    string
	body    []string
	imports []string
	exports []string
}

func parseModule(name, src string) (*jsModule, error) {
	m := &jsModule{name: name}
	for i, line := range strings.Split(src, "\n") {
		if sm := importLine.FindStringSubmatch(line); sm != nil {
			names := strings.Split(sm[1], ",")
			var clean []string
			for _, n := range names {
				n = strings.TrimSpace(n)
				if n == "" {
					continue
				}
				if strings.Contains(n, " ") {
					return nil, fmt.Errorf("web: %s:%d: renamed imports are not bundled (write the name as exported)", name, i+1)
				}
				clean = append(clean, n)
			}
			m.imports = append(m.imports, sm[2])
			m.body = append(m.body, "const { "+strings.Join(clean, ", ")+" } = "+moduleVar(sm[2])+";")
			continue
		}
		if anyImport.MatchString(line) {
			return nil, fmt.Errorf("web: %s:%d: only `import { ... } from \"./x.mjs\";` on one line is bundled", name, i+1)
		}
		if sm := exportLine.FindStringSubmatch(line); sm != nil {
			m.exports = append(m.exports, sm[2])
			m.body = append(m.body, strings.TrimPrefix(strings.TrimLeft(line, " "), "export "))
			continue
		}
		if anyExport.MatchString(line) {
			return nil, fmt.Errorf("web: %s:%d: only `export function|const|let|class NAME` is bundled", name, i+1)
		}
		m.body = append(m.body, line)
	}
	return m, nil
}

func moduleVar(file string) string {
	return "__mod_" + strings.NewReplacer(".", "_", "-", "_").Replace(file)
}

// Bundle reads entry and the modules it imports (recursively) from fsys
// and returns one classic script.
func Bundle(fsys fs.FS, entry string) (string, error) {
	mods := map[string]*jsModule{}
	var order []string
	state := map[string]int{} // 1: visiting, 2: done
	var visit func(name string, from string) error
	visit = func(name, from string) error {
		switch state[name] {
		case 1:
			return fmt.Errorf("web: modules import each other in a circle through %s (from %s)", name, from)
		case 2:
			return nil
		}
		state[name] = 1
		b, err := fs.ReadFile(fsys, name)
		if err != nil {
			return fmt.Errorf("web: %s imports %s: %w", from, name, err)
		}
		m, err := parseModule(name, string(b))
		if err != nil {
			return err
		}
		mods[name] = m
		for _, dep := range m.imports {
			if err := visit(path.Join(path.Dir(name), dep), name); err != nil {
				return err
			}
		}
		state[name] = 2
		order = append(order, name)
		return nil
	}
	if err := visit(entry, "the page"); err != nil {
		return "", err
	}
	var b strings.Builder
	b.WriteString("// Visitline page script, bundled from its ES modules at build time (web/bundle.go).\n\"use strict\";\n(() => {\n")
	for _, name := range order {
		m := mods[name]
		if name == entry {
			fmt.Fprintf(&b, "// ---- %s\n(() => {\n%s\n})();\n", path.Base(name), strings.Join(m.body, "\n"))
			continue
		}
		ex := append([]string(nil), m.exports...)
		sort.Strings(ex)
		fmt.Fprintf(&b, "// ---- %s\nconst %s = (() => {\n%s\nreturn { %s };\n})();\n", path.Base(name), moduleVar(path.Base(name)), strings.Join(m.body, "\n"), strings.Join(ex, ", "))
	}
	b.WriteString("})();\n")
	return b.String(), nil
}

// moduleFiles lists the page's modules in the embedded assets.
func moduleFiles() []string {
	ents, _ := fs.ReadDir(assets, "assets")
	var out []string
	for _, e := range ents {
		if strings.HasSuffix(e.Name(), ".mjs") {
			out = append(out, e.Name())
		}
	}
	return out
}
