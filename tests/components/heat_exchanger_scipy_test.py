#!/usr/bin/python3
"""Reference check: loopwright's eps-NTU relations against the exchanger
equations integrated numerically with scipy (and mpmath for a series).

Run by Debian's /usr/bin/python3 (python3-scipy, python3-numpy, python3-mpmath);
the probe binary is found through the environment variable LOOPWRIGHT_PROBE
(command hx.eps, tests/tools/probe_heat.cpp).

Temperatures are made dimensionless, theta = (T - T_cold,in)/(T_hot,in -
T_cold,in); x runs over the exchanger area from 0 to 1; NTU = UA/C_min.
Each exchanger model below is the textbook idealisation (constant U and cp,
no losses, no axial conduction; Incropera et al., Fundamentals of Heat and
Mass Transfer, 6th ed., §11.3-11.4; Kays & London, Compact Heat Exchangers,
3rd ed., ch. 2), solved without using any closed-form eps:
  1. counterflow: hot +x, cold -x; two-point boundary value problem,
     scipy.integrate.solve_bvp (tol 1e-10);
  2. parallel flow: initial value problem, solve_ivp (DOP853, rtol 1e-12);
  3. shell-and-tube, one shell pass, two tube passes: shell fluid mixed over
     each cross-section, tube pass 1 along +x, pass 2 back along -x, half the
     area each; three-state BVP by solve_bvp; both fluid assignments;
  4. crossflow with one fluid mixed: the unmixed stream's strips each see the
     mixed stream's local temperature; the mixed stream's ODE by solve_ivp,
     the strips' x-profile by solve_ivp as well (C_min mixed and C_max mixed);
  5. crossflow, both fluids unmixed: the 2-D equations
     d theta_h/dx = -(UA/C_h)(theta_h - theta_c), d theta_c/dy = (UA/C_c)(...)
     on an n x n cell grid (box scheme, second order, each row's hot-stream
     recurrence by scipy.signal.lfilter), n = 400 and 800, Richardson
     extrapolated; compared with the exact series of Mason (1954) evaluated
     in mpmath at 30 digits; then Incropera's approximation Eq. 11.32 (our
     kCrossflowUnmixed) is compared with the numerical solution within the
     accuracy the header states (3.8 %).
Tolerances: 1e-7 relative for the ODE/BVP solutions (their tolerances are
1e-10 .. 1e-12), 2e-6 for the extrapolated 2-D grid, 0.038 for Eq. 11.32.
"""
import json
import math
import os
import subprocess
import sys

import mpmath
import numpy as np
from scipy.integrate import solve_bvp, solve_ivp
from scipy.signal import lfilter
sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tools"))
from refcheck import check, csv, probe, probe_missing, rel, summary  # noqa: E402

NTUS = [0.05, 0.2, 0.5, 1.0, 2.0, 4.0, 8.0]
CRS = [0.0, 0.25, 0.5, 0.75, 0.95, 1.0]














def ours(arrangement, grid):
    return probe("hx.eps", arrangement, csv([n for n, _ in grid]), csv([c for _, c in grid]))["eps"]


# ------------------------------------------------------------ the models

def counterflow_bvp(ntu, cr):
    # hot = C_min flows +x, cold flows -x.
    def f(x, y):
        d = y[0] - y[1]
        return np.vstack([-ntu * d, -ntu * cr * d])

    def bc(ya, yb):
        return np.array([ya[0] - 1.0, yb[1]])

    x = np.linspace(0.0, 1.0, 201)
    y0 = np.vstack([1.0 - 0.5 * x, 0.5 * (1.0 - x)])
    sol = solve_bvp(f, bc, x, y0, tol=1e-10, max_nodes=200000)
    if not sol.success:
        raise RuntimeError(f"solve_bvp counterflow NTU={ntu} Cr={cr}: {sol.message}")
    return 1.0 - sol.sol(1.0)[0]


def parallel_ivp(ntu, cr):
    def f(x, y):
        d = y[0] - y[1]
        return [-ntu * d, ntu * cr * d]

    sol = solve_ivp(f, (0.0, 1.0), [1.0, 0.0], method="DOP853", rtol=1e-12, atol=1e-14)
    return 1.0 - sol.y[0, -1]


def shell_tube_bvp(ntu, cr, tube_is_cmin):
    # Capacities in units of C_min; hot = shell (theta 1), cold = tube (theta 0).
    c_t = 1.0 if tube_is_cmin else 1.0 / cr
    c_s = 1.0 / cr if tube_is_cmin else 1.0
    ua = ntu  # UA / C_min

    def f(x, y):
        s, t1, t2 = y
        return np.vstack([-(ua / 2.0) * ((s - t1) + (s - t2)) / c_s,
                          (ua / 2.0) * (s - t1) / c_t,
                          -(ua / 2.0) * (s - t2) / c_t])

    def bc(ya, yb):
        return np.array([ya[0] - 1.0, ya[1], yb[2] - yb[1]])

    x = np.linspace(0.0, 1.0, 201)
    y0 = np.vstack([1.0 - 0.3 * x, 0.3 * x, 0.3 + 0.3 * (1.0 - x)])
    sol = solve_bvp(f, bc, x, y0, tol=1e-10, max_nodes=200000)
    if not sol.success:
        raise RuntimeError(f"solve_bvp shell-tube NTU={ntu} Cr={cr}: {sol.message}")
    q = c_t * sol.sol(0.0)[2]  # tube outlet at x = 0, inlet 0
    return q / 1.0


def crossflow_one_mixed(ntu, cr, mixed_is_cmin):
    # Hot = unmixed stream along x (strips over y), cold = mixed stream along y.
    c_m = 1.0 if mixed_is_cmin else 1.0 / cr
    c_u = 1.0 / cr if mixed_is_cmin else 1.0
    ua = ntu

    def strip_outlet(theta_m):
        # one strip: d theta_u/dx = -(UA/C_u)(theta_u - theta_m), theta_u(0) = 1
        s = solve_ivp(lambda x, t: [-(ua / c_u) * (t[0] - theta_m)], (0.0, 1.0), [1.0],
                      method="DOP853", rtol=1e-12, atol=1e-14)
        return s.y[0, -1]

    def f(y, th):
        # heat into the mixed stream from the strip at y: C_u (1 - theta_u,out) per dy
        return [c_u * (1.0 - strip_outlet(th[0])) / c_m]

    sol = solve_ivp(f, (0.0, 1.0), [0.0], method="DOP853", rtol=1e-11, atol=1e-13)
    return c_m * sol.y[0, -1]  # q / (C_min dT_max)


def crossflow_unmixed_grid(ntu, cr, n):
    """Hot = C_min along x, cold along y; n x n cells, box scheme."""
    ch, cc, g = 1.0 / n, (1.0 / cr) / n, ntu / n**2
    k = g / (1.0 + g / (2 * ch) + g / (2 * cc))  # q = k (theta_h,in - theta_c,in)
    a, b = 1.0 - k / ch, k / ch                  # theta_h,out = a theta_h,in + b theta_c,in
    theta_c = np.zeros(n)                        # cold entering row 0, per column
    hot_out = np.empty(n)
    for j in range(n):
        # theta_h,i (entering column i) obeys th[i+1] = a th[i] + b tc[i], th[0] = 1.
        forced = lfilter([b], [1.0, -a], theta_c, zi=[a * 1.0])[0]  # th[1..n]
        th_in = np.concatenate(([1.0], forced[:-1]))
        theta_c = theta_c + (k / cc) * (th_in - theta_c)
        hot_out[j] = forced[-1]
    return 1.0 - hot_out.mean()


def crossflow_unmixed_series(ntu, cr):
    mpmath.mp.dps = 30
    n, c = mpmath.mpf(ntu), mpmath.mpf(cr)
    cn = c * n
    s, ta, tb = mpmath.mpf(0), mpmath.mpf(1), mpmath.mpf(1)
    pa, pb = mpmath.exp(-n), mpmath.exp(-cn)
    for k in range(2000):
        ta -= pa
        tb -= pb
        s += ta * tb
        if k > ntu + 20 and ta * tb < mpmath.mpf(10) ** -28:
            break
        pa *= n / (k + 1)
        pb *= cn / (k + 1)
    return float(s / cn)


def main():
    if probe_missing():
        return 1
    grid = [(n, c) for n in NTUS for c in CRS]
    grid_pos = [(n, c) for n, c in grid if c > 0.0]

    cf = ours("counterflow", grid)
    check("counterflow vs solve_bvp",
          [(cf[i], counterflow_bvp(n, c), f"NTU={n} Cr={c}") for i, (n, c) in enumerate(grid)],
          1e-7)

    pf = ours("parallel", grid)
    check("parallel flow vs solve_ivp",
          [(pf[i], parallel_ivp(n, c), f"NTU={n} Cr={c}") for i, (n, c) in enumerate(grid)],
          1e-7)

    st = ours("shell_tube", grid_pos)
    for tube_min in (True, False):
        check(f"shell-and-tube 1-2 vs solve_bvp (tube fluid {'C_min' if tube_min else 'C_max'})",
              [(st[i], shell_tube_bvp(n, c, tube_min), f"NTU={n} Cr={c}")
               for i, (n, c) in enumerate(grid_pos)], 1e-7)

    small = [(n, c) for n, c in grid_pos if n in (0.2, 1.0, 4.0)]
    cmin = ours("crossflow_cmin_mixed", small)
    check("crossflow C_min mixed vs strip ODEs (solve_ivp)",
          [(cmin[i], crossflow_one_mixed(n, c, True), f"NTU={n} Cr={c}")
           for i, (n, c) in enumerate(small)], 1e-7)
    cmax = ours("crossflow_cmax_mixed", small)
    check("crossflow C_max mixed vs strip ODEs (solve_ivp)",
          [(cmax[i], crossflow_one_mixed(n, c, False), f"NTU={n} Cr={c}")
           for i, (n, c) in enumerate(small)], 1e-7)

    un_grid = [(n, c) for n in (0.2, 1.0, 3.0, 8.0) for c in (0.25, 0.75, 1.0)]
    numeric = []
    for n, c in un_grid:
        e1, e2 = crossflow_unmixed_grid(n, c, 400), crossflow_unmixed_grid(n, c, 800)
        numeric.append(e2 + (e2 - e1) / 3.0)  # Richardson, second order
    series = [crossflow_unmixed_series(n, c) for n, c in un_grid]
    check("exact series (Mason 1954) vs 2-D numerical solution, both unmixed",
          [(series[i], numeric[i], f"NTU={n} Cr={c}") for i, (n, c) in enumerate(un_grid)],
          2e-6)
    approx = ours("crossflow_unmixed", un_grid)
    check("Eq. 11.32 (ours) vs 2-D numerical solution, both unmixed (header: <= 3.8 %)",
          [(approx[i], numeric[i], f"NTU={n} Cr={c}") for i, (n, c) in enumerate(un_grid)],
          0.038)

    return summary()


if __name__ == "__main__":
    sys.exit(main())
