#!/usr/bin/env bash
# check_bench.sh - wall time of `saltpan check` on a spec and on 10x and 100x copies of it.
# A benchmark, not a test: it builds nothing and never fails on a figure.
#
#   bash tests/bench/check_bench.sh [SALTPAN] [SPEC] [RUNS]
#     SALTPAN  the executable (default build/saltpan)
#     SPEC   default specs/demo/tidewater_cell.saltpan, or /tmp/t1.saltpan if that is missing
#     RUNS   timed runs per size, at least 20 (default 30); the median is reported
#
# The copies rename every name the spec declares (outside, compartment, channel, pump,
# exchanger, const, fn, ion) with a suffix _cN, so N copies are one valid spec with N times
# the compartments and membrane entries; model, use and temperature lines appear once. Uses
# hyperfine when installed (apt-get install -y hyperfine), else (or with BENCH_NO_HYPERFINE=1)
# a bash loop on date +%s%N.
set -euo pipefail

here=$(cd "$(dirname "$0")" && pwd)
root=$(cd "$here/../.." && pwd)
saltpan=${1:-$root/build/saltpan}
spec=${2:-$root/specs/demo/tidewater_cell.saltpan}
[ -f "$spec" ] || spec=/tmp/t1.saltpan
runs=${3:-30}
[ "$runs" -ge 20 ] || runs=20
[ -x "$saltpan" ] || { echo "check_bench: no executable at $saltpan" >&2; exit 64; }
[ -f "$spec" ] || { echo "check_bench: no spec at $spec" >&2; exit 64; }

tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT

# copies N OUT: N renamed copies of the spec in one file.
copies() {
  /usr/bin/python3 - "$spec" "$1" "$2" <<'PY'
import re, sys
text = open(sys.argv[1], encoding="utf-8").read()
n, out = int(sys.argv[2]), sys.argv[3]
decl = re.compile(r"^\s*(?:outside|compartment|channel|pump|exchanger|const|fn|ion)\s+([A-Za-z_][A-Za-z_0-9]*)", re.M)
names = sorted(set(decl.findall(text)), key=len, reverse=True)
header, body = [], []
for line in text.splitlines(keepends=True):
    (header if re.match(r"\s*(model|use|temperature)\b", line) else body).append(line)
body = "".join(body)
word = re.compile(r"\b(" + "|".join(map(re.escape, names)) + r")\b") if names else None
parts = ["".join(header)]
for k in range(n):
    parts.append(f"\n# copy {k}\n")
    parts.append(word.sub(lambda m: f"{m.group(1)}_c{k}", body) if word and n > 1 else body)
open(out, "w", encoding="utf-8").write("".join(parts))
PY
}

sizes=(1 10 100)
for n in "${sizes[@]}"; do
  copies "$n" "$tmp/x$n.saltpan"
  rc=0
  "$saltpan" check "$tmp/x$n.saltpan" 2>"$tmp/x$n.err" || rc=$?
  if [ "$rc" -ne 0 ]; then
    echo "check_bench: the ${n}x spec does not check cleanly (exit $rc):" >&2
    head -5 "$tmp/x$n.err" >&2
    exit 1
  fi
done

# median_ms N: median wall time of `saltpan check` on the Nx spec, in milliseconds.
median_ms() {
  local file=$tmp/x$1.saltpan
  if [ -z "${BENCH_NO_HYPERFINE:-}" ] && command -v hyperfine >/dev/null; then
    hyperfine -N --warmup 3 --runs "$runs" --export-json "$tmp/h$1.json" \
      "$saltpan check $file" >/dev/null 2>&1
    /usr/bin/python3 -c 'import json,sys; print("%.3f" % (json.load(open(sys.argv[1]))["results"][0]["median"] * 1e3))' "$tmp/h$1.json"
  else
    local i t0 t1
    for i in 1 2 3; do "$saltpan" check "$file" 2>/dev/null; done
    for ((i = 0; i < runs; i++)); do
      t0=$(date +%s%N)
      "$saltpan" check "$file" 2>/dev/null
      t1=$(date +%s%N)
      echo $((t1 - t0))
    done | sort -n | awk '{ a[NR] = $1 } END { m = NR % 2 ? a[(NR + 1) / 2] : (a[NR / 2] + a[NR / 2 + 1]) / 2; printf "%.3f\n", m / 1e6 }'
  fi
}

tool=$([ -z "${BENCH_NO_HYPERFINE:-}" ] && command -v hyperfine >/dev/null && echo hyperfine || echo "bash loop")
echo "saltpan check: $(basename "$spec"), median of $runs runs ($tool)"
printf '%-8s %10s %12s %12s\n' copies bytes "ms/check" "ms/copy"
for n in "${sizes[@]}"; do
  ms=$(median_ms "$n")
  bytes=$(stat -c %s "$tmp/x$n.saltpan")
  printf '%-8s %10s %12s %12s\n' "${n}x" "$bytes" "$ms" "$(awk -v t="$ms" -v n="$n" 'BEGIN { printf "%.3f", t / n }')"
done
