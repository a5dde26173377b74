#include "components/journal_bearing.h"

#include <fmt/format.h>

namespace loopwright {

void JournalBearing::Describe(const BranchResult& b, ComponentReport* out) const {
  const double q = b.m / b.rho;
  const double c = params_[kClearance];
  out->items.push_back({"feed_pressure_above_drain", b.dp, Dimension::kPressureDifference, ""});
  out->items.push_back({"feed_flow", q, Dimension::kVolumeFlow, q < 0 ? "reversed" : ""});
  // Couette Reynolds number on the clearance, rho U c / mu.
  if (!std::isnan(params_[kSpeed])) {
    const double u = params_[kSpeed] * 0.5 * params_[kDiameter];
    const double re = b.rho * u * c / b.mu;
    out->items.push_back({"film_reynolds", re, Dimension::kDimensionless, re < 1000 ? "laminar" : "turbulent film"});
    if (re > 1000) out->warnings.push_back(fmt::format("film Reynolds number {:.0f} above ~1000: the laminar side-flow law is outside its range", re));
  }
  if (q < 0) out->warnings.push_back("flow reversed: the drain cavity is above the feed pressure (bearing starving)");
  if (b.thermal) {
    const double pf = FrictionPower(b.mu);
    out->items.push_back({"friction_power", pf, Dimension::kPower, ""});
    if (!std::isnan(params_[kSpeed])) {
      const double ta = TaylorNumber(b.rho, b.mu, 0.5 * params_[kDiameter], c, params_[kSpeed]);
      if (ta > kTaylorCritical)
        out->warnings.push_back(fmt::format("Taylor number {:.0f} above {:.1f}: the film is not laminar Couette flow; friction is under-predicted", ta, kTaylorCritical));
    }
    // From the enthalpy balance (BranchResult::t_out), as the drain node's.
    if (q > 0 && b.cp > 0)
      out->items.push_back({"oil_temperature_rise", b.t_out - b.t_in, Dimension::kTemperatureDifference, ""});
  }
}

ComponentType JournalBearingType() {
  ComponentType t;
  t.name = "journal_bearing";
  t.summary = "pressure-fed plain journal bearing, circumferential groove: side flow ~ c^3 p_s / mu";
  t.roles = kRoleBearing;
  t.params = {
      Positive("diameter", Dimension::kLength, "journal diameter"),
      Positive("length", Dimension::kLength, "overall bearing length (both lands and the groove)"),
      Num("groove_width", Dimension::kLength, "width of the circumferential feed groove", false, 0.0).Min(0),
      Positive("radial_clearance", Dimension::kLength, "radial clearance c").Knob(),
      Num("eccentricity", Dimension::kDimensionless, "eccentricity ratio at the running condition", false, 0.5).Range(0, 0.95),
      Positive("flow_min", Dimension::kVolumeFlow, "least acceptable feed flow (checks)", false),
      Positive("flow_max", Dimension::kVolumeFlow, "largest acceptable feed flow (checks: drain and seals)", false),
      Num("speed", Dimension::kRotationalSpeed, "shaft speed (friction heat, film Reynolds number)", false).Min(0),
      Num("load", Dimension::kForce, "radial load (friction heat)", false).Min(0),
      Num("heat_soak", Dimension::kPower, "heat conducted into the oil from the housing (thermal solve)", false, 0.0).Min(0),
  };
  t.make = [](const ParamValues& v, std::vector<ParamError>* e) -> std::unique_ptr<Component> {
    using J = JournalBearing;
    if (!(v.values[J::kGroove] < v.values[J::kLength])) e->push_back({"groove_width", "the groove must be narrower than the bearing length"});
    if (!(v.values[J::kClearance] < 0.05 * v.values[J::kDiameter]))
      e->push_back({"radial_clearance", "radial clearance above 5% of the diameter is not a journal bearing (check the units: c is radial, in m or \"um\")"});
    if (!std::isnan(v.values[J::kFlowMin]) && !std::isnan(v.values[J::kFlowMax]) && !(v.values[J::kFlowMin] < v.values[J::kFlowMax]))
      e->push_back({"flow_max", "flow_max must be above flow_min"});
    if (!e->empty()) return nullptr;
    return std::make_unique<J>(v);
  };
  return t;
}

}  // namespace loopwright
