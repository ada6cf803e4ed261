//go:build !(js && wasm)

package main

import (
	"fmt"
	"os"
)

func main() {
	fmt.Fprintln(os.Stderr, "this is the web worker's engine: build it with GOOS=js GOARCH=wasm (make site)")
	os.Exit(2)
}
