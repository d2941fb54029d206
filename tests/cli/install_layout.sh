#!/usr/bin/env bash
# install_layout.sh - `cmake --install` puts saltpan in PREFIX/bin and what `saltpan build` links in
# PREFIX/lib/saltpan; the installed saltpan builds from those files (not the build tree's) an
# executable and a library whose outputs equal `saltpan run`'s.
source "$(dirname "$0")/lib/common.bash"

BUILD=$(dirname "$SALTPAN")
[ -f "$BUILD/cmake_install.cmake" ] || { echo "no cmake_install.cmake beside $SALTPAN"; exit 77; }
cmake --install "$BUILD" --prefix "$TMP/prefix" >/dev/null || fail "cmake --install failed"
for f in bin/saltpan lib/saltpan/libsaltpan_runtime.a lib/saltpan/libsaltpan_support.a \
  lib/saltpan/libsaltpan_standalone.a lib/saltpan/libsaltpan_standalone_main.a \
  lib/saltpan/libsaltpan_capi.a lib/saltpan/saltpan_model.h; do
  [ -f "$TMP/prefix/$f" ] || fail "the install has no $f"
done
cmp -s "$TMP/prefix/lib/saltpan/saltpan_model.h" "$SRC/standalone/saltpan_model.h" || fail "the installed saltpan_model.h differs from the source"

# The installed archives are the ones linked: a driver that logs its arguments shows the paths.
printf '#!/bin/sh\nprintf "%%s\\n" "$@" >>"%s/link.args"\nexec c++ "$@"\n' "$TMP" >"$TMP/driver"
chmod +x "$TMP/driver"
SPEC=$SRC/specs/reference/squid_axon_1952.saltpan
SALTPAN_CXX=$TMP/driver "$TMP/prefix/bin/saltpan" build "$SPEC" -o "$TMP/squid" >"$TMP/build.out" 2>&1 ||
  fail "the installed saltpan could not build: $(cat "$TMP/build.out")"
"$TMP/squid" --every 0.5ms --duration 5ms >"$TMP/exe.csv" || fail "the built executable failed"
"$SALTPAN" run --every 0.5ms --duration 5ms "$SPEC" >"$TMP/run.csv" || fail "saltpan run failed"
grep -q "^$TMP/prefix/lib/saltpan/libsaltpan_runtime.a$" "$TMP/link.args" ||
  fail "the installed saltpan did not link its own runtime: $(grep runtime "$TMP/link.args")"
cmp -s "$TMP/exe.csv" "$TMP/run.csv" || fail "the executable built by the installed saltpan differs from saltpan run"
finish
