#!/usr/bin/python3
"""Independent cross-check of a whole-network solve (invented branched case).

The network of tests/network/branched_case.json (gear pump with slip and
internal relief, filter with bypass, supply tube, bypass valve, two bearing
feed tubes, a restrictor orifice in the rear feed, two pressure-fed journal
bearings into a housing held at a pressure boundary) is solved by loopwright
(lw_probe solve, which prints the results document of network/envelope/results.h and
the fluid state the network used) and again here, independently, with
scipy.optimize.root (MINPACK hybrd) on a different formulation: the unknowns
are the free node pressures and the filter element drop; every branch flow is
computed from its pressure drop by the law in its published form, inverting
the pipe and orifice laws with scipy.optimize.brentq. Only the oil's density
and viscosity are taken from loopwright's output, so that the network alone
is compared. The start is loopwright's answer perturbed by 2 % (the laws are
monotone, so the root is unique); the root is accepted only when the scaled
residuals are below 1e-12.

Laws (published forms):
  pipes    Darcy-Weisbach, f from fluids.friction.Churchill_1977 (Churchill,
           Chem. Eng. 84(24):91-92, 1977; all regimes). fluids'
           friction_factor(Method='Churchill_1977') is the same function for
           Re >= 2040 and substitutes 64/Re below (checked here); fittings by
           fluids.fittings.Hooper2K (Hooper, Chem. Eng., Aug. 24, 1981), by
           fluids' own table name. loopwright's reported Darcy f is compared
           with Churchill_1977 at its reported Re (our f*Re product form).
  valve    IEC 60534-2-1 Eq. (1), turbulent, no valve size (F_R = 1):
           Q [m3/h] = Kv sqrt(dp [bar] / (rho/rho0)), rho0 = water at 15 degC
           from IAPWS-95 (python3-iapws); Kv = Kvs (leak + (1 - leak) x) for a
           linear trim (leak = 1e-4, loopwright's default). At the solution,
           fluids.control_valve.size_control_valve_l must return that Kv
           (to 1e-6: fluids' rho0 differs from IAPWS-95 by 7e-7).
  bearings Q = pi p r c^3 (1 + 1.5 eps^2) / (3 mu l')  (Shigley's Mechanical
           Engineering Design, 9th ed., Eq. 12-22, from memory).
  orifice  an in-line plate (pipe_diameter given): the network sees its
           permanent loss, the inertial part of the orifice equation
           dp = (1 - beta^4) rho Q|Q| / (2 Cd_inf^2 A0^2) times the ISO 5167-2
           5.4 loss ratio from fluids.flow_meter.dP_orifice (C = 0.61), plus
           the whole viscous part (1 - beta^4) rho Q|Q| / (2 A0^2 delta^2 Re_d),
           Re_d = 4 rho Q/(pi d mu), delta^2 = 1/(12 pi) (low-Re Cd = delta
           sqrt(Re): Sampson's 1891 creeping flow through a thin plate).
  pump     Q = D n/(2 pi) - C_s dP/mu - Q_rf max(0, dP - p_c)/(p_f - p_c)
           (Merritt, Hydraulic Control Systems, 1967, ch. 7, from memory).
  filter   element Q_e = x/(a mu c) (Darcy 1856), housing b rho Q|Q|, bypass
           Q_bf max(0, x - p_c)/(p_f - p_c) (ISO 3968 separation of drops).
  statics  dp = p_from - p_to + rho g (z_from - z_to), g = scipy.constants.g;
           reservoir pressure rho g level.
The pump relief and filter bypass above use the hard ramp max(0, .); loopwright
smooths it with softplus of width w = 0.02 (p_f - p_c), which differs from the
ramp by w ln(1 + exp(-|x - p_c|/w)); the script checks that at every point the
difference is below 1e-8 of the branch flow (so it cannot matter at 1e-6).

Data: the case's invented values, restated here in SI (the topology and the
envelope values are read from the case and the probe output).
Agreement required: 1e-6 relative on every free node pressure, every branch
flow, the filter element drop, bypass flow and pump relief flow.
Prints the worst relative error and "N passed, M failed"; exits 1 on failure.
"""
import json
import math
import os
import re
import subprocess
import sys

import numpy as np
from iapws import IAPWS95
from scipy.constants import g as G
from scipy.optimize import brentq, root
import fluids.flow_meter as fm
from fluids.control_valve import size_control_valve_l
from fluids.fittings import Hooper2K
from fluids.friction import Churchill_1977, friction_factor

SRC = os.environ.get("LOOPWRIGHT_SOURCE_DIR", os.path.join(os.path.dirname(__file__), "..", "..", ".."))
PROBE = os.environ.get("LOOPWRIGHT_PROBE")
CASE = os.path.join(SRC, "tests", "network", "branched_case.json")
TOL = 1e-6

LPM = 1.0 / 60000.0
ELBOW_LR = "Elbow, 90°, Long-radius (R/D = 1.5), All types"  # fluids.fittings.Hooper key
TUBE_ROUGHNESS = 1.5e-6  # tube default roughness, drawn tubing (components/registry.cpp)
RHO0 = IAPWS95(T=288.15, P=0.101325).rho  # water at 15 degC, IEC 60534 reference

# Invented data of branched_case.json, SI.
Z = {"sump": 0.0, "pump_out": 0.0, "filter_out": 0.2, "header": 0.8, "front_feed": 0.8,
     "rear_restrictor_in": 0.8, "rear_feed": 0.8, "housing": 0.8}
SUMP_LEVEL = 0.3
HOUSING_P = 0.2e5
FREE = ["pump_out", "filter_out", "header", "front_feed", "rear_restrictor_in", "rear_feed"]
PUMP = dict(disp=10e-6, slip=5e-13, pc=9e5, pf=11e5, qrf=8 * LPM)
FILTER = dict(qr=20 * LPM, edp=0.3e5, nur=32e-6, rhor=870.0, hdp=0.05e5, pc=1.5e5, pf=2.0e5)
TUBES = {"supply": dict(L=2.0, D=0.010, fit=[ELBOW_LR, ELBOW_LR]),
         "front_line": dict(L=0.8, D=0.006, fit=[]),
         "rear_line": dict(L=1.4, D=0.006, fit=[ELBOW_LR])}
VALVE = dict(kvs=1.0, opening=0.5, leak=1e-4)
ORIFICE = dict(d=0.0012, D=0.006, cd=0.61, delta=(12 * math.pi) ** -0.5)
BEARINGS = {"front_bearing": dict(D=0.040, L=0.025, w=0.005, c=60e-6, e=0.5),
            "rear_bearing": dict(D=0.035, L=0.022, w=0.005, c=55e-6, e=0.4)}
EDGES = {"pump": ("sump", "pump_out"), "filter": ("pump_out", "filter_out"), "supply": ("filter_out", "header"),
         "bypass": ("header", "sump"), "front_line": ("header", "front_feed"),
         "rear_line": ("header", "rear_restrictor_in"), "rear_restrictor": ("rear_restrictor_in", "rear_feed"),
         "front_bearing": ("front_feed", "housing"), "rear_bearing": ("rear_feed", "housing")}

RESULTS = []


def record(name, ok, detail=""):
    RESULTS.append(ok)
    print(f"{'PASS' if ok else 'FAIL'} {name}{': ' + detail if detail else ''}")


def rel(a, b, floor):
    return abs(a - b) / max(abs(b), floor)


# ----------------------------------------------------------------- laws


def pipe_dp(q, rho, mu, t):
    """Darcy-Weisbach with Churchill (1977) f and Hooper 2-K fittings."""
    if q == 0.0:
        return 0.0
    a = math.pi * t["D"] ** 2 / 4
    v = q / a
    re = rho * abs(v) * t["D"] / mu
    f = Churchill_1977(re, TUBE_ROUGHNESS / t["D"])
    k = sum(Hooper2K(t["D"] / 0.0254, re, name=n) for n in t["fit"])  # Hooper: D in inches
    return (f * t["L"] / t["D"] + k) * rho * v * abs(v) / 2


def invert(dp_of_q, dp, q_scale):
    """Q with dp_of_q(Q) = dp, for an odd increasing dp_of_q."""
    if dp == 0.0:
        return 0.0
    s = 1.0 if dp > 0 else -1.0
    hi = q_scale
    while dp_of_q(s * hi) * s < abs(dp):
        hi *= 2.0
    return s * brentq(lambda q: dp_of_q(s * q) * s - abs(dp), 0.0, hi, xtol=1e-30, rtol=8.9e-16, maxiter=500)


def orifice_dp(q, rho, mu):
    o = ORIFICE
    a0 = math.pi * o["d"] ** 2 / 4
    beta4 = (o["d"] / o["D"]) ** 4
    if q == 0.0:
        return 0.0
    re_d = 4 * rho * abs(q) / (math.pi * o["d"] * mu)
    ratio = fm.dP_orifice(D=o["D"], Do=o["d"], P1=2e5, P2=1e5, C=o["cd"]) / 1e5
    inv_cd2 = ratio / o["cd"] ** 2 + 1 / (o["delta"] ** 2 * re_d)
    return (1 - beta4) * rho * q * abs(q) * inv_cd2 / (2 * a0 * a0)


def valve_q(dp, rho):
    kv = VALVE["kvs"] * (VALVE["leak"] + (1 - VALVE["leak"]) * VALVE["opening"])
    q_h = kv * math.sqrt(abs(dp) / 1e5 / (rho / RHO0))
    return math.copysign(q_h / 3600.0, dp)


def bearing_q(dp, mu, b):
    r, land = b["D"] / 2, (b["L"] - b["w"]) / 2
    return math.pi * dp * r * b["c"] ** 3 * (1 + 1.5 * b["e"] ** 2) / (3 * mu * land)


def pump_q(rise, mu, n):
    p = PUMP
    relief = p["qrf"] * max(0.0, rise - p["pc"]) / (p["pf"] - p["pc"])
    return p["disp"] * n / (2 * math.pi) - p["slip"] * rise / mu - relief, relief


def filter_coeffs():
    f = FILTER
    a = f["edp"] / (f["nur"] * f["rhor"] * f["qr"])
    b = f["hdp"] / (f["rhor"] * f["qr"] ** 2)
    return a, b


def filter_q(x, mu, clog):
    f = FILTER
    a, _ = filter_coeffs()
    qe = x / (a * mu * clog)
    qb = f["qr"] * max(0.0, x - f["pc"]) / (f["pf"] - f["pc"])
    return qe + qb, qe, qb


# ------------------------------------------------------------- network


def flows(p, x, st):
    """Branch flows [m3/s] from node pressures p (dict), element drop x."""
    rho, mu, n, clog = st["rho"], st["mu"], st["n"], st["clog"]

    def dp(c):
        a, b = EDGES[c]
        return p[a] - p[b] + rho * G * (Z[a] - Z[b])

    q = {}
    q["pump"], relief = pump_q(-dp("pump"), mu, n)
    q["filter"], qe, qb = filter_q(x, mu, clog)
    qs = PUMP["disp"] * n / (2 * math.pi)
    for t in TUBES:
        q[t] = invert(lambda v, t=t: pipe_dp(v, rho, mu, TUBES[t]), dp(t), qs)
    q["bypass"] = valve_q(dp("bypass"), rho)
    q["rear_restrictor"] = invert(lambda v: orifice_dp(v, rho, mu), dp("rear_restrictor"), qs)
    for b in BEARINGS:
        q[b] = bearing_q(dp(b), mu, BEARINGS[b])
    extra = {"relief": relief, "media": qe, "bypass_flow": qb, "filter_dp": dp("filter")}
    return q, extra


def residuals(u, st):
    p = {"sump": st["rho"] * G * SUMP_LEVEL, "housing": HOUSING_P}
    for i, name in enumerate(FREE):
        p[name] = u[i] * 1e5
    x = u[len(FREE)] * 1e5
    q, extra = flows(p, x, st)
    qs = PUMP["disp"] * st["n"] / (2 * math.pi)
    r = []
    for node in FREE:
        net = sum(q[c] for c, (a, b) in EDGES.items() if b == node) - \
              sum(q[c] for c, (a, b) in EDGES.items() if a == node)
        r.append(net / qs)
    _, b = filter_coeffs()
    qf = q["filter"]
    r.append((extra["filter_dp"] - (x + b * st["rho"] * qf * abs(qf))) / 1e5)
    return np.array(r)


def probe(*args):
    out = subprocess.run([PROBE, *args], capture_output=True, text=True, timeout=120)
    if out.returncode != 0:
        raise RuntimeError(f"lw_probe {' '.join(args)} failed: {out.stderr.strip()}")
    return json.loads(out.stdout)


def read_case():
    text = open(CASE, encoding="utf-8").read()
    text = "\n".join(re.sub(r"^\s*//.*$", "", line) for line in text.splitlines())
    return json.loads(text)


def main():
    if not PROBE or not os.path.exists(PROBE):
        print("FAIL: LOOPWRIGHT_PROBE not set or missing")
        return 1
    case = read_case()
    comps = {c["id"]: (c["from"], c["to"]) for c in case["loops"][0]["components"]}
    record("case topology matches this script's restatement", comps == EDGES,
           "" if comps == EDGES else f"case {comps} vs script {EDGES}")
    out = probe("solve", CASE)
    record("loopwright converged at every point", out["verdict"] == "solved", out["verdict"])
    states = {s["point"]: s["loops"][0] for s in out["fluid_states"]}
    worst_all = 0.0
    rng = np.random.default_rng(20240601)
    for pt in out["points"]:
        name = pt["name"]
        st = {"rho": states[name]["rho_kg_m3"], "mu": states[name]["mu_Pa_s"],
              "n": pt["values"]["pump_speed_rad_s"], "clog": pt["values"]["clogging"]}
        lw_p = {n["id"]: n["pressure_Pa"] for n in pt["nodes"]}
        lw_c = {c["id"]: c for c in pt["components"]}
        record(f"{name}: loopwright boundary pressures are rho g level and the housing setting",
               rel(lw_p["sump"], st["rho"] * G * SUMP_LEVEL, 1.0) <= 1e-12 and
               rel(lw_p["housing"], HOUSING_P, 1.0) <= 1e-12)
        u0 = np.array([lw_p[n] / 1e5 for n in FREE] + [lw_c["filter"]["details"]["element_dp_Pa"] / 1e5])
        u0 *= 1.0 + 0.02 * rng.uniform(-1, 1, u0.size)
        sol = root(residuals, u0, args=(st,), method="hybr", options={"xtol": 1e-15, "maxfev": 20000})
        res = np.max(np.abs(residuals(sol.x, st)))
        record(f"{name}: scipy root converged (max scaled residual {res:.2e})", res <= 1e-12)
        p = {"sump": st["rho"] * G * SUMP_LEVEL, "housing": HOUSING_P}
        p.update({n: sol.x[i] * 1e5 for i, n in enumerate(FREE)})
        x = sol.x[len(FREE)] * 1e5
        q, extra = flows(p, x, st)
        qs = PUMP["disp"] * st["n"] / (2 * math.pi)
        # Hard ramp vs softplus: precondition for comparing at 1e-6.
        for label, val, pc, pf, qrf, qref in [
                ("pump relief", -(p["sump"] - p["pump_out"]), PUMP["pc"], PUMP["pf"], PUMP["qrf"], q["pump"]),
                ("filter bypass", x, FILTER["pc"], FILTER["pf"], FILTER["qr"], q["filter"])]:
            w = 0.02 * (pf - pc)
            z = abs(val - pc) / w
            smooth_gap = qrf / (pf - pc) * w * (math.log1p(math.exp(-z)) if z < 700 else 0.0)
            record(f"{name}: {label} {z:.1f} widths from its crack (ramp vs softplus {smooth_gap / abs(qref):.1e})",
                   smooth_gap <= 1e-8 * abs(qref))
        worst, where = 0.0, ""
        pairs = [(f"p({n})", lw_p[n], p[n], 1.0) for n in FREE]
        pairs += [(f"Q({c})", lw_c[c]["flow_m3_s"], q[c], 1e-12) for c in EDGES]
        d_f = lw_c["filter"]["details"]
        d_p = lw_c["pump"]["details"]
        pairs += [("filter element dp", d_f["element_dp_Pa"], x, 1.0),
                  ("filter bypass flow", d_f["bypass_flow_m3_s"], extra["bypass_flow"], 1e-12),
                  ("pump relief flow", d_p["relief_flow_m3_s"], extra["relief"], 1e-12)]
        for label, ours, ref, floor in pairs:
            e = rel(ours, ref, floor)
            if e > worst:
                worst, where = e, label
        worst_all = max(worst_all, worst)
        record(f"{name}: loopwright vs independent solution, worst rel. error {worst:.2e} at {where}", worst <= TOL)
        # The regime each point is meant to show.
        if name == "clogged":
            record(f"{name}: the filter bypass is open", extra["bypass_flow"] > 0.05 * q["filter"])
        else:
            record(f"{name}: the filter bypass is closed", extra["bypass_flow"] == 0.0)
        if name == "overspeed":
            record(f"{name}: the pump relief lifts", extra["relief"] > 0.01 * qs)
        else:
            record(f"{name}: the pump relief is closed", extra["relief"] == 0.0)
        record(f"{name}: both bearings fed from feed to housing", q["front_bearing"] > 0 and q["rear_bearing"] > 0)
        # fluids' IEC sizing returns the valve's Kv at the solved state.
        ambient = out["ambient_pressure_Pa"]
        p1 = p["header"] + ambient
        dpv = p["header"] - p["sump"] + st["rho"] * G * (Z["header"] - Z["sump"])
        kv = size_control_valve_l(st["rho"], 1.0, 2e6, st["mu"], p1, p1 - dpv, q["bypass"],
                                  allow_choked=False, allow_laminar=False)
        kv_want = VALVE["kvs"] * (VALVE["leak"] + (1 - VALVE["leak"]) * VALVE["opening"])
        record(f"{name}: fluids.control_valve.size_control_valve_l gives Kv {kv:.9f} (want {kv_want:.9f})",
               rel(kv, kv_want, 1e-300) <= 1e-6)
        # Our Churchill f*Re form against fluids at loopwright's reported Re.
        for t in TUBES:
            d = lw_c[t]["details"]
            f_ref = Churchill_1977(d["reynolds"], TUBE_ROUGHNESS / TUBES[t]["D"])
            ok = rel(d["darcy_friction_factor"], f_ref, 1e-300) <= 1e-12
            if d["reynolds"] >= 2040:  # fluids' friction_factor uses Churchill only here
                ok = ok and rel(friction_factor(d["reynolds"], TUBE_ROUGHNESS / TUBES[t]["D"],
                                                Method="Churchill_1977"), f_ref, 1e-300) <= 1e-15
            record(f"{name}: {t} Darcy f at Re {d['reynolds']:.0f} equals fluids' Churchill_1977", ok)
    npass = sum(RESULTS)
    nfail = len(RESULTS) - npass
    print(f"worst relative error loopwright vs independent solution: {worst_all:.3e} (tolerance {TOL:g})")
    print(f"{npass} passed, {nfail} failed")
    return 0 if nfail == 0 and npass > 0 else 1


if __name__ == "__main__":
    sys.exit(main())
