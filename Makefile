# Entry points for a fresh machine that has only the Rust toolchain and a C compiler.
# `rug` builds GMP and MPFR from source, which needs GNU m4; `setup` installs it when missing.

.PHONY: setup example test bench lint report-check

setup:
	@command -v m4 >/dev/null 2>&1 || { \
	  if [ "$$(id -u)" = 0 ] && command -v apt-get >/dev/null 2>&1; then \
	    echo "installing m4 (needed to build GMP/MPFR for rug)"; \
	    (apt-get install -y m4 >/dev/null 2>&1 || { apt-get update >/dev/null 2>&1 && apt-get install -y m4 >/dev/null 2>&1; }) \
	      || { echo "error: could not install m4 with apt-get"; exit 1; }; \
	  else \
	    echo "error: GNU m4 is missing; rug's GMP/MPFR build needs it."; \
	    echo "       install it with your package manager (e.g. sudo apt-get install m4) and rerun"; \
	    exit 1; \
	  fi; }

example: setup
	cargo run --release --quiet -- solve examples/citation_growth.rule
	cargo run --release --quiet -- table examples/citation_growth.rule --param rho=3/10 --k 1..12 --digits 40

test: setup
	cargo test

bench: setup
	cargo bench

lint: setup
	cargo fmt --all -- --check
	cargo clippy --all-targets -- -D warnings

# The reports in a real browser: installs Chromium and poppler's pdftotext with apt-get when
# missing (as root), renders every example's report headless to PNG and PDF, and fails on a
# blank page or MathML shown as raw text. Screenshots: target/report-check/*.png.
report-check: setup
	@for tool in chromium:chromium pdftotext:poppler-utils; do \
	  command=$${tool%%:*}; package=$${tool##*:}; \
	  command -v $$command >/dev/null 2>&1 && continue; \
	  if [ "$$(id -u)" = 0 ] && command -v apt-get >/dev/null 2>&1; then \
	    echo "installing $$package (for the browser check of the reports)"; \
	    (apt-get install -y $$package >/dev/null 2>&1 || { apt-get update >/dev/null 2>&1 && apt-get install -y $$package >/dev/null 2>&1; }) \
	      || { echo "error: could not install $$package with apt-get"; exit 1; }; \
	  else \
	    echo "error: $$command is missing; install $$package with your package manager and rerun"; \
	    exit 1; \
	  fi; \
	done
	TELESCOPE_REPORT_CHECK=1 cargo test --test report_browser -- --nocapture
	@echo "screenshots: target/report-check/*.png"

# Fuzzing (fuzz/, its own workspace). cargo-fuzz needs nightly flags: on a stable toolchain
# RUSTC_BOOTSTRAP=1 allows them, and --sanitizer none avoids AddressSanitizer, which needs a
# nightly standard library. FUZZ_RUNS executions per target (default 10^6), new inputs go to
# fuzz/work/TARGET, findings to fuzz/artifacts/TARGET. `model` is built without comparison
# tracing: its inputs are shaped by a grammar, and the tracing tripled the cost of an input.
# Each target builds in its own directory (fuzz/target/TARGET), so that targets built with
# different flags can run side by side (`make -j2 fuzz-model fuzz-claim`) without rebuilding
# each other's copy of the library.
FUZZ_RUNS ?= 1000000
FUZZ_TARGETS ?= parse model claim
# More libFuzzer flags, e.g. FUZZ_ARGS="-fork=1 -ignore_timeouts=1 -ignore_ooms=1" to go on
# past slow inputs (collected in fuzz/artifacts/TARGET) and stop only at a crash.
FUZZ_ARGS ?=

.PHONY: fuzz
fuzz: setup
	@command -v cargo-fuzz >/dev/null 2>&1 || cargo install cargo-fuzz --locked
	@for t in $(FUZZ_TARGETS); do \
	  mkdir -p fuzz/work/$$t; \
	  echo "fuzzing $$t for $(FUZZ_RUNS) runs"; \
	  mkdir -p fuzz/artifacts/$$t; \
	  case $$t in model) flags=--no-trace-compares;; *) flags=;; esac; \
	  RUSTC_BOOTSTRAP=1 cargo fuzz run --fuzz-dir fuzz --sanitizer none $$flags \
	    --target-dir fuzz/target/$$t $$t \
	    fuzz/work/$$t fuzz/corpus/$$t -- -runs=$(FUZZ_RUNS) -timeout=10 -max_len=512 \
	    -print_final_stats=1 -artifact_prefix=fuzz/artifacts/$$t/ $(FUZZ_ARGS) || exit 1; \
	done

# One target: `make fuzz-model`, `make fuzz-claim`, `make fuzz-parse`.
.PHONY: fuzz-parse fuzz-model fuzz-claim
fuzz-parse fuzz-model fuzz-claim: fuzz-%:
	@$(MAKE) --no-print-directory fuzz FUZZ_TARGETS=$*
