# Visitline build. `make demo` builds the page and serves it with the example
# ready; `make test` runs every test (the browser tests need chromium).
GO ?= go
BENCH_DIR ?= ../shared/benchmarks/tsptw
BENCH_BUDGET ?= 5s
PORT ?= 8080

.PHONY: all build test bench demo demo-cli vet fmt site clean

all: build

build:
	$(GO) build -o bin/visitline ./cmd/visitline

test:
	$(GO) vet ./...
	$(GO) test -count=1 ./...

bench: build
	$(GO) test -run '^$$' -bench . -benchtime 3x ./solver/...
	./bin/visitline bench --budget $(BENCH_BUDGET) --bounds $(BENCH_DIR)/best-known.csv --json bench-results.json --readme README.md $(BENCH_DIR)

# The static site: dist/index.html, engine.wasm, wasm_exec.js, scripts,
# styles, examples, and dist/visitline.html (one self-contained file).
site: build
	mkdir -p dist
	GOOS=js GOARCH=wasm $(GO) build -trimpath -ldflags='-s -w' -o dist/engine.wasm ./wasm
	./bin/visitline site --engine dist/engine.wasm dist

# Serve the page on 127.0.0.1 with the bakery example loaded.
demo: site
	./bin/visitline serve --site dist --port $(PORT) --open-example bakery

# The command-line demo: solve the example and print the plan.
demo-cli: build
	./bin/visitline solve --budget 3s --matrix examples/bakery/travel.csv examples/bakery/sites.csv

vet:
	$(GO) vet ./...

fmt:
	gofmt -w $$(git ls-files '*.go')

clean:
	rm -rf bin dist web/testout
