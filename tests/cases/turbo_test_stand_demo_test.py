"""The turbocharger test-stand demo (cases/turbo_test_stand.json, invented
data) checked end to end through the command line (LOOPWRIGHT_BIN), with the
numbers that matter recomputed here from outside the code:

  - `validate` and `check` exit 0; all five points converge; the verdict is
    PASS; the water loop's suction answers to its own 2 m/s limit (loop
    "checks"), the oil suction to the 1.2 m/s default.
  - Cold start, both bearings: the side flow of a pressure-fed bearing with a
    central circumferential groove, Q = pi p_s r c^3 (1 + 1.5 eps^2) / (3 mu l')
    (Budynas & Nisbett, Shigley's Mechanical Engineering Design, 9th ed.,
    Eq. 12-22, from memory), with p_s the feed pressure above the housing the
    run reports and mu at 0 degC from ASTM D341 (Walther, Z = nu + 0.7) through
    the oil part's 32 cSt at 40 degC and 5.4 cSt at 100 degC, density by
    linear expansion 6.4e-4 1/K from 870 kg/m3 at 15 degC (common practice).
  - Every thermal point: each loop's heat (component heat_W, boundary losses
    included) sums to the heat the case adds within 0.5 % of the added heat
    (first law, summed here from the per-component results); the thermostat
    senses the filter outlet, its travel in the linear middle of its band is
    (T - 60 degC) / (80 - 60 degC) (the element's stated law, case inputs); the
    housing sits at the case's housing pressure plus the drain's own small
    back pressure; the drain runs part full (fill <= 0.5).
  - The check text names the film's Taylor-number warning where the Taylor
    number Ta = (U c / nu) sqrt(c / r) (G. I. Taylor 1923, critical 41.3 =
    sqrt(1708), from memory) recomputed with D341 at the bearing's feed and
    drain temperatures is above 41.3 at both, and not where it is below at both.
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
CASE = os.path.join(SRC, "cases", "turbo_test_stand.json")

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tools"))
from tally import check, finish  # noqa: E402

# Bearing geometry and band of the case (inputs, as written in the case file).
R, C, L, W, EPS = 5.5e-3, 90e-6, 9e-3, 2e-3, 0.3
BAND = (60.0, 80.0)  # thermostat start_to_open, full_open [degC]


def nu_d341(t_c, nu1=32.0, t1=40.0, nu2=5.4, t2=100.0):
    """Kinematic viscosity [cSt] by ASTM D341 through two anchors."""
    ll = lambda nu: math.log10(math.log10(nu + 0.7))  # noqa: E731
    b = (ll(nu1) - ll(nu2)) / (math.log10(t2 + 273.15) - math.log10(t1 + 273.15))
    a = ll(nu1) + b * math.log10(t1 + 273.15)
    return 10.0 ** (10.0 ** (a - b * math.log10(t_c + 273.15))) - 0.7


def rho_oil(t_c):
    return 870.0 * (1.0 - 6.4e-4 * (t_c - 15.0))


def taylor(speed_rpm, t_c):
    u = speed_rpm * 2.0 * math.pi / 60.0 * R
    return u * C / (nu_d341(t_c) * 1e-6) * math.sqrt(C / R)


def comp(point, loop, cid):
    return next(c for c in point["components"] if c["id"] == cid and c.get("loop", loop) == loop)


def node(point, loop, nid):
    return next(n for n in point["nodes"] if n["id"] == nid and n["loop"] == loop)


def cold_start_flows(p):
    for bid in ("compressor_bearing", "turbine_bearing"):
        b = comp(p, "oil", bid)
        ps = b["details"]["feed_pressure_above_drain_Pa"]
        mu = nu_d341(0.0) * 1e-6 * rho_oil(0.0)
        q = math.pi * ps * R * C ** 3 * (1 + 1.5 * EPS ** 2) / (3 * mu * 0.5 * (L - W))
        check(math.isclose(b["flow_m3_s"], q, rel_tol=2e-3), f"cold start {bid}: {q * 6e4:.4f} L/min (Shigley 12-22, D341)",
              f"{b['flow_m3_s'] * 6e4:.5f} L/min")


def energy(p, ambient_c, housing_heat_w):
    """First law per loop from the per-component heats: the oil loop's heat
    leaves through the components and the sump's 2 W/K loss to the cell air
    (case inputs); the water loop takes the housing's heat at a node."""
    sump_loss = 2.0 * (node(p, "oil", "sump")["temperature_K"] - 273.15 - ambient_c)
    for loop, extra in (("oil", -sump_loss), ("water", housing_heat_w)):
        heats = [c["heat_W"] for c in p["components"] if c.get("loop") == loop] + [extra]
        total = sum(heats)
        scale = sum(h for h in heats if h > 0)
        check(abs(total) <= 5e-3 * scale, f"{p['name']} {loop}: heat sums to zero ({total:.3g} W of {scale:.4g} W)")


def thermostat(p):
    tv = comp(p, "oil", "thermostat_cooler")["details"]
    t_filter = node(p, "oil", "filter_out")["temperature_K"] - 273.15
    check(abs(tv["sensed_temperature_K"] - 273.15 - t_filter) < 1e-6, f"{p['name']}: thermostat senses the filter outlet",
          f"{tv['sensed_temperature_K'] - 273.15} vs {t_filter}")
    y = (t_filter - BAND[0]) / (BAND[1] - BAND[0])
    if 0.1 <= y <= 0.9:
        check(abs(tv["travel"] - y) < 1e-6, f"{p['name']}: travel {y:.4f} = (T - 60)/(80 - 60)", str(tv["travel"]))
    check(BAND[0] - 1 < t_filter < BAND[1], f"{p['name']}: oil held inside the band ({t_filter:.2f} degC)")


def housing(p, housing_pa):
    """The housing node sits at the housing pressure plus what the drain needs
    to carry the oil: the sump's 0.2 m oil level (the drain's outlet node is
    the sump's bottom) and the drain's own back pressure."""
    d = comp(p, "oil", "drain")["details"]
    check(d["fill"] <= 0.5, f"{p['name']}: drain part full (fill {d['fill']:.3f})")
    t_sump = node(p, "oil", "sump")["temperature_K"] - 273.15
    want = housing_pa + rho_oil(t_sump) * 9.80665 * 0.2 + d["cavity_backpressure_Pa"]
    pg = node(p, "oil", "housing")["pressure_Pa"]
    check(abs(pg - want) < 20.0, f"{p['name']}: housing at {housing_pa / 1e5:.2f} bar g + sump level + drain",
          f"{pg:.1f} Pa vs {want:.1f} Pa")


def taylor_warnings(p, text, rotor_rpm):
    for bid in ("compressor_bearing", "turbine_bearing"):
        b = comp(p, "oil", bid)["details"]
        tas = [taylor(rotor_rpm, b[k] - 273.15) for k in ("inlet_temperature_K", "outlet_temperature_K")]
        line = f"oil/{bid}: Taylor number"
        shown = any(line in ln and re.search(r"\(at [^)]*\b" + p["name"] + r"\b", ln) for ln in text.splitlines())
        if min(tas) > 41.3 * 1.05:
            check(shown, f"{p['name']} {bid}: Ta {min(tas):.0f}..{max(tas):.0f} > 41.3, warned", text[-1500:])
        elif max(tas) < 41.3 * 0.95:
            check(not shown, f"{p['name']} {bid}: Ta {max(tas):.0f} < 41.3, no warning")


# Per point (case inputs): rotor speed [rpm], housing pressure [Pa], ambient [degC], housing heat [W].
POINTS = {"idle": (40000, 0.1e5, 10.0, 500.0), "full_power_hot_day": (150000, 2e5, 40.0, 6000.0),
          "dirty_filter": (150000, 2e5, 30.0, 6000.0), "fan_stopped": (60000, 0.3e5, 25.0, 800.0)}


def main():
    r = subprocess.run([BIN, "validate", CASE], capture_output=True, text=True, timeout=60)
    check(r.returncode == 0, "the demo validates", r.stdout[-500:] + r.stderr)
    with tempfile.TemporaryDirectory() as tmp:
        out = os.path.join(tmp, "out.json")
        r = subprocess.run([BIN, "check", CASE, "--json", out], capture_output=True, text=True, timeout=120)
        check(r.returncode == 0, "check exits 0 (PASS)", r.stdout[-2000:] + r.stderr)
        if not os.path.exists(out):
            return
        with open(out, encoding="utf-8") as f:
            j = json.load(f)
    pts = {p["name"]: p for p in j["points"]}
    check(len(pts) == 5 and all(p["converged"] for p in pts.values()), "five points, all converged", str(list(pts)))
    check(j["verdict"] == "pass", "verdict pass", str(j["verdict"]))
    s = {(c["name"], c["where"]): c for c in j["checks"]}
    ws = s.get(("velocity_suction_max", "water/suction"), {})
    check(ws.get("limit") == 2.0 and ws.get("limit_source") == "loop", "water suction judged by its loop's 2 m/s", str(ws))
    os_ = s.get(("velocity_suction_max", "oil/suction"), {})
    check(os_.get("limit") == 1.2 and os_.get("limit_source") == "default", "oil suction judged by the 1.2 m/s default")
    cold_start_flows(pts["cold_start"])
    for name, (rpm, housing_pa, ambient_c, housing_heat_w) in POINTS.items():
        p = pts[name]
        energy(p, ambient_c, housing_heat_w)
        thermostat(p)
        housing(p, housing_pa)
        taylor_warnings(p, r.stdout, rpm)


if __name__ == "__main__":
    main()
    finish()
