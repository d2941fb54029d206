#!/usr/bin/env python3
"""Resting potentials of a saltpan sweep over the HH 1952 leak reversal against SciPy's brentq.

usage: sweep_rest_scipy.py SALTPAN SOURCE_DIR

saltpan sweeps the leak reversal E_L of specs/reference/squid_axon_1952.saltpan (the shipped `leak`
sweep of squid_axon_1952_sweeps.saltpan, and a longer list written with --values), measuring
rest(axon). Each point's rest is compared with the zero of the steady-state membrane current

    I(V) = gNa m_inf^3 h_inf (V - E_Na) + gK n_inf^4 (V - E_K) + gL (V - E_L),
    x_inf = alpha_x / (alpha_x + beta_x),

written out below with the rate functions of Hodgkin & Huxley (1952), J. Physiol. 117:500-544, in
the modern convention (V inside minus outside, rest near -65 mV, 6.3 degC, so the Q10 factor is 1),
and solved by SciPy's brentq (Virtanen et al. 2020, Nature Methods 17:261-272), the independent
solver. Before the comparison the script checks, on a 0.01 mV grid, that I(V) has exactly one zero
between -100 and 0 mV, so there is one rest to compare. Tolerance 1e-6 mV.
Exit status 0 when every check passes; otherwise 1, with one line per failure.
"""

import json
import math
import os
import subprocess
import sys
import tempfile

from scipy.optimize import brentq

# --- the model (Hodgkin & Huxley 1952, Table 3; reversals in the modern convention) ---
G_NA, G_K, G_L = 120.0, 36.0, 0.3  # mS/cm2
E_NA, E_K = 50.0, -77.0  # mV
TOLERANCE_MV = 1e-6
# The leak reversals swept with --values (mV), the published -54.387 among them.
LEAK_VALUES = [-75.0, -70.0, -65.0, -60.0, -57.5, -54.387, -52.0, -50.0]


def exprel(x):
    """(e^x - 1)/x, exact at 0."""
    return 1.0 if x == 0.0 else math.expm1(x) / x


# Rates in 1/ms at 6.3 degC (Hodgkin & Huxley 1952, rewritten for V_modern = -V_1952 - 65 mV).
def alpha_m(v):  # 0.1 (V + 40) / (1 - e^(-(V + 40)/10))
    return 1.0 / exprel(-(v + 40.0) / 10.0)


def beta_m(v):
    return 4.0 * math.exp(-(v + 65.0) / 18.0)


def alpha_h(v):
    return 0.07 * math.exp(-(v + 65.0) / 20.0)


def beta_h(v):  # 1 / (1 + e^(-(V + 35)/10))
    return 1.0 / (1.0 + math.exp(-(v + 35.0) / 10.0))


def alpha_n(v):  # 0.01 (V + 55) / (1 - e^(-(V + 55)/10))
    return 0.1 / exprel(-(v + 55.0) / 10.0)


def beta_n(v):
    return 0.125 * math.exp(-(v + 65.0) / 80.0)


def steady(alpha, beta, v):
    a, b = alpha(v), beta(v)
    return a / (a + b)


def membrane_current(v, e_leak):
    """Steady-state membrane current in uA/cm2, positive outward."""
    m, h, n = steady(alpha_m, beta_m, v), steady(alpha_h, beta_h, v), steady(alpha_n, beta_n, v)
    return G_NA * m**3 * h * (v - E_NA) + G_K * n**4 * (v - E_K) + G_L * (v - e_leak)


def scipy_rest(e_leak, failures):
    grid = [-100.0 + 0.01 * i for i in range(10001)]
    currents = [membrane_current(v, e_leak) for v in grid]
    brackets = [(grid[i], grid[i + 1]) for i in range(len(grid) - 1) if (currents[i] < 0) != (currents[i + 1] < 0)]
    if len(brackets) != 1:
        failures.append(f"E_L = {e_leak} mV: I(V) has {len(brackets)} zeros in -100..0 mV, expected one")
        return None
    return brentq(membrane_current, brackets[0][0], brackets[0][1], args=(e_leak,), xtol=1e-13, rtol=1e-15)


def sweep(saltpan, args, out, failures, name):
    result = subprocess.run([saltpan, "sweep", "--progress", "none", "-o", out] + args, capture_output=True, text=True,
                            timeout=120)
    if result.returncode != 0:
        failures.append(f"{name}: saltpan sweep exited {result.returncode}: {result.stderr.strip()[:300]}")
        return None
    with open(out, encoding="utf-8") as f:
        return json.load(f)


def compare(doc, name, failures):
    names = [p["name"] for p in doc["parameters"]]
    measures = [m["name"] for m in doc["measures"]]
    if names != ["axon.SquidLeak1952.reversal"] or doc["parameters"][0]["unit"] != "mV":
        failures.append(f"{name}: unexpected parameters {doc['parameters']}")
        return 0
    if "rest(axon)" not in measures or doc["measures"][measures.index("rest(axon)")]["unit"] != "mV":
        failures.append(f"{name}: no rest(axon) in mV among {doc['measures']}")
        return 0
    k = measures.index("rest(axon)")
    compared = 0
    for point in doc["points"]:
        e_leak = point["parameters"][0]
        rest = point["measures"][k]
        if point["failure"] is not None or rest is None:
            failures.append(f"{name}: E_L = {e_leak} mV has no rest: {point['failure']}")
            continue
        expected = scipy_rest(e_leak, failures)
        if expected is None:
            continue
        compared += 1
        if abs(rest - expected) > TOLERANCE_MV:
            failures.append(f"{name}: E_L = {e_leak} mV: saltpan's rest {rest!r} mV, SciPy brentq {expected!r} mV "
                            f"(difference {rest - expected:.3g} mV, tolerance {TOLERANCE_MV} mV)")
    return compared


def main():
    if len(sys.argv) != 3:
        print(__doc__.strip().splitlines()[2], file=sys.stderr)
        return 2
    saltpan, src = sys.argv[1], sys.argv[2]
    spec = os.path.join(src, "specs", "reference", "squid_axon_1952.saltpan")
    sweeps = os.path.join(src, "specs", "reference", "squid_axon_1952_sweeps.saltpan")
    failures = []
    # A sanity check of the Python model: the published rest at E_L = -54.387 mV is about -65 mV.
    published = scipy_rest(-54.387, failures)
    if published is not None and abs(published - -65.0) > 0.01:
        failures.append(f"the Python model's rest at E_L = -54.387 mV is {published} mV, not about -65 mV")
    with tempfile.TemporaryDirectory() as tmp:
        shipped = sweep(saltpan, ["--sweep", "leak", sweeps], os.path.join(tmp, "leak.json"), failures, "leak")
        if shipped is not None:
            if compare(shipped, "leak", failures) != 3:
                failures.append("leak: the shipped sweep should compare 3 points")
        values = ",".join(f"{v}mV" for v in LEAK_VALUES)
        listed = sweep(saltpan, ["--values", f"axon.SquidLeak1952.reversal={values}", "--measure", "rest(axon)", spec],
                       os.path.join(tmp, "values.json"), failures, "values")
        if listed is not None:
            got = [p["parameters"][0] for p in listed["points"]]
            if got != LEAK_VALUES:
                failures.append(f"values: the sweep's points are {got}, not {LEAK_VALUES}")
            if compare(listed, "values", failures) != len(LEAK_VALUES):
                failures.append(f"values: {len(LEAK_VALUES)} points should have been compared")
            rests = [p["measures"][0] for p in listed["points"]]
            if any(r is None for r in rests) or rests != sorted(rests):
                failures.append(f"values: the rest should rise with E_L: {rests}")
    for f in failures:
        print(f)
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
