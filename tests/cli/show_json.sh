# show_json.sh - `saltpan show --format json`: temperature, ions with reversal potentials, GHK rest.
source "$(dirname "$0")/lib/common.bash"

clean_spec "$TMP/clean.saltpan"
expect_rc show 0 show --format json "$TMP/clean.saltpan"
"$PY" - "$TMP/show.out" <<'PYEOF' || fail "show --format json: wrong document"
import json, math, sys
doc = json.load(open(sys.argv[1], encoding="utf-8"))
# 37 degC = 310.15 K (0 degC = 273.15 K exactly).
assert abs(doc["temperature_K"] - 310.15) < 1e-9, doc["temperature_K"]
comps = doc["compartments"]
assert isinstance(comps, list) and len(comps) == 1, comps
soma = comps[0]
assert soma["name"] == "soma"
ions = {i["ion"]: i for i in soma["ions"]}
assert sorted(ions) == ["Cl", "K", "Na"], sorted(ions)
for i in soma["ions"]:
    assert {"ion", "charge", "inside_mM", "outside_mM", "reversal_mV"} <= set(i), sorted(i)
# CODATA 2018 exact constants.
R, F = 8.31446261815324, 96485.33212331001
rt_f = R * 310.15 / F * 1e3  # mV
for name, z, cin, cout in (("Na", 1, 11, 145), ("K", 1, 138, 4.5), ("Cl", -1, 9, 116)):
    i = ions[name]
    assert i["charge"] == z, i
    assert i["inside_mM"] == cin and i["outside_mM"] == cout, i
    want = rt_f / z * math.log(cout / cin)
    assert abs(i["reversal_mV"] - want) < 1e-9, (name, i["reversal_mV"], want)
# Nernst of K at 37 degC with 4.5/138 mM: -91.490 mV.
assert abs(ions["K"]["reversal_mV"] - -91.490) < 1e-3
# GHK rest from the two permeability leaks (Goldman 1943; Hodgkin & Katz 1949).
pK, pNa = 1e-6, 4e-8
want = rt_f * math.log((pK * 4.5 + pNa * 145) / (pK * 138 + pNa * 11))
assert soma["ghk_rest_mV"] is not None
assert abs(soma["ghk_rest_mV"] - want) < 1e-9, (soma["ghk_rest_mV"], want)
assert soma["ghk_channels"] == 2
PYEOF

# Text and JSON report the same K reversal, to the printed precision.
expect_rc text 0 show "$TMP/clean.saltpan"
expect_grep text out "^  K +\+1 +138 +4\.5 +-91\.490"

# Without permeability channels there is no GHK rest: null, not a number.
sed -e 's/KLeak 1e-6 cm\/s/KLeak 0.1 mS\/cm2/' -e 's/NaLeak 4e-8 cm\/s/NaLeak 0.01 mS\/cm2/' \
  "$TMP/clean.saltpan" >"$TMP/ohmic.saltpan"
expect_rc ohmic 0 show --format json "$TMP/ohmic.saltpan"
"$PY" -c 'import json,sys; c=json.load(open(sys.argv[1]))["compartments"][0]; assert c["ghk_rest_mV"] is None, c["ghk_rest_mV"]' \
  "$TMP/ohmic.out" || fail "ohmic: ghk_rest_mV should be null"

# Errors: no document on stdout, diagnostics on stderr.
error_spec "$TMP/error.saltpan"
expect_rc error 65 show --format json "$TMP/error.saltpan"
[ -s "$TMP/error.out" ] && fail "error: show printed a document for a spec with errors"
expect_grep error err "error.saltpan:2:16: error: "

finish
