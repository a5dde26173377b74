"""Oil properties recomputed outside the code, for the demo tests: kinematic
viscosity by ASTM D341 (Walther, log log (nu + 0.7) linear in log T) through
two anchors, and density by linear thermal expansion from 15 degC (6.4e-4
1/K by default: common practice for lubricating-oil gravities)."""

import math


def d341_viscosity(t_c, nu1, t1, nu2, t2):
    """Kinematic viscosity [cSt] at t_c [degC] through (t1, nu1) and (t2, nu2)."""
    ll = lambda nu: math.log10(math.log10(nu + 0.7))  # noqa: E731
    b = (ll(nu1) - ll(nu2)) / (math.log10(t2 + 273.15) - math.log10(t1 + 273.15))
    a = ll(nu1) + b * math.log10(t1 + 273.15)
    return 10.0 ** (10.0 ** (a - b * math.log10(t_c + 273.15))) - 0.7


def expanded_density(t_c, rho15, alpha=6.4e-4):
    """Density [kg/m3] at t_c [degC] from rho15 at 15 degC."""
    return rho15 * (1.0 - alpha * (t_c - 15.0))
