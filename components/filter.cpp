#include "components/filter.h"

#include <fmt/format.h>

namespace loopwright {

LinearGuess Filter::Linearize(double rho, double mu) const {
  LinearGuess g;
  g.g = rho / (A() * mu * params_[kClogging]);
  return g;
}

void Filter::GuessInternal(double dp, double m, double rho, double mu, double* x) const {
  (void)dp;
  x[0] = A() * mu * params_[kClogging] * m / rho;
}

void Filter::Describe(const BranchResult& b, ComponentReport* out) const {
  const double q = b.m / b.rho;
  const double x = b.x[0];
  const double qb = BypassFlow(x);
  const double qe = x / (A() * b.mu * params_[kClogging]);
  out->items.push_back({"element_dp", x, Dimension::kPressureDifference, ""});
  out->items.push_back({"housing_dp", b.dp - x, Dimension::kPressureDifference, ""});
  out->items.push_back({"media_flow", qe, Dimension::kVolumeFlow, ""});
  out->items.push_back({"bypass_flow", qb, Dimension::kVolumeFlow, ""});
  const double frac = std::abs(q) > 0 ? qb / q : 0.0;
  if (HasBypass()) out->valve = {ValveKind::kFilterBypass, x, params_[kBypassCrack], qb, BypassFlowRated()};
  const bool open = HasBypass() && out->valve.Open();
  out->items.push_back({"bypass_fraction", frac, Dimension::kDimensionless, open ? "open" : "closed"});
  if (open)
    out->warnings.push_back(fmt::format("bypass open: {:.1f}% of the oil passes unfiltered (element drop {:.3g} bar, "
                                        "cracking {:.3g} bar)", 100 * frac, x / 1e5, params_[kBypassCrack] / 1e5));
  if (q < 0) out->warnings.push_back("reverse flow through the filter is outside the model");
}

ComponentType FilterType() {
  ComponentType t;
  t.name = "filter";
  t.summary = "full-flow filter: element loss ~ mu Q, housing loss ~ rho Q^2, integral bypass relief";
  t.roles = kRoleFilter;
  t.params = {
      Positive("rated_flow", Dimension::kVolumeFlow, "datasheet flow"),
      Positive("element_dp", Dimension::kPressureDifference, "clean element drop at rated flow and viscosity"),
      Positive("rated_viscosity", Dimension::kKinematicViscosity, "kinematic viscosity of the datasheet drop"),
      Num("housing_dp", Dimension::kPressureDifference, "housing drop at rated flow and density", false, 0.0).Min(0),
      Positive("rated_density", Dimension::kDensity, "density of the datasheet drop", false, 870.0),
      Num("clogging", Dimension::kDimensionless, "element drop / clean element drop (1 = clean)", false, 1.0).Min(1.0),
      Positive("bypass_crack", Dimension::kPressureDifference, "bypass valve cracking pressure", false),
      Positive("bypass_full", Dimension::kPressureDifference, "bypass full-open pressure (default 1.25 x crack)", false),
      Positive("bypass_flow", Dimension::kVolumeFlow, "bypass flow at full open (default rated flow)", false),
  };
  t.make = [](const ParamValues& v, std::vector<ParamError>* e) -> std::unique_ptr<Component> {
    if (!std::isnan(v.values[Filter::kBypassFull]) &&
        (std::isnan(v.values[Filter::kBypassCrack]) || !(v.values[Filter::kBypassFull] > v.values[Filter::kBypassCrack])))
      e->push_back({"bypass_full", "bypass_full must be above bypass_crack"});
    if (!e->empty()) return nullptr;
    return std::make_unique<Filter>(v);
  };
  return t;
}

}  // namespace loopwright
