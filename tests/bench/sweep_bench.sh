#!/usr/bin/env bash
# sweep_bench.sh - sweep throughput: the 4096-point g_Na x g_K grid of the 1952 squid axon
# (sweep `conductances` of specs/reference/squid_axon_1952_sweeps.saltpan: 200 ms each, exponential
# Euler at 10 us, spike count and rate). saltpan's batched lanes, its scalar engine and a
# hand-written -O3 -march=native scalar loop, in points per second per core; then thread
# scaling, and the time a kill costs a resumed sweep.
# Usage: tests/bench/sweep_bench.sh [BUILD_DIR]   (a benchmark, not a test; prints measured ratios)
set -euo pipefail
build=${1:-build}
src=$(cd "$(dirname "$0")/../.." && pwd)
saltpan=$build/saltpan
# In a build tree, build what the benchmark runs (benchmarks are not in the default build).
if [ -f "$build/CMakeCache.txt" ]; then cmake --build "$build" --target benchmarks >/dev/null; fi
spec=$src/specs/reference/squid_axon_1952_sweeps.saltpan
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
rate() { sed -n 's/.*s (\([0-9.]*\) points\/s).*/\1/p'; }
best() { sort -g | tail -1; }
sweep() { "$saltpan" sweep --sweep conductances --progress none -o "$tmp/out.csv" "$@" "$spec" 2>&1 | rate; }
hand=$(for i in 1 2 3; do "$build/saltpan_bench_hh_sweep" 64 | sed -n 's/.*s (\([0-9.]*\) points\/s).*/\1/p'; done | best)
echo "4096-point squid-axon sweep, 200 ms per point (best of 3, points/s):"
echo "  hand-written scalar C++, 1 thread: $hand"
for lanes in 8 4 2; do
  r=$(for i in 1 2 3; do sweep --threads 1 --lanes "$lanes" || true; done | best)
  [ -n "$r" ] && awk -v r="$r" -v h="$hand" -v l="$lanes" 'BEGIN { printf "  saltpan batched, %d lanes, 1 thread: %s (%.2fx hand-written)\n", l, r, r / h }'
done
scalar=$(for i in 1 2 3; do sweep --threads 1 --engine scalar; done | best)
awk -v r="$scalar" -v h="$hand" 'BEGIN { printf "  saltpan scalar JIT, 1 thread:        %s (%.2fx hand-written)\n", r, r / h }'
one=$(for i in 1 2 3; do sweep --threads 1; done | best)
two=$(for i in 1 2 3; do sweep --threads 2; done | best)
awk -v a="$one" -v b="$two" 'BEGIN { printf "  thread scaling, 1 -> 2 threads: %.2fx (%s -> %s)\n", b / a, a, b }'
# Resume: kill a 1-thread run part way, finish it, and compare with an uninterrupted run.
t0=$(date +%s.%N); "$saltpan" sweep --sweep conductances --threads 1 --progress none -o "$tmp/full.csv" "$spec" 2>/dev/null
full=$(echo "$(date +%s.%N) - $t0" | bc)
t0=$(date +%s.%N)
"$saltpan" sweep --sweep conductances --threads 1 --progress none -o "$tmp/r.csv" "$spec" 2>/dev/null & pid=$!
sleep "$(echo "$full / 2" | bc -l)"; kill -9 "$pid"; wait "$pid" 2>/dev/null || true
"$saltpan" sweep --sweep conductances --threads 1 --progress none -o "$tmp/r.csv" "$spec" 2>/dev/null
resumed=$(echo "$(date +%s.%N) - $t0" | bc)
cmp -s "$tmp/full.csv" "$tmp/r.csv" && same=identical || same=DIFFERENT
awk -v f="$full" -v r="$resumed" -v s="$same" 'BEGIN {
  printf "  killed at half time and resumed: %.2f s against %.2f s uninterrupted (%.2f s lost), output %s\n", r, f, r - f, s }'
# The same grid must give the same spikes in both: a check that the comparison is fair.
echo "  spikes over the grid: hand-written $("$build/saltpan_bench_hh_sweep" 64 | sed -n 's/.*, \([0-9]*\) spikes.*/\1/p'), saltpan $(awk -F, 'NR > 1 { s += $4 } END { print s }' "$tmp/full.csv")"
