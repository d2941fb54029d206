# sweep_outputs.sh - `saltpan sweep`: the CSV and JSON it writes, progress lines, failed points
# and usage errors.
source "$(dirname "$0")/lib/common.bash"

HH="$SRC/specs/reference/squid_axon_1952.saltpan"
SWEEPS="$SRC/specs/reference/squid_axon_1952_sweeps.saltpan"

# A short protocol of the reference axon: every point runs 30 ms of a 10 uA/cm2 step, plus an
# RK4 protocol (not lane-compiled) that blows up for a stiff leak.
cat >"$TMP/small.saltpan" <<SPEC
use "$HH"
protocol short {
  method exponential_euler step 10 us
  duration 30 ms
  inject axon 10 uA/cm2 from 0 ms to 30 ms
  record axon.V every 0.1 ms
}
protocol stiff {
  method rk4 step 10 us
  duration 5 ms
  record axon.V every 0.1 ms
}
sweep grid {
  vary axon.SquidSodium1952.density from 60 mS/cm2 to 180 mS/cm2 points 5
  vary axon.SquidLeak1952.reversal values -60 mV, -54.387 mV, -50 mV
  measure short: spike_count(axon.V)
  measure short: firing_rate(axon.V)
  measure short: peak(axon.V)
  measure short: spike_count(axon.V, -20 mV)
  measure rest(axon)
}
SPEC

# ---- outputs: CSV header with units, one row per point, JSON keys; both agree ----
expect_rc outputs 0 sweep --threads 2 -o "$TMP/g.csv" -o "$TMP/g.json" "$TMP/small.saltpan"
[ -s "$TMP/outputs.out" ] && fail "outputs: with -o, nothing should go to stdout"
[ -e "$TMP/g.csv.journal" ] && fail "outputs: the journal was left behind after a complete sweep"
expect_grep outputs err "^swept grid: 15 points, 0 failed"
"$PY" - "$TMP/g.csv" "$TMP/g.json" <<'PYEOF' || fail "outputs: CSV and JSON are wrong or disagree"
import csv, json, math, sys
rows = list(csv.reader(open(sys.argv[1], encoding="utf-8", newline="")))
header, body = rows[0], rows[1:]
want = ["point", "axon.SquidSodium1952.density (mS/cm2)", "axon.SquidLeak1952.reversal (mV)",
        "short: spike_count(axon.V)", "short: firing_rate(axon.V) (Hz)",
        "short: peak(axon.V) (mV)", "short: spike_count(axon.V, -20 mV)", "rest(axon) (mV)", "failure"]
assert header == want, header
assert len(body) == 15, len(body)
doc = json.load(open(sys.argv[2], encoding="utf-8"))
keys = ["saltpan_version", "model_hash", "sweep", "sweep_hash", "design", "engine", "points_total",
        "caution", "parameters", "measures", "points"]
assert list(doc) == keys, list(doc)  # no "shard" key in an unsharded result
assert doc["sweep"] == "grid" and doc["design"] == "grid" and doc["points_total"] == 15, doc["sweep"]
assert doc["model_hash"].startswith("sha256:"), doc["model_hash"]
assert [p["unit"] for p in doc["parameters"]] == ["mS/cm2", "mV"], doc["parameters"]
assert [m["unit"] for m in doc["measures"]] == ["", "Hz", "mV", "", "mV"], doc["measures"]
# The measure with a comma in its name is one quoted CSV cell.
assert '"short: spike_count(axon.V, -20 mV)"' in open(sys.argv[1], encoding="utf-8").readline()
assert len(doc["points"]) == 15
# Grid order: the last axis fastest; ranges hit their ends.
gna = [60, 90, 120, 150, 180]
el = [-60, -54.387, -50]
for k, (row, p) in enumerate(zip(body, doc["points"])):
    assert p["point"] == k and row[0] == str(k), (k, row[0], p["point"])
    assert p["parameters"] == [gna[k // 3], el[k % 3]], (k, p["parameters"])
    assert [float(x) for x in row[1:3]] == p["parameters"], (row, p)
    for cell, value in zip(row[3:8], p["measures"]):
        if value is None:
            assert cell == "", (k, cell)
        else:
            assert float(cell) == value, (k, cell, value)
    assert row[8] == "" and p["failure"] is None, (row, p)
    count, rate, peak, low_count, rest = p["measures"]
    assert low_count >= count, p
    assert count == int(count) and count >= 1, p
    assert 0 < peak < 60 and -80 < rest < -40, p
    # A rate needs two spikes; with one it has no value (empty cell, null).
    assert (rate is None) == (count < 2), p
PYEOF

# Without -o the CSV goes to stdout, the same bytes as the file.
expect_rc stdout 0 sweep --threads 1 "$TMP/small.saltpan"
cmp -s "$TMP/stdout.out" "$TMP/g.csv" || fail "stdout: CSV on stdout differs from -o g.csv"

# ---- progress: a log line when stderr is not a terminal; none with --progress none ----
expect_grep outputs err "^saltpan sweep: 15 of 15 points \(100%\)"
expect_rc quiet 0 sweep --progress none "$TMP/small.saltpan"
grep -q "points (" "$TMP/quiet.err" && fail "quiet: --progress none printed a progress line"
expect_grep quiet err "^swept grid: 15 points"
expect_rc logmode 0 sweep --progress log "$TMP/small.saltpan"
expect_grep logmode err "^saltpan sweep: 15 of 15 points"

# ---- a sweep written on the command line ----
expect_rc cmdline 0 sweep --vary "axon.SquidSodium1952.density=60mS/cm2:180mS/cm2:3" \
  --values "axon.SquidLeak1952.reversal=-60mV,-50mV" --measure "short: spike_count(axon.V)" "$TMP/small.saltpan"
expect_grep cmdline out "^point,axon.SquidSodium1952.density \(mS/cm2\),axon.SquidLeak1952.reversal \(mV\),short: spike_count\(axon.V\),failure$"
[ "$(wc -l <"$TMP/cmdline.out")" -eq 7 ] || fail "cmdline: expected a header and 6 rows"
expect_grep cmdline out "^5,180,-50,[0-9]+,$"
expect_rc cmdsample 0 sweep --vary "axon.SquidSodium1952.density=60mS/cm2:180mS/cm2" --sample 5 --seed 3 \
  --measure "short: spike_count(axon.V)" -o "$TMP/sample.json" "$TMP/small.saltpan"
"$PY" - "$TMP/sample.json" <<'PYEOF' || fail "cmdsample: wrong sample"
import json, sys
doc = json.load(open(sys.argv[1], encoding="utf-8"))
assert doc["design"] == "latin_hypercube" and doc["points_total"] == 5, doc["design"]
values = sorted(p["parameters"][0] for p in doc["points"])
# One point in each fifth of 60..180 mS/cm2.
assert [int((v - 60) // 24) for v in values] == [0, 1, 2, 3, 4], values
PYEOF

# ---- failed points: reported in the failure column, exit 0 ----
# A leak reversal of 10 kV drives V beyond 2 V in the lanes; a stiff leak breaks RK4 (scalar path).
expect_rc failed 0 sweep --values "axon.SquidLeak1952.reversal=-54.387mV,1e7mV" --measure "short: spike_count(axon.V)" \
  -o "$TMP/failed.csv" "$TMP/small.saltpan"
expect_grep failed err "2 points, 1 failed"
"$PY" - "$TMP/failed.csv" <<'PYEOF' || fail "failed: the failure column is wrong"
import csv, sys
rows = list(csv.reader(open(sys.argv[1], encoding="utf-8", newline="")))
assert rows[1][-1] == "" and rows[1][2] != "", rows[1]
assert rows[2][2] == "" and rows[2][-1].startswith("short: the run failed at "), rows[2]
PYEOF
expect_rc stiff 0 sweep --values "axon.SquidLeak1952.density=0.3mS/cm2,1e7mS/cm2" --measure "stiff: peak(axon.V)" \
  "$TMP/small.saltpan"
expect_grep stiff out '^0,0\.3,-?[0-9.]+,$'
expect_grep stiff out '^1,1e\+07,,"?stiff: the run failed at '

# ---- usage errors: 64, with a `saltpan sweep: error:` message ----
usage_error() {
  local name=$1 pattern=$2
  shift 2
  expect_rc "$name" 64 sweep "$@"
  expect_grep "$name" err "^saltpan sweep: error: $pattern"
  [ -s "$TMP/$name.out" ] && fail "$name: a usage error wrote output"
  return 0
}
usage_error badopt "unknown option '--bogus'" --bogus "$SWEEPS"
usage_error nofile "no spec file" --sweep leak
usage_error twofiles "sweep takes one spec file" "$SWEEPS" "$SWEEPS"
usage_error badvary "--vary needs NAME=FROM:TO:POINTS" --vary nonsense --measure "rest(axon)" "$TMP/small.saltpan"
usage_error badvary4 "--vary needs" --vary "a=1:2:3:4" --measure "rest(axon)" "$TMP/small.saltpan"
usage_error badvalues "--values needs" --values "axon.capacitance=" --measure "rest(axon)" "$TMP/small.saltpan"
usage_error sweepvary "--sweep names a sweep of the file" --sweep leak \
  --vary "axon.capacitance=1uF/cm2:2uF/cm2:2" --measure "rest(axon)" "$SWEEPS"
usage_error badshard "shard 3 of 3 does not exist" --shard 3/3 --sweep leak "$SWEEPS"
usage_error badshard2 "--shard needs I/N" --shard one/3 --sweep leak "$SWEEPS"
usage_error nosweep "there is no sweep 'nope'.*conductances, leak, sampled" --sweep nope "$SWEEPS"
usage_error choose ".* has 3 sweeps .*choose one with --sweep" "$SWEEPS"
usage_error declares ".* declares no sweep" "$HH"
usage_error badlanes "--lanes must be 2, 4 or 8" --lanes 3 --sweep leak "$SWEEPS"
usage_error badthreads "--threads needs" --threads 0 --sweep leak "$SWEEPS"
usage_error badengine "--engine must be" --engine gpu --sweep leak "$SWEEPS"
usage_error badprogress "--progress must be" --progress loud --sweep leak "$SWEEPS"
usage_error badsample "--sample needs" --sample 0 --vary "axon.capacitance=1uF/cm2:2uF/cm2" \
  --measure "rest(axon)" "$TMP/small.saltpan"
usage_error badout "-o takes a .csv or .json file" -o "$TMP/x.txt" --sweep leak "$SWEEPS"
# A parameter the model does not have is a spec error (65) on the command-line sweep.
expect_rc unknownparam 65 sweep --vary "axon.bogus=1mV:2mV:2" --measure "rest(axon)" "$TMP/small.saltpan"
expect_grep unknownparam err "there is no parameter 'axon.bogus' to vary"

finish
