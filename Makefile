# boreflux: common tasks. `make demo` runs the example case and writes a report;
# `make test` runs what a reviewer checks (format, lints, docs, minimum Rust version) and then
# the whole test suite; CI runs `make test`.

CARGO   ?= cargo
BIN     := target/release/boreflux
DEMO    := cases/municipal-sand-gravel.json
OUT     := out

.PHONY: all help setup build demo test check-fmt doc msrv bench fmt lint clean

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

## test: format, lints, docs and the minimum Rust version checked, then every test in release mode
test: setup check-fmt lint doc msrv
	$(CARGO) test --workspace --release

## check-fmt: fail when a file is not formatted as `cargo fmt` would
check-fmt:
	$(CARGO) fmt --all --check

## doc: API documentation of the workspace, warnings are errors
doc: setup
	RUSTDOCFLAGS="-D warnings" $(CARGO) doc --workspace --no-deps --release

## msrv: compile with the minimum supported Rust version (Debian's Rust 1.85.0; scripts/msrv-check.sh)
msrv: setup
	@bash scripts/msrv-check.sh

## bench: run the benchmarks
bench: setup
	$(CARGO) bench --workspace

## fmt: format all crates of the workspace
fmt:
	$(CARGO) fmt --all

## lint: clippy on every target, warnings are errors
lint: setup
	$(CARGO) clippy --workspace --all-targets --release -- -D warnings

## clean: remove build products and demo outputs
clean:
	$(CARGO) clean
	rm -rf $(OUT)
