# json_output.sh - `saltpan check --format json` prints one parseable document on stdout.
source "$(dirname "$0")/lib/common.bash"

clean_spec "$TMP/clean.saltpan"
warning_spec "$TMP/warn.saltpan"
error_spec "$TMP/error.saltpan"

# check_json NAME ERRORS WARNINGS: stdout of NAME is JSON with exactly these keys and counts.
check_json() {
  local name=$1 errors=$2 warnings=$3
  if ! "$PY" - "$TMP/$name.out" "$errors" "$warnings" <<'PYEOF'; then
import json, sys
doc = json.load(open(sys.argv[1], encoding="utf-8"))
want_e, want_w = int(sys.argv[2]), int(sys.argv[3])
assert set(doc) == {"diagnostics", "errors", "warnings"}, sorted(doc)
assert isinstance(doc["diagnostics"], list)
assert doc["errors"] == want_e, doc["errors"]
assert doc["warnings"] == want_w, doc["warnings"]
assert sum(d["severity"] == "error" for d in doc["diagnostics"]) == want_e
assert sum(d["severity"] == "warning" for d in doc["diagnostics"]) == want_w
for d in doc["diagnostics"]:
    assert set(d) == {"severity", "message", "location", "notes"}, sorted(d)
    assert d["severity"] in ("error", "warning")
    assert isinstance(d["message"], str) and d["message"]
    assert isinstance(d["notes"], list)
    loc = d["location"]
    if loc is not None:
        assert {"file", "line", "column"} <= set(loc), sorted(loc)
        assert loc["line"] >= 1 and loc["column"] >= 1
    for n in d["notes"]:
        assert set(n) == {"message", "location"}, sorted(n)
PYEOF
    fail "$name: stdout is not the expected JSON document"
    head -30 "$TMP/$name.out" | sed 's/^/    /' >&2
  fi
}

expect_rc clean 0 check --format json "$TMP/clean.saltpan"
check_json clean 0 0
[ -s "$TMP/clean.err" ] && fail "clean: JSON mode wrote to stderr"

expect_rc error 65 check --format json "$TMP/error.saltpan"
check_json error 1 0
"$PY" - "$TMP/error.out" "$TMP/error.saltpan" <<'PYEOF' || fail "error: wrong location or message in JSON"
import json, sys
d = json.load(open(sys.argv[1]))["diagnostics"][0]
assert d["location"]["file"] == sys.argv[2], d["location"]
assert (d["location"]["line"], d["location"]["column"]) == (2, 16), d["location"]
assert "cannot add a voltage (mV) with a time (ms)" in d["message"], d["message"]
assert len(d["notes"]) >= 1
PYEOF
[ -s "$TMP/error.err" ] && fail "error: JSON mode wrote diagnostics to stderr"

expect_rc warn 0 check --format json "$TMP/warn.saltpan"
check_json warn 0 2
expect_rc werror 65 check --format=json --warnings-as-errors "$TMP/warn.saltpan"
check_json werror 0 2

# Several files: still a single document.
expect_rc several 65 check --format json "$TMP/clean.saltpan" "$TMP/error.saltpan" "$TMP/warn.saltpan"
check_json several 1 2

# Files that cannot be read: a diagnostic without a location.
expect_rc missing 65 check --format json "$TMP/missing.saltpan"
check_json missing 1 0
"$PY" -c 'import json,sys; d=json.load(open(sys.argv[1]))["diagnostics"][0]; assert d["location"] is None' \
  "$TMP/missing.out" || fail "missing: the location of an unreadable file should be null"

# A syntax error in a file whose text has µ: column in code points.
printf 'const d = 5 \xc2\xb5m +\n' >"$TMP/syntax.saltpan"
expect_rc syntax 65 check --format json "$TMP/syntax.saltpan"
check_json syntax 1 0

# Invalid UTF-8 inside the file: the message must not carry the raw bytes into JSON.
printf 'const a = 1 mV\n\xff\xfe\n' >"$TMP/bytes.saltpan"
expect_rc bytes 65 check --format json "$TMP/bytes.saltpan"
check_json bytes 1 0

# Linux paths are bytes: a file name that is not UTF-8 must still give JSON and exit 65,
# not an internal error (exit 70).
bad=$(printf '%s/bad-\xff-name.saltpan' "$TMP")
error_spec "$bad"
expect_rc bad-name 65 check --format json "$bad"
check_json bad-name 1 0

finish
