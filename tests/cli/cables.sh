#!/usr/bin/env bash
# cables.sh - a branched cell (a soma, a cable grown from it, a branch grown from the cable's
# middle) through the commands: check, show (text and JSON), methods, run (interpreter pinned, the JIT
# within rounding of it), build (the executable equals run), the charge balance of a tree with
# dynamic ions, rest, which solves the tree as one system (rest_tree.sh pins its output), and
# conduction_velocity on an axon. Goldens in tests/golden/cables/, refreshed with SALTPAN_UPDATE_GOLDEN=1.
source "$(dirname "$0")/lib/common.bash"

GOLDEN=$SRC/tests/golden/cables
SPEC=$GOLDEN/branched_cell.saltpan

expect_rc check 0 check "$SPEC"
cd "$GOLDEN"
run show show branched_cell.saltpan
same_as_golden "$GOLDEN" show.txt "$TMP/show.out"
run json show --format json branched_cell.saltpan
"$PY" - "$TMP/json.out" <<'PY' || fail "show --format json: the cables are not described"
import json, sys
d = json.load(open(sys.argv[1]))
assert [c["name"] for c in d["compartments"]] == ["soma"], d["compartments"]
dend, branch = d["cables"]
assert (dend["name"], dend["pieces"], dend["length_um"], dend["grows_from"]) == ("dend", 50, 100 * 5, "soma")
assert (branch["name"], branch["pieces"], branch["grows_from"]) == ("branch", 10, "dend")
# lambda = sqrt(Rm d / (4 Ri)): 20 kOhm cm2, 2 um, 100 Ohm cm give 1 mm (Rall 1969).
assert abs(dend["length_constant_um"] - 1000) < 1e-9, dend["length_constant_um"]
assert abs(dend["electrotonic_length"] - 0.5) < 1e-12
PY
run methods methods branched_cell.saltpan
same_as_golden "$GOLDEN" methods.md "$TMP/methods.out"
grep -q 'Morphology and discretisation' "$TMP/methods.out" || fail "methods does not describe the morphology"
cd - >/dev/null

expect_rc interp 0 run "$SPEC" --engine interpreter -o "$TMP/interp.csv"
same_as_golden "$GOLDEN" kick.interpreter.csv "$TMP/interp.csv"
head -1 "$TMP/interp.csv" | grep -q '^time (ms),soma.V (mV),dend\[44\].V (mV),dend\[25\].V (mV),branch\[9\].V (mV)$' ||
  fail "the recorded places are not the pieces they fall in: $(head -1 "$TMP/interp.csv")"
expect_rc jit 0 run "$SPEC" -o "$TMP/jit.csv"
"$PY" - "$TMP/interp.csv" "$TMP/jit.csv" <<'PY' || fail "the JIT and the interpreter disagree on the branched cell"
import csv, sys
a, b = (list(csv.reader(open(p))) for p in sys.argv[1:])
assert a[0] == b[0] and len(a) == len(b)
for x, y in zip(a[1:], b[1:]):
    for u, v in zip(x, y):
        assert abs(float(u) - float(v)) <= 1e-9 * max(1.0, abs(float(u))), (u, v)
PY

# A clamped soma holds its command while the tree charges through it (the clamped row of the
# implicit system is V = command); after the clamp the whole tree relaxes together.
sed 's/  inject dend at 450 um 0.1 nA from 10 ms to 40 ms/  clamp soma at -40 mV from 10 ms to 40 ms/' "$SPEC" >"$TMP/clamp.saltpan"
expect_rc clamp 0 run "$TMP/clamp.saltpan" -o "$TMP/clamp.csv"
"$PY" - "$TMP/clamp.csv" <<'PY' || fail "a clamped soma does not hold its command, or the tree does not follow it"
import csv, sys
rows = [list(map(float, r)) for r in list(csv.reader(open(sys.argv[1])))[1:]]
held = [r for r in rows if 10 < r[0] < 40]
assert held and all(r[1] == -40 for r in held), held[:3]
assert -65 < held[-1][2] < -40 and held[-1][2] > held[0][2]  # the far dendrite charges towards -40 mV
PY

expect_rc build 0 build "$SPEC" -o "$TMP/cell"
"$TMP/cell" -o "$TMP/exe.csv" >/dev/null 2>&1 || fail "the built cell did not run"
cmp -s "$TMP/exe.csv" "$TMP/jit.csv" || fail "the built executable's trace differs from saltpan run's"

# RK4 steps a tree fused in SIMD lanes too: every lane gives what a scalar run gives, bit for bit.
SWEEP=$GOLDEN/rk4_sweep_cell.saltpan
expect_rc lanes 0 sweep --sweep g --progress none -o "$TMP/lanes.csv" "$SWEEP"
expect_grep lanes err 'batched, [0-9]+ lanes'
expect_rc scalar 0 sweep --sweep g --progress none --engine scalar -o "$TMP/scalar.csv" "$SWEEP"
cmp -s "$TMP/lanes.csv" "$TMP/scalar.csv" || fail "lanes and scalar points differ on a tree"
# Interpreted points give each of several threads its own interpreters (more than two threads).
expect_rc interpreted 0 sweep --sweep g --progress none --engine interpreter --threads 4 -o "$TMP/interp4.csv" "$SWEEP"
"$PY" - "$TMP/interp4.csv" "$TMP/scalar.csv" <<'PY' || fail "interpreted points differ from native ones beyond rounding"
import csv, sys
a, b = (list(csv.reader(open(p))) for p in sys.argv[1:])
assert a[0] == b[0] and len(a) == len(b)
for x, y in zip(a[1:], b[1:]):
    for u, v in zip(x, y):
        if u and v:
            assert abs(float(u) - float(v)) <= 1e-9 * max(1.0, abs(float(u))), (u, v)
PY

# Rest solves the joined pieces together: one tree, every piece at the leak reversal.
expect_rc rest 0 rest --format json "$SPEC"
"$PY" - "$TMP/rest.out" <<'PY' || fail "rest: the branched cell is not one tree resting at -65 mV"
import json, sys
d = json.load(open(sys.argv[1]))
(tree,) = d["trees"]
(state,) = tree["steady_states"]
assert tree["compartments"] == 61 and len(state["V_mV"]) == 61
assert all(abs(v + 65) < 1e-9 for v in state["V_mV"]), state["V_mV"]
assert state["stable"] is True
PY

# Every current of the soma and its cable carried by dynamic Na and K: run reports one charge
# balance for the whole tree, which RK4 keeps to rounding (piece by piece, the axial currents
# would put it off by tens of percent).
cat >"$TMP/ions.saltpan" <<'SPEC'
use std.ions
use std.math
temperature 37 degC
outside bath { [Na] = 145 mM  [K] = 5 mM  impermeant 150 mM valence -1 }
compartment soma {
  sphere diameter 10 um
  capacitance 1 uF/cm2
  initial V = -60 mV
  inside { [Na] = 20 mM dynamic  [K] = 130 mM dynamic  impermeant 150 mM valence -1 }
  membrane { NaLeak 2e-7 cm/s  KLeak 5e-6 cm/s  Pump 20 uA/cm2 }
}
cable dend { grows from soma; length 100 um; diameter 1 um; axial resistivity 100 ohm*cm; pieces 5 }
channel NaLeak { carries Na }
channel KLeak { carries K }
pump Pump { cycle 3 Na out, 2 K in  activity = hill([Na]in, 10 mM, 1.5) }
protocol feed {
  method rk4 step 10 us
  duration 20 ms
  inject dend at 90 % 0.02 nA from 1 ms to 15 ms
  record soma.V, dend.V at 90 % every 1 ms
}
SPEC
expect_rc ions 0 run "$TMP/ions.saltpan" -o "$TMP/ions.csv"
expect_grep ions err 'charge balance: membrane charge and dynamic ion charge agree to [0-9.]+e-(1[0-9]|[2-9][0-9]) \(relative\)'


# conduction_velocity: the path distance between the two places' piece centres (2.05 mm and
# 8.05 mm: pieces of 100 um) over the difference of the first upward crossings of 0 mV, which
# are computed here again from the recorded trace.
AXON=$GOLDEN/axon_velocity.saltpan
expect_rc velocity 0 test --json "$TMP/velocity.json" "$AXON"
expect_rc velocity-run 0 run "$AXON" -o "$TMP/axon.csv"
"$PY" - "$TMP/velocity.json" "$TMP/axon.csv" <<'PY' || fail "conduction_velocity is not the distance over the delay"
import csv, json, sys
measured = json.load(open(sys.argv[1]))["expectations"][0]["measured_si"]
rows = [list(map(float, r)) for r in list(csv.reader(open(sys.argv[2])))[1:]]
def first_crossing(col):
    for a, b in zip(rows, rows[1:]):
        if a[col] < 0 <= b[col]:
            return (a[0] + (b[0] - a[0]) * (0 - a[col]) / (b[col] - a[col])) * 1e-3
expected = 6e-3 / (first_crossing(2) - first_crossing(1))
assert 1.0 < expected < 2.0, expected
assert abs(measured - expected) <= 1e-6 * expected, (measured, expected)
PY
expect_grep velocity out 'conduction_velocity\(axon.V at 2 mm, axon.V at 8 mm\) > 0 m/s: measured [0-9.]+ m/s; expected > 0 m/s'
# A sweep's velocity column is in m/s too, and equals the expectation's measure; the cable's
# parameter is named for the cable and sets every piece.
cat "$AXON" - >"$TMP/velocity_sweep.saltpan" <<'SPEC'
sweep sodium {
  vary axon.SquidSodium1952.density values 120 mS/cm2, 60 mS/cm2
  measure kick: conduction_velocity(axon.V at 2 mm, axon.V at 8 mm)
}
SPEC
expect_rc velocity-sweep 0 sweep --sweep sodium --progress none -o "$TMP/velocity_sweep.csv" "$TMP/velocity_sweep.saltpan"
"$PY" - "$TMP/velocity.json" "$TMP/velocity_sweep.csv" <<'PY' || fail "a sweep's conduction velocity is not the expectation's, in m/s"
import csv, json, sys
measured = json.load(open(sys.argv[1]))["expectations"][0]["measured_si"]
rows = list(csv.DictReader(open(sys.argv[2])))
column = "kick: conduction_velocity(axon.V at 2 mm, axon.V at 8 mm) (m/s)"
assert column in rows[0], list(rows[0])
assert abs(float(rows[0][column]) - measured) <= 1e-9 * measured, (rows[0][column], measured)
# The pieces share the cable's parameter: half the sodium density everywhere slows the spike
# (were one piece varied, the velocity between 2 and 8 mm would not change).
assert float(rows[1][column]) < 0.9 * measured, (rows[1][column], measured)
PY
# Without a stimulus no spike arrives: the expectation fails and says where none came.
sed 's/20 nA from 1 ms/0 nA from 1 ms/' "$AXON" >"$TMP/quiet.saltpan"
expect_rc quiet 1 test "$TMP/quiet.saltpan"
expect_grep quiet out "measured no spike at 'axon\[20\]\.V' \(no spike\)"

# A sweep measures a cable at a place too, in the unit of the probe there.
sed 's/  measure kick: peak(soma.V)/  measure kick: peak(soma.V)\n  measure kick: peak(dend.V at 450 um)/' "$SWEEP" >"$TMP/placed.saltpan"
expect_rc placed 0 sweep --sweep g --progress none -o "$TMP/placed.csv" "$TMP/placed.saltpan"
head -1 "$TMP/placed.csv" | grep -q ',kick: peak(dend.V at 450 um) (mV),' ||
  fail "a sweep's measure at a place has no unit: $(head -1 "$TMP/placed.csv")"
"$PY" - "$TMP/placed.csv" <<'PY' || fail "a sweep's measure at a place is not the potential of the far dendrite in mV"
import csv, sys
rows = list(csv.DictReader(open(sys.argv[1])))
assert all(-65 < float(r["kick: peak(dend.V at 450 um) (mV)"]) < -20 for r in rows), rows
PY

finish
