// Tolerances of a case: the scatter of its parameters from part to part and
// batch to batch ("tolerances" in the case file), read and checked at load.
//
//   "tolerances": {
//     "parameters": {
//       "oil/front_bearing.radial_clearance": {"distribution": "normal", "band": "6 um", "coverage": 0.95},
//       "oil/relief.crack": {"distribution": "triangular", "low": "6.5 bar", "high": "7.5 bar"},
//       "apu_oil.kv40": {"distribution": "lognormal", "sd_log": 0.05}
//     },
//     "correlations": [{"between": ["oil/front_bearing.radial_clearance",
//                                   "oil/rear_bearing.radial_clearance"], "coefficient": 0.7}]
//   }
//
// A name is "loop/component.parameter" (any numeric parameter the case gives
// a value and does not bind to an envelope variable) or "fluid.kv40" /
// "fluid.kv100" (the reference viscosities of an oil). Distributions, in the
// parameter's unit (a temperature's spread reads as a temperature
// difference):
//   normal      mean (default: the case's value) and sd, or band (the
//               half-width of a +- band) with its coverage (0.95: the band
//               holds 95 % of parts): sd = band / z, z = Phi^-1((1 + coverage)/2)
//   uniform     low and high, or half_width around the case's value
//   triangular  low, high and mode (default: the case's value)
//   lognormal   median (default: the case's value) and sd_log (the standard
//               deviation of ln x; a geometric standard deviation of
//               exp(sd_log))
// Correlations are between the standard normal variables behind each
// tolerance (a Gaussian copula: z = L e with L L^T the correlation matrix,
// x = F^-1(Phi(z))); for two normal tolerances the coefficient is their
// correlation. The matrix must be positive definite.
//
// References: JCGM 101:2008 (GUM Supplement 1), 6.4 (the distributions and
// their parameters), from memory; Johnson, Kotz & Balakrishnan, Continuous
// Univariate Distributions vol. 1 (1994), ch. 14 (log-normal), from memory.
#pragma once

#include <string>
#include <vector>

#include "library/units.h"

namespace loopwright {

enum class Distribution { kNormal, kUniform, kTriangular, kLogNormal };

// The names a case writes ("normal", "uniform", "triangular", "lognormal").
const std::vector<std::string>& DistributionNames();

struct Tolerance {
  std::string name;     // as the case writes it
  std::string pointer;  // "/tolerances/parameters/<name>"
  int loop = -1, comp = -1, param = -1;  // a component parameter
  int coupling = -1;    // or a coupling's conductance
  int fluid = -1;       // or an index in Case::fluid_bindings ...
  int anchor = 0;       // ... and which viscosity: 0 KV40, 1 KV100
  Dimension dim = Dimension::kDimensionless;
  Distribution dist = Distribution::kNormal;
  double nominal = 0;   // the case's value (SI): the nominal solve uses it
  // normal: mean, sd; uniform: low, high; triangular: low, mode, high;
  // lognormal: ln(median), sd_log.
  double a = 0, b = 0, c = 0;
  double lo = -1e300, hi = 1e300;  // the range the parameter accepts (SI)
  bool lo_exclusive = false;

  double Mean() const;
  double StdDev() const;
  // The value at cumulative probability u in (0, 1) (inverse CDF).
  double Quantile(double u) const;
  // Whether the parameter accepts value v.
  bool Accepts(double v) const { return (lo_exclusive ? v > lo : v >= lo) && v <= hi; }
};

struct ToleranceSet {
  std::vector<Tolerance> items;
  // Correlation matrix (row-major, n x n) and its lower Cholesky factor.
  std::vector<double> correlation, cholesky;
  bool empty() const { return items.empty(); }
  size_t size() const { return items.size(); }
  double Correlation(size_t i, size_t j) const { return correlation[i * items.size() + j]; }
};

// Standard normal CDF and its inverse (Acklam's rational approximation
// refined by one Halley step on erfc: near full double precision).
double NormalCdf(double z);
double NormalQuantile(double p);

// The lower Cholesky factor of a symmetric n x n matrix (row-major) into
// *l; false when it is not positive definite.
bool CholeskyLower(const std::vector<double>& a, size_t n, std::vector<double>* l);

}  // namespace loopwright
