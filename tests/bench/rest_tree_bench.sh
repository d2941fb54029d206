#!/usr/bin/env bash
# rest_tree_bench.sh - how long `saltpan rest` takes on trees: HH cables near and above the
# limit of the dense eigenvalue analysis (rest::maxStatesForEigenvalues), and long passive cables
# (the isopotential scan, O(pieces) per potential, dominates).
# Usage: tests/bench/rest_tree_bench.sh [BUILD_DIR]   (a benchmark, not a test; prints seconds)
set -euo pipefail
build=${1:-build}
src=$(cd "$(dirname "$0")/../.." && pwd)
saltpan=$build/saltpan
if [ -f "$build/CMakeCache.txt" ]; then cmake --build "$build" --target benchmarks >/dev/null; fi
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
cables=$src/tests/golden/cables

# seconds SPEC: wall time of one `saltpan rest SPEC`, and the first line about stability.
seconds() {
  local start end
  start=$EPOCHREALTIME
  "$saltpan" rest "$1" >"$tmp/out" 2>/dev/null
  end=$EPOCHREALTIME
  printf '%8.2f s  %s\n' "$(awk -v a="$start" -v b="$end" 'BEGIN { print b - a }')" "$(grep -m1 'steady state 1:' "$tmp/out" | cut -c3-90)"
}

for pieces in 100 200 248 300; do
  sed -e "s/  pieces 40/  pieces $pieces/" -e 's/  pieces 30$/  pieces 1/' "$cables/hh_cable.saltpan" >"$tmp/hh.saltpan"
  echo "HH soma + axon of $pieces pieces ($((4 * pieces + 5)) states):"
  seconds "$tmp/hh.saltpan"
done
for pieces in 5000 20000; do
  sed "s/pieces 50/pieces $pieces/" "$cables/branched_cell.saltpan" >"$tmp/passive.saltpan"
  echo "passive branched cell, dendrite of $pieces pieces:"
  seconds "$tmp/passive.saltpan"
done
