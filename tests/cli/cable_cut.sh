#!/usr/bin/env bash
# cable_cut.sh - `pieces N per length constant at F`: the piece count of a tapered passive cable
# and of a thin twig against the AC length constant computed here from the complex propagation
# constant of cable theory, gamma = sqrt(z_a y_m) with z_a = 4 Ri / (pi d^2) and
# y_m = pi d (G + i w C) (Koch 1999, ch. 2; Jack, Noble & Tsien 1975; from memory), at the
# thinnest end; a 1952 squid cable cut at 100 Hz, whose G at rest comes from the gates'
# steady states; show (text and JSON), methods and fmt round-trip.
source "$(dirname "$0")/lib/common.bash"

GOLDEN=$SRC/tests/golden/cables
SPEC=$GOLDEN/tapered_cut.saltpan

expect_rc check 0 check "$SPEC"
run json show --format json "$SPEC"
"$PY" - "$TMP/json.out" <<'PY' || fail "show --format json: the pieces are not those of the length constant at the frequency"
import cmath, json, math, sys
d = {c["name"]: c for c in json.load(open(sys.argv[1]))["cables"]}
def ac_length_constant(f, d_m, ri_ohm_m, g_s_m2, c_f_m2):
    z = 4 * ri_ohm_m / (math.pi * d_m**2)
    y = math.pi * d_m * complex(g_s_m2, 2 * math.pi * f * c_f_m2)
    return 1 / cmath.sqrt(z * y).real
# dend: 800 um tapering 3 to 1 um, Ri 100 ohm cm, G 0.05 mS/cm2, C 1 uF/cm2 (invented).
lam = ac_length_constant(100, 1e-6, 1.0, 0.5, 0.01)
cut = d["dend"]["cut_by_length_constant"]
assert abs(cut["length_constant_um"] - lam * 1e6) < 1e-9 * lam * 1e6, (cut, lam)
assert (cut["pieces_per_length_constant"], cut["frequency_Hz"]) == (10, 100), cut
assert d["dend"]["pieces"] == math.ceil(800e-6 * 10 / lam) == 30, d["dend"]["pieces"]
assert d["dend"]["piece_length_um"] <= lam * 1e6 / 10
# twig: at 0 Hz the DC length constant sqrt(d / (4 Ri G)) = 250 um, so 50 um at 4 per length
# constant is one piece (Rall 1969).
lam0 = ac_length_constant(0, 0.5e-6, 1.0, 2.0, 0.01)
assert abs(lam0 - 250e-6) < 1e-15
assert d["twig"]["pieces"] == 1 and abs(d["twig"]["cut_by_length_constant"]["length_constant_um"] - 250) < 1e-9
PY
run text show "$SPEC"
expect_grep text out "30 pieces of 26.67 um \\(at most 1/10 of its length constant at 100 Hz, 271.1 um\\)"
expect_grep text out "1 piece of 50 um"
run methods methods "$SPEC"
expect_grep methods out "as many as make each at most 1/10 of the length constant at"

# The 1952 axon (Hodgkin & Huxley 1952: diameter 476 um, 35.4 ohm cm) as a 1 cm cable cut at
# 100 Hz: its G at rest is the leak plus the open Na and K channels at the gates' steady states
# at -65 mV.
sed -n '1,/^}/p' "$SRC/tests/golden/cables/axon_velocity.saltpan" |
  sed -e 's/^  pieces .*/  pieces 20 per length constant at 100 Hz/' -e 's/^  diameter .*/  diameter 476 um/' \
    -e 's/^  axial resistivity .*/  axial resistivity 35.4 ohm*cm/' >"$TMP/axon.saltpan"
grep -q "per length constant" "$TMP/axon.saltpan" || fail "the axon spec has no 'pieces' line to replace"
run axon show --format json "$TMP/axon.saltpan"
"$PY" - "$TMP/axon.out" <<'PY' || fail "the squid cable is not cut by its length constant at 100 Hz"
import cmath, json, math, sys
doc = json.load(open(sys.argv[1]))
cable = doc["cables"][0]
# Rates of Hodgkin & Huxley 1952 (eqs. 12-13, 20-21, 23-24), V in mV, at 6.3 degC, scaled by
# Q10 = 3 to the spec's temperature; only the steady states matter, so the scaling cancels.
v = -65.0
u = v + 65  # displacement from rest in the 1952 convention, depolarisation positive
am = 0.1 * (25 - u) / (math.exp((25 - u) / 10) - 1); bm = 4 * math.exp(-u / 18)
ah = 0.07 * math.exp(-u / 20); bh = 1 / (math.exp((30 - u) / 10) + 1)
an = 0.01 * (10 - u) / (math.exp((10 - u) / 10) - 1); bn = 0.125 * math.exp(-u / 80)
m, h, n = am / (am + bm), ah / (ah + bh), an / (an + bn)
g = (120 * m**3 * h + 36 * n**4 + 0.3) * 10  # mS/cm2 to S/m2
d = cable["diameter_um"] * 1e-6
ri = cable["axial_resistivity_ohm_cm"] / 100
z = 4 * ri / (math.pi * d**2)
y = math.pi * d * complex(g, 2 * math.pi * 100 * 0.01)
lam = 1 / cmath.sqrt(z * y).real
cut = cable["cut_by_length_constant"]
assert abs(cut["length_constant_um"] / (lam * 1e6) - 1) < 1e-6, (cut["length_constant_um"], lam * 1e6)
assert cable["pieces"] == math.ceil(cable["length_um"] * 1e-6 * 20 / lam), (cable["pieces"], lam)
PY

# fmt keeps the phrase and the hash reads it.
expect_rc fmt 0 fmt --stdout "$SPEC"
cp "$TMP/fmt.out" "$TMP/formatted.saltpan"
grep -q "pieces 10 per length constant at 100 Hz" "$TMP/formatted.saltpan" || fail "fmt lost the cutting rule"
expect_rc rehash 0 hash "$TMP/formatted.saltpan"
expect_rc hash 0 hash "$SPEC"
[ "$(cut -d" " -f1 "$TMP/rehash.out")" = "$(cut -d" " -f1 "$TMP/hash.out")" ] || fail "fmt changed the hash of the cut cable"
finish
