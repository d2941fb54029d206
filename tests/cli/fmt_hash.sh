# fmt_hash.sh - `saltpan fmt` (--check, --stdout, in place) and `saltpan hash`: exit codes, and a
# hash that survives reformatting and comment edits but not a changed number.
source "$(dirname "$0")/lib/common.bash"

cat >"$TMP/messy.saltpan" <<'SPEC'
model Messy "a messy layout"   # trailing comment
use std.ions
use std.math
temperature 37 degC
outside bath { [Na] = 145 mM ; [K]=4.5 mM
 [Cl] = 116 mM  impermeant 33.5 mM valence -1}
## The cell.
compartment soma{sphere diameter 20 um;capacitance 1 uF/cm2
  initial V=-65 mV   outside bath
  inside { [Na]=11 mM [K] = 138 mM [Cl] = 9 mM impermeant 140 mM valence -1 }
    membrane{KLeak 1e-6 cm/s;NaLeak 4e-8 cm/s
  ClLeak 4.5e-7 cm/s}}
channel KLeak{carries K}
channel NaLeak {
  carries Na   # sodium
}
channel ClLeak { carries Cl }
SPEC
cp "$TMP/messy.saltpan" "$TMP/original.saltpan"

expect_rc check-messy 1 fmt --check "$TMP/messy.saltpan"
expect_grep check-messy out "messy\.saltpan"
cmp -s "$TMP/messy.saltpan" "$TMP/original.saltpan" || fail "fmt --check modified the file"
expect_rc stdout 0 fmt --stdout "$TMP/messy.saltpan"
cmp -s "$TMP/messy.saltpan" "$TMP/original.saltpan" || fail "fmt --stdout modified the file"
expect_grep stdout out "^  membrane \{$"
expect_grep stdout out "^    NaLeak 4e-8 cm/s$"
expect_grep stdout out "^model Messy \"a messy layout\"  # trailing comment$"
expect_grep stdout out "^  carries Na  # sodium$"
expect_grep stdout out "^## The cell\.$"

expect_rc hash-before 0 hash "$TMP/messy.saltpan"
expect_grep hash-before out "^sha256:[0-9a-f]{64}  $TMP/messy.saltpan$"
before=$(cut -d' ' -f1 "$TMP/hash-before.out")

expect_rc fmt 0 fmt "$TMP/messy.saltpan"
cmp -s "$TMP/messy.saltpan" "$TMP/stdout.out" || fail "fmt in place differs from fmt --stdout"
expect_rc check-after 0 fmt --check "$TMP/messy.saltpan"
if [ -s "$TMP/check-after.out" ]; then fail "check-after: listed a canonical file"; fi
expect_rc check-spec 0 check "$TMP/messy.saltpan"
ls "$TMP"/messy.saltpan.tmp-* >/dev/null 2>&1 && fail "fmt left a temporary file"
# A second fmt changes nothing.
cp "$TMP/messy.saltpan" "$TMP/once.saltpan"
expect_rc fmt-again 0 fmt "$TMP/messy.saltpan"
cmp -s "$TMP/messy.saltpan" "$TMP/once.saltpan" || fail "fmt is not idempotent"

expect_rc hash-after 0 hash "$TMP/messy.saltpan"
after=$(cut -d' ' -f1 "$TMP/hash-after.out")
[ "$before" = "$after" ] || fail "hash changed by fmt: $before -> $after"

# Editing or adding comments keeps the hash.
sed -e 's/# sodium/# the sodium leak, reworded/' -e 's/^## The cell\./## A different doc./' \
  "$TMP/messy.saltpan" >"$TMP/comments.saltpan"
echo "# a comment at the end" >>"$TMP/comments.saltpan"
expect_rc hash-comments 0 hash "$TMP/comments.saltpan"
[ "$(cut -d' ' -f1 "$TMP/hash-comments.out")" = "$before" ] || fail "hash changed by a comment edit"

# Changing one number changes it; so does writing the same value differently.
sed 's/4.5e-7 cm\/s/4.6e-7 cm\/s/' "$TMP/messy.saltpan" >"$TMP/number.saltpan"
expect_rc hash-number 0 hash "$TMP/number.saltpan"
[ "$(cut -d' ' -f1 "$TMP/hash-number.out")" != "$before" ] || fail "hash unchanged by a changed number"
sed 's/4.5e-7 cm\/s/0.45e-6 cm\/s/' "$TMP/messy.saltpan" >"$TMP/spelling.saltpan"
expect_rc hash-spelling 0 hash "$TMP/spelling.saltpan"
[ "$(cut -d' ' -f1 "$TMP/hash-spelling.out")" != "$before" ] || fail "hash unchanged by a respelled number"

# JSON: the same hash, the version, the modules in load order (stdlib by name, root last).
expect_rc hash-json 0 hash --format json "$TMP/messy.saltpan"
$PY - "$TMP/hash-json.out" "$after" <<'PY' || fail "hash --format json is wrong"
import json, sys
doc = json.load(open(sys.argv[1]))
assert doc["hash"] == sys.argv[2], doc["hash"]
assert doc["file"].endswith("messy.saltpan")
assert doc["version"]
names = [m["name"] for m in doc["modules"]]
assert names == ["std.ions", "std.math", "(root)"], names
assert all(m["hash"].startswith("sha256:") and len(m["hash"]) == 71 for m in doc["modules"])
PY

# The same model at another path hashes the same.
mkdir -p "$TMP/elsewhere"
cp "$TMP/messy.saltpan" "$TMP/elsewhere/renamed.saltpan"
expect_rc hash-moved 0 hash "$TMP/elsewhere/renamed.saltpan"
[ "$(cut -d' ' -f1 "$TMP/hash-moved.out")" = "$before" ] || fail "hash depends on the file's path"

# Syntax errors: 65 with a diagnostic, and the file is left alone.
printf 'channel { carries K }\n' >"$TMP/bad.saltpan"
cp "$TMP/bad.saltpan" "$TMP/bad.orig"
expect_rc fmt-bad 65 fmt "$TMP/bad.saltpan"
expect_grep fmt-bad err "bad\.saltpan:1:9: error: "
cmp -s "$TMP/bad.saltpan" "$TMP/bad.orig" || fail "fmt touched a file with syntax errors"
expect_rc check-bad 65 fmt --check "$TMP/bad.saltpan"
expect_rc hash-bad 65 hash "$TMP/bad.saltpan"
# One bad file among good ones: the good one is still formatted, the run fails.
cp "$TMP/original.saltpan" "$TMP/good.saltpan"
expect_rc fmt-mixed 65 fmt "$TMP/bad.saltpan" "$TMP/good.saltpan"
cmp -s "$TMP/good.saltpan" "$TMP/once.saltpan" || fail "fmt-mixed: the good file was not formatted"
expect_rc fmt-missing 65 fmt "$TMP/no-such.saltpan"
expect_rc hash-missing 65 hash "$TMP/no-such.saltpan"

# Usage errors and help.
expect_rc fmt-no-file 64 fmt
expect_rc hash-no-file 64 hash
expect_rc fmt-unknown 64 fmt --frobnicate "$TMP/messy.saltpan"
expect_rc fmt-both 64 fmt --check --stdout "$TMP/messy.saltpan"
expect_rc hash-two 64 hash "$TMP/messy.saltpan" "$TMP/messy.saltpan"
expect_rc hash-format 64 hash --format yaml "$TMP/messy.saltpan"
expect_rc fmt-help 0 fmt --help
expect_grep fmt-help out "^usage: saltpan fmt"
expect_grep fmt-help out "exit status:"
expect_rc hash-help 0 hash --help
expect_grep hash-help out "^usage: saltpan hash"
expect_rc help-fmt 0 help fmt
expect_grep help-fmt out "^usage: saltpan fmt"
expect_rc main-help 0 --help
expect_grep main-help out "^  fmt FILE"
expect_grep main-help out "^  hash FILE"

finish
