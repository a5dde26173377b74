#include "components/rolling_bearing.h"

#include <fmt/format.h>

namespace loopwright {

double RollingBearing::FrictionMoment(double nu) const {
  const double w = params_[kSpeed], dm = params_[kPitchDiameter], f0 = params_[kF0];
  if (std::isnan(w) || std::isnan(dm) || std::isnan(f0)) return kNoValue;
  // Palmgren [1] in its published units: nu [mm2/s], n [rpm], d_m [mm], M [N mm].
  const double nu_cst = nu * 1e6, n_rpm = std::fabs(w) * 60.0 / (2.0 * M_PI), dm_mm = dm * 1e3;
  const double dm3 = dm_mm * dm_mm * dm_mm;
  const double nun = nu_cst * n_rpm;
  double m_nmm = nun >= 2000.0 ? 1e-7 * f0 * std::pow(nun, 2.0 / 3.0) * dm3 : 160e-7 * f0 * dm3;
  if (!std::isnan(params_[kF1]) && !std::isnan(params_[kFrictionLoad])) m_nmm += params_[kF1] * params_[kFrictionLoad] * dm_mm;
  return 1e-3 * m_nmm;  // N m
}

double RollingBearing::OilDemand(double nu, double rho, double cp) const {
  const double m = FrictionMoment(nu);
  if (std::isnan(m) || !(rho > 0) || !(cp > 0)) return kNoValue;
  return m * std::fabs(params_[kSpeed]) / (rho * cp * params_[kAllowedRise]);
}

void RollingBearing::Describe(const BranchResult& b, ComponentReport* out) const {
  out->items.push_back({"feed_pressure_above_drain", b.dp, Dimension::kPressureDifference, ""});
  out->items.push_back({"feed_flow", b.m / b.rho, Dimension::kVolumeFlow, b.m < 0 ? "reversed" : ""});
  Orifice::JetDescribe(params_.data(), b, out);
  if (b.m < 0) out->warnings.push_back("flow reversed: the bearing cavity is above the feed pressure (bearing starving)");
  // From the enthalpy balance (BranchResult::t_out), as the drain node's.
  if (b.thermal && b.m > 0)
    out->items.push_back({"oil_temperature_rise", b.t_out - b.t_in, Dimension::kTemperatureDifference, ""});
  if (std::isnan(params_[kSpeed])) return;
  if (params_[kSpeed] == 0 && params_[kLossPower] > 0)
    out->warnings.push_back(fmt::format(
        "shaft stopped (speed 0) but loss_power {:.4g} W still heats the oil: a stopped bearing makes no friction "
        "heat; bind loss_power to an envelope variable and set it to 0 with the speed",
        params_[kLossPower]));
  // Oil demand (heat balance, Palmgren's moment) at the feed's viscosity; cp
  // from the thermal solve, else from the fluid at the stream's temperature.
  const double nu = b.mu / b.rho;
  const double cp = b.cp > 0 ? b.cp : b.fluid && b.t_in > 0 ? b.fluid->Evaluate(b.t_in, b.ambient_pa + std::max(0.0, b.p_from)).cp : 0.0;
  const double moment = FrictionMoment(nu), demand = OilDemand(nu, b.rho, cp);
  out->items.push_back({"friction_power_estimate", moment * std::fabs(params_[kSpeed]), Dimension::kPower, "Palmgren"});
  if (std::isnan(demand)) {
    out->warnings.push_back("oil demand not evaluated: the stream's specific heat is unknown here");
    return;
  }
  out->items.push_back({"oil_demand", demand, Dimension::kVolumeFlow, "heat balance"});
  const double nun = nu * 1e6 * std::fabs(params_[kSpeed]) * 60.0 / (2.0 * M_PI);
  if (nun < 2000.0) out->items.back().text = "heat balance, nu n < 2000";
}

namespace {

// Parameters that are given together or not at all: an error at the first missing one.
void CheckTogether(const ParamValues& v, std::initializer_list<int> idx, std::initializer_list<const char*> names,
                   const char* what, std::vector<ParamError>* e) {
  int given = 0;
  for (int i : idx) given += !std::isnan(v.values[i]);
  if (given == 0 || given == static_cast<int>(idx.size())) return;
  auto name = names.begin();
  for (int i : idx) {
    if (std::isnan(v.values[i])) {
      std::string all;
      for (const char* n : names) all += (all.empty() ? "" : ", ") + std::string(n);
      e->push_back({"", fmt::format("{} needs {} together; {} is missing", what, all, *name)});
      return;
    }
    ++name;
  }
}

}  // namespace

ComponentType RollingBearingType() {
  ComponentType t;
  t.name = "rolling_bearing";
  t.summary = "jet-lubricated rolling-element bearing: feed flow through its oil jets";
  t.roles = kRoleBearing;
  t.params = OrificeParams();
  t.Param("diameter").description = "bore of each oil jet";
  t.params.push_back(Positive("flow_min", Dimension::kVolumeFlow, "least acceptable feed flow (checks)", false));
  t.params.push_back(Positive("flow_max", Dimension::kVolumeFlow, "largest acceptable feed flow (checks)", false));
  t.params.push_back(Num("loss_power", Dimension::kPower, "friction loss carried away by the oil", false, 0.0).Min(0));
  t.params.push_back(
      Num("heat_soak", Dimension::kPower, "heat conducted into the oil from the housing (thermal solve)", false, 0.0).Min(0));
  t.params.push_back(Num("speed", Dimension::kRotationalSpeed, "shaft speed (oil demand)", false).Min(0));
  t.params.push_back(Positive("pitch_diameter", Dimension::kLength, "pitch diameter d_m = (bore + outside diameter)/2 (oil demand)", false));
  t.params.push_back(Positive("palmgren_f0", Dimension::kDimensionless, "Palmgren's speed-load factor f0 of the bearing type and lubrication (oil demand)", false));
  t.params.push_back(Positive("palmgren_f1", Dimension::kDimensionless, "Palmgren's load factor f1 (oil demand; with friction_load)", false));
  t.params.push_back(Num("friction_load", Dimension::kForce, "load P1 of Palmgren's load term M1 (oil demand; with palmgren_f1)", false).Min(0));
  t.params.push_back(Positive("allowed_rise", Dimension::kTemperatureDifference, "allowed oil temperature rise through the bearing (oil demand)", false, 15.0));
  t.make = [](const ParamValues& v, std::vector<ParamError>* e) -> std::unique_ptr<Component> {
    using R = RollingBearing;
    if (!std::isnan(v.values[R::kFlowMin]) && !std::isnan(v.values[R::kFlowMax]) && !(v.values[R::kFlowMin] < v.values[R::kFlowMax]))
      e->push_back({"flow_max", "flow_max must be above flow_min"});
    CheckTogether(v, {R::kSpeed, R::kPitchDiameter, R::kF0}, {"speed", "pitch_diameter", "palmgren_f0"}, "the oil demand", e);
    CheckTogether(v, {R::kF1, R::kFrictionLoad}, {"palmgren_f1", "friction_load"}, "Palmgren's load term", e);
    if (!e->empty()) return nullptr;
    return std::make_unique<R>(v);
  };
  return t;
}

}  // namespace loopwright
static_assert(static_cast<int>(loopwright::RollingBearing::kCount) == static_cast<int>(loopwright::Orifice::kCount),
              "a rolling bearing's first parameters are its jets'");
