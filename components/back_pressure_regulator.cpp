#include "components/back_pressure_regulator.h"

#include <fmt/format.h>

#include "components/regulator_common.h"

namespace loopwright {

LinearGuess BackPressureRegulator::Linearize(double rho, double mu) const {
  (void)mu;
  LinearGuess g;  // the secant through the origin and the set point at mid travel
  const double ps = params_[kSetPressure];
  g.g = rho * Flow(ps, rho) / ps;
  return g;
}

void BackPressureRegulator::Describe(const BranchResult& b, ComponentReport* out) const {
  const double y = Travel(b.dp);
  ReportRegulator(b.m / b.rho, y, b.dp, KvMin(), params_[kKvMax], out);
  if (y >= 1.0)
    out->warnings.push_back(fmt::format("wide open: the drop {:.4g} bar is above its band (set {:.4g} bar); it no longer "
                                        "holds its set pressure (a larger kv_max or a second valve)",
                                        b.dp / 1e5, params_[kSetPressure] / 1e5));
  WarnViscousPort(b, y > 0.0, "the plug's flow is viscous and the valve", out);
}

ComponentType BackPressureRegulatorType() {
  ComponentType t;
  t.name = "back_pressure_regulator";
  t.summary = "pressure control valve holding its inlet at a set pressure by spilling to a return (proportional band)";
  t.roles = kRoleRegulator;
  t.params = RegulatorParams("drop across the valve at mid travel (the held pressure)",
                             "rise of the held pressure from closed to wide open");
  t.make = [](const ParamValues& v, std::vector<ParamError>* e) -> std::unique_ptr<Component> {
    CheckRegulatorParams(v, "closed at zero drop", e);
    if (!e->empty()) return nullptr;
    return std::make_unique<BackPressureRegulator>(v);
  };
  return t;
}

}  // namespace loopwright
