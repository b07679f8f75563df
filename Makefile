# flitlog: two commands set everything up on a fresh Debian 12 machine.
#   make demo   render the demo scene, run the whole pipeline, print a scorecard
#   make test   unit, end-to-end and real-footage tests, plus short fuzz runs
#   make bench  throughput against the decoder (see DEVELOPERS.md)

GO      ?= go
BIN     := bin/flitlog
FUZZT   ?= 20000x
export CGO_ENABLED := 1

.PHONY: all deps samples build demo test fuzz bench clean

all: build

deps:
	@bash .ci/deps.sh

samples:
	@bash .ci/deps.sh samples

build: deps
	$(GO) build -o $(BIN) ./cmd/flitlog

demo: build
	./$(BIN) demo

test: samples
	$(GO) vet ./...
	$(GO) test -count=1 -timeout 25m ./...
	$(MAKE) --no-print-directory fuzz

fuzz:
	@bash .ci/fuzz.sh $(FUZZT)

# bench: clips are rendered once into .cache/bench (the first run takes ~10 min more).
#   FLITLOG_BENCH_LONG=1 make bench    adds the 10-minute clip (memory vs clip length; first render ~12 min)
#   FLITLOG_BENCH_ROUNDS=N             alternating decode/pipeline rounds per clip (default 3)
#   make bench BENCHFLAGS='-count 5'   extra go test flags, e.g. for benchstat or -cpuprofile cpu.prof
bench: deps
	$(GO) test -run '^$$' -bench . -benchtime 1x -timeout 120m $(BENCHFLAGS) ./cmd/flitlog/

clean:
	rm -rf bin flitlog-demo .cache
