# boreflux: common tasks. `make demo` runs the example case and writes a report;
# `make test` runs the whole test suite (what CI runs).

CARGO   ?= cargo
BIN     := target/release/boreflux
DEMO    := cases/municipal-sand-gravel.json
OUT     := out

.PHONY: all help setup build demo test bench fmt lint clean

all: build

## help: list the targets
help:
	@sed -n 's/^## //p' Makefile

## setup: install system libraries (HDF5, pkg-config) if missing; quiet when present
setup:
	@bash scripts/setup-deps.sh

## build: release build of the whole workspace
build: setup
	$(CARGO) build --workspace --release

## demo: simulate the demo case and write an HTML report from its HDF5 output
demo: build
	@mkdir -p $(OUT)
	$(BIN) run $(DEMO) -o $(OUT)/demo.h5 --force
	$(BIN) report $(OUT)/demo.h5 -o $(OUT)/demo-report.html --force
	@echo
	@echo "Demo outputs:"
	@echo "  results (HDF5): $(OUT)/demo.h5"
	@echo "  report (HTML):  $(OUT)/demo-report.html"

## test: run every test of the workspace in release mode
test: setup
	$(CARGO) test --workspace --release

## bench: run the benchmarks
bench: setup
	$(CARGO) bench --workspace

## fmt: format all crates of the workspace
fmt:
	$(CARGO) fmt --all

## lint: clippy on every target, warnings are errors
lint: setup
	$(CARGO) clippy --workspace --all-targets -- -D warnings

## clean: remove build products and demo outputs
clean:
	$(CARGO) clean
	rm -rf $(OUT)
