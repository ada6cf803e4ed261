package web

import (
	"crypto/sha256"
	"encoding/base64"
	"html"
	"regexp"
	"strings"
	"testing"
	"testing/fstest"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"visitline/examples"
	"visitline/solver"
)

func testFiles(t *testing.T) map[string][]byte {
	files, err := Files(Options{Engine: []byte("\x00asm\x01\x00\x00\x00"), WasmExec: []byte("// wasm_exec.js\n")})
	require.NoError(t, err)
	return files
}

func TestFilesHoldTheSite(t *testing.T) {
	files := testFiles(t)
	for _, name := range []string{"index.html", "app.js", "engine-client.js", "fmt.mjs", "timeline.mjs", "worker.js", "style.css", "engine.wasm", "wasm_exec.js", "visitline.html", "examples/warehouse/picks.txt"} {
		assert.Contains(t, files, name)
	}
}

func TestPageCarriesTestIDs(t *testing.T) {
	page := string(testFiles(t)["index.html"])
	ids := []string{"file-input", "paste-input", "paste-load", "example-load", "budget", "seed", "start", "stop", "status",
		"best-cost", "progress", "timeline", "plan-table", "export-csv", "export-json", "errors"}
	for _, op := range solver.Operators {
		ids = append(ids, "mix-"+op)
	}
	for _, id := range ids {
		assert.Contains(t, page, `data-testid="`+id+`"`)
	}
}

func TestPageShowsCautions(t *testing.T) {
	page := string(testFiles(t)["index.html"])
	assert.Contains(t, page, "Travel times are estimates")
	assert.Contains(t, page, "working-time and rest rules")
	assert.Contains(t, page, "professional judgement prevail")
}

// TestSingleFilePolicyHashesItsInlineParts recomputes the hashes of the
// inline script and style and finds them in the page's policy: a browser
// runs only what they match (CSP Level 3, hash-source).
func TestSingleFilePolicyHashesItsInlineParts(t *testing.T) {
	page := string(testFiles(t)["visitline.html"])
	m := regexp.MustCompile(`http-equiv="Content-Security-Policy" content="([^"]+)"`).FindStringSubmatch(page)
	require.Len(t, m, 2)
	csp := html.UnescapeString(m[1])
	assert.Contains(t, csp, "connect-src 'none'")
	assert.Contains(t, csp, "worker-src blob:")
	assert.NotContains(t, csp, "unsafe-inline")
	hash := func(s string) string {
		sum := sha256.Sum256([]byte(s))
		return base64.StdEncoding.EncodeToString(sum[:])
	}
	script := regexp.MustCompile(`(?s)<script>(.*?)</script>`).FindStringSubmatch(page)
	require.Len(t, script, 2)
	assert.Contains(t, csp, "'sha256-"+hash(script[1])+"'")
	style := regexp.MustCompile(`(?s)<style>(.*?)</style>`).FindStringSubmatch(page)
	require.Len(t, style, 2)
	assert.Contains(t, csp, "'sha256-"+hash(style[1])+"'")
	// Nothing in the file points elsewhere.
	assert.NotRegexp(t, `(src|href)="https?:`, page)
	assert.True(t, strings.Contains(page, `id="engine-base64"`))
}

// TestExamplesListed: the page's examples are examples.List with the text
// of their files, in the manifest's order.
func TestExamplesListed(t *testing.T) {
	ex, err := ListExamples(nil)
	require.NoError(t, err)
	require.Len(t, ex, len(examples.List))
	for i, e := range ex {
		assert.Equal(t, examples.List[i].Key, e.Key)
		assert.NotEmpty(t, e.Text, e.Key)
	}
	byKey := map[string]Example{}
	for _, e := range ex {
		byKey[e.Key] = e
	}
	require.Contains(t, byKey, "warehouse/picks.txt")
	assert.Equal(t, "Warehouse picks", byKey["warehouse/picks.txt"].Title)
	assert.True(t, strings.HasPrefix(byKey["warehouse/picks.txt"].Text, "# "), "the file's own text")
	art := byKey["art/sites.csv"]
	assert.Equal(t, "travel.tsv", art.MatrixName)
	assert.True(t, strings.HasPrefix(art.Matrix, "minutes\tSOUTH"), "the matrix file's text")
	assert.Equal(t, map[string]string{"end": "SOUTH"}, art.Options)
	assert.Equal(t, "travel.csv", byKey["bakery/sites.csv"].MatrixName)
	assert.Equal(t, "", byKey["boiler/sites.csv"].MatrixName)
	assert.Nil(t, byKey["boiler/sites.csv"].Options)
}

func TestExamplesFromAnotherFolder(t *testing.T) {
	_, err := ListExamples(fstest.MapFS{"bakery/sites.csv": {Data: []byte("id\n")}})
	assert.ErrorContains(t, err, "example art/sites.csv")
}

func TestBundleRewritesModules(t *testing.T) {
	fsys := fstest.MapFS{
		"app.js": {Data: []byte("import { twice } from \"./b.mjs\";\nimport { one } from \"./a.mjs\";\nconsole.log(twice(one));\n")},
		"a.mjs":  {Data: []byte("export const one = 1;\nconst hidden = 2;\n")},
		"b.mjs":  {Data: []byte("import { one } from \"./a.mjs\";\nexport function twice(x) {\n  return 2 * x + one - one;\n}\n")},
	}
	out, err := Bundle(fsys, "app.js")
	require.NoError(t, err)
	assert.NotContains(t, out, "import ")
	assert.NotContains(t, out, "export ")
	ia, ib := strings.Index(out, "const __mod_a_mjs ="), strings.Index(out, "const __mod_b_mjs =")
	require.True(t, ia >= 0 && ib >= 0, out)
	assert.Less(t, ia, ib, "a module comes before the modules that import it")
	assert.Contains(t, out, "return { one };", "only exports leave a module")
	assert.Equal(t, 1, strings.Count(out, "const __mod_a_mjs ="), "a module shared by two importers is bundled once")

	for name, src := range map[string]string{
		"renamed":  "import { one as uno } from \"./a.mjs\";\n",
		"default":  "export default 3;\n",
		"star":     "import * as a from \"./a.mjs\";\n",
		"missing":  "import { x } from \"./nope.mjs\";\n",
		"circular": "import { y } from \"./c.mjs\";\n",
	} {
		f := fstest.MapFS{"app.js": {Data: []byte(src)}, "a.mjs": {Data: []byte("export const one = 1;\n")},
			"c.mjs": {Data: []byte("import { z } from \"./d.mjs\";\nexport const y = 1;\n")}, "d.mjs": {Data: []byte("import { y } from \"./c.mjs\";\nexport const z = 1;\n")}}
		_, err := Bundle(f, "app.js")
		assert.Error(t, err, name)
	}
}

func TestBundleOfThePageHoldsEveryModule(t *testing.T) {
	page := string(testFiles(t)["visitline.html"])
	for _, m := range moduleFiles() {
		assert.Contains(t, page, "// ---- "+m, "the single file carries %s", m)
	}
	assert.Contains(t, page, "globalThis.VisitlineEngine", "and the engine client before them")
}
