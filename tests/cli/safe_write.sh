# safe_write.sh - every output goes through one routine (support/SafeWrite.h): a device, FIFO or
# directory is refused rather than replaced by a regular file (no hang on a FIFO), '-' is
# standard output, an existing output keeps its mode, and a link at the destination is
# replaced, never written through.
source "$(dirname "$0")/lib/common.bash"

cd "$TMP"
short_run_spec spec.saltpan

mkfifo fifo
expect_rc fifo 73 run spec.saltpan -o fifo
expect_grep fifo err "^saltpan: error: -o 'fifo': 'fifo' is a FIFO, not a regular file; saltpan writes outputs only to regular files"
[ -p fifo ] || fail "fifo: the FIFO was replaced"
expect_rc plotfifo 64 run spec.saltpan --plot fifo
mkdir dir
expect_rc dir 73 run spec.saltpan -o dir
expect_grep dir err "'dir' is a directory"
expect_rc methodsfifo 73 methods spec.saltpan -o fifo
expect_rc junitfifo 73 test spec.saltpan --junit fifo
[ -p fifo ] || fail "the FIFO was replaced"
if [ "$(id -u)" -eq 0 ]; then
  # A device node of our own (the null device's numbers), so the real /dev/null is never at risk.
  mknod null c 1 3
  expect_rc device 73 run spec.saltpan -o null
  expect_grep device err "'null' is a character device"
  [ -c null ] || fail "device: the device node was replaced by a regular file"
fi

# '-' is standard output.
expect_rc stdout 0 run spec.saltpan -o -
expect_grep stdout out "^time \(ms\),soma\.V \(mV\)"
[ -e ./- ] && fail "stdout: a file named '-' was written"

# An existing output keeps its mode; a new one gets the umask's.
touch private.csv
chmod 600 private.csv
expect_rc private 0 run spec.saltpan -o private.csv
[ "$(stat -c %a private.csv)" = 600 ] || fail "private: the output's mode became $(stat -c %a private.csv)"
grep -q "^time (ms)" private.csv || fail "private: the trace was not written"
(umask 077 && "$SALTPAN" run spec.saltpan -o fresh.csv 2>/dev/null) || fail "fresh: the run failed"
[ "$(stat -c %a fresh.csv)" = 600 ] || fail "fresh: a new output got $(stat -c %a fresh.csv), not 600 under umask 077"

# A symbolic link at the destination is replaced by the output; its target is left alone.
echo precious >victim
ln -s victim linked.csv
expect_rc linked 0 run spec.saltpan -o linked.csv
[ "$(cat victim)" = precious ] || fail "linked: the link's target was overwritten"
[ -f linked.csv ] && [ ! -L linked.csv ] || fail "linked: the output is not a regular file"

# Nothing but the outputs is left in the directory (no temporaries).
leftover=$(find . -name '.*saltpan-*' | head -3)
[ -z "$leftover" ] || fail "temporaries were left: $leftover"

finish
