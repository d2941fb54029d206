# mpi_sweep.sh - saltpan-mpi under `mpirun -n 2` writes the bytes one `saltpan sweep` writes, and
# refuses what it cannot do. Skipped (exit 77) when the build has no saltpan-mpi or no mpirun.
source "$(dirname "$0")/lib/common.bash"

MPI_SALTPAN="$(dirname "$SALTPAN")/saltpan-mpi"
if [ ! -x "$MPI_SALTPAN" ] || ! command -v mpirun >/dev/null; then
  echo "SKIP: no saltpan-mpi or mpirun in this build" >&2
  exit 77
fi
# OpenMPI's own start-up allocations are not ours to chase in sanitizer builds.
export ASAN_OPTIONS=detect_leaks=0
mpi() { timeout 60 mpirun --allow-run-as-root --oversubscribe -n "$1" "${@:2}"; }

spec="$SRC/specs/reference/squid_axon_1952_sweeps.saltpan"
expect_rc single 0 sweep --sweep sampled --progress none -o "$TMP/one.csv" -o "$TMP/one.json" "$spec"
for n in 1 2 3; do
  rc=0
  mpi "$n" "$MPI_SALTPAN" sweep --sweep sampled -o "$TMP/mpi$n.csv" -o "$TMP/mpi$n.json" "$spec" \
    >"$TMP/mpi$n.out" 2>"$TMP/mpi$n.err" || rc=$?
  [ "$rc" -eq 0 ] || { fail "mpirun -n $n exited $rc"; sed 's/^/    /' "$TMP/mpi$n.err" | head >&2; continue; }
  cmp -s "$TMP/one.csv" "$TMP/mpi$n.csv" || fail "mpirun -n $n: CSV differs from one saltpan sweep"
  cmp -s "$TMP/one.json" "$TMP/mpi$n.json" || fail "mpirun -n $n: JSON differs from one saltpan sweep"
  if ls "$TMP"/mpi$n.csv.rank-* >/dev/null 2>&1; then fail "mpirun -n $n left its shard files"; fi
  [ "$n" -eq 1 ] || grep -q "merged $n shards" "$TMP/mpi$n.err" || fail "mpirun -n $n: no merge line"
done

# No output, or a --shard of its own: usage errors on every rank.
rc=0; mpi 2 "$MPI_SALTPAN" sweep --sweep sampled "$spec" >/dev/null 2>"$TMP/noout.err" || rc=$?
[ "$rc" -ne 0 ] && grep -q "give at least one output" "$TMP/noout.err" || fail "saltpan-mpi without -o: rc $rc"
rc=0; mpi 2 "$MPI_SALTPAN" sweep --shard 0/2 -o "$TMP/x.csv" "$spec" >/dev/null 2>"$TMP/shard.err" || rc=$?
[ "$rc" -ne 0 ] && grep -q "drop --shard" "$TMP/shard.err" || fail "saltpan-mpi with --shard: rc $rc"
# A spec error on the ranks fails the job and writes nothing.
printf 'use "%s"\nsweep broken {\n  vary axon.nothing values 1 mV\n  measure rest(axon)\n}\n' \
  "$SRC/specs/reference/squid_axon_1952.saltpan" >"$TMP/broken.saltpan"
rc=0; mpi 2 "$MPI_SALTPAN" sweep -o "$TMP/broken.csv" "$TMP/broken.saltpan" >/dev/null 2>"$TMP/broken.err" || rc=$?
[ "$rc" -ne 0 ] && [ ! -e "$TMP/broken.csv" ] || fail "saltpan-mpi on a broken spec: rc $rc"
finish
