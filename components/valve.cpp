#include "components/valve.h"

#include <fmt/format.h>

namespace loopwright {

LinearGuess Valve::Linearize(double rho, double mu) const {
  (void)mu;
  // Secant through 1 bar, turbulent relation.
  const double q = KvEffective() / 3600.0 * std::sqrt(kIecReferenceWaterDensity / rho);
  LinearGuess g;
  g.g = rho * q / 1e5;
  return g;
}

void Valve::Describe(const BranchResult& b, ComponentReport* out) const {
  const double q = b.m / b.rho;
  const double kv = KvEffective();
  out->items.push_back({"kv_effective", kv, Dimension::kFlowCoefficientKv, ""});
  const IecValveGeometry g = Geometry();
  if (g.valve_diameter_m > 0 && q != 0) {
    const double rev = IecValveReynolds(q, kv, b.mu / b.rho, g);
    const double fr = IecReynoldsFactor(rev, kv, g);
    out->items.push_back({"valve_reynolds", rev, Dimension::kDimensionless, rev < 10000 ? "viscous" : "turbulent"});
    out->items.push_back({"reynolds_factor", fr, Dimension::kDimensionless, ""});
  }
  const double p1_abs = b.p_from + b.ambient_pa;
  if (b.dp > g.fl * g.fl * p1_abs)
    out->warnings.push_back(fmt::format("drop {:.3g} bar exceeds FL^2 p1: the flow may be choked or cavitating (outside IEC 60534-2-1 non-choked relations)", b.dp / 1e5));
}

ComponentType ValveType() {
  ComponentType t;
  t.name = "valve";
  t.summary = "manual/bypass/control valve: Kv, opening and characteristic, IEC 60534-2-1 Reynolds factor";
  t.roles = kRoleValve;
  t.params = {
      Positive("kvs", Dimension::kFlowCoefficientKv, "flow coefficient fully open (Kv, or a Cv value)").Knob(),
      Num("opening", Dimension::kDimensionless, "relative travel, 0 closed .. 1 open", false, 1.0).Range(0, 1).Knob(),
      Choice("characteristic", {"linear", "equal_percentage", "quick_opening"}, "inherent characteristic", 0),
      Num("rangeability", Dimension::kDimensionless, "rangeability of equal_percentage", false, 50.0).Min(1, true),
      Positive("size", Dimension::kLength, "valve size d (enables the Reynolds-number factor)", false),
      Positive("pipe_diameter", Dimension::kLength, "pipe bore D (default: size)", false),
      Num("fl", Dimension::kDimensionless, "liquid pressure recovery factor FL", false, 0.9).Range(0, 1, true),
      Num("fd", Dimension::kDimensionless, "valve style modifier Fd", false, 1.0).Range(0.01, 1),
      Num("leakage", Dimension::kDimensionless, "closed-seat leakage as a fraction of Kvs", false, 1e-4).Range(0, 0.1),
  };
  t.make = [](const ParamValues& v, std::vector<ParamError>* e) -> std::unique_ptr<Component> {
    (void)e;
    return std::make_unique<Valve>(v);
  };
  return t;
}

}  // namespace loopwright
