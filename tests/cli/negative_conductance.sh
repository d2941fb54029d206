# negative_conductance.sh - exponential Euler with no positive conductance to relax towards
# still integrates the whole current. With only a leak of density g < 0 and no stimulus,
# C V' = -g (V - E) has the closed form V(t) = E + (V0 - E) exp(-g t / C) (common practice:
# a linear first-order ODE); a first-order step of 1 us must land within 0.05 mV of it.
source "$(dirname "$0")/lib/common.bash"

cat >"$TMP/passive.saltpan" <<SPEC
use "$SRC/specs/reference/squid_axon_1952.saltpan"
protocol quiet {
  method exponential_euler step 1 us
  duration 100 ms
  record axon.V every 1 ms
}
SPEC
sets=(--set axon.SquidSodium1952.density=0mS/cm2 --set axon.SquidPotassium1952.density=0mS/cm2
      --set axon.SquidLeak1952.density=-0.01mS/cm2)
for engine in jit interpreter; do
  expect_rc "run_$engine" 0 run --protocol quiet --engine "$engine" "${sets[@]}" "$TMP/passive.saltpan"
  final=$(tail -1 "$TMP/run_$engine.out" | cut -d, -f2)
  # g = -0.1 S/m2, C = 0.01 F/m2: exp(1) after 100 ms.
  $PY - "$final" <<'PY' || fail "$engine: final V $final mV is not the closed form"
import math, sys
exact = -54.387 + (-65 + 54.387) * math.exp(0.1 * 0.1 / 0.01)
sys.exit(0 if abs(float(sys.argv[1]) - exact) < 0.05 else 1)
PY
done
finish
