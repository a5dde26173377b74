// centrifugal_pump — rotodynamic pump from its datasheet head–flow curve.
//
// Purpose. The pressure rise of a centrifugal pump (typical of coolant loops)
// at a given flow and speed, from head–flow points read off the maker's curve
// at a rated speed, moved to other speeds by the affinity laws [1].
//
// Equation (residual in Pa):
//   r = rho g s^2 H0(Q/s) + dp,   s = n / n_rated
//   H0(Q) = a0 + a1 Q + a2 Q^2, the least-squares quadratic through the
//   datasheet points (Q_i, H_i) at n_rated (exact through three points).
// Affinity laws [1]: Q ~ n, H ~ n^2, P ~ n^3 for the same impeller.
// Shaft power P = rho g Q H / eta(Q/s), eta from the optional efficiency
// points by the same quadratic fit (clamped to [0.05, 1]).
//
// Sign convention: from = suction, to = discharge; Q > 0 delivers;
// dp = p(from) - p(to) + rho g dz, so a working pump has dp < 0.
//
// Inputs (SI): curve rows [flow m3/s, head m] at rated_speed (>= 3 rows,
// flows ascending, head not rising with flow beyond the first point);
// speed and rated_speed [rad/s]; efficiency rows [flow m3/s, eta] optional.
//
// Reverse flow: the quadratic term is taken odd, a2 Q|Q|, so the head keeps
// falling as the flow runs backwards (a pump driven backwards loses head like
// a quadratic resistance; common practice for a monotone extension) and the
// law stays monotone for the solver (network/point/nodal.cpp).
//
// Validity: 0 <= Q/s <= the largest datasheet flow (beyond it, and for
// reverse flow, the curve is extrapolated and a warning is reported);
// water-like viscosity (the datasheet's): for viscous liquids the curve
// must be corrected first (ANSI/HI 9.6.7), which this model does not do —
// a warning is reported when mu > 5 mPa.s.
//
// References
// [1] I. J. Karassik et al., "Pump Handbook", 4th ed., McGraw-Hill, 2008,
//     §2.1 (affinity laws).
// [2] ANSI/HI 9.6.7-2015, "Effects of liquid viscosity on rotodynamic pump
//     performance" (named for the viscous limit; not applied).
#pragma once

#include "components/component.h"
#include "components/correlations/smooth.h"
#include "components/registry.h"

namespace loopwright {

class CentrifugalPump : public ComponentWithLaw<CentrifugalPump> {
 public:
  enum Param { kCurve, kSpeed, kRatedSpeed, kEfficiency, kNumParams };
  CentrifugalPump(const ParamValues& v, const double head[3], const double eff[3], double q_max, bool has_eff);

  ResidualKind Kind(int) const override { return ResidualKind::kPressure; }

  template <class T>
  void Law(const T& dp, const T& m, const T& rho, const T& mu, const T* x, T* r) const {
    (void)x; (void)mu;
    const double s = params_[kSpeed] / params_[kRatedSpeed];
    const T q = m / rho;
    const T head = CurveHead(h_[0], h_[1], h_[2], s, q);
    r[0] = rho * 9.80665 * head + dp;
  }

  // The head law [m] at speed ratio s = speed / rated_speed for the datasheet
  // quadratic H0(Q) = a0 + a1 Q + a2 Q^2: s^2 H0(Q/s) = a0 s^2 + a1 s Q + a2 Q^2
  // (affinity laws), with Q^2 taken as Q|Q| (the C2 SignedSquare, exact for
  // |Q| >= kReverseFlowScale) so that in reverse flow the head keeps falling
  // with flow. Templated on the coefficients and the flow, so that the
  // fitter (network/design/fit.cpp) differentiates this same law in a0, a1, a2.
  template <class C, class Q>
  static auto CurveHead(const C& a0, const C& a1, const C& a2, double s, const Q& q) {
    return a0 * s * s + a1 * s * q + a2 * SignedSquare(q, kReverseFlowScale);
  }

  static constexpr double kReverseFlowScale = 1e-12;  // [m3/s]
  double Head(double q) const;
  double Efficiency(double q) const;
  LinearGuess Linearize(double rho, double mu) const override;
  void Describe(const BranchResult& b, ComponentReport* out) const override;
  // Shaft power rho g Q H / eta = Q dP / eta: with the network's Q*dp the
  // stream gains Q dP (1/eta - 1), the pump's losses, as heat.
  HeatJet HeatAdded(const HeatInputs& in) const override {
    const double q = in.m / in.rho.a;
    return HeatJet(std::max(q, 0.0) * std::max(-in.dp, 0.0) / Efficiency(q));
  }

  // Least-squares quadratic through points; false if ill-posed.
  static bool FitQuadratic(const std::vector<std::vector<double>>& rows, double c[3]);

 private:
  double h_[3];
  double e_[3];
  double q_max_;
  bool has_eff_;
};

ComponentType CentrifugalPumpType();

}  // namespace loopwright
