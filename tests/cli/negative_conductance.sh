# negative_conductance.sh - a negative membrane density is refused from the command line as it
# is in a spec (the physics check); the steppers' handling of one, reachable through the C
# interface, is tested in tests/unit/Simulate.tests.cpp.
source "$(dirname "$0")/lib/common.bash"

cat >"$TMP/passive.saltpan" <<SPEC
use "$SRC/specs/reference/squid_axon_1952.saltpan"
protocol quiet {
  method exponential_euler step 1 us
  duration 100 ms
  record axon.V every 1 ms
}
SPEC
sets=(--set axon.SquidSodium1952.density=0mS/cm2 --set axon.SquidPotassium1952.density=0mS/cm2)
expect_rc zero 0 run --protocol quiet "${sets[@]}" "$TMP/passive.saltpan"
expect_rc negative 64 run --protocol quiet "${sets[@]}" --set axon.SquidLeak1952.density=-0.01mS/cm2 \
  "$TMP/passive.saltpan"
expect_grep negative err "saltpan: error: the density 'axon.SquidLeak1952.density' cannot be negative"
[ -s "$TMP/negative.out" ] && fail "negative: wrote a trace although refused"
finish
