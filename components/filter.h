// filter — full-flow oil filter: element (media) loss, housing loss, and an
// integral bypass relief valve around the element.
//
// Purpose. The pressure lost across a filter and, when the element's loss
// reaches the bypass valve's cracking pressure (cold thick oil, a clogged
// element), the oil that bypasses the media unfiltered.
//
// Model. Housing in series with (element parallel to bypass valve):
//   dp    = dp_h(Q) + x                         (x: element pressure drop)
//   dp_h  = b rho Q|Q|          housing and ports, turbulent [2]
//   Q_e   = x / (a mu c)        element, Darcy's law for the porous medium
//                               (loss proportional to mu Q) [1]; c = clogging
//   Q_b   = k_b Softplus(x - p_c, w)   bypass relief: zero below p_c,
//           k_b = Q_bf/(p_f - p_c), w = 0.02 (p_f - p_c)
//   Q     = Q_e + Q_b
// Residuals: r0 = dp_h(Q) + x - dp [Pa];  r1 = Q - Q_e - Q_b [m3/s].
// Internal unknown: x [Pa], the element (and bypass) pressure drop.
//
// Coefficients from datasheet-style inputs: a = element_dp / (mu_r Q_r),
// mu_r = nu_r rho_r; b = housing_dp / (rho_r Q_r^2).
//
// Sign convention: Q > 0 from inlet (from) to outlet (to); the bypass opens
// only for a positive element drop (one-way).
//
// Inputs (SI): rated_flow Q_r [m3/s]; element_dp [Pa] clean element drop at
// Q_r and rated_viscosity nu_r [m2/s]; housing_dp [Pa] at Q_r and
// rated_density rho_r [kg/m3] (default 870); clogging c >= 1 (1 clean; the
// element drop of a dirty element is c times the clean one; datasheets give
// the terminal drop, e.g. c = 3 to 5 at the change indicator, common
// practice); bypass_crack p_c [Pa] (optional), bypass_full p_f [Pa]
// (default 1.25 p_c), bypass_flow Q_bf [m3/s] (default Q_r).
//
// Open/closed (ComponentReport::valve, read by the filter_bypass_closed
// check): the bypass is open when Q_b > kValveOpenFraction Q_bf, the one
// threshold of every valve that must stay shut (components/component.h says
// why 1e-3: reached 0.06 (p_f - p_c) below p_c on the softplus tail).
// Validity: element flow laminar (Darcy regime, pore Reynolds < ~1 — true for
// oil filters at rated flows); the housing term is an orifice-like loss.
// Reverse flow is outside the model (warning).
//
// References
// [1] H. Darcy, "Les fontaines publiques de la ville de Dijon", 1856 (flow
//     through porous media proportional to the pressure gradient / mu).
// [2] ISO 3968:2017, "Hydraulic fluid power — Filters — Evaluation of
//     differential pressure versus flow" (housing and element drops measured
//     separately; element drop proportional to viscosity).
#pragma once

#include "components/component.h"
#include "components/correlations/smooth.h"
#include "components/registry.h"

namespace loopwright {

class Filter : public ComponentWithLaw<Filter> {
 public:
  enum Param {
    kRatedFlow, kElementDp, kRatedViscosity, kHousingDp, kRatedDensity, kClogging,
    kBypassCrack, kBypassFull, kBypassFlow, kNumParams
  };
  explicit Filter(const ParamValues& v) { params_ = v.values; }

  int NumInternal() const override { return 1; }
  ResidualKind Kind(int i) const override { return i == 0 ? ResidualKind::kPressure : ResidualKind::kVolumeFlow; }

  double A() const { return params_[kElementDp] / (params_[kRatedViscosity] * params_[kRatedDensity] * params_[kRatedFlow]); }
  double B() const { return params_[kHousingDp] / (params_[kRatedDensity] * params_[kRatedFlow] * params_[kRatedFlow]); }
  bool HasBypass() const { return !std::isnan(params_[kBypassCrack]); }
  double BypassFull() const {
    return std::isnan(params_[kBypassFull]) ? 1.25 * params_[kBypassCrack] : params_[kBypassFull];
  }
  double BypassFlowRated() const { return std::isnan(params_[kBypassFlow]) ? params_[kRatedFlow] : params_[kBypassFlow]; }

  template <class T>
  T BypassFlow(const T& x) const {
    if (!HasBypass()) return T(0.0);
    const double pc = params_[kBypassCrack], pf = BypassFull();
    return BypassFlowRated() / (pf - pc) * Softplus(x - pc, 0.02 * (pf - pc));
  }

  template <class T>
  void Law(const T& dp, const T& m, const T& rho, const T& mu, const T* x, T* r) const {
    const T q = m / rho;
    const double qeps = 1e-9 * params_[kRatedFlow];
    r[0] = B() * rho * SignedSquare(q, qeps) + x[0] - dp;
    r[1] = q - x[0] / (A() * mu * params_[kClogging]) - BypassFlow(x[0]);
  }

  LinearGuess Linearize(double rho, double mu) const override;
  void GuessInternal(double dp, double m, double rho, double mu, double* x) const override;
  void Describe(const BranchResult& b, ComponentReport* out) const override;
};

ComponentType FilterType();

}  // namespace loopwright
