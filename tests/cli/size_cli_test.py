"""Drives `loopwright size CASE [--json F]` (LOOPWRIGHT_BIN).

Checks: exit 0 when every design question is answered feasibly, 1 when one is
infeasible, 2 for a case without design questions; the --json answers
(value, SI unit, binding check and point, how the value was settled) and the
printed lines. The worked-example case rebuilds Incropera et al.,
Fundamentals of Heat and Mass Transfer, 6th ed., Example 11.1 (from memory):
UA = q / dT_lm = 8524 W / 43.2 K = 197.3 W/K, to the printed digits (0.3 %).
Prints "N passed, M failed" and exits non-zero on any failure.
"""

import json
import os
import subprocess
import sys
import tempfile

BIN = os.environ.get("LOOPWRIGHT_BIN", "loopwright")
SRC = os.environ.get("LOOPWRIGHT_SOURCE_DIR", os.path.join(os.path.dirname(__file__), "..", ".."))

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tools"))
from tally import check, finish  # noqa: E402


def size(case, out_json):
    r = subprocess.run([BIN, "size", case, "--json", out_json], capture_output=True, text=True, timeout=300)
    j = None
    if os.path.exists(out_json):
        with open(out_json, encoding="utf-8") as f:
            j = json.load(f)
    return r.returncode, j, r.stdout, r.stderr


with tempfile.TemporaryDirectory() as tmp:
    # 1. The worked example: feasible, the textbook's UA, settled by a Ceres root.
    code, j, out, err = size(os.path.join(SRC, "tests", "network", "sizing_cases", "oil_cooler_worked_example.json"),
                             os.path.join(tmp, "ex.json"))
    check(code == 0, "worked example: exit 0", err)
    a = (j or {}).get("answers", [{}])[0]
    check(a.get("question") == "oil_cooler_ua" and a.get("feasible") is True, "worked example: answered", str(a))
    check(abs(a.get("value", 0) / (8524.0 / 43.2) - 1) < 3e-3, "worked example: UA = q / dT_lm (Incropera Ex. 11.1)",
          str(a.get("value")))
    check(a.get("unit") == "W_K", "worked example: SI unit of a conductance", str(a.get("unit")))
    check(a.get("binding_check") == "feed_temperature_max" and a.get("point") == "rated_duty",
          "worked example: binding check and point", str(a))
    check(str(a.get("method", "")).startswith("Ceres root of feed_temperature_max"), "worked example: method",
          str(a.get("method")))
    check("settled by: Ceres root" in out and "oil_cooler_ua (cooler_conductance)" in out,
          "worked example: printed answer", out)
    check("cautions" in (j or {}), "worked example: the JSON carries the cautions")
    check(isinstance(a.get("warnings"), list), "worked example: the answer lists its warnings", str(a))

    # 1b. Answers whose envelope runs models outside their range say so.
    code, j, out, err = size(os.path.join(SRC, "cases", "apu_test_cell.json"), os.path.join(tmp, "apu.json"))
    check(code == 0, "APU demo: every question answered", f"{code} {err}")
    answers = (j or {}).get("answers", [])
    check(len(answers) == 4 and all(x.get("feasible") for x in answers), "APU demo: four feasible answers", str(answers))
    check(any(w for x in answers for w in x.get("warnings", [])) and "warning with this answer" in out,
          "APU demo: model-range warnings carried with the answers", out)

    # 2. A case whose questions cannot all be met: exit 1, each infeasible
    #    answer names the check that makes it so.
    code, j, out, err = size(os.path.join(SRC, "cases", "gearbox_lube_skid.json"), os.path.join(tmp, "gb.json"))
    check(code == 1, "gearbox demo: exit 1 (it fails its cold start by design)", f"{code} {err}")
    for a in (j or {}).get("answers", []):
        if not a.get("feasible"):
            check(bool(a.get("binding_check")) and "INFEASIBLE" in out, f"gearbox {a.get('question')}: the binding check",
                  str(a))

    # 3. No design questions: exit 2 naming /design.
    code, j, out, err = size(os.path.join(SRC, "tests", "network", "check_cases", "check_pass.json"),
                             os.path.join(tmp, "none.json"))
    check(code == 2 and "/design" in err and j is None, "no questions: exit 2 naming /design, no output", err)

finish()
