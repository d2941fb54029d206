# old_name.sh - the tool was renamed to saltpan: no file name or text in the tree may still
# carry its former name (spelled here in two pieces so this script does not match itself).
# The old words for a placed channel/pump and for a recorded quantity are gone too.
source "$(dirname "$0")/lib/common.bash"

old="b""rine"
cd "$SRC"
if git rev-parse --is-inside-work-tree >/dev/null 2>&1; then
  files=$(git ls-files)
else
  files=$(find . -path ./build -prune -o -path './build-*' -prune -o -path ./.git -prune -o -type f -print)
fi
[ -n "$files" ] || fail "no files found under $SRC"

hits=$(printf '%s\n' "$files" | grep -i -- "$old" || true)
[ -z "$hits" ] || fail "file names still carry the old name: $(echo $hits | head -c 400)"

hits=$(printf '%s\n' "$files" | tr '\n' '\0' | xargs -0 grep -I -i -l -- "$old" 2>/dev/null || true)
[ -z "$hits" ] || fail "files still say the old name: $(echo $hits | head -c 400)"

for word in "mech""anism" "record""able"; do
  hits=$(printf '%s\n' "$files" | tr '\n' '\0' | xargs -0 grep -I -i -n -- "$word" 2>/dev/null || true)
  [ -z "$hits" ] || fail "the old label '$word' is still used: $(echo "$hits" | head -3)"
done

finish
