# Thin wrapper: dependencies, configure, build, then run.
BUILD ?= build
JOBS ?= $(shell nproc)
# Warnings are errors (one configuration for demo and test, so neither rebuilds the other's objects);
# `make test WERROR=OFF` builds anyway.
WERROR ?= ON
# The build shares study points among the ranks of an MPI job (LINKRISE_MPI, Open MPI); `make build MPI=OFF` leaves
# it out. The checking build leaves it out always: LeakSanitizer reports Open MPI's own start-up allocations.
MPI ?= ON
# ccache, when installed, makes rebuilds and work trees of the same commit cheap (paths taken relative to the tree).
LAUNCHER := $(if $(shell command -v ccache),-DCMAKE_CXX_COMPILER_LAUNCHER=ccache)
export CCACHE_BASEDIR ?= $(CURDIR)

# The checking build: clang with AddressSanitizer + UndefinedBehaviorSanitizer on every target and the libFuzzer
# targets (its CTest runs the unit tests, the malformed-input catalogue, the stored cases and each fuzz target for
# FUZZ_TEST_SECONDS). -O1 keeps sanitizer stack traces readable and the build short.
CHECK_BUILD ?= build-check
FUZZ_TEST_SECONDS ?= 30
FUZZ_SECONDS ?= 600
export ASAN_OPTIONS ?= detect_leaks=1
export UBSAN_OPTIONS ?= print_stacktrace=1:halt_on_error=1

.PHONY: all deps build check-build demo test fuzz bench clean

all: build

deps:
	@bash scripts/install-deps.sh

build: deps
	@cmake -S . -B $(BUILD) -DCMAKE_BUILD_TYPE=Release -DLINKRISE_WERROR=$(WERROR) -DLINKRISE_MPI=$(MPI) \
	  $(LAUNCHER) > /dev/null
	@cmake --build $(BUILD) -j $(JOBS)

check-build: deps
	@cmake -S . -B $(CHECK_BUILD) -DCMAKE_CXX_COMPILER=clang++ -DCMAKE_BUILD_TYPE=Debug \
	  -DCMAKE_CXX_FLAGS_DEBUG="-O1 -g1" -DLINKRISE_FUZZ=ON -DLINKRISE_FUZZ_SECONDS=$(FUZZ_TEST_SECONDS) \
	  -DLINKRISE_WERROR=$(WERROR) -DLINKRISE_MPI=OFF $(LAUNCHER) > /dev/null
	@cmake --build $(CHECK_BUILD) -j $(JOBS)

demo: build
	$(BUILD)/linkrise run cases/demo_storage_rack.yaml -o out/demo --report out/demo/report.html

# Each build's tests keep their temporary files in a folder of their own (GoogleTest reads TEST_TMPDIR), so two
# suites running at once on one machine never share a file.
test: build check-build
	mkdir -p $(BUILD)/test-tmp $(CHECK_BUILD)/test-tmp
	cd $(BUILD) && TEST_TMPDIR=$(abspath $(BUILD))/test-tmp ctest --output-on-failure -j $(JOBS)
	cd $(CHECK_BUILD) && TEST_TMPDIR=$(abspath $(CHECK_BUILD))/test-tmp ctest --output-on-failure -j $(JOBS)

# Each fuzz target for FUZZ_SECONDS (default 10 minutes) on the corpus kept in $(CHECK_BUILD)/fuzz-work.
fuzz: check-build
	bash scripts/fuzz.sh quantity $(CHECK_BUILD)/fuzz/quantity_fuzz $(FUZZ_SECONDS) $(CHECK_BUILD)/fuzz-work
	bash scripts/fuzz.sh case $(CHECK_BUILD)/fuzz/case_fuzz $(FUZZ_SECONDS) $(CHECK_BUILD)/fuzz-work

bench: build
	$(BUILD)/linkrise_bench

clean:
	rm -rf $(BUILD) $(CHECK_BUILD) out
