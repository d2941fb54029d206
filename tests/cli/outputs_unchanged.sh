# outputs_unchanged.sh - every shipped spec's hash, show (text and JSON), rest, test, methods, the
# traces of each of its protocols and the tables of its sweeps, against the outputs recorded in
# tests/golden/outputs/.
# A refactoring of the engine must leave all of them byte-identical.
#
# Texts are compared byte for byte. A trace or table is compared by its SHA-256; when that
# differs, its every 20th row (kept in the golden directory) is compared value by value: within 1e-9
# relative it passes with a warning (another CPU's libm may round an exp differently in the
# last bit, and the 12 printed digits can show it), beyond that it fails.
# SALTPAN_UPDATE_GOLDEN=1 rewrites the golden files instead; review the diff.
source "$(dirname "$0")/lib/common.bash"

GOLDEN="$SRC/tests/golden/outputs"
update=${SALTPAN_UPDATE_GOLDEN:-0}
warnings=0

# Timings are the only part of the outputs that may change from run to run.
normalise() { sed -E 's/compile [0-9.]+ ms, simulate [0-9.]+ ms/compile # ms, simulate # ms/'; }

# section TITLE ARGS...: appends the exit status, stdout and stderr of saltpan ARGS to $report.
section() {
  local title=$1
  shift
  local rc=0
  (cd "$SRC" && timeout 60 "$SALTPAN" "$@") >"$TMP/s.out" 2>"$TMP/s.err" || rc=$?
  {
    echo "== $title (exit $rc)"
    normalise <"$TMP/s.out"
    echo "-- stderr"
    normalise <"$TMP/s.err"
  } >>"$report"
}

mkdir -p "$TMP/now"
specs=$(cd "$SRC" && find specs docs/examples -name '*.saltpan' | LC_ALL=C sort)
for spec in $specs; do
  stem=$(echo "${spec%.saltpan}" | tr / _)
  report="$TMP/now/$stem.txt"
  : >"$report"
  section "hash" hash "$spec"
  section "show" show "$spec"
  section "show --format json" show --format json "$spec"
  section "rest" rest "$spec"
  section "test" test --allow-empty "$spec"
  section "methods" methods "$spec"
  for protocol in $(grep -oP '^protocol \K\w+' "$SRC/$spec" || true); do
    rc=0
    (cd "$SRC" && timeout 60 "$SALTPAN" run "$spec" --protocol "$protocol") >"$TMP/trace.csv" 2>"$TMP/s.err" || rc=$?
    {
      echo "== run --protocol $protocol (exit $rc)"
      echo "sha256 $(sha256sum <"$TMP/trace.csv" | cut -d' ' -f1) rows $(wc -l <"$TMP/trace.csv")"
      echo "-- stderr"
      normalise <"$TMP/s.err"
    } >>"$report"
    awk 'NR == 1 || NR % 20 == 2' "$TMP/trace.csv" >"$TMP/now/$stem.$protocol.csv"
  done
  # Sweeps: the table only (standard error carries rates and thread counts).
  for sweep in $(grep -oP '^sweep \K\w+' "$SRC/$spec" || true); do
    rc=0
    (cd "$SRC" && timeout 120 "$SALTPAN" sweep --sweep "$sweep" -o "$TMP/table.csv" "$spec") >/dev/null 2>&1 || rc=$?
    {
      echo "== sweep --sweep $sweep (exit $rc)"
      echo "sha256 $(sha256sum <"$TMP/table.csv" | cut -d' ' -f1) rows $(wc -l <"$TMP/table.csv")"
    } >>"$report"
    awk 'NR == 1 || NR % 20 == 2' "$TMP/table.csv" >"$TMP/now/$stem.$sweep.csv"
    rm -f "$TMP/table.csv"
  done
done

if [ "$update" = 1 ]; then
  rm -rf "$GOLDEN"
  mkdir -p "$GOLDEN"
  cp "$TMP"/now/* "$GOLDEN/"
  echo "updated $(ls "$GOLDEN" | wc -l) files in tests/golden/outputs"
  exit 0
fi

# Reports: byte for byte, except that a differing trace digest sends us to its sampled rows.
for now in "$TMP"/now/*.txt; do
  name=$(basename "$now")
  want="$GOLDEN/$name"
  if [ ! -f "$want" ]; then
    fail "$name: no golden file (a new spec? run with SALTPAN_UPDATE_GOLDEN=1)"
    continue
  fi
  if cmp -s "$want" "$now"; then continue; fi
  # Only digest lines may differ, and only where the sampled rows agree closely.
  if diff <(grep -v '^sha256 ' "$want") <(grep -v '^sha256 ' "$now") >"$TMP/d" 2>&1; then
    for csv in "$TMP"/now/"${name%.txt}".*.csv; do
      base=$(basename "$csv")
      if ! "$PY" - "$GOLDEN/$base" "$csv" <<'EOF'; then
import sys
a = [l.rstrip("\n").split(",") for l in open(sys.argv[1])]
b = [l.rstrip("\n").split(",") for l in open(sys.argv[2])]
if len(a) != len(b) or a[0] != b[0]:
    sys.exit(f"{sys.argv[2]}: rows or header differ")
for ra, rb in zip(a[1:], b[1:]):
    for x, y in zip(ra, rb):
        try:
            x, y = float(x), float(y)
        except ValueError:  # a text field (a label, or empty for "no spike") must match exactly
            if x != y:
                sys.exit(f"{sys.argv[2]}: {x!r} != {y!r}")
            continue
        if abs(x - y) > 1e-9 * max(1.0, abs(x), abs(y)):
            sys.exit(f"{sys.argv[2]}: {x!r} != {y!r}")
EOF
        fail "$name: trace $base differs beyond 1e-9 relative"
      fi
    done
    echo "WARNING: $name: a trace is not byte-identical to the golden one (within 1e-9 relative)" >&2
    warnings=$((warnings + 1))
  else
    fail "$name differs from tests/golden/outputs/$name:"
    head -40 "$TMP/d" | sed 's/^/    /' >&2
  fi
done
for want in "$GOLDEN"/*.txt; do
  [ -f "$TMP/now/$(basename "$want")" ] || fail "$(basename "$want"): golden file of a spec that is gone"
done

echo "$(ls "$TMP"/now/*.txt | wc -l) specs compared, $warnings traces within rounding only"
[ "$failures" -eq 0 ]
