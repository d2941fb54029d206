#!/usr/bin/env python3
"""Published behaviours of the Hodgkin-Huxley 1952 axon, simulated by `saltpan run`.

usage: hh1952_published.py SALTPAN SOURCE_DIR

Runs the protocols of specs/reference/squid_axon_1952_experiments.saltpan (the model of
squid_axon_1952.saltpan with accurate Dormand-Prince protocols) and the shipped protocol step10 of
squid_axon_1952.saltpan, and checks: the gates at -65 mV and the resting potential; the firing rate
at 10 uA/cm2 from the steady interspike interval; that repetitive firing for a step from rest
starts between 6.2 and 6.3 uA/cm2; and that the f-I curve starts near 50 Hz.
Exit status 0 when every check passes; otherwise 1, with one line per failure.
"""

import os
import re
import subprocess
import sys
import tempfile

import numpy as np

# Check values at 6.3 degC with E_L = -54.387 mV (docs/references.md, computed, agreeing with a
# computer-assisted-proof preprint on the 1952 parameters).
REST_MV = -64.996379
REST_TOLERANCE_MV = 1e-3
GATES_AT_MINUS_65 = {"axon.SquidSodium1952.m": 0.052932, "axon.SquidSodium1952.h": 0.596121,
                     "axon.SquidPotassium1952.n": 0.317677}  # rounded to 6 decimals
GATE_TOLERANCE = 1e-6
RATE_10_HZ = 68.32  # at 10 uA/cm2 (docs/references.md, computed)
RATE_TOLERANCE_HZ = 0.1
PERIOD_10_MS = 14.63621  # (docs/references.md, computed)
PERIOD_TOLERANCE_MS = 1e-3
# Onset of repetitive firing for a step from rest: 6.2603 uA/cm2 at about 50.3 Hz (docs/references.md,
# computed; Rinzel & Miller 1980, Math. Biosci. 49:27-59: about 6.26, from memory). The protocols
# below_onset (6.2) and above_onset (6.3) bracket it.
BELOW_ONSET, ABOVE_ONSET = 6.2, 6.3
SUSTAINED_WINDOW_MS = 200.0  # the last 200 ms of a 500 ms step
SUSTAINED_MIN_SPIKES = 5  # a train near 50 Hz gives about 10 there
# "The f-I curve starts discontinuously near 50 Hz" (docs/references.md): the rate just above onset.
ONSET_RATE_RANGE_HZ = (45.0, 60.0)

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "lib"))
from report import fail, failures, ok  # noqa: E402  (the shared pass and failure lines)


def spike_times(t, v, threshold=0.0):
    """Upward crossings of threshold, linearly interpolated between samples."""
    i = np.nonzero((v[:-1] < threshold) & (v[1:] >= threshold))[0]
    return t[i] + (threshold - v[i]) * (t[i + 1] - t[i]) / (v[i + 1] - v[i])


def run(saltpan, spec, protocol, directory):
    out = os.path.join(directory, protocol + ".csv")
    cmd = [saltpan, "run", spec, "--protocol", protocol, "-o", out]
    r = subprocess.run(cmd, capture_output=True, text=True)
    if r.returncode != 0:
        fail(f"'{' '.join(cmd)}' exited with {r.returncode}: {r.stderr.strip()}")
        return None
    with open(out) as f:
        header = f.readline().strip().split(",")
    data = np.loadtxt(out, delimiter=",", skiprows=1, ndmin=2)
    columns = {}
    for i, h in enumerate(header):
        columns[re.sub(r"\s*\(.*\)$", "", h)] = data[:, i]
    if "time" not in columns or "axon.V" not in columns:
        fail(f"{spec} --protocol {protocol}: unexpected CSV header {header}")
        return None
    return columns


def model_part(path):
    """The spec from its 'model' line up to its first protocol, without comments or blank lines."""
    with open(path) as f:
        lines = f.read().splitlines()
    start = next(i for i, l in enumerate(lines) if l.startswith("model "))
    end = next((i for i, l in enumerate(lines) if l.startswith("protocol ")), len(lines))
    return [l.split("#")[0].rstrip() for l in lines[start:end] if l.split("#")[0].strip()]


def steady_rate(label, columns, expect_spikes=10):
    times = spike_times(columns["time"], columns["axon.V"])
    if len(times) < expect_spikes:
        fail(f"{label}: only {len(times)} spikes")
        return None
    intervals = np.diff(times[-5:])
    if np.ptp(intervals) > 1e-3:
        fail(f"{label}: the last interspike intervals are not steady: {intervals}")
    return float(np.mean(intervals))


def check_rate(label, period):
    rate = 1000.0 / period
    print(f"{label}: steady period {period:.5f} ms, rate {rate:.3f} Hz")
    if abs(rate - RATE_10_HZ) > RATE_TOLERANCE_HZ:
        fail(f"{label}: firing rate {rate:.3f} Hz at 10 uA/cm2, docs/references.md (computed) gives {RATE_10_HZ} Hz "
             f"(tolerance {RATE_TOLERANCE_HZ} Hz)")
    else:
        ok(f"{label}: {rate:.3f} Hz at 10 uA/cm2, docs/references.md (computed) {RATE_10_HZ} Hz")
    return rate


def main():
    if len(sys.argv) != 3:
        print(__doc__)
        return 2
    saltpan, source_dir = os.path.abspath(sys.argv[1]), os.path.abspath(sys.argv[2])
    if not (os.path.isfile(saltpan) and os.access(saltpan, os.X_OK)):
        print(f"FAIL: {saltpan} is not an executable saltpan")
        return 1
    base = os.path.join(source_dir, "specs", "reference", "squid_axon_1952.saltpan")
    spec = os.path.join(source_dir, "specs", "reference", "squid_axon_1952_experiments.saltpan")
    if model_part(base) != model_part(spec):
        fail(f"the model in {spec} is no longer the one in {base}")

    with tempfile.TemporaryDirectory(prefix="saltpan-hh-published-") as directory:
        # Gates at -65 mV and the resting potential (docs/references.md, computed).
        rest = run(saltpan, spec, "rest", directory)
        if rest is not None:
            for name, expected in GATES_AT_MINUS_65.items():
                got = rest[name][0]
                if abs(got - expected) > GATE_TOLERANCE:
                    fail(f"{name} at -65 mV is {got!r}, docs/references.md (computed) gives {expected}")
                else:
                    ok(f"{name} at -65 mV: {got:.7f} (docs/references.md, computed: {expected})")
            v = rest["axon.V"]
            settled = abs(v[-1] - v[-11])
            print(f"rest: V = {v[-1]:.7f} mV after {rest['time'][-1]:g} ms (moved {settled:.2g} mV in its "
                  f"last 10 ms); docs/references.md (computed) {REST_MV} mV")
            if abs(v[-1] - REST_MV) > REST_TOLERANCE_MV or settled > 1e-5:
                fail(f"resting potential {v[-1]!r} mV (moving by {settled:.2g} mV per 10 ms), docs/references.md "
                     f"(computed) gives {REST_MV} mV")
            else:
                ok(f"resting potential within {REST_TOLERANCE_MV} mV of {REST_MV} mV (docs/references.md, computed)")

        # Firing at 10 uA/cm2: the accurate protocol, then the shipped one.
        dp = run(saltpan, spec, "step10_dp", directory)
        if dp is not None:
            period = steady_rate("step10_dp", dp)
            if period is not None:
                check_rate("step10_dp (dormand_prince 1e-10)", period)
                if abs(period - PERIOD_10_MS) > PERIOD_TOLERANCE_MS:
                    fail(f"step10_dp: period {period:.6f} ms, docs/references.md (computed) gives {PERIOD_10_MS} ms")
                else:
                    ok(f"step10_dp: period within {PERIOD_TOLERANCE_MS} ms of {PERIOD_10_MS} ms (docs/references.md, "
                       f"computed)")
        shipped = run(saltpan, base, "step10", directory)
        if shipped is not None:
            period = steady_rate("step10 as shipped", shipped)
            if period is not None:
                check_rate("step10 as shipped (squid_axon_1952.saltpan, exponential_euler 10 us)", period)

        # Onset of repetitive firing between 6.2 and 6.3 uA/cm2 (Rinzel & Miller 1980, about 6.26,
        # from memory; docs/references.md computes 6.2603).
        counts = {}
        for protocol, amplitude in (("below_onset", BELOW_ONSET), ("above_onset", ABOVE_ONSET)):
            c = run(saltpan, spec, protocol, directory)
            if c is None:
                continue
            times = spike_times(c["time"], c["axon.V"])
            late = times[times > c["time"][-1] - SUSTAINED_WINDOW_MS]
            counts[protocol] = (amplitude, times, late)
            print(f"{protocol}: {amplitude} uA/cm2 for {c['time'][-1]:g} ms: {len(times)} spikes, "
                  f"{len(late)} in the last {SUSTAINED_WINDOW_MS:g} ms")
        if "below_onset" in counts:
            amplitude, times, late = counts["below_onset"]
            if len(late) > 0:
                fail(f"{amplitude} uA/cm2 still fires in the last {SUSTAINED_WINDOW_MS:g} ms ({len(late)} spikes); "
                     f"repetitive firing should start near 6.26 uA/cm2 (Rinzel & Miller 1980, from memory)")
            elif len(times) == 0:
                fail(f"{amplitude} uA/cm2 gives no spike at all: just below onset a step from rest gives a few")
            else:
                ok(f"{amplitude} uA/cm2: {len(times)} transient spikes, then rest (onset about 6.26, "
                   f"Rinzel & Miller 1980, from memory)")
        if "above_onset" in counts:
            amplitude, times, late = counts["above_onset"]
            if len(late) < SUSTAINED_MIN_SPIKES:
                fail(f"{amplitude} uA/cm2: {len(late)} spikes in the last {SUSTAINED_WINDOW_MS:g} ms, expected a "
                     f"sustained train (onset about 6.26, Rinzel & Miller 1980, from memory)")
            else:
                ok(f"{amplitude} uA/cm2: sustained train, {len(late)} spikes in the last {SUSTAINED_WINDOW_MS:g} ms")
                period = np.mean(np.diff(late[-5:]))
                rate = 1000.0 / period
                low, high = ONSET_RATE_RANGE_HZ
                print(f"rate just above onset ({amplitude} uA/cm2): {rate:.3f} Hz")
                if not low <= rate <= high:
                    fail(f"rate just above onset {rate:.3f} Hz; the f-I curve starts near 50 Hz (docs/references.md: "
                         f"about 50.3 Hz at onset)")
                else:
                    ok(f"the f-I curve starts near 50 Hz: {rate:.2f} Hz at {amplitude} uA/cm2 (docs/references.md: "
                       f"about 50.3 Hz at onset)")

    if failures:
        print(f"{len(failures)} check(s) failed")
        return 1
    print("all HH 1952 published-behaviour checks passed")
    return 0


if __name__ == "__main__":
    sys.exit(main())
