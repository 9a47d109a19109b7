# Thin wrapper: dependencies, configure, build, then run.
BUILD ?= build
JOBS ?= $(shell nproc)
# Warnings are errors (one configuration for demo and test, so neither rebuilds the other's objects);
# `make test WERROR=OFF` builds anyway.
WERROR ?= ON
# ccache, when installed, makes rebuilds and work trees of the same commit cheap (paths taken relative to the tree).
LAUNCHER := $(if $(shell command -v ccache),-DCMAKE_CXX_COMPILER_LAUNCHER=ccache)
export CCACHE_BASEDIR ?= $(CURDIR)

.PHONY: all deps build demo test bench clean

all: build

deps:
	@bash scripts/install-deps.sh

build: deps
	@cmake -S . -B $(BUILD) -DCMAKE_BUILD_TYPE=Release -DLINKRISE_WERROR=$(WERROR) $(LAUNCHER) > /dev/null
	@cmake --build $(BUILD) -j $(JOBS)

demo: build
	$(BUILD)/linkrise run cases/demo_storage_rack.yaml -o out/demo --report out/demo/report.html

test: build
	cd $(BUILD) && ctest --output-on-failure -j $(JOBS)

bench: build
	$(BUILD)/linkrise_bench

clean:
	rm -rf $(BUILD) out
