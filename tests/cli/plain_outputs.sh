# plain_outputs.sh - outputs that say what they mean: show names the GHK potential of the ungated
# permeabilities for what it is and prints the true rest beside it, marks dynamic
# concentrations; an unnamed model is not called "model"; no -0 in CSV; one JSON layout
# across commands; a clamped potential reports no spikes; `test` with nothing to test fails.
source "$(dirname "$0")/lib/common.bash"

clean_spec "$TMP/cell.saltpan"
expect_rc show 0 show "$TMP/cell.saltpan"
# CliCell has a gated K channel besides its leaks: the GHK value is not its rest.
expect_grep show out "GHK potential of the 2 ungated permeability channels -?[0-9.]+ mV \(not the rest"
expect_grep show out "rest with every channel and pump: -[0-9.]+ mV \(stable\)"
! grep -q "GHK resting potential" "$TMP/show.out" || fail "show: calls the GHK value the resting potential"
expect_rc show-json 0 show --format json "$TMP/cell.saltpan"
"$PY" - "$TMP/show-json.out" <<'PY' || fail "show-json: steady states or GHK scope missing"
import json, sys
c = json.load(open(sys.argv[1]))["compartments"][0]
assert c["ghk_rest_is_rest"] is False, c["ghk_rest_is_rest"]
states = c["steady_states"]
assert len(states) >= 1 and states[0]["stable"] is True, states
assert -90 < states[0]["V_mV"] < -40, states
PY

# Only ungated permeabilities: then the GHK value is the rest, and is named so.
clean_spec "$TMP/passive.saltpan"
sed -i '/KGated 36 mS\/cm2/d' "$TMP/passive.saltpan"
expect_rc passive 0 show "$TMP/passive.saltpan"
expect_grep passive out "GHK resting potential -[0-9.]+ mV \(from 2 ungated permeability channels\)"

# A dynamic concentration is marked.
clean_spec "$TMP/dynamic.saltpan"
sed -i 's/\[Na\] = 11 mM  \[K\]/[Na] = 11 mM dynamic  [K]/' "$TMP/dynamic.saltpan"
expect_rc dynamic 0 show "$TMP/dynamic.saltpan"
expect_grep dynamic out "^  Na +\+1 +11\* "
expect_grep dynamic out "\* dynamic: changed by the ion's currents"

# No model header: no "model model" anywhere, JSON says null.
clean_spec "$TMP/unnamed.saltpan"
sed -i '/^model CliCell/d' "$TMP/unnamed.saltpan"
cat >>"$TMP/unnamed.saltpan" <<'SPEC'
protocol held {
  method rk4 step 10 us
  duration 2 ms
  clamp soma at 0 mV from 0.5 ms to 1.5 ms
  clamp soma at -65 mV
  record soma.V, soma.clamp_current
}
SPEC
expect_rc unnamed-run 0 run "$TMP/unnamed.saltpan" -o "$TMP/unnamed.json"
"$PY" -c "import json,sys; d=json.load(open(sys.argv[1])); assert d['model'] is None, d['model']" "$TMP/unnamed.json" ||
  fail "unnamed-run: the JSON names the unnamed model"
expect_rc unnamed-csv 0 run "$TMP/unnamed.saltpan" -o "$TMP/unnamed.csv"
! grep -Eq '(^|,)-0(,|$)' "$TMP/unnamed.csv" || fail "unnamed-csv: a -0 cell"
# A clamped potential follows its command: no spike count for it.
expect_grep unnamed-csv err "^soma.V: under voltage clamp; peak"
! grep -q "spike" "$TMP/unnamed-csv.err" || fail "unnamed-csv: a clamped run reports spikes"
expect_rc unnamed-snapshot 0 snapshot "$TMP/unnamed.saltpan"
! grep -rq "model model" "$TMP"/unnamed.*snapshot.csv || fail "unnamed-snapshot: titled 'model model'"
expect_grep unnamed-snapshot err "of 2 quantities\)"
expect_rc unnamed-rest 0 rest "$TMP/unnamed.saltpan"
! grep -q "model model" "$TMP/unnamed-rest.out" || fail "unnamed-rest: titled 'model model'"

# One JSON layout: every command indents by two spaces.
expect_rc rest-json 0 rest --format json "$TMP/cell.saltpan"
for f in "$TMP/show-json.out" "$TMP/rest-json.out" "$TMP/unnamed.json"; do
  sed -n 2p "$f" | grep -Eq '^  "' || fail "$(basename "$f"): not indented by two spaces: $(sed -n 2p "$f")"
done
"$PY" -c "import json,sys; d=json.load(open(sys.argv[1])); assert d['step_ms'] == 0.01, d['step_ms']" "$TMP/unnamed.json" ||
  fail "unnamed-run: step_ms with binary noise"

# test with no expectations: fails unless --allow-empty.
expect_rc empty-test 1 test "$TMP/cell.saltpan"
expect_grep empty-test err "no expectations in 1 spec file: nothing was tested"
expect_rc empty-allowed 0 test --allow-empty "$TMP/cell.saltpan"

# A failed run writes nothing, or with --keep-partial what it recorded, under a name that says so.
sed 's/method rk4 step 10 us/method rk4 step 0.8 ms/; s/record axon.V every 0.01 ms/record axon.V every 0.8 ms/' \
  "$SRC/specs/reference/squid_axon_1952.saltpan" >"$TMP/unstable.saltpan"
expect_rc failed-run 65 run "$TMP/unstable.saltpan" -o "$TMP/unstable.csv"
[ ! -e "$TMP/unstable.csv" ] && [ ! -e "$TMP/unstable.partial.csv" ] || fail "failed-run: wrote an output"
expect_rc partial-run 65 run "$TMP/unstable.saltpan" -o "$TMP/unstable.csv" --keep-partial
[ ! -e "$TMP/unstable.csv" ] || fail "partial-run: wrote the full output's name"
[ "$(head -1 "$TMP/unstable.partial.csv")" = "time (ms),axon.V (mV)" ] || fail "partial-run: no partial trace"
[ "$(wc -l <"$TMP/unstable.partial.csv")" -ge 2 ] || fail "partial-run: the partial trace has no samples"
expect_grep partial-run err "up to the failure written to .*unstable.partial.csv"
expect_rc partial-stdout 64 run "$TMP/unstable.saltpan" --keep-partial

# --emit ir prints numbers that read back exactly, without binary noise.
expect_rc emit-ir 0 check --emit ir "$SRC/specs/reference/squid_axon_1952.saltpan"
expect_grep emit-ir out "^model SquidAxon1952 temperature 279.45 K$"
expect_grep emit-ir out "^param [0-9]+ axon.SquidSodium1952.density = 1200$"

# A built executable's --help gives each parameter in the unit its label names.
if timeout 120 "$SALTPAN" build "$SRC/specs/reference/squid_axon_1952.saltpan" -o "$TMP/squid" >/dev/null 2>&1; then
  "$TMP/squid" --help >"$TMP/squid-help.out"
  grep -Eq "axon.SquidSodium1952.density +120 +mS/cm2 " "$TMP/squid-help.out" || fail "squid --help: g_Na not in mS/cm2"
  grep -Eq "axon.SquidSodium1952.reversal +50 +mV " "$TMP/squid-help.out" || fail "squid --help: E_Na not in mV"
  grep -Eq "axon.capacitance +1 +uF/cm2 " "$TMP/squid-help.out" || fail "squid --help: C not in uF/cm2"
else
  fail "build: could not build the squid axon executable"
fi

finish
