#!/usr/bin/env bash
# tree_bench.sh - saltpan on a Hodgkin-Huxley 1952 cable (specs/reference/squid_axon_1952_cable.saltpan
# cut into 100, 1,000 and 10,000 pieces) against a hand-written -O3 -march=native implicit tree solver
# of the same equations and method (tree_handwritten.cpp); then a 1,000-piece cable for 100 ms at
# 25 us end to end. Usage: tests/bench/tree_bench.sh [BUILD_DIR]  (a benchmark, not a test)
set -euo pipefail
build=${1:-build}
src=$(cd "$(dirname "$0")/../.." && pwd)
saltpan=$build/saltpan
if [ -f "$build/CMakeCache.txt" ]; then cmake --build "$build" --target benchmarks >/dev/null; fi
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
spec() { # pieces duration_ms -> a spec at 25 us recording two places every 1 ms
  sed -e "s/  pieces 1200/  pieces $1/" -e 's/step 5 us/step 25 us/' -e "s/duration 8 ms/duration $2 ms/" \
    -e 's/every 0.01 ms/every 1 ms/' "$src/specs/reference/squid_axon_1952_cable.saltpan" >"$tmp/cable$1.saltpan"
  echo "$tmp/cable$1.saltpan"
}
best() { sort -g | head -1; }
echo "HH 1952 cable, 50 ms at 25 us, Crank-Nicolson with staggered gates (best of 3 runs):"
printf "  %8s  %14s  %14s  %12s  %14s\n" pieces "hand-written" saltpan "speed ratio" "saltpan ns/piece/step"
for n in 100 1000 10000; do
  file=$(spec "$n" 50)
  hand=$(for i in 1 2 3; do "$build/saltpan_bench_tree" "$n" 50 0.025 | sed -n 's/.* in \([0-9.]*\) ms.*/\1/p'; done | best)
  ours=$(for i in 1 2 3; do "$saltpan" run "$file" -o "$tmp/out.csv" 2>&1 | sed -n 's/.*simulate \([0-9.]*\) ms.*/\1/p'; done | best)
  awk -v n="$n" -v h="$hand" -v s="$ours" 'BEGIN {
    printf "  %8d  %11.1f ms  %11.1f ms  %11.2fx  %14.1f\n", n, h, s, h / s, s * 1e6 / 2000 / (n + 1) }'
done
echo "  (speed ratio: hand-written time over saltpan's; 1.0 = as fast)"
file=$(spec 1000 100)
start=$(date +%s.%N)
line=$("$saltpan" run "$file" -o "$tmp/out.csv" 2>&1 | grep '^ran')
end=$(date +%s.%N)
awk -v a="$start" -v b="$end" -v l="$line" 'BEGIN {
  match(l, /simulate [0-9.]+/); sim = substr(l, RSTART + 9, RLENGTH - 9)
  match(l, /compile [0-9.]+/); comp = substr(l, RSTART + 8, RLENGTH - 8)
  printf "1,000-piece HH cable, 100 ms at 25 us (4000 steps): wall %.2f s end to end (compile %.0f ms, simulate %.0f ms); %.0f steps/s\n",
         b - a, comp, sim, 4000 / (sim / 1000) }'
