# link_safety.sh - `saltpan build --shared` passes paths and names to the linker only as
# arguments of their own: a spec named 'm,@rsp.saltpan' once made the library's soname
# '-Wl,-soname,libm,@rsp.so', which the driver split at the comma, so the linker read options
# from a planted file 'rsp.so'. Names the linker reads as syntax are refused; a TMPDIR with a
# comma links.
source "$(dirname "$0")/lib/common.bash"

SQUID=$SRC/specs/reference/squid_axon_1952.saltpan
cd "$TMP"
cp "$SQUID" 'm,@rsp.saltpan'
# The planted response file: the linker would write a map file if it read it.
echo "-Map=$TMP/PWNED.map" >rsp.so

expect_rc comma 64 build --shared 'm,@rsp.saltpan'
expect_grep comma err "^saltpan build: error: the library name 'libm,@rsp\.so' \(its soname\) has a comma"
[ -e PWNED.map ] && fail "comma: the linker read the planted response file"
[ -e 'libm,@rsp.so' ] && fail "comma: a library was built"
expect_rc at 64 build --shared "$SQUID" -o @rsp.so
expect_grep at err "has a leading '@' \(the compiler driver and the linker read options from the file named after it\)"
expect_rc dash 64 build --shared "$SQUID" -o ./-shared.so
expect_grep dash err "has a leading '-'"
expect_rc space 64 build --shared "$SQUID" -o 'lib m.so'
expect_grep space err "has a space, quote or backslash"
[ -e PWNED.map ] && fail "the linker read the planted response file"

# A temporary directory whose name has a comma (it holds the version script).
mkdir 'tmp,dir'
rc=0
TMPDIR="$TMP/tmp,dir" timeout 120 "$SALTPAN" build --shared "$SQUID" -o "$TMP/libok.so" >tmpdir.out 2>tmpdir.err || rc=$?
[ "$rc" -eq 0 ] || fail "tmpdir: a TMPDIR with a comma broke the link (exit $rc): $(head -3 tmpdir.err)"
if [ "$rc" -eq 0 ]; then
  nm -D --defined-only libok.so | grep -q ' T saltpan_model_create$' || fail "tmpdir: the library lacks its C interface"
  others=$(nm -D --defined-only libok.so | awk '{print $3}' | grep -v '^saltpan_model_' || true)
  [ -z "$others" ] || fail "tmpdir: the version script was not applied: $(echo "$others" | head -3 | tr '\n' ' ')"
  readelf -d libok.so | grep -q 'Library soname: \[libok\.so\]' || fail "tmpdir: the soname is not libok.so"
fi
[ -z "$(ls -A 'tmp,dir')" ] || fail "tmpdir: the scratch directory was left behind"

finish
