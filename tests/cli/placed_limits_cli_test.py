"""Limits set per loop, per component and per node (README "Checks"): the
most specific wins (component or node > loop > case > default), and the
printed check table and --json say which limit judged each item and where it
came from. Drives `loopwright check` (LOOPWRIGHT_BIN) on
tests/network/check_cases/placed_limits.json (invented data).

The limits are the case's inputs, so the test asserts which one was applied
and its source, and checks each margin against the item's own limit with
the value recomputed by hand from outside the code:
  - line velocity v = Q / (pi D^2 / 4), Q from the case's inputs: a
    fixed-flow circulator's flow, or an ideal gear pump's displacement x
    speed (no slip: the closed form of a displacement pump);
  - the default suction limit 1.2 m/s (common practice for lube suction
    lines, the README's check table);
  - an absolute inlet limit written "0.8 bar abs" is 0.8 bar minus the
    case's ambient 101325 Pa (ISO 2533 standard atmosphere) in gauge;
  - the water header's boiling margin: saturation temperature from
    python3-iapws (IAPWS-IF97) at the node's absolute pressure, minus the
    loop temperature 40 degC.
The placed limits validate against the published schema (python3-jsonschema),
which refuses a velocity limit on a pump too. Bad placements (a velocity limit on a pump, a suction limit's name misspelt
on a loop, a return limit on a suction line, a boiling margin on an oil node,
a component's own limit under a loop's "checks") exit 2 naming the pointer.
Prints "N passed, M failed".
"""

import json
import math
import os
import re
import subprocess
import sys
import tempfile

BIN = os.environ.get("LOOPWRIGHT_BIN", "loopwright")
SRC = os.environ.get("LOOPWRIGHT_SOURCE_DIR", os.path.join(os.path.dirname(__file__), "..", ".."))
CASE = os.path.join(SRC, "tests", "network", "check_cases", "placed_limits.json")

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tools"))
from tally import check, finish  # noqa: E402

LPM = 1.0 / 60000.0  # m3/s per L/min
Q_GEAR = 10e-6 * 1600.0 / 60.0  # 10 cm3/rev x 1600 rpm, the case's ideal gear pump [m3/s]
Q_CIRC = 16.0 * LPM  # each water circulator (fixed_flow 16 L/min)
AMBIENT = 101325.0  # Pa, ISO 2533 sea level (the case sets no ambient_pressure)


def velocity(q, d):
    return q / (math.pi * d * d / 4.0)


def run(case, tmp, tag, command="check"):
    path = os.path.join(tmp, tag + ".json")
    with open(path, "w", encoding="utf-8") as f:
        json.dump(case, f, indent=1)
    out = os.path.join(tmp, tag + ".out.json")
    args = [BIN, command, path] + (["--json", out] if command == "check" else [])
    r = subprocess.run(args, capture_output=True, text=True, timeout=60)
    j = None
    if command == "check" and os.path.exists(out):
        with open(out, encoding="utf-8") as f:
            j = json.load(f)
    return r, j


def table_rows(stdout):
    """The printed check table as dicts by its header's column names."""
    lines = stdout.splitlines()
    head = next(i for i, l in enumerate(lines) if l.strip().startswith("check ") and "limit from" in l)
    names = re.split(r"\s{2,}", lines[head].strip())
    rows = {}
    for line in lines[head + 2:]:
        if not line.strip():
            break
        cells = re.split(r"\s{2,}", line.strip())
        if len(cells) == len(names):
            row = dict(zip(names, cells))
            rows[(row["check"], row["where"])] = row
    return names, rows


def summary(j):
    return {(c["name"], c["where"]): c for c in j["checks"]}


def check_item(s, rows, name, where, limit, source, source_id, value, tag):
    """One item: its limit and source in --json and the table, its margin
    against its own limit with the hand value."""
    c = s.get((name, where))
    check(c is not None, f"{tag}: {name} at {where} in --json", str(sorted(s)))
    if c is None:
        return
    check(math.isclose(c["limit"], limit, rel_tol=1e-9, abs_tol=1e-9), f"{tag}: {name} at {where} limit {limit}", str(c))
    check(c["limit_source"] == source and c.get("limit_source_id") == source_id,
          f"{tag}: {name} at {where} limit from {source} {source_id}", str(c))
    margin = (limit - value) if name.endswith("_max") else (value - limit)
    check(math.isclose(c["margin"], margin, rel_tol=1e-4, abs_tol=1e-6),
          f"{tag}: {name} at {where} margin {margin:.5g} against its own limit", str(c))
    check(c["pass"] == (margin >= 0), f"{tag}: {name} at {where} verdict", str(c))
    row = rows.get((name, where))
    text = source + (" " + source_id if source_id else "")
    check(row is not None and row["limit from"] == text, f"{tag}: table says {name} at {where} limit from '{text}'",
          str(row))


def main():
    with open(CASE, encoding="utf-8") as f:
        base = json.load(f)
    with tempfile.TemporaryDirectory() as tmp:
        r, j = run(base, tmp, "placed")
        check(r.returncode == 1 and j is not None, "placed limits: check exits 1 (two lines and a node fail)",
              r.stdout[-2000:] + r.stderr)
        if j is None:
            return
        names, rows = table_rows(r.stdout)
        check("limit from" in names, "the table has a limit from column", str(names))
        s = summary(j)
        v16 = velocity(Q_GEAR, 0.016)
        # The oil suction: the default 1.2 m/s (the water loop's 1.5 m/s does not reach it).
        check_item(s, rows, "velocity_suction_max", "oil/suction", 1.2, "default", None, v16, "oil suction")
        # The water suction lines, same bore and flow: the loop's 1.5 m/s, and
        # suction_b's own 1.3 m/s over it.
        vw = velocity(Q_CIRC, 0.016)
        check_item(s, rows, "velocity_suction_max", "water/suction_a", 1.5, "loop", "water", vw, "water suction_a")
        check_item(s, rows, "velocity_suction_max", "water/suction_b", 1.3, "component", "water/suction_b", vw,
                   "water suction_b")
        # The case's pressure-line limit, and the return lines' default.
        check_item(s, rows, "velocity_pressure_max", "oil/supply", 2.0, "case", None, velocity(Q_GEAR, 0.014), "supply")
        check_item(s, rows, "velocity_return_max", "water/return", 0.3, "default", None, velocity(2 * Q_CIRC, 0.080),
                   "water return")
        # The pump's own inlet limit, absolute: 0.8 bar abs at 101325 Pa ambient.
        c = s.get(("pump_inlet_pressure_min", "oil/pump"))
        check(c is not None and math.isclose(c["limit"], 0.8e5 - AMBIENT, rel_tol=1e-9)
              and c["limit_source"] == "component" and c.get("limit_source_id") == "oil/pump",
              "pump's own inlet limit 0.8 bar abs = -21325 Pa gauge, from component oil/pump", str(c))
        row = rows.get(("pump_inlet_pressure_min", "oil/pump"))
        check(row is not None and row["limit from"] == "component oil/pump", "table: pump inlet limit from the pump",
              str(row))
        # The water header's own boiling margin against IAPWS-IF97.
        from iapws import IAPWS97
        node = next(n for n in j["points"][0]["nodes"] if n["loop"] == "water" and n["id"] == "header")
        margin_k = IAPWS97(P=node["pressure_abs_Pa"] / 1e6, x=0).T - (273.15 + 40.0)
        check_item(s, rows, "boiling_margin_min", "water/header", 70.0, "node", "water/header", margin_k, "header")
        check_item(s, rows, "boiling_margin_min", "water/in_a", 10.0, "default", None,
                   IAPWS97(P=next(n for n in j["points"][0]["nodes"] if n["loop"] == "water" and n["id"] == "in_a")
                           ["pressure_abs_Pa"] / 1e6, x=0).T - 313.15, "in_a")
        # Each point's own list says the same as the summary.
        pc = {(c["name"], c["where"]): c for c in j["points"][0]["checks"]}
        check(pc[("velocity_suction_max", "water/suction_b")].get("limit_source_id") == "water/suction_b",
              "the point's checks carry the source too", str(pc.get(("velocity_suction_max", "water/suction_b"))))

        # Without the loop's limit, suction_a falls back to the default 1.2 m/s
        # and fails; without suction_b's own, the loop's 1.5 m/s judges it.
        case = json.loads(json.dumps(base))
        del case["loops"][1]["checks"]
        del case["loops"][1]["components"][1]["checks"]
        r2, j2 = run(case, tmp, "fallback")
        check(j2 is not None, "fallback case runs", r2.stderr)
        if j2 is not None:
            _, rows2 = table_rows(r2.stdout)
            s2 = summary(j2)
            check_item(s2, rows2, "velocity_suction_max", "water/suction_a", 1.2, "default", None, vw, "no loop limit")
            check_item(s2, rows2, "velocity_suction_max", "water/suction_b", 1.2, "default", None, vw, "no limits")
        case = json.loads(json.dumps(base))
        del case["loops"][1]["components"][1]["checks"]
        r3, j3 = run(case, tmp, "loop_only")
        if j3 is not None:
            _, rows3 = table_rows(r3.stdout)
            check_item(summary(j3), rows3, "velocity_suction_max", "water/suction_b", 1.5, "loop", "water", vw,
                       "loop limit only")
        check(j3 is not None, "loop-only case runs", r3.stderr)

        # A closed water loop with a pressurised expansion tank: its return
        # into the tank runs full, pumped, so it answers to the case's
        # pressure-line limit (2.0 m/s), not to the 0.3 m/s gravity-return
        # limit, and gets no drain-capacity check.
        case = json.loads(json.dumps(base))
        case["loops"][1]["nodes"][0]["boundary"] = {"kind": "tank", "pressure": "0.5 bar", "level": "0.3 m"}
        rt, jt = run(case, tmp, "tank_return")
        check(jt is not None, "closed water loop with a tank runs", rt.stderr[-800:])
        if jt is not None:
            _, rowst = table_rows(rt.stdout)
            st = summary(jt)
            check_item(st, rowst, "velocity_pressure_max", "water/return", 2.0, "case", None,
                       velocity(2 * Q_CIRC, 0.080), "return into a tank")
            check(("velocity_return_max", "water/return") not in st and ("drain_capacity_margin", "water/return") not in st,
                  "a return into a tank is no gravity return", str(sorted(k for k in st if k[1] == "water/return")))

        # Bad placements: exit 2, the error at its JSON Pointer.
        bad = [
            ("velocity limit on a pump", lambda c: c["loops"][0]["components"][1]["checks"].update(
                {"velocity_suction_max": "1 m/s"}), "/loops/0/components/1/checks/velocity_suction_max", "misplaced-limit"),
            ("misspelt name on a loop", lambda c: c["loops"][1]["checks"].update({"velocity_suction_mx": "1 m/s"}),
             "/loops/1/checks/velocity_suction_mx", 'did you mean "velocity_suction_max"'),
            ("return limit on a suction line", lambda c: c["loops"][1]["components"][0].update(
                {"checks": {"velocity_return_max": "1 m/s"}}), "/loops/1/components/0/checks/velocity_return_max",
             "judged by velocity_suction_max"),
            ("boiling margin on an oil node", lambda c: c["loops"][0]["nodes"][3].update(
                {"checks": {"boiling_margin_min": "5 K"}}), "/loops/0/nodes/3/checks/boiling_margin_min", "misplaced-limit"),
            ("a component's own limit on a loop", lambda c: c["loops"][1]["checks"].update({"bearing_flow_min": "1 L/min"}),
             "/loops/1/checks/bearing_flow_min", "flow_min"),
            ("jacket flow on an oil loop", lambda c: c["loops"][0].update({"checks": {"jacket_flow_min": "1 L/min"}}),
             "/loops/0/checks/jacket_flow_min", "misplaced-limit"),
            ("a pressure limit in m/s", lambda c: c["loops"][0]["components"][1]["checks"].update(
                {"pump_inlet_pressure_min": "3 m/s"}), "/loops/0/components/1/checks/pump_inlet_pressure_min",
             "wrong-dimension"),
        ]
        for i, (tag, mutate, pointer, text) in enumerate(bad):
            case = json.loads(json.dumps(base))
            mutate(case)
            rb, _ = run(case, tmp, f"bad{i}", command="validate")
            out = rb.stdout + rb.stderr
            check(rb.returncode == 2 and pointer in out and text in out, f"{tag}: exit 2 at {pointer}",
                  f"exit {rb.returncode}: {out[-800:]}")
        # A positive control: the unchanged case validates.
        rv, _ = run(base, tmp, "valid", command="validate")
        check(rv.returncode == 0, "the case as shipped validates", rv.stdout + rv.stderr)

    # The published schema, read by an independent validator (python3-jsonschema,
    # Draft 2020-12): it takes the placed limits, and refuses a velocity limit
    # on a pump at the pump's "checks".
    import jsonschema
    with open(os.path.join(SRC, "cases", "case.schema.json"), encoding="utf-8") as f:
        validator = jsonschema.Draft202012Validator(json.load(f))
    errors = list(validator.iter_errors(base))
    check(not errors, "placed_limits.json validates against the schema", "; ".join(e.message[:200] for e in errors[:3]))
    case = json.loads(json.dumps(base))
    case["loops"][0]["components"][1]["checks"]["velocity_suction_max"] = "1 m/s"
    paths = ["/" + "/".join(str(p) for p in e.path) for e in validator.iter_errors(case)]
    check(any(p.startswith("/loops/0/components/1/checks") for p in paths), "the schema refuses a velocity limit on a pump",
          str(paths))


def thermostat_limit():
    """A thermostatic valve's own thermostat_travel limit (0.5, over the 0.05
    default) judges that valve; the case's hand energy balance lives in
    tests/network/envelope/thermostat_test.cpp. At the small cooler the valve
    is pinned fully open (travel left 0), so it fails either way; at the big
    cooler the sensed node settles inside the 71-81 degC band."""
    with open(os.path.join(SRC, "tests", "network", "check_cases", "thermostat_bypass.json"), encoding="utf-8") as f:
        case = json.load(f)
    case["loops"][0]["components"][1]["checks"] = {"thermostat_travel": 0.5}
    with tempfile.TemporaryDirectory() as tmp:
        r, j = run(case, tmp, "thermostat")
        check(j is not None, "thermostat case with its own limit runs", r.stderr[-800:])
        if j is None:
            return
        items = [c for p in j["points"] for c in p["checks"] if c["name"] == "thermostat_travel"]
        check(len(items) == 2, "thermostat_travel judged at both points", str(items))
        for c in items:
            check(c["limit"] == 0.5 and c["limit_source"] == "component" and c.get("limit_source_id") == "oil/tv_cooler",
                  "thermostat_travel limit 0.5 from component oil/tv_cooler", str(c))
            check(math.isclose(c["margin"], c["value"] - 0.5, abs_tol=1e-9) and c["pass"] == (c["value"] >= 0.5),
                  "thermostat_travel margin and verdict against the valve's own 0.5", str(c))
        rv, _ = run(case, tmp, "thermostat_valid", command="validate")
        check(rv.returncode == 0, "a thermostat_travel limit on the valve validates", rv.stdout + rv.stderr)
        case["loops"][0]["components"][4]["checks"] = {"thermostat_travel": 0.5}
        rb, _ = run(case, tmp, "thermostat_bad", command="validate")
        check(rb.returncode == 2 and "/loops/0/components/4/checks/thermostat_travel" in rb.stdout + rb.stderr,
              "a thermostat_travel limit on a plain valve: exit 2 at its pointer", rb.stdout + rb.stderr)


if __name__ == "__main__":
    main()
    thermostat_limit()
    finish()
