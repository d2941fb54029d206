#!/usr/bin/env bash
# run.sh - builds the libFuzzer harness (clang, ASan + UBSan) and fuzzes the whole
# pipeline. Usage, from anywhere:
#   bash tests/fuzz/run.sh [SECONDS] [BUILD_DIR] [LIBFUZZER_FLAG...]
# SECONDS defaults to 600, BUILD_DIR to build-fuzz; further flags go to libFuzzer, e.g.
# -detect_leaks=0 to look past a known leak.
# Seeds: stdlib/*.saltpan, specs/**/*.saltpan, tests/diagnostics/**/*.saltpan, tests/fuzz/seeds/.
# The working corpus lives in BUILD_DIR/fuzz-corpus and grows across runs; crashes,
# timeouts and leaks land in BUILD_DIR/fuzz-artifacts/. Copy a reproducer worth keeping
# into tests/fuzz/regressions/ (ctest -R fuzz.regressions replays every file there).
# Replay one input:   BUILD_DIR/saltpan_fuzz_check path/to/input
set -euo pipefail

seconds=${1:-600}
shift $(( $# > 0 ? 1 : 0 ))
build_arg=${1:-}
shift $(( $# > 0 ? 1 : 0 ))
here=$(cd "$(dirname "$0")" && pwd)
root=$(cd "$here/../.." && pwd)
build=${build_arg:-$root/build-fuzz}
case $build in /*) ;; *) build=$root/$build ;; esac

cc=${CC:-clang-19}
cxx=${CXX:-clang++-19}
cmake -S "$root" -B "$build" -G Ninja -DSALTPAN_FUZZ=ON -DSALTPAN_SANITIZE=ON \
  -DCMAKE_C_COMPILER="$cc" -DCMAKE_CXX_COMPILER="$cxx" >/dev/null
cmake --build "$build" --target saltpan_fuzz_check

corpus=$build/fuzz-corpus
artifacts=$build/fuzz-artifacts
mkdir -p "$corpus" "$artifacts"
shopt -s nullglob globstar
for seed in "$root"/stdlib/*.saltpan "$root"/specs/**/*.saltpan "$root"/tests/diagnostics/**/*.saltpan \
            "$here"/seeds/*.saltpan; do
  if [ -f "$seed" ]; then
    name=${seed#"$root"/}
    cp "$seed" "$corpus/seed-${name//\//_}"
  fi
done

# `use "file"` is resolved against the working directory: run in an empty one.
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
cd "$work"
# -detect_leaks=0 only stops per-input leak checks; LeakSanitizer still reports at exit.
for flag in "$@"; do
  if [ "$flag" = -detect_leaks=0 ]; then export ASAN_OPTIONS=${ASAN_OPTIONS:+$ASAN_OPTIONS:}detect_leaks=0; fi
done
# One process, output on stderr (with -jobs=N libFuzzer writes fuzz-N.log instead).
# -timeout: a single input taking 10 s is a hang. -max_len: specs are small; 64 KiB
# still reaches the parser's length limits.
exec "$build/saltpan_fuzz_check" "$corpus" \
  -dict="$here/saltpan.dict" -max_total_time="$seconds" -timeout=10 -max_len=65536 \
  -print_final_stats=1 -artifact_prefix="$artifacts/" "$@"
