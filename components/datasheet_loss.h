// datasheet_loss — a passage known only by its datasheet pressure-drop curve:
// a cooler's liquid side, a manifold, a quick coupling, a flow meter.
//
// Equation (residual in Pa):
//   r = a mu Q + b rho Q|Q| - dp
// the viscous (laminar) and inertial (turbulent) parts of a passage's loss.
// a [1/m3] and b [1/m4] come from the datasheet, either
//   * points: rows [flow, dp] measured at rated_viscosity and rated_density,
//     fitted by non-negative least squares (relative residuals), or
//   * rated_flow, rated_dp and laminar_fraction (the share of rated_dp that
//     is viscous; 1 = all laminar, 0 = all turbulent; default 0.5 when the
//     datasheet does not say — state your source).
// With a viscosity different from the rated one the viscous part scales with
// mu and the inertial part with rho: the reason to keep them apart for oil,
// whose viscosity changes tenfold between cold start and running.
// a and b are evaluated from the parameters at every call (the points' fit
// is kept as a mu_r and b rho_r, which the rated viscosity and density then
// scale), so a rated_dp, rated_flow, laminar_fraction, rated_viscosity or
// rated_density bound to an envelope variable acts exactly as written.
//
// Sign convention: dp = p(from) - p(to) + rho g dz; Q > 0 from -> to; odd in
// Q (a passage is taken as symmetric under reversal).
// Validity: flows within the datasheet range (beyond 1.2 x the largest
// datasheet flow, and below the viscosity range the points were taken at by
// more than a factor 10, a warning is reported).
// References
// [1] I. E. Idelchik, "Handbook of Hydraulic Resistance", 3rd ed., 1994, ch. 1
//     (separation of friction and local resistance; laminar and quadratic
//     regimes).
#pragma once

#include "components/component.h"
#include "components/correlations/smooth.h"
#include "components/registry.h"

namespace loopwright {

class DatasheetLoss : public ComponentWithLaw<DatasheetLoss> {
 public:
  static constexpr bool kLossMinusDrop = true;  // r = loss(m) - dp (components/component.h)
  enum Param { kPoints, kRatedFlow, kRatedDp, kLaminarFraction, kRatedViscosity, kRatedDensity, kNumParams };
  // Rated form (rated_flow, rated_dp, laminar_fraction): a and b follow the
  // parameters at every call. Points form: the fit gives a mu_r and b rho_r
  // (independent of the rated viscosity and density, which only scale the
  // fit's columns), stored here; a and b again follow the live parameters.
  struct Curve {
    bool from_points = false;
    double a_mu_r = 0;  // points: a * rated dynamic viscosity [Pa.s/m3 . Pa.s]
    double b_rho_r = 0; // points: b * rated density
    double q_max = 0;   // points: largest datasheet flow [m3/s]
  };
  DatasheetLoss(const ParamValues& v, const Curve& curve) : curve_(curve) { params_ = v.values; }
  ResidualKind Kind(int) const override { return ResidualKind::kPressure; }

  template <class T>
  void Law(const T& dp, const T& m, const T& rho, const T& mu, const T* x, T* r) const {
    (void)x;
    r[0] = Loss(params_.data(), m / rho, rho, mu) - dp;
  }
  // The law's loss a mu Q + b rho Q|Q| [Pa] with a, b, q_max from the
  // parameter values p (in DatasheetLossParams() order; air_cooler passes
  // its own, which begin with them).
  template <class T>
  T Loss(const double* p, const T& q, const T& rho, const T& mu) const {
    return A(p) * mu * q + B(p) * rho * SignedSquare(q, 1e-9 * QMax(p));
  }
  double A(const double* p) const;
  double B(const double* p) const;
  double QMax(const double* p) const { return curve_.from_points ? curve_.q_max : p[kRatedFlow]; }
  double a() const { return A(params_.data()); }
  double b() const { return B(params_.data()); }
  LinearGuess Linearize(double rho, double mu) const override { return LinearizeWith(params_.data(), rho, mu); }
  void Describe(const BranchResult& b, ComponentReport* out) const override { DescribeWith(params_.data(), b, out); }
  LinearGuess LinearizeWith(const double* p, double rho, double mu) const;
  void DescribeWith(const double* p, const BranchResult& b, ComponentReport* out) const;

  // Fits a, b >= 0 from rows [Q, dp] at mu_r, rho_r; false when impossible.
  static bool Fit(const std::vector<std::vector<double>>& rows, double mu_r, double rho_r, double* a, double* b);

 private:
  Curve curve_;
};

std::vector<ParamSpec> DatasheetLossParams();
// Builds a DatasheetLoss from values whose first kNumParams entries follow
// DatasheetLossParams(); reports problems.
std::unique_ptr<DatasheetLoss> MakeDatasheetLoss(const ParamValues& v, std::vector<ParamError>* e);
ComponentType DatasheetLossType();

}  // namespace loopwright
