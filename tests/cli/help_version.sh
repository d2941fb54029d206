# help_version.sh - --help and --version of saltpan and its commands.
source "$(dirname "$0")/lib/common.bash"

expect_rc help 0 --help
expect_grep help out "^usage: saltpan <command>"
expect_grep help out "exit status: 0 success, 64 bad usage, 65"
expect_rc help-short 0 -h
cmp -s "$TMP/help.out" "$TMP/help-short.out" || fail "-h differs from --help"
expect_rc help-command 0 help
cmp -s "$TMP/help.out" "$TMP/help-command.out" || fail "'saltpan help' differs from --help"

expect_rc version 0 --version
expect_grep version out "^saltpan [0-9]+\.[0-9]+\.[0-9]+"
[ "$(wc -l <"$TMP/version.out")" -eq 1 ] || fail "--version printed more than one line"

expect_rc check-help 0 check --help
expect_grep check-help out "^usage: saltpan check"
expect_grep check-help out "--warnings-as-errors"
expect_grep check-help out "--format text\|json"
expect_rc help-check 0 help check
cmp -s "$TMP/check-help.out" "$TMP/help-check.out" || fail "'saltpan help check' differs from 'saltpan check --help'"
# --help wins over a missing file.
expect_rc check-help-file 0 check --help /nonexistent.saltpan

expect_rc show-help 0 show --help
expect_grep show-help out "^usage: saltpan show"
expect_grep show-help out "-o FILE"
expect_grep show-help out "73"
expect_rc help-show 0 help show
cmp -s "$TMP/show-help.out" "$TMP/help-show.out" || fail "'saltpan help show' differs from 'saltpan show --help'"

expect_rc check-version 0 check --version
cmp -s "$TMP/version.out" "$TMP/check-version.out" || fail "'saltpan check --version' differs from --version"
expect_rc show-version 0 show --version
cmp -s "$TMP/version.out" "$TMP/show-version.out" || fail "'saltpan show --version' differs from --version"

expect_rc help-unknown 64 help frobnicate
for name in help check-help show-help version; do
  if [ -s "$TMP/$name.err" ]; then fail "$name wrote to stderr"; fi
done

finish
