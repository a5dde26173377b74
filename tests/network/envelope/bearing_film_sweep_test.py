"""Eccentricity from load across an envelope sweep (README "Eccentricity from
load"). Drives `loopwright check --json` (LOOPWRIGHT_BIN) on
tests/network/check_cases/bearing_film_sweep.json (invented data): a journal
bearing with a 500 N load at 10000 rpm, eccentricity by short-bearing theory, at
isothermal points 40..120 degC and the derived hot corner (120 degC), with a
deliberately small 8 um clearance.

Asserted against values from outside the code:
  - the reported eccentricity at each point against an independent
    recomputation: the oil's viscosity by ASTM D341 (Walther) through the
    case's kv40 = 32 cSt and kv100 = 5.4 cSt, times the density the run
    reports (mass flow over volume flow, allowed by the test rules), the
    Sommerfeld number S = (r/c)^2 mu N / P with the case's geometry, load
    and speed, and eps by scipy's brentq root of Ocvirk's load components
    (NACA TN 2808, 1952, from memory; summed here as W = hypot(W_r, W_t),
    not the code's closed form); tolerance 1e-9 relative in eps (the Walther
    form written here and the library's agree to rounding; the density is
    the reported one);
  - the eccentricity rises strictly with the oil temperature at constant
    load (thinner oil, smaller S);
  - film_thickness_min: the limit is Trumpler's for d = 40 mm, 0.0002 in +
    0.00004 d = 6.68 um (Shigley 9th ed. ch. 12, from memory); the check
    passes at 40 degC and fails at the hot corner, and the run exits 1;
  - a limit written on the bearing ("checks": {"film_thickness_min":
    "3 um"}, the case's input) judges it instead, from source "component";
  - positive control: the same case with a 30 um clearance passes
    film_thickness_min at every point, so the failure is the clearance's;
  - start_unit_load_max: 500 N / (20 mm x 40 mm) = 0.625 MPa against the
    300 psi = 2.068 MPa default (Trumpler, from memory), passing.
  - the effective film temperature of the APU demo's bearings
    (cases/apu_test_cell.json, thermal points named with a heat_soak in the
    case): T_f - T_in must be half the film's rise, (friction + heat soak) /
    (m cp at T_in). Recomputed from the run's reported oil temperature rise
    through the bearing (its enthalpy balance, which also carries the Q dp
    work, here removed by its share) with cp's temperature dependence from
    Cragoe's relation, cp proportional to 0.388 + 0.00045 t[degF] (NBS Misc.
    Publ. 97, 1929: the enthalpy of a linear cp over the rise is the cp at
    its middle, and the specific gravity cancels in the ratio). The friction
    power and the heat soak are the run's report and the case's input; the
    value under test is the film temperature. Tolerance 1e-6 relative (the
    passes settle the temperatures far below that); a fraction other than
    one half, or a film rise without the heat soak, misses by 2x or 13-40 %.
Prints "N passed, M failed".
"""

import copy
import json
import math
import os
import subprocess
import sys
import tempfile

from scipy.optimize import brentq

BIN = os.environ.get("LOOPWRIGHT_BIN", "loopwright")
SRC = os.environ.get("LOOPWRIGHT_SOURCE_DIR", os.path.join(os.path.dirname(__file__), "..", "..", ".."))
CASE = os.path.join(SRC, "tests", "network", "check_cases", "bearing_film_sweep.json")

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "..", "tools"))
from refcheck import strip_comments  # noqa: E402
from tally import check, finish  # noqa: E402

D, LAND_TOTAL, LOAD, RPM, C = 0.040, 0.020, 500.0, 10000.0, 8e-6  # the case's bearing
PSI = 6894.757293168  # Pa, NIST SP 811 B.8


def walther_nu_cst(t_k, kv40=32.0, kv100=5.4):
    """ASTM D341: log10 log10(nu + 0.7) = A - B log10 T (nu in cSt, T in K)."""
    z40, z100 = math.log10(math.log10(kv40 + 0.7)), math.log10(math.log10(kv100 + 0.7))
    b = (z40 - z100) / (math.log10(373.15) - math.log10(313.15))
    a = z40 + b * math.log10(313.15)
    return 10 ** (10 ** (a - b * math.log10(t_k))) - 0.7


def ocvirk_eps(s, l_over_d):
    def s_of(e):  # W from Ocvirk's load components, r = c = 1, mu U = 1
        l, d = 2.0 * l_over_d, 2.0
        k = l ** 3
        w = math.hypot(k * e * e / (1 - e * e) ** 2, k * math.pi * e / (4 * (1 - e * e) ** 1.5))
        return (1.0 / (2 * math.pi)) / (w / (l * d))
    return brentq(lambda e: s_of(e) - s, 1e-12, 0.99, xtol=1e-15)


def run(case, tmp, tag):
    path = os.path.join(tmp, tag + ".json")
    with open(path, "w", encoding="utf-8") as f:
        json.dump(case, f, indent=1)
    out = os.path.join(tmp, tag + ".out.json")
    r = subprocess.run([BIN, "check", path, "--json", out, "--no-fix"], capture_output=True, text=True, timeout=120)
    with open(out, encoding="utf-8") as f:
        return r.returncode, json.load(f)


def bearing(point):
    return next(c for c in point["components"] if c["id"] == "bearing")


def film_check(point):
    return next(c for c in point["checks"] if c["name"] == "film_thickness_min")


with open(CASE, encoding="utf-8") as f:
    base = json.loads(strip_comments(f.read()))

with tempfile.TemporaryDirectory() as tmp:
    rc, res = run(base, tmp, "small")
    check(rc == 1, "a failing film check makes check exit 1", f"exit {rc}")
    pts = {p["name"]: p for p in res["points"]}
    check("hot_corner" in pts and len(pts) == 6, "five grid points and the derived hot corner", str(list(pts)))
    sweep = sorted((p for p in res["points"] if p["name"].startswith("sweep")),
                   key=lambda p: float(p["name"].split("=")[1].split(" ")[0]))
    eps_list = []
    for p in sweep:
        t_c = float(p["name"].split("=")[1].split(" ")[0])
        b = bearing(p)
        det = b["details"]
        rho = b["mass_flow_kg_s"] / b["flow_m3_s"]
        mu = walther_nu_cst(t_c + 273.15) * 1e-6 * rho
        s = (0.020 / C) ** 2 * mu * (RPM / 60.0) / (LOAD / (LAND_TOTAL * D))
        ref = ocvirk_eps(s, 0.5 * LAND_TOTAL / D)
        eps = det["eccentricity"]
        eps_list.append(eps)
        print(f"{p['name']}: eps {eps:.7f} ref {ref:.7f} rel {abs(eps - ref) / ref:.2e}")
        check(abs(eps - ref) <= 1e-9 * ref, f"{p['name']}: eccentricity {eps:.5f} vs Walther + brentq {ref:.5f}")
        check(abs(det["sommerfeld_number"] - s) <= 1e-3 * s, f"{p['name']}: Sommerfeld {det['sommerfeld_number']:.5g} vs {s:.5g}")
        check(abs(det["min_film_thickness_m"] - C * (1 - ref)) <= C * 2e-4,
              f"{p['name']}: h0 {det['min_film_thickness_m'] * 1e6:.3f} um = c (1 - eps)")
    check(all(b > a for a, b in zip(eps_list, eps_list[1:])), "eccentricity rises with temperature at constant load",
          ", ".join(f"{e:.4f}" for e in eps_list))
    cold, hot = film_check(sweep[0]), film_check(pts["hot_corner"])
    trumpler = 0.0002 * 0.0254 + 0.00004 * D
    check(abs(hot["limit"] - trumpler) <= 1e-15 and abs(cold["limit"] - trumpler) <= 1e-15,
          f"the limit is Trumpler's {trumpler * 1e6:.2f} um", str(hot["limit"]))
    check(cold["pass"] and not hot["pass"], "film_thickness_min passes at 40 degC and fails at the hot corner",
          f"40 degC {cold['value'] * 1e6:.2f} um, hot {hot['value'] * 1e6:.2f} um")
    ul = next(c for c in pts["hot_corner"]["checks"] if c["name"] == "start_unit_load_max")
    check(abs(ul["value"] - LOAD / (LAND_TOTAL * D)) <= 1e-6 and abs(ul["limit"] - 300 * PSI) <= 1e-6 and ul["pass"],
          "start unit load 0.625 MPa against 300 psi", f"{ul['value']} vs {ul['limit']}")

    placed = copy.deepcopy(base)
    placed["loops"][0]["components"][0]["checks"] = {"film_thickness_min": "3 um"}
    rc4, res4 = run(placed, tmp, "placed")
    hot4 = film_check(next(p for p in res4["points"] if p["name"] == "hot_corner"))
    check(rc4 == 0 and hot4["pass"] and abs(hot4["limit"] - 3e-6) <= 1e-18 and hot4["limit_source"] == "component",
          "a bearing's own film_thickness_min (3 um, its \"checks\") replaces Trumpler's and passes the hot corner",
          f"exit {rc4}, {hot4}")

    wide = copy.deepcopy(base)
    wide["loops"][0]["components"][0]["radial_clearance"] = "30 um"
    rc2, res2 = run(wide, tmp, "wide")
    ok = all(film_check(p)["pass"] for p in res2["points"])
    check(ok and rc2 == 0, "positive control: 30 um clearance passes film_thickness_min everywhere, exit 0", f"exit {rc2}")


def cragoe_cp_shape(t_k):
    return 0.388 + 0.00045 * ((t_k - 273.15) * 1.8 + 32.0)


APU = os.path.join(SRC, "cases", "apu_test_cell.json")
with open(APU, encoding="utf-8") as f:
    apu = json.loads(strip_comments(f.read()))
soak = {p["name"]: float(p["values"]["heat_soak"].split()[0]) for p in apu["envelope"]["points"]
        if "heat_soak" in p["values"] and p["values"]["heat_soak"].endswith(" W")}
with tempfile.TemporaryDirectory() as tmp:
    rc3, res3 = run(apu, tmp, "apu")
    check(rc3 == 0, "the APU demo passes its checks", f"exit {rc3}")
    n = 0
    for p in res3["points"]:
        if p["name"] not in soak:
            continue
        for c in p["components"]:
            if c["type"] != "journal_bearing":
                continue
            det = c["details"]
            t_in, rise, fric = det["inlet_temperature_K"], det["oil_temperature_rise_K"], det["friction_power_W"]
            qdp = c["flow_m3_s"] * c["dp_Pa"]
            film_heat = fric + soak[p["name"]]
            want = 0.5 * rise * film_heat / (film_heat + qdp) * cragoe_cp_shape(t_in + 0.5 * rise) / cragoe_cp_shape(t_in)
            got = det["film_temperature_K"] - t_in
            n += 1
            check(abs(got - want) <= 1e-6 * want, f"APU {p['name']} {c['id']}: film 0.5 of the film's rise",
                  f"T_f - T_in {got:.6f} K, recomputed {want:.6f} K")
            check(abs(det["film_temperature_max_K"] - (t_in + 2 * want)) <= 1e-5,
                  f"APU {p['name']} {c['id']}: hottest film is the inlet plus the whole film rise")
    check(n >= 6, "the APU's named thermal points with a heat soak were all compared", str(n))

sys.exit(finish())
