#!/usr/bin/env python3
"""Observed order of accuracy of saltpan's fixed-step methods on the Hodgkin-Huxley 1952 axon.

usage: convergence_order.py SALTPAN SOURCE_DIR

From rest (-65 mV, gates at steady state), 10 ms with V recorded every 0.08 ms: a 10 uA/cm2 step
that lasts beyond the run (the first spike and the recovery after it), and a 10 uA/cm2 pulse from
1 ms to 3.03 ms, whose end falls inside a step at every step size below (the steppers split a step
at an edge, so the pulse must not cost any order). The model is
specs/reference/squid_axon_1952.saltpan with its protocol replaced in a temporary copy. Reference:
dormand_prince at tolerance 1e-12 (Dormand & Prince 1980), which also stops at the edges. The
slope of log(max |V - V_ref|) against log(step), fitted by least squares, must be about the
method's order: exponential Euler 1.8-2.2 at steps 8, 4, 2, 1 us (gates first with the rates at
the step's start, then V relaxed exactly with the new gates: a staggered scheme, second order in V,
common practice; the plain Rush & Larsen 1978 ordering, V with the old gates, is first order);
classical RK4 (fourth order) 3.5-4.5 at 40, 20, 10, 5 us.
Exit status 0 when every check passes; otherwise 1, with one line per failure.
"""

import json
import os
import subprocess
import sys
import tempfile

import numpy as np

DURATION_MS = 10
EVERY_MS = 0.08  # a whole number of steps for every step below
PROTOCOL = """protocol convergence {{
  method {method}
  duration {duration} ms
  {inject}
  record axon.V every {every} ms
}}
"""
STEP = "inject axon 10 uA/cm2 from 0 ms to 100 ms"
PULSE = "inject axon 10 uA/cm2 from 1 ms to 3.03 ms"
REFERENCE_METHOD = "dormand_prince step 1 us tolerance 1e-12"
EE_SOURCE = "second order: gates first, then V with the new gates, a staggered scheme (common practice)"
CASES = [
    # (method, stimulus, steps in us, accepted slope range, source of the expected order)
    ("exponential_euler", STEP, (8, 4, 2, 1), (1.8, 2.2), EE_SOURCE),
    ("exponential_euler", PULSE, (8, 4, 2, 1), (1.8, 2.2), EE_SOURCE),
    ("rk4", STEP, (40, 20, 10, 5), (3.5, 4.5), "fourth order: classical Runge-Kutta"),
    ("rk4", PULSE, (40, 20, 10, 5), (3.5, 4.5), "fourth order: classical Runge-Kutta"),
]
# The reference must be far more accurate than the smallest error it measures.
REFERENCE_CHECK_METHOD = "dormand_prince step 1 us tolerance 1e-11"

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "lib"))
from report import fail, failures, ok  # noqa: E402  (the shared pass and failure lines)


def main():
    if len(sys.argv) != 3:
        print(__doc__)
        return 2
    saltpan, source_dir = os.path.abspath(sys.argv[1]), os.path.abspath(sys.argv[2])
    if not (os.path.isfile(saltpan) and os.access(saltpan, os.X_OK)):
        print(f"FAIL: {saltpan} is not an executable saltpan")
        return 1
    spec = os.path.join(source_dir, "specs", "reference", "squid_axon_1952.saltpan")
    with open(spec) as f:
        text = f.read()
    model = text[:text.index("\nprotocol ")] + "\n\n"

    with tempfile.TemporaryDirectory(prefix="saltpan-convergence-") as directory:
        def run(method, inject, name):
            path = os.path.join(directory, name + ".saltpan")
            out = os.path.join(directory, name + ".json")
            with open(path, "w") as f:
                f.write(model + PROTOCOL.format(method=method, duration=DURATION_MS, inject=inject, every=EVERY_MS))
            cmd = [saltpan, "run", path, "-o", out]
            r = subprocess.run(cmd, capture_output=True, text=True)
            if r.returncode != 0:
                fail(f"'{' '.join(cmd)}' ({method}) exited with {r.returncode}: {r.stderr.strip()}")
                return None
            with open(out) as f:
                doc = json.load(f)
            column = next(c for c in doc["columns"] if c["name"] == "axon.V")
            return np.array(doc["time_ms"]), np.array(column["values"], dtype=float)

        references = {}
        for label, inject in (("step", STEP), ("pulse", PULSE)):
            reference = run(REFERENCE_METHOD, inject, f"reference_{label}")
            check = run(REFERENCE_CHECK_METHOD, inject, f"reference_check_{label}")
            if reference is None or check is None:
                print(f"{len(failures)} check(s) failed")
                return 1
            reference_error = float(np.max(np.abs(check[1] - reference[1])))
            print(f"reference ({label}): {REFERENCE_METHOD}; it moves by {reference_error:.2g} mV at tolerance 1e-11")
            references[inject] = (reference, reference_error)

        for method, inject, steps, (low, high), source in CASES:
            (t_ref, v_ref), reference_error = references[inject]
            label = f"{method} ({'pulse' if inject == PULSE else 'step'})"
            errors = []
            for step in steps:
                result = run(f"{method} step {step} us", inject, f"{method}_{step}")
                if result is None:
                    break
                t, v = result
                if len(t) != len(t_ref) or np.max(np.abs(t - t_ref)) > 1e-9:
                    fail(f"{label} {step} us: recorded at other times than the reference")
                    break
                errors.append(float(np.max(np.abs(v - v_ref))))
            if len(errors) != len(steps):
                continue
            if min(errors) < 100 * reference_error:
                fail(f"{label}: the smallest error {min(errors):.2g} mV is too close to the reference's own "
                     f"{reference_error:.2g} mV to measure an order")
                continue
            slope = float(np.polyfit(np.log(steps), np.log(errors), 1)[0])
            pairs = ", ".join(f"{s} us: {e:.3g} mV" for s, e in zip(steps, errors))
            print(f"{label}: max |V - V_ref| {pairs}; fitted slope {slope:.3f}")
            if not low <= slope <= high:
                fail(f"{label}: observed order {slope:.3f}, expected {low}-{high} ({source})")
            else:
                ok(f"{label}: observed order {slope:.3f} within {low}-{high} ({source})")

    if failures:
        print(f"{len(failures)} check(s) failed")
        return 1
    print("all convergence checks passed")
    return 0


if __name__ == "__main__":
    sys.exit(main())
