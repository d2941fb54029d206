#!/usr/bin/env bash
# emit_stages.sh - `saltpan check --emit STAGE [--protocol NAME]`: every stage is printed from the
# compilation; the IR, fused IR and codegen's LLVM of the 1952 squid axon specs are pinned
# (tests/golden/emit/, refreshed with SALTPAN_UPDATE_GOLDEN=1), the optimised LLVM is valid IR,
# and misuse gets a usage error.
source "$(dirname "$0")/lib/common.bash"

GOLDEN=$SRC/tests/golden/emit
update=${SALTPAN_UPDATE_GOLDEN:-0}
LLVM_AS=/usr/lib/llvm-19/bin/llvm-as

# Target lines and attribute groups name the CPU; the rest of codegen's module does not.
normalise_llvm() {
  grep -Ev '^(target datalayout|target triple|attributes #|; ModuleID|source_filename)'
}

# golden NAME STAGE SPEC [ARGS...]: the stage's output (run from the source tree, so paths in
# it are relative) equals tests/golden/emit/NAME.
golden() {
  local name=$1 stage=$2 spec=$3
  shift 3
  rc=0
  (cd "$SRC" && timeout 20 "$SALTPAN" check --emit "$stage" "$@" "$spec") >"$TMP/$name" 2>"$TMP/$name.err" || rc=$?
  [ "$rc" -eq 0 ] || { fail "$name: --emit $stage exited $rc: $(head -3 "$TMP/$name.err")"; return; }
  case $stage in llvm*) normalise_llvm <"$TMP/$name" >"$TMP/$name.n" && mv "$TMP/$name.n" "$TMP/$name" ;; esac
  if [ "$update" = 1 ]; then
    cp "$TMP/$name" "$GOLDEN/$name"
    return
  fi
  if ! cmp -s "$GOLDEN/$name" "$TMP/$name"; then
    fail "$name differs from tests/golden/emit/$name:"
    diff "$GOLDEN/$name" "$TMP/$name" | head -20 | sed 's/^/    /' >&2
  fi
}

SQUID=specs/reference/squid_axon_1952.saltpan
EULER=specs/reference/squid_axon_1952_sweeps.saltpan
golden squid.resolved resolved "$SQUID"
golden squid.values values "$SQUID"
golden squid.ir ir "$SQUID"
golden squid.ll llvm-unoptimised "$SQUID"
golden euler.ir ir "$EULER"
golden euler.fused-ir fused-ir "$EULER"
golden euler.ll llvm-unoptimised "$EULER"
[ "$update" = 1 ] && { echo "updated tests/golden/emit"; exit 0; }

# The optimised module of every kernel is valid LLVM IR, one module per kernel.
for spec in "$SQUID" "$EULER"; do
  run llvm check --emit llvm "$SRC/$spec"
  [ "$rc" -eq 0 ] || fail "--emit llvm $spec exited $rc"
  kernels=$(grep -c '^; saltpan kernel: ' "$TMP/llvm.out" || true)
  defines=$(grep -c '^define void @saltpan_kernel_' "$TMP/llvm.out" || true)
  [ "$kernels" -ge 1 ] && [ "$kernels" -eq "$defines" ] || fail "$spec: $kernels kernel headers but $defines functions"
  if [ -x "$LLVM_AS" ]; then
    awk -v dir="$TMP" '/^; saltpan kernel: /{n++} {print > (dir "/module" n ".ll")}' "$TMP/llvm.out"
    for m in "$TMP"/module*.ll; do
      "$LLVM_AS" -o /dev/null "$m" 2>"$TMP/as.err" || fail "$spec: $(basename "$m") is not valid IR: $(head -2 "$TMP/as.err")"
    done
    rm -f "$TMP"/module*.ll
  fi
done

# --protocol picks the protocol whose model is shown; the default is the first.
clean_spec "$TMP/two.saltpan"
cat >>"$TMP/two.saltpan" <<'SPEC'
protocol quiet {
  duration 2 ms
  record soma.V every 0.1 ms
}
protocol kicked {
  method rk4 step 10 us
  duration 3 ms
  inject soma 0.1 nA from 1 ms to 2 ms
  record soma.V every 0.1 ms
}
protocol careful {
  method dormand_prince
  duration 3 ms
  record soma.V every 0.1 ms
}
SPEC
run first check --emit ir "$TMP/two.saltpan"
expect_grep first out '^protocol quiet method exponential_euler'
run chosen check --emit ir --protocol kicked "$TMP/two.saltpan"
expect_grep chosen out '^protocol kicked method rk4'
cmp -s "$TMP/first.out" "$TMP/chosen.out" && fail "--protocol kicked printed the same IR as the default"
run fused check --emit fused-ir --protocol=quiet "$TMP/two.saltpan"
expect_grep fused out '^kernel fused exponential Euler step'
# RK4 runs the model kernel, but sweeps step it fused, in lanes; an adaptive method has no fused step.
run lanes check --emit fused-ir --protocol kicked "$TMP/two.saltpan"
expect_grep lanes out '^kernel fused rk4 step for sweep lanes .next state, then every output'
expect_grep lanes out '^kernel fused rk4 step for sweep lanes, next state only'
expect_rc nofused 64 check --emit fused-ir --protocol careful "$TMP/two.saltpan"
expect_grep nofused err "protocol 'careful' has no fused kernel: method dormand_prince steps the model kernel"

# Misuse.
expect_rc badstage 64 check --emit bytecode "$TMP/two.saltpan"
expect_grep badstage err "--emit must be one of tokens, ast, resolved, values, ir, fused-ir, llvm or llvm-unoptimised, not 'bytecode'"
expect_rc noemit 64 check --protocol quiet "$TMP/two.saltpan"
expect_grep noemit err 'give --emit too'
expect_rc nosuch 64 check --emit ir --protocol loud "$TMP/two.saltpan"
expect_grep nosuch err "there is no protocol 'loud' in '.*two.saltpan'; it has quiet, kicked, careful"
# The default is the spec's own first protocol, not one of a module it uses.
run own check --emit ir "$SRC/$EULER"
expect_grep own out '^protocol euler10 '
run other check --emit ir --protocol step10 "$SRC/$EULER"
expect_grep other out '^protocol step10 '
run rk4 check --emit fused-ir "$SRC/$SQUID"
expect_grep rk4 out "^kernel fused rk4 step for sweep lanes"

# A spec with errors prints its diagnostics and no stage output.
printf 'model Broken\nconst a = 1 mV + 2 ms\n' >"$TMP/broken.saltpan"
expect_rc broken 65 check --emit values "$TMP/broken.saltpan"
expect_grep broken err 'cannot add'
[ -s "$TMP/broken.out" ] && fail "--emit values printed output for a spec with errors"

finish
