# option_messages.sh - what every command (and saltpan-mpi, and an executable `saltpan build`
# writes) says about its options: unknown options, missing and bad values, the `=` forms, `--`,
# extra files, which of --help and a bad option wins. Each case's exit status, standard output
# and standard error (a long stream by its SHA-256) against tests/golden/options/ (saltpan-mpi's
# in mpi.txt, compared when it is built).
# SALTPAN_UPDATE_GOLDEN=1 rewrites the golden file instead; review the diff.
source "$(dirname "$0")/lib/common.bash"

SRC=$(cd "$SRC" && pwd)
SALTPAN=$(realpath "$SALTPAN")
GOLDEN="$SRC/tests/golden/options"
update=${SALTPAN_UPDATE_GOLDEN:-0}
report="$TMP/transcript.txt"
: >"$report"
short_run_spec "$TMP/cell.saltpan"
cp "$TMP/cell.saltpan" "$TMP/other.saltpan"

# A stream of more than 6 lines (a help text) is shown by its first line and its digest.
stream() {
  if [ "$(wc -l <"$1")" -gt 6 ]; then
    echo "$(head -1 "$1") ... ($(wc -l <"$1") lines, sha256 $(sha256sum <"$1" | cut -c1-16))"
  else
    cat "$1"
  fi
}

# case PROGRAM ARGS...: appends the exit status and both streams, with $TMP written as TMP.
case_of() {
  local program=$1
  shift
  local rc=0
  (cd "$TMP" && timeout 20 "$program" "$@") >"$TMP/c.out" 2>"$TMP/c.err" || rc=$?
  {
    echo "== $(basename "$program") $* (exit $rc)"
    stream "$TMP/c.out"
    echo "-- stderr"
    stream "$TMP/c.err"
  } | sed "s|$TMP|TMP|g" >>"$report"
}
s() { case_of "$SALTPAN" "$@"; }

s
s --help
s -h
s --version
s help
s help run
s help --help
s frobnicate
s --frobnicate

s check --help --format xml
s check --format xml --help
s check cell.saltpan --format
s check --format= cell.saltpan
s check --format=json
s check -x cell.saltpan
s check -
s check -- --weird
s check cell.saltpan --color
s check --color sometimes cell.saltpan
s check --emit bytes cell.saltpan
s check --emit=tokens
s check --protocol short cell.saltpan
s check --emit ir cell.saltpan other.saltpan
s check --warnings-as-errors=1 cell.saltpan
s check --help=1
s check -o x cell.saltpan
s check --version --bogus

s show --warnings-as-errors cell.saltpan
s show cell.saltpan -o
s show -o=x
s show --format yaml cell.saltpan
s show cell.saltpan other.saltpan
s show --emit ir cell.saltpan
s show -- -o

s run cell.saltpan --protocol
s run --protocol=x
s run --engine foo cell.saltpan
s run --engine=foo cell.saltpan
s run --threshold 5ms cell.saltpan
s run cell.saltpan --set
s run --keep-partial cell.saltpan
s run cell.saltpan other.saltpan
s run --plot x.png cell.saltpan
s run -- cell.saltpan
s run --help --engine foo
s run --engine foo --help
s run -
s run --set nothing cell.saltpan
s run --set soma.KGated.density=1mV cell.saltpan
s run --duration 0ms cell.saltpan
s run --every=3ms cell.saltpan
s run --keep-partial=1 cell.saltpan

s test --engine foo cell.saltpan
s test --jobs 0 cell.saltpan
s test --jobs=-1 cell.saltpan
s test cell.saltpan --junit
s test --bogus
s test
s test --allow-empty=1 cell.saltpan

s snapshot --protocol=x cell.saltpan
s snapshot cell.saltpan --protocol
s snapshot --engine foo cell.saltpan
s snapshot cell.saltpan other.saltpan
s snapshot
s snapshot --engine bogus
s snapshot --engine=jit cell.saltpan

s rest cell.saltpan --format
s rest --format yaml cell.saltpan
s rest --from 5ms cell.saltpan
s rest --to=x cell.saltpan
s rest --from 0mV --to -10mV cell.saltpan
s rest --from -10V --to 5V cell.saltpan
s rest cell.saltpan other.saltpan
s rest --bogus
s rest --from=-80mV

s methods cell.saltpan --format
s methods --format yaml cell.saltpan
s methods cell.saltpan -o
s methods -o "" cell.saltpan
s methods -o=x cell.saltpan
s methods --fragment cell.saltpan
s methods --format=latex --fragment
s methods cell.saltpan other.saltpan
s methods -- -x
s methods --help --format yaml
s methods --bogus --help

s fmt --check --stdout cell.saltpan
s fmt --bogus cell.saltpan
s fmt -- -x
s fmt
s fmt --check=1 cell.saltpan

s hash cell.saltpan --format
s hash --format= cell.saltpan
s hash --format yaml cell.saltpan
s hash cell.saltpan other.saltpan
s hash -- -x
s hash --bogus
s hash --format=json

s sweep --seed x cell.saltpan
s sweep --vary x cell.saltpan
s sweep --vary-log a=1 cell.saltpan
s sweep --values a= cell.saltpan
s sweep --sample 0 cell.saltpan
s sweep --design foo cell.saltpan
s sweep --threads 0 cell.saltpan
s sweep --lanes 3 cell.saltpan
s sweep --checkpoint 0 cell.saltpan
s sweep --engine foo cell.saltpan
s sweep --progress foo cell.saltpan
s sweep --bogus
s sweep cell.saltpan other.saltpan
s sweep
s sweep --sweep s --vary a=1:2:3 cell.saltpan
s sweep -o x.txt cell.saltpan
s sweep --shard bad cell.saltpan
s sweep --restart=1 cell.saltpan
s sweep cell.saltpan --sweep

s merge
s merge -o x.txt
s merge -o x.json
s merge --bogus
s merge a.json -o
s merge -o=x.json

s build cell.saltpan -o
s build --shared=1 cell.saltpan
s build cell.saltpan other.saltpan
s build
s build --bogus
s build -o=

# An executable `saltpan build` writes, with several protocols and with sweeps.
(cd "$TMP" && "$SALTPAN" build "$SRC/specs/reference/squid_axon_1952_sweeps.saltpan" -o sweeps) >/dev/null 2>&1 ||
  fail "saltpan build of the sweeps spec failed"
(cd "$TMP" && "$SALTPAN" build "$SRC/specs/reference/squid_axon_1952_experiments.saltpan" -o several) \
  >/dev/null 2>&1 || fail "saltpan build of the experiments spec failed"
e() { case_of "$TMP/sweeps" "$@"; }
e --protocol
e --bogus
e foo
e -
e --set
e --duration=x
e --every 0ms
e --help
e -h
e --version
e --protocol nothing
e --set nothing=1
e -o
e -- x
e --protocol euler10 --duration=x
e --protocol=euler10 --every 0ms
e --protocol euler10 --set nothing=1
e --protocol euler10 --set=gNa
e --protocol euler10 -o=x.txt --every=1h
e sweep --threads 0
e sweep --bogus
e sweep -o
e sweep -o x.txt
e sweep --progress x
e sweep --checkpoint=0
e sweep --help
e sweep --sweep nothing
e sweep --shard 5/2
e sweep --restart=1
case_of "$TMP/several"
case_of "$TMP/several" --protocol=nothing

# compare NAME: the cases so far against $GOLDEN/NAME.txt (or, updating, into it).
compare() {
  if [ "$update" = 1 ]; then
    mkdir -p "$GOLDEN"
    cp "$report" "$GOLDEN/$1.txt"
    echo "updated $GOLDEN/$1.txt"
  elif ! diff -u "$GOLDEN/$1.txt" "$report" >"$TMP/diff"; then
    fail "the option messages differ from $GOLDEN/$1.txt:"
    head -60 "$TMP/diff" >&2
  fi
  : >"$report"
}
compare transcript

MPI_SALTPAN="$(dirname "$SALTPAN")/saltpan-mpi"
if [ -x "$MPI_SALTPAN" ]; then
  export ASAN_OPTIONS=detect_leaks=0
  m() { case_of "$MPI_SALTPAN" "$@"; }
  m
  m sweep --help
  m sweep -h
  m sweep cell.saltpan
  m sweep --shard 0/2 -o x.json cell.saltpan
  m sweep --shard=0/2 cell.saltpan -o
  m sweep --shard -o x.json cell.saltpan
  m sweep --bogus -o x.json cell.saltpan
  m sweep --threads 0 -o=x.json cell.saltpan
  m run cell.saltpan
  compare mpi
fi
finish
