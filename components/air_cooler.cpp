#include "components/air_cooler.h"

namespace loopwright {

ComponentType AirCoolerType() {
  ComponentType t;
  t.name = "air_cooler";
  t.summary = "liquid-to-air radiator: datasheet drop; e-NTU crossflow heat rejection";
  t.roles = kRoleHeatExchanger;
  t.params = DatasheetLossParams();
  t.params.push_back(Positive("conductance", Dimension::kConductance, "UA of the core", false));
  t.params.push_back(Positive("rated_heat", Dimension::kPower, "datasheet heat rejection", false));
  t.params.push_back(Positive("rated_itd", Dimension::kTemperatureDifference, "datasheet initial temperature difference", false));
  t.params.push_back(Positive("rated_liquid_flow", Dimension::kVolumeFlow, "datasheet liquid flow", false));
  t.params.push_back(Positive("rated_air_flow", Dimension::kMassFlow, "datasheet air mass flow", false));
  t.params.push_back(Num("ua_exponent_liquid", Dimension::kDimensionless, "UA ~ m_liquid^n", false, 0.3));
  t.params.push_back(Num("ua_exponent_air", Dimension::kDimensionless, "UA ~ m_air^n", false, 0.6));
  t.params.push_back(Positive("air_flow", Dimension::kMassFlow, "air mass flow through the core with the fan on", false));
  t.params.push_back(Num("air_inlet_temperature", Dimension::kTemperature, "air temperature entering the core", false, 298.15));
  t.params.push_back(Num("fan_on", Dimension::kDimensionless, "1 fan running, 0 stopped", false, 1.0));
  t.params.push_back(Num("fan_off_fraction", Dimension::kDimensionless, "air flow with the fan stopped / air_flow", false, 0.1));
  t.params.push_back(Choice("arrangement", {"crossflow_unmixed", "crossflow_liquid_mixed", "crossflow_air_mixed"},
                            "flow arrangement for e-NTU", 0));
  t.params[AirCooler::kFanOn].min_si = 0;
  t.params[AirCooler::kFanOn].max_si = 1;
  t.params[AirCooler::kFanOffFraction].min_si = 0;
  t.params[AirCooler::kFanOffFraction].max_si = 1;
  t.params[AirCooler::kExpLiquid].min_si = 0;
  t.params[AirCooler::kExpAir].min_si = 0;
  t.make = [](const ParamValues& v, std::vector<ParamError>* e) -> std::unique_ptr<Component> {
    const bool ua = !std::isnan(v.values[AirCooler::kConductance]);
    const bool rating = !std::isnan(v.values[AirCooler::kRatedHeat]) || !std::isnan(v.values[AirCooler::kRatedItd]);
    if (ua && rating) e->push_back({"conductance", "give conductance or a rating point (rated_heat, rated_itd, ...), not both"});
    if (rating) {
      for (int k : {AirCooler::kRatedHeat, AirCooler::kRatedItd, AirCooler::kRatedLiquidFlow, AirCooler::kRatedAirFlow})
        if (std::isnan(v.values[k]))
          e->push_back({"", "a rating point needs rated_heat, rated_itd, rated_liquid_flow and rated_air_flow"});
    }
    auto hyd = MakeDatasheetLoss(v, e);
    if (!e->empty() || !hyd) return nullptr;
    return std::make_unique<AirCooler>(v, *hyd);
  };
  return t;
}

}  // namespace loopwright
