# output_clash.sh - an output is never the same file as an input or as another output: files
# are compared by device and inode (an absent one by its directory and name), not by spelling.
# `build myspec` (no extension) would have replaced the spec with the executable. A clash exits
# 73 (cannot write), before anything is compiled or written.
source "$(dirname "$0")/lib/common.bash"

cd "$TMP"
clean_spec myspec
short_run_spec spec.saltpan
cp spec.saltpan myspec
cp myspec myspec.orig
cp spec.saltpan spec.orig

# build: the default output of a spec without .saltpan is the spec's own name.
expect_rc noext 73 build myspec
expect_grep noext err "^saltpan build: error: the output 'myspec' is the same file as the spec 'myspec'"
expect_grep noext err "no \.saltpan extension; name the output with -o"
cmp -s myspec myspec.orig || fail "noext: the spec was replaced"
expect_rc spelled 73 build myspec -o ./myspec
expect_grep spelled err "-o '\./myspec' is the same file as the spec"
ln myspec alias
expect_rc hardlink 73 build myspec -o alias
expect_grep hardlink err "-o 'alias' is the same file as the spec"
cmp -s myspec myspec.orig || fail "build: the spec was replaced"

# run: -o and --plot naming one file, however spelled; -o naming the spec.
expect_rc plotclash 73 run spec.saltpan -o x.svg --plot x.svg
expect_grep plotclash err "^saltpan: error: --plot 'x\.svg' and -o 'x\.svg' are the same file"
expect_rc plotspelled 73 run spec.saltpan -o x.svg --plot "$TMP/./x.svg"
[ -e x.svg ] && fail "plotclash: an output was written"
expect_rc runspec 73 run spec.saltpan -o spec.saltpan
expect_grep runspec err "-o 'spec\.saltpan' is the same file as the spec 'spec\.saltpan'"
expect_rc methods 73 methods spec.saltpan -o ./spec.saltpan
expect_rc show 73 show spec.saltpan -o spec.saltpan
expect_rc junit 73 test spec.saltpan --junit spec.saltpan
expect_grep junit err "--junit 'spec\.saltpan' is the same file as the spec"
expect_rc jsonjunit 73 test spec.saltpan --junit r.xml --json ./r.xml
cmp -s spec.saltpan spec.orig || fail "the spec was replaced"
# A built executable does not write over itself, nor into a FIFO.
expect_rc buildexe 0 build spec.saltpan -o cell
if [ -x cell ]; then
  cp cell cell.orig
  rc=0
  timeout 20 ./cell -o cell >self.out 2>self.err || rc=$?
  [ "$rc" -eq 73 ] || fail "self: the executable given -o itself exited $rc, expected 73"
  grep -q "^cell: error: -o 'cell' is the same file as this program" self.err ||
    fail "self: no clear message: $(head -3 self.err)"
  cmp -s cell cell.orig || fail "self: the executable was replaced by its output"
  mkfifo exe.fifo
  rc=0
  timeout 20 ./cell -o exe.fifo >fifo.out 2>fifo.err || rc=$?
  [ "$rc" -eq 73 ] && [ -p exe.fifo ] || fail "exefifo: exited $rc, or the FIFO was replaced"
fi

# Separate outputs still work.
expect_rc fine 0 run spec.saltpan -o x.csv --plot x.svg
[ -s x.csv ] && [ -s x.svg ] || fail "fine: the outputs were not written"

# sweep: two -o naming one file, or the journal of the first.
cat >sweep.saltpan <<'SPEC'
use "spec.saltpan"
sweep leaks {
  vary soma.KGated.density from 20 mS/cm2 to 40 mS/cm2 points 4
  measure short: peak(soma.V)
}
SPEC
expect_rc sweepclash 73 sweep --progress none sweep.saltpan -o a.csv -o ./a.csv
expect_grep sweepclash err "are the same file"
expect_rc sweepok 0 sweep --progress none sweep.saltpan -o a.csv -o a.json
expect_rc shard0 0 sweep --progress none sweep.saltpan --shard 0/2 -o s0.json
expect_rc shard1 0 sweep --progress none sweep.saltpan --shard 1/2 -o s1.json
cp s0.json s0.orig

# merge: -o naming one of its shards.
expect_rc mergeshard 73 merge -o s0.json s0.json s1.json
expect_grep mergeshard err "^saltpan merge: error: -o 's0\.json' is the same file as the shard 's0\.json'"
cmp -s s0.json s0.orig || fail "mergeshard: the shard was replaced"
expect_rc mergeok 0 merge -o m.json s0.json s1.json

finish
