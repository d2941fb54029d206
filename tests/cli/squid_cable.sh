#!/usr/bin/env bash
# squid_cable.sh - the 1952 squid axon cable (specs/reference/squid_axon_1952_cable.saltpan): its
# conduction velocity converges as the step and the pieces are refined (second order in the step:
# each halving moves it by well under half as much as the one before), and stays within 0.2 m/s of
# the 18.8 m/s Hodgkin & Huxley 1952 computed (Part III; from memory).
source "$(dirname "$0")/lib/common.bash"

SPEC=$SRC/specs/reference/squid_axon_1952_cable.saltpan
velocity() { # pieces step_us -> the measured velocity in m/s
  sed -e "s/  pieces 1200/  pieces $1/" -e "s/method crank_nicolson step 5 us/method crank_nicolson step $2 us/" \
    "$SPEC" >"$TMP/cable_$1_$2.saltpan"
  "$SALTPAN" test --json "$TMP/v.json" "$TMP/cable_$1_$2.saltpan" >/dev/null 2>&1 || true
  "$PY" -c 'import json,sys; print(json.load(open(sys.argv[1]))["expectations"][0]["measured_si"])' "$TMP/v.json"
}
v10=$(velocity 1200 10)
v5=$(velocity 1200 5)
v25=$(velocity 1200 2.5)
p600=$(velocity 600 5)
"$PY" - "$v10" "$v5" "$v25" "$p600" <<'PY' || fail "the conduction velocity does not converge as the step and pieces are refined"
import sys
v10, v5, v25, p600 = map(float, sys.argv[1:])
print(f"velocity at 10, 5, 2.5 us: {v10:.4f}, {v5:.4f}, {v25:.4f} m/s; 600 pieces at 5 us: {p600:.4f} m/s")
first, second = abs(v5 - v10), abs(v25 - v5)
assert second < 0.4 * first, (first, second)   # second order: about a quarter
assert abs(p600 - v5) < 0.01, (p600, v5)        # 100 um pieces already agree with 50 um ones
assert abs(v25 - 18.8) < 0.2, v25               # Hodgkin & Huxley 1952, Part III (from memory)
PY
expect_rc spec 0 test "$SPEC"
expect_grep spec out '3 passed, 0 failed'
finish
