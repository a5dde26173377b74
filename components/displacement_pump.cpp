#include "components/displacement_pump.h"

#include <fmt/format.h>

namespace loopwright {

double DisplacementPump::SlipCoefficient() const {
  if (!std::isnan(params_[kSlip])) return params_[kSlip];
  if (!std::isnan(params_[kVolEff])) {
    // Slip at the rated point is (1 - eta_v) of the geometric flow at the
    // rated speed; C_s is fixed by that point and does not follow the
    // running speed (laminar leakage depends on dP/mu only).
    return (1.0 - params_[kVolEff]) * params_[kDisplacement] * params_[kRatedSpeed] / (2.0 * M_PI) *
           params_[kRatedViscosity] / params_[kRatedDp];
  }
  return 0.0;
}

LinearGuess DisplacementPump::Linearize(double rho, double mu) const {
  LinearGuess g;
  // m = rho (D n/2pi - C_s (-dp)/mu) = rho D n/2pi + rho C_s/mu dp
  g.m0 = rho * GeometricFlow();
  g.g = rho * SlipCoefficient() / mu;
  if (g.g <= 0) g.fixes_flow = true;
  return g;
}

void DisplacementPump::Describe(const BranchResult& b, ComponentReport* out) const {
  const double rise = -b.dp;
  const double q = b.m / b.rho;
  const double qg = GeometricFlow();
  const double slip = SlipCoefficient() * rise / b.mu;
  double relief = 0;
  if (HasRelief()) {
    const double pc = params_[kReliefCrack], pf = ReliefFull();
    relief = ReliefFlow() / (pf - pc) * Softplus(rise - pc, 0.02 * (pf - pc));
    out->valve = {ValveKind::kInternalRelief, rise, pc, relief, ReliefFlow()};
  }
  const bool lifting = HasRelief() && out->valve.Open();
  out->items.push_back({"pressure_rise", rise, Dimension::kPressureDifference, ""});
  out->items.push_back({"geometric_flow", qg, Dimension::kVolumeFlow, ""});
  out->items.push_back({"slip_flow", slip, Dimension::kVolumeFlow, ""});
  out->items.push_back({"relief_flow", relief, Dimension::kVolumeFlow, lifting ? "lifting" : "closed"});
  out->items.push_back({"volumetric_efficiency", qg > 0 ? q / qg : 0.0, Dimension::kDimensionless, ""});
  out->shaft_power_W = qg * std::max(rise, 0.0) / params_[kMechEff];
  out->items.push_back({"shaft_power", out->shaft_power_W, Dimension::kPower, ""});
  if (rise < 0) out->warnings.push_back("the pressure across the pump falls: the pump is driven by the system (outside the model)");
  const double nu = b.mu / b.rho;
  if (rise > 0 && nu < kSlipLaminarMinNu)
    out->warnings.push_back(fmt::format("viscosity {:.3g} cSt, below {:g} cSt: the slip is partly turbulent and the "
                                        "laminar slip law underestimates it (volumetric efficiency {:.3g} here)",
                                        nu * 1e6, kSlipLaminarMinNu * 1e6, qg > 0 ? q / qg : 0.0));
  if (lifting)
    out->warnings.push_back(fmt::format("internal relief lifting: {:.3g} L/min returned to the inlet", relief * 60000.0));
}

ComponentType DisplacementPumpType() {
  ComponentType t;
  t.name = "displacement_pump";
  t.summary = "gear, gerotor or vane pump: displacement x speed - laminar slip - internal relief";
  t.roles = kRolePump;
  t.params = {
      Positive("displacement", Dimension::kDisplacement, "geometric displacement per revolution").Knob(),
      Num("speed", Dimension::kRotationalSpeed, "shaft speed").Min(0).Knob(),
      Num("slip", Dimension::kSlipCoefficient, "slip coefficient C_s: Q_slip = C_s dP / mu", false).Min(0),
      Num("volumetric_efficiency", Dimension::kDimensionless, "volumetric efficiency at the rated point (instead of slip)", false)
          .Range(0, 1, true),
      Positive("rated_pressure_rise", Dimension::kPressureDifference, "pressure rise of the rated point", false),
      Positive("rated_viscosity", Dimension::kDynamicViscosity, "dynamic viscosity of the rated point", false),
      Positive("rated_speed", Dimension::kRotationalSpeed, "speed of the rated point (required with volumetric_efficiency)", false),
      Positive("relief_crack", Dimension::kPressureDifference, "internal relief cracking pressure rise", false),
      Positive("relief_full", Dimension::kPressureDifference, "internal relief full-open pressure rise (default 1.2 x crack)", false),
      Positive("relief_flow", Dimension::kVolumeFlow, "internal relief flow at full open (default: geometric flow)", false),
      Num("mechanical_efficiency", Dimension::kDimensionless, "mechanical efficiency for shaft power", false, 0.85)
          .Range(0, 1, true),
  };
  t.make = [](const ParamValues& v, std::vector<ParamError>* e) -> std::unique_ptr<Component> {
    using P = DisplacementPump;
    bool has_slip = !std::isnan(v.values[P::kSlip]), has_eff = !std::isnan(v.values[P::kVolEff]);
    if (has_slip && has_eff) e->push_back({"volumetric_efficiency", "give slip or volumetric_efficiency, not both"});
    if (has_eff && (std::isnan(v.values[P::kRatedDp]) || std::isnan(v.values[P::kRatedViscosity]) ||
                    std::isnan(v.values[P::kRatedSpeed])))
      e->push_back({"volumetric_efficiency",
                    "volumetric_efficiency needs the rated point it was measured at: rated_pressure_rise, rated_viscosity "
                    "and rated_speed (the slip it implies does not change with the running speed)"});
    if (!std::isnan(v.values[P::kReliefFull]) &&
        (std::isnan(v.values[P::kReliefCrack]) || !(v.values[P::kReliefFull] > v.values[P::kReliefCrack])))
      e->push_back({"relief_full", "relief_full must be above relief_crack"});
    if (!e->empty()) return nullptr;
    return std::make_unique<P>(v);
  };
  return t;
}

}  // namespace loopwright
