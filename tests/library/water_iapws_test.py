"""Reference check of loopwright's water model against python3-iapws.

Runs the probe tool (env LOOPWRIGHT_PROBE) command `water T_K p_Pa` and compares
rho, cp, mu, k and Tsat(p) with python3-iapws 1.5 (Debian), which implements
the same IAPWS releases independently:
  * rho, cp: iapws.IAPWS97 (IF97 region 1). Same equations, so the tolerance
    is round-off: 1e-9 relative.
  * mu: IAPWS97(...).mu = iapws._iapws._Viscosity(rho, T) (IAPWS 2008 without
    critical enhancement, as ours): 1e-9 relative.
  * k: IAPWS97(...).k = iapws._iapws._ThCond(rho, T, phase), which INCLUDES the
    critical enhancement lambda2 of IAPWS 2011 (industrial form); ours omits
    it. Over this range lambda2 evaluates to 0 in iapws (measured below and
    printed), so the tolerance stays at 1e-9; if lambda2 ever mattered the
    check would fail and say so.
  * Tsat(p): iapws.iapws97._TSat_P (IF97 Eq. 31): 1e-10 relative.
  * d/dT of rho, cp, mu, k (ours analytic): central differences of
    iapws.IAPWS97 over +-0.01 K at the same pressure. Truncation and
    rounding of the difference are below 1e-7 of each derivative here, so
    the tolerance is 1e-6 relative, with an absolute floor where the
    derivative passes near zero (drho/dT at 4 degC, dcp/dT near 35 degC):
    1e-6 kg/(m3 K) and 1e-4 J/(kg K2).
Also checked, loosely, against the scientific formulation iapws.IAPWS95, of
which IF97 is an approximation: tolerances are IF97's permissible deviations
from IAPWS-95 in region 1 as recalled from the IF97 release (from memory:
0.01 % in v, 0.1 % in cp); mu and k depend on it only through rho, so they
get rho's tolerance. Measured: rho 1.5e-5, cp 8.3e-4, mu 2.2e-5, k 2.7e-5.

Grid: T = 5..150 degC in 5 degC steps at 1 bar abs where 1 bar is below the
boiling point less 1 K, else at 5 bar abs; also 10 bar abs and 100 bar abs at
every T (all compressed liquid, IF97 region 1).

Exits non-zero on any mismatch; prints the worst relative error per property
and a summary line "N passed, M failed".
"""

import json
import os
import subprocess
import sys

from iapws import IAPWS95, IAPWS97
from iapws._iapws import _ThCond
from iapws.iapws97 import _TSat_P

PROBE = os.environ.get("LOOPWRIGHT_PROBE")

TOL = {"rho": 1e-9, "cp": 1e-9, "mu": 1e-9, "k": 1e-9, "tsat": 1e-10,
       "drho_dT": 1e-6, "dcp_dT": 1e-6, "dmu_dT": 1e-6, "dk_dT": 1e-6}
# Absolute floors of the derivative checks (module docstring).
FLOOR = {"drho_dT": 1e-6, "dcp_dT": 1e-4, "dmu_dT": 0.0, "dk_dT": 0.0}
DT = 0.01  # K, half-step of the central differences
TOL95 = {"rho": 1e-4, "cp": 1e-3, "mu": 1e-4, "k": 1e-4}

passed = 0
failed = 0
worst = {name: (0.0, None) for name in TOL}
worst95 = {name: (0.0, None) for name in ("rho", "cp", "mu", "k")}
worst_lambda2 = (0.0, None)


def probe(T, p):
    out = subprocess.run([PROBE, "water", repr(T), repr(p)], capture_output=True,
                         text=True, check=True)
    return json.loads(out.stdout)


def check(name, ours, ref, tol, where, table=worst, floor=0.0):
    global passed, failed
    rel = abs(ours - ref) / abs(ref)
    if rel >= table[name][0]:
        table[name] = (rel, where)
    if rel <= tol or abs(ours - ref) <= floor:
        passed += 1
    else:
        failed += 1
        print(f"FAIL {name} at {where}: ours {ours!r}, reference {ref!r}, "
              f"rel {rel:.3e} > {tol:.1e}")


def main():
    global worst_lambda2
    if not PROBE or not os.path.exists(PROBE):
        print("LOOPWRIGHT_PROBE is not set to the lw_probe executable")
        print("0 passed, 1 failed")
        return 1
    for t_c in range(5, 151, 5):
        T = t_c + 273.15
        p_low = 1e5 if _TSat_P(0.1) > T + 1.0 else 5e5
        for p in (p_low, 10e5, 100e5):
            where = f"T={t_c} degC p={p / 1e5:g} bar"
            ref = IAPWS97(T=T, P=p / 1e6)
            if ref.region != 1:
                print(f"FAIL reference state not in IF97 region 1 at {where}")
                failed_one()
                continue
            ours = probe(T, p)
            check("rho", ours["rho"], ref.rho, TOL["rho"], where)
            check("cp", ours["cp"], ref.cp * 1e3, TOL["cp"], where)
            check("mu", ours["mu"], ref.mu, TOL["mu"], where)
            check("k", ours["k"], ref.k, TOL["k"], where)
            check_derivatives(ours, T, p, where)
            lam2 = abs(ref.k - _ThCond(ref.rho, T)) / ref.k
            if lam2 >= worst_lambda2[0]:
                worst_lambda2 = (lam2, where)
            sci = IAPWS95(T=T, P=p / 1e6)
            check("rho", ours["rho"], sci.rho, TOL95["rho"], where, worst95)
            check("cp", ours["cp"], sci.cp * 1e3, TOL95["cp"], where, worst95)
            check("mu", ours["mu"], sci.mu, TOL95["mu"], where, worst95)
            check("k", ours["k"], sci.k, TOL95["k"], where, worst95)
    for p_mpa in (0.01, 0.05, 0.1, 0.101325, 0.2, 0.5, 1.0, 2.0, 5.0, 10.0):
        ours = probe(300.0, p_mpa * 1e6)
        check("tsat", ours["tsat"], _TSat_P(p_mpa), TOL["tsat"], f"p={p_mpa} MPa")

    print("worst relative error vs python3-iapws IAPWS97 (same formulations):")
    for name, (rel, where) in worst.items():
        print(f"  {name:5s} {rel:.3e}  at {where}  (tolerance {TOL[name]:.0e})")
    print("worst relative deviation vs python3-iapws IAPWS95 (scientific formulation):")
    for name, (rel, where) in worst95.items():
        print(f"  {name:5s} {rel:.3e}  at {where}  (tolerance {TOL95[name]:.0e})")
    print(f"largest share of lambda2 (critical enhancement, omitted by us) in the "
          f"reference conductivity: {worst_lambda2[0]:.3e} at {worst_lambda2[1]}")
    print(f"{passed} passed, {failed} failed")
    return 0 if failed == 0 else 1


def check_derivatives(ours, T, p, where):
    hi = IAPWS97(T=T + DT, P=p / 1e6)
    lo = IAPWS97(T=T - DT, P=p / 1e6)
    refs = {"drho_dT": (hi.rho - lo.rho) / (2 * DT),
            "dcp_dT": (hi.cp - lo.cp) * 1e3 / (2 * DT),
            "dmu_dT": (hi.mu - lo.mu) / (2 * DT),
            "dk_dT": (hi.k - lo.k) / (2 * DT)}
    for name, ref in refs.items():
        check(name, ours[name], ref, TOL[name], where, floor=FLOOR[name])


def failed_one():
    global failed
    failed += 1


if __name__ == "__main__":
    sys.exit(main())
