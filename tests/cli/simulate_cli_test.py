"""Drives `loopwright simulate` (LOOPWRIGHT_BIN) on the turbo test-stand demo's
scenarios (README, "Through time"): every pump stopped runs to the end with
zero flow; the soak-back peak of the housing comes minutes after a hot
shutdown and the after-run water pump cuts most of its rise; the turbine
casing's output obeys its own lumped heat balance, recomputed here from the
case's data; the CSV holds the JSON's series; an unknown scenario is exit 2, as
is a missing --scenario unless the case has only one;
no progress bar when stderr is not a terminal.
Outside values: the lumped-capacitance balance m c dT/dt = sum of the heat
paths (Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed.,
Eq. 5.2 with Eq. 1.7 for radiation), the Stefan-Boltzmann constant (CODATA
2018, 5.670374419e-8 W/(m2 K4)) and the case file's own inputs.
Prints "N passed, M failed" and exits non-zero on any failure.
"""

import csv
import json
import os
import subprocess
import sys
import tempfile

BIN = os.environ.get("LOOPWRIGHT_BIN", "loopwright")
SRC = os.environ.get("LOOPWRIGHT_SOURCE_DIR", os.path.join(os.path.dirname(__file__), "..", ".."))
CASE = os.path.join(SRC, "cases", "turbo_test_stand.json")
SIGMA = 5.670374419e-8  # W/(m2 K4), CODATA 2018

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tools"))
from tally import check, finish  # noqa: E402


def run(*args):
    r = subprocess.run([BIN, *args], capture_output=True, text=True, timeout=600)
    return r.returncode, r.stdout, r.stderr


def simulate(tmp, scenario):
    j, c = os.path.join(tmp, scenario + ".json"), os.path.join(tmp, scenario + ".csv")
    code, out, err = run("simulate", CASE, "--scenario", scenario, "--json", j, "--csv", c)
    check(code in (0, 1) and "completed" in out, f"{scenario}: runs to its end", err[-800:])
    check("simulating" not in err, f"{scenario}: no progress bar off a terminal", err[-300:])
    with open(j) as f:
        return json.load(f), c


def peak(d, what):
    return next(p for p in d["peaks"] if p["what"] == what)


with tempfile.TemporaryDirectory() as tmp:
    hot, hot_csv = simulate(tmp, "hot_shutdown")
    after, _ = simulate(tmp, "hot_shutdown_afterrun")

    # --- every pump stopped: zero flow everywhere, to the end ---------------
    t = hot["time_s"]
    check(abs(t[-1] - 3600) < 1e-9, "hot_shutdown reaches 60 min", str(t[-1]))
    # What remains is buoyancy-driven: oil seeping back through the stopped
    # gear pump's slip and water circulating by thermosiphon through the
    # stopped centrifugal pump (hot water rising from the jacket); both are
    # small against the running flows (oil about 11 L/min, water 40 L/min).
    for loop, limit in (("oil", 0.02), ("water", 0.3)):
        worst = max(abs(v) for k, v in hot["flow_m3_s"].items() if k.startswith(loop + "/") for v in v)
        check(worst * 60000 < limit, f"both pumps stopped: every {loop} flow below {limit} L/min",
              f"{worst * 60000:.3g} L/min")

    # --- soak-back: a peak minutes after shutdown, cut by the after-run -----
    ph, pa = peak(hot, "bearing_housing"), peak(after, "bearing_housing")
    rise_hot, rise_after = ph["peak_K"] - ph["start_K"], pa["peak_K"] - pa["start_K"]
    check(60 <= ph["time_s"] <= 1200, "housing peak 1 to 20 min after shutdown", f"{ph['time_s']} s")
    check(rise_hot > 30, "housing soaks back by over 30 K without after-run", f"{rise_hot:.1f} K")
    check(rise_after < 0.25 * rise_hot, "after-run cuts the housing rise to under a quarter",
          f"{rise_after:.1f} K vs {rise_hot:.1f} K")
    check(abs(ph["start_K"] - pa["start_K"]) < 1e-6, "both shutdowns start from the same settled state",
          f"{ph['start_K']} {pa['start_K']}")
    # A peak at the run's last instant may lie beyond it: flagged. The soak-back
    # peak comes minutes in (not flagged); warming up from 0 degC, the housing
    # is still warming when cold_start_warmup ends (README's table: 36.0 degC
    # at 2400 s, its end).
    warm, _ = simulate(tmp, "cold_start_warmup")
    pw = peak(warm, "bearing_housing")
    check(not ph["at_end"] and pw["at_end"] and abs(pw["time_s"] - warm["time_s"][-1]) < 1e-6,
          "a peak at the run's end is flagged at_end, a soak-back peak is not", f"{ph} {pw}")
    code, out, _ = run("simulate", CASE, "--scenario", "cold_start_warmup")
    check("note: bearing_housing is highest at the run's end" in out and "may still be rising" in out,
          "the printed table notes a peak at the run's end", out[:1500])

    # --- the casing obeys its lumped balance (central differences) ----------
    cs = json.loads("\n".join(l for l in open(CASE) if not l.lstrip().startswith("//")))
    tc = hot["mass_temperature_K"]["turbine_casing"]
    th = hot["mass_temperature_K"]["bearing_housing"]
    ta = 273.15 + 40.0  # full_power_hot_day's ambient
    mc = 4 * 500.0      # 4 kg x 500 J/(kg.K)
    worst = 0.0
    for i in range(2, len(t) - 1):
        dtdt = (tc[i + 1] - tc[i - 1]) / (t[i + 1] - t[i - 1])
        q = -2.0 * (tc[i] - ta) - 0.85 * SIGMA * 0.06 * (tc[i] ** 4 - ta ** 4) - 1.5 * (tc[i] - th[i])
        worst = max(worst, abs(mc * dtdt - q) / max(1.0, abs(q)))
    check(worst < 0.02, "casing: m c dT/dt = heat paths within 2 % at every output", f"{worst:.3g}")
    check(cs["thermal_masses"][0]["id"] == "turbine_casing", "the case's first mass is the casing")

    # --- the CSV holds the JSON's series -------------------------------------
    with open(hot_csv) as f:
        rows = list(csv.reader(f))
    check(len(rows) == len(t) + 1, "CSV: a row per output instant", f"{len(rows)} vs {len(t)}")
    col = rows[0].index("T bearing_housing [K]")
    diff = max(abs(float(rows[i + 1][col]) - th[i]) for i in range(len(t)))
    check(diff < 1e-6, "CSV and JSON agree on the housing temperature", f"{diff:.3g}")

code, out, err = run("simulate", CASE, "--scenario", "hot_shutdwn")
check(code == 2 and "did you mean \"hot_shutdown\"" in err, "unknown scenario: exit 2 with the nearest name", err)

# A start point with no steady answer: the run stops (exit 3) and says where and why (the solver's cause: the
# node that ran past the oil model's range), not an empty reason.
runaway = os.path.join(SRC, "tests", "network", "failure_cases", "simulate_start_runaway.json")
code, out, err = run("simulate", runaway, "--scenario", "stop")
check(code == 3 and "node oil/" in err and "200 degC" in err and "A larger cooler" in err,
      "start without a steady answer: exit 3, the node and the likely cause named", err[-600:])

# Without --scenario: a case's only scenario is run (the same stop as above), a case with several is
# told to name one (exit 2, listing them), a case with none says so (exit 2).
code, out, err = run("simulate", runaway)
check(code == 3 and "node oil/" in err, "one scenario: run without --scenario", err[-600:])
code, out, err = run("simulate", CASE)
check(code == 2 and "error[no-scenario]" in err and "hot_shutdown" in err,
      "several scenarios and no --scenario: exit 2 naming them", err)
code, out, err = run("simulate", os.path.join(SRC, "cases", "gearbox_lube_skid.json"))
check(code == 2 and "declares no scenario" in err, "no scenario at all: exit 2 saying so", err)

finish()
