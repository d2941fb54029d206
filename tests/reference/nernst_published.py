#!/usr/bin/env python3
"""Nernst potentials reported by `saltpan show` against published tables and exact constants.

usage: nernst_published.py SALTPAN SOURCE_DIR

Checks, in order:
  1. the muscle and squid reference specs against the published textbook tables (the tolerance
     follows from the tables' rounding, see TABLE_TOLERANCE_MV);
  2. every compartment and ion of every shipped spec (specs/**/*.saltpan) against an independent
     computation from the exact CODATA 2018 constants, to 1e-6 mV;
  3. RT/F at 6.3, 20 and 37 degC: Python, the computed values in docs/references.md, GNU units and
     saltpan itself, to 1e-6 relative;
  4. invariants on small temporary specs: z*E is unchanged when the valence flips sign, swapping
     the sides flips the sign of E, E/T is constant, equal concentrations give E = 0.
Exit status 0 when everything agrees; otherwise 1, with one line per failure.
"""

import glob
import json
import math
import os
import shutil
import subprocess
import sys
import tempfile

# Exact since the 2019 SI (CODATA 2018 = CODATA 2022 for these; docs/references.md, "seen").
E_CHARGE = 1.602176634e-19  # C
N_A = 6.02214076e23  # 1/mol
K_B = 1.380649e-23  # J/K
R = 8.31446261815324  # J/(mol K) = k_B N_A
F = 96485.33212331001  # C/mol = e N_A
ZERO_CELSIUS = 273.15  # K

# Published tables round E to whole millivolts (+-0.5 mV) and list concentrations to two or three
# figures; textbooks also use 58/61 mV per decade. A difference up to 1 mV is rounding, not error.
TABLE_TOLERANCE_MV = 1.0
EXACT_TOLERANCE_MV = 1e-6
RELATIVE_TOLERANCE = 1e-6

# Hille, Ion Channels of Excitable Membranes, 3rd ed. (2001), Table 1.1, mammalian skeletal
# muscle, 37 degC (from memory: numbers fairly sure, table number less so; docs/references.md).
HILLE_2001_MUSCLE = {
    # ion: (out mM, in mM, listed E mV)
    "Na": (145.0, 12.0, +67.0),  # Hille 2001, Table 1.1 (from memory)
    "K": (4.0, 155.0, -98.0),  # Hille 2001, Table 1.1 (from memory)
    "Ca": (1.5, 0.0001, +129.0),  # Hille 2001, Table 1.1 (from memory)
    "Cl": (123.0, 4.2, -90.0),  # Hille 2001, Table 1.1 (from memory)
}
HILLE_2001_CELSIUS = 37.0  # Hille 2001, Table 1.1 is for 37 degC (from memory)

# Kandel et al., Principles of Neural Science, 5th ed., Table 6-1, squid giant axon
# (concentrations seen secondhand; listed E from memory; docs/references.md), room temperature.
KANDEL_5_SQUID = {
    "K": (20.0, 400.0, -75.0),  # Kandel 5th ed., Table 6-1 (E from memory)
    "Na": (440.0, 50.0, +55.0),  # Kandel 5th ed., Table 6-1 (E from memory)
    "Cl": (560.0, 52.0, -60.0),  # Kandel 5th ed., Table 6-1 (E from memory)
}
KANDEL_5_CELSIUS = 20.0  # the table is for room temperature, ~20 degC (docs/references.md)

# RT/F in mV (computed with the exact constants; docs/references.md).
RT_OVER_F_COMPUTED_MV = {6.3: 24.081138, 20.0: 25.261712, 37.0: 26.726659}

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "lib"))
from report import fail, failures, ok  # noqa: E402  (the shared pass and failure lines)


def show(saltpan, path):
    result = subprocess.run([saltpan, "show", path, "--format", "json"], capture_output=True, text=True)
    if result.returncode != 0:
        fail(f"'saltpan show {path} --format json' exited with {result.returncode}: {result.stderr.strip()}")
        return None
    try:
        return json.loads(result.stdout)
    except json.JSONDecodeError as e:
        fail(f"'saltpan show {path} --format json' printed invalid JSON ({e})")
        return None


def rt_over_f_mV(kelvin):
    return R * kelvin / F * 1e3


def nernst_mV(z, outside, inside, kelvin):
    return rt_over_f_mV(kelvin) / z * math.log(outside / inside)


def ions_of(doc, compartment=None):
    """{ion name: ion entry} of the named (or first) compartment."""
    for c in doc["compartments"]:
        if compartment is None or c["name"] == compartment:
            return {i["ion"]: i for i in c["ions"]}
    return {}


def check_table(saltpan, path, table, celsius, source):
    doc = show(saltpan, path)
    if doc is None:
        return
    rel = os.path.relpath(path)
    if abs(doc["temperature_K"] - (celsius + ZERO_CELSIUS)) > 1e-9:
        fail(f"{rel}: temperature {doc['temperature_K']} K, but {source} is for {celsius} degC")
    ions = ions_of(doc)
    for name, (out, inside, listed) in table.items():
        ion = ions.get(name)
        if ion is None:
            fail(f"{rel}: no ion {name} in the first compartment ({source})")
            continue
        if ion["outside_mM"] != out or ion["inside_mM"] != inside:
            fail(f"{rel}: {name} is {ion['outside_mM']}/{ion['inside_mM']} mM out/in, {source} says {out}/{inside}")
        e = ion["reversal_mV"]
        if e is None or abs(e - listed) > TABLE_TOLERANCE_MV:
            fail(f"{rel}: E_{name} = {e} mV, {source} lists {listed:+.0f} mV (tolerance {TABLE_TOLERANCE_MV} mV)")
        else:
            ok(f"{rel}: E_{name} = {e:+.3f} mV vs {listed:+.0f} mV listed in {source} (diff {e - listed:+.3f} mV)")


def check_exact_everywhere(saltpan, source_dir):
    specs = sorted(glob.glob(os.path.join(source_dir, "specs", "**", "*.saltpan"), recursive=True))
    if len(specs) < 2:
        fail(f"found only {len(specs)} shipped specs under {source_dir}/specs")
    checked = 0
    for path in specs:
        doc = show(saltpan, path)
        if doc is None:
            continue
        rel = os.path.relpath(path, source_dir)
        if doc["constants"]["R_J_per_mol_K"] != R or doc["constants"]["F_C_per_mol"] != F:
            fail(f"{rel}: saltpan reports R = {doc['constants']['R_J_per_mol_K']}, F = {doc['constants']['F_C_per_mol']}, "
                 f"not the exact CODATA 2018 values {R}, {F}")
        kelvin = doc["temperature_K"]
        if kelvin is None:
            fail(f"{rel}: no temperature")
            continue
        if abs(kelvin - (doc["temperature_degC"] + ZERO_CELSIUS)) > 1e-9:
            fail(f"{rel}: temperature_K {kelvin} != temperature_degC {doc['temperature_degC']} + 273.15")
        for c in doc["compartments"]:
            reversals = []
            for ion in c["ions"]:
                where = f"{rel}: compartment {c['name']}, ion {ion['ion']}"
                z, out, inside, e = ion["charge"], ion["outside_mM"], ion["inside_mM"], ion["reversal_mV"]
                if z is None or out is None or inside is None:
                    if e is not None:
                        fail(f"{where}: reversal {e} mV reported without both concentrations and a charge")
                    continue
                expected = nernst_mV(z, out, inside, kelvin)
                if e is None or abs(e - expected) > EXACT_TOLERANCE_MV:
                    fail(f"{where}: E = {e} mV, the exact constants give {expected!r} mV")
                else:
                    checked += 1
                reversals.append(expected)
            # A single-ion channel with a Nernst reversal must sit exactly at one ion's reversal.
            for m in c["membrane"]:
                if m.get("reversal_from") == "nernst":
                    e = m["reversal_mV"]
                    if e is None or not any(abs(e - r) <= EXACT_TOLERANCE_MV for r in reversals):
                        fail(f"{rel}: compartment {c['name']}, {m['entry']}: Nernst reversal {e} mV "
                             f"matches none of the ions' reversals")
    ok(f"{checked} ion reversals in {len(specs)} shipped specs match the exact-constant Nernst equation "
       f"to {EXACT_TOLERANCE_MV} mV")


def units_rt_over_f_mV(celsius):
    """RT/F from GNU units, which carries its own table of the exact 2019 SI constants."""
    kelvin = celsius + ZERO_CELSIUS
    expr = f"R*{kelvin!r}K/(N_A e)"
    result = subprocess.run(["units", "-d", "15", "-t", expr, "mV"], capture_output=True, text=True)
    if result.returncode != 0:
        raise RuntimeError(f"units -d 15 -t '{expr}' mV failed: {result.stdout.strip()} {result.stderr.strip()}")
    return float(result.stdout.strip())


def write_spec(directory, name, text):
    path = os.path.join(directory, name)
    with open(path, "w") as f:
        f.write(text)
    return path


def probe_spec(celsius, ions, outside, inside):
    """A one-compartment spec declaring `ions` {name: valence} with the given concentrations."""
    lines = ["# temporary spec written by tests/reference/nernst_published.py", f"temperature {celsius!r} degC"]
    for name, z in ions.items():
        lines.append(f"ion {name} valence {'+' if z > 0 else '-'}{abs(z)}")
    lines.append("outside bath {")
    lines += [f"  [{n}] = {outside[n]!r} mM" for n in ions]
    lines.append("}")
    lines += ["compartment cell {", "  area 1 cm2", "  capacitance 1 uF/cm2", "  outside bath", "  inside {"]
    lines += [f"    [{n}] = {inside[n]!r} mM" for n in ions]
    lines += ["  }", "  membrane {"]
    lines += [f"    Probe{n} 1 mS/cm2" for n in ions]
    lines += ["  }", "}"]
    lines += [f"channel Probe{n} {{ carries {n} }}" for n in ions]
    return "\n".join(lines) + "\n"


def check_rt_over_f(saltpan, directory):
    if shutil.which("units") is None:
        fail("GNU units is not installed (needed for the independent RT/F cross-check)")
        return
    for celsius, listed in RT_OVER_F_COMPUTED_MV.items():
        ours = rt_over_f_mV(celsius + ZERO_CELSIUS)
        try:
            theirs = units_rt_over_f_mV(celsius)
        except (RuntimeError, ValueError) as e:
            fail(str(e))
            continue
        # saltpan's own RT/F: the Nernst potential of a monovalent ion with out/in = e.
        path = write_spec(directory, f"rtf_{celsius}.saltpan",
                          probe_spec(celsius, {"Xp": 1}, {"Xp": 10 * math.e}, {"Xp": 10.0}))
        doc = show(saltpan, path)
        mine = ions_of(doc)["Xp"]["reversal_mV"] if doc else None
        for label, value, tol in (("GNU units", theirs, RELATIVE_TOLERANCE),
                                  ("docs/references.md (computed, 8 figures)", listed, 5e-7 / listed + 1e-12),
                                  ("saltpan", mine, RELATIVE_TOLERANCE)):
            if value is None or abs(value - ours) > tol * ours:
                fail(f"RT/F at {celsius} degC: {label} gives {value} mV, exact constants give {ours!r} mV")
        ok(f"RT/F at {celsius} degC = {ours:.9f} mV (GNU units {theirs!r}, saltpan {mine!r})")


def check_invariants(saltpan, directory):
    tol = EXACT_TOLERANCE_MV
    # z*E is the same for valences +1, -1, +2, -2 at the same concentrations.
    ions = {"Xa": 1, "Xb": -1, "Xc": 2, "Xd": -2}
    out = {n: 150.0 for n in ions}
    inside = {n: 7.5 for n in ions}
    doc = show(saltpan, write_spec(directory, "valence.saltpan", probe_spec(37.0, ions, out, inside)))
    if doc:
        got = ions_of(doc)
        ze = {n: ions[n] * got[n]["reversal_mV"] for n in ions}
        if max(ze.values()) - min(ze.values()) > tol:
            fail(f"z*E differs between valences: {ze}")
        else:
            ok(f"z*E = {ze['Xa']:.9f} mV for valences +1, -1, +2, -2")
        # Swapping the sides flips the sign.
        swapped = show(saltpan, write_spec(directory, "swapped.saltpan", probe_spec(37.0, ions, inside, out)))
        if swapped:
            back = ions_of(swapped)
            for n in ions:
                if abs(got[n]["reversal_mV"] + back[n]["reversal_mV"]) > tol:
                    fail(f"swapping sides of {n}: E = {got[n]['reversal_mV']} and {back[n]['reversal_mV']} mV")
            ok("swapping inside and outside flips the sign of E")
    # E/T is constant.
    ratios = []
    for celsius in (0.0, 6.3, 20.0, 37.0, 45.0):
        d = show(saltpan, write_spec(directory, f"temp_{celsius}.saltpan",
                                   probe_spec(celsius, {"Xa": 1}, {"Xa": 140.0}, {"Xa": 5.0})))
        if d:
            ratios.append(ions_of(d)["Xa"]["reversal_mV"] / d["temperature_K"])
    if ratios and max(ratios) - min(ratios) > RELATIVE_TOLERANCE * abs(ratios[0]):
        fail(f"E/T is not constant across temperatures: {ratios}")
    elif ratios:
        ok(f"E/T = {ratios[0]:.12f} mV/K at 0, 6.3, 20, 37, 45 degC")
    # Equal concentrations give E = 0.
    d = show(saltpan, write_spec(directory, "equal.saltpan", probe_spec(37.0, ions, out, out)))
    if d:
        for n, ion in ions_of(d).items():
            if ion["reversal_mV"] is None or abs(ion["reversal_mV"]) > 1e-12:
                fail(f"equal concentrations of {n} give E = {ion['reversal_mV']} mV, not 0")
        ok("equal concentrations give E = 0 for every valence")


def main():
    if len(sys.argv) != 3:
        print(__doc__)
        return 2
    saltpan, source_dir = os.path.abspath(sys.argv[1]), os.path.abspath(sys.argv[2])
    if not (os.path.isfile(saltpan) and os.access(saltpan, os.X_OK)):
        print(f"FAIL: {saltpan} is not an executable saltpan")
        return 1
    reference = os.path.join(source_dir, "specs", "reference")
    check_table(saltpan, os.path.join(reference, "mammalian_skeletal_muscle.saltpan"), HILLE_2001_MUSCLE,
                HILLE_2001_CELSIUS, "Hille 2001 Table 1.1 (from memory)")
    check_table(saltpan, os.path.join(reference, "squid_axon_ions.saltpan"), KANDEL_5_SQUID, KANDEL_5_CELSIUS,
                "Kandel 5th ed. Table 6-1 (E from memory)")
    check_exact_everywhere(saltpan, source_dir)
    with tempfile.TemporaryDirectory(prefix="saltpan-nernst-") as directory:
        check_rt_over_f(saltpan, directory)
        check_invariants(saltpan, directory)
    if failures:
        print(f"{len(failures)} check(s) failed")
        return 1
    print("all Nernst checks passed")
    return 0


if __name__ == "__main__":
    sys.exit(main())
