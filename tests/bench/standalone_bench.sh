#!/usr/bin/env bash
# standalone_bench.sh - the executable `saltpan build` writes against `saltpan run` (JIT) on the
# same protocol: the 1952 squid axon, exponential Euler at 10 us for 1000 ms, V every 0.1 ms.
# Usage: tests/bench/standalone_bench.sh [BUILD_DIR]   (a benchmark, not a test; prints ratios)
set -euo pipefail
build=${1:-build}
src=$(cd "$(dirname "$0")/../.." && pwd)
saltpan=$build/saltpan
# In a build tree, build what the benchmark runs (benchmarks are not in the default build).
if [ -f "$build/CMakeCache.txt" ]; then cmake --build "$build" --target benchmarks >/dev/null; fi
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
sed -e 's/method rk4 step 10 us/method exponential_euler step 10 us/' -e 's/from 0 ms to 200 ms/from 0 ms to 1000 ms/' \
  "$src/specs/reference/squid_axon_1952.saltpan" >"$tmp/hh.saltpan"
"$saltpan" build "$tmp/hh.saltpan" -o "$tmp/hh" 2>/dev/null
options=(--duration 1000ms --every 0.1ms)

# best COMMAND...: the fastest of 5 runs, as "WALL_MS SIMULATE_MS" (simulate from the summary).
best() {
  for _ in 1 2 3 4 5; do
    local start end simulate
    start=$(date +%s%N)
    simulate=$("$@" "${options[@]}" -o "$tmp/out.csv" 2>&1 >/dev/null | sed -n 's/.*simulate \([0-9.]*\) ms.*/\1/p')
    end=$(date +%s%N)
    echo "$(((end - start) / 1000)) $simulate"
  done | awk '{ w = $1 / 1000; if (NR == 1 || w < bw) bw = w; if (NR == 1 || $2 < bs) bs = $2 }
              END { printf "%.1f %.1f\n", bw, bs }'
}
read -r jit_wall jit_sim < <(best "$saltpan" run "$tmp/hh.saltpan")
read -r exe_wall exe_sim < <(best "$tmp/hh")
"$saltpan" run "$tmp/hh.saltpan" "${options[@]}" -o "$tmp/jit.csv" 2>/dev/null
"$tmp/hh" "${options[@]}" -o "$tmp/exe.csv" 2>/dev/null
cmp -s "$tmp/jit.csv" "$tmp/exe.csv" && same="identical" || same="DIFFERENT"
echo "1952 squid axon, exponential Euler at 10 us, 1000 ms, V every 0.1 ms (best of 5):"
echo "  saltpan run (JIT):       simulate $jit_sim ms, whole process $jit_wall ms"
echo "  standalone executable: simulate $exe_sim ms, whole process $exe_wall ms"
awk -v j="$jit_sim" -v e="$exe_sim" -v jw="$jit_wall" -v ew="$exe_wall" 'BEGIN {
  printf "  simulate time, standalone / JIT: %.3f (1.0 = as fast)\n", e / j
  printf "  whole process, standalone / saltpan run: %.3f (saltpan run also checks, lowers and compiles)\n", ew / jw }'
echo "  outputs: $same"
