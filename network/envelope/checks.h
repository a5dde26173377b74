// Envelope checks: the limits a practitioner verifies at every operating
// point, evaluated on solved points, with the worst point of each.
//
// Every check is a row of the check table (network/case/check_table.h: its
// name, dimension, limit and its source, what it reads, how its margin is
// computed, whether it is an open/closed kind, its failure text); README
// "Checks" prints that table. The limits come typed from the case
// (Case::checks, read once at load) and the components' typed state (a
// valve's ComponentReport::valve), so evaluating a point parses nothing and
// looks no limit up by name. In short:
//   feed_pressure_margin   p(feed) - p(housing) >= margin, every bearing (a
//                          bearing's own "feed_margin" overrides the limit)
// Each limit is the one in force at the item (LimitAt: component or node >
// loop > case > default); the worst point is found per item, against its own.
//   bearing_flow_min/max   the bearing's flow_min / flow_max, when given; flow_min
//                          else its oil_demand report item (rolling_bearing)
//   feed/drain_temperature_max  bearing inlet/outlet temperature (thermal)
//   start_viscosity_max    kinematic viscosity at pump inlets (isothermal
//                          points: the cold start)
//   pump_inlet_pressure_min  gauge pressure at pump inlets
//   pump_flow_fraction_min   displacement pump delivery / geometric flow
//   relief_closed          relief valves and pump internal reliefs shut at
//                          running (non-isothermal) points: value = the
//                          pressure across the valve (the pump's rise for an
//                          internal relief), limit = its cracking pressure,
//                          margin = crack - pressure [Pa]; lifting at a cold
//                          start (ValveState::Open) is reported as a warning
//   filter_bypass_closed   the same with the element drop against the bypass
//                          crack, at running points; at a cold start a warning
//                          (fixes and the tight band aim for closing_margin x
//                          crack below the crack: see ShutTargetMargin)
//   velocity_*_max         mean velocity of lines: suction (from a reservoir
//                          or tank), return (into a boundary), pressure
//   drain_capacity_margin  a return line's capacity half full over its flow
//   boiling_margin_min     coolant saturation minus liquid temperature
//   jacket_flow_min        flow of every pump of a coolant loop
//   cooler_duty_margin     spare capacity of air coolers and liquid couplings
//                          at the hottest oil allowed (drain_temperature_max)
#pragma once

#include <cmath>
#include <string>
#include <string_view>
#include <vector>

#include "network/case/case.h"
#include "network/case/check_table.h"
#include "network/point/run.h"

namespace loopwright {

struct CheckOutcome {
  // 80 bytes (was 112): a plant-size case holds three or more per bearing.
  // The check's name is its table row's (name()), not held per outcome.
  std::string where;  // "loop/component" or "loop/node"
  double value = 0, limit = 0, margin = 0;  // SI; margin >= 0 passes
  // Who set its limit, by index (LimitInForce::loop and item: a loop, or a
  // component or node of it; -1 for default and case): LimitSourceId.
  int source_loop = -1, source_item = -1;
  int loop = -1, comp = -1;  // the component it was evaluated at (-1: a node; a coupling: its hot side)
  CheckId id = CheckId::kCount;  // its row of the check table
  Dimension dim = Dimension::kDimensionless;
  bool pass = true;
  LimitSource source = LimitSource::kNone;  // where the limit came from
  // The row's name, e.g. "feed_pressure_margin" (the check table's own
  // text); empty for an outcome made without a row.
  std::string_view name() const { return id == CheckId::kCount ? std::string_view() : Check(id).name; }
};
static_assert(sizeof(CheckOutcome) <= sizeof(std::string) + 48, "a check outcome's fields without padding");

// The limit of check `id` in force at component `comp` (or node `node`, with
// comp -1) of loop `loop`: the most specific of the component's (node's),
// the loop's and the case's (which holds the default where the case sets
// none). loop -1: the case's.
const LimitInForce& LimitAt(const Case& cs, CheckId id, int loop, int comp, int node = -1);

// Who set an outcome's limit: a loop's id, or "loop/component", "loop/node"
// ("" for a default or case limit).
std::string LimitSourceId(const Case& cs, const CheckOutcome& o);

// "default", "case", "loop ID", "component LOOP/ID", "node LOOP/ID": where an
// outcome's limit came from, as the printed table says it.
std::string LimitSourceText(const Case& cs, const CheckOutcome& o);

struct CheckWarning {
  std::string where;
  std::string text;
  std::string point;  // the point that raised it
};

// The case-wide limit in force for a name (the case's override or the
// default; NaN for an unknown name or a limit that is the component's own).
// For callers that hold a name (tests, reports); the evaluation reads LimitAt.
double CheckLimitValue(const Case& cs, const std::string& name);

// How checks are ranked, worst first (the tables, the fix search): the
// margin relative to the limit's magnitude (the margin itself for a limit
// of zero).
inline double MarginRank(const CheckOutcome& o) { return o.limit != 0 ? o.margin / std::abs(o.limit) : o.margin; }

// What it means when a check fails, in words, for explanations ("the relief
// lifts", "the bearing gets less than its minimum flow"): the table's text.
std::string CheckFailureText(const std::string& name);

// The margin a shut valve (an open/closed check: relief_closed,
// filter_bypass_closed) should keep below its crack: closing_margin (a
// fraction, default 0.05, common practice; in force at the outcome's
// component) of the crack in force, o.limit.
double ShutTargetMargin(const Case& cs, const CheckOutcome& o);

// Every check at one converged point. Warnings (cold-start bypass, relief
// lifting at a cold start) go to *warnings.
std::vector<CheckOutcome> EvaluateChecks(const Case& cs, const OperatingPoint& op, const PointResult& p,
                                         std::vector<CheckWarning>* warnings);

// The outcomes EvaluateChecks gives at branch k of p alone (its component's
// checks and, for a coolant pump, its jacket flow), with the same values:
// what the fix search reads of one branch's check at each point it
// perturbs, without evaluating every other place (a plant-size case's knobs
// each cost a whole point's checks otherwise).
std::vector<CheckOutcome> EvaluateBranchChecks(const Case& cs, const OperatingPoint& op, const PointResult& p, size_t k,
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
