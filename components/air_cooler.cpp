#include "components/air_cooler.h"

#include <algorithm>

#include <fmt/format.h>

namespace loopwright {

double AirCooler::RatedConductance(const double* p, std::string* error) {
  const double c_liq = p[kRatedLiquidFlow] * p[DatasheetLoss::kRatedDensity] * p[kRatedCp];
  const double c_air = p[kRatedAirFlow] * kAirCp;
  const double c_min = std::min(c_liq, c_air), c_max = std::max(c_liq, c_air);
  const double eps = p[kRatedHeat] / (c_min * p[kRatedItd]);
  const int a = static_cast<int>(p[kArrangement]);
  const HxArrangement arr = a == 0 ? HxArrangement::kCrossflowUnmixed : CrossflowMixedSide(a == 1, c_liq <= c_air);
  const double ntu = NtuFromEffectiveness(arr, eps, c_min / c_max);
  if (!(eps < 1.0) || !std::isfinite(ntu)) {
    *error = fmt::format("the rating point implies an effectiveness of {:.3f}, which no exchanger of this arrangement reaches "
                         "(check rated_heat, rated_itd and the rated flows)", eps);
    return 0;
  }
  return ntu * c_min;
}

double AirCooler::RatedUa() const {
  const double key[kRatingKeys] = {params_[kRatedHeat],     params_[kRatedItd],     params_[kRatedLiquidFlow],
                                   params_[kRatedAirFlow],  params_[kRatedCp],      params_[kArrangement],
                                   params_[DatasheetLoss::kRatedDensity]};
  if (ua_rated_ < 0 || !std::equal(key, key + kRatingKeys, rating_key_)) {
    std::string err;
    ua_rated_ = RatedConductance(params_.data(), &err);  // 0 when impossible: Describe warns
    std::copy(key, key + kRatingKeys, rating_key_);
  }
  return ua_rated_;
}

void AirCooler::Describe(const BranchResult& b, ComponentReport* out) const {
  hyd_.DescribeWith(params_.data(), b, out);
  if (std::isnan(params_[kConductance])) {
    std::string err;
    RatedConductance(params_.data(), &err);
    if (!err.empty()) out->warnings.push_back("rating point at this operating point: " + err + "; no heat is rejected");
  }
  const double ua = Conductance(b.m);
  out->items.push_back({"conductance", ua, Dimension::kConductance, std::isnan(params_[kConductance]) ? "scaled from rating" : "given"});
  out->items.push_back({"air_flow", AirFlow(), Dimension::kMassFlow, params_[kFanOn] < 0.5 ? "fan stopped" : ""});
  if (b.thermal) {
    const double q = Duty(b.m, b.t_in, b.cp, b.fluid, b.ambient_pa);
    const double c_liq = LiquidCapacity(b.m, b.t_in, b.cp, q, b.fluid, b.ambient_pa), c_air = AirFlow() * kAirCp;
    const double cmin = std::min(c_liq, c_air), dt = b.t_in - params_[kAirInletTemperature];
    out->items.push_back({"duty", q, Dimension::kPower, ""});
    out->items.push_back({"effectiveness", cmin > 0 && dt != 0 ? q / (cmin * dt) : 0.0, Dimension::kDimensionless, ""});
    out->items.push_back({"initial_temperature_difference", dt, Dimension::kTemperatureDifference, ""});
    if (std::isnan(params_[kConductance])) {
      const double ml_r = params_[kRatedLiquidFlow] * params_[DatasheetLoss::kRatedDensity];
      const double fl = std::abs(b.m) / ml_r, fa = AirFlow() / params_[kRatedAirFlow];
      if (fl > 3 || fl < 1.0 / 3 || fa > 3 || fa < 1.0 / 3)
        out->warnings.push_back(fmt::format("flows are {:.2g} (liquid) and {:.2g} (air) times the rating point: the UA power law is extrapolated", fl, fa));
    }
  }
}

ComponentType AirCoolerType() {
  ComponentType t;
  t.name = "air_cooler";
  t.summary = "liquid-to-air radiator: datasheet drop; e-NTU crossflow heat rejection";
  t.roles = kRoleHeatExchanger;
  t.params = DatasheetLossParams();
  t.params.push_back(Positive("conductance", Dimension::kConductance, "UA of the core", false).Knob());
  t.params.push_back(Positive("rated_heat", Dimension::kPower, "datasheet heat rejection", false));
  t.params.push_back(Positive("rated_itd", Dimension::kTemperatureDifference, "datasheet initial temperature difference", false));
  t.params.push_back(Positive("rated_liquid_flow", Dimension::kVolumeFlow, "datasheet liquid flow", false));
  t.params.push_back(Positive("rated_air_flow", Dimension::kMassFlow, "datasheet air mass flow", false));
  t.params.push_back(Num("ua_exponent_liquid", Dimension::kDimensionless, "UA ~ m_liquid^n", false, 0.3).Min(0));
  t.params.push_back(Num("ua_exponent_air", Dimension::kDimensionless, "UA ~ m_air^n", false, 0.6).Min(0));
  t.params.push_back(Positive("air_flow", Dimension::kMassFlow, "air mass flow through the core with the fan on", false));
  t.params.push_back(Num("air_inlet_temperature", Dimension::kTemperature, "air temperature entering the core", false, 298.15));
  t.params.push_back(Num("fan_on", Dimension::kDimensionless, "1 fan running, 0 stopped", false, 1.0).Range(0, 1));
  t.params.push_back(
      Num("fan_off_fraction", Dimension::kDimensionless, "air flow with the fan stopped / air_flow", false, 0.1).Range(0, 1));
  t.params.push_back(Choice("arrangement", {"crossflow_unmixed", "crossflow_liquid_mixed", "crossflow_air_mixed"},
                            "flow arrangement for e-NTU", 0));
  t.params.push_back(Positive("rated_specific_heat", Dimension::kSpecificHeat,
                              "liquid specific heat of the rating point (default 2000, mineral oil, common practice)",
                              false, 2000.0));
  t.make = [](const ParamValues& v, std::vector<ParamError>* e) -> std::unique_ptr<Component> {
    const bool ua = !std::isnan(v.values[AirCooler::kConductance]);
    const bool rating = !std::isnan(v.values[AirCooler::kRatedHeat]) || !std::isnan(v.values[AirCooler::kRatedItd]);
    if (ua && rating) e->push_back({"conductance", "give conductance or a rating point (rated_heat, rated_itd, ...), not both"});
    if (rating) {
      for (int k : {AirCooler::kRatedHeat, AirCooler::kRatedItd, AirCooler::kRatedLiquidFlow, AirCooler::kRatedAirFlow})
        if (std::isnan(v.values[k])) {
          e->push_back({"", "a rating point needs rated_heat, rated_itd, rated_liquid_flow and rated_air_flow"});
          break;
        }
    }
    if (!ua && !rating) e->push_back({"conductance", "give conductance or a rating point (rated_heat, rated_itd, rated_liquid_flow, rated_air_flow)"});
    if (!ua && std::isnan(v.values[AirCooler::kAirFlow]) && !std::isnan(v.values[AirCooler::kRatedAirFlow])) {
      // air_flow defaults to the rating's air flow (see AirFlow()).
    } else if (std::isnan(v.values[AirCooler::kAirFlow])) {
      e->push_back({"air_flow", "air_flow is needed (the air mass flow through the core with the fan on)"});
    }
    auto hyd = MakeDatasheetLoss(v, e);
    if (!e->empty() || !hyd) return nullptr;
    if (!ua) {
      std::string err;
      AirCooler::RatedConductance(v.values.data(), &err);
      if (!err.empty()) {
        e->push_back({"rated_heat", err});
        return nullptr;
      }
    }
    return std::make_unique<AirCooler>(v, *hyd);
  };
  return t;
}

}  // namespace loopwright
