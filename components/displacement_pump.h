// displacement_pump — gear, gerotor or vane pump (positive displacement).
//
// Purpose. Delivery of a positive-displacement pump: its geometric flow
// (displacement times speed) less the internal leakage (slip) back across the
// gears or vanes, which is laminar and so grows with the pressure rise and
// falls with viscosity [1]; less the flow its built-in relief valve returns to
// the inlet above its cracking pressure.
//
// Equation (residual in m3/s, zero when the law holds):
//   r = Q - ( D n/(2 pi) - C_s dP/mu - Q_r(dP) )
//   dP    = -dp = pressure rise across the pump (to minus from) [Pa]
//   Q_r   = k_r * Softplus(dP - p_c, w),  k_r = Q_rf / (p_f - p_c),
//           w = 0.02 (p_f - p_c): zero below p_c, Q_rf at p_f, rising on.
// Shaft power  P = D n/(2 pi) dP / eta_m  (torque from the displaced volume,
// mechanical losses by eta_m) [1].
//
// Sign convention: from = inlet (suction), to = outlet; Q > 0 delivers.
// dp = p(from) - p(to) + rho g (z(from) - z(to)) as for every component, so a
// working pump has dp < 0.
//
// Inputs (SI):
//   displacement D [m3/rev] > 0; speed n [rad/s] >= 0;
//   slip C_s [m3] >= 0 (Q_slip = C_s dP / mu); or, instead, a volumetric
//     efficiency eta_v at a rated pressure rise dP_r, dynamic viscosity mu_r
//     and speed n_r (all three required with it: the datasheet point), from
//     which C_s = (1 - eta_v) D n_r/(2 pi) mu_r / dP_r. The slip flow is
//     laminar leakage, C_s dP/mu, and does not change with the running speed
//     n (at a bound or re-sized speed the volumetric efficiency changes
//     instead: eta_v(n) = 1 - (1 - eta_v) n_r/n at the rated dP and mu);
//   relief_crack p_c [Pa] (optional: no internal relief), relief_full p_f
//     [Pa] > p_c (default 1.2 p_c), relief_flow Q_rf [m3/s] (default: the
//     geometric flow at the set speed);
//   mechanical_efficiency eta_m (0, 1], default 0.85 (common practice for
//     small gear pumps; use the maker's figure).
//
// Open/closed (ComponentReport::valve, read by the relief_closed check): the
// internal relief is open ("lifting") when Q_r > kValveOpenFraction Q_rf, the
// one threshold of every valve that must stay shut (components/component.h
// says why 1e-3: reached 0.06 (p_f - p_c) below p_c on the softplus tail).
//
// Validity: the slip law holds for laminar leakage paths (the usual case for
// oil); with very thin fluids (water, hot light oil below ~5 cSt, from
// memory) slip is partly turbulent and this law underestimates it: below
// kSlipLaminarMinNu with the pressure rising, a warning is reported with the
// viscosity and the volumetric efficiency the law gives. dP < 0 (the pump
// driven by the system) is outside the model: a warning is reported. Inlet pressure
// below the fluid's vapour/air release pressure is not modelled here — the
// envelope checks compare the inlet pressure with a limit.
//
// References
// [1] H. E. Merritt, "Hydraulic Control Systems", Wiley, 1967, ch. 7 (pump
//     flow = displacement x speed - leakage, leakage coefficient laminar).
// [2] W. M. Wilson, "Positive-displacement pumps and fluid motors", Pitman,
//     1950 (the slip coefficient C_s dP/mu, from memory).
#pragma once

#include "components/component.h"
#include "components/correlations/smooth.h"
#include "components/registry.h"

namespace loopwright {

// The kinematic viscosity [m2/s] below which the laminar slip law is
// warned about (5 cSt: see Validity above).
inline constexpr double kSlipLaminarMinNu = 5e-6;

class DisplacementPump : public ComponentWithLaw<DisplacementPump> {
 public:
  enum Param {
    kDisplacement, kSpeed, kSlip, kVolEff, kRatedDp, kRatedViscosity, kRatedSpeed,
    kReliefCrack, kReliefFull, kReliefFlow, kMechEff, kNumParams
  };
  explicit DisplacementPump(const ParamValues& v) { params_ = v.values; }

  ResidualKind Kind(int) const override { return ResidualKind::kVolumeFlow; }

  double GeometricFlow() const { return params_[kDisplacement] * params_[kSpeed] / (2.0 * M_PI); }
  double SlipCoefficient() const;
  bool HasRelief() const { return !std::isnan(params_[kReliefCrack]); }

  template <class T>
  void Law(const T& dp, const T& m, const T& rho, const T& mu, const T* x, T* r) const {
    (void)x;
    const T rise = -dp;
    T q = GeometricFlow() - SlipCoefficient() * rise / mu;
    if (HasRelief()) {
      const double pc = params_[kReliefCrack], pf = ReliefFull();
      const double k = ReliefFlow() / (pf - pc);
      q -= k * Softplus(rise - pc, 0.02 * (pf - pc));
    }
    r[0] = m / rho - q;
  }

  LinearGuess Linearize(double rho, double mu) const override;
  bool MayFixFlow() const override { return true; }  // without slip
  void Describe(const BranchResult& b, ComponentReport* out) const override;
  // Shaft power D n/(2 pi) dP / eta_m: with the network's Q*dp (= -Q dP)
  // the stream gains the slip, relief and mechanical losses as heat.
  HeatJet HeatAdded(const HeatInputs& in) const override {
    return HeatJet(GeometricFlow() * std::max(-in.dp, 0.0) / params_[kMechEff]);
  }

 private:
  double ReliefFull() const {
    return std::isnan(params_[kReliefFull]) ? 1.2 * params_[kReliefCrack] : params_[kReliefFull];
  }
  double ReliefFlow() const { return std::isnan(params_[kReliefFlow]) ? GeometricFlow() : params_[kReliefFlow]; }
};

ComponentType DisplacementPumpType();

}  // namespace loopwright
