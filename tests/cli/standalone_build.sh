#!/usr/bin/env bash
# standalone_build.sh - `saltpan build` itself: the usual diagnostics for a spec with errors,
# usage errors, a missing C++ driver, an unwritable output and a spec without protocols.
source "$(dirname "$0")/lib/common.bash"

expect_rc help 0 build --help
expect_grep help out '^usage: saltpan build'
expect_grep help out 'not for clinical or diagnostic decisions'
expect_rc listed 0 --help
expect_grep listed out '^  build FILE'

error_spec "$TMP/bad.saltpan"
expect_rc bad_spec 65 build "$TMP/bad.saltpan" -o "$TMP/bad"
expect_grep bad_spec err "bad.saltpan:2:16: error: cannot add"
[ ! -e "$TMP/bad" ] || fail "bad_spec: an executable was written for a spec with errors"

expect_rc no_file 64 build
expect_grep no_file err '^saltpan build: error: no spec file given'
expect_rc bad_option 64 build --bogus "$TMP/bad.saltpan"
expect_grep bad_option err "^saltpan build: error: unknown option '--bogus'"
expect_rc two_files 64 build "$TMP/bad.saltpan" "$TMP/bad.saltpan"
expect_grep two_files err 'build takes one spec file'
expect_rc missing_file 65 build "$TMP/nothing_here.saltpan"
no_crash missing_file

# A clean spec without a protocol has nothing to run.
clean_spec "$TMP/cell.saltpan"
expect_rc no_protocol 64 build "$TMP/cell.saltpan" -o "$TMP/cell"
expect_grep no_protocol err "^saltpan build: error: '.*cell.saltpan' has no protocol to build"

# With a protocol it builds; the default output name is the spec's name, in the current directory.
cat >>"$TMP/cell.saltpan" <<'SPEC'
protocol pulse {
  method exponential_euler step 25 us
  duration 20 ms
  inject soma 0.05 nA from 2 ms to 12 ms
  record soma.V every 0.5 ms
}
SPEC
(cd "$TMP" && timeout 20 "$SALTPAN" build cell.saltpan >"$TMP/default_name.out" 2>"$TMP/default_name.err") ||
  fail "default_name: build failed: $(cat "$TMP/default_name.err")"
[ -x "$TMP/cell" ] || fail "default_name: no executable '$TMP/cell'"
run cell_run run "$TMP/cell.saltpan"
if [ -x "$TMP/cell" ] && ! "$TMP/cell" 2>/dev/null | cmp -s - "$TMP/cell_run.out"; then
  fail "the cell's executable differs from saltpan run"
fi

# No C++ driver: a clear message, not a crash, and nothing written.
rc=0
timeout 20 env SALTPAN_CXX=saltpan-no-such-driver "$SALTPAN" build "$TMP/cell.saltpan" -o "$TMP/nodriver" \
  >"$TMP/nodriver.out" 2>"$TMP/nodriver.err" || rc=$?
[ "$rc" -eq 70 ] || fail "nodriver: exited $rc, expected 70"
grep -q "^saltpan build: error: cannot find the C++ compiler driver 'saltpan-no-such-driver' on PATH" \
  "$TMP/nodriver.err" || fail "nodriver: no diagnostic: $(cat "$TMP/nodriver.err")"
[ ! -e "$TMP/nodriver" ] || fail "nodriver: an output was written"

# An output that cannot be written.
expect_rc unwritable 73 build "$TMP/cell.saltpan" -o "$TMP/no/such/dir/cell"
expect_grep unwritable err '^saltpan build: error: cannot create'

finish
