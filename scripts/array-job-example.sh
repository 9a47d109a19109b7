#!/usr/bin/env bash
# Example job script: a Monte Carlo spread as a batch scheduler's array job, one shard per task, then one merge.
# Plain shell; adapt the two variables below to your scheduler and submit the script once as an array of TASKS
# tasks, and the merge step once all of them have finished (most schedulers can make a job wait for an array).
#
#   TASKS  how many tasks (shards) the array has, e.g. 40
#   TASK   this task's number, 1 … TASKS. Map your scheduler's array index to it; if the index counts from 0, set
#          TASK_BASE=0 and it is shifted up by one.
#
# Usage:
#   TASK=3 TASKS=40 array-job-example.sh shard CASE.yaml SAMPLES SEED RESULTS_DIR [more linkrise options]
#   array-job-example.sh merge RESULTS_DIR OUTPUT_DIR [more linkrise merge options]
#
# A shard task writes RESULTS_DIR/shard-<TASK>/ (spread_samples.csv, spread.json and spread_shard.json) and
# skips a shard already done, so a resubmitted array reruns only the tasks that failed. It succeeds when the shard
# was computed — whether or not its samples passed: the merged study says that. The merge step writes
# OUTPUT_DIR/spread_samples.csv, spread.json and spread.html, and exits as one whole run would (0 all passed,
# 1 some sample failed its verdict, 3 the solver gave up on one; 2 when a shard is missing, repeated or foreign).
#
# LINKRISE names the program (default: linkrise on the PATH). Each task uses the cores its machine offers (-j 0).
set -euo pipefail

linkrise=${LINKRISE:-linkrise}

run_shard() {
  local case_file=$1 samples=$2 seed=$3 results=$4
  shift 4
  local tasks=${TASKS:?set TASKS to the number of tasks in the array}
  local task=${TASK:?set TASK to this task number (map your scheduler array index to it)}
  task=$((task + 1 - ${TASK_BASE:-1}))
  if ((task < 1 || task > tasks)); then
    echo "array-job-example: task $task is outside 1 … $tasks (is TASK_BASE right?)" >&2
    exit 2
  fi
  local folder="$results/shard-$task"
  if [ -f "$folder/spread_shard.json" ]; then
    echo "array-job-example: shard $task/$tasks is already in $folder"
    exit 0
  fi
  mkdir -p "$results"
  local status=0
  "$linkrise" spread "$case_file" --samples "$samples" --seed "$seed" --shard "$task/$tasks" -j 0 -q \
    -o "$folder" "$@" || status=$?
  # 1 (a sample failed its verdict) and 3 (the solver gave up on a sample) still leave a complete shard.
  if [ -f "$folder/spread_shard.json" ] && { [ $status -eq 0 ] || [ $status -eq 1 ] || [ $status -eq 3 ]; }; then
    echo "array-job-example: shard $task/$tasks written to $folder (linkrise exit $status)"
    exit 0
  fi
  echo "array-job-example: shard $task/$tasks failed (linkrise exit $status)" >&2
  exit "$status"
}

run_merge() {
  local results=$1 output=$2
  shift 2
  "$linkrise" merge "$results"/shard-* -o "$output" --report "$output/spread.html" "$@"
}

case "${1:-}" in
  shard)
    [ $# -ge 5 ] || { echo "usage: TASK=k TASKS=n $0 shard CASE.yaml SAMPLES SEED RESULTS_DIR [options]" >&2; exit 2; }
    shift
    run_shard "$@"
    ;;
  merge)
    [ $# -ge 3 ] || { echo "usage: $0 merge RESULTS_DIR OUTPUT_DIR [options]" >&2; exit 2; }
    shift
    run_merge "$@"
    ;;
  *)
    echo "usage: $0 shard … | merge … (see the comment at the top of the script)" >&2
    exit 2
    ;;
esac
