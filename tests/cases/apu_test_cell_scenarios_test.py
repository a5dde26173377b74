"""The APU demo's scenarios (cases/apu_test_cell.json, invented data) through
`loopwright simulate` (LOOPWRIGHT_BIN), checked against values recomputed here
from the case's own inputs and published relations:

  - Stopped rotor, oil pump running on (hot_shutdown_afterrun, 0 < t < 10
    min): each journal rests on its bush, and its side flow is the land-flow
    law at the held eccentricity 0.99,
      Q = pi p r c^3 (1 + 1.5 eps^2) / (3 mu l')
    (Budynas & Nisbett, Shigley's Mechanical Engineering Design, 9th ed.,
    Eq. 12-22, from memory), p the feed above the housing from the run's node
    pressures (both at 1.2 m: no head), mu at the feed temperature from ASTM
    D341 (Walther, Z = nu + 0.7) through the oil part's 25 cSt at 40 degC and
    5 cSt at 100 degC, density 1000 kg/m3 at 15 degC with linear expansion
    6.4e-4 1/K (common practice). A centred journal (eps = 0) would pass
    2.47 times less: the test tells the held value from a wrong one. The
    run's warnings say the rotor is stopped for the whole run.
  - The bearing housing obeys its lumped balance m c dT/dt = sum of its heat
    paths (Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed.,
    Eq. 5.2 with Eq. 1.7 for radiation; Stefan-Boltzmann constant CODATA
    2018), each path recomputed from the case's conductances, the
    Churchill-Usagi blend G = (G_f^3 (|Q|/Q_r)^(3n) + G_n^3)^(1/3)
    (Incropera sec. 9.9) with the run's flows, by central differences on the
    10 s output, within 2 % of the largest path (the after-run scenario
    while its pumps run: afterwards the stopped jacket's thermosiphon flow
    starts and stops within seconds).
  - Soak-back: with no heat input after t = 0 no temperature can exceed the
    hottest one present at t = 0 (the maximum principle of the heat
    equation; here the hot section's start); the housing's peak comes
    minutes after shutdown, and the after-run keeps the housing below its
    no-after-run peak by over 20 K.
Prints "N passed, M failed".
"""

import json
import math
import os
import subprocess
import sys
import tempfile

BIN = os.environ.get("LOOPWRIGHT_BIN", "loopwright")
SRC = os.environ.get("LOOPWRIGHT_SOURCE_DIR", os.path.join(os.path.dirname(__file__), "..", ".."))
CASE = os.path.join(SRC, "cases", "apu_test_cell.json")
SIGMA = 5.670374419e-8  # W/(m2 K4), CODATA 2018
G = 9.80665

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tools"))
from oil_reference import d341_viscosity, expanded_density  # noqa: E402
from tally import check, finish  # noqa: E402


def nu_d341(t_c):
    return d341_viscosity(t_c, 25.0, 40.0, 5.0, 100.0)


def rho_oil(t_c):
    return expanded_density(t_c, 1000.0)


def simulate(tmp, scenario):
    j = os.path.join(tmp, scenario + ".json")
    r = subprocess.run([BIN, "simulate", CASE, "--scenario", scenario, "--json", j], capture_output=True, text=True,
                       timeout=600)
    check(r.returncode in (0, 1) and "completed" in r.stdout, f"{scenario}: runs to its end", r.stderr[-800:])
    with open(j) as f:
        return json.load(f)


def peak(d, what):
    return next(p for p in d["peaks"] if p["what"] == what)


def land_flow(dp, t_c, d, length, groove, c, eps=0.99):
    r, land = d / 2, (length - groove) / 2
    mu = nu_d341(t_c) * 1e-6 * rho_oil(t_c)
    return math.pi * dp * r * c ** 3 * (1 + 1.5 * eps * eps) / (3 * mu * land)


BEARINGS = {"front": (0.030, 0.020, 0.004, 82e-6), "rear": (0.025, 0.018, 0.004, 70e-6)}


def check_stopped_bearings(d):
    t, T, p, q = d["time_s"], d["node_temperature_K"], d["node_pressure_Pa"], d["flow_m3_s"]
    for name, (dia, length, groove, c) in BEARINGS.items():
        worst, n = 0.0, 0
        for i, ti in enumerate(t):
            if not 10.0 <= ti <= 590.0:
                continue
            feed = f"oil/{name}_feed"
            want = land_flow(p[feed][i] - p["oil/housing"][i], T[feed][i] - 273.15, dia, length, groove, c)
            worst, n = max(worst, abs(q[f"oil/{name}_bearing"][i] / want - 1)), n + 1
        check(n > 50 and worst < 1e-6, f"{name} bearing, rotor stopped, pump on: land-flow law at eps 0.99",
              f"{n} instants, worst relative error {worst:.3g}")
        w = [x for x in d["warnings"] if x["where"] == f"oil/{name}_bearing" and "rotor stopped" in x["text"]]
        check(len(w) == 1 and w[0]["from_s"] == 0 and w[0]["to_s"] == 3600 and "carries no load" in w[0]["text"],
              f"{name} bearing: the run warns the film carries no load, 0 to 3600 s", str(w))


def blend(g_f, g_n, q, q_r, n=0.8):
    return (g_f ** 3 * (abs(q) / q_r) ** (3 * n) + g_n ** 3) ** (1 / 3)


def check_housing_balance(d, label, until=3600.0):
    t, m, T, q = d["time_s"], d["mass_temperature_K"], d["node_temperature_K"], d["flow_m3_s"]
    th, ths, ta = m["bearing_housing"], m["hot_section"], 273.15 + 45.0  # full_power_hot_day's ambient
    worst = 0.0
    for i in range(1, len(t) - 1):
        if t[i] > until or any(abs(t[i] - e) <= 10.0 for e in (0.0, 600.0)):  # not across an event
            continue
        paths = [4.0 * (ths[i] - th[i]),
                 blend(15.0, 0.8, q["oil/front_bearing"][i], 1e-3 / 60) * (T["oil/housing"][i] - th[i]),
                 blend(40.0, 2.0, q["jacket/jacket"][i], 40e-3 / 60) * (T["jacket/jacket_out"][i] - th[i]),
                 1.0 * (ta - th[i]), 0.5 * SIGMA * 0.05 * (ta ** 4 - th[i] ** 4)]
        dtdt = (th[i + 1] - th[i - 1]) / (t[i + 1] - t[i - 1])
        worst = max(worst, abs(5.0 * 900.0 * dtdt - sum(paths)) / max(abs(x) for x in paths))
    check(worst < 0.02, f"{label}: housing m c dT/dt = its heat paths within 2 %", f"{worst:.3g}")


with tempfile.TemporaryDirectory() as tmp:
    hot = simulate(tmp, "hot_shutdown")
    after = simulate(tmp, "hot_shutdown_afterrun")
    cold = simulate(tmp, "cold_start_warmup")

    check_stopped_bearings(after)
    check_housing_balance(hot, "hot_shutdown")
    # After the after-run the stopped jacket's thermosiphon starts and stops
    # within seconds (its flow jumps between 0 and 0.3 L/min), which central
    # differences over 10 s cannot follow: the pumped part only.
    check_housing_balance(after, "hot_shutdown_afterrun, pumps running", until=590.0)

    ph, pa = peak(hot, "bearing_housing"), peak(after, "bearing_housing")
    hottest0 = peak(hot, "hot_section")["start_K"]
    everything = [v for s in ("node_temperature_K", "mass_temperature_K") for v in hot[s].values()]
    check(max(max(v) for v in everything) <= hottest0 + 1e-9, "no temperature above the hottest at shutdown",
          f"{max(max(v) for v in everything) - 273.15:.2f} vs {hottest0 - 273.15:.2f} degC")
    check(60 <= ph["time_s"] <= 1200 and ph["peak_K"] - ph["start_K"] > 20,
          "housing soaks back by over 20 K, 1 to 20 min after shutdown",
          f"{ph['peak_K'] - ph['start_K']:.1f} K at {ph['time_s']} s")
    th = after["mass_temperature_K"]["bearing_housing"]
    late = max(v for ti, v in zip(after["time_s"], th) if ti >= 600)
    check(ph["peak_K"] - max(late, pa["peak_K"]) > 20, "the after-run keeps the housing over 20 K below the soak-back peak",
          f"{max(late, pa['peak_K']) - 273.15:.1f} vs {ph['peak_K'] - 273.15:.1f} degC")
    feeds = [c for c in cold["checks"] if c["name"] == "warmup_time_max"]
    check(len(feeds) == 2, "cold start: a warm-up time for each bearing feed", str(feeds))

finish()
