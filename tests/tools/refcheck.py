"""Shared helpers of the Python reference checks (run by /usr/bin/python3).

probe(cmd, ...)  runs the built lw_probe (env LOOPWRIGHT_PROBE) and parses its JSON.
check(name, pairs, tol)  records one comparison of our values with a reference:
    pairs = [(ours, reference, label), ...]; fails on any relative error above
    tol, on NaN, and on an empty list.
RESULTS  the pass/fail record; summary() prints "N passed, M failed" and
    returns the exit code.
"""
import json
import math
import os
import subprocess

PROBE = os.environ.get("LOOPWRIGHT_PROBE")
RESULTS = []


def probe(*args):
    out = subprocess.run([PROBE, *[str(a) for a in args]], capture_output=True, text=True, timeout=120)
    if out.returncode != 0:
        raise RuntimeError(f"lw_probe {args[0]} failed: {out.stderr.strip()}")
    return json.loads(out.stdout)


def csv(values):
    return ",".join(repr(float(v)) for v in values)


def rel(a, b):
    return abs(a - b) / max(abs(b), 1e-300)


def check(name, pairs, tol):
    worst, worst_label = 0.0, None
    for ours, ref, label in pairs:
        e = rel(ours, ref) if (ours is not None and math.isfinite(ref)) else math.inf
        if not (e <= worst):  # also catches NaN
            worst, worst_label = e, label
    ok = worst <= tol and len(pairs) > 0
    RESULTS.append(ok)
    where = f" at {worst_label}" if worst_label is not None else ""
    print(f"{'PASS' if ok else 'FAIL'} {name}: {len(pairs)} points, worst rel err "
          f"{worst:.3e}{where} (tol {tol:g})")
    return ok
