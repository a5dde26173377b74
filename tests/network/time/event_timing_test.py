"""Sizing in time (`loopwright simulate --earliest EVENT --keep WHAT --below
LIMIT`, network/time/event_timing.h) against a closed form.

The case: a hot mass (C1 = 1000 J/K, 200 degC) gives heat through G12 = 4 W/K
to a housing (C2 = 400 J/K, 20 degC) that an after-run flow cools into a
reservoir held at 20 degC: G_on = (10^3 + 0.5^3)^(1/3) W/K while the flow
runs at its rated flow (the Churchill-Usagi blend of forced and natural
convection, Incropera et al., Fundamentals of Heat and Mass Transfer, 6th
ed., sec. 9.9, with the case's 10 W/K forced and 0.5 W/K natural), 0.5 W/K
after the event that stops it. x = T - 20 degC obeys x' = A x, piecewise
constant A, so x(t) = expm(A_on t) x0 before the event at tau and
expm(A_off (t - tau)) x(tau) after (the lumped-capacitance network,
Incropera Eq. 5.2). The housing's peak P(tau) is located here by scipy
(minimize_scalar about the largest of 601 samples), and the shortest
after-run keeping it at or below 90 degC is scipy's brentq root of
P(tau) - 70 K. The code's answer (1 s tolerance, the bracket's passing end)
must lie within [tau*, tau* + 2 s] and its verifying run's peak within
0.01 K of P at that answer. A bracket whose latest event still lets the peak
through is refused (exit 1, the peak named).
Prints "N passed, M failed".
"""

import json
import os
import subprocess
import sys
import tempfile

import numpy as np
from scipy.linalg import expm
from scipy.optimize import brentq, minimize_scalar

BIN = os.environ.get("LOOPWRIGHT_BIN", "loopwright")
sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "..", "tools"))
from tally import check, finish  # noqa: E402

CASE = {
    "name": "after-run sizing", "thermal": True,
    "fluids": {"oil": {"kind": "oil", "kv40": "46 cSt", "kv100": "6.8 cSt", "density_15C": "870 kg/m3",
                       "expansion": 0, "specific_heat": "2000 J/(kg.K)"}},
    "loops": [{"id": "oil", "fluid": "oil", "temperature": "20 degC",
               "nodes": [{"id": "a", "boundary": {"kind": "reservoir", "pressure": "0 bar", "temperature": "20 degC"}},
                         {"id": "b", "boundary": {"kind": "reservoir", "pressure": "0 bar", "temperature": "20 degC"}}],
               # 0.0087 kg/s at 870 kg/m3 is 1e-5 m3/s = 0.6 L/min, the link's rated flow.
               "components": [{"id": "meter", "type": "fixed_flow", "from": "a", "to": "b", "mass_flow": "0.0087 kg/s"}]}],
    "thermal_masses": [
        {"id": "hot", "mass": "2 kg", "specific_heat": "500 J/(kg.K)", "initial_temperature": "200 degC",
         "to_masses": [{"mass": "housing", "conductance": "4 W/K"}]},
        {"id": "housing", "mass": "1 kg", "specific_heat": "400 J/(kg.K)", "initial_temperature": "20 degC",
         "to_fluid": [{"node": "oil/a", "conductance": "10 W/K", "flow_of": "oil/meter", "rated_flow": "0.6 L/min",
                       "exponent": 0.8, "natural": "0.5 W/K"}]}],
    "scenarios": [{"id": "soak", "start": {"temperature": "20 degC"}, "end": "3000 s", "output_interval": "10 s",
                   "events": [{"name": "after-run ends", "at": "600 s", "set": {"oil/meter/mass_flow": "0 kg/s"}}]}],
}

C1, C2, G12 = 1000.0, 400.0, 4.0
G_ON, G_OFF = (10.0 ** 3 + 0.5 ** 3) ** (1 / 3), 0.5
X0 = np.array([180.0, 0.0])


def a_matrix(g):
    return np.array([[-G12 / C1, G12 / C1], [G12 / C2, -(G12 + g) / C2]])


def housing(t, tau):
    if t <= tau:
        return (expm(a_matrix(G_ON) * t) @ X0)[1]
    return (expm(a_matrix(G_OFF) * (t - tau)) @ (expm(a_matrix(G_ON) * tau) @ X0))[1]


def peak(tau, end=3000.0):
    ts = np.linspace(0.0, end, 601)
    i = int(np.argmax([housing(t, tau) for t in ts]))
    lo, hi = ts[max(i - 1, 0)], ts[min(i + 1, len(ts) - 1)]
    r = minimize_scalar(lambda t: -housing(t, tau), bounds=(lo, hi), method="bounded", options={"xatol": 1e-6})
    return -r.fun


def run(path, *args):
    r = subprocess.run([BIN, "simulate", path, "--scenario", "soak", *args], capture_output=True, text=True, timeout=600)
    return r.returncode, r.stdout, r.stderr


tau_star = brentq(lambda tau: peak(tau) - 70.0, 0.0, 600.0, xtol=1e-6)
with tempfile.TemporaryDirectory() as tmp:
    path, out = os.path.join(tmp, "case.json"), os.path.join(tmp, "answer.json")
    with open(path, "w") as f:
        json.dump(CASE, f)
    code, so, se = run(path, "--earliest", "after-run ends", "--keep", "housing", "--below", "90 degC",
                       "--up-to", "1000 s", "--json", out)
    check(code == 0, "the sizing run answers", se[-600:])
    with open(out) as f:
        ans = json.load(f)["event_timing"]
    check(tau_star - 1e-3 <= ans["time_s"] <= tau_star + 2.0, "shortest after-run within [tau*, tau* + 2 s]",
          f"{ans['time_s']:.3f} s vs {tau_star:.3f} s (closed form)")
    p = peak(ans["time_s"])
    check(abs(ans["peak_K"] - 293.15 - p) < 0.01 and ans["peak_K"] <= 363.15 + 1e-9,
          "the verifying run's peak is the closed form's at that time, at or below the limit",
          f"{ans['peak_K'] - 273.15:.4f} degC vs {p + 20:.4f} degC")
    check("the earliest \"after-run ends\"" in so, "the answer is printed", so[:300])
    # A limit no after-run up to 60 s can keep: refused, naming the peak.
    code, so, se = run(path, "--earliest", "after-run ends", "--keep", "housing", "--below", "90 degC", "--up-to", "60 s")
    check(code == 1 and "still lets \"housing\" reach" in se, "a bracket that cannot keep the limit is refused", se[-400:])
    code, so, se = run(path, "--earliest", "pump stops", "--keep", "housing", "--below", "90 degC")
    check(code == 1 and "no event \"pump stops\"" in se, "an unknown event is named", se[-400:])
    code, so, se = run(path, "--earliest", "after-run ends", "--keep", "housing", "--below", "90 bar")
    check(code == 2 and "--below" in se, "a limit in the wrong unit is exit 2", se[-400:])
    # A misspelt mass is bad input (exit 2) naming the nearest id, before any run.
    code, so, se = run(path, "--earliest", "after-run ends", "--keep", "housin", "--below", "90 degC")
    check(code == 2 and "\"housin\" is neither a thermal mass nor a node" in se and "did you mean \"housing\"" in se,
          "an unknown --keep is exit 2 with the nearest name", se[-400:])
finish()
