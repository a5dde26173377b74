"""Drives `loopwright check` (LOOPWRIGHT_BIN) on the invented feed-pump rack
(tests/network/check_cases/feed_pump_rack.json: an oversized gear pump whose
relief lifts at every running point).

The fix for the lifting relief (raise its crack) breaks other checks, so
`check` adds the next knob whose value breaks nothing (`fixes[].alternative`
in --json, "or, breaking nothing:" printed). That claim is checked outside
the fix search: the case is rewritten with the alternative's value (a bare
SI number, as the README's "Values and units" allows) and checked again with
--no-fix: the relief must then pass at every point and every check that
passed before must still pass. A fix with no clean alternative names the
knobs it tried. Prints "N passed, M failed" and exits non-zero on any failure.
"""

import json
import os
import subprocess
import sys
import tempfile

BIN = os.environ.get("LOOPWRIGHT_BIN", "loopwright")
SRC = os.environ.get("LOOPWRIGHT_SOURCE_DIR", os.path.join(os.path.dirname(__file__), "..", ".."))
CASE = os.path.join(SRC, "tests", "network", "check_cases", "feed_pump_rack.json")

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tools"))
from tally import check, finish  # noqa: E402


def run_check(case, out, extra=()):
    p = subprocess.run([BIN, "check", case, "--json", out, "-q", *extra], capture_output=True, text=True)
    with open(out, encoding="utf-8") as f:
        return p, json.load(f)


def summary_verdicts(doc):
    return {(s["name"], s["where"]): s["pass"] for s in doc["checks"]}


def set_knob(case_doc, knob, value):
    loop_comp, param = knob.split(".")
    loop_id, comp_id = loop_comp.split("/")
    for loop in case_doc["loops"]:
        if loop["id"] != loop_id:
            continue
        for c in loop["components"]:
            if c["id"] == comp_id:
                c[param] = value
                return True
    return False


def main():
    with tempfile.TemporaryDirectory() as tmp:
        p, doc = run_check(CASE, os.path.join(tmp, "a.json"))
        check(p.returncode == 1, f"the rack fails its checks (exit 1), got {p.returncode}: {p.stderr}")
        fixes = {(f["check"], f["where"]): f for f in doc["fixes"]}
        relief = fixes.get(("relief_closed", "lube/relief"))
        check(relief is not None, "a fix for the lifting relief")
        if relief is None:
            return finish()
        check(relief["found"] and relief["breaks"], f"the first fix breaks checks: {relief['breaks']}")
        alt = relief.get("alternative")
        check(alt is not None, "an alternative that breaks nothing")
        flow = fixes.get(("bearing_flow_min", "lube/brg_drive"))
        check(flow is not None and flow.get("alternative") is None and len(flow.get("alternatives_tried", [])) >= 1,
              f"the starved bearing's fix has no clean alternative and names what was tried: {flow}")
        printed = subprocess.run([BIN, "check", CASE], capture_output=True, text=True).stdout
        check("or, breaking nothing: " + (alt or {}).get("knob", "?") in printed, "the alternative is printed")
        check("no clean alternative:" in printed, "the missing alternative is printed")
        if alt is None:
            return finish()
        before = summary_verdicts(doc)
        with open(CASE, encoding="utf-8") as f:
            case_doc = json.load(f)
        check(set_knob(case_doc, alt["knob"], alt["suggested"]), f"knob {alt['knob']} found in the case")
        edited = os.path.join(tmp, "edited.json")
        with open(edited, "w", encoding="utf-8") as f:
            json.dump(case_doc, f)
        p2, doc2 = run_check(edited, os.path.join(tmp, "b.json"), ["--no-fix"])
        after = summary_verdicts(doc2)
        check(after.get(("relief_closed", "lube/relief")) is True,
              f"with {alt['knob']} = {alt['suggested']} the relief stays shut at every point")
        newly = [k for k, ok in before.items() if ok and after.get(k) is not True]
        check(not newly, f"no check that passed breaks: {newly}")
    return finish()


if __name__ == "__main__":
    sys.exit(main())
