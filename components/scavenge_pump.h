// scavenge_pump — a displacement pump drawing oil (and air) out of a bearing
// cavity that cannot drain to the sump by gravity.
//
// Purpose. Where the cavity sits below the sump, or its drain cannot fall, a
// scavenge stage pumps the oil back. It is sized to displace more than the
// oil that arrives, because it draws the cavity's air and foam with it: the
// cavity stays at its gas pressure while the oil flow is below the pump's
// displacement flow. Only when the bearings deliver more oil than it
// displaces does the oil back up: the cavity floods and its pressure rises
// against the pump's nearly vertical characteristic. Lube-system practice
// sizes a scavenge stage at two or more times the oil flow (common
// practice), so its design capacity is taken as half its displacement flow
// (the counterpart of a drain's half-full rule; checked by
// drain_capacity_margin), and its flood capacity as its displacement flow
// (housing_drained).
//
// Equation (residual in Pa):
//   Q_d = V_d n / (2 pi)                         displacement flow [1]
//   vented:  dp_v = p_cav - rho g lift + k_s Q,   k_s = 1e3 Pa / Q_d (the cavity
//            rises by 0.01 bar at the full displacement flow: a slope that
//            keeps the branch strictly rising)
//   flooded: dp_f = -rho g lift + k_f (Q - Q_d), k_f = 1e5 Pa / (0.01 Q_d) (1 bar
//            per 1 % over the displacement flow: the stiff line of a
//            displacement pump, whose delivery hardly moves with pressure
//            [1]; a modelling device standing for the pump's slip, not a
//            measured slip)
//   r = SmoothMax(dp_v, dp_f, w) - dp,  w = 1e3 Pa
// Both branches rise with Q, so the law is monotone and C2 (network/point/
// nodal.cpp); it is neither zero at zero flow nor odd.
// Sign convention: from = the cavity, to = where it delivers (the sump);
// Q > 0 scavenges; dp = p(from) - p(to) + rho g (z(from) - z(to)). The law
// holds -rho g lift itself (lift = z(to) - z(from), may be negative): give the
// nodes that difference (a warning otherwise).
// Inputs (SI): displacement V_d [m3/rev]; speed n [rad/s] (bindable);
// lift [m] (default 0); cavity_pressure p_cav [Pa] (gas in the cavity above
// the sump's, default 0).
// Validity: a positive displacement stage at a steady speed; the pump's own
// power and heat are not modelled (its drive is outside the oil loop's
// balance: a warning when the lift exceeds 10 m, where that power matters).
// References
// [1] H. E. Merritt, "Hydraulic Control Systems", Wiley, 1967, §5 (the
//     displacement pump: geometric flow minus a small slip; from memory).
#pragma once

#include "components/component.h"
#include "components/correlations/smooth.h"
#include "components/registry.h"

namespace loopwright {

class ScavengePump : public ComponentWithLaw<ScavengePump> {
 public:
  static constexpr bool kLossMinusDrop = true;  // r = loss(m) - dp (components/component.h)
  enum Param { kDisplacement, kSpeed, kLift, kCavityPressure, kNumParams };
  static constexpr double kGravity = 9.80665;  // m/s2, standard gravity (CGPM 1901)
  explicit ScavengePump(const ParamValues& v) { params_ = v.values; }
  ResidualKind Kind(int) const override { return ResidualKind::kPressure; }

  // Displacement flow [m3/s]; floored so a stopped pump keeps a finite law.
  double DisplacementFlow() const {
    return std::max(params_[kDisplacement] * params_[kSpeed] / (2.0 * M_PI), 1e-12);
  }

  template <class T>
  void Law(const T& dp, const T& m, const T& rho, const T& mu, const T* x, T* r) const {
    (void)mu; (void)x;
    const T q = m / rho;
    const double qd = DisplacementFlow();
    const T lift_head = rho * (kGravity * params_[kLift]);
    const T vented = params_[kCavityPressure] - lift_head + (1e3 / qd) * q;
    const T flooded = -lift_head + (1e7 / qd) * (q - qd);
    r[0] = SmoothMax(vented, flooded, 1e3) - dp;
  }

  LinearGuess Linearize(double rho, double mu) const override;
  void Describe(const BranchResult& b, ComponentReport* out) const override;
};

ComponentType ScavengePumpType();

}  // namespace loopwright
