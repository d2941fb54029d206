# journal_validation.sh - a checkpoint journal or a shard is taken only when every line fits the
# sweep (column count, names, types, point range): resume refuses forged or ragged journal
# lines instead of copying them into the output, merge refuses shards whose columns differ, and
# a second sweep on an output whose journal another sweep holds is refused, not interleaved.
source "$(dirname "$0")/lib/common.bash"

cd "$TMP"
clean_spec cell.saltpan
cat >>cell.saltpan <<'SPEC'
protocol short {
  method exponential_euler step 25 us
  duration 2 ms
  record soma.V every 0.5 ms
}
sweep gated {
  vary soma.KGated.density from 20 mS/cm2 to 40 mS/cm2 points 8
  measure short: peak(soma.V)
}
SPEC
S=(sweep --progress none --checkpoint 1 cell.saltpan)

# A journal that a failed second output leaves behind (exit 73), one point a line.
expect_rc keep 73 "${S[@]}" -o j.csv -o missing/j.json
[ -s j.csv.journal ] || fail "keep: no journal was kept"
cp j.csv.journal journal.good
expect_rc resume 0 "${S[@]}" -o j.csv
expect_grep resume err "8 from the journal"
mv j.csv whole.csv

# forge NAME PYTHON: a copy of the good journal with its second line replaced by PYTHON's value
# (`line` is the parsed original); resuming from it must be refused (64) and write nothing.
forge() {
  local name=$1 expr=$2 pattern=$3
  "$PY" - journal.good j.csv.journal "$expr" <<'PYEOF'
import json, sys
lines = open(sys.argv[1], encoding="utf-8").read().splitlines()
line = json.loads(lines[1])
lines[1] = json.dumps(eval(sys.argv[3]))
open(sys.argv[2], "w", encoding="utf-8").write("\n".join(lines) + "\n")
PYEOF
  expect_rc "$name" 64 "${S[@]}" -o j.csv
  expect_grep "$name" err "^saltpan sweep: error: line 2 of the checkpoint journal 'j\.csv\.journal' does not fit this sweep: $pattern"
  [ -e j.csv ] && fail "$name: an output was written from a forged journal"
  rm -f j.csv j.csv.journal
}
forge ragged '{"points": [[p[0], p[1] + [7.5], p[2]] for p in line["points"]]}' "point [0-9]+ has 2 measures; the sweep has 1"
forge text '{"points": [[p[0], ["-20"], p[2]] for p in line["points"]]}' "point [0-9]+: the value of .* is neither a number nor null"
forge range '{"points": [[99, p[1], p[2]] for p in line["points"]]}' "point 99 is outside this sweep's 8 points"
forge shape '{"points": [[p[0], p[1]] for p in line["points"]]}' "an entry is not \[point, measures, failure\]"
forge failure '{"points": [[p[0], p[1], 3] for p in line["points"]]}' "point [0-9]+: its failure is neither text nor null"
# A line cut short by a kill is still only dropped and recomputed.
head -c -3 journal.good >j.csv.journal
expect_rc cut 0 "${S[@]}" -o j.csv
cmp -s j.csv whole.csv || fail "cut: the resumed result differs"
rm -f j.csv

# merge: shards whose columns differ are refused, even when their sweep_hash was copied.
expect_rc shard0 0 "${S[@]}" --shard 0/2 -o s0.json
expect_rc shard1 0 "${S[@]}" --shard 1/2 -o s1.json
"$PY" - s1.json s1ragged.json s1renamed.json <<'PYEOF'
import json, sys
doc = json.load(open(sys.argv[1], encoding="utf-8"))
ragged = json.loads(json.dumps(doc))
ragged["measures"].append({"name": "short: peak(soma.V) again", "unit": "mV", "scale": 1000.0})
for p in ragged["points"]:
    p["measures"].append(1.0)
json.dump(ragged, open(sys.argv[2], "w", encoding="utf-8"))
renamed = json.loads(json.dumps(doc))
renamed["parameters"][0]["unit"] = "S/m2"
json.dump(renamed, open(sys.argv[3], "w", encoding="utf-8"))
PYEOF
expect_rc mergeragged 65 merge -o m.csv s0.json s1ragged.json
expect_grep mergeragged err "^saltpan merge: error: 's1ragged\.json' and 's0\.json' do not have the same columns: measures"
expect_rc mergerenamed 65 merge -o m.csv s0.json s1renamed.json
expect_grep mergerenamed err "do not have the same columns: parameters"
[ -e m.csv ] && fail "merge: shards with other columns were joined"
# A point with a value of the wrong type names the point.
"$PY" - s1.json s1text.json <<'PYEOF'
import json, sys
doc = json.load(open(sys.argv[1], encoding="utf-8"))
doc["points"][1]["measures"][0] = "-20"
json.dump(doc, open(sys.argv[2], "w", encoding="utf-8"))
PYEOF
expect_rc mergetext 65 merge -o m.csv s0.json s1text.json
expect_grep mergetext err "'s1text\.json': point 5: the value of 'short: peak\(soma\.V\)' is neither a number nor null"
expect_rc mergeok 0 merge -o m.csv s0.json s1.json
cmp -s m.csv whole.csv || fail "mergeok: the merged shards differ from the whole sweep"

# Two sweeps on one output: the second is refused while the first holds the journal.
SWEEPS="$SRC/specs/reference/squid_axon_1952_sweeps.saltpan"
big=(sweep --threads 1 --checkpoint 16 --progress none
  --vary "axon.SquidSodium1952.density=60mS/cm2:180mS/cm2:96"
  --vary "axon.SquidPotassium1952.density=18mS/cm2:54mS/cm2:64"
  --measure "euler10: spike_count(axon.V)" "$SWEEPS")
"$SALTPAN" "${big[@]}" -o big.csv 2>first.err &
pid=$!
for _ in $(seq 1 600); do
  [ -s big.csv.journal ] && break
  sleep 0.05
done
kill -0 "$pid" 2>/dev/null || fail "lock: the first sweep ended too soon (make it longer)"
expect_rc second 73 "${big[@]}" -o big.csv
expect_grep second err "cannot write the checkpoint journal 'big\.csv\.journal': another sweep on the same output holds its lock"
kill "$pid" 2>/dev/null || true
wait "$pid" 2>/dev/null || true

finish
