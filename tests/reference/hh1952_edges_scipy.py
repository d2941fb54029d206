#!/usr/bin/env python3
"""Stimulus edges of the Hodgkin-Huxley 1952 axon in saltpan against an independent SciPy integration.

usage: hh1952_edges_scipy.py SALTPAN SOURCE_DIR

The model is A. L. Hodgkin and A. F. Huxley (1952), J. Physiol. 117:500-544, in the modern
convention at 6.3 degC (rates and parameters written out in hh1952_scipy.py, from the project's
references.md, not from saltpan's stdlib); saltpan runs specs/reference/squid_axon_1952.saltpan
with its protocol replaced in a temporary copy. SciPy's solve_ivp (Virtanen et al. 2020, Nature
Methods 17:261-272; DOP853 at rtol 1e-11, atol 1e-13) is integrated piecewise, restarting at
every edge, so its stimulus is exact. Two checks of how the fixed-step methods meet an edge:

1. Threshold of a 1 ms current pulse (from 10 ms to 11 ms, from V = -65 mV with the gates at their
   steady state): the smallest amplitude whose V crosses 0 mV within 30 ms, found by bisection to
   1e-5 uA/cm2. RK4 at 10 us and Dormand-Prince must agree with SciPy to 2e-4 uA/cm2; exponential
   Euler at 10 us (second order) to 2e-3 uA/cm2. Steppers that let a pulse gain part of a step at
   an edge were far outside these bounds (measured: RK4 +0.021, first-order exponential Euler
   +0.12 uA/cm2).
2. A voltage clamp held at -80 mV and stepped to -65 mV at 10 ms: the inactivation gate h after
   the step, sampled every 0.01 ms, must follow SciPy's to 1e-9 (a step taken one step late is
   off by 4e-4), and tau_h, fitted to h(t) = h_inf + (h_step - h_inf) e^(-(t - 10 ms)/tau) over
   the 40 ms after the step, must agree with SciPy's fit to 1e-6 ms. SciPy's own fit must equal
   1/(alpha_h + beta_h) at -65 mV, the closed form.
Exit status 0 when every check passes; otherwise 1, with one line per failure.
"""

import math
import os
import subprocess
import sys
import tempfile

import numpy as np
from scipy.integrate import solve_ivp
from scipy.optimize import curve_fit

sys.dont_write_bytecode = True  # no __pycache__ in the source tree
sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import hh1952_scipy as hh  # noqa: E402  (the same published equations, one copy)

PULSE_ON, PULSE_OFF, PULSE_RUN = 10.0, 11.0, 30.0  # ms
BISECT_LOW, BISECT_HIGH, BISECT_WIDTH = 2.0, 20.0, 1e-5  # uA/cm2
HOLD, STEP_LEVEL, STEP_AT, CLAMP_RUN = -80.0, -65.0, 10.0, 50.0  # mV, mV, ms, ms
SAMPLE = 0.01  # ms
RTOL, ATOL = 1e-11, 1e-13

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "lib"))
from report import fail, failures, ok  # noqa: E402  (the shared pass and failure lines)


def pieces(edges, y0, rhs_of):
    """solve_ivp from edge to edge; rhs_of(t_mid) gives the right-hand side of each piece."""
    ts, ys = [], []
    y = list(y0)
    for a, b in zip(edges[:-1], edges[1:]):
        grid = np.round(np.arange(round(a / SAMPLE), round(b / SAMPLE) + 1) * SAMPLE, 12)
        s = solve_ivp(rhs_of(0.5 * (a + b)), (a, b), y, method="DOP853", rtol=RTOL, atol=ATOL, t_eval=grid)
        if not s.success:
            raise RuntimeError(s.message)
        ts.append(s.t if not ts else s.t[1:])
        ys.append(s.y if not ys else s.y[:, 1:])
        y = list(s.y[:, -1])
    return np.concatenate(ts), np.concatenate(ys, axis=1)


def scipy_spikes(amplitude):
    def rhs_of(t):
        current = amplitude if PULSE_ON < t < PULSE_OFF else 0.0
        return lambda _t, y: hh.rhs(_t, y, current)
    _, y = pieces([0.0, PULSE_ON, PULSE_OFF, PULSE_RUN], hh.Y0, rhs_of)
    return float(np.max(y[0])) > 0.0


def bisect(spikes):
    low, high = BISECT_LOW, BISECT_HIGH
    if spikes(low) or not spikes(high):
        return None
    while high - low > BISECT_WIDTH:
        middle = 0.5 * (low + high)
        if spikes(middle):
            high = middle
        else:
            low = middle
    return 0.5 * (low + high)


def run_saltpan(saltpan, model, directory, name, protocol):
    path = os.path.join(directory, name + ".saltpan")
    out = os.path.join(directory, name + ".csv")
    with open(path, "w") as f:
        f.write(model + protocol)
    cmd = [saltpan, "run", path, "-o", out]
    r = subprocess.run(cmd, capture_output=True, text=True)
    if r.returncode != 0:
        raise RuntimeError(f"'{' '.join(cmd)}' exited with {r.returncode}: {r.stderr.strip()}")
    return np.loadtxt(out, delimiter=",", skiprows=1, ndmin=2)


def pulse_protocol(method, amplitude):
    return (f"protocol threshold {{\n  method {method}\n  duration {PULSE_RUN:g} ms\n"
            f"  inject axon {amplitude!r} uA/cm2 from {PULSE_ON:g} ms to {PULSE_OFF:g} ms\n"
            f"  record axon.V every {SAMPLE:g} ms\n}}\n")


def clamp_protocol(method):
    return (f"protocol clamp_step {{\n  method {method}\n  duration {CLAMP_RUN:g} ms\n"
            f"  clamp axon at {HOLD:g} mV\n  clamp axon at {STEP_LEVEL:g} mV from {STEP_AT:g} ms to 1000 ms\n"
            f"  record axon.SquidSodium1952.h every {SAMPLE:g} ms\n}}\n")


def fitted_tau(t, h):
    """tau (ms) of h(t) = h_inf + (h_step - h_inf) e^(-(t - STEP_AT)/tau) after the step."""
    after = t >= STEP_AT - 1e-9
    t, h = t[after], h[after]
    h_step = h[0]
    model = lambda s, h_inf, tau: h_inf + (h_step - h_inf) * np.exp(-(s - STEP_AT) / tau)  # noqa: E731
    (h_inf, tau), _ = curve_fit(model, t, h, p0=(h[-1], 5.0), xtol=1e-14, ftol=1e-14, gtol=1e-14)
    return tau


def scipy_clamp():
    def rhs_of(t):
        level = STEP_LEVEL if t > STEP_AT else HOLD
        # Under a clamp V stays at the command; only the gates move.
        return lambda _t, y: [0.0] + hh.rhs(_t, [level] + list(y[1:]), 0.0)[1:]
    t, y = pieces([0.0, STEP_AT, CLAMP_RUN], hh.Y0, rhs_of)
    return t, y[2]


METHODS = [
    # (method, threshold bound uA/cm2, why)
    ("rk4 step 10 us", 2e-4, "fourth order"),
    ("exponential_euler step 10 us", 2e-3, "second order in V"),
    ("dormand_prince step 10 us tolerance 1e-10", 2e-4, "adaptive, stops at the edges"),
]


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

    reference = bisect(scipy_spikes)
    if reference is None:
        fail(f"SciPy: no threshold between {BISECT_LOW} and {BISECT_HIGH} uA/cm2")
        return 1
    print(f"SciPy solve_ivp (Virtanen et al. 2020), piecewise: 1 ms pulse threshold {reference:.5f} uA/cm2")
    t_ref, h_ref = scipy_clamp()
    tau_ref = fitted_tau(t_ref, h_ref)
    alpha, beta = hh.alpha_h(STEP_LEVEL), hh.beta_h(STEP_LEVEL)
    tau_closed = 1.0 / (alpha + beta)
    if abs(tau_ref - tau_closed) > 1e-7:
        fail(f"SciPy's fitted tau_h {tau_ref:.9f} ms is not 1/(alpha_h + beta_h) = {tau_closed:.9f} ms at -65 mV")
    else:
        ok(f"SciPy: tau_h after the -80 -> -65 mV step {tau_ref:.7f} ms, closed form {tau_closed:.7f} ms "
           f"(Hodgkin & Huxley 1952 rates)")

    with tempfile.TemporaryDirectory(prefix="saltpan-edges-") as directory:
        for method, bound, why in METHODS:
            runs = iter(range(10 ** 6))

            def spikes(amplitude):
                data = run_saltpan(saltpan, model, directory, f"pulse{next(runs)}", pulse_protocol(method, amplitude))
                return float(np.max(data[:, 1])) > 0.0

            try:
                threshold = bisect(spikes)
                data = run_saltpan(saltpan, model, directory, "clamp", clamp_protocol(method))
            except RuntimeError as e:
                fail(str(e))
                continue
            if threshold is None:
                fail(f"{method}: no threshold between {BISECT_LOW} and {BISECT_HIGH} uA/cm2")
            else:
                error = threshold - reference
                line = f"{method}: 1 ms pulse threshold {threshold:.5f} uA/cm2, SciPy {reference:.5f} ({error:+.1e}; bisection to {BISECT_WIDTH:g})"
                if abs(error) > bound:
                    fail(f"{line}; more than {bound} uA/cm2 ({why})")
                else:
                    ok(f"{line}; within {bound} uA/cm2 ({why})")
            t, h = data[:, 0], data[:, 1]
            if len(t) != len(t_ref) or np.max(np.abs(t - t_ref)) > 1e-9:
                fail(f"{method}: the clamp run is recorded at other times than SciPy's samples")
                continue
            worst = float(np.max(np.abs(h - h_ref)))
            tau = fitted_tau(t, h)
            line = (f"{method}: clamp step, max |h - SciPy| = {worst:.2g}; tau_h {tau:.7f} ms, SciPy {tau_ref:.7f} ms "
                    f"({tau - tau_ref:+.2g} ms)")
            if worst > 1e-9 or abs(tau - tau_ref) > 1e-6:
                fail(f"{line}; bounds 1e-9 and 1e-6 ms")
            else:
                ok(line)

    if failures:
        print(f"{len(failures)} check(s) failed")
        return 1
    print("all HH 1952 edge checks passed")
    return 0


if __name__ == "__main__":
    sys.exit(main())
