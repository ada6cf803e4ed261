package fmtlite

import (
	"go/ast"
	"go/importer"
	"go/parser"
	"go/token"
	"go/types"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// verbRe matches one verb of a format: flags, width, precision, verb.
var verbRe = regexp.MustCompile(`%([-+# 0]*)(\*|[0-9]+)?(?:\.(\*|[0-9]+))?([a-zA-Z%])`)

// supported says whether fmtlite writes verb (with its flags) for an
// operand of type t as fmt does: the combinations TestAsFmt compares.
func supported(flags, verb string, t types.Type) bool {
	if t == nil {
		return false
	}
	if b, ok := t.(*types.Basic); ok && b.Info()&types.IsUntyped != 0 {
		t = types.Default(t)
	}
	if strings.ContainsAny(flags, "# ") {
		return false
	}
	errType := types.Universe.Lookup("error").Type().Underlying().(*types.Interface)
	isStringer := func(t types.Type) bool {
		ms := types.NewMethodSet(t)
		for i := 0; i < ms.Len(); i++ {
			f := ms.At(i).Obj()
			if f.Name() == "String" {
				sig := f.Type().(*types.Signature)
				return sig.Params().Len() == 0 && sig.Results().Len() == 1 && types.Identical(sig.Results().At(0).Type(), types.Typ[types.String])
			}
		}
		return false
	}
	textual := types.Implements(t, errType) || isStringer(t)
	if verb == "w" {
		return types.Implements(t, errType)
	}
	if textual && strings.Contains("svq", verb) {
		return true
	}
	if _, named := t.(*types.Named); named {
		return false // a named type reaches fmtlite's switch as itself
	}
	if _, isAlias := t.(*types.Alias); isAlias {
		t = types.Unalias(t)
	}
	switch {
	case types.Identical(t, types.Typ[types.String]), types.Identical(t, types.NewSlice(types.Typ[types.Byte])):
		return strings.Contains("svq", verb)
	case types.Identical(t, types.Typ[types.Int]), types.Identical(t, types.Typ[types.Int64]):
		return strings.Contains("dvxX", verb)
	case types.Identical(t, types.Typ[types.Int32]):
		return strings.Contains("dxX", verb)
	case types.Identical(t, types.Typ[types.Uint8]), types.Identical(t, types.Typ[types.Uint64]):
		return strings.Contains("dxX", verb)
	case types.Identical(t, types.Typ[types.Float64]):
		return strings.Contains("gvf", verb)
	case types.Identical(t, types.Typ[types.Bool]):
		return verb == "v"
	case types.Identical(t, types.NewSlice(types.Typ[types.String])):
		return verb == "v" && flags == ""
	}
	return false
}

// Every call in the module that formats through fmtlite (its functions,
// and functions of our own that hand a format and operands on to it, such
// as the worker's fail) uses only what fmtlite writes as fmt does: each
// verb with an operand of a supported type, as many operands as verbs.
// A new call with another verb or type fails here, not on the page.
func TestCallersUseWhatIsSupported(t *testing.T) {
	root := filepath.Join("..", "..")
	var dirs []string
	err := filepath.WalkDir(root, func(path string, d os.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.IsDir() && (d.Name() == "node_modules" || strings.HasPrefix(d.Name(), ".")) && path != root {
			return filepath.SkipDir
		}
		if !d.IsDir() && strings.HasSuffix(path, ".go") && !strings.HasSuffix(path, "_test.go") {
			data, err := os.ReadFile(path)
			if err != nil {
				return err
			}
			if strings.Contains(string(data), `"visitline/solver/fmtlite"`) {
				dir := filepath.Dir(path)
				if len(dirs) == 0 || dirs[len(dirs)-1] != dir {
					dirs = append(dirs, dir)
				}
			}
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	if len(dirs) < 5 {
		t.Fatalf("only %d packages use fmtlite: %v", len(dirs), dirs)
	}
	fset := token.NewFileSet()
	imp := importer.ForCompiler(fset, "source", nil)
	calls := 0
	for _, dir := range dirs {
		pkgs, err := parser.ParseDir(fset, dir, func(fi os.FileInfo) bool { return !strings.HasSuffix(fi.Name(), "_test.go") }, 0)
		if err != nil {
			t.Fatal(err)
		}
		for _, p := range pkgs {
			var files []*ast.File
			for _, f := range p.Files {
				// The js build's files and the others' would clash: check
				// those that use fmtlite, with the rest of the package.
				if hasBuildTag(f, "js") {
					continue
				}
				files = append(files, f)
			}
			info := &types.Info{Types: map[ast.Expr]types.TypeAndValue{}}
			conf := types.Config{Importer: imp, Error: func(err error) {}}
			conf.Check(dir, fset, files, info)
			for _, f := range files {
				if !importsFmtlite(f) {
					continue
				}
				ast.Inspect(f, func(n ast.Node) bool {
					call, ok := n.(*ast.CallExpr)
					if !ok {
						return true
					}
					calls += checkCall(t, fset, info, call)
					return true
				})
			}
		}
	}
	if calls < 300 {
		t.Fatalf("only %d formatting calls checked", calls)
	}
}

func hasBuildTag(f *ast.File, tag string) bool {
	for _, cg := range f.Comments {
		for _, c := range cg.List {
			if strings.HasPrefix(c.Text, "//go:build") && strings.Contains(c.Text, tag) && !strings.Contains(c.Text, "!"+tag) {
				return true
			}
		}
	}
	return false
}

func importsFmtlite(f *ast.File) bool {
	for _, im := range f.Imports {
		if im.Path.Value == `"visitline/solver/fmtlite"` {
			return true
		}
	}
	return false
}

// checkCall checks one call if it formats: a fmtlite function, or a
// function whose last parameters are (format string, a ...any). It gives
// 1 for a call checked.
func checkCall(t *testing.T, fset *token.FileSet, info *types.Info, call *ast.CallExpr) int {
	t.Helper()
	where := fset.Position(call.Pos()).String()
	sig, ok := info.Types[call.Fun].Type.(*types.Signature)
	if !ok || !sig.Variadic() {
		return 0
	}
	isFmtlite := false
	if sel, ok := call.Fun.(*ast.SelectorExpr); ok {
		if id, ok := sel.X.(*ast.Ident); ok && id.Name == "fmtlite" {
			isFmtlite = true
		}
	}
	params := sig.Params()
	last := params.At(params.Len() - 1)
	if !types.Identical(last.Type(), types.NewSlice(types.Universe.Lookup("any").Type())) {
		return 0
	}
	fi := params.Len() - 2
	if fi < 0 || params.At(fi).Name() != "format" || !types.Identical(params.At(fi).Type(), types.Typ[types.String]) {
		if !isFmtlite {
			return 0
		}
		// Sprint, Fprint, Fprintln: each operand as %v.
		for _, a := range call.Args[params.Len()-1:] {
			if !supported("", "v", info.Types[a].Type) {
				t.Errorf("%s: operand of type %v, which fmtlite does not write with %%v", where, info.Types[a].Type)
			}
		}
		return 1
	}
	if call.Ellipsis.IsValid() {
		return 0 // a wrapper handing its own operands on: its callers are checked
	}
	tv := info.Types[call.Args[fi]]
	if tv.Value == nil {
		t.Errorf("%s: format is not a constant; fmtlite's callers are checked by their formats", where)
		return 0
	}
	format, _ := strconv.Unquote(tv.Value.ExactString())
	args := call.Args[fi+1:]
	ai := 0
	for _, m := range verbRe.FindAllStringSubmatch(format, -1) {
		flags, width, prec, verb := m[1], m[2], m[3], m[4]
		if verb == "%" {
			continue
		}
		if width == "*" {
			if ai >= len(args) || !types.Identical(info.Types[args[ai]].Type, types.Typ[types.Int]) {
				t.Errorf("%s: %s wants an int width", where, m[0])
			}
			ai++
		}
		if prec == "*" {
			t.Errorf("%s: %s: fmtlite takes no * precision", where, m[0])
		}
		if prec != "" && !strings.Contains("fgs", verb) {
			t.Errorf("%s: %s: precision only with f, g and s", where, m[0])
		}
		if ai >= len(args) {
			t.Errorf("%s: %s has no operand", where, m[0])
			continue
		}
		if ty := info.Types[args[ai]].Type; !supported(flags, verb, ty) {
			t.Errorf("%s: %s with an operand of type %v: not one fmtlite writes as fmt does", where, m[0], ty)
		}
		ai++
	}
	if ai != len(args) {
		t.Errorf("%s: %d operands for %d verbs", where, len(args), ai)
	}
	return 1
}
