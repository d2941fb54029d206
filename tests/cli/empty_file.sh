# empty_file.sh - an empty file (or one with only blanks/comments) declares no model: it
# must be reported as an error located in the file, exit 65.
source "$(dirname "$0")/lib/common.bash"

: >"$TMP/empty.saltpan"
run empty check "$TMP/empty.saltpan"
no_crash empty
[ "$rc" -eq 65 ] || fail "empty: exited $rc, expected 65"
grep -Eq "^$TMP/empty.saltpan:1:1: error: " "$TMP/empty.err" || fail "empty: no error at $TMP/empty.saltpan:1:1"

printf '\n\n# nothing but a comment\n   \n' >"$TMP/blank.saltpan"
run blank check "$TMP/blank.saltpan"
no_crash blank
[ "$rc" -eq 65 ] || fail "blank: exited $rc, expected 65"
grep -Eq "^$TMP/blank.saltpan:[0-9]+:[0-9]+: error: " "$TMP/blank.err" || fail "blank: no located error"

finish
