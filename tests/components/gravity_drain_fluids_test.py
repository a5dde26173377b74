#!/usr/bin/python3
"""Reference check: the gravity drain's capacity against an independent
recomputation with python3-fluids and scipy.

Run by Debian's /usr/bin/python3; the probe binary (LOOPWRIGHT_PROBE) reports
the component's design_capacity and flood_capacity (component.describe).

Independent recomputation, written here from the sources, not from the
component:
  part full: the wetted area and perimeter of a circle at depth y/D (Chow,
    "Open-Channel Hydraulics", 1959, Table 2-1, from memory), hydraulic
    radius R = A/P, uniform flow S = f V^2 / (8 g R) (Darcy–Weisbach on 4R,
    French 1985 Ch. 4, from memory), f = fluids.friction.Churchill_1977(Re,
    eps/4R) with Re = V 4R / nu, V found by scipy.optimize.brentq;
  running full: rho g H + p_cav = (f L/D + K) rho V^2/2 with the same f on D,
    solved for V by brentq.
Cases: warm and thin oils and water in turbulent flow (Re 3e3 .. 1e5), fills
0.2 .. 0.9, plus a laminar one. The Manning-equation shape of the part-full
curve (the greatest flow near 0.94 full, above the full-bore flow; Chow,
from memory) is checked on the turbulent water drain.
Tolerance 1e-6 relative: both sides solve the same published relations to
1e-13; a wrong wetted perimeter (e.g. including the free surface) moves the
capacity by more than 10 %.
"""
import math
import os
import sys
import json

from fluids.friction import Churchill_1977  # noqa: E402
from scipy.optimize import brentq  # noqa: E402

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tools"))
from refcheck import check, probe, probe_missing, summary  # noqa: E402

G = 9.80665  # standard gravity (CGPM 1901)


def darcy_f(re, ed):
    # fluids' Churchill_1977 overflows at very small Re; below Re 100 Churchill's
    # f equals 64/Re to far below double precision (its turbulent term is < 1e-37 of it).
    return 64.0 / re if re < 100.0 else Churchill_1977(re, ed)


def part_full(d, slope, fill, rho, mu, eps):
    theta = 2.0 * math.acos(1.0 - 2.0 * fill)
    area = d * d * (theta - math.sin(theta)) / 8.0
    perim = d * theta / 2.0
    dh = 4.0 * area / perim
    nu = mu / rho

    def excess(v):
        return darcy_f(v * dh / nu, eps / dh) * v * v / (2.0 * G * dh) - slope

    return area * brentq(excess, 1e-12, 1e3, xtol=1e-15, rtol=1e-14)


def full_bore(d, length, fall, p_cav, k, rho, mu, eps):
    head = rho * G * fall + p_cav
    nu = mu / rho

    def excess(v):
        return (darcy_f(v * d / nu, eps / d) * length / d + k) * rho * v * v / 2.0 - head

    return math.pi * d * d / 4.0 * brentq(excess, 1e-12, 1e3, xtol=1e-15, rtol=1e-14)


def main():
    if probe_missing():
        return 1
    cases = [
        # d, length, fall, roughness, fill, p_cav, minor_k, rho, mu
        (0.05, 4.0, 0.2, 45e-6, 0.5, 0.0, 1.5, 850.0, 850.0 * 8e-6),     # hot thin oil
        (0.08, 6.0, 0.15, 45e-6, 0.3, 2e4, 1.5, 860.0, 860.0 * 15e-6),   # warm oil, pressurised cavity
        (0.10, 10.0, 0.3, 1.5e-6, 0.7, 0.0, 0.5, 998.0, 1.0e-3),         # water, smooth tube
        (0.04, 3.0, 0.3, 45e-6, 0.2, -2e3, 1.0, 870.0, 870.0 * 5e-6),    # cavity below the sump's pressure
        (0.03, 2.0, 0.1, 45e-6, 0.5, 0.0, 1.5, 875.0, 875.0 * 600e-6),   # cold thick oil, laminar
    ]
    pairs_design, pairs_flood = [], []
    for d, length, fall, eps, fill, p_cav, k, rho, mu in cases:
        params = {"diameter": d, "length": length, "fall": fall, "roughness": eps, "design_fill": fill,
                  "cavity_pressure": p_cav, "minor_k": k}
        out = probe("component.describe", "gravity_drain", json.dumps(params), rho, mu, 0.0, 0.0)["items"]
        label = f"D {d} m fill {fill} nu {mu / rho:.3g} m2/s"
        pairs_design.append((out["design_capacity"], part_full(d, fall / length, fill, rho, mu, eps), label))
        pairs_flood.append((out["flood_capacity"], full_bore(d, length, fall, p_cav, k, rho, mu, eps), label))
    check("design capacity (part full, Darcy-Weisbach on 4R, Churchill f) vs fluids + brentq", pairs_design, 1e-6)
    check("flood capacity (running full under fall + cavity pressure) vs fluids + brentq", pairs_flood, 1e-6)
    # Shape of the part-full curve (water drain above): near 0.94 full it carries more than
    # running full by gravity alone, and half full close to half the full flow (Chow, from memory).
    d, length, fall = 0.10, 10.0, 0.3
    params = {"diameter": d, "length": length, "fall": fall, "roughness": 1.5e-6, "minor_k": 0.0, "design_fill": 0.938}
    top = probe("component.describe", "gravity_drain", json.dumps(params), 998.0, 1e-3, 0.0, 0.0)["items"]
    ratio = top["design_capacity"] / top["flood_capacity"]
    check("greatest part-full flow over full-bore flow, turbulent (Manning-shaped curve: about 1.07)",
          [(ratio, 1.07, "fill 0.938")], 0.03)
    return summary()


if __name__ == "__main__":
    sys.exit(main())
