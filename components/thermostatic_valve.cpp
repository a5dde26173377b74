#include "components/thermostatic_valve.h"

#include <fmt/format.h>

#include "components/regulator_common.h"

namespace loopwright {

LinearGuess ThermostaticValve::Linearize(double rho, double mu) const {
  (void)mu;
  LinearGuess g;  // the secant through the origin and 1 bar, at the path's present opening
  g.g = rho * Flow(1e5, rho) / 1e5;
  return g;
}

void ThermostaticValve::Describe(const BranchResult& b, ComponentReport* out) const {
  const double q = b.m / b.rho, ts = SensedTemperature(), y = Travel(ts), a = Opening();
  const char* state = a <= 0.0 ? "shut" : a >= 1.0 ? "open" : "throttling";
  out->items.push_back({"path_flow", q, Dimension::kVolumeFlow, state});
  out->items.push_back({"travel", y, Dimension::kDimensionless, OpensHot() ? "opens_hot" : "closes_hot"});
  out->items.push_back({"opening", a, Dimension::kDimensionless, ""});
  out->items.push_back({"sensed_temperature", ts, Dimension::kTemperature, ""});
  out->items.push_back({"kv", PathKv(), Dimension::kFlowCoefficientKv, ""});
  // Saturation is warned once per valve, on its hot path; the thermostat_travel
  // check warns (at thermal points, naming the point) of either end.
  if (y >= 1.0 && OpensHot())
    out->warnings.push_back(fmt::format(
        "fully open to the hot path: sensed {:.1f} degC, at or above full_open {:.1f} degC; the valve no longer "
        "regulates (on a cooler bypass: the cooler is too small for this point)",
        ts - 273.15, params_[kFullOpen] - 273.15));
  WarnViscousPort(b, a > 0.0, "the port's flow is viscous and the path", out);
}

ComponentType ThermostaticValveType() {
  ComponentType t;
  t.name = "thermostatic_valve";
  t.summary = "one path of a three-port wax-element valve (cooler bypass, coolant thermostat): its opening follows "
              "the temperature at its sensed_node between start_to_open and full_open";
  t.roles = kRoleThermostat;
  ParamSpec sensed = Num("sensed_temperature", Dimension::kTemperature,
                         "temperature the element senses; normally left out: the network sets it from sensed_node "
                         "(the loop's temperature at an isothermal point); written, it holds the element there",
                         false);
  sensed.bindable = false;
  t.params = {
      Num("start_to_open", Dimension::kTemperature, "sensed temperature where the hot path starts to open").Min(0, true),
      Num("full_open", Dimension::kTemperature, "sensed temperature where the hot path is fully open").Min(0, true),
      Positive("kv", Dimension::kFlowCoefficientKv, "flow coefficient of this path fully open").Knob(),
      Positive("kv_leak", Dimension::kFlowCoefficientKv, "flow coefficient of this path shut (seat leakage; default 1e-4 x kv)", false),
      Choice("path", {"opens_hot", "closes_hot"},
             "opens_hot: the path opens as the sensed temperature rises (to the cooler, radiator); closes_hot: it "
             "closes (the bypass)"),
      sensed,
  };
  t.make = [](const ParamValues& v, std::vector<ParamError>* e) -> std::unique_ptr<Component> {
    using R = ThermostaticValve;
    if (!(v.values[R::kFullOpen] > v.values[R::kStartToOpen] + 0.1))
      e->push_back({"full_open", "full_open must be above start_to_open (by 0.1 K at least)"});
    if (!std::isnan(v.values[R::kKvLeak]) && !(v.values[R::kKvLeak] < v.values[R::kKv]))
      e->push_back({"kv_leak", "kv_leak must be below kv"});
    if (!e->empty()) return nullptr;
    return std::make_unique<R>(v);
  };
  return t;
}

}  // namespace loopwright
