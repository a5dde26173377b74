#include "components/orifice.h"

#include <fmt/format.h>

namespace loopwright {

LinearGuess Orifice::JetLinearize(const double* p, double rho, double mu) {
  // Secant through dp = 1 bar: m(1 bar) / 1 bar, from the quadratic in Q.
  const double d = p[kDiameter];
  const double a0 = 0.25 * M_PI * d * d;
  const double cd = p[kCd];
  const double lin = 2.0 * mu / (M_PI * p[kDelta] * p[kDelta] * d * d * d);
  const double quad = rho / (2.0 * cd * cd * a0 * a0);
  const double dp = 1e5;
  const double q = (-lin + std::sqrt(lin * lin + 4 * quad * dp)) / (2 * quad);
  LinearGuess g;
  g.g = rho * q * p[kCount] / dp;
  return g;
}

void Orifice::JetDescribe(const double* p, const BranchResult& b, ComponentReport* out) {
  const double q = b.m / (b.rho * p[kCount]);
  const double re = OrificeReynolds(q, b.rho, b.mu, p[kDiameter]);
  const double cd = OrificeDischargeCoefficient(re, p[kCd], p[kDelta]);
  const double d = p[kDiameter];
  out->items.push_back({"jet_velocity", q / (0.25 * M_PI * d * d), Dimension::kVelocity, ""});
  out->items.push_back({"bore_reynolds", re, Dimension::kDimensionless, re < 100 ? "viscous" : "inertial"});
  out->items.push_back({"effective_cd", cd, Dimension::kDimensionless, ""});
  const double pd = p[kPipeDiameter];
  if (!std::isnan(pd) && d / pd > 0.8)
    out->warnings.push_back(fmt::format("beta = {:.2f} above 0.8: the approach-velocity term dominates", d / pd));
}

void Orifice::Describe(const BranchResult& b, ComponentReport* out) const {
  JetDescribe(params_.data(), b, out);
  const double pd = params_[kPipeDiameter];
  if (std::isnan(pd)) return;
  const double q = b.m / (b.rho * params_[kCount]), d = params_[kDiameter];
  const double across = OrificeDp(q, b.rho, b.mu, d, pd, params_[kCd], params_[kDelta]);
  out->items.push_back({"differential_pressure", across, Dimension::kPressureDifference, "across the plate (corner taps)"});
  out->items.push_back({"permanent_loss_fraction", across != 0 ? b.dp / across : 1.0, Dimension::kDimensionless, ""});
}

std::vector<ParamSpec> OrificeParams() {
  std::vector<ParamSpec> p = {
      Positive("diameter", Dimension::kLength, "bore diameter").Knob(),
      Positive("pipe_diameter", Dimension::kLength, "upstream pipe bore (optional; beta = d/D)", false),
      Positive("cd", Dimension::kDimensionless, "discharge coefficient at high Reynolds number", false, 0.61).Max(1.0),
      Positive("low_re_delta", Dimension::kDimensionless, "laminar coefficient: Cd = delta sqrt(Re) at low Re (default: Sampson's thin plate)", false,
               kOrificeDefaultDelta),
      Positive("count", Dimension::kDimensionless, "identical holes in parallel", false, 1.0),
  };
  return p;
}

ComponentType OrificeType() {
  ComponentType t;
  t.name = "orifice";
  t.summary = "sharp-edged restrictor or oil jet with low-Reynolds correction";
  t.roles = kRoleLine;
  t.params = OrificeParams();
  t.make = [](const ParamValues& v, std::vector<ParamError>* e) -> std::unique_ptr<Component> {
    if (!std::isnan(v.values[Orifice::kPipeDiameter]) && !(v.values[Orifice::kDiameter] < v.values[Orifice::kPipeDiameter]))
      e->push_back({"diameter", "the bore must be smaller than pipe_diameter"});
    if (!e->empty()) return nullptr;
    return std::make_unique<Orifice>(v);
  };
  return t;
}

}  // namespace loopwright
