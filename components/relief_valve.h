// relief_valve — spring-loaded relief or pressure-regulating (back-pressure)
// valve: closed below its cracking pressure, opening smoothly to full lift.
//
// Purpose. The valve that limits the pump's outlet pressure or, set lower,
// holds the feed header at a regulated pressure by spilling the pump's excess
// flow back to the sump. Its flow rises from zero at the cracking pressure to
// the rated flow at the full-open pressure (spring rate and flow forces lumped
// into that straight-line characteristic), beyond which it behaves as a fixed
// orifice of its full-lift area [1].
//
// Equation (residual in m3/s):
//   r = Q - Q_r y(dp) sqrt(dp / p_f)          for dp > p_c, else r = Q
//   y  = SmoothStep01(dp; p_c, p_f)  quintic C2 ramp from 0 at p_c to 1 at p_f
// (so the characteristic is C2 everywhere, including at the cracking point).
//
// Sign convention: from = the pressure side it protects, to = where it spills
// (sump, pump inlet); Q > 0 spills; one-way: no flow for dp <= p_c.
// Inputs (SI): crack p_c [Pa] > 0, full_open p_f [Pa] > p_c (default
// 1.15 p_c — a common practice override/accumulation figure; use the maker's
// curve), rated_flow Q_r [m3/s] at p_f. When p_c changes after the case is
// loaded (an envelope binding, a design knob: re-setting the spring), a given
// p_f moves with it in proportion, p_f = p_f,given p_c / p_c,given, keeping
// the valve's override ratio.
// Validity: p_c < dp up to ~2 p_f (beyond that the fixed-orifice continuation
// is an extrapolation: warning); turbulent flow through the seat (the
// viscous case passes less; a warning is given above 200 cSt).
// References
// [1] H. E. Merritt, "Hydraulic Control Systems", Wiley, 1967, §9 (relief
//     valve static characteristic: cracking, override, full flow; from memory).
// [2] ISO 4411:2019, "Hydraulic fluid power — Valves — Determination of
//     differential pressure/flow characteristics" (how the curve is measured).
#pragma once

#include "components/component.h"
#include "components/correlations/smooth.h"
#include "components/registry.h"

namespace loopwright {

class ReliefValve : public ComponentWithLaw<ReliefValve> {
 public:
  enum Param { kCrack, kFullOpen, kRatedFlow, kNumParams };
  explicit ReliefValve(const ParamValues& v) : crack_given_(v.values[kCrack]) { params_ = v.values; }
  ResidualKind Kind(int) const override { return ResidualKind::kVolumeFlow; }
  double FullOpen() const {
    return std::isnan(params_[kFullOpen]) ? 1.15 * params_[kCrack] : params_[kFullOpen] * params_[kCrack] / crack_given_;
  }

  template <class T>
  T Flow(const T& dp) const {
    using std::sqrt;
    const double pc = params_[kCrack], pf = FullOpen();
    if (ScalarPart(dp) <= pc) return T(0.0);
    return params_[kRatedFlow] * SmoothStep01(dp, pc, pf) * sqrt(dp / pf);
  }

  template <class T>
  void Law(const T& dp, const T& m, const T& rho, const T& mu, const T* x, T* r) const {
    (void)mu; (void)x;
    r[0] = m / rho - Flow(dp);
  }

  LinearGuess Linearize(double rho, double mu) const override {
    (void)mu;
    LinearGuess g;  // closed: a tiny conductance keeps the guess well posed
    g.g = 1e-6 * rho * params_[kRatedFlow] / FullOpen();
    return g;
  }
  void Describe(const BranchResult& b, ComponentReport* out) const override;

 private:
  double crack_given_;  // p_c as loaded [Pa]
};

ComponentType ReliefValveType();

}  // namespace loopwright
