# sweep_resume.sh - `saltpan sweep` checkpoints: a sweep killed with SIGKILL and run again gives
# the bytes of an uninterrupted run, computing only what the journal lacks; a cut-short last
# journal line is tolerated; another sweep's journal is refused; --restart discards it.
source "$(dirname "$0")/lib/common.bash"

SWEEPS="$SRC/specs/reference/squid_axon_1952_sweeps.saltpan"

# 96 x 64 points of 200 ms each: several seconds on one thread, so a kill lands mid-sweep.
big=(sweep --threads 1 --checkpoint 16 --progress none
  --vary "axon.SquidSodium1952.density=60mS/cm2:180mS/cm2:96"
  --vary "axon.SquidPotassium1952.density=18mS/cm2:54mS/cm2:64"
  --measure "euler10: spike_count(axon.V)" --measure "euler10: firing_rate(axon.V)")

# The uninterrupted run (two threads: the thread count changes no byte, sweep_determinism.sh).
rc=0
timeout 120 "$SALTPAN" "${big[@]}" --threads 2 -o "$TMP/whole.csv" "$SWEEPS" 2>"$TMP/whole.err" || rc=$?
[ "$rc" -eq 0 ] || fail "whole: the uninterrupted sweep exited $rc: $(head -3 "$TMP/whole.err")"

# Start it, wait until the journal holds about two thirds of the points (16 a line), then
# SIGKILL it.
journal="$TMP/cut.csv.journal"
"$SALTPAN" "${big[@]}" -o "$TMP/cut.csv" "$SWEEPS" 2>"$TMP/first.err" &
pid=$!
for _ in $(seq 1 2400); do
  [ -f "$journal" ] && [ "$(wc -l <"$journal")" -ge 250 ] && break
  kill -0 "$pid" 2>/dev/null || break
  sleep 0.05
done
kill -9 "$pid" 2>/dev/null || fail "first: the sweep ended before it could be killed (make it longer)"
wait "$pid" 2>/dev/null || true
[ -f "$journal" ] || fail "first: no journal after the kill"
[ -e "$TMP/cut.csv" ] && fail "first: a killed sweep left a final output"
cp "$journal" "$TMP/journal.saved"

# resume NAME: runs the same command again, which must finish from the journal.
resume() {
  local name=$1
  rc=0
  timeout 120 "$SALTPAN" "${big[@]}" -o "$TMP/cut.csv" "$SWEEPS" 2>"$TMP/$name.err" || rc=$?
  [ "$rc" -eq 0 ] || fail "$name: the resumed sweep exited $rc: $(head -3 "$TMP/$name.err")"
  cmp -s "$TMP/cut.csv" "$TMP/whole.csv" || fail "$name: the resumed result differs from the uninterrupted one"
  [ -e "$journal" ] && fail "$name: the journal is still there after the sweep finished"
  local from
  from=$(sed -nE 's/.*, ([0-9]+) from the journal.*/\1/p' "$TMP/$name.err")
  [ -n "$from" ] && [ "$from" -gt 0 ] && [ "$from" -lt 6144 ] ||
    fail "$name: stderr does not say how many points came from the journal: $(cat "$TMP/$name.err")"
  rm -f "$TMP/cut.csv"
  resumed_points=$from
}
resume resumed
whole_journal=$resumed_points

# A last line cut short (a kill in mid-write) is dropped, the lines before it kept.
cp "$TMP/journal.saved" "$journal"
printf '{"points":[[6000,[3,' >>"$journal"
resume truncated
# A damaged line in the middle: what came before it is kept, and the rest recomputed.
head -c "$(($(head -n 100 "$TMP/journal.saved" | wc -c) - 5))" "$TMP/journal.saved" >"$journal"
printf '\n' >>"$journal"
tail -n +101 "$TMP/journal.saved" >>"$journal"
resume damaged
[ "${resumed_points:-0}" -lt "$whole_journal" ] ||
  fail "damaged: $resumed_points points were read past a damaged line (the whole journal had $whole_journal)"

# A journal written for another sweep is refused (64), and nothing is computed or written.
small=(sweep --threads 1 --progress none --sweep leak)
cp "$TMP/journal.saved" "$TMP/leak.csv.journal"
expect_rc foreign 64 "${small[@]}" -o "$TMP/leak.csv" "$SWEEPS"
expect_grep foreign err "^saltpan sweep: error: the checkpoint journal '.*leak\.csv\.journal' was written for a different sweep"
[ -e "$TMP/leak.csv" ] && fail "foreign: an output was written despite the refused journal"
cmp -s "$TMP/leak.csv.journal" "$TMP/journal.saved" || fail "foreign: the refused journal was changed"
# The same sweep with other lanes is another sweep too (its numbers may differ in the last bit).
# --restart discards the journal and runs afresh.
expect_rc restart 0 "${small[@]}" --restart -o "$TMP/leak.csv" "$SWEEPS"
expect_rc plain 0 "${small[@]}" -o "$TMP/plain.csv" "$SWEEPS"
cmp -s "$TMP/leak.csv" "$TMP/plain.csv" || fail "restart: --restart gave a different result from a fresh run"
[ -e "$TMP/leak.csv.journal" ] && fail "restart: the journal is still there"
grep -q "from the journal" "$TMP/restart.err" && fail "restart: --restart still read the journal"

finish
