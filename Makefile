# Visitline build. `make demo` solves the bakery example; `make test` runs every test.
GO ?= go
BENCH_DIR ?= ../shared/benchmarks/tsptw
BENCH_BUDGET ?= 5s

.PHONY: all build test bench bound-report demo vet fmt site clean

all: build

build:
	$(GO) build -o bin/visitline ./cmd/visitline

test:
	$(GO) vet ./...
	$(GO) test -count=1 ./...

bench: build
	$(GO) test -run '^$$' -bench . -benchtime 3x ./solver/...
	./bin/visitline bench --budget $(BENCH_BUDGET) --bounds $(BENCH_DIR)/best-known.csv --json bench-results.json --readme README.md $(BENCH_DIR)

bound-report:
	VISITLINE_BOUND_REPORT=Dumas,GendreauDumasExtended VISITLINE_BOUND_BUDGET=10s GOMAXPROCS=1 $(GO) test -count=1 -timeout 0 -run TestBoundReport -v ./solver/bound

demo: build
	./bin/visitline solve --budget 3s --matrix examples/bakery/travel.csv examples/bakery/sites.csv

vet:
	$(GO) vet ./...

fmt:
	gofmt -w $$(git ls-files '*.go')

clean:
	rm -rf bin dist
