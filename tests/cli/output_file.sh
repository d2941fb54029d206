# output_file.sh - `saltpan show -o FILE` writes the whole document, atomically.
source "$(dirname "$0")/lib/common.bash"

clean_spec "$TMP/clean.saltpan"
expect_rc stdout 0 show --format json "$TMP/clean.saltpan"

mkdir "$TMP/out"
expect_rc file 0 show --format json -o "$TMP/out/model.json" "$TMP/clean.saltpan"
[ -s "$TMP/file.out" ] && fail "file: -o also printed to stdout"
cmp -s "$TMP/stdout.out" "$TMP/out/model.json" || fail "file: the file differs from stdout output"
"$PY" -c 'import json,sys; json.load(open(sys.argv[1]))' "$TMP/out/model.json" || fail "file: not JSON"
# No temporary left beside it.
[ "$(ls -A "$TMP/out")" = "model.json" ] || fail "file: stray files: $(ls -A "$TMP/out")"

# Text too, and -o=... is not an option spelling; the value follows.
expect_rc text 0 show -o "$TMP/out/model.txt" "$TMP/clean.saltpan"
expect_rc text-stdout 0 show "$TMP/clean.saltpan"
cmp -s "$TMP/text-stdout.out" "$TMP/out/model.txt" || fail "text: the file differs from stdout output"

# Replacing an existing file goes through a rename: a hard link to the old file keeps
# the old content whole, and the new file is complete.
printf 'old contents\n' >"$TMP/out/replace.json"
ln "$TMP/out/replace.json" "$TMP/out/old-link.json"
expect_rc replace 0 show --format json -o "$TMP/out/replace.json" "$TMP/clean.saltpan"
cmp -s "$TMP/stdout.out" "$TMP/out/replace.json" || fail "replace: new file incomplete"
[ "$(cat "$TMP/out/old-link.json")" = "old contents" ] || fail "replace: the old file was overwritten in place"

# An unwritable destination: exit 73, a message, and no file.
expect_rc nodir 73 show -o "$TMP/no/such/dir/model.json" "$TMP/clean.saltpan"
expect_grep nodir err "^saltpan: "
[ -e "$TMP/no" ] && fail "nodir: created a directory"
chmod 555 "$TMP/out"
if [ "$(id -u)" -ne 0 ]; then
  expect_rc readonly 73 show -o "$TMP/out/new.json" "$TMP/clean.saltpan"
  [ -e "$TMP/out/new.json" ] && fail "readonly: wrote into a read-only directory"
  ls -A "$TMP/out" | grep -q tmp && fail "readonly: left a temporary behind"
fi
chmod 755 "$TMP/out"

# A spec with errors writes nothing and leaves an existing file alone.
error_spec "$TMP/error.saltpan"
printf 'keep me\n' >"$TMP/out/keep.json"
expect_rc error 65 show -o "$TMP/out/keep.json" "$TMP/error.saltpan"
[ "$(cat "$TMP/out/keep.json")" = "keep me" ] || fail "error: the output file was touched"
expect_rc error-new 65 show -o "$TMP/out/never.json" "$TMP/error.saltpan"
[ -e "$TMP/out/never.json" ] && fail "error-new: created an output file for a spec with errors"

finish
