# robustness.sh - hostile input gives a located error and exit 65: never a crash or a hang.
source "$(dirname "$0")/lib/common.bash"

# located NAME FILE: exit 65 and a "FILE:line:col: error:" line on stderr.
located() {
  local name=$1 file=$2
  no_crash "$name"
  [ "$rc" -eq 65 ] || fail "$name: exited $rc, expected 65"
  grep -Eq "^$(printf '%s' "$file" | sed 's/[][\.*^$/]/\\&/g'):[0-9]+:[0-9]+: error: " "$TMP/$name.err" ||
    { fail "$name: no located 'file:line:col: error:'"; head -5 "$TMP/$name.err" | sed 's/^/    /' >&2; }
}

# unreadable NAME: exit 65 and a "saltpan: error:" line.
unreadable() {
  local name=$1
  no_crash "$name"
  [ "$rc" -eq 65 ] || fail "$name: exited $rc, expected 65"
  expect_grep "$name" err "^saltpan: error: "
}

# A directory, a missing file, a file without read permission.
mkdir "$TMP/dir.saltpan"
run directory check "$TMP/dir.saltpan"
unreadable directory
expect_grep directory err "no spec files"
# A directory with specs: each is checked, as by `saltpan test`; '_' helpers are skipped.
mkdir -p "$TMP/tree/sub"
clean_spec "$TMP/tree/sub/good.saltpan"
printf 'not a spec\n' >"$TMP/tree/_helper.saltpan"
expect_rc tree-clean 0 check "$TMP/tree"
[ ! -s "$TMP/tree-clean.err" ] || fail "tree-clean: a clean tree printed diagnostics"
printf 'temperature 2 ms\n' >"$TMP/tree/bad.saltpan"
expect_rc tree-bad 65 check "$TMP/tree"
expect_grep tree-bad err "bad.saltpan:1:13: error"
expect_grep tree-bad err "2 files checked: 1 error"
run missing check "$TMP/missing.saltpan"
unreadable missing
run show-missing show "$TMP/missing.saltpan"
unreadable show-missing
if [ "$(id -u)" -ne 0 ]; then
  printf 'use std.ions\n' >"$TMP/secret.saltpan"
  chmod 000 "$TMP/secret.saltpan"
  run noperm check "$TMP/secret.saltpan"
  unreadable noperm
fi

# Random bytes (almost surely invalid UTF-8), several samples.
for i in 1 2 3 4 5; do
  head -c 4096 /dev/urandom >"$TMP/random$i.saltpan"
  run random$i check "$TMP/random$i.saltpan"
  located random$i "$TMP/random$i.saltpan"
done
# Binary that happens to be valid UTF-8 text: NUL bytes and control characters.
printf 'const a = 1\0\001\002 mV\n' >"$TMP/nul.saltpan"
run nul check "$TMP/nul.saltpan"
located nul "$TMP/nul.saltpan"

# Invalid UTF-8 of each kind, after some valid text; the error is on line 2.
n=0
for bad in '\xc0\xaf' '\xed\xa0\x80' '\xf4\x90\x80\x80' '\xe2\x82' '\x80' '\xff'; do
  n=$((n + 1))
  printf "use std.ions\nconst a = 1 mV $bad\n" >"$TMP/utf8-$n.saltpan"
  run utf8-$n check "$TMP/utf8-$n.saltpan"
  located utf8-$n "$TMP/utf8-$n.saltpan"
  grep -q "utf8-$n.saltpan:2:" "$TMP/utf8-$n.err" || fail "utf8-$n: the error is not on line 2"
done

# Deeply nested parentheses and a very long expression.
"$PY" -c 'print("const a = " + "(" * 10000 + "1" + ")" * 10000)' >"$TMP/nested.saltpan"
run nested check "$TMP/nested.saltpan"
located nested "$TMP/nested.saltpan"
"$PY" -c 'print("const a = " + "[" * 10000)' >"$TMP/brackets.saltpan"
run brackets check "$TMP/brackets.saltpan"
located brackets "$TMP/brackets.saltpan"
"$PY" -c 'print("const a = 1" + " + 1" * 99999)' >"$TMP/long.saltpan"
run long check "$TMP/long.saltpan"
located long "$TMP/long.saltpan"
"$PY" -c 'print("const a = 1 mV" + " * 1" * 99999)' >"$TMP/product.saltpan"
run product check "$TMP/product.saltpan"
located product "$TMP/product.saltpan"
"$PY" -c 'print("const a = " + "-" * 100000 + "1")' >"$TMP/negations.saltpan"
run negations check "$TMP/negations.saltpan"
located negations "$TMP/negations.saltpan"
"$PY" -c 'print("const a = " + "not " * 50000 + "1")' >"$TMP/nots.saltpan"
run nots check "$TMP/nots.saltpan"
located nots "$TMP/nots.saltpan"
"$PY" -c 'print("const a = " + "if 1 > 0 then 1 else " * 20000 + "1")' >"$TMP/ifs.saltpan"
run ifs check "$TMP/ifs.saltpan"
located ifs "$TMP/ifs.saltpan"
"$PY" -c 'print("const a = 2" + " ^ 2" * 50000)' >"$TMP/powers.saltpan"
run powers check "$TMP/powers.saltpan"
located powers "$TMP/powers.saltpan"
# Signs before a name (not a number): valid, and must not take time exponential in the
# number of signs.
"$PY" -c 'print("const a = 1\nconst b = " + "-" * 40 + "a\nconst c = " + "+ -" * 20 + "a")' >"$TMP/signs.saltpan"
run signs check "$TMP/signs.saltpan"
no_crash signs
[ "$rc" -eq 0 ] || [ "$rc" -eq 65 ] || fail "signs: exited $rc"
# Nested calls: each level is a '(' too.
"$PY" -c 'print("use std.math\nconst a = " + "logistic(" * 10000 + "0" + ")" * 10000)' >"$TMP/calls.saltpan"
run calls check "$TMP/calls.saltpan"
located calls "$TMP/calls.saltpan"
# One enormous line of a single name.
"$PY" -c 'print("const " + "a" * 1000000 + " = 1")' >"$TMP/longname.saltpan"
run longname check "$TMP/longname.saltpan"
no_crash longname
[ "$rc" -eq 0 ] || [ "$rc" -eq 65 ] || fail "longname: exited $rc"

finish
