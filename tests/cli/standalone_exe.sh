#!/usr/bin/env bash
# standalone_exe.sh - `saltpan build FILE -o EXE`: the executable writes the same CSV and JSON
# bytes as `saltpan run` for the same options, needs no LLVM or ANTLR library at run time, and
# reports bad options, failed simulations and unwritable outputs with the documented codes.
source "$(dirname "$0")/lib/common.bash"

SQUID=$SRC/specs/reference/squid_axon_1952.saltpan
TIDE=$SRC/specs/demo/tidewater_cell.saltpan
EULER=$SRC/specs/reference/squid_axon_1952_sweeps.saltpan

# exe NAME EXE ARGS...: runs a built executable; sets rc, leaves $TMP/NAME.out and .err.
exe() {
  local name=$1 program=$2
  shift 2
  rc=0
  timeout 20 "$program" "$@" >"$TMP/$name.out" 2>"$TMP/$name.err" || rc=$?
}

# same NAME SPEC EXE ARGS...: `saltpan run SPEC ARGS` and `EXE ARGS` give identical bytes, on
# standard output (CSV) and in -o FILE.json.
same() {
  local name=$1 spec=$2 program=$3
  shift 3
  run "$name.run" run "$spec" "$@"
  exe "$name.exe" "$program" "$@"
  if [ "$rc" -ne 0 ] || ! cmp -s "$TMP/$name.run.out" "$TMP/$name.exe.out"; then
    fail "$name: CSV of the executable (exit $rc) differs from saltpan run $*"
    diff "$TMP/$name.run.out" "$TMP/$name.exe.out" | head -5 >&2
  fi
  [ "$(wc -l <"$TMP/$name.exe.out")" -gt 10 ] || fail "$name: the executable wrote almost nothing"
  run "$name.runj" run "$spec" "$@" -o "$TMP/$name.run.json"
  exe "$name.exej" "$program" "$@" -o "$TMP/$name.exe.json"
  if [ "$rc" -ne 0 ] || ! cmp -s "$TMP/$name.run.json" "$TMP/$name.exe.json"; then
    fail "$name: JSON of the executable (exit $rc) differs from saltpan run $*"
  fi
}

expect_rc build_squid 0 build "$SQUID" -o "$TMP/squid"
expect_grep build_squid err "built .*squid: executable of 'SquidAxon1952', 1 protocol"
expect_rc build_tide 0 build "$TIDE" -o "$TMP/tide"
expect_rc build_euler 0 build "$EULER" -o "$TMP/euler"

# RK4 (the plain kernel), Crank-Nicolson on a tree, and exponential Euler (the fused and
# state-only kernels).
same squid_default "$SQUID" "$TMP/squid" --duration 20ms
same squid_set "$SQUID" "$TMP/squid" --set 'axon.SquidSodium1952.density=100 mS/cm2' --duration 30ms --every 0.05ms
same tide_default "$TIDE" "$TMP/tide" --protocol stimulation --duration 60ms
same tide_set "$TIDE" "$TMP/tide" --protocol stimulation --set soma.TidewaterDelayedK.density=20mS/cm2 \
  --duration 150ms --every 1ms
same euler_default "$EULER" "$TMP/euler" --protocol euler10 --duration 60ms
# The JSON carries the model hash `saltpan hash` prints and the version of the saltpan that built it.
hash=$("$SALTPAN" hash "$SQUID" | cut -d' ' -f1)
grep -q "\"model_hash\": \"$hash\"" "$TMP/squid_default.exe.json" || fail "the JSON does not carry hash $hash"
version=$("$SALTPAN" --version | cut -d' ' -f2)
grep -q "\"version\": \"$version\"" "$TMP/squid_default.exe.json" || fail "the JSON does not carry version $version"

# No LLVM, no ANTLR, no saltpan library at run time.
for program in "$TMP/squid" "$TMP/tide"; do
  if grep -Eiq 'llvm|antlr|saltpan' <<<"$(ldd "$program")"; then
    fail "$(basename "$program") depends on LLVM, ANTLR or saltpan at run time:"
    ldd "$program" | sed 's/^/    /' >&2
  fi
done

# Help, version and bad options.
exe help "$TMP/squid" --help
[ "$rc" -eq 0 ] || fail "--help exited $rc"
grep -q 'axon.SquidSodium1952.density' "$TMP/help.out" || fail "--help does not list the parameters"
grep -q 'step10 ' "$TMP/help.out" || fail "--help does not list the protocols"
grep -q 'not for clinical or diagnostic decisions' "$TMP/help.out" || fail "--help lacks the caution"
exe version "$TMP/squid" --version
grep -q "built by saltpan $version" "$TMP/version.out" || fail "--version does not name saltpan $version"
check_usage() {
  local name=$1 pattern=$2
  shift 2
  exe "$name" "$TMP/squid" "$@"
  [ "$rc" -eq 64 ] || fail "$name: exited $rc, expected 64"
  grep -Eq -- "^squid: error: .*$pattern" "$TMP/$name.err" || fail "$name: no diagnostic /$pattern/: $(head -1 "$TMP/$name.err")"
  [ ! -s "$TMP/$name.out" ] || fail "$name: wrote to standard output"
}
check_usage unknown_option "unknown option '--bogus'" --bogus
check_usage no_protocol "no protocol 'nope'; the model has step10" --protocol nope
check_usage unknown_param "no parameter 'axon.nope'" --set axon.nope=1mV
check_usage wrong_dim "'axon.SquidSodium1952.density' must be a conductance density" --set axon.SquidSodium1952.density=3mV
check_usage bad_value "cannot read the value" --set axon.SquidSodium1952.density=lots
check_usage bad_duration "--duration needs a positive time" --duration -5ms
check_usage odd_every "whole number of steps" --every 0.015ms
check_usage missing_value "--set needs a value" --set
# saltpan run refuses the same options the same way.
run run_wrong_dim run "$SQUID" --set axon.SquidSodium1952.density=3mV
[ "$rc" -eq 64 ] || fail "saltpan run accepted a voltage for a density (exit $rc)"

# A simulation that blows up fails with 65 and writes nothing, as in saltpan run.
exe blowup "$TMP/squid" --set 'axon.capacitance=1e-9 uF/cm2' --duration 1ms -o "$TMP/blowup.csv"
[ "$rc" -eq 65 ] || fail "blowup: exited $rc, expected 65"
grep -q 'the simulation failed at t = ' "$TMP/blowup.err" || fail "blowup: no failure message"
[ ! -e "$TMP/blowup.csv" ] || fail "blowup: an output was written"
run blowup_run run "$SQUID" --set 'axon.capacitance=1e-9 uF/cm2' --duration 1ms
[ "$rc" -eq 65 ] || fail "saltpan run did not fail the same simulation (exit $rc)"

# An output that cannot be written: 73, and no partial file.
exe unwritable "$TMP/squid" --duration 1ms -o "$TMP/no/such/dir/out.csv"
[ "$rc" -eq 73 ] || fail "unwritable: exited $rc, expected 73"
grep -q "^squid: error: cannot create" "$TMP/unwritable.err" || fail "unwritable: no diagnostic"

# The executable works wherever it is copied (nothing refers back to the build tree).
mkdir "$TMP/elsewhere"
cp "$TMP/squid" "$TMP/elsewhere/renamed"
exe moved "$TMP/elsewhere/renamed" --duration 20ms
cmp -s "$TMP/moved.out" "$TMP/squid_default.run.out" || fail "a copied executable gives other output (exit $rc)"

finish
