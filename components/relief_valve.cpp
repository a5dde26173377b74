#include "components/relief_valve.h"

#include <fmt/format.h>

namespace loopwright {

void ReliefValve::Describe(const BranchResult& b, ComponentReport* out) const {
  const double q = b.m / b.rho;
  const double pc = params_[kCrack], pf = FullOpen();
  const double lift = b.dp <= pc ? 0.0 : Lift(b.dp);
  out->valve = {ValveKind::kReliefValve, b.dp, pc, q, params_[kRatedFlow]};
  const bool lifting = out->valve.Open();
  out->items.push_back({"relief_flow", q, Dimension::kVolumeFlow, lifting ? "lifting" : "closed"});
  out->items.push_back({"lift_fraction", lift, Dimension::kDimensionless, ""});
  out->items.push_back({"pressure_over_crack", b.dp - pc, Dimension::kPressureDifference, ""});
  if (!std::isnan(params_[kFullOpen]) && params_[kFullOpen] < pf)
    out->warnings.push_back(fmt::format("crack {:.4g} bar is within 1 % of the given full_open {:.4g} bar: the valve is taken to open "
                                        "fully 1 % above crack (give the full-open pressure of this setting)",
                                        pc / 1e5, params_[kFullOpen] / 1e5));
  if (b.dp > 2 * pf) out->warnings.push_back("pressure above twice the full-open pressure: the characteristic is extrapolated");
  const double nu = b.mu / b.rho;
  if (lifting && nu > 200e-6)
    out->warnings.push_back(fmt::format("viscosity {:.0f} cSt: the seat flow is viscous and the valve passes less than modelled", nu * 1e6));
}

ComponentType ReliefValveType() {
  ComponentType t;
  t.name = "relief_valve";
  t.summary = "spring relief / back-pressure regulating valve: lift linear from crack to full open, orifice flow";
  t.roles = kRoleReliefValve;
  t.params = {
      Positive("crack", Dimension::kPressureDifference, "cracking pressure (across the valve)").Knob(),
      Positive("full_open", Dimension::kPressureDifference, "full-open pressure (default 1.15 x crack)", false),
      Positive("rated_flow", Dimension::kVolumeFlow, "flow at full open"),
      Positive("rated_density", Dimension::kDensity, "density of the fluid rated_flow was rated with", false, 870.0),
  };
  t.make = [](const ParamValues& v, std::vector<ParamError>* e) -> std::unique_ptr<Component> {
    using R = ReliefValve;
    if (!std::isnan(v.values[R::kFullOpen]) && !(v.values[R::kFullOpen] >= (1.0 + R::kMinBand) * v.values[R::kCrack]))
      e->push_back({"full_open", "full_open must be at least 1 % above crack"});
    if (!e->empty()) return nullptr;
    return std::make_unique<ReliefValve>(v);
  };
  return t;
}

}  // namespace loopwright
