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
  6. churchill_1977 (components/correlations/friction.h) on a finer grid through
     laminar (Re 1 .. 2300), transition (2000 .. 4000, dense) and turbulent
     flow (to 1e8), eD in {0, 1e-6, 1e-5, 1e-4, 1e-3, 1e-2, 0.05}: f against
     fluids.friction.Churchill_1977 and against Churchill's equation
     evaluated by mpmath at 40 digits (that mpmath form itself checked
     against fluids' values), and d(f*Re)/dRe (a Jet through our code)
     against mpmath's derivative of the equation (at 100 digits), Re >= 100 (below
     Re 100 our f*Re is 64 exactly, its derivative 0: the turbulent term is
     below 1e-37 relative there, header of friction.h).
Tolerances: 1e-14 relative against the 40-digit root, 1e-12 against the
double-precision evaluations in python3-fluids (their rounding order differs);
1e-13 for check 6 (a few roundings, amplified at most 16-fold by the 16th
powers; a cheaper evaluation by products and roots met it as well, and was
not kept: DEVELOPERS.md, "One pass per trial").
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















def churchill_mp(re, rr):
    """Darcy f of Churchill (1977), Chem. Eng. 84(24):91-92, at 40 digits:
    f = 8 [(8/Re)^12 + (A + B)^(-3/2)]^(1/12),
    A = [-2.457 ln((7/Re)^0.9 + 0.27 eD)]^16, B = (37530/Re)^16."""
    re, rr = mpmath.mpf(re), mpmath.mpf(rr)
    a = (-mpmath.mpf("2.457") * mpmath.log((7 / re) ** mpmath.mpf("0.9") + mpmath.mpf("0.27") * rr)) ** 16
    b = (mpmath.mpf(37530) / re) ** 16
    return 8 * ((8 / re) ** 12 + (a + b) ** mpmath.mpf("-1.5")) ** (mpmath.mpf(1) / 12)


def check_churchill_fine():
    """Check 6 (module docstring)."""
    res = ([10 ** (2 * i / 20) for i in range(20)] + [100 + 2200 * i / 22 for i in range(22)] +
           [2000 + 2000 * i / 80 for i in range(81)] + [10 ** (3.6 + 4.4 * i / 44) for i in range(1, 45)])
    rrs = [0.0, 1e-6, 1e-5, 1e-4, 1e-3, 1e-2, 0.05]
    re_all = [re for rr in rrs for re in res]
    rr_all = [rr for rr in rrs for re in res]
    ours = probe("corr.friction", "churchill_1977", csv(re_all), csv(rr_all))
    where = [f"Re={re:.6g} eD={rr:g}" for re, rr in zip(re_all, rr_all)]
    exact = [churchill_mp(re, rr) for re, rr in zip(re_all, rr_all)]
    check("Churchill's equation at 40 digits (this test's own mpmath form) vs fluids Churchill_1977",
          [(float(exact[i]), Churchill_1977(re, rr), where[i]) for i, (re, rr) in enumerate(zip(re_all, rr_all))],
          1e-13)
    check("churchill_1977 vs fluids Churchill_1977, laminar/transition/turbulent, 7 roughnesses",
          [(ours["f"][i], Churchill_1977(re, rr), where[i]) for i, (re, rr) in enumerate(zip(re_all, rr_all))],
          1e-13)
    check("churchill_1977 vs Churchill's equation at 40 digits",
          [(ours["f"][i], float(exact[i]), where[i]) for i in range(len(re_all))], 1e-13)
    with mpmath.workdps(100):  # at Re ~ 100 the turbulent term is 1e-37 of f*Re: 40 digits cannot see its slope
        slope = [(ours["dfre_dre"][i], float(mpmath.diff(lambda x: x * churchill_mp(x, rr), mpmath.mpf(re))), where[i])
                 for i, (re, rr) in enumerate(zip(re_all, rr_all)) if re >= 100]
    check("churchill_1977 d(f*Re)/dRe vs mpmath's derivative of the equation at 100 digits, Re >= 100", slope, 1e-13)


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

    check_churchill_fine()

    for m in ours:
        f, fre = ours[m]["f"], ours[m]["fre"]
        check(f"{m}: f*Re / Re == f",
              [(fre[i] / re, f[i], f"Re={re:.3g}") for i, re in enumerate(re_all)], 1e-14)

    return summary()


if __name__ == "__main__":
    sys.exit(main())
