package main

import (
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
)

// keptOut are standard packages the web worker's build must not link: each
// costs the page's download (engine.wasm) more than the worker needs of
// it, and was replaced by code of our own. The list grows as packages are
// dropped, so that none comes back unnoticed.
var keptOut = []string{
	"math/big",
	"net",
	"net/http",
	"os/exec",
	"flag",
	"log",
	"encoding/json",
	"encoding/csv",
	"fmt",
	"reflect",
	"os",
	"runtime/debug",
	"text/tabwriter",
	"internal/fmtsort",
}

// The js/wasm build of this package (the web worker) links none of
// keptOut, directly or through another package.
func TestWorkerBuildKeepsOutHeavyPackages(t *testing.T) {
	gobin := filepath.Join(runtime.GOROOT(), "bin", "go")
	if _, err := os.Stat(gobin); err != nil {
		gobin = "go"
	}
	cmd := exec.Command(gobin, "list", "-deps", ".")
	cmd.Env = append(os.Environ(), "GOOS=js", "GOARCH=wasm")
	out, err := cmd.CombinedOutput()
	if err != nil {
		t.Fatalf("go list -deps: %v\n%s", err, out)
	}
	deps := map[string]bool{}
	for _, p := range strings.Fields(string(out)) {
		deps[p] = true
	}
	if !deps["syscall/js"] || !deps["visitline/solver"] {
		t.Fatalf("go list -deps did not list the worker's build (no syscall/js or visitline/solver):\n%s", out)
	}
	for _, p := range keptOut {
		if deps[p] {
			t.Errorf("the js/wasm build of the worker links %s; it is kept out of engine.wasm (see keptOut)", p)
		}
	}
}
