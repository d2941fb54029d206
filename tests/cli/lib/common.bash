# common.bash - shared by the tests/cli/*.sh scripts (sourced, not a test itself).
# Each script runs as: bash script.sh <path-to-saltpan> <source-dir>
set -euo pipefail

SALTPAN=${1:?usage: script.sh <path-to-saltpan> <source-dir>}
SRC=${2:?usage: script.sh <path-to-saltpan> <source-dir>}
PY=/usr/bin/python3
# Specs the tests write in $TMP use the shipped reference specs by absolute path: saltpan reads
# modules outside a spec's folder only from the module search path.
export SALTPAN_MODULE_PATH="$SRC/specs/reference"
TMP=$(mktemp -d)
trap 'rm -rf "$TMP"' EXIT
failures=0

fail() {
  echo "FAIL: $*" >&2
  failures=$((failures + 1))
}

# run NAME ARGS...: runs saltpan under a 10 s timeout; sets rc, and leaves its output in
# $TMP/NAME.out and $TMP/NAME.err.
run() {
  local name=$1
  shift
  rc=0
  timeout 10 "$SALTPAN" "$@" >"$TMP/$name.out" 2>"$TMP/$name.err" || rc=$?
}

# expect_rc NAME WANT ARGS...: runs saltpan and checks its exit status.
expect_rc() {
  local name=$1 want=$2
  shift 2
  run "$name" "$@"
  if [ "$rc" -ne "$want" ]; then
    fail "$name: saltpan $* exited $rc, expected $want"
    sed 's/^/    /' "$TMP/$name.err" | head -20 >&2
  fi
}

# expect_grep NAME FILE PATTERN: FILE (out or err of NAME) must match the extended regex.
expect_grep() {
  local name=$1 stream=$2 pattern=$3
  if ! grep -Eq -- "$pattern" "$TMP/$name.$stream"; then
    fail "$name: std$stream does not match /$pattern/"
    head -20 "$TMP/$name.$stream" | sed 's/^/    /' >&2
  fi
}

# same_as_golden DIR NAME FILE: FILE equals the golden DIR/NAME (or becomes it when
# SALTPAN_UPDATE_GOLDEN=1).
same_as_golden() {
  if [ "${SALTPAN_UPDATE_GOLDEN:-0}" = 1 ]; then
    cp "$3" "$1/$2"
  elif ! cmp -s "$3" "$1/$2"; then
    fail "$2 differs from its golden: $(diff "$1/$2" "$3" | head -5)"
  fi
}

# no_crash NAME: the last run neither crashed (status >= 128) nor timed out (124).
no_crash() {
  local name=$1
  if [ "$rc" -ge 128 ] || [ "$rc" -eq 124 ]; then
    fail "$name: saltpan crashed or hung (exit $rc)"
    tail -5 "$TMP/$name.err" | sed 's/^/    /' >&2
  fi
}

# clean_spec FILE: a charge-balanced spec that checks without any diagnostic.
clean_spec() {
  cat >"$1" <<'SPEC'
model CliCell "a charge-balanced cell for the command-line tests"
use std.ions
use std.math
temperature 37 degC
outside bath {
  [Na] = 145 mM
  [K] = 4.5 mM
  [Cl] = 116 mM
  impermeant 33.5 mM valence -1
}
compartment soma {
  sphere diameter 20 µm
  capacitance 1 uF/cm2
  initial V = -65 mV
  outside bath
  inside { [Na] = 11 mM  [K] = 138 mM  [Cl] = 9 mM  impermeant 140 mM valence -1 }
  membrane {
    KLeak 1e-6 cm/s
    NaLeak 4e-8 cm/s
    KGated 36 mS/cm2
  }
}
channel KLeak { carries K }
channel NaLeak { carries Na }
channel KGated {
  carries K
  gate n power 4 {
    opening = 0.1 /ms / exprel(-(V + 55 mV) / 10 mV)
    closing = 0.125 /ms * exp(-(V + 65 mV) / 80 mV)
  }
  q10 3 at 6.3 degC
}
SPEC
}

# short_run_spec FILE: the clean cell with a 2 ms protocol, for tests of what a run writes.
short_run_spec() {
  clean_spec "$1"
  cat >>"$1" <<'SPEC'
protocol short {
  method exponential_euler step 25 us
  duration 2 ms
  record soma.V every 0.5 ms
}
SPEC
}

# warning_spec FILE: the same cell without its impermeant anions: warnings, no errors.
warning_spec() {
  clean_spec "$1"
  sed -i '/impermeant 33.5 mM/d; s/  impermeant 140 mM valence -1//' "$1"
}

# error_spec FILE: one unit error on line 2, column 16.
error_spec() {
  printf 'use std.ions\nconst a = 1 mV + 2 ms\n' >"$1"
}

finish() {
  if [ "$failures" -ne 0 ]; then
    echo "$failures check(s) failed" >&2
    exit 1
  fi
  echo "ok"
}
