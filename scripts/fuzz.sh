#!/usr/bin/env bash
# Runs one libFuzzer target for a bounded time on a corpus seeded from the stored cases and the malformed-input
# catalogue. Usage: scripts/fuzz.sh <quantity|case> <fuzzer binary> <seconds> <work folder>
# The corpus grows in <work folder>/corpus/<target>; a crash, sanitizer report, leak or slow input is written to
# <work folder>/findings/ and the script exits non-zero (turn each finding into a catalogue entry and a fix).
set -euo pipefail
target=$1 binary=$2 seconds=$3 work=$4
source_dir="$(cd "$(dirname "$0")/.." && pwd)"
seeds="$work/seeds/$target" corpus="$work/corpus/$target" findings="$work/findings"
rm -rf "$seeds"
mkdir -p "$seeds" "$corpus" "$findings"
case "$target" in
  case)
    # Whole files: every stored case and every bad case file of the catalogue (not the directory entry).
    for file in "$source_dir"/cases/*.yaml "$source_dir"/tests/malformed/*; do
      [ -f "$file" ] && cp "$file" "$seeds/"
    done
    ;;
  quantity)
    # Every value written after a key in the stored cases ("47 Ohm", "1.2 mF", "2.5 K/W"), one per file.
    count=0
    while IFS= read -r value; do
      count=$((count + 1))
      printf '%s' "$value" > "$seeds/value_$count"
    done < <(sed -n 's/^[^#]*:[[:space:]]*\([-+.0-9][^#,}]*[^#,}[:space:]]\).*$/\1/p' "$source_dir"/cases/*.yaml | sort -u)
    ;;
  *) echo "fuzz.sh: unknown target '$target' (quantity or case)" >&2; exit 2 ;;
esac
dictionary=()
[ -f "$source_dir/fuzz/$target.dict" ] && dictionary=(-dict="$source_dir/fuzz/$target.dict")
echo "fuzz $target: $(ls "$seeds" | wc -l) seeds, $(ls "$corpus" | wc -l) corpus entries, ${seconds} s"
# -seed fixes the mutation sequence (a rerun explores the same inputs for the same time); -timeout marks an input
# that takes more than 10 s as a hang; -rss_limit_mb an input that needs more than 2 GB.
"$binary" -seed=1 -max_total_time="$seconds" -timeout=10 -rss_limit_mb=2048 -max_len=16384 \
  -print_final_stats=1 -artifact_prefix="$findings/$target-" "${dictionary[@]}" "$corpus" "$seeds" 2>&1 |
  grep -v '^#[0-9]' || true
status=${PIPESTATUS[0]}
if [ "$status" -ne 0 ]; then
  echo "fuzz $target: FINDING (exit $status); the input is in $findings" >&2
  exit 1
fi
