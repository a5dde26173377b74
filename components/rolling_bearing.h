// rolling_bearing — rolling-element bearing cartridge lubricated by oil jets.
//
// Purpose. The oil a jet-lubricated ball or roller bearing takes: the flow of
// its feed jets (sharp-edged nozzles) for the feed pressure above the
// bearing cavity. The hydraulic law is the orifice law of
// components/correlations/orifice.h applied to `count` identical jets:
//
//   r = (1 - beta^4) [ rho q|q| / (2 Cd^2 A0^2) + 2 mu q / (pi delta^2 d^3) ] - dp,
//   q = Q / count                                                     [Pa]
//
// Sign convention: from = feed gallery, to = bearing cavity (housing); Q > 0
// into the bearing.
// Inputs (SI): diameter d [m] of each jet; count; cd (default 0.61),
// low_re_delta (default 0.1629, as the orifice); pipe_diameter (optional,
// the feed bore behind a jet: the approach factor 1 - beta^4 only — a jet
// into the cavity loses its whole drop, no ISO 5167 recovery); flow_min / flow_max [m3/s] for the checks;
// loss_power [W], the bearing's friction loss carried by the oil (given per
// operating point or from the maker's data; used by the thermal model).
// Validity: as the orifice; jets must not be flooded by the cavity's oil.
//
// Oil demand (the bearing's own least flow, the default of flow_min).
// Heat-balance method: the oil must carry the bearing's friction power N at
// no more than an allowed temperature rise dT_a through the bearing,
//   Q_d = N / (rho cp dT_a),   N = M omega,   M = M0 + M1,
// with Palmgren's friction moment [1, 2] (from memory), in its published
// units (M in N mm, nu in mm2/s (cSt), n in rpm, d_m in mm):
//   M0 = 1e-7 f0 (nu n)^(2/3) d_m^3      for nu n >= 2000
//   M0 = 160e-7 f0 d_m^3                  for nu n <  2000
//   M1 = f1 P1 d_m
// f0 the speed-load factor of the bearing type and lubrication method
// (Palmgren's table [1]: e.g. deep-groove ball bearings about 2 in an oil
// bath, 4 under oil jets; cylindrical roller bearings 2-3 and 4-6; from
// memory: give the maker's value), f1 the load factor (deep-groove ball
// bearings about 0.0007 to 0.0009 (P0/C0)^0.5, from memory), P1 the load that
// governs M1 [N]. nu is taken at the feed temperature (the bearing runs
// hotter: the moment is on the high side, so the demand is too: the safe
// side for flow_min). dT_a defaults to 15 K (common practice for
// circulating oil through rolling bearings: 10-20 K). The demand needs
// speed, pitch_diameter and palmgren_f0 (together); M1 needs palmgren_f1
// and friction_load (together). It is reported as `oil_demand` with the
// friction moment and power, and the bearing_flow_min check uses it when
// the case gives no flow_min (a flow_min written, or bound, overrides it).
// The heat into the oil stays loss_power (the maker's figure): the demand
// does not change the thermal balance. With speed given as 0 (a scenario
// that stops the shaft) and loss_power above zero the results warn: a
// stopped bearing makes no friction heat.
//
// References: see components/orifice.h and components/correlations/orifice.h;
// [1] A. Palmgren, "Ball and Roller Bearing Engineering", 3rd ed., SKF
//     Industries, Philadelphia, 1959, ch. on friction (M = M0 + M1, the f0
//     and f1 factors; from memory).
// [2] T. A. Harris, M. N. Kotzalas, "Rolling Bearing Analysis: Essential
//     Concepts of Bearing Technology", 5th ed., CRC Press, 2007, ch. 7
//     (friction; Palmgren's relations and factor tables; chapter from memory).
#pragma once

#include "components/orifice.h"

namespace loopwright {

class RollingBearing : public ComponentWithLaw<RollingBearing> {
 public:
  static constexpr bool kLossMinusDrop = true;  // r = loss(m) - dp (components/component.h)
  enum Param {
    kDiameter, kPipeDiameter, kCd, kDelta, kCount, kFlowMin, kFlowMax, kLossPower, kHeatSoak,
    kSpeed, kPitchDiameter, kF0, kF1, kFrictionLoad, kAllowedRise, kNumParams
  };
  explicit RollingBearing(const ParamValues& v) { params_ = v.values; }
  ResidualKind Kind(int) const override { return ResidualKind::kPressure; }

  template <class T>
  void Law(const T& dp, const T& m, const T& rho, const T& mu, const T* x, T* r) const {
    (void)x;
    Orifice::JetLaw(params_.data(), /*in_line=*/false, dp, m, rho, mu, r);
  }
  LinearGuess Linearize(double rho, double mu) const override { return Orifice::JetLinearize(params_.data(), rho, mu); }
  // Heat: the given friction loss (maker's data or a published relation
  // evaluated by the user per operating point) plus heat soak.
  HeatJet HeatAdded(const HeatInputs& in) const override {
    (void)in;
    return HeatJet(params_[kLossPower] + (std::isnan(params_[kHeatSoak]) ? 0.0 : params_[kHeatSoak]));
  }
  void Describe(const BranchResult& b, ComponentReport* out) const override;

  // Palmgren's friction moment M0 + M1 [N m] at kinematic viscosity nu
  // [m2/s] (see the header); NaN when the demand's parameters are absent.
  double FrictionMoment(double nu) const;
  // The oil demand Q_d = M omega / (rho cp dT_a) [m3/s]; NaN when absent.
  double OilDemand(double nu, double rho, double cp) const;
};

ComponentType RollingBearingType();

}  // namespace loopwright
