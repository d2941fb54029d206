# truncated.sh - a valid spec cut at many byte offsets: every prefix either checks or gives
# a located error with exit 65; none crashes or hangs.
source "$(dirname "$0")/lib/common.bash"

clean_spec "$TMP/full.saltpan"
size=$(stat -c %s "$TMP/full.saltpan")
errors=0
# Every offset up to 200, then every 7th byte, and each of the last 10 bytes; the spec
# has a 'µ' (2 bytes) so some cuts fall inside a character.
offsets=$( (seq 0 200; seq 201 7 "$size"; seq $((size - 10)) "$size") | sort -nu)
for cut in $offsets; do
  head -c "$cut" "$TMP/full.saltpan" >"$TMP/cut.saltpan"
  run cut check "$TMP/cut.saltpan"
  if [ "$rc" -ge 128 ] || [ "$rc" -eq 124 ]; then
    fail "cut at $cut: crashed or hung (exit $rc)"
    cp "$TMP/cut.saltpan" "$TMP/crash-$cut.saltpan"
    continue
  fi
  case $rc in
  0) ;;
  65)
    errors=$((errors + 1))
    grep -Eq "^$TMP/cut.saltpan:[0-9]+:[0-9]+: error: " "$TMP/cut.err" ||
      fail "cut at $cut: exit 65 without a located error: $(head -1 "$TMP/cut.err")"
    ;;
  *) fail "cut at $cut: exit $rc" ;;
  esac
done
# The whole spec is clean, and most prefixes are not.
[ "$errors" -gt 50 ] || fail "only $errors truncations reported errors"

finish
