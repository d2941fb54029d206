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

# unreadable NAME: exit 65 and a "brine: error:" line.
unreadable() {
  local name=$1
  no_crash "$name"
  [ "$rc" -eq 65 ] || fail "$name: exited $rc, expected 65"
  expect_grep "$name" err "^brine: error: "
}

# A directory, a missing file, a file without read permission.
mkdir "$TMP/dir.brine"
run directory check "$TMP/dir.brine"
unreadable directory
run missing check "$TMP/missing.brine"
unreadable missing
run show-missing show "$TMP/missing.brine"
unreadable show-missing
if [ "$(id -u)" -ne 0 ]; then
  printf 'use std.ions\n' >"$TMP/secret.brine"
  chmod 000 "$TMP/secret.brine"
  run noperm check "$TMP/secret.brine"
  unreadable noperm
fi

# Random bytes (almost surely invalid UTF-8), several samples.
for i in 1 2 3 4 5; do
  head -c 4096 /dev/urandom >"$TMP/random$i.brine"
  run random$i check "$TMP/random$i.brine"
  located random$i "$TMP/random$i.brine"
done
# Binary that happens to be valid UTF-8 text: NUL bytes and control characters.
printf 'const a = 1\0\001\002 mV\n' >"$TMP/nul.brine"
run nul check "$TMP/nul.brine"
located nul "$TMP/nul.brine"

# Invalid UTF-8 of each kind, after some valid text; the error is on line 2.
n=0
for bad in '\xc0\xaf' '\xed\xa0\x80' '\xf4\x90\x80\x80' '\xe2\x82' '\x80' '\xff'; do
  n=$((n + 1))
  printf "use std.ions\nconst a = 1 mV $bad\n" >"$TMP/utf8-$n.brine"
  run utf8-$n check "$TMP/utf8-$n.brine"
  located utf8-$n "$TMP/utf8-$n.brine"
  grep -q "utf8-$n.brine:2:" "$TMP/utf8-$n.err" || fail "utf8-$n: the error is not on line 2"
done

# Deeply nested parentheses and a very long expression.
"$PY" -c 'print("const a = " + "(" * 10000 + "1" + ")" * 10000)' >"$TMP/nested.brine"
run nested check "$TMP/nested.brine"
located nested "$TMP/nested.brine"
"$PY" -c 'print("const a = " + "[" * 10000)' >"$TMP/brackets.brine"
run brackets check "$TMP/brackets.brine"
located brackets "$TMP/brackets.brine"
"$PY" -c 'print("const a = 1" + " + 1" * 99999)' >"$TMP/long.brine"
run long check "$TMP/long.brine"
located long "$TMP/long.brine"
"$PY" -c 'print("const a = 1 mV" + " * 1" * 99999)' >"$TMP/product.brine"
run product check "$TMP/product.brine"
located product "$TMP/product.brine"
"$PY" -c 'print("const a = " + "-" * 100000 + "1")' >"$TMP/negations.brine"
run negations check "$TMP/negations.brine"
located negations "$TMP/negations.brine"
"$PY" -c 'print("const a = " + "not " * 50000 + "1")' >"$TMP/nots.brine"
run nots check "$TMP/nots.brine"
located nots "$TMP/nots.brine"
"$PY" -c 'print("const a = " + "if 1 > 0 then 1 else " * 20000 + "1")' >"$TMP/ifs.brine"
run ifs check "$TMP/ifs.brine"
located ifs "$TMP/ifs.brine"
"$PY" -c 'print("const a = 2" + " ^ 2" * 50000)' >"$TMP/powers.brine"
run powers check "$TMP/powers.brine"
located powers "$TMP/powers.brine"
# Signs before a name (not a number): valid, and must not take time exponential in the
# number of signs.
"$PY" -c 'print("const a = 1\nconst b = " + "-" * 40 + "a\nconst c = " + "+ -" * 20 + "a")' >"$TMP/signs.brine"
run signs check "$TMP/signs.brine"
no_crash signs
[ "$rc" -eq 0 ] || [ "$rc" -eq 65 ] || fail "signs: exited $rc"
# Nested calls: each level is a '(' too.
"$PY" -c 'print("use std.math\nconst a = " + "logistic(" * 10000 + "0" + ")" * 10000)' >"$TMP/calls.brine"
run calls check "$TMP/calls.brine"
located calls "$TMP/calls.brine"
# One enormous line of a single name.
"$PY" -c 'print("const " + "a" * 1000000 + " = 1")' >"$TMP/longname.brine"
run longname check "$TMP/longname.brine"
no_crash longname
[ "$rc" -eq 0 ] || [ "$rc" -eq 65 ] || fail "longname: exited $rc"

finish
