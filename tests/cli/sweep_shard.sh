# sweep_shard.sh - `saltpan sweep --shard` and `saltpan merge`: three shards merged are the unsharded
# run byte for byte; merge refuses missing, repeated and foreign shards; --shard env reads the
# scheduler's array-task variables.
source "$(dirname "$0")/lib/common.bash"

HH="$SRC/specs/reference/squid_axon_1952.saltpan"

cat >"$TMP/small.saltpan" <<SPEC
use "$HH"
protocol short {
  method exponential_euler step 10 us
  duration 30 ms
  inject axon 10 uA/cm2 from 0 ms to 30 ms
  record axon.V every 0.1 ms
}
# 11 points: the shards of 3 hold 3, 4 and 4 (not a multiple of the lanes either).
sweep eleven {
  vary axon.SquidSodium1952.density from 60 mS/cm2 to 180 mS/cm2 points 11
  measure short: spike_count(axon.V)
  measure short: peak(axon.V)
  measure rest(axon)
}
sweep other {
  vary axon.SquidPotassium1952.density from 18 mS/cm2 to 54 mS/cm2 points 11
  measure short: spike_count(axon.V)
}
SPEC

S=(sweep --progress none --sweep eleven)
expect_rc whole 0 "${S[@]}" -o "$TMP/whole.csv" -o "$TMP/whole.json" "$TMP/small.saltpan"
for i in 0 1 2; do
  expect_rc "shard$i" 0 "${S[@]}" --shard "$i/3" -o "$TMP/s$i.json" -o "$TMP/s$i.csv" "$TMP/small.saltpan"
  expect_grep "shard$i" err "\(shard $i of 3, points [0-9]+ to [0-9]+ of 11\)"
done
"$PY" - "$TMP"/s{0,1,2}.json <<'PYEOF' || fail "shards: wrong shard documents"
import json, sys
first = 0
for index, path in enumerate(sys.argv[1:]):
    doc = json.load(open(path, encoding="utf-8"))
    assert doc["shard"] == {"index": index, "count": 3, "first": first}, doc["shard"]
    assert doc["points_total"] == 11
    points = [p["point"] for p in doc["points"]]
    assert points == list(range(first, first + len(points))) and len(points) in (3, 4), points
    first += len(points)
assert first == 11, first
PYEOF
# A shard's CSV is the unsharded CSV's rows for its points.
"$PY" - "$TMP/whole.csv" "$TMP"/s{0,1,2}.csv <<'PYEOF' || fail "shards: a shard's CSV rows differ from the whole run's"
import sys
whole = open(sys.argv[1], encoding="utf-8").read().splitlines()
rows = []
for path in sys.argv[2:]:
    lines = open(path, encoding="utf-8").read().splitlines()
    assert lines[0] == whole[0], (lines[0], whole[0])
    rows += lines[1:]
assert rows == whole[1:], "rows differ"
PYEOF

# Merged in any order of arguments: the unsharded run's bytes, CSV and JSON.
expect_rc merge 0 merge -o "$TMP/all.csv" -o "$TMP/all.json" "$TMP/s2.json" "$TMP/s0.json" "$TMP/s1.json"
cmp -s "$TMP/all.csv" "$TMP/whole.csv" || fail "merge: the merged CSV differs from the unsharded run's"
cmp -s "$TMP/all.json" "$TMP/whole.json" || fail "merge: the merged JSON differs from the unsharded run's"
expect_grep merge err "merged 3 shards of eleven: 11 points"
# An unsharded result merges to itself.
expect_rc mergeone 0 merge -o "$TMP/one.json" "$TMP/whole.json"
cmp -s "$TMP/one.json" "$TMP/whole.json" || fail "mergeone: merging an unsharded result changed it"

# Refusals: 65, and no output written.
refused() {
  local name=$1 pattern=$2
  shift 2
  rm -f "$TMP/bad.csv"
  expect_rc "$name" 65 merge -o "$TMP/bad.csv" "$@"
  expect_grep "$name" err "^saltpan merge: error: $pattern"
  [ -e "$TMP/bad.csv" ] && fail "$name: merge wrote an output it refused"
  return 0
}
refused missing "shard 1 of 3 is missing" "$TMP/s0.json" "$TMP/s2.json"
refused twice "shard 0 is given twice" "$TMP/s0.json" "$TMP/s1.json" "$TMP/s0.json" "$TMP/s2.json"
expect_rc other 0 sweep --progress none --sweep other --shard 1/3 -o "$TMP/o1.json" "$TMP/small.saltpan"
refused foreign "'.*o1\.json' comes from a different sweep" "$TMP/s0.json" "$TMP/o1.json" "$TMP/s2.json"
expect_rc four 0 "${S[@]}" --shard 1/4 -o "$TMP/f1.json" "$TMP/small.saltpan"
refused count "'.*f1\.json' comes from a different sweep" "$TMP/s0.json" "$TMP/f1.json" "$TMP/s2.json"
# Another engine computes other last bits: its shards are another sweep.
expect_rc scalar 0 "${S[@]}" --engine scalar --shard 1/3 -o "$TMP/c1.json" "$TMP/small.saltpan"
refused engine "'.*c1\.json' comes from a different sweep" "$TMP/s0.json" "$TMP/c1.json" "$TMP/s2.json"
printf 'not json\n' >"$TMP/junk.json"
refused junk "'.*junk\.json': " "$TMP/junk.json"
# A shard index outside the count (an edited file) is refused, never used as a slot.
sed 's/"index": 1,/"index": 7000000,/' "$TMP/s1.json" >"$TMP/edited.json"
grep -q '"index": 7000000' "$TMP/edited.json" || fail "edited: the shard index was not replaced"
refused edited "'.*edited\.json': shard 7000000 of 3 does not exist" "$TMP/s0.json" "$TMP/edited.json" "$TMP/s2.json"
refused unreadable "cannot read" "$TMP/nothing-here.json"
expect_rc mergeusage 64 merge "$TMP/s0.json"
expect_grep mergeusage err "^saltpan merge: error: no output given"
expect_rc mergeopt 64 merge --bogus -o "$TMP/x.csv" "$TMP/s0.json"

# More shards than points: the empty shards merge too, and say they hold none.
for i in 0 1 2 3 4 5 6 7 8 9 10 11 12; do
  expect_rc "many$i" 0 "${S[@]}" --shard "$i/13" -o "$TMP/m$i.json" "$TMP/small.saltpan"
done
expect_grep many0 err "^swept eleven: 0 points \(shard 0 of 13, none of the 11\)"
expect_grep many1 err "^swept eleven: 1 point \(shard 1 of 13, points 0 to 0 of 11\)"
expect_rc mergemany 0 merge -o "$TMP/many.csv" "$TMP"/m{0,1,2,3,4,5,6,7,8,9,10,11,12}.json
cmp -s "$TMP/many.csv" "$TMP/whole.csv" || fail "mergemany: 13 shards of 11 points merge to another CSV"

# --shard env: SLURM's task 1 of 0..2 is --shard 1/3.
rc=0
SLURM_ARRAY_TASK_ID=1 SLURM_ARRAY_TASK_MIN=0 SLURM_ARRAY_TASK_COUNT=3 \
  timeout 10 "$SALTPAN" "${S[@]}" --shard env -o "$TMP/env1.json" "$TMP/small.saltpan" 2>"$TMP/env.err" || rc=$?
[ "$rc" -eq 0 ] || fail "env: --shard env exited $rc: $(head -3 "$TMP/env.err")"
cmp -s "$TMP/env1.json" "$TMP/s1.json" || fail "env: --shard env with SLURM task 1 of 3 differs from --shard 1/3"
rc=0
SLURM_ARRAY_TASK_ID=2 timeout 10 "$SALTPAN" "${S[@]}" --shard env/3 -o "$TMP/env2.json" "$TMP/small.saltpan" \
  2>"$TMP/env2.err" || rc=$?
[ "$rc" -eq 0 ] || fail "env/3: exited $rc: $(head -3 "$TMP/env2.err")"
cmp -s "$TMP/env2.json" "$TMP/s2.json" || fail "env/3: --shard env/3 with SLURM task 2 differs from --shard 2/3"
# No scheduler in the environment: a usage error.
rc=0
env -u SLURM_ARRAY_TASK_ID -u SGE_TASK_ID -u PBS_ARRAY_INDEX -u LSB_JOBINDEX \
  timeout 10 "$SALTPAN" "${S[@]}" --shard env "$TMP/small.saltpan" >/dev/null 2>"$TMP/noenv.err" || rc=$?
[ "$rc" -eq 64 ] || fail "noenv: --shard env without a scheduler exited $rc, expected 64"
grep -q "^saltpan sweep: error: --shard env: no array-task index" "$TMP/noenv.err" ||
  fail "noenv: no message about the missing array-task index: $(head -2 "$TMP/noenv.err")"

finish
