"""Shared helpers of the Python reference checks (run by /usr/bin/python3).

probe(cmd, ...)  runs the built lw_probe (env LOOPWRIGHT_PROBE) and parses its JSON.
check(name, pairs, tol)  records one comparison of our values with a reference:
    pairs = [(ours, reference, label), ...]; fails on any relative error above
    tol, on NaN, and on an empty list.
RESULTS  the pass/fail record; summary() prints "N passed, M failed" and
    returns the exit code.
probe_missing()  True, after printing one failure, when LOOPWRIGHT_PROBE is not
    the lw_probe binary.
strip_comments(text), load_case(path)  a case file's text without its // and
    /* */ comments, and the case parsed from it (for generic JSON tools).
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


def probe_missing():
    if PROBE and os.path.exists(PROBE):
        return False
    print("LOOPWRIGHT_PROBE is not set to the lw_probe binary")
    print("0 passed, 1 failed")
    return True


def summary():
    passed = sum(RESULTS)
    failed = len(RESULTS) - passed
    print(f"{passed} passed, {failed} failed")
    return 0 if failed == 0 else 1


def strip_comments(text):
    """Removes // line and /* block */ comments outside JSON strings."""
    out = []
    i, n = 0, len(text)
    in_string = False
    while i < n:
        c = text[i]
        if in_string:
            out.append(c)
            if c == "\\" and i + 1 < n:
                out.append(text[i + 1])
                i += 2
                continue
            if c == '"':
                in_string = False
            i += 1
        elif c == '"':
            in_string = True
            out.append(c)
            i += 1
        elif text.startswith("//", i):
            j = text.find("\n", i)
            i = n if j < 0 else j  # keep the newline
        elif text.startswith("/*", i):
            j = text.find("*/", i + 2)
            i = n if j < 0 else j + 2
            out.append(" ")
        else:
            out.append(c)
            i += 1
    return "".join(out)


def load_case(path):
    with open(path, encoding="utf-8") as f:
        return json.loads(strip_comments(f.read()))
