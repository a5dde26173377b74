#!/usr/bin/python3
"""Reference check: loopwright's Darcy friction factors against python3-fluids.

Run by Debian's /usr/bin/python3 (which has python3-fluids and mpmath); the
probe binary is found through the environment variable LOOPWRIGHT_PROBE.

Checks (worst relative error printed for each):
  1. colebrook_1939 vs the root of the Colebrook (1939) equation found by
     mpmath.findroot at 40 digits, and vs fluids.friction.Colebrook(Re, eD)
     (its analytic Lambert-W solution in double precision), Re 100..1e8
     (log grid), eD in {0, 1e-6, 1e-4, 1e-3, 1e-2}. (fluids' tol=0 "exact"
     mpmath path is not used: it multiplies by the float 18.574, and the
     cancellation at high rough Re costs it ~4e-12 relative.)
  2. colebrook_1939 vs fluids.friction.friction_factor(Method='Colebrook')
     where that function does not substitute the laminar law (Re >= 2040).
  3. churchill_1977 vs fluids.friction.Churchill_1977 (Churchill 1977,
     Chem. Eng. 84(24):91-92) over the same grid, and vs
     friction_factor(Method='Churchill_1977') for Re >= 2040.
  4. laminar_colebrook vs friction_factor(Method='Colebrook') outside
     2040 <= Re < 2300: python3-fluids switches to 64/Re below Re = 2040,
     loopwright below Re = 2300 (both hard switches; the band between is
     where they differ by design).
  5. the product form: f*Re / Re == f for every method on the grid.
Tolerances: 1e-14 relative against the 40-digit root, 1e-12 against the
double-precision evaluations in python3-fluids (their rounding order differs).
"""
import math
import os
import subprocess
import sys
import json
import warnings

warnings.simplefilter("ignore")  # fluids' Colebrook warns on overflow paths

import mpmath  # noqa: E402
from fluids.friction import Colebrook, Churchill_1977, friction_factor  # noqa: E402
sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tools"))
from refcheck import check, csv, probe, probe_missing, rel, summary  # noqa: E402

mpmath.mp.dps = 40


def colebrook_mp(re, rr):
    """Darcy f from 1/sqrt(f) = -2 log10(rr/3.7 + 2.51/(Re sqrt f)), 40 digits."""
    a = mpmath.mpf(rr) / mpmath.mpf("3.7")
    b = mpmath.mpf("2.51") / mpmath.mpf(re)
    x0 = mpmath.mpf(1.0) / mpmath.sqrt(Colebrook(re, rr))
    x = mpmath.findroot(lambda x: x + 2 * mpmath.log10(a + b * x), x0)
    return float(1 / x**2)















def main():
    if probe_missing():
        return 1
    res = [10 ** (2 + 6 * i / 60) for i in range(61)]  # Re 100 .. 1e8
    rrs = [0.0, 1e-6, 1e-4, 1e-3, 1e-2]
    re_all = [re for rr in rrs for re in res]
    rr_all = [rr for rr in rrs for re in res]

    ours = {}
    for m in ("colebrook_1939", "churchill_1977", "laminar_colebrook"):
        ours[m] = probe("corr.friction", m, csv(re_all), csv(rr_all))

    def against(f, ref, keep=lambda re: True):
        """Our factors f against ref(Re, eD) at every grid point kept."""
        return [(f[i], ref(re, rr), f"Re={re:.3g} eD={rr:g}")
                for i, (re, rr) in enumerate(zip(re_all, rr_all)) if keep(re)]

    def fluids_method(name):
        return lambda re, rr: friction_factor(re, rr, Method=name)

    cb = ours["colebrook_1939"]["f"]
    check("colebrook_1939 vs mpmath root of the Colebrook equation", against(cb, colebrook_mp), 1e-14)
    check("colebrook_1939 vs fluids Colebrook (Lambert W)", against(cb, Colebrook), 1e-12)
    check("colebrook_1939 vs fluids friction_factor(Method='Colebrook'), Re >= 2040",
          against(cb, fluids_method("Colebrook"), lambda re: re >= 2040), 1e-12)

    ch = ours["churchill_1977"]["f"]
    check("churchill_1977 vs fluids Churchill_1977", against(ch, Churchill_1977), 1e-12)
    check("churchill_1977 vs fluids friction_factor(Method='Churchill_1977'), Re >= 2040",
          against(ch, fluids_method("Churchill_1977"), lambda re: re >= 2040), 1e-12)

    lc = ours["laminar_colebrook"]["f"]
    check("laminar_colebrook vs fluids friction_factor(Method='Colebrook') outside 2040..2300",
          against(lc, fluids_method("Colebrook"), lambda re: not (2040 <= re < 2300)), 1e-12)

    for m in ours:
        f, fre = ours[m]["f"], ours[m]["fre"]
        check(f"{m}: f*Re / Re == f",
              [(fre[i] / re, f[i], f"Re={re:.3g}") for i, re in enumerate(re_all)], 1e-14)

    return summary()


if __name__ == "__main__":
    sys.exit(main())
