"""Fit data conditions follow the case-file rule for units: a bare JSON number
is SI, text must name its unit ("2900" is refused, never 2900 rad/s).

Invented data: the curve head = 21 m - 9e6 m/(m3/s)^2 * Q^2 at 2900 rpm. The
condition given as the number 303.687... rad/s (2900 rpm, since
1 rpm = 2 pi/60 rad/s exactly, NIST SP 811 B.8 revolution) and as the text
"2900 rpm" gives the same fitted coefficients; "2900" alone is an error naming
the condition and the expected units (exit 2).
Prints "N passed, M failed" and exits non-zero on any failure.
"""

import json
import math
import os
import subprocess
import sys
import tempfile

BIN = os.environ.get("LOOPWRIGHT_BIN", "loopwright")
sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tools"))
from tally import check, finish  # noqa: E402

ROWS = [[q, 21.0 - 9e6 * (q / 60000.0) ** 2] for q in (0.0, 20.0, 40.0, 60.0)]


def fit(tmp, speed):
    path = os.path.join(tmp, "curve.json")
    with open(path, "w", encoding="utf-8") as f:
        json.dump({"columns": ["flow [L/min]", "head [m]"], "conditions": {"speed": speed}, "rows": ROWS}, f)
    out = os.path.join(tmp, "fit.json")
    if os.path.exists(out):
        os.remove(out)
    r = subprocess.run([BIN, "fit", path, "--model", "centrifugal_pump", "--json", out, "-q"],
                       capture_output=True, text=True, timeout=60)
    doc = json.load(open(out, encoding="utf-8")) if os.path.exists(out) else None
    return r.returncode, r.stderr, doc


with tempfile.TemporaryDirectory() as tmp:
    code_n, err_n, doc_n = fit(tmp, 2900 * 2 * math.pi / 60)
    check(code_n == 0, "a bare number condition is SI (rad/s)", err_n[-300:])
    code_t, err_t, doc_t = fit(tmp, "2900 rpm")
    check(code_t == 0, "a condition with its unit", err_t[-300:])
    check(doc_n is not None and doc_t is not None and doc_n.get("parameters") == doc_t.get("parameters"),
          "the number in rad/s and the text in rpm fit the same model",
          f"{doc_n and doc_n.get('parameters')} vs {doc_t and doc_t.get('parameters')}")
    # The fitted part's rated speed is the condition: 2900 rpm both ways.
    for label, doc in (("number", doc_n), ("text", doc_t)):
        rated = doc and doc.get("part", {}).get("params", {}).get("rated_speed", "")
        check(isinstance(rated, str) and rated.endswith(" rpm") and abs(float(rated.split()[0]) - 2900) < 1e-6,
              f"the {label} condition gives a part rated at 2900 rpm", str(rated))
    code_b, err_b, _ = fit(tmp, "2900")
    check(code_b == 2, "text without a unit is refused (exit 2)", f"exit {code_b}")
    check('missing unit in "2900"' in err_b and "rpm" in err_b and "speed" in err_b,
          "the error names the condition and the expected units", err_b[-400:])

finish()
