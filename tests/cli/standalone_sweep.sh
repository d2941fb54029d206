#!/usr/bin/env bash
# standalone_sweep.sh - `EXE sweep`: an executable built by `saltpan build` runs the spec's sweeps
# and writes the CSV and JSON bytes of `saltpan sweep --engine scalar`; its shards and journals
# are interchangeable with saltpan's; sweeps with steady-state measures are left out with a note.
source "$(dirname "$0")/lib/common.bash"

SPEC=$SRC/specs/reference/squid_axon_1952_sweeps.saltpan
EXE=$TMP/squid_sweeps

# exe NAME ARGS...: runs the executable; sets rc, leaves $TMP/NAME.out and .err.
exe() {
  local name=$1
  shift
  rc=0
  timeout 20 "$EXE" "$@" >"$TMP/$name.out" 2>"$TMP/$name.err" || rc=$?
}

# exe_rc NAME WANT ARGS...: runs the executable and checks its exit status.
exe_rc() {
  local name=$1 want=$2
  shift 2
  exe "$name" "$@"
  if [ "$rc" -ne "$want" ]; then
    fail "$name: $(basename "$EXE") $* exited $rc, expected $want"
    sed 's/^/    /' "$TMP/$name.err" | head -10 >&2
  fi
}

# same FILE_A FILE_B WHAT: the two files hold the same bytes.
same() {
  if ! cmp -s "$1" "$2"; then
    fail "$3: $(basename "$1") differs from $(basename "$2")"
    diff "$1" "$2" | head -5 >&2 || true
  fi
}

expect_rc build 0 build "$SPEC" -o "$EXE"
expect_grep build err "built .*squid_sweeps: executable of .*, 2 protocols, 2 sweeps"
expect_grep build err "note: sweep 'leak' is not built in: 'rest' needs a steady-state search"

# The reference: saltpan's scalar engine, whole and in two shards.
expect_rc ref 0 sweep --engine scalar --progress none --sweep sampled "$SPEC" -o "$TMP/ref.csv" -o "$TMP/ref.json"
expect_rc ref1 0 sweep --engine scalar --progress none --sweep sampled --shard 1/2 "$SPEC" -o "$TMP/ref1.json"
[ "$(wc -l <"$TMP/ref.csv")" -eq 257 ] || fail "ref: expected 256 rows from saltpan sweep"

exe_rc whole 0 sweep --sweep sampled --progress none -o "$TMP/exe.csv" -o "$TMP/exe.json"
same "$TMP/exe.csv" "$TMP/ref.csv" "whole CSV"
same "$TMP/exe.json" "$TMP/ref.json" "whole JSON"
expect_grep whole err "swept sampled: 256 points, 0 failed; scalar"
# Without -o the CSV goes to standard output; one thread gives the same bytes.
exe_rc stdout 0 sweep --sweep sampled --threads 1 --progress none
same "$TMP/stdout.out" "$TMP/ref.csv" "CSV on standard output"

# A shard of the executable and a shard of saltpan merge into the unsharded result.
exe_rc shard0 0 sweep --sweep sampled --shard 0/2 --progress none -o "$TMP/exe0.json"
expect_grep shard0 err "shard 0 of 2, points 0 to 127 of 256"
expect_rc merge 0 merge -o "$TMP/merged.csv" -o "$TMP/merged.json" "$TMP/exe0.json" "$TMP/ref1.json"
same "$TMP/merged.csv" "$TMP/ref.csv" "merged CSV"
same "$TMP/merged.json" "$TMP/ref.json" "merged JSON"
# --shard env reads a scheduler's array-task variables, as saltpan does.
rc=0
SLURM_ARRAY_TASK_ID=1 SLURM_ARRAY_TASK_COUNT=2 timeout 20 "$EXE" sweep --sweep sampled --shard env \
  --progress none -o "$TMP/env1.json" >"$TMP/env.out" 2>"$TMP/env.err" || rc=$?
[ "$rc" -eq 0 ] || fail "env: --shard env exited $rc"
same "$TMP/env1.json" "$TMP/ref1.json" "--shard env JSON"

# A journal saltpan leaves (its second output cannot be written) is resumed by the executable.
expect_rc journal 73 sweep --engine scalar --progress none --sweep sampled "$SPEC" -o "$TMP/j.csv" \
  -o "$TMP/missing/j.json"
[ -s "$TMP/j.csv.journal" ] || fail "journal: saltpan kept no journal"
exe_rc resume 0 sweep --sweep sampled --progress none -o "$TMP/j.csv" -o "$TMP/j.json"
expect_grep resume err "256 from the journal"
same "$TMP/j.json" "$TMP/ref.json" "resumed JSON"
[ ! -e "$TMP/j.csv.journal" ] || fail "resume: the journal was not removed"
# An unwritable output keeps the executable's journal and exits 73.
exe_rc unwritable 73 sweep --sweep sampled --progress none -o "$TMP/u.csv" -o "$TMP/missing/u.json"
[ -s "$TMP/u.csv.journal" ] || fail "unwritable: no journal was kept"

# Help: the mode's options and the built-in sweeps, in both helps; the rest sweep is not one.
exe_rc help 0 sweep --help
expect_grep help out "usage: squid_sweeps sweep \[options\]"
expect_grep help out "--shard I/N"
expect_grep help out "^  sampled +256 points \(latin_hypercube\), 2 measures"
expect_grep help out "^  conductances +4096 points \(grid\)"
grep -q "^  leak " "$TMP/help.out" && fail "help: the rest sweep 'leak' is listed as built in"
exe_rc mainhelp 0 --help
expect_grep mainhelp out "squid_sweeps sweep --help"
expect_grep mainhelp out "^  sampled +256 points"

# Bad usage exits 64 and says why.
exe_rc choose 64 sweep
expect_grep choose err "2 sweeps are built in \(conductances, sampled\); choose one with --sweep"
exe_rc leak 64 sweep --sweep leak
expect_grep leak err "no built-in sweep 'leak'.*rest or input_resistance"
exe_rc unknown 64 sweep --sweep sampled --bogus
expect_grep unknown err "unknown option '--bogus'"
exe_rc threads 64 sweep --sweep sampled --threads 0
exe_rc output 64 sweep --sweep sampled -o "$TMP/x.txt"
exe_rc badshard 64 sweep --sweep sampled --shard 2/2
exe_rc progress 64 sweep --sweep sampled --progress loud
exe_rc novalue 64 sweep --sweep
exe_rc checkpoint 64 sweep --sweep sampled --checkpoint 0
[ ! -e "$TMP/x.txt" ] || fail "output: a refused -o file was written"

# A spec whose only sweep measures rest builds without one; its executable says so.
cat >"$TMP/rest_only.saltpan" <<SPEC
use "$SRC/specs/reference/squid_axon_1952.saltpan"

sweep leak_only {
  vary axon.SquidLeak1952.reversal values -60 mV, -50 mV
  measure rest(axon)
}
SPEC
expect_rc restbuild 0 build "$TMP/rest_only.saltpan" -o "$TMP/rest_only"
expect_grep restbuild err "note: sweep 'leak_only' is not built in"
expect_grep restbuild err ", 0 sweeps,"
EXE=$TMP/rest_only
exe_rc restrun 64 sweep
expect_grep restrun err "no sweep was built in"

[ "$failures" -eq 0 ]
