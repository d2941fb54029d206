# limits.sh - counts, values and sizes that would overflow, divide unevenly, hang or grow
# without bound are refused with a clear error; none of them runs and claims success.
source "$(dirname "$0")/lib/common.bash"

# timed FILE METHOD DURATION EVERY: the clean cell with one protocol.
timed() {
  clean_spec "$1"
  printf 'protocol p {\n  method %s step 10 us\n  duration %s\n  record soma.V every %s\n}\n' "$2" "$3" "$4" >>"$1"
}

# refused NAME PATTERN ARGS...: exit 64 (bad usage), the message on stderr, no trace written.
refused() {
  local name=$1 pattern=$2
  shift 2
  expect_rc "$name" 64 "$@"
  no_crash "$name"
  expect_grep "$name" err "$pattern"
  [ -s "$TMP/$name.out" ] && fail "$name: wrote a trace although refused"
  return 0
}

# --- Step counts from command-line overrides (checked as the spec's values are) ---
timed "$TMP/rk4.saltpan" rk4 "10 ms" "1 ms"
expect_rc rk4_ok 0 run "$TMP/rk4.saltpan"
refused huge_duration 'the run needs too many steps \(--duration\)' run "$TMP/rk4.saltpan" --duration 1e15s
refused not_whole 'the duration must be a whole number of steps \(--duration\)' run "$TMP/rk4.saltpan" --duration 10.005ms
refused shorter_than_step 'the step is longer than the duration' run "$TMP/rk4.saltpan" --duration 5us
refused every_huge 'the recording interval is longer than the duration \(--every\)' run "$TMP/rk4.saltpan" --every 1e30ms
refused every_uneven 'whole number of steps \(--every\)' run "$TMP/rk4.saltpan" --every 15us
refused duration_inf '--duration needs a positive time' run "$TMP/rk4.saltpan" --duration 1e400s

# The same values written in the spec fail `check`, located.
timed "$TMP/huge.saltpan" rk4 "1e15 s" "1 ms"
expect_rc check_huge 65 check "$TMP/huge.saltpan"
expect_grep check_huge err 'huge.saltpan:[0-9]+:12: error: the run needs too many steps'
timed "$TMP/tiny.saltpan" rk4 "10 ms" "1 ms"
sed -i 's/step 10 us/step 1e-30 s/' "$TMP/tiny.saltpan"
expect_rc check_tiny 65 check "$TMP/tiny.saltpan"
expect_grep check_tiny err 'error: the run needs too many steps'
timed "$TMP/adaptive.saltpan" dormand_prince "10 ms" "20 ms"
expect_rc check_adaptive_every 65 check "$TMP/adaptive.saltpan"
expect_grep check_adaptive_every err 'adaptive.saltpan:[0-9]+:23: error: the recording interval is longer than the duration'

# An adaptive run whose duration is not a whole number of intervals still ends at the duration.
timed "$TMP/adaptive3.saltpan" dormand_prince "10 ms" "3 ms"
expect_rc adaptive_uneven 0 run "$TMP/adaptive3.saltpan"
last=$(tail -1 "$TMP/adaptive_uneven.out" | cut -d, -f1)
[ "$last" = "10" ] || fail "adaptive_uneven: the last sample is at '$last' ms, not 10"

# --- --set and sweep values pass the physics checks of written values ---
refused set_zero_cm 'the capacitance .soma.capacitance. must be positive' run "$TMP/rk4.saltpan" \
  --set soma.capacitance=0uF/cm2
refused set_negative 'the density .soma.KLeak.density. cannot be negative' run "$TMP/rk4.saltpan" \
  --set "soma.KLeak.density=-1e-6 cm/s"
refused set_overflow 'not a finite number in base units' run "$TMP/rk4.saltpan" --set "soma.KGated.density=1e308 kS/cm2"
timed "$TMP/sweep.saltpan" rk4 "10 ms" "1 ms"
printf 'sweep s {\n  vary soma.capacitance values 1 uF/cm2, 0 uF/cm2\n  measure p: peak(soma.V)\n}\n' >>"$TMP/sweep.saltpan"
expect_rc sweep_zero_cm 65 check "$TMP/sweep.saltpan"
expect_grep sweep_zero_cm err 'sweep.saltpan:[0-9]+:[0-9]+: error: the capacitance .soma.capacitance. must be positive'
timed "$TMP/wide.saltpan" rk4 "10 ms" "1 ms"
printf 'sweep s {\n  vary soma.KGated.density from -1e307 S/m2 to 1e307 kS/cm2 points 3\n  measure p: peak(soma.V)\n}\n' \
  >>"$TMP/wide.saltpan"
expect_rc sweep_wide 65 check "$TMP/wide.saltpan"
expect_grep sweep_wide err 'error: .*(too wide to represent|not a finite number|cannot be negative)'

# --- NaN in a reference trace fails the measure ---
mkdir "$TMP/snap"
timed "$TMP/snap/model.saltpan" rk4 "2 ms" "0.5 ms"
printf 'expect p: snapshot_max_error(soma.V, "model.p.snapshot.csv") < 1e-6 mV\n' >>"$TMP/snap/model.saltpan"
expect_rc snapshot 0 snapshot "$TMP/snap/model.saltpan"
expect_rc snapshot_pass 0 test "$TMP/snap/model.saltpan"
awk -F, 'BEGIN { OFS = "," } /^[0-9]/ { $2 = "nan" } { print }' "$TMP/snap/model.p.snapshot.csv" >"$TMP/nan.csv"
mv "$TMP/nan.csv" "$TMP/snap/model.p.snapshot.csv"
expect_rc snapshot_nan 1 test "$TMP/snap/model.saltpan"
expect_grep snapshot_nan out 'FAIL .*not a finite number'

# A FIFO as the snapshot is refused at once, not waited on.
rm "$TMP/snap/model.p.snapshot.csv"
mkfifo "$TMP/snap/model.p.snapshot.csv"
expect_rc snapshot_fifo 1 test "$TMP/snap/model.saltpan"
no_crash snapshot_fifo
expect_grep snapshot_fifo out 'not a regular file'

# --- Root files: devices, FIFOs and huge files are refused without reading them all ---
run dev_zero check /dev/zero
no_crash dev_zero
[ "$rc" -eq 65 ] || fail "dev_zero: exited $rc, expected 65"
expect_grep dev_zero err "cannot read '/dev/zero': it is not a regular file"
mkfifo "$TMP/pipe.saltpan"
run fifo check "$TMP/pipe.saltpan"
no_crash fifo
expect_grep fifo err 'it is not a regular file'
truncate -s 5M "$TMP/big.saltpan"
run big check "$TMP/big.saltpan"
no_crash big
[ "$rc" -eq 65 ] || fail "big: exited $rc, expected 65"
expect_grep big err 'it is larger than 4 MiB'

# --- Depth limits instead of stack overflows ---
# Each check runs with a 1 MiB stack, an eighth of the usual 8 MiB: the limits must leave room
# for AddressSanitizer's larger frames.
small_stack() { # small_stack NAME ARGS...: `run` with a 1 MiB stack
  local name=$1
  shift
  rc=0
  (ulimit -s 1024 && exec timeout 20 "$SALTPAN" "$@") >"$TMP/$name.out" 2>"$TMP/$name.err" || rc=$?
}
fn_chain() { # fn_chain FILE N: f1 .. fN, each calling the one before
  {
    echo 'fn f0(x: mV) -> mV = x'
    for i in $(seq 1 "$2"); do echo "fn f$i(x: mV) -> mV = f$((i - 1))(x)"; done
    echo "const deepest = f$2(1 mV)"
  } >"$1"
}
fn_chain "$TMP/fns.saltpan" 5000
small_stack fns check "$TMP/fns.saltpan"
no_crash fns
[ "$rc" -eq 65 ] || fail "fns: exited $rc, expected 65"
expect_grep fns err 'fns.saltpan:[0-9]+:[0-9]+: error: .* is more than 256 constants and functions deep'
fn_chain "$TMP/fns_ok.saltpan" 250
small_stack fns_ok check "$TMP/fns_ok.saltpan"
[ "$rc" -eq 0 ] || fail "fns_ok: a chain of 250 functions exited $rc, expected 0"
module_chain() { # module_chain DIR N: m0 uses m1 ... uses mN
  mkdir "$1"
  for i in $(seq 0 $(($2 - 1))); do echo "use \"m$((i + 1)).saltpan\"" >"$1/m$i.saltpan"; done
  echo 'const last = 1 mV' >"$1/m$2.saltpan"
}
module_chain "$TMP/chain" 20000
small_stack modules check "$TMP/chain/m0.saltpan"
no_crash modules
[ "$rc" -eq 65 ] || fail "modules: exited $rc, expected 65"
expect_grep modules err 'm[0-9]+.saltpan:1:5: error: modules use each other more than 64 deep here'
module_chain "$TMP/chain_ok" 60
small_stack modules_ok check "$TMP/chain_ok/m0.saltpan"
[ "$rc" -eq 0 ] || fail "modules_ok: a chain of 60 modules exited $rc, expected 0"

finish
