#include "library/enthalpy.h"

#include <algorithm>

namespace loopwright {

double SpecificEnthalpy(const Fluid& f, double t, double p_abs) {
  static const double x[3] = {-0.7745966692414834, 0.0, 0.7745966692414834};
  static const double w[3] = {5.0 / 9.0, 8.0 / 9.0, 5.0 / 9.0};
  const double mid = 0.5 * (kEnthalpyReferenceT + t), half = 0.5 * (t - kEnthalpyReferenceT);
  // A linear cp: the midpoint rule is exact (so is the 3-point rule, to rounding).
  if (f.SpecificHeatIsLinear(kEnthalpyReferenceT, t)) return 2.0 * half * f.SpecificHeat(mid, p_abs);
  double h = 0;
  for (int i = 0; i < 3; ++i) h += w[i] * f.SpecificHeat(mid + half * x[i], p_abs);
  return h * half;
}

double TemperatureAfter(const Fluid& f, double t, double dh, double p_abs) {
  if (dh == 0.0) return t;
  const double target = SpecificEnthalpy(f, t, p_abs) + dh;
  double x = t + dh / f.SpecificHeat(t, p_abs);
  for (int it = 0; it < 60; ++it) {
    const double cp = f.SpecificHeat(x, p_abs);
    // Steps limited to 100 K: h is increasing, so a limited step still
    // approaches the root.
    const double step = std::clamp((SpecificEnthalpy(f, x, p_abs) - target) / cp, -100.0, 100.0);
    x -= step;
    // Newton's error after a step s is about (cp'/2cp) s^2: below 1e-5 K it
    // is under 1e-12 K for |cp'/cp| up to 0.02 per K (oils: 0.002, water
    // less), so the loop ends there.
    if (std::abs(step) <= 1e-5) break;
  }
  return x;
}

}  // namespace loopwright
