#include "network/case/check_table.h"

#include <fmt/format.h>

#include "components/registry.h"

namespace loopwright {

namespace {
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kPsi = 6894.757293168;  // Pa, NIST SP 811 B.8
using D = Dimension;
using F = LimitFrom;
using M = MarginRule;
}  // namespace

// A data table: one row per check, in CheckId order.
const std::array<CheckRow, kNumCheckRows>& CheckTable() {
  static const std::array<CheckRow, kNumCheckRows> rows = {{
      {CheckId::kFeedPressureMargin, "feed_pressure_margin", D::kPressureDifference, F::kCase, 10.0 * kPsi, "10 psi", false,
       "common practice: delivery of 40 psig or more against boost rarely above 30 psig (10 psi margin)",
       "bearing feed pressure above the housing (boost) pressure of the same point; a bearing's feed_margin overrides it",
       "every bearing: pressure at its feed minus pressure at its housing", M::kAtLeast,
       "the bearing feed falls below its housing pressure plus the margin"},
      {CheckId::kBearingFlowMin, "bearing_flow_min", D::kVolumeFlow, F::kComponent, kNaN, "", false,
       "the bearing's own flow_min, else its oil demand (rolling_bearing: heat balance)", "least feed flow of a bearing",
       "every bearing with a flow_min or an oil demand: its flow",
       M::kAtLeast, "the bearing gets less than its minimum flow"},
      {CheckId::kBearingFlowMax, "bearing_flow_max", D::kVolumeFlow, F::kComponent, kNaN, "", false,
       "the bearing's own flow_max", "largest feed flow of a bearing (drain and seals)",
       "every bearing with a flow_max: its flow", M::kAtMost, "the bearing gets more than its maximum flow"},
      {CheckId::kFeedTemperatureMax, "feed_temperature_max", D::kTemperature, F::kCase, 273.15 + 90.0, "90 degC", false,
       "common practice for mineral turbine oils", "highest oil temperature at a bearing feed",
       "every bearing at thermal points: its inlet temperature", M::kAtMost, "the oil reaches the bearing too hot"},
      {CheckId::kDrainTemperatureMax, "drain_temperature_max", D::kTemperature, F::kCase, 273.15 + 120.0, "120 degC",
       false, "common practice for mineral turbine oils", "highest oil temperature leaving a bearing",
       "every bearing at thermal points: its outlet temperature", M::kAtMost, "the oil leaves the bearing too hot"},
      {CheckId::kFilmThicknessMin, "film_thickness_min", D::kLength, F::kCase, kNaN, "", false,
       "set by the case or per bearing; without one, Trumpler's design criterion for the bearing's diameter d, "
       "h0 >= 0.0002 in + 0.00004 d (about 5 um + 0.004 % of d; Shigley's Mechanical Engineering Design, 9th ed., ch. 12, "
       "from memory)",
       "least minimum film thickness h0 = c (1 - eps) of a journal bearing whose eccentricity follows from its load",
       "every journal_bearing with an eccentricity_method from load, at every point: its min_film_thickness; each film "
       "of a floating_ring_bearing with one (at <bearing>/inner_film and /outer_film)", M::kAtLeast,
       "the oil film becomes too thin: the journal runs close to the sleeve"},
      {CheckId::kFilmTemperatureMax, "film_temperature_max", D::kTemperature, F::kCase, (250.0 - 32.0) / 1.8 + 273.15,
       "250 degF", false,
       "Trumpler's design criterion for petroleum oils, 250 degF = 121 degC (Shigley's Mechanical Engineering Design, 9th "
       "ed., ch. 12, from memory)",
       "highest film temperature of a journal bearing whose eccentricity follows from its load",
       "every journal_bearing with an eccentricity_method from load, at thermal points: its film_temperature_max (inlet "
       "plus the film's whole rise); each film of a floating_ring_bearing with one (feed plus twice the film's mean rise)",
       M::kAtMost, "the bearing's oil film runs too hot"},
      {CheckId::kStartUnitLoadMax, "start_unit_load_max", D::kPressureDifference, F::kCase, 300.0 * kPsi, "300 psi", false,
       "common practice for starting under load (about 2 MPa; Trumpler's criterion, Shigley's Mechanical Engineering "
       "Design, 9th ed., ch. 12, from memory)",
       "largest load per unit projected area a journal bearing starts under (until the film forms the journal rubs on "
       "the sleeve)",
       "every journal_bearing with an eccentricity_method from load, at every point: load / ((length - groove_width) "
       "diameter); each film of a floating_ring_bearing with one, on its own diameter and lands",
       M::kAtMost, "the bearing's unit load is too high to start under load"},
      {CheckId::kStartViscosityMax, "start_viscosity_max", D::kKinematicViscosity, F::kCase, 1000e-6, "1000 cSt", false,
       "common practice for gear pumps (about 1000 cSt)", "highest kinematic viscosity at a pump inlet at start",
       "every pump at isothermal (cold-start) points: kinematic viscosity of its stream", M::kAtMost,
       "the oil at the pump inlet is too thick to start"},
      {CheckId::kPumpInletPressureMin, "pump_inlet_pressure_min", D::kPressure, F::kCase, 0.7e5, "0.7 bar abs", true,
       "common practice for gear pumps: 0.7 bar abs, taken against the case's ambient pressure",
       "lowest absolute pressure at a pump inlet (cavitation/aeration); write it with abs/bara/psia (a plain value is "
       "gauge), so altitude and the case's ambient_pressure move it (0.7 bar abs is -0.31 bar g at sea level, -0.10 bar g at "
       "2000 m)",
       "every pump: pressure at its inlet", M::kAtLeast, "the pump inlet pressure falls too low (cavitation, air release)"},
      {CheckId::kPumpFlowFractionMin, "pump_flow_fraction_min", D::kDimensionless, F::kCase, 0.10, "0.10", false,
       "common practice", "lowest pump delivery as a fraction of its displacement flow (pump cooling)",
       "every displacement pump: delivery over geometric flow", M::kAtLeast,
       "the pump delivers too little of its displacement flow"},
      {CheckId::kReliefClosed, "relief_closed", D::kPressureDifference, F::kComponent, kNaN, "", false,
       "the valve's cracking pressure (crack; a pump's relief_crack)",
       "relief valves and pump internal reliefs shut at running points (lifting at a cold start is a warning)",
       "the pressure across the valve (a pump's pressure rise for its internal relief) against its crack", M::kShut,
       "the relief lifts"},
      {CheckId::kRegulatorAuthority, "regulator_authority", D::kDimensionless, F::kCase, 0.05, "0.05", false,
       "common practice: a control valve is sized to work well inside its travel",
       "least travel of a pressure regulator from its nearer end (closed or wide open), as a fraction of its travel, at "
       "running points: a regulator is meant to be open and is not judged by relief_closed (saturated at a cold start: a "
       "warning)",
       "every back_pressure_regulator and pressure_reducing_valve at running points: min(travel, 1 - travel)", M::kAtLeast,
       "the regulator saturates (closed or wide open) and no longer holds its set pressure"},
      {CheckId::kThermostatTravel, "thermostat_travel", D::kDimensionless, F::kCase, 0.05, "0.05", false,
       "common practice: a control valve is sized to work well inside its travel",
       "travel a thermostatic valve has left before it is fully open to its hot path (the cooler), as a fraction of its "
       "travel, at thermal running points: pinned fully open, the valve no longer regulates and the cooler is too small "
       "for the point (shut to the hot path: a warning)",
       "every thermostatic_valve at thermal points (one path of each valve): 1 - travel", M::kAtLeast,
       "the thermostatic valve is pinned fully open to its cooler: the cooler is too small for this point"},
      {CheckId::kFilterBypassClosed, "filter_bypass_closed", D::kPressureDifference, F::kComponent, kNaN, "", false,
       "the filter's bypass_crack",
       "filter bypass shut at running points (open at a cold start is a warning)",
       "the element's pressure drop against the bypass crack", M::kShut, "the filter bypass opens"},
      {CheckId::kClosingMargin, "closing_margin", D::kDimensionless, F::kCase, 0.05, "0.05", false,
       "common practice: a spring valve starts to weep a few per cent below its set pressure",
       "how far below its cracking pressure, as a fraction of it, a relief or filter bypass valve that must stay shut "
       "should sit: the target of fix suggestions for relief_closed and filter_bypass_closed, and their tight band",
       "not a check: a setting of the two open/closed checks above", M::kNotACheck, ""},
      {CheckId::kVelocitySuctionMax, "velocity_suction_max", D::kVelocity, F::kCase, 1.2, "1.2 m/s", false,
       "common practice for lube and hydraulic suction lines", "highest mean velocity in suction lines",
       "every line from a reservoir or tank: its mean velocity", M::kAtMost, "the suction line runs too fast"},
      {CheckId::kVelocityPressureMax, "velocity_pressure_max", D::kVelocity, F::kCase, 2.5, "2.5 m/s", false,
       "common practice for lube supply lines", "highest mean velocity in pressure (supply) lines",
       "every other line (into a pressurised tank too: a pumped return): its mean velocity", M::kAtMost, "the pressure line runs too fast"},
      {CheckId::kVelocityReturnMax, "velocity_return_max", D::kVelocity, F::kCase, 0.3, "0.3 m/s", false,
       "common practice (drain lines sized half full; API 614, from memory)",
       "highest mean velocity in gravity return (drain) lines running half full",
       "every line into a reservoir or pressure boundary: its mean velocity", M::kAtMost, "the return line runs too fast"},
      {CheckId::kDrainCapacityMargin, "drain_capacity_margin", D::kDimensionless, F::kCase, 0.25, "0.25", false,
       "common practice",
       "spare capacity of a return (drain) line running half full at velocity_return_max over its flow; of a "
       "gravity_drain, its open-channel capacity at its design_fill over its flow (of a scavenge_pump, half its "
       "displacement flow)",
       "every line into a boundary: its capacity half full at velocity_return_max over its flow, minus 1; every "
       "gravity_drain and scavenge_pump at every point, cold start included: its design_capacity over its flow, minus 1", M::kAtLeast,
       "the drain line runs out of capacity"},
      {CheckId::kHousingDrained, "housing_drained", D::kVolumeFlow, F::kComponent, kNaN, "", false,
       "the gravity_drain's flood_capacity (running full under its fall and the cavity pressure); a scavenge_pump's "
       "displacement flow",
       "the flow a gravity drain or scavenge pump must carry stays within what it carries at most",
       "every gravity_drain and scavenge_pump at every point, cold start included: its flow against its flood capacity",
       M::kAtMost,
       "the housing floods: the bearings deliver more oil than the drain carries running full (oil past the seals)"},
      {CheckId::kBoilingMarginMin, "boiling_margin_min", D::kTemperatureDifference, F::kCase, 10.0, "10 K", false,
       "common practice", "coolant saturation temperature minus coolant temperature, at every coolant node",
       "every coolant node: saturation temperature (IAPWS-IF97 at the local absolute pressure) minus its temperature",
       M::kAtLeast, "the coolant comes too close to boiling"},
      {CheckId::kJacketFlowMin, "jacket_flow_min", D::kVolumeFlow, F::kCase, kNaN, "", false,
       "set by the case (housing maker's data)",
       "lowest coolant circulation (the flow of each pump of a coolant loop) for the housing jacket",
       "every pump of a loop whose fluid can boil: its flow", M::kAtLeast,
       "the coolant circulation falls below its minimum"},
      {CheckId::kCoolerDutyMargin, "cooler_duty_margin", D::kDimensionless, F::kCase, 0.10, "0.10", false,
       "common practice",
       "spare capacity of each air cooler: its duty with the oil at drain_temperature_max over its duty now, minus 1",
       "every air cooler and liquid coupling at thermal points, same effectiveness; for a coupling the cold stream's "
       "inlet takes the place of the air (reported at the coupling's hot side)",
       M::kAtLeast, "the cooler has too little capacity to spare"},
      {CheckId::kCokingTemperatureMax, "coking_temperature_max", D::kTemperature, F::kCase, 273.15 + 200.0, "200 degC",
       false,
       "common practice: mineral lubricating oils leave lacquer and coke on metal held above about 200 degC, sooner "
       "the hotter (from memory); the oil maker's figure governs",
       "highest temperature through a scenario of oil-wetted metal and of oil at a node (the soak-back after a hot "
       "shutdown cokes the oil left in the housing)",
       "simulate: every thermal mass with a heat path to an oil node, and every free node of an oil loop: its peak "
       "over the scenario",
       M::kAtMost, "the oil-wetted metal or the oil left standing gets hot enough to coke"},
      {CheckId::kAfterBoilMarginMin, "after_boil_margin_min", D::kTemperatureDifference, F::kCase, 0.0, "0 K", false,
       "common practice: the coolant must not boil in the jacket through the soak (after-boil)",
       "least coolant saturation temperature minus coolant temperature through a scenario",
       "simulate: every free node of a loop whose fluid boils: saturation temperature at its pressure at each output "
       "instant (the tank's cap pressure plus head once the pump stops) minus its temperature; the least over the run",
       M::kAtLeast, "the coolant boils in the jacket during the soak"},
      {CheckId::kWarmupTemperature, "warmup_temperature", D::kTemperature, F::kCase, 273.15 + 40.0, "40 degC", false,
       "common practice: bearing oil warm enough to take load (a VG 32 turbine oil is at its rated viscosity at 40 "
       "degC); the machine maker's figure governs",
       "the bearing feed temperature a cold start must reach: the target of warmup_time_max",
       "not a check: a setting of warmup_time_max", M::kNotACheck, ""},
      {CheckId::kWarmupTimeMax, "warmup_time_max", D::kTime, F::kCase, 600.0, "10 min", false,
       "common practice for a test-cell warm-up before load; the machine maker's figure governs",
       "longest time after a cold start for every bearing feed to reach warmup_temperature",
       "simulate, scenarios from a uniform start below warmup_temperature: every bearing's feed node: the time its "
       "oil first reaches warmup_temperature (never: the scenario's end, and the check fails)",
       M::kAtMost, "the bearing feed takes too long to warm up"},
      {CheckId::kReliefOpenTimeMax, "relief_open_time_max", D::kTime, F::kCase, 300.0, "5 min", false,
       "common practice: a relief that stays open long after a cold start wastes the pump's flow and heats the oil",
       "longest total time a relief valve stays open in a scenario from a uniform (cold) start",
       "simulate, scenarios from a uniform start: every relief valve: the output instants at which the pressure "
       "across it exceeds its crack, times the output interval",
       M::kAtMost, "the relief stays open too long after the cold start"},
      {CheckId::kBypassOpenTimeMax, "bypass_open_time_max", D::kTime, F::kCase, 300.0, "5 min", false,
       "common practice: unfiltered oil reaches the bearings while the filter bypass is open",
       "longest total time a filter bypass stays open in a scenario from a uniform (cold) start",
       "simulate, scenarios from a uniform start: every filter with a bypass: the output instants at which the "
       "pressure across it exceeds its bypass_crack, times the output interval",
       M::kAtMost, "the filter bypasses too long after the cold start"},
      {CheckId::kStarvedTimeMax, "starved_time_max", D::kTime, F::kCase, 0.0, "0 s", false,
       "common practice: a turning bearing is never to run below its least flow",
       "longest spell through a scenario in which a turning bearing gets less than its minimum flow",
       "simulate: every bearing with a flow_min and a speed: the longest run of output instants with speed above "
       "zero and flow below flow_min, times the output interval",
       M::kAtMost, "a turning bearing runs below its minimum flow"},
  }};
  return rows;
}

const CheckRow* FindCheck(const std::string& name) {
  for (const CheckRow& r : CheckTable())
    if (name == r.name) return &r;
  return nullptr;
}

const char* LimitSourceName(LimitSource s) {
  switch (s) {
    case LimitSource::kDefault: return "default";
    case LimitSource::kCase: return "case";
    case LimitSource::kComponent: return "component";
    case LimitSource::kNone: return "none";
    case LimitSource::kLoop: return "loop";
    case LimitSource::kNode: return "node";
  }
  return "none";
}

bool LimitMayApplyToType(CheckId id, const ComponentType& t) {
  const unsigned r = t.roles;
  switch (id) {
    case CheckId::kFeedPressureMargin:
    case CheckId::kFeedTemperatureMax: return r & kRoleBearing;
    case CheckId::kDrainTemperatureMax: return r & (kRoleBearing | kRoleHeatExchanger | kRoleLine);
    case CheckId::kFilmThicknessMin:
    case CheckId::kFilmTemperatureMax:
    case CheckId::kStartUnitLoadMax: return (r & kRoleBearing) && t.ParamIndex("eccentricity_method") >= 0;
    case CheckId::kStartViscosityMax:
    case CheckId::kPumpInletPressureMin:
    case CheckId::kJacketFlowMin: return r & kRolePump;
    case CheckId::kPumpFlowFractionMin: return (r & kRolePump) && t.ParamIndex("displacement") >= 0;
    case CheckId::kRegulatorAuthority: return r & kRoleRegulator;
    case CheckId::kThermostatTravel: return r & kRoleThermostat;
    case CheckId::kClosingMargin:
      return (r & kRoleReliefValve) || t.ParamIndex("bypass_crack") >= 0 || t.ParamIndex("relief_crack") >= 0;
    case CheckId::kVelocitySuctionMax:
    case CheckId::kVelocityPressureMax:
    case CheckId::kVelocityReturnMax: return r & kRoleLine;
    case CheckId::kDrainCapacityMargin: return r & (kRoleLine | kRoleDrain);
    case CheckId::kCoolerDutyMargin: return r & (kRoleHeatExchanger | kRoleLine);
    default: return false;  // the component's own parameter, a node's limit, or a row not placed yet
  }
}

CheckLimits DefaultCheckLimits(double ambient_pa) {
  CheckLimits limits;
  for (const CheckRow& r : CheckTable()) {
    LimitInForce& l = limits.at(r.id);
    if (r.limit_from == LimitFrom::kComponent) {
      l.source = LimitSource::kComponent;
    } else if (r.HasDefault()) {
      l.si = r.default_absolute ? r.default_si - ambient_pa : r.default_si;
      l.source = LimitSource::kDefault;
    }
  }
  return limits;
}

std::string CheckTableMarkdown() {
  static const char* kRule[] = {"value − limit", "limit − value", "crack − pressure (open/closed: the valve stays shut)",
                                "—"};
  std::string out =
      "| check | what | reads | default limit (common practice unless stated) | margin (≥ 0 passes) |\n"
      "|---|---|---|---|---|\n";
  for (const CheckRow& r : CheckTable()) {
    const std::string limit = r.limit_from == LimitFrom::kComponent ? r.basis
                              : r.HasDefault() ? fmt::format("{}: {}", r.default_text, r.basis)
                                               : fmt::format("none: {}", r.basis);
    out += fmt::format("| `{}` | {} | {} | {} | {} |\n", r.name, r.description, r.reads, limit,
                       kRule[static_cast<int>(r.margin)]);
  }
  return out;
}

}  // namespace loopwright
