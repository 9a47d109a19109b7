#!/bin/sh
# Instructions per solve (machine-independent, unlike the times of linkrise_bench): callgrind counts only inside
# linkrise::solver::simulate of `linkrise run` on each case (waveform rows recorded, as `run` does), and the
# instructions per solver step. Usage: bench/callgrind_solve.sh [BUILD_DIR] [CASE.yaml ...]
# (defaults: build, the reference case and the demo). Needs valgrind (scripts/install-deps.sh installs it).
set -eu
build=${1:-build}
[ $# -gt 0 ] && shift
[ $# -eq 0 ] && set -- cases/reference_180s_speed.yaml cases/demo_storage_rack.yaml
scratch=$(mktemp -d)
trap 'rm -rf "$scratch"' EXIT
for case_file in "$@"; do
  valgrind --tool=callgrind --callgrind-out-file="$scratch/out" --toggle-collect='linkrise::solver::simulate*' \
    "$build/linkrise" run "$case_file" -o "$scratch/run" --quiet >/dev/null 2>"$scratch/log"
  instructions=$(sed -n 's/.*Collected : \([0-9]*\).*/\1/p' "$scratch/log")
  steps=$(python3 -c "import json,sys; print(int(json.load(open(sys.argv[1]))['solver']['steps']['value']))" \
    "$scratch/run/summary.json")
  echo "$case_file: $instructions instructions per solve, $steps steps, $((instructions / steps)) per step"
done
