# plot.sh - `saltpan run --plot FILE`: an SVG figure of the recorded traces.
source "$(dirname "$0")/lib/common.bash"

HH="$SRC/specs/reference/squid_axon_1952.saltpan"

expect_rc help 0 run --help
expect_grep help out "--plot FILE"

expect_rc plot 0 run --engine interpreter --protocol step10 --duration 20ms --plot "$TMP/hh.svg" -o "$TMP/hh.csv" "$HH"
[ -s "$TMP/hh.svg" ] || fail "plot: no SVG written"
[ -s "$TMP/hh.csv" ] || fail "plot: the CSV was not written alongside the plot"
if [ -s "$TMP/hh.svg" ]; then
  grep -q '<svg xmlns="http://www.w3.org/2000/svg" version="1.1"' "$TMP/hh.svg" || fail "plot: not an SVG 1.1 root"
  grep -q '>time (ms)<' "$TMP/hh.svg" || fail "plot: no time axis title"
  grep -q '>V (mV)<' "$TMP/hh.svg" || fail "plot: no V axis title"
  grep -q '>axon.V<' "$TMP/hh.svg" || fail "plot: no legend entry for axon.V"
  [ "$(grep -c '<polyline' "$TMP/hh.svg")" -eq 1 ] || fail "plot: expected one polyline"
  grep -qi 'nan' "$TMP/hh.svg" && fail "plot: NaN in the SVG"
  if command -v xmllint >/dev/null 2>&1; then
    xmllint --noout "$TMP/hh.svg" || fail "plot: xmllint rejects the SVG"
  else
    echo "note: xmllint not found (apt package libxml2-utils); skipping the XML check"
  fi
  # The same run gives the same bytes.
  expect_rc again 0 run --engine interpreter --protocol step10 --duration 20ms --plot "$TMP/again.svg" -o "$TMP/again.csv" "$HH"
  cmp -s "$TMP/hh.svg" "$TMP/again.svg" || fail "plot: two identical runs gave different SVG"
fi

# An unwritable path: 73, and stdout still has the CSV (the traces were written first).
expect_rc unwritable 73 run --engine interpreter --protocol step10 --duration 5ms --plot "$TMP/no/such/dir/x.svg" "$HH"
expect_grep unwritable err "saltpan: "

# A failed spec writes no plot.
error_spec "$TMP/error.saltpan"
expect_rc error 65 run --plot "$TMP/error.svg" "$TMP/error.saltpan"
[ -e "$TMP/error.svg" ] && fail "error: a plot was written for a spec with errors"

# Only SVG is drawn: a .png name is refused rather than given SVG under a false extension.
expect_rc png 64 run --engine interpreter --duration 1ms --plot "$TMP/hh.png" -o "$TMP/png.csv" "$HH"
expect_grep png err "--plot writes SVG; name the file \*.svg"
[ -e "$TMP/hh.png" ] && fail "png: a .png file was written"
[ -e "$TMP/png.csv" ] && fail "png: the run went ahead"

finish
