#include "components/pressure_reducing_valve.h"

#include <fmt/format.h>

namespace loopwright {

LinearGuess PressureReducingValve::Linearize(double rho, double mu) const {
  (void)mu;
  LinearGuess g;  // the secant through the origin and a drop of p_set at mid travel
  const double ps = params_[kSetPressure];
  g.g = rho * Flow(ps, ps, rho) / ps;
  return g;
}

void PressureReducingValve::Describe(const BranchResult& b, ComponentReport* out) const {
  const double q = b.m / b.rho, y = Travel(b.p_to);
  const double kv_min = KvMin(), band = Band(), ps = params_[kSetPressure];
  const char* state = y <= 0.0 ? "closed" : y >= 1.0 ? "wide_open" : "regulating";
  out->items.push_back({"regulated_flow", q, Dimension::kVolumeFlow, state});
  out->items.push_back({"travel", y, Dimension::kDimensionless, ""});
  out->items.push_back({"authority", std::min(y, 1.0 - y), Dimension::kDimensionless, ""});
  out->items.push_back({"held_pressure", b.p_to, Dimension::kPressureDifference, ""});
  out->items.push_back({"kv", kv_min + (params_[kKvMax] - kv_min) * y, Dimension::kFlowCoefficientKv, ""});
  if (y >= 1.0)
    out->warnings.push_back(fmt::format("wide open: the outlet {:.4g} bar g is below its band (set {:.4g} bar g); the "
                                        "supply {:.4g} bar g cannot hold the set pressure (a higher supply or a larger "
                                        "kv_max)",
                                        b.p_to / 1e5, ps / 1e5, b.p_from / 1e5));
  if (y <= 0.0)
    out->warnings.push_back(fmt::format("closed: the outlet {:.4g} bar g is above its band (set {:.4g} bar g + {:.4g} "
                                        "bar / 2): no demand downstream, or another feed holds it",
                                        b.p_to / 1e5, ps / 1e5, band / 1e5));
  if (b.m < 0.0 && q < -kValveOpenFraction * params_[kKvMax] / 3600.0 * std::sqrt(ps / 1e5 * 1000.0 / b.rho))
    out->warnings.push_back("reverse flow: the outlet is above the inlet; a reducing valve is not meant to pass it "
                            "(the model's reverse flow is not monotone in the outlet pressure)");
  const double nu = b.mu / b.rho;
  if (y > 0.0 && nu > 200e-6)
    out->warnings.push_back(fmt::format("viscosity {:.0f} cSt: the plug's flow is viscous and the valve passes less than modelled", nu * 1e6));
}

ComponentType PressureReducingValveType() {
  ComponentType t;
  t.name = "pressure_reducing_valve";
  t.summary = "pressure-reducing valve holding its outlet at a set gauge pressure (proportional band)";
  t.roles = kRoleRegulator;
  t.params = {
      Positive("set_pressure", Dimension::kPressureDifference, "outlet gauge pressure at mid travel (the held pressure)").Knob(),
      Positive("proportional_band", Dimension::kPressureDifference,
               "fall of the held pressure from closed to wide open (droop; default 0.1 x set_pressure)", false),
      Positive("kv_max", Dimension::kFlowCoefficientKv, "flow coefficient wide open"),
      Positive("kv_min", Dimension::kFlowCoefficientKv, "flow coefficient closed (seat leakage; default 1e-4 x kv_max)", false),
  };
  t.make = [](const ParamValues& v, std::vector<ParamError>* e) -> std::unique_ptr<Component> {
    using R = PressureReducingValve;
    if (!std::isnan(v.values[R::kBand]) && !(v.values[R::kBand] <= 2.0 * v.values[R::kSetPressure]))
      e->push_back({"proportional_band", "proportional_band must be at most 2 x set_pressure (wide open at zero outlet gauge)"});
    if (!std::isnan(v.values[R::kKvMin]) && !(v.values[R::kKvMin] < v.values[R::kKvMax]))
      e->push_back({"kv_min", "kv_min must be below kv_max"});
    if (!e->empty()) return nullptr;
    return std::make_unique<R>(v);
  };
  return t;
}

}  // namespace loopwright
