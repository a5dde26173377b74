"""Drives `loopwright solve` and `loopwright check` (LOOPWRIGHT_BIN) on the
small invented cases of tests/network/failure_cases/ and
check_cases/dead_headed.json (all data invented): every point that is not a
result says so with exit 3, names its place and a likely cause in the printed
text and in --json (`cause`, non-empty `largest_residuals`); `check` still
computes fixes at the converged points and says what the list covers; the
mass-balance closure is printed and written in kg/s and relative to the
loop's largest branch flow.

The absolute pressure of the backwards pump's inlet is compared with the
oil's floor independently of the tool's own verdict: the violation row's
value plus the floor (5 kPa abs, the documented air-release floor) is the
node's absolute pressure, which must be below zero. The closure figure is
recomputed from the components' reported mass flows.
Prints "N passed, M failed" and exits non-zero on any failure.
"""

import json
import re
import os
import subprocess
import sys
import tempfile

BIN = os.environ.get("LOOPWRIGHT_BIN", "loopwright")
SRC = os.environ.get("LOOPWRIGHT_SOURCE_DIR", os.path.join(os.path.dirname(__file__), "..", ".."))
CASES = os.path.join(SRC, "tests", "network", "failure_cases")
CHECK_CASES = os.path.join(SRC, "tests", "network", "check_cases")

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tools"))
from tally import check, finish  # noqa: E402


def run(args, tmp, tag):
    jout = os.path.join(tmp, tag + ".json")
    r = subprocess.run([BIN, *args, "--json", jout], capture_output=True, text=True, timeout=120)
    j = None
    if os.path.exists(jout):
        with open(jout, encoding="utf-8") as f:
            j = json.load(f)
    return r, j


def explained(p, tag):
    """A point that is not a result carries a cause and its equations."""
    check(p["converged"] is False, f"{tag}: not converged")
    check(len(p.get("largest_residuals", [])) > 0, f"{tag}: largest_residuals is not empty", json.dumps(p)[:600])
    cause = p.get("cause", {})
    for key in ("kind", "place", "text"):
        check(bool(cause.get(key)), f"{tag}: cause.{key} is given", json.dumps(cause))
    check(p["nodes"] == [] and p["components"] == [], f"{tag}: no node or component is reported as a result")
    check("non-finite" not in p["solver"]["termination"], f"{tag}: not called a non-finite residual",
          p["solver"]["termination"])
    return cause


with tempfile.TemporaryDirectory() as tmp:
    # 1. A pump placed backwards: exit 3, the node, its absolute pressure, the pump.
    r, j = run(["solve", os.path.join(CASES, "reversed_pump.json")], tmp, "reversed")
    check(r.returncode == 3, "reversed pump: solve exits 3", r.stderr)
    check("Likely cause" in r.stderr and "oil/pump_out" in r.stderr and "bar abs" in r.stderr
          and "oil/pump" in r.stderr and "cavitate" in r.stderr,
          "reversed pump: the printed cause names the node, its absolute pressure and the pump", r.stderr)
    if j:
        p = j["points"][0]
        cause = explained(p, "reversed pump")
        check(cause.get("kind") == "cavitation" and cause.get("place") == "node oil/pump_out",
              "reversed pump: cause kind and place", json.dumps(cause))
        row = p["largest_residuals"][0]
        check(row["unit"] == "Pa" and row["residual"] + 5000.0 < 0.0,
              "reversed pump: the inlet's absolute pressure (violation + 5 kPa floor) is below zero", json.dumps(row))
        check(j["verdict"] == "not-converged", "reversed pump: verdict not-converged")
        # --units us: the printed cause in psi, the value from the JSON row in Pa
        # over the psi of NIST SP 811 B.8 (6.894757E+03 Pa).
        ru = subprocess.run([BIN, "solve", os.path.join(CASES, "reversed_pump.json"), "--units", "us"],
                            capture_output=True, text=True, timeout=120)
        m = re.search(r"is at (-?[\d.]+) psi abs", ru.stderr)
        want = (row["residual"] + 5000.0) / 6894.757293168
        check(m is not None and abs(float(m.group(1)) - want) <= 1e-3 * abs(want) and " bar abs" not in ru.stderr,
              "reversed pump: with --units us the cause reads psi abs", ru.stderr[-400:])

    # 2. Dead-headed point inside a check: exit 3, cause printed, fixes note.
    r, j = run(["check", os.path.join(CHECK_CASES, "dead_headed.json")], tmp, "dead")
    check(r.returncode == 3, "dead-headed: check exits 3", r.stderr)
    check("dead-headed" in r.stderr and "oil/valve" in r.stderr, "dead-headed: the printed cause names pump and valve",
          r.stderr)
    check("computed from the 2 converged point(s)" in r.stdout, "dead-headed: the fix list says what it covers",
          r.stdout)
    if j:
        p = next(x for x in j["points"] if x["name"] == "closed")
        cause = explained(p, "dead-headed")
        check(cause.get("kind") == "dead-headed-pump", "dead-headed: cause kind", json.dumps(cause))
        check("converged point" in j.get("fixes_note", ""), "dead-headed: fixes_note in the JSON", j.get("fixes_note", ""))
        nc = j.get("not_converged_causes", [])
        check(len(nc) == 1 and nc[0]["point"] == "closed" and nc[0]["kind"] == "dead-headed-pump"
              and nc[0]["place"] == "node oil/delivery", "dead-headed: not_converged_causes in the JSON", json.dumps(nc))

    # 3. Starved bearing: fixes at the converged points although two points
    # are not results; the mild range warning names node and point.
    r, j = run(["check", os.path.join(CASES, "starved_bearing.json")], tmp, "starved")
    check(r.returncode == 3, "starved bearing: check exits 3", r.stderr)
    if j:
        check(len(j["fixes"]) > 0, "starved bearing: fixes computed at the converged points", json.dumps(j["fixes"])[:400])
        check("2 converged point(s)" in j.get("fixes_note", ""), "starved bearing: fixes_note", j.get("fixes_note", ""))
        warm = [w for w in j["check_warnings"] if w["where"] == "point warm"]
        check(any("node housing" in w["warning"] for w in warm),
              "starved bearing: the mildly hot drain is a warning naming point and node", json.dumps(j["check_warnings"]))
        check(not [w for w in j["check_warnings"] if w["where"] == "point throttled"],
              "starved bearing: the rejected point leaves no warning behind")
        kinds = {x["name"]: explained(x, "starved bearing " + x["name"]).get("kind")
                 for x in j["points"] if not x["converged"]}
        check(kinds == {"throttled": "bearing-starved", "starved": "bearing-starved"},
              "starved bearing: causes of the two points that are not results", json.dumps(kinds))
    check("point \"starved\" did not converge" in r.stderr and "Likely cause" in r.stderr,
          "starved bearing: the printed report gives the cause", r.stderr[:800])

    # 3b. A runaway in the oil loop while the coolant loop's thermostat is
    # held by the coupled solve: the cause names the bearing, not the valve
    # of another loop.
    r, j = run(["solve", os.path.join(CASES, "runaway_beside_thermostat.json"), "--point", "run"], tmp, "beside")
    check(r.returncode == 3, "runaway beside a thermostat: solve exits 3", r.stderr[-600:])
    if j:
        cause = explained(j["points"][0], "runaway beside a thermostat")
        check("journal_bearing lube/front" in cause.get("text", "") and "thermostatic valve cool/" not in cause.get("text", ""),
              "runaway beside a thermostat: the cause names the bearing, not the other loop's valve", json.dumps(cause))

    # 4. Mass-balance closure: kg/s and relative, recomputed from the flows.
    r, j = run(["solve", os.path.join(CASES, "closed_check_valve.json")], tmp, "closure")
    check(r.returncode == 0, "closure: solve exits 0", r.stderr)
    check("kg/s at worst" in r.stdout and "of the loop's largest branch flow" in r.stdout,
          "closure: printed in kg/s and relative", r.stdout[-600:])
    if j:
        p = j["points"][0]
        c = p["mass_balance_closure"]
        net = {}
        for comp in p["components"]:
            net[comp["from"]] = net.get(comp["from"], 0.0) - comp["mass_flow_kg_s"]
            net[comp["to"]] = net.get(comp["to"], 0.0) + comp["mass_flow_kg_s"]
        free = [n["id"] for n in p["nodes"] if not n["boundary"]]
        worst = max(abs(net[n]) for n in free)
        largest = max(abs(comp["mass_flow_kg_s"]) for comp in p["components"])
        check(c["max_imbalance_kg_s"] == worst, "closure: absolute figure equals the recomputed one",
              f"{c['max_imbalance_kg_s']} vs {worst}")
        check(abs(c["max_imbalance_relative_to_largest_flow"] - worst / largest) <= 1e-12 * worst / largest,
              "closure: relative to the largest branch flow", f"{c} vs {worst / largest}")
        check(c["max_imbalance_relative_to_largest_flow"] < 1e-12, "closure: no noise-over-noise 1.0", json.dumps(c))

finish()
