#!/usr/bin/env python3
"""Cables in saltpan against the method-of-lines equations of the same trees, integrated by SciPy.

usage: cable_scipy.py SALTPAN SOURCE_DIR

Written from the cable equations and the discretisation docs/language.md ("cable") describes, not
from saltpan's code. A cable of length L cut into N pieces of length h = L/N is N compartments, each
with the side wall pi d h as its area; the membrane equation of piece i is
    C dV_i/dt = -I_ion,i + I_inj,i / a_i + (1/a_i) sum_j G_ij (V_j - V_i)
(the cable equation discretised in space: Rall 1964, from memory; Hines 1984), where neighbouring pieces are
joined through the resistance of a cylinder between their centres, 4 Ri h / (pi d^2), and a cable's
first piece joins what it grows from through half its length (and, when that is a cable's piece,
half of that piece too: from centre to centre). Places name the piece they fall in
(chosen here inside pieces, away from their edges).

1. A passive branched cell (the test cell tests/golden/cables/branched_cell.saltpan with its places
   moved inside pieces): a soma, a 50-piece dendrite, a 10-piece branch from its middle, a current
   step into the dendrite's far part.
2. A Hodgkin-Huxley 1952 cable (HH 1952 rates, densities and reversals as in hh1952_scipy.py; Q10 3
   about 6.3 degC, p. 523 of the paper) at 18.5 degC, 3 cm of 476 um axon (Ri 35.4 ohm cm, both HH
   1952's), 30 pieces, a brief current into its start: a spike propagates along it.

SciPy's solve_ivp (Virtanen et al. 2020) integrates each with BDF at rtol 1e-10 (a sparse Jacobian:
the tree's pattern), piecewise between stimulus edges. saltpan runs the same specs with
Crank-Nicolson at the spec's step and at half of it (interpreter). Crank-Nicolson is second order in
time, so (Richardson) its error at step dt is about 4/3 of the difference between the runs at dt
and dt/2; each check accepts twice that estimate (plus 1e-6 mV for SciPy and the 12 printed
digits), and the error must shrink at least 3x when the step is halved (4x when second order
holds; the passive tree's error shrinks faster, as it is mostly the stiff axial modes that
Crank-Nicolson damps only slowly after a stimulus edge, and damps faster at a smaller step).
Exit status 0 when every check passes; otherwise 1, with one line per failure.
"""

import math
import os
import subprocess
import sys
import tempfile

import numpy as np
from scipy.integrate import solve_ivp
from scipy.sparse import lil_matrix

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "lib"))
from report import fail, failures, ok  # noqa: E402  (the shared pass and failure lines)


# Units: ms, mV, cm, uF/cm2, mS/cm2, uA; resistivity in kOhm cm, so conductances are in mS.
class Tree:
    """Compartments (area cm2) joined by axial conductances (mS)."""

    def __init__(self):
        self.area, self.joins, self.index = [], [], {}

    def compartment(self, name, area):
        self.index[name] = len(self.area)
        self.area.append(area)
        return self.index[name]

    def cable(self, name, parent, length, diameter, ri, pieces, parent_half=0.0):
        """A cable of equal pieces; its first piece joins `parent` (an index or None) through half
        its length and `parent_half` (kOhm: half the parent's piece when that is a cable's), each
        further piece its neighbour between their centres."""
        h = length / pieces
        axial = math.pi * diameter ** 2 / (4 * ri * h)  # mS between neighbouring centres
        first = None
        for k in range(pieces):
            i = self.compartment(f"{name}[{k}]", math.pi * diameter * h)
            if k == 0:
                first = i
                if parent is not None:
                    self.joins.append((parent, i, 1 / (0.5 / axial + parent_half)))
            else:
                self.joins.append((i - 1, i, axial))
        return first, h

    def axial_matrix(self):
        """dV/dt contributions of the axial currents, times C: (1/a_i) G_ij (V_j - V_i)."""
        n = len(self.area)
        a = lil_matrix((n, n))
        for p, c, g in self.joins:
            a[p, p] -= g / self.area[p]
            a[p, c] += g / self.area[p]
            a[c, c] -= g / self.area[c]
            a[c, p] += g / self.area[c]
        return a.tocsr()


def piecewise(rhs, y0, edges, grid, jac=None, sparsity=None):
    """solve_ivp BDF between the stimulus edges, sampled on `grid` (ms)."""
    out, t_out = [], []
    y = np.asarray(y0, float)
    for start, end in zip(edges[:-1], edges[1:]):
        inside = grid[(grid >= start - 1e-12) & (grid <= end + 1e-12)]
        s = solve_ivp(rhs, (start, end), y, method="BDF", rtol=1e-10, atol=1e-10, t_eval=inside,
                      jac=jac, jac_sparsity=sparsity, args=(0.5 * (start + end),))
        if not s.success:
            fail(f"solve_ivp BDF failed on [{start}, {end}] ms: {s.message}")
            return None, None
        y = s.y[:, -1]
        out.append(s.y)
        t_out.append(s.t)
    t = np.concatenate(t_out)
    v = np.concatenate(out, axis=1)
    keep = np.concatenate([[True], np.diff(t) > 1e-9])  # an edge sampled twice
    return t[keep], v[:, keep]


def run_saltpan(saltpan, text, step_us, directory, label):
    spec = os.path.join(directory, f"{label}_{step_us}.saltpan")
    with open(spec, "w") as f:
        f.write(text.replace("STEP", f"{step_us} us"))
    out = spec + ".csv"
    cmd = [saltpan, "run", spec, "--engine", "interpreter", "-o", out]
    r = subprocess.run(cmd, capture_output=True, text=True)
    if r.returncode != 0:
        fail(f"'{' '.join(cmd)}' exited with {r.returncode}: {r.stderr.strip()}")
        return None, None
    with open(out) as f:
        header = f.readline().strip().split(",")
    return header, np.loadtxt(out, delimiter=",", skiprows=1, ndmin=2)


def compare(label, reference, coarse, fine):
    """The step-error checks: the run at dt within twice its Richardson error estimate of SciPy, and
    the error at least 3x smaller at dt/2 (a first-order method would halve it)."""
    e1 = np.max(np.abs(coarse - reference))
    e2 = np.max(np.abs(fine - reference))
    estimate = 4.0 / 3.0 * np.max(np.abs(coarse - fine))
    tolerance = 2 * estimate + 1e-6
    print(f"{label}: max |saltpan - SciPy| {e1:.3g} mV at dt, {e2:.3g} mV at dt/2 (ratio {e1 / e2:.2f}); "
          f"step-error estimate {estimate:.3g} mV")
    if e1 > tolerance:
        fail(f"{label}: saltpan differs from SciPy by {e1:.3g} mV, more than twice its own step error "
             f"({estimate:.3g} mV): the equations differ, not the step")
    elif e1 / e2 < 3.0:
        fail(f"{label}: halving the step divides the error by {e1 / e2:.2f}, not by 4 (Crank-Nicolson)")
    else:
        ok(f"{label}: within {tolerance:.3g} mV of SciPy solve_ivp BDF (Virtanen et al. 2020); the error "
           f"shrinks {e1 / e2:.1f}x at half the step")


# --- 1. the passive branched cell ---------------------------------------------------------------
PASSIVE = """model BranchedCell "invented cell for the cable tests: every number here is invented"
temperature 20 degC
channel Leak { reversal -65 mV }
compartment soma {
  sphere diameter 20 um
  capacitance 1 uF/cm2
  initial V = -65 mV
  membrane { Leak 0.05 mS/cm2 }
}
cable dend {
  grows from soma
  length 500 um
  diameter 2 um
  axial resistivity 100 ohm*cm
  pieces 50
}
cable branch {
  grows from dend at 255 um
  length 100 um
  diameter 1 um
  axial resistivity 100 ohm*cm
  piece length 10 um
}
protocol kick {
  duration 50 ms
  method crank_nicolson step STEP
  inject dend at 455 um 0.1 nA from 10 ms to 40 ms
  record soma.V, dend.V at 455 um, dend.V at 51 %, branch.V at 95 % every 1 ms
}
"""


def passive_reference():
    # The invented numbers of the spec: G_L 0.05 mS/cm2 at E -65 mV, C 1 uF/cm2, Ri 100 ohm cm.
    tree = Tree()
    soma = tree.compartment("soma", math.pi * 20e-4 ** 2)
    dend, h_dend = tree.cable("dend", soma, 500e-4, 2e-4, 0.1, 50)
    # The branch joins the centre of the dendrite's piece at 255 um: half of that piece in series.
    half_dend_piece = 4 * 0.1 * (h_dend / 2) / (math.pi * 2e-4 ** 2)
    tree.cable("branch", dend + int(255 / 10), 100e-4, 1e-4, 0.1, 10, parent_half=half_dend_piece)
    n = len(tree.area)
    c, g, e = 1.0, 0.05, -65.0
    a = (tree.axial_matrix().toarray() - g * np.eye(n)) / c  # dV/dt = a V + b
    inject = dend + int(455 / 10)
    b_on = np.full(n, g * e / c)
    b_on[inject] += 1e-4 / tree.area[inject] / c  # 0.1 nA = 1e-4 uA
    b_off = np.full(n, g * e / c)

    def rhs(t, v, middle):
        return a @ v + (b_on if 10 < middle < 40 else b_off)

    grid = np.arange(0, 51.0)
    t, v = piecewise(rhs, np.full(n, -65.0), [0.0, 10.0, 40.0, 50.0], grid, jac=lambda t, v, m: a)
    if t is None:
        return None
    columns = [soma, inject, dend + int(0.51 * 50), tree.index["branch[9]"]]
    return v[columns].T


# --- 2. the Hodgkin-Huxley 1952 cable at 18.5 degC ---------------------------------------------
ACTIVE = """model HHCable "a Hodgkin-Huxley 1952 cable at 18.5 degC"
use std.ions
use std.math
use std.hh1952
temperature 18.5 degC
cable axon {
  length 3 cm
  diameter 476 um
  axial resistivity 35.4 ohm*cm
  pieces 30
  capacitance 1 uF/cm2
  initial V = -65 mV
  membrane {
    SquidSodium1952    120 mS/cm2 reversal 50 mV
    SquidPotassium1952 36 mS/cm2  reversal -77 mV
    SquidLeak1952      0.3 mS/cm2 reversal -54.387 mV
  }
}
protocol kick {
  method crank_nicolson step STEP
  duration 6 ms
  inject axon at 1 % 20000 nA from 0.5 ms to 0.7 ms
  record axon.V at 25 %, axon.V at 75 % every 0.01 ms
}
"""
PHI = 3.0 ** ((18.5 - 6.3) / 10.0)  # HH 1952 p. 523: Q10 3 about 6.3 degC


def exprel(x):
    return np.where(x == 0.0, 1.0, np.expm1(x) / np.where(x == 0.0, 1.0, x))


def rates(v):  # HH 1952 in the modern convention, 1/ms at 6.3 degC (see hh1952_scipy.py)
    return (1.0 / exprel(-(v + 40.0) / 10.0), 4.0 * np.exp(-(v + 65.0) / 18.0),
            0.07 * np.exp(-(v + 65.0) / 20.0), 1.0 / (1.0 + np.exp(-(v + 35.0) / 10.0)),
            0.1 / exprel(-(v + 55.0) / 10.0), 0.125 * np.exp(-(v + 65.0) / 80.0))


def active_reference():
    tree = Tree()
    tree.cable("axon", None, 3.0, 476e-4, 0.0354, 30)
    n = len(tree.area)
    axial = tree.axial_matrix()
    stimulus = np.zeros(n)
    stimulus[0] = 20.0 / tree.area[0]  # 20000 nA = 20 uA into the first piece

    def rhs(t, y, middle):
        v, m, h, k = y[:n], y[n:2 * n], y[2 * n:3 * n], y[3 * n:]
        am, bm, ah, bh, an, bn = (PHI * r for r in rates(v))
        ionic = 120 * m ** 3 * h * (v - 50) + 36 * k ** 4 * (v + 77) + 0.3 * (v + 54.387)
        dv = axial @ v - ionic + (stimulus if 0.5 < middle < 0.7 else 0)
        return np.concatenate([dv, am * (1 - m) - bm * m, ah * (1 - h) - bh * h, an * (1 - k) - bn * k])

    pattern = lil_matrix((4 * n, 4 * n))
    for p, c, _ in tree.joins:
        pattern[p, c] = pattern[c, p] = 1
    for i in range(n):
        for s in range(4):
            pattern[i, s * n + i] = pattern[s * n + i, i] = pattern[s * n + i, s * n + i] = 1
    v0 = np.full(n, -65.0)
    am, bm, ah, bh, an, bn = rates(v0)  # steady gates (the factor phi cancels)
    y0 = np.concatenate([v0, am / (am + bm), ah / (ah + bh), an / (an + bn)])
    grid = np.round(np.arange(0, 601) * 0.01, 10)
    t, y = piecewise(rhs, y0, [0.0, 0.5, 0.7, 6.0], grid, sparsity=pattern.tocsr())
    if t is None:
        return None
    return y[[int(0.25 * 30), int(0.75 * 30)]].T


def spike_times(t, v):
    i = np.nonzero((v[:-1] < 0) & (v[1:] >= 0))[0]
    return t[i] + -v[i] * (t[i + 1] - t[i]) / (v[i + 1] - v[i])


def main():
    saltpan = sys.argv[1]
    with tempfile.TemporaryDirectory() as directory:
        reference = passive_reference()
        runs = [run_saltpan(saltpan, PASSIVE, step, directory, "passive") for step in (25, 12.5)]
        if reference is not None and all(r[1] is not None for r in runs):
            header = runs[0][0]
            if header != ["time (ms)", "soma.V (mV)", "dend[45].V (mV)", "dend[25].V (mV)", "branch[9].V (mV)"]:
                fail(f"passive tree: the recorded pieces are not those this script models: {header}")
            else:
                compare("passive branched tree (invented numbers; compartments as Rall 1964, from memory), 50 ms, 61 compartments", reference, runs[0][1][:, 1:],
                        runs[1][1][:, 1:])
        reference = active_reference()
        runs = [run_saltpan(saltpan, ACTIVE, step, directory, "active") for step in (10, 5)]
        if reference is not None and all(r[1] is not None for r in runs):
            header = runs[0][0]
            if header != ["time (ms)", "axon[7].V (mV)", "axon[22].V (mV)"]:
                fail(f"HH cable: the recorded pieces are not those this script models: {header}")
                return
            t = runs[0][1][:, 0]
            near, far = (spike_times(t, reference[:, k]) for k in (0, 1))
            if len(near) != 1 or len(far) != 1:
                fail(f"HH cable: SciPy does not propagate one spike: {near}, {far} ms")
                return
            velocity = 1.5 / (far[0] - near[0]) * 10  # cm/ms to m/s
            ok(f"SciPy: one spike at {near[0]:.4f} ms (7.5 mm) and {far[0]:.4f} ms (22.5 mm), "
               f"{velocity:.2f} m/s on 1 mm pieces")
            compare("HH 1952 cable (Hodgkin & Huxley 1952) at 18.5 degC, 6 ms, 30 pieces", reference, runs[0][1][:, 1:], runs[1][1][:, 1:])
            arrivals = []
            for label, run in (("dt", runs[0][1]), ("dt/2", runs[1][1])):
                got = [spike_times(t, run[:, k]) for k in (1, 2)]
                if any(len(g) != 1 for g in got):
                    fail(f"HH cable at {label}: saltpan does not propagate one spike: {got}")
                    return
                arrivals.append(np.array([got[0][0], got[1][0]]))
            shift = [np.max(np.abs(a - [near[0], far[0]])) for a in arrivals]
            estimate = 4.0 / 3.0 * np.max(np.abs(arrivals[0] - arrivals[1]))
            print(f"HH cable spike times: within {shift[0]:.3g} ms of SciPy's at dt, {shift[1]:.3g} ms at dt/2; "
                  f"step-error estimate {estimate:.3g} ms")
            if shift[0] > 2 * estimate + 1e-5 or shift[0] < 3 * shift[1]:
                fail(f"HH cable: spike times {shift[0]:.3g} ms from SciPy's at dt and {shift[1]:.3g} ms at dt/2, "
                     f"not within twice the step error ({estimate:.3g} ms) and shrinking as second order")
            else:
                ok("HH cable (Hodgkin & Huxley 1952): the spike reaches both places at SciPy's times within "
                   "twice saltpan's step error, which shrinks at half the step")
    if failures:
        print(f"{len(failures)} check(s) failed")
        sys.exit(1)
    print("all cable checks passed")


if __name__ == "__main__":
    main()
