#include "components/scavenge_pump.h"

#include <fmt/format.h>

namespace loopwright {

LinearGuess ScavengePump::Linearize(double rho, double mu) const {
  (void)mu;
  LinearGuess g;  // a stiff pump: the flooded slope, centred on the displacement flow
  const double qd = DisplacementFlow();
  g.g = rho * 0.01 * qd / 1e5;
  g.m0 = rho * qd;
  return g;
}

void ScavengePump::Describe(const BranchResult& b, ComponentReport* out) const {
  const double q = b.m / b.rho, qd = DisplacementFlow();
  const bool floods = q > qd;
  out->items.push_back({"drain_flow", q, Dimension::kVolumeFlow, floods ? "flooding" : "scavenging"});
  out->items.push_back({"design_capacity", 0.5 * qd, Dimension::kVolumeFlow, ""});
  out->items.push_back({"flood_capacity", qd, Dimension::kVolumeFlow, ""});
  out->items.push_back({"oil_fraction", q / qd, Dimension::kDimensionless, ""});
  const double vent = params_[kCavityPressure] - b.rho * kGravity * params_[kLift];
  out->items.push_back({"cavity_backpressure", std::max(0.0, b.dp - vent), Dimension::kPressureDifference, ""});
  if (floods)
    out->warnings.push_back(fmt::format("housing floods: {:.3g} L/min arrive, the scavenge pump displaces {:.3g} L/min",
                                        q * 6e4, qd * 6e4));
  const double dz = (b.dp - (b.p_from - b.p_to)) / (b.rho * kGravity), lift = params_[kLift];
  if (std::abs(dz + lift) > 0.05 * std::abs(lift) + 0.01)
    out->warnings.push_back(fmt::format("the nodes' elevations differ by {:.3g} m but the pump lifts {:.3g} m: give the "
                                        "nodes the pump's lift", -dz, lift));
  if (lift > 10) out->warnings.push_back("lift above 10 m: the scavenge pump's power (not modelled) matters");
}

ComponentType ScavengePumpType() {
  ComponentType t;
  t.name = "scavenge_pump";
  t.summary = "displacement pump drawing oil and air out of a cavity that cannot drain by gravity (floods beyond its displacement)";
  t.roles = kRoleDrain;
  t.params = {
      Positive("displacement", Dimension::kDisplacement, "geometric displacement per revolution").Knob(),
      Num("speed", Dimension::kRotationalSpeed, "shaft speed").Min(0),
      Num("lift", Dimension::kLength, "rise from the cavity to where it delivers (elevation of to minus from)", false, 0.0)
          .Range(-50, 50),
      Num("cavity_pressure", Dimension::kPressureDifference, "gas pressure in the cavity above the delivery's", false, 0.0),
  };
  t.make = [](const ParamValues& v, std::vector<ParamError>* e) -> std::unique_ptr<Component> {
    (void)e;
    return std::make_unique<ScavengePump>(v);
  };
  return t;
}

}  // namespace loopwright
