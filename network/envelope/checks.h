// Envelope checks: the limits a practitioner verifies at every operating
// point, evaluated on solved points, with the worst point of each.
//
// Implemented (limit keys of network/case/check_limits.h, defaults from common
// practice, overridable under "checks" in the case; a bearing's own
// "feed_margin" overrides the feed margin for it):
//   feed_pressure_margin   p(feed) - p(housing) >= margin, every bearing
//   bearing_flow_min/max   the bearing's flow_min / flow_max, when given
//   feed_temperature_max   bearing inlet temperature (thermal points)
//   drain_temperature_max  bearing outlet temperature (thermal points)
//   start_viscosity_max    kinematic viscosity at pump inlets (isothermal
//                          points: the cold start)
//   pump_inlet_pressure_min  gauge pressure at pump inlets
//   pump_flow_fraction_min   displacement pump delivery / geometric flow
//   relief_closed          relief valves and pump internal reliefs shut at
//                          running (non-isothermal) points: value = the
//                          pressure across the valve (the pump's rise for an
//                          internal relief), limit = its cracking pressure,
//                          margin = crack - pressure [Pa]; lifting at a cold
//                          start is reported as a warning
//   filter_bypass_closed   the same with the element drop against the bypass
//                          crack, at running points; at a cold start a warning
//                          (fixes and the tight band aim for closing_margin x
//                          crack below the crack: see ShutTargetMargin)
//   velocity_*_max         mean velocity of lines: suction (from a reservoir
//                          or tank), return (into a boundary), pressure
//   boiling_margin_min     coolant saturation minus liquid temperature
//   cooler_duty_margin     spare capacity of air coolers and liquid couplings
//                          at the hottest oil allowed (drain_temperature_max)
#pragma once

#include <string>
#include <vector>

#include "network/case/case.h"
#include "network/point/run.h"

namespace loopwright {

struct CheckOutcome {
  std::string name;   // limit key, e.g. "feed_pressure_margin"
  std::string where;  // "loop/component" or "loop/node"
  double value = 0, limit = 0, margin = 0;  // SI; margin >= 0 passes
  Dimension dim = Dimension::kDimensionless;
  bool pass = true;
};

struct CheckWarning {
  std::string where;
  std::string text;
  std::string point;  // the point that raised it
};

// The limit in force for a key: the case's override or the default.
double CheckLimitValue(const Case& cs, const std::string& key);

// What it means when a check fails, in words, for explanations ("the relief
// lifts", "the bearing gets less than its minimum flow").
std::string CheckFailureText(const std::string& name);

// Open/closed checks (relief_closed, filter_bypass_closed): a valve that must
// stay shut. Their margin is a pressure, crack - pressure across the valve.
bool IsShutCheck(const std::string& name);
// The margin a shut valve should keep below its crack: closing_margin (a
// fraction, default 0.05, common practice) of the crack in force, o.limit.
double ShutTargetMargin(const Case& cs, const CheckOutcome& o);

// Every check at one converged point. Warnings (cold-start bypass, relief
// lifting at a cold start) go to *warnings.
std::vector<CheckOutcome> EvaluateChecks(const Case& cs, const OperatingPoint& op, const PointResult& p,
                                         std::vector<CheckWarning>* warnings);

// The worst point of each (check, place) over a sweep.
struct CheckSummary {
  CheckOutcome worst;
  std::string point;  // governing point
  int points = 0;     // points it was evaluated at
};
std::vector<CheckSummary> SummariseChecks(const std::vector<std::vector<CheckOutcome>>& per_point,
                                          const std::vector<std::string>& point_names);

}  // namespace loopwright
