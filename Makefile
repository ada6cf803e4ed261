# Visitline build. `make demo` builds the page and serves it with the example
# ready; `make test` runs every test (the browser tests need chromium).
GO ?= go
BENCH_DIR ?= ../shared/benchmarks/tsptw
# Per-family budgets of issue 3's targets: 10 s, 30 s for OhlmannThomas.
BENCH_BUDGETS ?= --budget 10s --budget-for OhlmannThomas=30s
BENCH_FLAGS = --workers 1 --bounds $(BENCH_DIR)/best-known.csv

.PHONY: all build lab wasm-size wasm-cli test bench-browser bench bench-kernels bench-quick bench-scale bench-wasm bench-workers pgo bound-report demo demo-cli vet fmt site clean
PORT ?= 8080

all: build

build:
	$(GO) build -o bin/visitline ./cmd/visitline

# The measurement lab (bench, scale, wasm-speed), a command of its own.
lab:
	$(GO) build -o bin/visitline-lab ./cmd/visitline-lab

test:
	$(GO) vet ./...
	$(GO) test -count=1 -timeout 30m ./...
	node --test web/jstest/

# The full run takes about 80 minutes on one core: it writes
# docs/bench-results.json after every instance, the README's results table and
# docs/bench-chart.svg at the end.
bench: lab bench-kernels
	./bin/visitline-lab bench $(BENCH_BUDGETS) $(BENCH_FLAGS) --quiet --json docs/bench-results.json --readme docs/results.md --chart docs/bench-chart.svg $(BENCH_DIR)

bench-kernels:
	$(GO) test -run '^$$' -bench . -benchmem -benchtime 3x ./solver/...

# A few minutes, for development: 1 s per instance, nothing in the README.
bench-quick: lab
	./bin/visitline-lab bench --budget 1s $(BENCH_FLAGS) --quiet --json bench-quick.json --chart bench-quick.svg $(BENCH_DIR)

# The lab built for js/wasm, run under Node.js by the wasm targets.
WASM_EXEC ?= node $(shell $(GO) env GOROOT)/lib/wasm/wasm_exec_node.js
wasm-cli:
	GOOS=js GOARCH=wasm $(GO) build -o bin/visitline-lab.wasm ./cmd/visitline-lab

# Generated instances of 100 to 2,000 sites at four window tightness levels,
# each case in a fresh process (peak memory of its own). Budgets in CPU time
# so that a shared machine does not shorten them; about 10 minutes on an
# idle machine.
SCALE_BUDGET ?= 30s
bench-scale: lab
	./bin/visitline-lab scale --cpu-budget --budget $(SCALE_BUDGET) --json scale-results.json --readme docs/results.md --chart docs/scale-chart.svg

# WebAssembly against native: the same seed and iteration budgets on both
# sides, then scale rows run in Node.js.
SPEED_FILES ?= $(BENCH_DIR)/Dumas/n100w40.001.txt $(BENCH_DIR)/Dumas/n200w40.001.txt \
	$(BENCH_DIR)/GendreauDumasExtended/n100w100.001.txt $(BENCH_DIR)/OhlmannThomas/n200w120.001.txt \
	$(BENCH_DIR)/Langevin/N60ft406.dat $(BENCH_DIR)/SolomonPesant/rc208.2 \
	bin/gen/n300-tight.txt bin/gen/n1000-tight.txt
bin/gen/n300-tight.txt: build
	mkdir -p bin/gen && ./bin/visitline gen --n 300 --tightness tight --seed 1 > $@
bin/gen/n1000-tight.txt: build
	mkdir -p bin/gen && ./bin/visitline gen --n 1000 --tightness tight --seed 1 > $@
WASM_SCALE_BUDGET ?= 30s
bench-wasm: lab wasm-cli bin/gen/n300-tight.txt bin/gen/n1000-tight.txt
	./bin/visitline-lab wasm-speed --wasm bin/visitline-lab.wasm --runner "$(WASM_EXEC)" --iterations 1000 --repeats 3 --json wasm-speed.json --readme docs/results.md $(SPEED_FILES)
	./bin/visitline-lab scale --wasm bin/visitline-lab.wasm --runner "$(WASM_EXEC)" --cpu-budget --budget $(WASM_SCALE_BUDGET) --sizes 100,300,1000 --json scale-wasm.json --readme docs/results.md --section scale-wasm

# Time to the best-known value with two workers against one, five seeds,
# on instances that take one worker over a second of CPU time to reach it
# (found with bench --stop-at-best --cpu-budget). Budgets in CPU time: 20 s
# for one worker, 40 s (20 s each) for two.
OT = $(BENCH_DIR)/OhlmannThomas
WORKER_FILES ?= $(OT)/n150w120.002.txt $(OT)/n150w120.004.txt $(OT)/n150w120.005.txt $(OT)/n150w140.001.txt \
	$(OT)/n150w140.005.txt $(OT)/n150w160.003.txt $(OT)/n200w120.005.txt $(OT)/n200w140.005.txt \
	$(BENCH_DIR)/GendreauDumasExtended/n100w120.004.txt
WORKER_FLAGS = --seeds 5 --cpu-budget --stop-at-best --quiet --bounds $(BENCH_DIR)/best-known.csv
bench-workers: lab
	./bin/visitline-lab bench --workers 1 --budget 20s $(WORKER_FLAGS) --json workers-1.json $(WORKER_FILES)
	./bin/visitline-lab bench --workers 2 --budget 40s $(WORKER_FLAGS) --json workers-2.json $(WORKER_FILES)
	./bin/visitline-lab bench --from workers-2.json --baseline workers-1.json --readme docs/results.md

# A CPU profile of fixed-iteration runs on a few instances of each kind,
# for a profile-guided build (go build uses the main package's default.pgo
# when it is there: the profile goes to both commands). Measured again after
# the search's joins were written out (issue 8, round 4): no native gain,
# 3-18 % less WebAssembly CPU, so no default.pgo is committed; see
# docs/results.md, "Speed per search worker (issue 8, round 4)".
PGO_FILES ?= $(BENCH_DIR)/Dumas/n100w40.001.txt $(BENCH_DIR)/GendreauDumasExtended/n100w100.001.txt \
	$(BENCH_DIR)/OhlmannThomas/n200w120.001.txt $(BENCH_DIR)/SolomonPesant/rc208.2 bin/gen/n300-tight.txt
pgo: lab bin/gen/n300-tight.txt
	./bin/visitline-lab bench --budget 0 --iterations 1500 --quiet --cpuprofile cmd/visitline/default.pgo $(PGO_FILES)
	cp cmd/visitline/default.pgo cmd/visitline-lab/default.pgo

# The page in headless Chromium: Stop and weight changes at 60 to 2,000
# sites with the bound on (BENCH_TRIES tries each), the engine's ready time,
# the per-worker rate against native by CPU time, and (BENCH_BEST=1) the time
# to the best-known value with 1 and 2 search workers against native.
BENCH_TRIES ?= 10
BENCH_BEST ?= 1
bench-browser:
	VISITLINE_BENCH_BROWSER=1 VISITLINE_BENCH_TRIES=$(BENCH_TRIES) VISITLINE_BENCH_BEST=$(BENCH_BEST) \
		$(GO) test -count=1 -timeout 0 -run '^TestBenchBrowser$$' -v ./web | tee bench-browser.txt

# The bound report: CPU-time budgets per instance, one thread. BOUND_FILTER
# takes instance-name parts, comma-separated (e.g. .001,.002).
BOUND_FAMILIES ?= Dumas,GendreauDumasExtended
BOUND_BUDGET ?= 10s
BOUND_FILTER ?=
bound-report:
	VISITLINE_BOUND_REPORT=$(BOUND_FAMILIES) VISITLINE_BOUND_BUDGET=$(BOUND_BUDGET) VISITLINE_BOUND_FILTER=$(BOUND_FILTER) \
		VISITLINE_BOUND_CPU=1 GOMAXPROCS=1 $(GO) test -count=1 -timeout 0 -run TestBoundReport -v ./solver/bound

# The static site: dist/index.html, engine.wasm, wasm_exec.js, scripts,
# styles, examples, and dist/visitline.html (one self-contained file).
site: build
	mkdir -p dist
	GOOS=js GOARCH=wasm $(GO) build -trimpath -ldflags='-s -w' -o dist/engine.wasm ./wasm
	./bin/visitline site --engine dist/engine.wasm dist

# The size of engine.wasm as `make site` builds it (issue 8: under 4 MB),
# and the standard packages it links.
wasm-size:
	mkdir -p bin
	GOOS=js GOARCH=wasm $(GO) build -trimpath -ldflags='-s -w' -o bin/engine.wasm ./wasm
	@echo "engine.wasm: $$(wc -c < bin/engine.wasm) bytes ($$($(GO) version | cut -d' ' -f3))"
	@echo "standard packages: $$(GOOS=js GOARCH=wasm $(GO) list -deps ./wasm | grep -v '^visitline' | grep -v internal | tr '\n' ' ')"

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
