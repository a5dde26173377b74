#!/usr/bin/python3
"""Reference check: the journal bearing's eccentricity from its Sommerfeld number.

Run by Debian's /usr/bin/python3 (python3-scipy); the probe binary is found
through LOOPWRIGHT_PROBE.

Checks:
  1. Short-bearing (Ocvirk) theory: loopwright's eps(S) against an
     independent root of the closed-form load relation, found here by
     scipy.optimize.brentq at xtol 1e-15. The relation is written here from
     Ocvirk's load components (NACA TN 2808, 1952; in the Sommerfeld-number
     form of Hamrock, Schmid & Jacobson, Fundamentals of Fluid Film
     Lubrication, 2nd ed., ch. 10; from memory):
        radial  W_r = mu U l^3 / c^2 * eps^2 / (1 - eps^2)^2
        tangent W_t = mu U l^3 / c^2 * pi eps / (4 (1 - eps^2)^1.5)
        W = sqrt(W_r^2 + W_t^2),  tan(phi) = W_t / W_r,
     with U = omega r, S = (r/c)^2 mu N / P, P = W / (l d): the load
     components are summed here, not the closed form the code uses, so a
     slip in either side's algebra shows. S over 1e-4 .. 1e3 (log grid),
     l/d in {0.125, 0.25, 0.5}. Tolerance 1e-9 in eps (the code bisects to
     ~1e-18; brentq's xtol 1e-15; the loss of digits in S near eps -> 1 at
     S = 1e-4 is below 1e-12).
  2. The slope d eps / dS the code reports (for the Jacobians) against a
     central difference of scipy's root (relative step 1e-5), within 1e-6
     relative.
  3. Raimondi & Boyd: at the tabulated S of each row (l/d = 1, 1/2, 1/4;
     table as reprinted from Raimondi & Boyd 1958 for Shigley's charts, from
     memory) the code returns the row's eps and attitude at their printed
     digits (interpolation in l/d reproduces each table at its own l/d).
"""
import math
import os
import sys

from scipy.optimize import brentq

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tools"))
import refcheck  # noqa: E402
from refcheck import check, csv, probe, probe_missing, summary  # noqa: E402

if probe_missing():
    sys.exit(1)


def check_abs(name, triples, tol):
    """Absolute differences |ours - ref| <= tol (eps and angles are O(1))."""
    worst, at = max((abs(o - r), lab) for o, r, lab in triples)
    ok = worst <= tol and len(triples) > 0
    refcheck.RESULTS.append(ok)
    print(f"{'PASS' if ok else 'FAIL'} {name}: {len(triples)} points, worst abs err {worst:.3e} at {at} (tol {tol:g})")


def sommerfeld_from_components(eps, l_over_d):
    # a bearing with r = 1, c = 1, mu U = 1 per unit: W in units of mu U l^3 / c^2
    r, c, d = 1.0, 1.0, 2.0
    l = l_over_d * d
    mu, omega = 1.0, 1.0
    u = omega * r
    k = mu * u * l ** 3 / c ** 2
    wr = k * eps ** 2 / (1 - eps ** 2) ** 2
    wt = k * math.pi * eps / (4 * (1 - eps ** 2) ** 1.5)
    w = math.hypot(wr, wt)
    p = w / (l * d)
    n = omega / (2 * math.pi)
    return (r / c) ** 2 * mu * n / p, math.atan2(wt, wr)


def eps_root(s, l_over_d):
    return brentq(lambda e: sommerfeld_from_components(e, l_over_d)[0] - s, 1e-12, 0.99, xtol=1e-15, rtol=8.9e-16,
                  maxiter=500)


grid = [10 ** (-4 + 7 * i / 60) for i in range(61)]
for ld in (0.125, 0.25, 0.5):
    # keep S where the root lies inside (0, 0.99): the code flags and clamps beyond
    s_min = sommerfeld_from_components(0.99, ld)[0]
    ss = [s for s in grid if s > 1.0001 * s_min]
    got = probe("corr.journal_film", "ocvirk_1952", ld, csv(ss))
    eps_t, phi_t, slope_t = [], [], []
    for s, e, phi, slope in zip(ss, got["eps"], got["attitude_rad"], got["deps_ds"]):
        ref = eps_root(s, ld)
        eps_t.append((e, ref, f"S {s:.3g}"))
        phi_t.append((phi, sommerfeld_from_components(ref, ld)[1], f"S {s:.3g}"))
        h = 1e-5 * s
        fd = (eps_root(s + h, ld) - eps_root(s - h, ld)) / (2 * h)
        slope_t.append((slope, fd, f"S {s:.3g}"))
    check_abs(f"ocvirk eps vs the brentq root of the load components, l/d {ld}", eps_t, 1e-9)
    check_abs(f"ocvirk attitude vs atan2(W_t, W_r) at the root, l/d {ld}", phi_t, 1e-9)
    check(f"ocvirk d eps/dS vs central difference of the root, l/d {ld}", slope_t, 1e-6)

# Raimondi & Boyd, full journal bearing (from memory of the published table):
#   l/d: [(eps, S, phi_deg)]
RB = {
    1.0: [(0.1, 1.33, 79.5), (0.2, 0.631, 74.02), (0.4, 0.264, 63.10), (0.6, 0.121, 50.58),
          (0.8, 0.0446, 36.24), (0.9, 0.0188, 26.45), (0.97, 0.00474, 15.47)],
    0.5: [(0.1, 4.31, 81.62), (0.2, 2.03, 74.94), (0.4, 0.779, 61.45), (0.6, 0.319, 48.14),
          (0.8, 0.0923, 33.31), (0.9, 0.0313, 23.66), (0.97, 0.00609, 13.75)],
    0.25: [(0.1, 16.2, 82.31), (0.2, 7.57, 75.18), (0.4, 2.83, 60.86), (0.6, 1.07, 46.72),
           (0.8, 0.261, 31.04), (0.9, 0.0736, 21.85), (0.97, 0.0101, 12.22)],
}
for ld, rows in RB.items():
    got = probe("corr.journal_film", "raimondi_boyd_1958", ld, csv([r[1] for r in rows]))
    # printed digits: eps to 0.005 (two decimals), phi to 0.005 deg (two decimals)
    check_abs(f"raimondi_boyd eps at the table's S, l/d {ld}",
              [(e, r[0], f"eps {r[0]}") for e, r in zip(got["eps"], rows)], 0.005)
    check_abs(f"raimondi_boyd attitude [deg] at the table's S, l/d {ld}",
              [(math.degrees(p), r[2], f"eps {r[0]}") for p, r in zip(got["attitude_rad"], rows)], 0.005)

sys.exit(summary())
