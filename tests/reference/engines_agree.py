#!/usr/bin/env python3
"""The native (JIT) engine and the reference interpreter give the same numbers.

usage: engines_agree.py SALTPAN SOURCE_DIR

Every protocol of every shipped spec (specs/**/*.saltpan), plus temporary copies of
specs/reference/squid_axon_1952.saltpan whose protocol uses rk4 and dormand_prince and records gates
and currents, is run with `--engine interpreter` and `--engine jit`, written as JSON (full
precision). When the JIT is there, each recorded quantity must agree to 1e-12 relative, measured
as max |a - b| over the samples divided by max |a| (V crosses 0 mV, so not sample by sample), or to
1e-12 absolute in the column's unit (for quantities that stay at or near zero). When this build has no JIT (saltpan says so), `--engine jit`
falls back to the interpreter and the numbers must be identical.
Exit status 0 when every check passes; otherwise 1, with one line per failure.
"""

import glob
import json
import os
import re
import subprocess
import sys
import tempfile

RELATIVE = 1e-12
ABSOLUTE = 1e-12  # in the column's unit (mV, uA/cm2, or dimensionless)
NO_JIT_NOTE = "has no JIT"

# Temporary variants: the other methods (exponential Euler may run a fused kernel; these run the
# plain one) and more recorded quantities.
VARIANT = """protocol {name} {{
  method {method}
  duration 30 ms
  inject axon ramp 0 uA/cm2 to 12 uA/cm2 from 0 ms to 20 ms
  inject axon pulses 20 uA/cm2 width 0.5 ms every 5 ms from 20 ms to 30 ms
  record axon.V, axon.SquidSodium1952.m, axon.SquidSodium1952.h, axon.SquidPotassium1952.n, axon.SquidSodium1952.current, axon.membrane_current, axon.injected every 0.05 ms
}}
"""
VARIANT_METHODS = {"variant_ee": "exponential_euler step 10 us", "variant_rk4": "rk4 step 10 us",
                   "variant_dp": "dormand_prince step 10 us tolerance 1e-10"}

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "lib"))
from report import fail, failures, ok  # noqa: E402  (the shared pass and failure lines)


def protocols(path):
    with open(path) as f:
        text = "\n".join(line.split("#")[0] for line in f.read().splitlines())
    return re.findall(r"^\s*protocol\s+([A-Za-z_][A-Za-z0-9_]*)\s*\{", text, re.M)


def run(saltpan, spec, protocol, engine, out):
    cmd = [saltpan, "run", spec, "--protocol", protocol, "--engine", engine, "-o", out]
    r = subprocess.run(cmd, capture_output=True, text=True)
    if r.returncode != 0:
        fail(f"'{' '.join(cmd)}' exited with {r.returncode}: {r.stderr.strip()}")
        return None, r.stderr
    with open(out) as f:
        return json.load(f), r.stderr


def compare(label, a, b, exact):
    if a["time_ms"] != b["time_ms"]:
        fail(f"{label}: the engines recorded at different times ({len(a['time_ms'])} vs {len(b['time_ms'])} samples)")
        return
    names_a = [c["name"] for c in a["columns"]]
    names_b = [c["name"] for c in b["columns"]]
    if names_a != names_b:
        fail(f"{label}: different columns {names_a} vs {names_b}")
        return
    worst = []
    for ca, cb in zip(a["columns"], b["columns"]):
        va, vb = ca["values"], cb["values"]
        if len(va) != len(vb):
            fail(f"{label}: {ca['name']} has {len(va)} vs {len(vb)} samples")
            continue
        if exact:
            bad = [i for i, (x, y) in enumerate(zip(va, vb)) if x != y]
            if bad:
                i = bad[0]
                fail(f"{label}: {ca['name']} differs although both runs used the interpreter "
                     f"({len(bad)} samples; first at {a['time_ms'][i]} ms: {va[i]!r} vs {vb[i]!r})")
            continue
        diff = max(abs(x - y) for x, y in zip(va, vb))
        scale = max(max(abs(x) for x in va), 1e-300)
        worst.append(f"{ca['name']} {diff / scale:.2g}")
        if diff > RELATIVE * scale and diff > ABSOLUTE:
            i = max(range(len(va)), key=lambda k: abs(va[k] - vb[k]))
            first = next(k for k in range(len(va)) if va[k] != vb[k])
            fail(f"{label}: {ca['name']} ({ca['unit']}) differs between interpreter and JIT by {diff:.3g} "
                 f"{ca['unit']} = {diff / scale:.3g} of its largest magnitude {scale:.4g} (allowed {RELATIVE:g}, or "
                 f"{ABSOLUTE:g} absolute); worst at {a['time_ms'][i]:.6g} ms: {va[i]!r} vs {vb[i]!r}; first "
                 f"difference at {a['time_ms'][first]:.6g} ms: {va[first]!r} vs {vb[first]!r}")
    if any(f.startswith(label + ":") for f in failures):
        return
    if exact:
        ok(f"{label}: identical (no JIT in this build; both runs used the interpreter)")
    else:
        ok(f"{label}: interpreter and JIT agree; max |difference| / max |value|: {', '.join(worst)}")


def main():
    if len(sys.argv) != 3:
        print(__doc__)
        return 2
    saltpan, source_dir = os.path.abspath(sys.argv[1]), os.path.abspath(sys.argv[2])
    if not (os.path.isfile(saltpan) and os.access(saltpan, os.X_OK)):
        print(f"FAIL: {saltpan} is not an executable saltpan")
        return 1
    specs = sorted(glob.glob(os.path.join(source_dir, "specs", "**", "*.saltpan"), recursive=True))
    with tempfile.TemporaryDirectory(prefix="saltpan-engines-") as directory:
        base = os.path.join(source_dir, "specs", "reference", "squid_axon_1952.saltpan")
        with open(base) as f:
            text = f.read()
        model = text[:text.index("\nprotocol ")] + "\n\n"
        variant = os.path.join(directory, "squid_axon_1952_variants.saltpan")
        with open(variant, "w") as f:
            f.write(model + "".join(VARIANT.format(name=n, method=m) for n, m in VARIANT_METHODS.items()))
        runs = [(s, p) for s in specs for p in protocols(s)] + [(variant, p) for p in VARIANT_METHODS]
        if not any(s != variant for s, _ in runs):
            fail(f"no shipped spec with a protocol under {os.path.join(source_dir, 'specs')}")
        jit_present = None
        for i, (spec, protocol) in enumerate(runs):
            label = f"{os.path.relpath(spec, source_dir) if spec != variant else 'temporary variant'} --protocol {protocol}"
            a, _ = run(saltpan, spec, protocol, "interpreter", os.path.join(directory, f"{i}_interpreter.json"))
            b, note = run(saltpan, spec, protocol, "jit", os.path.join(directory, f"{i}_jit.json"))
            if a is None or b is None:
                continue
            fallback = NO_JIT_NOTE in note
            if jit_present is None:
                jit_present = not fallback
                print("this build " + ("has a JIT" if jit_present else "has no JIT: --engine jit uses the interpreter"))
            elif jit_present == fallback:
                fail(f"{label}: the JIT is there for some runs and not for others")
            compare(label, a, b, exact=fallback)

    if failures:
        print(f"{len(failures)} check(s) failed")
        return 1
    print("all engine checks passed")
    return 0


if __name__ == "__main__":
    sys.exit(main())
