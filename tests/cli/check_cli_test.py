"""Drives `loopwright check CASE [--json F] [--csv F]` (LOOPWRIGHT_BIN) on the
small invented cases of tests/network/check_cases/ (all data invented).

Checks: exit codes (0 all pass, 1 any check fails, 3 any point not
converged) and the verdict in --json; which checks fail and at which point;
values against outside sources, never against the same run's own report
items (DEVELOPERS.md, "Rules for tests"): the feed-pressure margin with the
delivery pressure recomputed by python3-fluids' IEC 60534 valve sizing from
the bypass valve's reported flow (common practice rule,
network/case/check_table.cpp: delivery >= boost + 10 psi) and a case override of
it; filter bypass and relief lifting as warnings at a cold start and failing
checks at running points, their limits the cracking pressures of the case
files and the filter's element drop recomputed by Darcy's law with the oil's
viscosity from ASTM D341 (Walther) through the library's kv40/kv100; a
dead-headed point reported as not
converged while the other points are still checked; --csv (one row per
point x check, quoted where a field holds a comma) against --json; and both
files complete, written atomically (no temporary file left in the folder).
Prints "N passed, M failed" and exits non-zero on any failure.
"""

import csv
import io
import json
import math
import os
import shutil
import subprocess
import sys
import tempfile

BIN = os.environ.get("LOOPWRIGHT_BIN", "loopwright")
SRC = os.environ.get("LOOPWRIGHT_SOURCE_DIR", os.path.join(os.path.dirname(__file__), "..", ".."))
CASES = os.path.join(SRC, "tests", "network", "check_cases")
PSI = 6894.757293168  # Pa, NIST SP 811 B.8

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tools"))
from tally import check, finish  # noqa: E402


def short(text, n=800):
    return text if len(text) <= n else text[:n] + "..."


def load(name):
    with open(os.path.join(CASES, name), encoding="utf-8") as f:
        return json.load(f)  # the invented check cases carry no comments


def run_check(tmp, case, tag, extra=()):
    """Writes `case` (a dict) to tmp/tag.json, runs check with --json and --csv.
    Returns (exit code, results json or None, csv text or None, stdout, stderr)."""
    path = os.path.join(tmp, tag + ".json")
    with open(path, "w", encoding="utf-8") as f:
        json.dump(case, f, indent=1)
    jout = os.path.join(tmp, tag + ".out.json")
    cout = os.path.join(tmp, tag + ".out.csv")
    r = subprocess.run([BIN, "check", path, "--json", jout, "--csv", cout, *extra],
                       capture_output=True, text=True, timeout=60)
    j = c = None
    if os.path.exists(jout):
        with open(jout, encoding="utf-8") as f:
            text = f.read()
        check(text.endswith("\n"), f"{tag}: the --json file is complete (ends with a newline)")
        try:
            j = json.loads(text)
        except ValueError as e:
            check(False, f"{tag}: the --json file parses", str(e))
    if os.path.exists(cout):
        with open(cout, encoding="utf-8", newline="") as f:
            c = f.read()
    return r.returncode, j, c, r.stdout, r.stderr


def point(j, name):
    for p in j["points"]:
        if p["name"] == name:
            return p
    raise KeyError(name)


def node_p(p, loop, node):
    return next(n["pressure_Pa"] for n in p["nodes"] if n["loop"] == loop and n["id"] == node)


def comp(p, loop, cid):
    return next(c for c in p["components"] if c["loop"] == loop and c["id"] == cid)


def failing_point_checks(j):
    """(point, check, where) of every failing per-point check."""
    return sorted((p["name"], c["name"], c["where"]) for p in j["points"] for c in p.get("checks", []) if not c["pass"])


def failing_summary(j):
    return sorted((c["name"], c["where"], c["point"]) for c in j["checks"] if not c["pass"])


G = 9.80665  # m/s2, standard gravity (NIST SP 811)


def walther_kinematic_viscosity(kv40_cst, kv100_cst, t_k):
    """ASTM D341 (Walther): log10 log10(nu + 0.7) = A - B log10 T, through the
    two reference viscosities [cSt]; the standard's further term
    exp(-1.47 - 1.84 nu - 0.51 nu^2) is below 1e-12 above 15 cSt and left out."""
    z1, z2 = math.log10(math.log10(kv40_cst + 0.7)), math.log10(math.log10(kv100_cst + 0.7))
    b = (z1 - z2) / (math.log10(373.15) - math.log10(313.15))
    a = z1 + b * math.log10(313.15)
    return 10 ** (10 ** (a - b * math.log10(t_k))) - 0.7


def library_fluid(part_id):
    with open(os.path.join(SRC, "library", "parts", "fluids.json"), encoding="utf-8") as f:
        for e in json.load(f)["parts"]:
            if e["id"] == part_id:
                return e["params"]
    raise KeyError(part_id)


def cst(text):
    value, unit = text.split()
    assert unit == "cSt"
    return float(value)


def iec_valve_dp(q_m3_s, rho, dp_guess, kv):
    """Pressure drop of a liquid through a valve of flow coefficient kv at flow
    q by python3-fluids' IEC 60534-2-1 sizing (turbulent, non-choked): fluids
    sizes the Kv for q at dp_guess; Kv ~ 1/sqrt(dp) gives the drop for kv."""
    import fluids.control_valve as cv
    p1 = 101325.0 + 10e5
    kv_at_guess = cv.size_control_valve_l(rho=rho, Psat=1e3, Pc=1e7, mu=1e-3, P1=p1, P2=p1 - dp_guess, Q=q_m3_s)
    return dp_guess * (kv_at_guess / kv) ** 2


def close(a, b, rel=1e-9, abs_=1e-9):
    return abs(a - b) <= abs_ + rel * abs(b)


def check_csv(tag, j, text):
    """--csv against --json: header, one row per converged point x check."""
    if text is None or j is None:
        check(False, f"{tag}: --csv and --json were written")
        return
    check(text.endswith("\n"), f"{tag}: the --csv file is complete (ends with a newline)")
    lines = text.split("\n")
    check(lines[0] == "point,check,where,value,limit,margin,unit,pass", f"{tag}: csv header", lines[0])
    rows = list(csv.reader(io.StringIO(text)))[1:]
    check(all(len(r) == 8 for r in rows), f"{tag}: every csv row has 8 fields",
          short(str([r for r in rows if len(r) != 8][:3])))
    expected = [(p["name"], c) for p in j["points"] if p["converged"] for c in p["checks"]]
    check(len(rows) == len(expected), f"{tag}: one csv row per point x check ({len(expected)})", str(len(rows)))
    for r, (pname, c) in zip(rows, expected):
        if len(r) != 8:
            continue
        ok = (r[0] == pname and r[1] == c["name"] and r[2] == c["where"] and r[6] == c["unit"]
              and r[7] == ("pass" if c["pass"] else "fail")
              and all(close(float(r[k]), c[key], 1e-9, 1e-300) for k, key in ((3, "value"), (4, "limit"), (5, "margin"))))
        if not ok:
            check(False, f"{tag}: csv row matches the json check", f"{r} vs {pname} {c}")
            return
    check(True, f"{tag}: every csv row matches its json check")


with tempfile.TemporaryDirectory() as tmp:
    # --- 1. a case that passes every check -----------------------------------
    code, j, c, out, err = run_check(tmp, load("check_pass.json"), "pass")
    check(code == 0, "check_pass: exit 0", f"exit {code}\n{short(out)}\n{short(err)}")
    if j:
        check(j.get("verdict") == "pass", "check_pass: verdict pass", str(j.get("verdict")))
        check(len(j["checks"]) > 0 and all(x["pass"] for x in j["checks"]), "check_pass: every summary check passes",
              short(str(failing_summary(j))))
        check(failing_point_checks(j) == [], "check_pass: every per-point check passes")
        check(j["not_converged_points"] == [], "check_pass: every point converged")
        names = {x["name"] for x in j["checks"]}
        for k in ["feed_pressure_margin", "bearing_flow_min", "filter_bypass_closed", "start_viscosity_max"]:
            check(k in names, f"check_pass: {k} is evaluated", str(sorted(names)))
        check(any("," in p["name"] for p in j["points"]), "check_pass: a grid point name holds a comma")
    check_csv("check_pass", j, c)

    # Tight checks: with --tight 0.99 every passing check with a limit counts
    # as tight; each is reported with its margin and the knob it is most
    # sensitive to, found=false (nothing to restore), the exit code still 0.
    code, jt, ct, out, err = run_check(tmp, load("check_pass.json"), "tight", ("--tight", "0.99"))
    check(code == 0, "tight: a passing case still exits 0", f"exit {code}\n{short(err)}")
    if jt:
        tight = [f for f in jt.get("fixes", []) if f.get("tight")]
        limited = [x for x in jt["checks"] if x["limit"] != 0 and
                   (x["unit"] == "K" and x["margin"] < 5 or x["unit"] != "K" and x["margin"] < 0.99 * abs(x["limit"]))]
        check(len(tight) == min(len(limited), 8) and len(tight) > 0, "tight: one entry per tight check",
              f"{len(tight)} vs {len(limited)}")
        for f in tight:
            same = [x for x in jt["checks"] if x["name"] == f["check"] and x["where"] == f["where"]]
            check(len(same) == 1 and close(same[0]["margin"], f["margin"], 1e-12, 1e-12),
                  f"tight {f['check']} at {f['where']}: margin as in the summary", str(f))
            if len(same) == 1 and f["knob"]:
                # The value sought lifts the margin to 1.01 x the tight band.
                band = 5.0 if same[0]["unit"] == "K" else 0.99 * abs(same[0]["limit"])
                check(close(f["target_margin"], 1.01 * band, 1e-12, 1e-12), f"tight {f['check']}: target 1.01 x band",
                      str(f))
                check((f["found"] and f["suggested"] is not None and f["envelope_passes_check"]) or
                      (not f["found"] and f["suggested"] is None),
                      f"tight {f['check']}: a value that clears the band passes everywhere, or none", str(f))
            check((f["knob"] != "" and f["margin_change_per_percent"] != 0) or
                  (f["knob"] == "" and f["note"] == "no design parameter moves this margin"),
                  f"tight {f['check']}: its most effective knob, or why there is none", str(f))
            if f["check"] == "start_viscosity_max":  # a fluid property at a given temperature: no knob moves it
                check(f["knob"] == "", "tight start_viscosity_max: no knob", str(f))
        check("Tight checks" in out and "What would fix it" not in out, "tight: printed as tight, not as fixes",
              short(out, 3000))
    code, jd, cd, out, err = run_check(tmp, load("check_pass.json"), "not_tight")
    check(jd is not None and not [f for f in jd.get("fixes", []) if f.get("tight")],
          "tight: none by default in the comfortable test case", str((jd or {}).get("fixes")))

    # --- 2. feed pressure margin short at 30 psig boost only -----------------
    case = load("feed_margin.json")
    code, j, c, out, err = run_check(tmp, case, "feed")
    check(code == 1, "feed_margin: exit 1", f"exit {code}\n{short(out)}\n{short(err)}")
    if j:
        check(j.get("verdict") == "fail", "feed_margin: verdict fail", str(j.get("verdict")))
        check(failing_summary(j) == [("feed_pressure_margin", "oil/bearing", "boost_30")],
              "feed_margin: only feed_pressure_margin fails, governed by boost_30", str(failing_summary(j)))
        check(failing_point_checks(j) == [("boost_30", "feed_pressure_margin", "oil/bearing")],
              "feed_margin: the only failing per-point check is at boost_30", str(failing_point_checks(j)))
        # The bypass valve (kvs 0.5, linear, opening 0.72, seat leakage 1e-4
        # of kvs: the case file and the valve's documented default) sets the
        # delivery pressure: its drop for the reported bypass flow by
        # python3-fluids' IEC 60534-2-1 sizing, plus the sump's hydrostatic
        # head (0.3 m of oil, rho g h), is the delivery pressure.
        kv = 0.5 * (1e-4 + (1 - 1e-4) * 0.72)
        for name, boost_psi in [("boost_0", 0), ("boost_15", 15), ("boost_30", 30)]:
            p = point(j, name)
            byp = comp(p, "oil", "bypass")
            rho = byp["mass_flow_kg_s"] / byp["flow_m3_s"]
            delivery = rho * G * 0.3 + iec_valve_dp(byp["flow_m3_s"], rho, 2e5, kv)
            fc = [x for x in p["checks"] if x["name"] == "feed_pressure_margin"]
            check(len(fc) == 1, f"feed_margin {name}: one feed_pressure_margin check", str(fc))
            if fc:
                want = delivery - boost_psi * PSI - 10 * PSI  # boost from the case, 10 psi common practice
                check(close(fc[0]["limit"], 10 * PSI, 1e-12), f"feed_margin {name}: limit 10 psi", str(fc[0]))
                check(fc[0].get("limit_source") == "default", f"feed_margin {name}: the limit is the default", str(fc[0]))
                # 1 Pa in about 2.7 bar of delivery (4e-6): fluids' iteration and rounding.
                check(close(fc[0]["margin"], want, 0, 1.0),
                      f"feed_margin {name}: margin = delivery (fluids IEC valve drop + head) - boost - 10 psi",
                      f"{fc[0]['margin']} vs {want}")
                check((fc[0]["margin"] < 0) == (name == "boost_30"), f"feed_margin {name}: margin sign", str(want))
        d30 = node_p(point(j, "boost_30"), "oil", "delivery")
        check(38 * PSI < d30 < 40 * PSI, "feed_margin: delivery a little under 40 psig at 30 psig boost",
              f"{d30 / PSI:.3f} psig")
        gov = [x for x in j["checks"] if x["name"] == "feed_pressure_margin"]
        if gov:
            byp = comp(point(j, "boost_30"), "oil", "bypass")
            rho = byp["mass_flow_kg_s"] / byp["flow_m3_s"]
            want = rho * G * 0.3 + iec_valve_dp(byp["flow_m3_s"], rho, 2e5, kv) - 40 * PSI
            check(close(gov[0]["margin"], want, 0, 1.0) and gov[0]["margin"] < 0,
                  "feed_margin: summary margin is that of boost_30 (fluids), negative", f"{gov[0]} vs {want}")
    check_csv("feed_margin", j, c)
    # What would fix it: one suggestion for the failing margin, found with the
    # exact tangent and Newton steps, confirmed over the envelope; printed
    # below the table with the knob, its values and the margin per +1 %.
    if j:
        fx = j.get("fixes", [])
        check(len(fx) == 1, "feed_margin: one fix suggestion", str(fx))
        if fx:
            f = fx[0]
            check(f["check"] == "feed_pressure_margin" and f["where"] == "oil/bearing" and f["point"] == "boost_30",
                  "feed_margin fix: for the failing check at its governing point", str(f))
            check(f["found"] and f["envelope_passes_check"], "feed_margin fix: found and passes the envelope", str(f))
            check(f["sensitivity_method"] == "implicit-function tangent" and f["newton_steps"] >= 1,
                  "feed_margin fix: exact tangent, Newton steps", str(f))
            # Moving the knob by its suggested change moves the margin about
            # as the slope says (linear estimate within 50 % for a small step).
            change_pct = 100 * (f["suggested"] - f["current"]) / f["current"]
            p30 = [x for x in j["checks"] if x["name"] == "feed_pressure_margin"][0]
            need = 0.02 * p30["limit"] - p30["margin"]
            est = f["margin_change_per_percent"] * change_pct
            check(est > 0 and 0.5 * need < est < 1.5 * need, "feed_margin fix: the slope predicts the restoring change",
                  f"estimate {est} vs needed {need}")
            check("What would fix it" in out and f["knob"] in out and "per +1 % of it" in out,
                  "feed_margin fix: printed below the table", short(out, 3000))
    code, j2, c2, out2, err2 = run_check(tmp, case, "feed_nofix", ("--no-fix",))
    check(code == 1 and j2 is not None and j2.get("fixes") == [] and "What would fix it" not in out2,
          "feed_margin --no-fix: no suggestion", short(out2))
    # The case may set the margin: 5 psi passes (delivery - 30 psig is about 9 psi).
    case["checks"] = {"feed_pressure_margin": "5 psi"}
    code, j, c, out, err = run_check(tmp, case, "feed5")
    check(code == 0, "feed_margin with a 5 psi margin: exit 0", f"exit {code}\n{short(out)}\n{short(err)}")
    if j:
        check(j.get("verdict") == "pass", "feed_margin with a 5 psi margin: verdict pass", str(j.get("verdict")))
        fc = [x for x in j["checks"] if x["name"] == "feed_pressure_margin"]
        check(len(fc) == 1 and close(fc[0]["limit"], 5 * PSI, 1e-12), "feed_margin 5 psi: the limit is 5 psi", str(fc))
        check(len(fc) == 1 and fc[0].get("limit_source") == "case", "feed_margin 5 psi: the limit comes from the case",
              str(fc))

    # --- 3. filter bypass: cold start warning, running point failure ---------
    case = load("filter_bypass.json")
    code, j, c, out, err = run_check(tmp, case, "bypass")
    check(code == 1, "filter_bypass: exit 1", f"exit {code}\n{short(out)}\n{short(err)}")
    if j:
        check(failing_summary(j) == [("filter_bypass_closed", "oil/filter", "cold_running")],
              "filter_bypass: only filter_bypass_closed fails, at cold_running", str(failing_summary(j)))
        check(failing_point_checks(j) == [("cold_running", "filter_bypass_closed", "oil/filter")],
              "filter_bypass: no failing check at the cold start", str(failing_point_checks(j)))
        cold = point(j, "cold_start")
        check(not any(x["name"] == "filter_bypass_closed" for x in cold["checks"]),
              "filter_bypass: no filter_bypass_closed check at the isothermal cold start")
        check(comp(cold, "oil", "filter")["details"].get("bypass_fraction", 0) > 1e-3,
              "filter_bypass: the bypass is open at the cold start", str(comp(cold, "oil", "filter")["details"]))
        w = [x for x in j["check_warnings"] if x["where"] == "oil/filter"]
        check(len(w) == 1 and "cold_start" in w[0]["warning"], "filter_bypass: a check warning names the cold start",
              str(j["check_warnings"]))
        # The check compares the element drop with the bypass crack of the case
        # file (1 bar): above it at cold_running, below at running.
        for name, above in [("cold_running", True), ("running", False)]:
            fc = [x for x in point(j, name)["checks"] if x["name"] == "filter_bypass_closed"]
            check(len(fc) == 1 and close(fc[0]["limit"], 1e5, 1e-12) and fc[0]["unit"] == "Pa"
                  and close(fc[0]["margin"], 1e5 - fc[0]["value"], 1e-12, 1e-9) and (fc[0]["value"] > 1e5) == above,
                  f"filter_bypass {name}: element drop {'above' if above else 'below'} the 1 bar crack", str(fc))
            check(len(fc) == 1 and fc[0].get("limit_source") == "component",
                  f"filter_bypass {name}: the limit is the filter's own crack", str(fc))
        # At running (50 degC, bypass shut) the element drop is Darcy's law:
        # element_dp (0.2 bar at 20 L/min, 32 cSt, 870 kg/m3 default) scaled
        # by mu Q, with nu by ASTM D341 from the library oil's kv40/kv100.
        run_p = point(j, "running")
        fl = comp(run_p, "oil", "filter")
        rho = fl["mass_flow_kg_s"] / fl["flow_m3_s"]
        oil = library_fluid("oil-vg46-turbine")
        nu = walther_kinematic_viscosity(cst(oil["kv40"]), cst(oil["kv100"]), 323.15) * 1e-6
        want = 0.2e5 * (nu * rho) / (32e-6 * 870.0) * fl["flow_m3_s"] / (20 / 60000)
        fc = [x for x in run_p["checks"] if x["name"] == "filter_bypass_closed"]
        check(len(fc) == 1 and close(fc[0]["value"], want, 1e-6),
              "filter_bypass running: element drop = Darcy's law with the ASTM D341 viscosity", f"{fc} vs {want}")
    # Without the running cold point: the cold-start bypass alone passes, with the warning.
    case["envelope"]["points"] = [p for p in case["envelope"]["points"] if p["name"] != "cold_running"]
    code, j, c, out, err = run_check(tmp, case, "bypass_cold_only")
    check(code == 0, "filter_bypass at the cold start only: exit 0", f"exit {code}\n{short(out)}\n{short(err)}")
    if j:
        check(j.get("verdict") == "pass", "filter_bypass at the cold start only: verdict pass", str(j.get("verdict")))
        check(any(x["where"] == "oil/filter" for x in j["check_warnings"]),
              "filter_bypass at the cold start only: still a warning", str(j["check_warnings"]))

    # --- 4. relief valve lifting at a running point ---------------------------
    code, j, c, out, err = run_check(tmp, load("relief_lift.json"), "relief")
    check(code == 1, "relief_lift: exit 1", f"exit {code}\n{short(out)}\n{short(err)}")
    if j:
        check(failing_summary(j) == [("relief_closed", "oil/relief", "full_speed")],
              "relief_lift: only relief_closed fails, at full_speed", str(failing_summary(j)))
        check(failing_point_checks(j) == [("full_speed", "relief_closed", "oil/relief")],
              "relief_lift: the only failing per-point check is at full_speed", str(failing_point_checks(j)))
        fs = point(j, "full_speed")
        rc = [x for x in fs["checks"] if x["name"] == "relief_closed" and x["where"] == "oil/relief"]
        q_relief = comp(fs, "oil", "relief")["flow_m3_s"]
        # Independent of the relief model: mass balance at the header.
        q_balance = comp(fs, "oil", "pump")["flow_m3_s"] - comp(fs, "oil", "bearing")["flow_m3_s"]
        check(q_relief > 0 and close(q_relief, q_balance, 1e-7, 1e-12),
              "relief_lift: the relief passes pump - bearing flow (mass balance)", f"{q_relief} vs {q_balance}")
        # The pressure across the relief against its crack (2 bar, the case
        # file): lifting, it lies between crack and full open (2.5 bar).
        check(len(rc) == 1 and close(rc[0]["limit"], 2e5, 1e-12) and 2e5 < rc[0]["value"] < 2.5e5
              and close(rc[0]["margin"], 2e5 - rc[0]["value"], 1e-12, 1e-9) and rc[0]["unit"] == "Pa",
              "relief_lift: pressure across the relief between crack and full open", str(rc))
        slow = [x for x in point(j, "slow")["checks"] if x["name"] == "relief_closed" and x["where"] == "oil/relief"]
        check(len(slow) == 1 and slow[0]["pass"] and 0 < slow[0]["value"] < 2e5, "relief_lift: shut at slow", str(slow))
        check(any(x["where"] == "oil/relief" and "cold_start" in x["warning"] for x in j["check_warnings"]),
              "relief_lift: lifting at the cold start is a warning", str(j["check_warnings"]))
    check_csv("relief_lift", j, c)

    # --- 5. one point with no solution ------------------------------------------
    code, j, c, out, err = run_check(tmp, load("dead_headed.json"), "dead")
    check(code == 3, "dead_headed: exit 3", f"exit {code}\n{short(out)}\n{short(err)}")
    check('"closed"' in err, "dead_headed: stderr names the point", short(err))
    if j:
        check(j.get("verdict") == "not-converged", "dead_headed: verdict not-converged", str(j.get("verdict")))
        check(j.get("not_converged_points") == ["closed"], "dead_headed: not_converged_points", str(j.get("not_converged_points")))
        check(not point(j, "closed")["converged"], "dead_headed: closed is not converged")
        for name in ["open", "half_open"]:
            p = point(j, name)
            check(p["converged"] and len(p.get("checks", [])) > 0, f"dead_headed: {name} is still checked",
                  str(p.get("checks")))
        check(all(x["point"] != "closed" for x in j["checks"]) and len(j["checks"]) > 0,
              "dead_headed: the summary comes from the converged points", str(j["checks"]))
    check_csv("dead_headed", j, c)
    if c:
        check({r[0] for r in list(csv.reader(io.StringIO(c)))[1:]} == {"open", "half_open"},
              "dead_headed: csv rows only for the converged points")

    # --- 7. atomic, complete output in a folder of its own --------------------
    folder = os.path.join(tmp, "atomic")
    os.mkdir(folder)
    shutil.copy(os.path.join(CASES, "check_pass.json"), os.path.join(folder, "case.json"))
    jout, cout = os.path.join(folder, "r.json"), os.path.join(folder, "r.csv")
    for f in (jout, cout):  # an old, longer file is replaced whole
        with open(f, "w") as fh:
            fh.write("stale " * 100000)
    r = subprocess.run([BIN, "check", os.path.join(folder, "case.json"), "--json", jout, "--csv", cout],
                       capture_output=True, text=True, timeout=60)
    check(r.returncode == 0, "atomic: exit 0", short(r.stderr))
    check(sorted(os.listdir(folder)) == ["case.json", "r.csv", "r.json"], "atomic: no temporary file left behind",
          str(sorted(os.listdir(folder))))
    with open(jout) as fh:
        jt = fh.read()
    with open(cout) as fh:
        ct = fh.read()
    check("stale" not in jt and "stale" not in ct, "atomic: the old files were replaced whole")
    try:
        check_csv("atomic", json.loads(jt), ct)
    except ValueError as e:
        check(False, "atomic: the json parses", str(e))

# A tight check's fix may move its knob by a few parts in ten thousand: the
# printed current and suggested values take as many digits as it takes to read
# differently (they once both read "1.3 mm"). Checked against the JSON's SI values.
with tempfile.TemporaryDirectory() as folder:
    code, j, _, out, err = run_check(folder, load("expander_skid.json"), "expander")
    check(j is not None, "expander: --json written", short(err))
    line = next((l for l in out.splitlines() if "oil/ball_bearing.diameter" in l and " -> " in l), "")
    fix = next((f for f in (j or {}).get("fixes", []) if f.get("knob") == "oil/ball_bearing.diameter"), None)
    if line and fix:
        text = line.split("oil/ball_bearing.diameter ", 1)[1].split(" (", 1)[0]  # "1.3 mm -> 1.3005 mm"
        before, after = (float(x.split()[0]) for x in text.split(" -> "))
        check(before != after, "a small fix prints two different values", line)
        check(abs(after * 1e-3 - fix["suggested"]) <= 1e-4 * fix["suggested"] and
              abs(before * 1e-3 - fix["current"]) <= 1e-4 * fix["current"],
              "the printed values round the JSON's", f"{line} | {fix['current']} {fix['suggested']}")
    else:
        check(False, "expander: a fix line for oil/ball_bearing.diameter", short(out, 3000))

# `solve` lists the failing checks of its point (its exit code stays 0: `check`
# is the verification command). The expander skid's journal bearings run below
# the flow_min its case file writes (0.3 L/min) at its first point.
r = subprocess.run([BIN, "solve", os.path.join(CASES, "expander_skid.json")], capture_output=True, text=True, timeout=60)
line = next((l for l in r.stdout.splitlines() if l.startswith("  FAIL bearing_flow_min at oil/front_bearing:")), "")
nums = [float(w) for w in line.replace("(", " ").replace(")", " ").split() if w.replace(".", "", 1).replace("-", "", 1).isdigit()]
check(r.returncode == 0 and "Checks at this point:" in r.stdout and len(nums) == 3 and nums[1] == 0.3 and
      nums[0] < 0.3 and abs(nums[2] - (nums[0] - nums[1])) <= 2e-4 and "FAIL" in r.stdout.splitlines()[-1],
      "solve prints its point's failing checks: the bearing's flow against the case's 0.3 L/min", short(r.stdout[-2500:]))

finish()
