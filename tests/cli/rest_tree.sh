#!/usr/bin/env bash
# rest_tree.sh - `saltpan rest` on joined compartments: the branched passive cell and an HH soma
# with an HH axon and a passive dendrite (text pinned in tests/golden/cables/, refreshed with
# SALTPAN_UPDATE_GOLDEN=1; JSON checked for its keys and against the text), a tree too big for
# the eigenvalue analysis, a model with a tree and a lone patch, searches stopped by a fold, and
# the rest(...) measure, which does not analyse trees.
source "$(dirname "$0")/lib/common.bash"

GOLDEN=$SRC/tests/golden/cables

cd "$GOLDEN"
expect_rc branched 0 rest branched_cell.saltpan
same_as_golden "$GOLDEN" rest.txt "$TMP/branched.out"
expect_rc hh 0 rest hh_cable.saltpan
same_as_golden "$GOLDEN" rest_hh.txt "$TMP/hh.out"
cd - >/dev/null

# The passive cell rests at its leak reversal everywhere; its slowest mode is the membrane's.
expect_grep branched out '^  steady state 1: stable \(largest real part of an eigenvalue -0\.05 /ms, slowest time constant 20 ms\)$'
expect_grep branched out '^    compartment soma: V = -65\.000000 mV, input resistance [0-9.]+ Mohm$'

expect_rc json 0 rest --format json "$GOLDEN/hh_cable.saltpan"
expect_rc help 0 rest --help
"$PY" - "$TMP/json.out" "$TMP/hh.out" "$TMP/help.out" <<'PY' || fail "json: the tree's document is wrong"
import json, re, sys
doc = json.load(open(sys.argv[1], encoding="utf-8"))
text = open(sys.argv[2], encoding="utf-8").read()
help_text = open(sys.argv[3], encoding="utf-8").read()
for key in ["tool", "version", "caution", "model", "range_mV", "conventions", "compartments"]:
    assert key in doc, key
comps, (tree,) = doc["compartments"], doc["trees"]
assert [c["name"] for c in comps[:3]] == ["soma", "axon[0]", "axon[1]"], comps[:3]
assert len(comps) == 71 and tree["compartments"] == 71 and tree["states"] == 1 * 4 + 40 * 4 + 30
assert [c["name"] for c in tree["cables"]] == ["axon", "dend"] and tree["cables"][0]["length_um"] == 400
limit = tree["max_states_for_eigenvalues"]
assert f"(up to {limit} states;" in help_text.replace("\n", " "), "the help states another limit"
(state,) = tree["steady_states"]
assert state["stable"] is True and len(state["eigenvalues_per_ms"]) == tree["states"]
assert all(e["re"] < 0 for e in state["eigenvalues_per_ms"])
assert state["max_real_eigenvalue_per_ms"] == max(e["re"] for e in state["eigenvalues_per_ms"])
assert abs(state["slowest_time_constant_ms"] * state["max_real_eigenvalue_per_ms"] + 1) < 1e-12
assert state["max_unbalanced_current_uA_per_cm2"] < 1e-9
# Every piece's V, in model order, equals its compartment entry; the soma's matches the text.
assert [c["steady_states"][0]["V_mV"] for c in comps] == state["V_mV"]
soma = comps[0]["steady_states"][0]
assert re.search(r"compartment soma: V = %.6f mV" % soma["V_mV"], text), soma["V_mV"]
assert soma["stable"] is True and soma["tree_steady_state"] == 0
assert set(soma["gates"]) == {"SquidSodium1952.m", "SquidSodium1952.h", "SquidPotassium1952.n"}
# The passive dendrite pulls the soma below the HH patch's rest (-64.996379 mV) towards -70 mV:
# it falls along the dendrite and rises along the axon.
dend = state["cables"][1]
assert -70 < dend["end_V_mV"] < dend["start_V_mV"] < soma["V_mV"] < -64.996379
assert dend["lowest_at"] == "dend[29]"
axon = state["cables"][0]
assert soma["V_mV"] < axon["start_V_mV"] < axon["end_V_mV"] < -64.996379 and axon["highest_at"] == "axon[39]"
# Input resistances: at the soma, and larger at each cable's far end.
assert 0 < soma["input_resistance_MOhm"] < axon["end_input_resistance_MOhm"]
assert comps[1]["steady_states"][0]["input_resistance_MOhm"] is None  # a piece inside a cable
PY

# show gives the same rest: the soma's V and each cable's first and last pieces', with the tree's stability.
expect_rc show 0 show --format json "$GOLDEN/hh_cable.saltpan"
expect_rc show-text 0 show "$GOLDEN/hh_cable.saltpan"
"$PY" - "$TMP/json.out" "$TMP/show.out" "$TMP/show-text.out" <<'PY' || fail "show: the tree's rest differs from saltpan rest's"
import json, re, sys
rest, show = (json.load(open(p, encoding="utf-8")) for p in sys.argv[1:3])
text = open(sys.argv[3], encoding="utf-8").read()
(state,) = rest["trees"][0]["steady_states"]
(soma,) = show["compartments"]
close = lambda a, b: abs(a - b) < 1e-9  # show prints 15 significant digits
(v,) = soma["steady_states"]
assert close(v["V_mV"], state["V_mV"][0]) and v["stable"] is True, v
assert len(show["cables"]) == len(state["cables"]) == 2
for shown, rested in zip(show["cables"], state["cables"]):
    (v,) = shown["steady_states"]
    assert set(v) == {"start_V_mV", "end_V_mV", "stable"} and v["stable"] is True, v
    assert close(v["start_V_mV"], rested["start_V_mV"]) and close(v["end_V_mV"], rested["end_V_mV"]), (v, rested)
assert re.search(r"^  rest of its tree: %.3f mV \(stable\)$" % state["V_mV"][0], text, re.M), text
dend = state["cables"][1]
assert "  rest of its tree, first piece to last: %.3f to %.3f mV (stable)\n" % (dend["start_V_mV"], dend["end_V_mV"]) in text
PY

# More states than the dense eigenvalue analysis takes: solved, stability said not assessed.
sed 's/  pieces 40/  pieces 300/' "$GOLDEN/hh_cable.saltpan" >"$TMP/long.saltpan"
expect_rc long 0 rest "$TMP/long.saltpan"
expect_grep long out '^  steady state 1: stability not assessed \(1234 states, more than the [0-9]+ of the dense eigenvalue analysis\)$'
expect_rc longjson 0 rest --format json "$TMP/long.saltpan"
"$PY" - "$TMP/longjson.out" <<'PY' || fail "json: a tree above the limit claims a stability"
import json, sys
(state,) = json.load(open(sys.argv[1]))["trees"][0]["steady_states"]
assert state["stability_assessed"] is False and state["stable"] is None and state["eigenvalues_per_ms"] is None
PY

# A tree and a patch joined to nothing: each is solved alone.
cat >"$TMP/forest.saltpan" <<'SPEC'
model Forest "invented: a soma with a cable, and a patch joined to nothing"
temperature 20 degC
channel Leak { reversal -65 mV }
channel Other { reversal -50 mV }
compartment soma { sphere diameter 20 um capacitance 1 uF/cm2 initial V = -65 mV membrane { Leak 0.05 mS/cm2 } }
compartment patch { area 100 um2 capacitance 1 uF/cm2 initial V = -65 mV membrane { Other 0.1 mS/cm2 } }
cable dend { grows from soma length 200 um diameter 2 um axial resistivity 100 ohm*cm pieces 4 }
SPEC
expect_rc forest 0 rest "$TMP/forest.saltpan"
expect_grep forest out '^tree of soma: 5 compartments \(1 lumped, dend 4 pieces\), 5 states: 1 steady state$'
expect_grep forest out '^tree of patch: 1 compartment \(1 lumped\), 1 state: 1 steady state$'
expect_grep forest out '^    compartment patch: V = -50\.000000 mV, input resistance 10000 Mohm$'

# A range without a steady state: none found, none claimed.
expect_rc none 0 rest --from -60mV --to -40mV "$GOLDEN/branched_cell.saltpan"
expect_grep none out '^tree of soma: 61 compartments \(1 lumped, dend 50 pieces, branch 10 pieces\), 61 states: 0 steady states$'
# Invented: a bistable soma whose low state and saddle merge when the dendrite is joined: the
# two searches that meet the fold are listed as not followed, in text and JSON.
cat >"$TMP/fold.saltpan" <<'SPEC'
model Fold "invented: a bistable soma on a passive dendrite"
use std.math
temperature 20 degC
compartment cell { sphere diameter 20 um capacitance 1 uF/cm2 initial V = -70 mV
  membrane { InventedLeak 0.3 mS/cm2 InventedPersistentInward 3 mS/cm2 } }
channel InventedLeak { reversal -70 mV }
channel DendLeak { reversal -70 mV }
channel InventedPersistentInward { reversal 50 mV gate p { steady = logistic((V + 45 mV) / 4 mV); tau = 1 ms } }
cable dend { grows from cell length 220 um diameter 1 um axial resistivity 100 ohm*cm pieces 40 membrane { DendLeak 0.3 mS/cm2 } }
SPEC
expect_rc fold 0 rest "$TMP/fold.saltpan"
expect_grep fold out '^tree of cell: 41 compartments \(1 lumped, dend 40 pieces\), 42 states: 1 steady state$'
[ "$(grep -c '^  not followed: the isopotential steady state at -6[0-9.]* mV: the continuation stops at a fold' "$TMP/fold.out")" = 2 ] ||
  fail "fold: the two searches that meet the fold are not both listed"
expect_rc foldjson 0 rest --format json "$TMP/fold.saltpan"
"$PY" - "$TMP/foldjson.out" <<'PY' || fail "json: the searches that stopped are not listed"
import json, sys
(tree,) = json.load(open(sys.argv[1]))["trees"]
assert len(tree["steady_states"]) == 1 and len(tree["not_followed"]) == 2
assert all("fold" in l["why"] and l["isopotential_V_mV"] < -60 for l in tree["not_followed"])
PY

# The rest(...) measures read the tree's steady state: a soma whose leak reverses at -70 mV joined
# to a dendrite whose leak reverses at -60 mV rests between the two (alone it would rest at -70
# mV), and each measure equals what `saltpan rest` reports for that piece.
cat >"$TMP/mixed.saltpan" <<'SPEC'
model Mixed "invented cell for the rest tests: every number here is invented"
temperature 20 degC
channel SomaLeak { reversal -70 mV }
channel DendLeak { reversal -60 mV }
compartment soma {
  sphere diameter 20 um
  capacitance 1 uF/cm2
  initial V = -65 mV
  membrane { SomaLeak 0.1 mS/cm2 }
}
cable dend { grows from soma length 500 um diameter 2 um axial resistivity 100 ohm*cm pieces 50 membrane { DendLeak 0.1 mS/cm2 } }
expect rest(soma) in -64 mV to -62 mV
expect rest(dend at 100 %) in -63 mV to -61 mV
expect input_resistance(soma) > 0 Mohm
SPEC
expect_rc mixed 0 test --json "$TMP/mixed.json" "$TMP/mixed.saltpan"
expect_rc mixedrest 0 rest --format json "$TMP/mixed.saltpan"
"$PY" - "$TMP/mixed.json" "$TMP/mixedrest.out" <<'PY' || fail "the rest(...) measures are not the tree's steady state"
import json, sys
measured = [e["measured_si"] for e in json.load(open(sys.argv[1]))["expectations"]]
(tree,) = json.load(open(sys.argv[2]))["trees"]
(state,) = tree["steady_states"]
volts = state["V_mV"]
assert abs(measured[0] * 1e3 - volts[0]) < 1e-6, (measured, volts[0])
assert abs(measured[1] * 1e3 - volts[-1]) < 1e-6, (measured, volts[-1])
PY
finish
