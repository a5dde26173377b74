"""The turbocharger test-stand demo (cases/turbo_test_stand.json, invented
data) checked end to end through the command line (LOOPWRIGHT_BIN), with the
numbers that matter recomputed here from outside the code:

  - `validate` and `check` exit 0; all five points converge; the verdict is
    PASS; the water loop's suction answers to its own 2 m/s limit (loop
    "checks"), the oil suction to the 1.2 m/s default.
  - Cold start, both floating ring bearings: the bearing's flow as the
    network inside it, solved here numerically (scipy brentq on the inner
    groove's pressure): the outer film's side flow in parallel with the ring
    holes (Hagen-Poiseuille) in series with the inner film's side flow, each
    film Q = pi p r c^3 (1 + 1.5 eps^2) / (3 mu l') (Budynas & Nisbett,
    Shigley's Mechanical Engineering Design, 9th ed., Eq. 12-22, from
    memory), with p_s the feed pressure above the housing the run reports
    and mu at 0 degC from ASTM D341 (Walther, Z = nu + 0.7) through the oil
    part's 32 cSt at 40 degC and 5.4 cSt at 100 degC, density by linear
    expansion 6.4e-4 1/K from 870 kg/m3 at 15 degC (common practice); the
    isoviscous ring speed ratio 1 / (1 + (R_o/R_i)^3 (L_o/L_i)(c_i/c_o))
    (Shaw & Nussdorfer 1947, from memory) with each film's eccentricity
    factor sqrt(1 - eps^2) (the Couette torque of an eccentric film).
  - Eccentricity from load (the case's 12 N and 18 N, Ocvirk): each film's
    eccentricity from Ocvirk's short-bearing closed form
    S = (D/l)^2 (1 - eps^2)^2 / (pi eps sqrt(pi^2 (1 - eps^2) + 16 eps^2))
    (Ocvirk 1952; Hamrock, Fundamentals of Fluid Film Lubrication, ch. 10;
    from memory), inverted here by scipy brentq, with S = (r/c)^2 mu N / P,
    P = W / (2 l' d) per land; the inner film's wedge turns at the sum of the
    shaft's and the ring's speeds, the outer film's at the ring's (from
    memory); ring speed and both eccentricities solved together here by
    scipy fsolve (isoviscous at the cold start, at the reported film
    temperatures when running). The reported eccentricities, h0 = c (1 - eps)
    and the ring speed ratio agree.
  - Every running point, both bearings: the ring speed ratio from the torque
    balance with D341 viscosities at the film temperatures the run reports;
    the films' friction P_i + P_o equals the shaft's Petroff torque times its
    speed (energy closure) and, with the case's heat soak and the drop's
    dissipation Q dp, the bearing's heat.
  - Every thermal point: each loop's heat (component heat_W, boundary losses
    included) sums to the heat the case adds within 0.5 % of the added heat
    (first law, summed here from the per-component results); the thermostat
    senses the filter outlet, its travel in the linear middle of its band is
    (T - 60 degC) / (80 - 60 degC) (the element's stated law, case inputs); the
    housing sits at the case's housing pressure plus the drain's own small
    back pressure; the drain runs part full (fill <= 0.5).
  - The check text names a film's Taylor-number warning where that film's
    Taylor number Ta = (rho U c / mu) sqrt(c / r) (G. I. Taylor 1923,
    critical 41.3 = sqrt(1708), from memory), recomputed with D341 at the
    film's reported temperature and the relative speed of its surfaces, is
    above 41.3, and not where it is below; the reported Taylor numbers agree.
  - The centrifugal-head warning of the ring holes appears where
    rho (s omega)^2 (R_o^2 - R_b^2) / 2 exceeds a quarter of the inner groove's
    pressure (the bearing's own warning rule), and not where it is below.
Tolerances: the D341 line and the linear expansion here are the library's
own relations (ASTM D341; common practice), and the JSON carries full
doubles, so the bearing values agree to rounding (measured 1e-15); they are
held to 1e-9, which a wrong film temperature, torque or flow coefficient
(1e-3 and more) cannot meet (eccentricities, h0 and the ratio at 1e-8: the
bearing settles its films and eccentricities to 1e-10). The heat balances keep 0.5 % (the first law
summed over a loop, thermostat and drain are the network's).
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
from oil_reference import d341_viscosity, expanded_density  # noqa: E402
from tally import check, finish  # noqa: E402

# Floating ring bearing geometry (inputs, as written in the case file): shaft
# radius, inner film length, groove, clearance; ring outer radius, outer film
# length, groove, clearance; holes; the steady loads (eccentricity from load).
R_I, L_I, W_I, C_I = 5.5e-3, 7e-3, 1.5e-3, 25e-6
R_O, L_O, W_O, C_O = 7.5e-3, 9e-3, 3e-3, 60e-6
N_HOLE, D_HOLE = 4, 1.2e-3
LOAD = {"compressor_bearing": 12.0, "turbine_bearing": 18.0}  # [N]
COLD_RPM = 20000.0
BAND = (60.0, 80.0)  # thermostat start_to_open, full_open [degC]


def nu_d341(t_c):
    return d341_viscosity(t_c, 32.0, 40.0, 5.4, 100.0)


def rho_oil(t_c):
    return expanded_density(t_c, 870.0)


def taylor(rho, nu_cst, speed_rad_s, r, c):
    return speed_rad_s * r * c / (nu_cst * 1e-6) * math.sqrt(c / r)


def side_flow_coefficient(r, c, length, groove, eps):
    """Q mu / p of a film fed at mid-length, both lands (Shigley Eq. 12-22)."""
    return math.pi * r * c ** 3 * (1 + 1.5 * eps ** 2) / (3 * 0.5 * (length - groove))


def ocvirk_eps(r, c, length, groove, mu, omega, load):
    """Eccentricity of a grooved film from Ocvirk's closed form (brentq)."""
    from scipy.optimize import brentq
    land = 0.5 * (length - groove)
    l_d = land / (2 * r)
    s_num = (r / c) ** 2 * mu * (omega / (2 * math.pi)) / (load / (2 * land * 2 * r))
    ocv = lambda e: (1 / l_d) ** 2 * (1 - e * e) ** 2 / (math.pi * e * math.sqrt(math.pi ** 2 * (1 - e * e) + 16 * e * e))  # noqa: E731
    return brentq(lambda e: ocv(e) - s_num, 1e-12, 0.99, xtol=1e-15, rtol=1e-15)


def ring_state(mu_i, mu_o, omega, load):
    """Ring speed ratio and both films' eccentricities, solved together."""
    from scipy.optimize import fsolve

    def resid(x):
        s, ei, eo = x
        g = (R_O / R_I) ** 3 * ((L_O - W_O) / (L_I - W_I)) * (C_I / C_O) * math.sqrt(1 - ei ** 2) / math.sqrt(1 - eo ** 2)
        return [s - 1 / (1 + g * mu_o / mu_i), ei - ocvirk_eps(R_I, C_I, L_I, W_I, mu_i, omega * (1 + s), load),
                eo - ocvirk_eps(R_O, C_O, L_O, W_O, mu_o, omega * s, load)]
    s, ei, eo = fsolve(resid, [0.4, 0.3, 0.3], xtol=1e-12)
    return s, ei, eo


def ring_flow(ps, mu, eps_i, eps_o):
    """Feed flow [m3/s] of the bearing at feed pressure ps [Pa] above the
    housing: p_in, the inner groove's pressure, balances the holes' flow
    against the inner lands' (scipy brentq), outer lands in parallel."""
    from scipy.optimize import brentq
    k_o = side_flow_coefficient(R_O, C_O, L_O, W_O, eps_o)
    k_i = side_flow_coefficient(R_I, C_I, L_I, W_I, eps_i)
    wall = R_O - (R_I + C_I)
    holes = lambda dp: N_HOLE * math.pi * D_HOLE ** 4 * dp / (128 * mu * wall)  # noqa: E731
    p_in = brentq(lambda p: holes(ps - p) - k_i * p / mu, 0.0, ps, xtol=1e-12, rtol=1e-14)
    return k_o * ps / mu + k_i * p_in / mu, p_in


def petroff_torque(mu, omega_rel, r, length, c, eps):
    """Couette torque of an eccentric full film (Petroff / sqrt(1 - eps^2))."""
    return 2 * math.pi * mu * omega_rel * r ** 3 * length / c / math.sqrt(1 - eps ** 2)


def comp(point, loop, cid):
    return next(c for c in point["components"] if c["id"] == cid and c.get("loop", loop) == loop)


def node(point, loop, nid):
    return next(n for n in point["nodes"] if n["id"] == nid and n["loop"] == loop)


def cold_start_flows(p):
    for bid in ("compressor_bearing", "turbine_bearing"):
        b = comp(p, "oil", bid)
        d = b["details"]
        ps = d["feed_pressure_above_drain_Pa"]
        mu = nu_d341(0.0) * 1e-6 * rho_oil(0.0)
        s, eps_i, eps_o = ring_state(mu, mu, COLD_RPM * math.pi / 30, LOAD[bid])
        eccentricities(p, bid, eps_i, eps_o)
        q, p_in = ring_flow(ps, mu, eps_i, eps_o)
        check(math.isclose(b["flow_m3_s"], q, rel_tol=1e-9), f"cold start {bid}: {q * 6e4:.4f} L/min (films and holes, "
              "Shigley 12-22, Hagen-Poiseuille, D341)", f"{b['flow_m3_s'] * 6e4:.5f} L/min")
        check(math.isclose(d["inner_feed_pressure_Pa"], p_in, rel_tol=1e-6), f"cold start {bid}: inner groove at "
              f"{p_in / 1e5:.4f} bar", str(d["inner_feed_pressure_Pa"]))
        check(math.isclose(d["ring_speed_ratio"], s, rel_tol=1e-9), f"cold start {bid}: isoviscous ring speed ratio "
              f"{s:.4f} (Shaw & Nussdorfer, films from load)", str(d["ring_speed_ratio"]))


def eccentricities(p, bid, eps_i, eps_o):
    d = comp(p, "oil", bid)["details"]
    for film, eps, c in (("inner", eps_i, C_I), ("outer", eps_o, C_O)):
        check(math.isclose(d[film + "_eccentricity"], eps, rel_tol=1e-8), f"{p['name']} {bid}: {film} eccentricity "
              f"{eps:.4f} (Ocvirk, {LOAD[bid]:.0f} N)", str(d[film + "_eccentricity"]))
        check(math.isclose(d[film + "_min_film_thickness_m"], c * (1 - eps), rel_tol=1e-7), f"{p['name']} {bid}: {film} "
              f"h0 {c * (1 - eps) * 1e6:.2f} um", str(d[film + "_min_film_thickness_m"]))


def films(p, rotor_rpm, soak_w):
    """Ring speed from the torque balance at the reported film temperatures;
    the films' friction is the shaft's power; heat = friction + soak."""
    w = rotor_rpm * 2 * math.pi / 60
    for bid, soak in (("compressor_bearing", 0.0), ("turbine_bearing", soak_w)):
        b = comp(p, "oil", bid)
        d = b["details"]
        t_i, t_o = d["inner_film_temperature_K"] - 273.15, d["outer_film_temperature_K"] - 273.15
        mu_i, mu_o = nu_d341(t_i) * 1e-6 * rho_oil(t_i), nu_d341(t_o) * 1e-6 * rho_oil(t_o)
        s, eps_i, eps_o = ring_state(mu_i, mu_o, w, LOAD[bid])
        check(math.isclose(d["ring_speed_ratio"], s, rel_tol=1e-8), f"{p['name']} {bid}: ring speed ratio {s:.4f} "
              f"(torque balance, films at {t_i:.1f} / {t_o:.1f} degC)", str(d["ring_speed_ratio"]))
        eccentricities(p, bid, eps_i, eps_o)
        torque = petroff_torque(mu_i, w * (1 - s), R_I, L_I - W_I, C_I, eps_i)
        pf = d["inner_film_friction_power_W"] + d["outer_film_friction_power_W"]
        check(math.isclose(pf, torque * w, rel_tol=1e-8), f"{p['name']} {bid}: films' friction = shaft power "
              f"{torque * w:.2f} W", f"{pf:.3f} W")
        work = b["flow_m3_s"] * d["feed_pressure_above_drain_Pa"]  # the drop's dissipation, Q dp (work heat)
        check(math.isclose(b["heat_W"], d["friction_power_W"] + soak + work, rel_tol=1e-6),
              f"{p['name']} {bid}: heat = friction + heat soak {soak:.0f} W + Q dp {work:.2f} W", f"{b['heat_W']} W")
        check(t_i > t_o > d["inlet_temperature_K"] - 273.15, f"{p['name']} {bid}: inner film hotter than outer, "
              "outer hotter than feed")


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


def shown(text, point, needle):
    return any(needle in ln and re.search(r"\(at [^)]*\b" + point + r"\b", ln) for ln in text.splitlines())


def taylor_warnings(p, text, rotor_rpm):
    w = rotor_rpm * 2 * math.pi / 60
    for bid in ("compressor_bearing", "turbine_bearing"):
        d = comp(p, "oil", bid)["details"]
        s = d["ring_speed_ratio"]
        for film, key, r, c, rel in (("inner", "inner_film", R_I, C_I, w * (1 - s)), ("outer", "outer_film", R_O, C_O, w * s)):
            t = d[key + "_temperature_K"] - 273.15
            ta = taylor(rho_oil(t), nu_d341(t), rel, r, c)
            check(math.isclose(d[key + "_taylor"], ta, rel_tol=1e-9), f"{p['name']} {bid}: {film} film Taylor {ta:.2f}",
                  str(d[key + "_taylor"]))
            line = f"oil/{bid}: {film} film Taylor number"
            if ta > 41.3 * 1.05:
                check(shown(text, p["name"], line), f"{p['name']} {bid}: {film} Ta {ta:.0f} > 41.3, warned", text[-1500:])
            elif ta < 41.3 * 0.95:
                check(not shown(text, p["name"], line), f"{p['name']} {bid}: {film} Ta {ta:.1f} < 41.3, no warning")


def centrifugal_warnings(p, text, rotor_rpm):
    w = rotor_rpm * 2 * math.pi / 60
    for bid in ("compressor_bearing", "turbine_bearing"):
        b = comp(p, "oil", bid)
        d = b["details"]
        rho = b["mass_flow_kg_s"] / b["flow_m3_s"]
        head = 0.5 * rho * (d["ring_speed_ratio"] * w) ** 2 * (R_O ** 2 - (R_I + C_I) ** 2)
        line = f"oil/{bid}: the ring holes' centrifugal head"
        frac = head / d["inner_feed_pressure_Pa"]
        if frac > 0.25 * 1.05:
            check(shown(text, p["name"], line), f"{p['name']} {bid}: hole head {head / 1e5:.2f} bar = {100 * frac:.0f}% of "
                  "the inner feed, warned", text[-1500:])
        elif frac < 0.25 * 0.95:
            check(not shown(text, p["name"], line), f"{p['name']} {bid}: hole head {100 * frac:.0f}% of the inner feed, no warning")


# Per point (case inputs): rotor speed [rpm], housing pressure [Pa], ambient [degC], housing heat [W],
# turbine-side heat soak [W].
POINTS = {"idle": (40000, 0.1e5, 10.0, 500.0, 40.0), "full_power_hot_day": (150000, 2e5, 40.0, 6000.0, 300.0),
          "dirty_filter": (150000, 2e5, 30.0, 6000.0, 300.0), "fan_stopped": (60000, 0.3e5, 25.0, 800.0, 80.0)}


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
    for name, (rpm, housing_pa, ambient_c, housing_heat_w, soak_w) in POINTS.items():
        p = pts[name]
        energy(p, ambient_c, housing_heat_w)
        thermostat(p)
        housing(p, housing_pa)
        films(p, rpm, soak_w)
        taylor_warnings(p, r.stdout, rpm)
        centrifugal_warnings(p, r.stdout, rpm)


if __name__ == "__main__":
    main()
    finish()
