# test_errors.sh - `saltpan test` reports every problem per file and keeps its reports
# well-formed: an unreadable folder, a file name that is not UTF-8, control characters in strings.
source "$(dirname "$0")/lib/common.bash"

# valid_xml NAME FILE: FILE is well-formed JUnit XML (by the schema when xmllint is there).
valid_xml() {
  if command -v xmllint >/dev/null; then
    xmllint --noout --schema "$SRC/tests/cli/junit.xsd" "$2" 2>"$TMP/$1.xmllint" ||
      fail "$1: JUnit XML does not validate: $(head -3 "$TMP/$1.xmllint")"
  else
    $PY -c 'import sys, xml.dom.minidom; xml.dom.minidom.parse(sys.argv[1])' "$2" || fail "$1: malformed XML"
  fi
}

# valid_json NAME FILE: FILE parses as JSON.
valid_json() {
  $PY -c 'import json, sys; json.load(open(sys.argv[1], encoding="utf-8"))' "$2" 2>"$TMP/$1.json.err" ||
    fail "$1: malformed JSON: $(tail -1 "$TMP/$1.json.err")"
}

# A passing suite with one reversal potential.
passing() {
  printf 'use std.ions\ntemperature 6.3 degC\noutside sea { [K] = 10 mM }\n' >"$1"
  printf 'compartment axon { capacitance 1 uF/cm2  outside sea  inside { [K] = 400 mM } }\n' >>"$1"
  printf 'expect reversal(K, axon) == -88.83 mV within 0.01 mV source "%s"\n' "${2:-the Nernst equation, common practice}" >>"$1"
}

# --- A file name that is not UTF-8, and control characters in a source string ---
mkdir "$TMP/names"
passing "$TMP/names/$(printf 'bad\377\376').saltpan"
passing "$TMP/names/escape.saltpan" "$(printf 'red \033[31m bell \007 end')"
expect_rc names 0 test --junit "$TMP/names.xml" --json "$TMP/names.json" "$TMP/names"
expect_grep names out '2 passed, 0 failed'
expect_grep names out 'bad\\xff\\xfe\.saltpan'
expect_grep names out 'red \\x1b\[31m bell \\x07 end'
LC_ALL=C grep -q "$(printf '\033')" "$TMP/names.out" && fail "names: a raw escape character reached the terminal"
valid_xml names "$TMP/names.xml"
valid_json names "$TMP/names.json"

# A control character in a diagnostic is shown escaped, and the JUnit error stays valid XML.
mkdir "$TMP/diag"
printf 'use "%s.saltpan"\n' "$(printf 'gone\033[2J')" >"$TMP/diag/uses.saltpan"
expect_rc diag 65 test --junit "$TMP/diag.xml" "$TMP/diag"
expect_grep diag err "cannot find 'gone\\\\x1b\[2J.saltpan'"
LC_ALL=C grep -q "$(printf '\033')" "$TMP/diag.err" && fail "diag: a raw escape character reached the terminal"
valid_xml diag "$TMP/diag.xml"

# --- An unreadable subfolder is one file with errors; the rest is still measured ---
# Permissions do not stop root, so as root the run drops to an unprivileged user.
as_user=()
if [ "$(id -u)" -eq 0 ]; then
  if ! command -v setpriv >/dev/null; then
    echo "skip: running as root without setpriv" >&2
    exit 77
  fi
  as_user=(setpriv --reuid=65534 --regid=65534 --clear-groups)
  chmod 755 "$TMP"
fi
mkdir -p "$TMP/suite/locked" "$TMP/reports"
passing "$TMP/suite/good.saltpan"
passing "$TMP/suite/locked/hidden.saltpan"
chmod 000 "$TMP/suite/locked"
chmod 777 "$TMP/reports"
rc=0
timeout 20 "${as_user[@]}" "$SALTPAN" test --junit "$TMP/reports/suite.xml" "$TMP/suite" \
  >"$TMP/locked.out" 2>"$TMP/locked.err" || rc=$?
chmod 755 "$TMP/suite/locked"
no_crash locked
[ "$rc" -eq 65 ] || fail "locked: exited $rc, expected 65"
expect_grep locked err "saltpan: error: .*suite/locked: cannot read the folder"
grep -q 'internal' "$TMP/locked.err" && fail "locked: reported as an internal error"
expect_grep locked out '1 passed, 0 failed, 1 file with errors'
valid_xml locked "$TMP/reports/suite.xml"
finish
