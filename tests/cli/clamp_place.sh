#!/usr/bin/env bash
# clamp_place.sh - a voltage clamp at a place along a cable: the steady state of a soma and a
# sealed-end dendrite clamped part-way along it against the closed forms of passive cable theory,
# with both implicit methods and the interpreter; the clamp current (nA on a piece of a cable)
# is the whole current the clamp supplies, through the membrane and both junctions; a clamp with
# a window holds only inside it. The spec is tests/golden/cables/clamped_dendrite.saltpan.
source "$(dirname "$0")/lib/common.bash"

SPEC=$SRC/tests/golden/cables/clamped_dendrite.saltpan

# Steady state of a soma (a lumped leak at x = 0) and a cable sealed at x = L, held at v0 at x0.
# Between the soma and the clamp v = A (cosh(x/l) + b sinh(x/l)), with b = g As l r_a from the
# soma's current balance; beyond it v = v0 cosh((L - x)/l) / cosh((L - x0)/l). The clamp supplies
# the jump of the axial current at x0. (Rall 1969; Jack, Noble & Tsien 1975, ch. 3; from memory.)
closed_form() {
  "$PY" - "$1" "$2" <<'PY'
import csv, math, sys
rows = [list(map(float, r)) for r in list(csv.reader(open(sys.argv[1])))[1:]]
t, soma, end, clamp = rows[-1]
assert t == 300, t
g = 0.05e-3                                    # S/cm2, the spec's leak
d, L, Ri, h = 2e-4, 500e-4, 100.0, 5e-4        # cm, cm, ohm cm, cm (100 pieces)
As = math.pi * (20e-4) ** 2                    # cm2, the soma sphere
ra = Ri / (math.pi * d * d / 4)                # ohm/cm
lam = math.sqrt(d / (4 * Ri * g))              # cm
x0 = 60.5 * h                                  # the centre of the piece that holds 302 um
v0 = -25.0 - -65.0
b = g * As * lam * ra
A = v0 / (math.cosh(x0 / lam) + b * math.sinh(x0 / lam))
v_soma = A
xe = 99.5 * h                                  # the centre of the last piece
v_end = v0 * math.cosh((L - xe) / lam) / math.cosh((L - x0) / lam)
slope_in = A * (math.sinh(x0 / lam) + b * math.cosh(x0 / lam)) / lam
slope_out = -v0 * math.tanh((L - x0) / lam) / lam
i_clamp = (slope_in - slope_out) / ra * 1e6    # mV/ohm = mA; in nA
want = (-65 + v_soma, -65 + v_end, i_clamp)
for name, got, w, tol in (("soma", soma, want[0], 1e-3), ("end", end, want[1], 1e-3), ("clamp current", clamp, want[2], 1e-3 * abs(want[2]))):
    assert abs(got - w) <= tol, (sys.argv[2], name, got, w)
PY
}

expect_rc cn 0 run "$SPEC" -o "$TMP/cn.csv"
head -1 "$TMP/cn.csv" | grep -q '^time (ms),soma.V (mV),dend\[99\].V (mV),dend\[60\].clamp_current (nA)$' ||
  fail "the clamp current of a piece is not recorded in nA at the clamped piece: $(head -1 "$TMP/cn.csv")"
closed_form "$TMP/cn.csv" crank_nicolson || fail "crank_nicolson: the clamped dendrite is not at the cable-theory steady state"

sed 's/method crank_nicolson/method backward_euler/' "$SPEC" >"$TMP/be.saltpan"
expect_rc be 0 run "$TMP/be.saltpan" -o "$TMP/be.csv"
closed_form "$TMP/be.csv" backward_euler || fail "backward_euler: the clamped dendrite is not at the cable-theory steady state"

expect_rc interp 0 run "$SPEC" --engine interpreter -o "$TMP/interp.csv"
closed_form "$TMP/interp.csv" interpreter || fail "interpreter: the clamped dendrite is not at the cable-theory steady state"

# A window: the piece holds its command exactly inside it, and the whole cell relaxes after it.
sed 's/to -25 mV$/to -25 mV from 100 ms to 200 ms/; s/dend.V at 100 %/dend.V at 302 um/' "$SPEC" >"$TMP/window.saltpan"
expect_rc window 0 run "$TMP/window.saltpan" -o "$TMP/window.csv"
"$PY" - "$TMP/window.csv" <<'PY' || fail "a clamp with a window does not hold only inside it"
import csv, sys
rows = [list(map(float, r)) for r in list(csv.reader(open(sys.argv[1])))[1:]]
before = [r for r in rows if r[0] < 100]
held = [r for r in rows if 100 < r[0] < 200]
after = [r for r in rows if r[0] >= 290]
assert all(abs(r[2] + 65) < 1e-6 and r[3] == 0 for r in before), before[:3]
assert held and all(r[2] == -25 for r in held), held[:3]
assert held[-1][1] > -30 and held[-1][3] > 0
assert all(abs(r[1] + 65) < 1 and r[3] == 0 for r in after), after
PY
finish
