// Checks shared by the fluid tests (tests/library/*_test.cpp).
#pragma once

#include <cmath>

#include <doctest/doctest.h>

#include "library/fluid.h"

namespace loopwright {

// Every temperature derivative of `fluid` at (T, p) against the central
// difference of step h: each within relative error `tol`.
inline void CheckDerivativesByCentralDifference(const Fluid& fluid, double T, double p, double h, double tol) {
  auto rel = [](double a, double b) { return std::fabs(a - b) / std::fabs(b); };
  const FluidProps a = fluid.Evaluate(T, p), up = fluid.Evaluate(T + h, p), down = fluid.Evaluate(T - h, p);
  CHECK(rel(a.dmu_dT, (up.mu - down.mu) / (2 * h)) < tol);
  CHECK(rel(a.drho_dT, (up.rho - down.rho) / (2 * h)) < tol);
  CHECK(rel(a.dcp_dT, (up.cp - down.cp) / (2 * h)) < tol);
  CHECK(rel(a.dk_dT, (up.k - down.k) / (2 * h)) < tol);
}

// Properties evaluated anywhere, also far outside the model's range, are
// finite, with a positive viscosity and density.
inline void CheckFiniteProps(const FluidProps& f) {
  CHECK(std::isfinite(f.rho));
  CHECK(std::isfinite(f.mu));
  CHECK(std::isfinite(f.cp));
  CHECK(std::isfinite(f.k));
  CHECK(std::isfinite(f.dmu_dT));
  CHECK(f.rho > 0);
  CHECK(f.mu > 0);
}

}  // namespace loopwright
