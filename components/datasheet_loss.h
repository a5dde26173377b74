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
  enum Param { kPoints, kRatedFlow, kRatedDp, kLaminarFraction, kRatedViscosity, kRatedDensity, kNumParams };
  DatasheetLoss(const ParamValues& v, double a, double b, double q_max)
      : a_(a), b_(b), q_max_(q_max) { params_ = v.values; }
  ResidualKind Kind(int) const override { return ResidualKind::kPressure; }

  template <class T>
  void Law(const T& dp, const T& m, const T& rho, const T& mu, const T* x, T* r) const {
    (void)x;
    const T q = m / rho;
    r[0] = a_ * mu * q + b_ * rho * SignedSquare(q, 1e-9 * q_max_) - dp;
  }
  double a() const { return a_; }
  double b() const { return b_; }
  LinearGuess Linearize(double rho, double mu) const override;
  void Describe(const BranchResult& b, ComponentReport* out) const override;

  // Fits a, b >= 0 from rows [Q, dp] at mu_r, rho_r; false when impossible.
  static bool Fit(const std::vector<std::vector<double>>& rows, double mu_r, double rho_r, double* a, double* b);

 private:
  double a_, b_, q_max_;
};

std::vector<ParamSpec> DatasheetLossParams();
// Builds a DatasheetLoss from values whose first kNumParams entries follow
// DatasheetLossParams(); reports problems.
std::unique_ptr<DatasheetLoss> MakeDatasheetLoss(const ParamValues& v, std::vector<ParamError>* e);
ComponentType DatasheetLossType();

}  // namespace loopwright
