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
// References: see components/orifice.h and components/correlations/orifice.h.
#pragma once

#include "components/orifice.h"

namespace loopwright {

class RollingBearing : public ComponentWithLaw<RollingBearing> {
 public:
  enum Param { kDiameter, kPipeDiameter, kCd, kDelta, kCount, kFlowMin, kFlowMax, kLossPower, kHeatSoak, kNumParams };
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
};

ComponentType RollingBearingType();

}  // namespace loopwright
