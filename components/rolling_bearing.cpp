#include "components/rolling_bearing.h"

namespace loopwright {

void RollingBearing::Describe(const BranchResult& b, ComponentReport* out) const {
  out->items.push_back({"feed_pressure_above_drain", b.dp, Dimension::kPressureDifference, ""});
  out->items.push_back({"feed_flow", b.m / b.rho, Dimension::kVolumeFlow, b.m < 0 ? "reversed" : ""});
  Orifice::JetDescribe(params_.data(), b, out);
  if (b.m < 0) out->warnings.push_back("flow reversed: the bearing cavity is above the feed pressure (bearing starving)");
  // From the enthalpy balance (BranchResult::t_out), as the drain node's.
  if (b.thermal && b.m > 0)
    out->items.push_back({"oil_temperature_rise", b.t_out - b.t_in, Dimension::kTemperatureDifference, ""});
}

ComponentType RollingBearingType() {
  ComponentType t;
  t.name = "rolling_bearing";
  t.summary = "jet-lubricated rolling-element bearing: feed flow through its oil jets";
  t.roles = kRoleBearing;
  t.params = OrificeParams();
  t.Param("diameter").description = "bore of each oil jet";
  t.params.push_back(Positive("flow_min", Dimension::kVolumeFlow, "least acceptable feed flow (checks)", false));
  t.params.push_back(Positive("flow_max", Dimension::kVolumeFlow, "largest acceptable feed flow (checks)", false));
  t.params.push_back(Num("loss_power", Dimension::kPower, "friction loss carried away by the oil", false, 0.0).Min(0));
  t.params.push_back(
      Num("heat_soak", Dimension::kPower, "heat conducted into the oil from the housing (thermal solve)", false, 0.0).Min(0));
  t.make = [](const ParamValues& v, std::vector<ParamError>* e) -> std::unique_ptr<Component> {
    using R = RollingBearing;
    if (!std::isnan(v.values[R::kFlowMin]) && !std::isnan(v.values[R::kFlowMax]) && !(v.values[R::kFlowMin] < v.values[R::kFlowMax]))
      e->push_back({"flow_max", "flow_max must be above flow_min"});
    if (!e->empty()) return nullptr;
    return std::make_unique<R>(v);
  };
  return t;
}

}  // namespace loopwright
static_assert(static_cast<int>(loopwright::RollingBearing::kCount) == static_cast<int>(loopwright::Orifice::kCount),
              "a rolling bearing's first parameters are its jets'");
