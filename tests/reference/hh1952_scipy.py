#!/usr/bin/env python3
"""Spike times of the Hodgkin-Huxley 1952 axon in saltpan against an independent SciPy integration.

usage: hh1952_scipy.py SALTPAN SOURCE_DIR

The published HH 1952 equations (modern convention, 6.3 degC; written out below from the project's
docs/references.md, not from saltpan's stdlib) are integrated with SciPy's solve_ivp (Virtanen et al. 2020,
Nature Methods 17:261-272) at rtol 1e-10, atol 1e-12, for the 10 uA/cm2 step of 200 ms from
V = -65 mV with the gates at their steady state. saltpan runs specs/reference/squid_axon_1952.saltpan,
protocol step10 (RK4, 10 us, as shipped), and temporary copies with the method changed to
exponential_euler (10 us and 0.25 us), rosenbrock and dormand_prince. Spike times are upward crossings of 0 mV, linearly interpolated between
samples 0.01 ms apart. Acceptance criterion (the issue's): every spike within 0.05 ms of SciPy's.
Exit status 0 when every check passes; otherwise 1, with one line per failure.
"""

import math
import os
import re
import subprocess
import sys
import tempfile

import numpy as np
from scipy.integrate import solve_ivp

# --- the published model (docs/references.md, "Hodgkin-Huxley 1952 squid axon, modern convention") ---
# C = 1 uF/cm2; gNa, gK, gL = 120, 36, 0.3 mS/cm2 (HH 1952 Table 3, seen secondhand).
C_M = 1.0
G_NA, G_K, G_L = 120.0, 36.0, 0.3
# E_Na = +50, E_K = -77, E_L = -54.387 mV (memory: Dayan & Abbott 2001 ch. 5).
E_NA, E_K, E_L = 50.0, -77.0, -54.387
V0 = -65.0  # start, gates at steady state (the brief; squid_axon_1952.saltpan 'initial V = -65 mV')
I_STEP = 10.0  # uA/cm2, from 0 to 200 ms (protocol step10)
DURATION = 200.0  # ms
SAMPLE = 0.01  # ms, the protocol's recording interval
# The acceptance criterion for spike times against an independent integration.
SPIKE_TOLERANCE_MS = 0.05
# Our own, tighter bound for the adaptive method at tolerance 1e-10: both sides then solve the same
# equations to ~1e-9 ms, and parameter drift (E_L rounded to -54.4 mV moves the 14th spike by
# 0.03 ms) must not hide inside the 0.05 ms criterion.
ACCURATE_TOLERANCE_MS = 1e-4
# Period at 10 uA/cm2: 14.63621 ms (computed; docs/references.md). A sanity check on the Python model.
PERIOD_COMPUTED_MS = 14.63621


def exprel(x):
    """(e^x - 1)/x, exact at 0."""
    return 1.0 if x == 0.0 else math.expm1(x) / x


# Rates in 1/ms at 6.3 degC (HH 1952 forms in modern V; docs/references.md). phi = 1 at 6.3 degC.
def alpha_m(v):  # 0.1(V+40)/(1 - e^(-(V+40)/10)); alpha_m(-40) = 1
    return 1.0 / exprel(-(v + 40.0) / 10.0)


def beta_m(v):
    return 4.0 * math.exp(-(v + 65.0) / 18.0)


def alpha_h(v):
    return 0.07 * math.exp(-(v + 65.0) / 20.0)


def beta_h(v):
    return 1.0 / (1.0 + math.exp(-(v + 35.0) / 10.0))


def alpha_n(v):  # 0.01(V+55)/(1 - e^(-(V+55)/10)); alpha_n(-55) = 0.1
    return 0.1 / exprel(-(v + 55.0) / 10.0)


def beta_n(v):
    return 0.125 * math.exp(-(v + 65.0) / 80.0)


def rhs(_t, y, current):
    v, m, h, n = y
    i_ion = G_NA * m ** 3 * h * (v - E_NA) + G_K * n ** 4 * (v - E_K) + G_L * (v - E_L)
    return [(current - i_ion) / C_M,
            alpha_m(v) * (1 - m) - beta_m(v) * m,
            alpha_h(v) * (1 - h) - beta_h(v) * h,
            alpha_n(v) * (1 - n) - beta_n(v) * n]


def steady(alpha, beta, v):
    return alpha(v) / (alpha(v) + beta(v))


Y0 = [V0, steady(alpha_m, beta_m, V0), steady(alpha_h, beta_h, V0), steady(alpha_n, beta_n, V0)]

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "lib"))
from report import fail, failures, ok  # noqa: E402  (the shared pass and failure lines)


def spike_times(t, v, threshold=0.0):
    """Upward crossings of threshold, linearly interpolated between samples."""
    t, v = np.asarray(t, float), np.asarray(v, float)
    i = np.nonzero((v[:-1] < threshold) & (v[1:] >= threshold))[0]
    return t[i] + (threshold - v[i]) * (t[i + 1] - t[i]) / (v[i + 1] - v[i])


def read_csv(path):
    with open(path) as f:
        header = f.readline().strip().split(",")
    data = np.loadtxt(path, delimiter=",", skiprows=1, ndmin=2)
    return header, data


def run_saltpan(saltpan, spec, out, extra=()):
    cmd = [saltpan, "run", spec, "--protocol", "step10", *extra, "-o", out]
    r = subprocess.run(cmd, capture_output=True, text=True)
    if r.returncode != 0:
        fail(f"'{' '.join(cmd)}' exited with {r.returncode}: {r.stderr.strip()}")
        return None
    header, data = read_csv(out)
    if header[:2] != ["time (ms)", "axon.V (mV)"]:
        fail(f"{spec}: unexpected CSV header {header}")
        return None
    return data


def scipy_reference():
    """SciPy solve_ivp, Virtanen et al. 2020: DOP853 and LSODA at rtol 1e-10, atol 1e-12."""
    grid = np.round(np.arange(0, round(DURATION / SAMPLE) + 1) * SAMPLE, 12)
    result = {}
    for method in ("DOP853", "LSODA"):
        def upward(_t, y, _current):
            return y[0]
        upward.direction = 1
        s = solve_ivp(rhs, (0.0, DURATION), Y0, method=method, rtol=1e-10, atol=1e-12, t_eval=grid,
                      events=upward, args=(I_STEP,))
        if not s.success:
            fail(f"SciPy solve_ivp ({method}) failed: {s.message}")
            return None
        result[method] = (spike_times(s.t, s.y[0]), s.t_events[0])
    sampled, located = result["DOP853"]
    other, _ = result["LSODA"]
    # The two SciPy methods must agree with each other far inside the tolerance under test.
    if len(other) != len(sampled) or np.max(np.abs(other - sampled)) > 1e-4:
        fail(f"SciPy DOP853 and LSODA disagree on spike times: {sampled} vs {other}")
        return None
    # Linear interpolation on the 0.01 ms grid against event location: a bound on the sampling error.
    interp_error = np.max(np.abs(sampled - located))
    if interp_error > 1e-3:
        fail(f"linear interpolation at {SAMPLE} ms moves SciPy's spike times by {interp_error:.3g} ms")
    period = np.mean(np.diff(sampled[-5:]))
    if abs(period - PERIOD_COMPUTED_MS) > 1e-4:
        fail(f"SciPy period {period:.6f} ms, docs/references.md computes {PERIOD_COMPUTED_MS} ms")
    else:
        ok(f"SciPy solve_ivp (Virtanen et al. 2020), DOP853/LSODA agree to "
           f"{np.max(np.abs(other - sampled)):.2g} ms; {len(sampled)} spikes, period {period:.5f} ms "
           f"(docs/references.md, computed: {PERIOD_COMPUTED_MS} ms)")
    return sampled


def exponential_euler_python(dt, gates_first=True):
    """For diagnosis only: exponential Euler in Python. Each gate relaxes exactly towards its steady
    value at the step's starting V (Rush & Larsen 1978), and V relaxes exactly for frozen
    conductances: with gates_first those of the new gates (saltpan's ordering; a staggered scheme,
    second order in V), otherwise those of the old gates (the plain ordering, first order)."""
    v, m, h, n = Y0
    steps = int(round(DURATION / dt))
    vs = np.empty(steps + 1)
    vs[0] = v
    for i in range(steps):
        gates = []
        for (a, b), x in zip(((alpha_m(v), beta_m(v)), (alpha_h(v), beta_h(v)), (alpha_n(v), beta_n(v))), (m, h, n)):
            inf, tau = a / (a + b), 1.0 / (a + b)
            gates.append(inf + (x - inf) * math.exp(-dt / tau))
        if gates_first:
            m, h, n = gates
        g_na, g_k = G_NA * m ** 3 * h, G_K * n ** 4
        g = g_na + g_k + G_L
        v_inf = (g_na * E_NA + g_k * E_K + G_L * E_L + I_STEP) / g
        v = v_inf + (v - v_inf) * math.exp(-dt * g / C_M)
        m, h, n = gates
        vs[i + 1] = v
    return np.arange(steps + 1) * dt, vs


def compare(label, data, reference, tight=None):
    times = spike_times(data[:, 0], data[:, 1])
    if len(times) != len(reference):
        fail(f"{label}: {len(times)} spikes, SciPy {len(reference)}: {np.round(times, 4)} vs {np.round(reference, 4)}")
        return None
    diff = np.abs(times - reference)
    worst = int(np.argmax(diff))
    print(f"{label}: max |spike time - SciPy| = {diff[worst]:.3g} ms (spike {worst + 1} of {len(times)}, "
          f"at {reference[worst]:.4f} ms); first spike {times[0] - reference[0]:+.3g} ms")
    if diff[worst] > SPIKE_TOLERANCE_MS:
        bad = int(np.sum(diff > SPIKE_TOLERANCE_MS))
        fail(f"{label}: {bad} of {len(times)} spikes differ from SciPy solve_ivp (Virtanen et al. 2020) by more "
             f"than {SPIKE_TOLERANCE_MS} ms (the issue's acceptance criterion); worst {diff[worst]:.4f} ms")
    else:
        ok(f"{label}: every spike within {SPIKE_TOLERANCE_MS} ms of SciPy solve_ivp (Virtanen et al. 2020)")
    if tight is not None:
        if diff[worst] > tight:
            fail(f"{label}: worst spike {diff[worst]:.3g} ms from SciPy solve_ivp (Virtanen et al. 2020); an accurate "
                 f"integration of the same equations should agree to {tight} ms")
        else:
            ok(f"{label}: every spike within {tight} ms of SciPy solve_ivp (Virtanen et al. 2020)")
    return diff[worst]


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
    method_line = re.compile(r"^(\s*)method\s+\w+\s+step\s+10\s+us\s*$", re.M)
    if len(method_line.findall(text)) != 1:
        fail(f"{spec}: expected exactly one 'method ... step 10 us' line (protocol step10)")
        return 1

    reference = scipy_reference()
    if reference is None:
        print(f"{len(failures)} check(s) failed")
        return 1

    with tempfile.TemporaryDirectory(prefix="saltpan-hh-scipy-") as directory:
        # As shipped (RK4 at 10 us): the criterion, every spike within 0.05 ms.
        data = run_saltpan(saltpan, spec, os.path.join(directory, "shipped.csv"))
        if data is not None:
            compare("saltpan step10 as shipped (rk4 10 us)", data, reference)
        # Exponential Euler (gates first, second order in V) meets the criterion at 10 us as
        # well as at 0.25 us. The same scheme in Python must agree with saltpan; the plain
        # ordering (V with the old gates, first order) is reported for comparison.
        for step in ("10", "0.25"):
            variant = os.path.join(directory, f"squid_axon_1952_ee{step}.saltpan")
            with open(variant, "w") as f:
                f.write(method_line.sub(rf"\1method exponential_euler step {step} us", text))
            data = run_saltpan(saltpan, variant, os.path.join(directory, f"ee{step}.csv"))
            if data is None:
                continue
            compare(f"saltpan exponential_euler {step} us", data, reference)
            if step != "10":
                continue
            ours = spike_times(data[:, 0], data[:, 1])
            same = spike_times(*exponential_euler_python(0.01))
            if len(same) != len(ours) or np.max(np.abs(same - ours)) > 1e-6:
                fail(f"exponential_euler 10 us: the same scheme written in Python gives other spike times: "
                     f"{np.round(same, 5)} vs {np.round(ours, 5)}")
            else:
                ok(f"exponential_euler 10 us: the same scheme written in Python differs from saltpan by "
                   f"{np.max(np.abs(same - ours)):.2g} ms")
            plain = spike_times(*exponential_euler_python(0.01, gates_first=False))
            if len(plain) == len(reference):
                print(f"info: the plain ordering (old gates, first order) at 10 us, in Python: max |spike time - "
                      f"SciPy| = {np.max(np.abs(plain - reference)):.3g} ms; first spike "
                      f"{plain[0] - reference[0]:+.3g} ms (not a check)")
        # The stiff (Rosenbrock ROS2, second order) method at a moderate tolerance.
        variant = os.path.join(directory, "squid_axon_1952_ros.saltpan")
        with open(variant, "w") as f:
            f.write(method_line.sub(r"\1method rosenbrock step 10 us tolerance 1e-7", text))
        data = run_saltpan(saltpan, variant, os.path.join(directory, "ros.csv"))
        if data is not None:
            compare("saltpan rosenbrock tolerance 1e-7", data, reference)
        # The same protocol with the adaptive method.
        variant = os.path.join(directory, "squid_axon_1952_dp.saltpan")
        with open(variant, "w") as f:
            f.write(method_line.sub(r"\1method dormand_prince step 10 us tolerance 1e-10", text))
        data = run_saltpan(saltpan, variant, os.path.join(directory, "dp.csv"))
        if data is not None:
            compare("saltpan dormand_prince tolerance 1e-10", data, reference, tight=ACCURATE_TOLERANCE_MS)

    if failures:
        print(f"{len(failures)} check(s) failed")
        return 1
    print("all HH 1952 SciPy checks passed")
    return 0


if __name__ == "__main__":
    sys.exit(main())
