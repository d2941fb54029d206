# test_command.sh - `saltpan test`: the shipped reference suites pass; a perturbed copy of a
# model fails with measured vs expected; JUnit XML validates; JSON parses; exit codes.
source "$(dirname "$0")/lib/common.bash"

expect_rc suite 0 test "$SRC/specs" --junit "$TMP/suite.xml" --json "$TMP/suite.json"
expect_grep suite out '^[0-9]+ passed, 0 failed$'
expect_grep suite out 'PASS  line [0-9]+  reversal\(K, fibre\)'
if command -v xmllint >/dev/null; then
  xmllint --noout --schema "$(dirname "$0")/junit.xsd" "$TMP/suite.xml" 2>"$TMP/xmllint.err" ||
    fail "JUnit XML does not validate: $(cat "$TMP/xmllint.err")"
else
  echo "note: xmllint is missing; JUnit schema check skipped"
fi
"$PY" -c 'import json,sys; d=json.load(open(sys.argv[1])); assert d["failed"] == 0 and d["passed"] > 0' "$TMP/suite.json" ||
  fail "JSON results do not parse or do not say all passed"

# A perturbed copy: inside K 155 mM -> 100 mM moves E_K by about 12 mV.
mkdir "$TMP/perturbed"
sed 's/\[K\] = 155 mM/[K] = 100 mM/' "$SRC/specs/reference/mammalian_skeletal_muscle.saltpan" >"$TMP/perturbed/muscle.saltpan"
grep -q '\[K\] = 100 mM' "$TMP/perturbed/muscle.saltpan" || fail "the perturbation did not apply"
expect_rc perturbed 1 test "$TMP/perturbed" --junit "$TMP/perturbed.xml"
expect_grep perturbed out 'FAIL  line [0-9]+  reversal\(K, fibre\) == -98 mV within 1 mV: measured -86\.[0-9]+ mV; expected -98 mV within 1 mV'
expect_grep perturbed out '^[0-9]+ passed, 1 failed$'
grep -q '<failure message="measured -86' "$TMP/perturbed.xml" || fail "JUnit XML lacks the failure"
if command -v xmllint >/dev/null; then
  xmllint --noout --schema "$(dirname "$0")/junit.xsd" "$TMP/perturbed.xml" 2>/dev/null || fail "perturbed JUnit XML does not validate"
fi

# A spec with errors: exit 65, the diagnostics on stderr.
printf 'const a = 1 mV + 1 ms\nexpect rest(x) == 1 mV\n' >"$TMP/broken.saltpan"
expect_rc broken 65 test "$TMP/broken.saltpan"
expect_grep broken err 'broken.saltpan:1:[0-9]+: error: cannot add'

# Snapshots: make one of a copy, pass against it, then fail after a small change of the model.
mkdir "$TMP/snap"
cp "$SRC/specs/reference/squid_axon_1952.saltpan" "$TMP/snap/model.saltpan"
cat >"$TMP/snap/check.saltpan" <<'SPEC'
use "model.saltpan"
protocol short {
  method rk4 step 10 us
  duration 30 ms
  inject axon 10 uA/cm2 from 0 ms to 30 ms
  record axon.V every 0.5 ms
}
expect short: snapshot_max_error(axon.V, "check.short.snapshot.csv") < 1e-6 mV
SPEC
expect_rc snapshot 0 snapshot "$TMP/snap/check.saltpan"
[ -f "$TMP/snap/check.short.snapshot.csv" ] || fail "snapshot: no file written"
grep -q '^time (ms),axon.V (mV)$' "$TMP/snap/check.short.snapshot.csv" || fail "snapshot: header missing"
expect_rc snapshot_pass 0 test "$TMP/snap/check.saltpan"
sed -i 's/SquidPotassium1952 36 mS\/cm2/SquidPotassium1952 35.9 mS\/cm2/' "$TMP/snap/model.saltpan"
grep -q 'SquidPotassium1952 35.9 mS/cm2' "$TMP/snap/model.saltpan" || fail "snapshot: the perturbation did not apply"
expect_rc snapshot_fail 1 test "$TMP/snap/check.saltpan"
expect_grep snapshot_fail out 'FAIL  line 8  short: snapshot_max_error'

# Usage.
expect_rc nopath 64 test
expect_rc badopt 64 test --bogus "$SRC/specs"
expect_rc help 0 test --help
expect_grep help out 'usage: saltpan test'
expect_rc missing 64 test "$TMP/does-not-exist"

# The same results whatever the number of jobs.
run jobs1 test "$SRC/specs" --jobs 1
cp "$TMP/jobs1.out" "$TMP/jobs1.keep"
run jobs4 test "$SRC/specs" --jobs 4
cmp -s "$TMP/jobs1.keep" "$TMP/jobs4.out" || fail "output differs between --jobs 1 and --jobs 4"

finish
