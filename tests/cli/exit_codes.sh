# exit_codes.sh - 0 clean, 65 errors, warnings 0 (65 with --warnings-as-errors), 64 usage.
source "$(dirname "$0")/lib/common.bash"

clean_spec "$TMP/clean.saltpan"
warning_spec "$TMP/warn.saltpan"
error_spec "$TMP/error.saltpan"

expect_rc clean 0 check "$TMP/clean.saltpan"
if [ -s "$TMP/clean.err" ] || [ -s "$TMP/clean.out" ]; then
  fail "clean: a clean spec printed something"
fi
expect_rc error 65 check "$TMP/error.saltpan"
expect_grep error err "^$TMP/error.saltpan:2:16: error: "
expect_rc warn 0 check "$TMP/warn.saltpan"
expect_grep warn err "^$TMP/warn.saltpan:[0-9]+:[0-9]+: warning: "
if grep -q ': error: ' "$TMP/warn.err"; then fail "warn: the warning spec reported an error"; fi
expect_rc werror 65 check --warnings-as-errors "$TMP/warn.saltpan"
expect_rc werror-clean 0 check --warnings-as-errors "$TMP/clean.saltpan"
# One bad file among good ones fails the run, and all files are reported.
expect_rc several 65 check "$TMP/clean.saltpan" "$TMP/error.saltpan" "$TMP/warn.saltpan"
expect_grep several err "3 files checked: 1 error, 2 warnings"
expect_rc show-clean 0 show "$TMP/clean.saltpan"
expect_rc show-error 65 show "$TMP/error.saltpan"
expect_rc show-warn 0 show "$TMP/warn.saltpan"

# Bad usage: 64, with a message on stderr and nothing on stdout.
expect_rc no-args 64
expect_rc no-file 64 check
expect_grep no-file err "no spec file given"
expect_rc show-no-file 64 show
expect_rc unknown-option 64 check --frobnicate "$TMP/clean.saltpan"
expect_grep unknown-option err "unknown option '--frobnicate'"
expect_rc unknown-short 64 check -x "$TMP/clean.saltpan"
expect_rc unknown-command 64 frobnicate "$TMP/clean.saltpan"
expect_grep unknown-command err "unknown command 'frobnicate'"
expect_rc bad-format 64 check --format yaml "$TMP/clean.saltpan"
expect_rc bad-format-eq 64 check --format=xml "$TMP/clean.saltpan"
expect_rc format-no-value 64 check "$TMP/clean.saltpan" --format
expect_rc bad-color 64 check --color sometimes "$TMP/clean.saltpan"
expect_rc bad-emit 64 check --emit bytes "$TMP/clean.saltpan"
expect_rc show-two 64 show "$TMP/clean.saltpan" "$TMP/clean.saltpan"
expect_rc show-werror 64 show --warnings-as-errors "$TMP/clean.saltpan"
expect_rc check-o 64 check -o "$TMP/x.txt" "$TMP/clean.saltpan"
for name in unknown-option bad-format no-file show-two; do
  if [ -s "$TMP/$name.out" ]; then fail "$name: usage error printed to stdout"; fi
done
# A file named like an option, after --.
cp "$TMP/clean.saltpan" "$TMP/-dash.saltpan"
cd "$TMP"
expect_rc dashdash 0 check -- -dash.saltpan
cd - >/dev/null

finish
