# hints.sh - messages that lead to the fix: `help --help`, and a mistyped --set name answered in
# one line with the nearest parameter names rather than the whole help.
source "$(dirname "$0")/lib/common.bash"

expect_rc help-help 0 help --help
expect_grep help-help out "^saltpan - "
expect_grep help-help out "help \[COMMAND\]"

spec="$SRC/specs/reference/squid_axon_1952.saltpan"
expect_rc set-typo 64 run "$spec" --set axon.SquidSodum1952.density=100mS/cm2 -o "$TMP/x.csv"
expect_grep set-typo err "^saltpan: error: there is no parameter 'axon.SquidSodum1952.density'; did you mean 'axon.SquidSodium1952.density'\?"
[ "$(wc -l <"$TMP/set-typo.err")" -eq 1 ] || fail "set-typo: expected one line on stderr, got $(wc -l <"$TMP/set-typo.err")"
! grep -q "usage:" "$TMP/set-typo.err" || fail "set-typo: the whole help was printed"
[ ! -e "$TMP/x.csv" ] || fail "set-typo: an output was written"

# A name near nothing gets no guess, only where to look.
expect_rc set-far 64 run "$spec" --set zzzzqqq=1 -o "$TMP/y.csv"
! grep -q "did you mean" "$TMP/set-far.err" || fail "set-far: guessed a name for a far-off typo"
expect_grep set-far err "emit ir"

finish
