#!/usr/bin/env bash
# standalone_shared.sh - `saltpan build --shared`: a library exporting only the C interface,
# with saltpan_model.h copied beside it; a C program (standalone_c_api.c) that sets a
# parameter and steps agrees with `saltpan run` to 1e-9 relative at the same times.
source "$(dirname "$0")/lib/common.bash"

SQUID=$SRC/specs/reference/squid_axon_1952.saltpan
TIDE=$SRC/specs/demo/tidewater_cell.saltpan
EULER=$SRC/specs/reference/squid_axon_1952_sweeps.saltpan
command -v cc >/dev/null || { echo "FAIL: no C compiler 'cc'" >&2; exit 1; }

mkdir "$TMP/lib"
expect_rc build_squid 0 build "$SQUID" --shared -o "$TMP/lib/libsquid.so"
expect_rc build_tide 0 build "$TIDE" --shared -o "$TMP/lib/libtide.so"
expect_rc build_euler 0 build "$EULER" --shared -o "$TMP/lib/libeuler.so"
cmp -s "$TMP/lib/saltpan_model.h" "$SRC/standalone/saltpan_model.h" || fail "saltpan_model.h was not copied beside the library"

# Only the C interface is exported: no runtime, libstdc++ or LLVM symbols leak out.
others=$(nm -D --defined-only "$TMP/lib/libsquid.so" | awk '{print $3}' | grep -v '^saltpan_model_' || true)
[ -z "$others" ] || fail "the library exports more than saltpan_model_*: $(echo "$others" | head -5 | tr '\n' ' ')"
nm -D --defined-only "$TMP/lib/libsquid.so" | grep -q ' T saltpan_model_create$' || fail "saltpan_model_create is not exported"
# ldd's output is read whole: `grep -q` stopping early would kill ldd, and pipefail would read
# that as "not found".
needed=$(ldd "$TMP/lib/libsquid.so")
if grep -Eiq 'llvm|antlr|saltpan' <<<"$needed"; then
  fail "the library depends on LLVM, ANTLR or saltpan at run time"
fi

# A library from a sanitizer build of saltpan needs the sanitizer runtime in the program too.
sanitize=()
if grep -q libasan <<<"$needed"; then
  sanitize=(-fsanitize=address,undefined)
fi
for lib in squid tide euler; do
  cc -std=c11 -Wall -Wextra -Werror "${sanitize[@]}" -I"$TMP/lib" "$SRC/tests/cli/standalone_c_api.c" \
    -o "$TMP/c_$lib" "$TMP/lib/lib$lib.so" -Wl,-rpath,"$TMP/lib" -lm 2>"$TMP/cc_$lib.err" ||
    fail "the C test does not compile against lib$lib.so: $(head -5 "$TMP/cc_$lib.err")"
done

# compare NAME SPEC STATE COLUMN SCALE: the C program's "LABEL K VALUE" lines against row K of
# the matching `saltpan run` CSV (recorded every step), in the display unit (VALUE * SCALE).
compare() {
  local name=$1 column=$2 scale=$3
  $PY - "$TMP/$name.c.out" "$TMP/$name.set.out" "$TMP/$name.default.out" "$column" "$scale" <<'PY' ||
import csv, sys
got, with_set, default, column, scale = sys.argv[1:]
tables = {}
for label, path in (("set", with_set), ("default", default)):
    rows = list(csv.reader(open(path)))
    index = rows[0].index(column)
    tables[label] = [float(r[index]) for r in rows[1:]]
lines = [l.split() for l in open(got)]
if len(lines) < 6:
    sys.exit(f"only {len(lines)} values from the C program")
bad = 0
for label, k, value in lines:
    want = tables[label][int(k)]
    have = float(value) * float(scale)
    if abs(have - want) > 1e-9 * abs(want):
        print(f"{label} step {k}: C interface {have!r}, saltpan run {want!r}")
        bad += 1
sys.exit(bad)
PY
    fail "$name: the C interface disagrees with saltpan run"
}

# stepped NAME SPEC PROTOCOL PARAMETER SI SETTING STATE STEPS: the C program built for NAME
# sets PARAMETER to SI (in SI units) and prints STATE after each of STEPS; `saltpan run` with
# --set SETTING and without it, recording every step, must agree (PROTOCOL "-": the only one).
stepped() {
  local name=$1 spec=$2 protocol=$3 parameter=$4 si=$5 setting=$6 state=$7 steps=$8
  [ -x "$TMP/c_$name" ] || return 0
  local choose=()
  [ "$protocol" = - ] || choose=(--protocol "$protocol")
  # shellcheck disable=SC2086 # the steps are separate arguments
  timeout 20 "$TMP/c_$name" "$protocol" "$parameter" "$si" "$state" $steps >"$TMP/$name.c.out" \
    2>"$TMP/$name.c.err" || fail "the C program failed on $name: $(head -5 "$TMP/$name.c.err")"
  run "$name.set" run "$spec" "${choose[@]}" --set "$setting" --every 0.01ms
  run "$name.default" run "$spec" "${choose[@]}" --every 0.01ms
  compare "$name" "$state (mV)" 1000
}

# Squid axon (RK4): sodium density 100 mS/cm2 = 1000 S/m^2; V every step (10 us).
stepped squid "$SQUID" - axon.SquidSodium1952.density 1000 'axon.SquidSodium1952.density=100 mS/cm2' axon.V \
  "1 100 1234 5000 20000"
# Tidewater cell (a soma and cables, Crank-Nicolson): delayed K at 20 mS/cm2.
stepped tide "$TIDE" stimulation soma.TidewaterDelayedK.density 200 'soma.TidewaterDelayedK.density=20 mS/cm2' \
  soma.V "1 999 2500 12000 30000"
# Squid axon (fused exponential Euler): sodium density 100 mS/cm2.
stepped euler "$EULER" euler10 axon.SquidSodium1952.density 1000 'axon.SquidSodium1952.density=100 mS/cm2' \
  axon.V "1 100 1234 5000 19999"

# A protocol with an adaptive method cannot be stepped from C: a clear refusal.
EXPERIMENTS=$SRC/specs/reference/squid_axon_1952_experiments.saltpan
expect_rc build_dp 0 build "$EXPERIMENTS" --shared -o "$TMP/lib/libdp.so"
cat >"$TMP/dp.c" <<'C'
#include "saltpan_model.h"
#include <stdio.h>
#include <string.h>
int main(void) {
  saltpan_model *m = saltpan_model_create(saltpan_model_protocol_name(0));
  const char *why = saltpan_model_last_error(NULL);
  printf("%s\n", why);
  return m == NULL && strstr(why, "fixed-step methods only") ? 0 : 1;
}
C
if cc "${sanitize[@]}" -I"$TMP/lib" "$TMP/dp.c" -o "$TMP/dp" "$TMP/lib/libdp.so" -Wl,-rpath,"$TMP/lib" 2>"$TMP/dp.err"; then
  timeout 20 "$TMP/dp" >"$TMP/dp.out" 2>&1 || fail "an adaptive protocol was not refused: $(cat "$TMP/dp.out")"
else
  fail "dp.c does not compile: $(head -3 "$TMP/dp.err")"
fi

finish
