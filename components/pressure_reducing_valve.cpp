#include "components/pressure_reducing_valve.h"

#include <fmt/format.h>

#include "components/regulator_common.h"

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
  const double band = Band(), ps = params_[kSetPressure];
  ReportRegulator(q, y, b.p_to, KvMin(), params_[kKvMax], out);
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
  WarnViscousPort(b, y > 0.0, "the plug's flow is viscous and the valve", out);
}

ComponentType PressureReducingValveType() {
  ComponentType t;
  t.name = "pressure_reducing_valve";
  t.summary = "pressure-reducing valve holding its outlet at a set gauge pressure (proportional band)";
  t.roles = kRoleRegulator;
  t.params = RegulatorParams("outlet gauge pressure at mid travel (the held pressure)",
                             "fall of the held pressure from closed to wide open");
  t.make = [](const ParamValues& v, std::vector<ParamError>* e) -> std::unique_ptr<Component> {
    CheckRegulatorParams(v, "wide open at zero outlet gauge", e);
    if (!e->empty()) return nullptr;
    return std::make_unique<PressureReducingValve>(v);
  };
  return t;
}

}  // namespace loopwright
