# flitlog: two commands set everything up on a fresh Debian 12 machine.
#   make demo   render the demo scene, run the whole pipeline, print a scorecard
#   make test   unit, end-to-end and real-footage tests, plus short fuzz runs
#   make bench  throughput against the decoder (see DEVELOPERS.md)

GO      ?= go
BIN     := bin/flitlog
FUZZT   ?= 10s
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

bench: samples
	$(GO) test -run '^$$' -bench . -benchtime 1x -timeout 60m ./cmd/flitlog/

clean:
	rm -rf bin flitlog-demo .cache
