#!/usr/bin/python3
"""Independent check: the drain temperature of a bearing that heats its oil
by 500 W is the temperature at which the oil's enthalpy has risen by
Q / m, h = integral of cp dT, with cp by Cragoe's relation integrated here by
scipy (quad, brentq) - not T_in + Q / (m cp(T_in)).

Invented case (built here): a feed held at 40 degC and 2 bar, one
jet-lubricated rolling bearing whose friction loss is given as 500 W
(loss_power), draining into a housing at 0 bar g; "work_heat": false, so
the oil receives exactly the 500 W (the dissipation of the feed pressure is
left out, as in a hand calculation). Oil: ISO VG 46 style data, kv40 46 cSt,
kv100 6.8 cSt, 875 kg/m3 at 15 degC (invented).

References:
  cp = (0.388 + 0.00045 t_F) / sqrt(s) BTU/(lb F), Cragoe, NBS Misc. Publ.
  97 (1929) (from memory); s = rho(60 F) / rho_water(60 F), the oil's density
  rho15 (1 - alpha (T - 288.15)), alpha = 6.4e-4 1/K (common practice), water
  by IAPWS-95 (python3-iapws); 1 BTU/(lb F) = 4186.8 J/(kg K) (NIST SP 811).
Checked: loopwright's housing node temperature, the bearing's reported
outlet_temperature and its oil_temperature_rise against T_out of
  integral from T_in to T_out of cp dT = Q / m
to 1e-9 K + 1e-7 of the rise (the two cp implementations agree to ~5e-8:
loopwright takes rho_water(60 F) = 999.017 kg/m3, IAPWS-95 gives 999.0171).
The cp-at-inlet answer is printed beside it and must differ by > 1 K (the
check can tell them apart).
"""
import json
import math
import os
import subprocess
import sys
import tempfile

from iapws import IAPWS95
from scipy.integrate import quad
from scipy.optimize import brentq

BIN = os.environ.get("LOOPWRIGHT_BIN")
RESULTS = []

RHO15, ALPHA = 875.0, 6.4e-4
T60F = (60 - 32) / 1.8 + 273.15
S6060 = RHO15 * (1 - ALPHA * (T60F - 288.15)) / IAPWS95(T=T60F, P=0.101325).rho
Q_BEARING = 500.0
T_FEED = 313.15


def cp(t):
    t_f = (t - 273.15) * 1.8 + 32
    return 4186.8 * (0.388 + 0.00045 * t_f) / math.sqrt(S6060)


def record(name, ok):
    RESULTS.append(ok)
    print(f"{'PASS' if ok else 'FAIL'} {name}")


def case_doc():
    return {
        "name": "500 W bearing drain temperature (invented)",
        "description": "built by tests/network/point/bearing_enthalpy_test.py",
        "thermal": True,
        "work_heat": False,
        "fluids": {"oil": {"kind": "oil", "kv40": "46 cSt", "kv100": "6.8 cSt", "density_15C": "875 kg/m3"}},
        "loops": [{
            "id": "oil", "fluid": "oil", "temperature": "40 degC",
            "nodes": [
                {"id": "feed", "elevation": "0 m",
                 "boundary": {"kind": "pressure", "pressure": "2 bar", "temperature": "40 degC"}},
                {"id": "housing", "elevation": "0 m", "boundary": {"kind": "pressure", "pressure": "0 bar"}}],
            "components": [
                {"id": "bearing", "type": "rolling_bearing", "from": "feed", "to": "housing",
                 "diameter": "0.5 mm", "loss_power": "500 W"}]}]}


def main():
    if not BIN or not os.path.exists(BIN):
        print("FAIL: LOOPWRIGHT_BIN not set or missing")
        return 1
    with tempfile.TemporaryDirectory() as d:
        path, out = os.path.join(d, "bearing.json"), os.path.join(d, "r.json")
        json.dump(case_doc(), open(path, "w"))
        run = subprocess.run([BIN, "solve", path, "--json", out, "-q"], capture_output=True, text=True, timeout=120)
        if not os.path.exists(out):
            print(f"FAIL: loopwright solve failed: {run.stdout} {run.stderr}")
            return 1
        doc = json.load(open(out))
    p = doc["points"][0]
    record("loopwright converged", p["converged"])
    b = {c["id"]: c for c in p["components"]}["bearing"]
    t_node = {n["id"]: n for n in p["nodes"]}["housing"]["temperature_K"]
    m, t_in = b["mass_flow_kg_s"], b["details"]["inlet_temperature_K"]
    record(f"bearing heat {b['heat_W']:.12g} W is the given 500 W (work heat left out)",
           abs(b["heat_W"] - Q_BEARING) <= 1e-9 * Q_BEARING)
    record(f"inlet temperature {t_in} K is the feed's", abs(t_in - T_FEED) <= 1e-9)
    target = Q_BEARING / m
    t_out = brentq(lambda t: quad(cp, t_in, t, epsabs=0.0, epsrel=1e-13)[0] - target, t_in, t_in + 400.0,
                   xtol=1e-12, rtol=8.9e-16)
    t_inlet_cp = t_in + Q_BEARING / (m * cp(t_in))
    rise = t_out - t_in
    tol = 1e-9 + 1e-7 * rise
    print(f"INFO m = {m:.6e} kg/s: integral of cp gives {t_out - 273.15:.4f} degC, loopwright node "
          f"{t_node - 273.15:.4f} degC, reported outlet {b['details']['outlet_temperature_K'] - 273.15:.4f} degC, "
          f"cp at the inlet would give {t_inlet_cp - 273.15:.4f} degC")
    record(f"housing node temperature within {tol:.2e} K of the integral ({abs(t_node - t_out):.2e} K)",
           abs(t_node - t_out) <= tol)
    record("reported outlet temperature within tolerance of the integral",
           abs(b["details"]["outlet_temperature_K"] - t_out) <= tol)
    record("reported oil_temperature_rise within tolerance of the integral's rise",
           abs(b["details"]["oil_temperature_rise_K"] - rise) <= tol)
    record(f"cp at the inlet is {t_inlet_cp - t_out:.2f} K off: the check tells the two apart",
           t_inlet_cp - t_out > 1.0)
    npass = sum(RESULTS)
    print(f"{npass} passed, {len(RESULTS) - npass} failed")
    return 0 if npass == len(RESULTS) else 1


if __name__ == "__main__":
    sys.exit(main())
