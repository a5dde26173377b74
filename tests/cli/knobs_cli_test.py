"""Drives `loopwright check` (LOOPWRIGHT_BIN) on the invented knob cases of
tests/network/knob_cases/ (all data invented).

Checks: a line fix snapped to the parts library in `--json` (`fixes[].catalog`)
and on the printed fix line, the catalog bore read here from
library/parts/lines.json and the margin of the snapped line against the
velocity computed by hand, Q / (pi D^2 / 4), from the case's imposed flow and
the README's default velocity_pressure_max of 2.5 m/s (common practice); a
line whose diameter the case fixes gets no suggestion, and the note says why;
a misspelt knob name is exit 2 with its JSON Pointer and the nearest name.
Prints "N passed, M failed" and exits non-zero on any failure.
"""

import json
import math
import os
import subprocess
import sys
import tempfile

BIN = os.environ.get("LOOPWRIGHT_BIN", "loopwright")
SRC = os.environ.get("LOOPWRIGHT_SOURCE_DIR", os.path.join(os.path.dirname(__file__), "..", ".."))
CASES = os.path.join(SRC, "tests", "network", "knob_cases")

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tools"))
from tally import check, finish  # noqa: E402

Q = 10e-3 / 60        # the case's imposed 10 L/min [m3/s]
V_LIMIT = 2.5         # velocity_pressure_max default [m/s] (README "Checks", common practice)


def catalog_bores():
    """id -> bore [m] of every line in lines.json ("N mm" or "N in", 1 in = 25.4 mm),
    and of the Schedule 40 pipes as ASME B36.10M prints their inside diameters
    (inches, from memory)."""
    with open(os.path.join(SRC, "library", "parts", "lines.json"), encoding="utf-8") as f:
        lib = json.load(f)
    out = {}
    for p in lib["parts"]:
        value, unit = p["params"]["diameter"].split()
        out[p["id"]] = float(value) * (0.0254 if unit == "in" else 1e-3)
    for nps, bore_in in (("1/8", 0.269), ("1/4", 0.364), ("3/8", 0.493), ("1/2", 0.622)):
        out[f"NPS {nps} Sch 40"] = bore_in * 0.0254
    return out


def run(tmp, case, tag):
    path = os.path.join(tmp, tag + ".json")
    with open(path, "w", encoding="utf-8") as f:
        json.dump(case, f, indent=1)
    jout = os.path.join(tmp, tag + ".out.json")
    r = subprocess.run([BIN, "check", path, "--json", jout], capture_output=True, text=True, timeout=120)
    j = None
    if os.path.exists(jout):
        with open(jout, encoding="utf-8") as f:
            j = json.load(f)
    return r.returncode, j, r.stdout, r.stderr


with open(os.path.join(CASES, "line_snap.json"), encoding="utf-8") as f:
    BASE = json.load(f)
bores = catalog_bores()

with tempfile.TemporaryDirectory() as tmp:
    code, j, out, err = run(tmp, BASE, "snap")
    check(code == 1, "three failing velocity checks: exit 1", err[-400:])
    fixes = {f["where"]: f for f in (j or {}).get("fixes", [])}
    expected = {"oil/tube_line": "tube-16x2", "oil/hose_line": "hose-6", "oil/pipe_line": "NPS 3/8 Sch 40"}
    for where, part in expected.items():
        f = fixes.get(where, {})
        cat = f.get("catalog") or {}
        check(cat.get("part") == part, f"{where}: snapped to {part}", str(cat))
        bore = bores.get(part, float("nan"))
        tol = 2e-4 if part.startswith("NPS") else 1e-12  # the standard prints 0.001 in
        check(math.isclose(cat.get("bore_m") or 0, bore, rel_tol=tol), f"{where}: bore of {part} from the catalog",
              f"{cat.get('bore_m')} vs {bore}")
        check(cat.get("bore_m", 0) >= f.get("suggested", 1), f"{where}: snapped at or above the suggestion", str(f))
        v = Q / (math.pi * bore ** 2 / 4)
        check(cat.get("envelope_passes_check") is True and cat.get("breaks") == [],
              f"{where}: the catalog size passes the envelope, breaks nothing", str(cat))
        check(math.isclose(cat.get("worst_margin") or 0, V_LIMIT - v, rel_tol=1e-3 if part.startswith("NPS") else 1e-9),
              f"{where}: margin with the catalog size = 2.5 m/s - Q/(pi D^2/4)", f"{cat.get('worst_margin')} vs {V_LIMIT - v}")
    check("catalog: tube-16x2 (bore 12 mm), re-solved: the check passes at every point" in out,
          "the printed fix line shows the catalog size and its re-solve", out[-1500:])

    # The tube's diameter fixed: no suggestion for its velocity, the note says so.
    case = json.loads(json.dumps(BASE))
    case["loops"][0]["components"][1]["fixed"] = ["diameter"]
    code, j, out, err = run(tmp, case, "fixed")
    f = {x["where"]: x for x in (j or {}).get("fixes", [])}.get("oil/tube_line", {})
    check(f.get("found") is False and f.get("knob") == "", "a fixed line diameter is never proposed", str(f))
    held = f.get("skipped_held") or [{}]
    check(held[0].get("knob") == "oil/tube_line.diameter" and
          held[0].get("held") == "fixed at /loops/0/components/1/fixed/0",
          "the held knob is named with its pointer", str(f))
    check("every knob that moves this margin is held" in out, "the printed line says why", out[-1500:])

    # Two of three points have no result (a loop with no cooler): the
    # catalog suction size is confirmed where the points converge, and the
    # fix line says so rather than "the check still fails". Its margin at the
    # cold start: 1.2 m/s (default suction limit) - Q / (pi D^2 / 4) with the
    # hose-10 bore from the catalog and the pump's flow there (a displacement
    # pump: about the same with either suction bore; 0.01 m/s allowed).
    with open(os.path.join(CASES, "unconverged_snap.json"), encoding="utf-8") as f:
        case = json.load(f)
    code, j, out, err = run(tmp, case, "unconverged")
    check(code == 3, "points with no result: exit 3", f"{code} {err[-300:]}")
    f = {x["where"]: x for x in (j or {}).get("fixes", [])}.get("lube/suction", {})
    cat = f.get("catalog") or {}
    pump = [c for p in (j or {}).get("points", []) if p["name"] == "cold_start" for c in p["components"]
            if c["id"] == "pump"]
    q = pump[0]["flow_m3_s"] if pump else float("nan")
    d = bores.get("hose-10", float("nan"))
    check(cat.get("part") == "hose-10" and cat.get("envelope_passes_check") is False
          and abs((cat.get("worst_margin") or -1) - (1.2 - q / (math.pi * d * d / 4))) < 0.01,
          "catalog suction size: margin at the converged point, not an envelope pass", f"{cat} q={q}")
    check("catalog: hose-10 (bore 15.88 mm), re-solved: the check passes at every point that converged" in out,
          "the fix line says the catalog size passes where the points converged", out[-2500:])

    # A misspelt knob name: exit 2, its pointer and the nearest name.
    case = json.loads(json.dumps(BASE))
    case["knobs"] = {"allow": ["oil/tube_lin.diameter"]}
    code, j, out, err = run(tmp, case, "misspelt")
    check(code == 2, "a misspelt knob name: exit 2", f"{code} {err[-400:]}")
    check("/knobs/allow/0" in err and 'did you mean "tube_line"' in err, "the error names its pointer and the nearest id",
          err[-400:])

finish()
