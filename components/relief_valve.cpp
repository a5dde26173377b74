#include "components/relief_valve.h"

#include <fmt/format.h>

namespace loopwright {

void ReliefValve::Describe(const BranchResult& b, ComponentReport* out) const {
  const double q = b.m / b.rho;
  const double pc = params_[kCrack], pf = FullOpen();
  const double lift = b.dp <= pc ? 0.0 : SmoothStep01(b.dp, pc, pf);
  const bool lifting = q > 1e-6 * params_[kRatedFlow];
  out->items.push_back({"relief_flow", q, Dimension::kVolumeFlow, lifting ? "lifting" : "closed"});
  out->items.push_back({"lift_fraction", lift, Dimension::kDimensionless, ""});
  out->items.push_back({"pressure_over_crack", b.dp - pc, Dimension::kPressureDifference, ""});
  if (b.dp > 2 * pf) out->warnings.push_back("pressure above twice the full-open pressure: the characteristic is extrapolated");
  const double nu = b.mu / b.rho;
  if (lifting && nu > 200e-6)
    out->warnings.push_back(fmt::format("viscosity {:.0f} cSt: the seat flow is viscous and the valve passes less than modelled", nu * 1e6));
}

ComponentType ReliefValveType() {
  ComponentType t;
  t.name = "relief_valve";
  t.summary = "spring relief / back-pressure regulating valve: crack, full open, rated flow";
  t.roles = kRoleReliefValve;
  t.params = {
      Positive("crack", Dimension::kPressureDifference, "cracking pressure (across the valve)"),
      Positive("full_open", Dimension::kPressureDifference, "full-open pressure (default 1.15 x crack)", false),
      Positive("rated_flow", Dimension::kVolumeFlow, "flow at full open"),
  };
  t.make = [](const ParamValues& v, std::vector<ParamError>* e) -> std::unique_ptr<Component> {
    if (!std::isnan(v.values[1]) && !(v.values[1] > v.values[0])) e->push_back({"full_open", "full_open must be above crack"});
    if (!e->empty()) return nullptr;
    return std::make_unique<ReliefValve>(v);
  };
  return t;
}

}  // namespace loopwright
