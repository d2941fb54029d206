# rest.sh - `saltpan rest`: steady states, stability, JSON document, options and exit codes.
source "$(dirname "$0")/lib/common.bash"

HH="$SRC/specs/reference/squid_axon_1952.saltpan"

expect_rc help 0 rest --help
expect_grep help out "^usage: saltpan rest"
expect_grep help out "exit status"
expect_rc version 0 rest --version
expect_grep version out "^saltpan [0-9]"
expect_rc helpcmd 0 help rest
expect_grep helpcmd out "^usage: saltpan rest"
expect_rc toplevel 0 --help
expect_grep toplevel out "^  rest FILE"

# Usage errors: 64.
expect_rc nofile 64 rest
expect_rc badopt 64 rest --bogus "$HH"
expect_rc badformat 64 rest --format xml "$HH"
expect_rc badfrom 64 rest --from 12ms "$HH"
expect_rc reversed 64 rest --from 0mV --to -10mV "$HH"
expect_rc twofiles 64 rest "$HH" "$HH"

# Spec errors: 65, diagnostics on stderr and nothing on stdout.
error_spec "$TMP/error.saltpan"
expect_rc error 65 rest "$TMP/error.saltpan"
[ -s "$TMP/error.out" ] && fail "error: rest printed a report for a spec with errors"
expect_grep error err "error.saltpan:2:16: error: "
expect_rc missing 65 rest "$TMP/does-not-exist.saltpan"

# Text: the HH 1952 rest, -64.996379 mV (computed, docs/references.md), stable.
expect_rc text 0 rest "$HH"
expect_grep text out "^  V = -64\.99637[89] mV  stable"

# JSON: the documented keys; one stable steady state with four eigenvalues.
expect_rc json 0 rest --format json "$HH"
"$PY" - "$TMP/json.out" <<'PYEOF' || fail "json: wrong document"
import json, sys
doc = json.load(open(sys.argv[1], encoding="utf-8"))
comps = doc["compartments"]
assert len(comps) == 1 and comps[0]["name"] == "axon", comps
c = comps[0]
assert c["ghk_rest_mV"] is None, c["ghk_rest_mV"]
states = c["steady_states"]
assert len(states) == 1, states
s = states[0]
assert {"V_mV", "stable", "max_real_eigenvalue_per_ms", "gates", "currents_uA_per_cm2"} <= set(s), sorted(s)
# computed, docs/references.md: -64.996379 mV
assert abs(s["V_mV"] - -64.996379) < 1e-5, s["V_mV"]
assert s["stable"] is True and s["max_real_eigenvalue_per_ms"] < 0, s
assert len(s["eigenvalues_per_ms"]) == 4
assert sorted(s["gates"]) == ["SquidPotassium1952.n", "SquidSodium1952.h", "SquidSodium1952.m"], s["gates"]
cur = s["currents_uA_per_cm2"]
assert {"SquidSodium1952", "SquidPotassium1952", "SquidLeak1952", "total"} <= set(cur), cur
assert abs(sum(v for k, v in cur.items() if k != "total") - cur["total"]) < 1e-9
assert abs(cur["total"]) < 1e-8
PYEOF

# A range without a steady state: an empty list, still exit 0.
expect_rc range 0 rest --format json --from -60 --to 0mV "$HH"
"$PY" -c 'import json,sys; d=json.load(open(sys.argv[1])); assert d["compartments"][0]["steady_states"] == []' \
  "$TMP/range.out" || fail "range: expected no steady state between -60 and 0 mV"

# A passive GHK cell: the GHK rest is reported and equals the steady state.
clean_spec "$TMP/passive.saltpan"
sed -i '/KGated 36 mS\/cm2/d' "$TMP/passive.saltpan"
expect_rc passive 0 rest --format json "$TMP/passive.saltpan"
"$PY" - "$TMP/passive.out" <<'PYEOF' || fail "passive: wrong GHK rest"
import json, sys
c = json.load(open(sys.argv[1], encoding="utf-8"))["compartments"][0]
assert c["ghk_rest_mV"] is not None
s = c["steady_states"]
assert len(s) == 1 and s[0]["stable"], s
assert abs(s[0]["V_mV"] - c["ghk_rest_mV"]) < 1e-6, (s[0]["V_mV"], c["ghk_rest_mV"])
PYEOF
expect_rc passive-text 0 rest "$TMP/passive.saltpan"
expect_grep passive-text out "GHK resting potential"

finish
