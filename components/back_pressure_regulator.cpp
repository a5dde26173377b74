#include "components/back_pressure_regulator.h"

#include <fmt/format.h>

namespace loopwright {

LinearGuess BackPressureRegulator::Linearize(double rho, double mu) const {
  (void)mu;
  LinearGuess g;  // the secant through the origin and the set point at mid travel
  const double ps = params_[kSetPressure];
  g.g = rho * Flow(ps, rho) / ps;
  return g;
}

void BackPressureRegulator::Describe(const BranchResult& b, ComponentReport* out) const {
  const double q = b.m / b.rho, y = Travel(b.dp);
  const double kv_min = KvMin();
  const char* state = y <= 0.0 ? "closed" : y >= 1.0 ? "wide_open" : "regulating";
  out->items.push_back({"regulated_flow", q, Dimension::kVolumeFlow, state});
  out->items.push_back({"travel", y, Dimension::kDimensionless, ""});
  out->items.push_back({"authority", std::min(y, 1.0 - y), Dimension::kDimensionless, ""});
  out->items.push_back({"held_pressure", b.dp, Dimension::kPressureDifference, ""});
  out->items.push_back({"kv", kv_min + (params_[kKvMax] - kv_min) * y, Dimension::kFlowCoefficientKv, ""});
  if (y >= 1.0)
    out->warnings.push_back(fmt::format("wide open: the drop {:.4g} bar is above its band (set {:.4g} bar); it no longer "
                                        "holds its set pressure (a larger kv_max or a second valve)",
                                        b.dp / 1e5, params_[kSetPressure] / 1e5));
  const double nu = b.mu / b.rho;
  if (y > 0.0 && nu > 200e-6)
    out->warnings.push_back(fmt::format("viscosity {:.0f} cSt: the plug's flow is viscous and the valve passes less than modelled", nu * 1e6));
}

ComponentType BackPressureRegulatorType() {
  ComponentType t;
  t.name = "back_pressure_regulator";
  t.summary = "pressure control valve holding its inlet at a set pressure by spilling to a return (proportional band)";
  t.roles = kRoleRegulator;
  t.params = {
      Positive("set_pressure", Dimension::kPressureDifference, "drop across the valve at mid travel (the held pressure)").Knob(),
      Positive("proportional_band", Dimension::kPressureDifference,
               "rise of the held pressure from closed to wide open (droop; default 0.1 x set_pressure)", false),
      Positive("kv_max", Dimension::kFlowCoefficientKv, "flow coefficient wide open"),
      Positive("kv_min", Dimension::kFlowCoefficientKv, "flow coefficient closed (seat leakage; default 1e-4 x kv_max)", false),
  };
  t.make = [](const ParamValues& v, std::vector<ParamError>* e) -> std::unique_ptr<Component> {
    using R = BackPressureRegulator;
    if (!std::isnan(v.values[R::kBand]) && !(v.values[R::kBand] <= 2.0 * v.values[R::kSetPressure]))
      e->push_back({"proportional_band", "proportional_band must be at most 2 x set_pressure (closed at zero drop)"});
    if (!std::isnan(v.values[R::kKvMin]) && !(v.values[R::kKvMin] < v.values[R::kKvMax]))
      e->push_back({"kv_min", "kv_min must be below kv_max"});
    if (!e->empty()) return nullptr;
    return std::make_unique<R>(v);
  };
  return t;
}

}  // namespace loopwright
