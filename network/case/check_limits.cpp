#include "network/case/check_limits.h"

#include <limits>

namespace loopwright {

namespace {
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kPsi = 6894.757293168;  // Pa, NIST SP 811 B.8
}  // namespace

const std::vector<CheckLimit>& CheckLimits() {
  static const std::vector<CheckLimit> limits = {
      {"feed_pressure_margin", Dimension::kPressureDifference, 10.0 * kPsi,
       "bearing feed pressure above the housing (boost) pressure of the same point",
       "common practice: delivery of 40 psig or more against boost rarely above 30 psig (10 psi margin)"},
      {"feed_temperature_max", Dimension::kTemperature, 273.15 + 90.0,
       "highest oil temperature at a bearing feed", "common practice for mineral turbine oils"},
      {"drain_temperature_max", Dimension::kTemperature, 273.15 + 120.0,
       "highest oil temperature leaving a bearing", "common practice for mineral turbine oils"},
      {"start_viscosity_max", Dimension::kKinematicViscosity, 1000e-6,
       "highest kinematic viscosity at a pump inlet at start", "common practice for gear pumps (about 1000 cSt)"},
      {"pump_inlet_pressure_min", Dimension::kPressure, 0.7e5,
       "lowest absolute pressure at a pump inlet (cavitation/aeration); write it with abs/bara/psia",
       "common practice for gear pumps: 0.7 bar abs, taken against the case's ambient pressure", true},
      {"pump_flow_fraction_min", Dimension::kDimensionless, 0.10,
       "lowest pump delivery as a fraction of its displacement flow (pump cooling)", "common practice"},
      {"velocity_suction_max", Dimension::kVelocity, 1.2,
       "highest mean velocity in suction lines", "common practice for lube and hydraulic suction lines"},
      {"velocity_pressure_max", Dimension::kVelocity, 2.5,
       "highest mean velocity in pressure (supply) lines", "common practice for lube supply lines"},
      {"velocity_return_max", Dimension::kVelocity, 0.3,
       "highest mean velocity in gravity return (drain) lines running half full",
       "common practice (drain lines sized half full; API 614, from memory)"},
      {"drain_capacity_margin", Dimension::kDimensionless, 0.25,
       "spare capacity of a return (drain) line running half full at velocity_return_max over its flow", "common practice"},
      {"boiling_margin_min", Dimension::kTemperatureDifference, 10.0,
       "coolant saturation temperature minus coolant temperature, at every coolant node", "common practice"},
      {"jacket_flow_min", Dimension::kVolumeFlow, kNaN,
       "lowest coolant circulation (the flow of each pump of a coolant loop) for the housing jacket", "set by the case (housing maker's data)"},
      {"closing_margin", Dimension::kDimensionless, 0.05,
       "how far below its cracking pressure, as a fraction of it, a relief or filter bypass valve that must stay shut "
       "should sit: the target of fix suggestions for relief_closed and filter_bypass_closed, and their tight band",
       "common practice: a spring valve starts to weep a few per cent below its set pressure"},
      {"cooler_duty_margin", Dimension::kDimensionless, 0.10,
       "spare capacity of each air cooler: its duty with the oil at drain_temperature_max over its duty now, minus 1", "common practice"},
  };
  return limits;
}

const CheckLimit* FindCheckLimit(const std::string& key) {
  for (const auto& l : CheckLimits())
    if (l.key == key) return &l;
  return nullptr;
}

}  // namespace loopwright
