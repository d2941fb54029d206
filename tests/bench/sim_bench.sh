#!/usr/bin/env bash
# sim_bench.sh - simulation speed of the 1952 squid axon: saltpan's JIT and interpreter
# against a hand-written -O3 -march=native stepper of the same equations and method.
# Usage: tests/bench/sim_bench.sh [BUILD_DIR]   (a benchmark, not a test; prints measured ratios)
set -euo pipefail
build=${1:-build}
src=$(cd "$(dirname "$0")/../.." && pwd)
saltpan=$build/saltpan
# In a build tree, build what the benchmark runs (benchmarks are not in the default build).
if [ -f "$build/CMakeCache.txt" ]; then cmake --build "$build" --target benchmarks >/dev/null; fi
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
# 1 s simulated at 10 us with exponential Euler, V recorded every 1 ms (recording kept small).
sed -e 's/duration 200 ms/duration 1000 ms/' -e 's/method rk4 step 10 us/method exponential_euler step 10 us/' -e 's/from 0 ms to 200 ms/from 0 ms to 1000 ms/' \
    -e 's/record axon.V every 0.01 ms/record axon.V every 1 ms/' \
    "$src/specs/reference/squid_axon_1952.saltpan" > "$tmp/hh1s.saltpan"
sim_ms() { "$saltpan" run "$tmp/hh1s.saltpan" --engine "$1" -o "$tmp/out.csv" 2>&1 | sed -n 's/.*simulate \([0-9.]*\) ms.*/\1/p'; }
best() { sort -g | head -1; }
hand=$(for i in 1 2 3 4 5; do "$build/saltpan_bench_hh" 1000 0.01 | sed -n 's/.* in \([0-9.]*\) ms.*/\1/p'; done | best)
jit=$(for i in 1 2 3 4 5; do sim_ms jit; done | best)
interp=$(for i in 1 2 3; do sim_ms interpreter; done | best)
echo "1952 squid axon, 1 s at 10 us, exponential Euler (best of runs):"
echo "  hand-written C++ -O3 -march=native: $hand ms"
echo "  saltpan JIT:                          $jit ms"
echo "  saltpan interpreter:                  $interp ms"
awk -v h="$hand" -v j="$jit" -v i="$interp" 'BEGIN {
  printf "  JIT speed relative to hand-written: %.2fx (1.0 = as fast)\n", h / j
  printf "  JIT speed relative to interpreter:  %.1fx\n", i / j }'
# Latency from spec to ready code, and end to end with V recorded every 0.1 ms.
sed -e 's/record axon.V every 1 ms/record axon.V every 0.1 ms/' "$tmp/hh1s.saltpan" > "$tmp/hh1s_rec.saltpan"
"$saltpan" run "$tmp/hh1s_rec.saltpan" -o "$tmp/out.csv" 2>&1 | sed -n 's/.*compile \([0-9.]*\) ms.*/  compile (lower + JIT) for the run: \1 ms/p'
if command -v hyperfine >/dev/null; then
  hyperfine -N -w 2 -r 10 "$saltpan run $tmp/hh1s_rec.saltpan -o $tmp/out.csv" 2>/dev/null | grep -E "Time" | sed 's/^/  end to end, 1 s recorded every 0.1 ms: /'
fi
