# Visitline build. `make demo` solves the embedded example; `make test` runs every test.
GO ?= go
BENCH_DIR ?= ../shared/benchmarks/tsptw
# Per-family budgets of issue 3's targets: 10 s, 30 s for OhlmannThomas.
BENCH_BUDGETS ?= --budget 10s --budget-for OhlmannThomas=30s
BENCH_FLAGS = --workers 1 --bounds $(BENCH_DIR)/best-known.csv

.PHONY: all build test bench bench-kernels bench-quick demo vet fmt site clean

all: build

build:
	$(GO) build -o bin/visitline ./cmd/visitline

test:
	$(GO) vet ./...
	$(GO) test -count=1 ./...

# The full run takes about 80 minutes on one core: it writes
# bench-results.json after every instance, the README's results table and
# docs/bench-chart.svg at the end.
bench: build bench-kernels
	./bin/visitline bench $(BENCH_BUDGETS) $(BENCH_FLAGS) --quiet --json bench-results.json --readme README.md --chart docs/bench-chart.svg $(BENCH_DIR)

bench-kernels:
	$(GO) test -run '^$$' -bench . -benchmem -benchtime 3x ./solver/...

# A few minutes, for development: 1 s per instance, nothing in the README.
bench-quick: build
	./bin/visitline bench --budget 1s $(BENCH_FLAGS) --quiet --json bench-quick.json --chart bench-quick.svg $(BENCH_DIR)

demo: build
	./bin/visitline solve --budget 3s examples/warehouse/picks.txt

vet:
	$(GO) vet ./...

fmt:
	gofmt -w $$(git ls-files '*.go')

clean:
	rm -rf bin dist
