// The check table: every envelope check, and every limit a case may set under
// "checks", defined once. Each row says what the check is called, the
// dimension of its value and limit, where its limit comes from (a case limit
// with its default and the basis of that default, or the component's own
// parameter), what it reads, how its margin is computed (and so whether it is
// an open/closed kind: a valve that must stay shut), the failure text of
// explanations and the docs text. The README's check table
// (CheckTableMarkdown), the JSON Schema's "checks" section, the limits the
// loader reads, the results JSON and the fix search all come from it; a test
// (tests/network/case/check_table_test.cpp) holds the README and the shipped
// schema to it.
//
// Every default here is a rule of thumb of the trade (common practice), not a
// standard's requirement: confirm against the machine and part makers' data.
//
// Limits are read once, at load, into CheckLimits (SI value and source per
// check, the case's ambient pressure applied to an absolute default): the
// per-point evaluation (network/envelope/checks.cpp) indexes them by CheckId
// and never parses text or looks a limit up by name.
//
// A case limit may also be set on a loop, a component or a node (a "checks"
// object inside it; a bearing's feed_margin is its feed_pressure_margin); the
// most specific wins: component (or node) > loop > case > default. Where each
// may be written is LimitMayApplyToType (the type-level rule, for the schema)
// and, at load, the component's place (network/case/case_sections.cpp:
// a velocity limit only of the line's own kind); LimitAt
// (network/envelope/checks.h) resolves the limit of an item.
#pragma once

#include <array>
#include <cmath>
#include <limits>
#include <cstdint>
#include <string>

#include "library/units.h"

namespace loopwright {

struct ComponentType;

// Every row of the table, in the table's (and the README's) order.
enum class CheckId : std::uint8_t {  // one byte: a plant-size case holds millions of outcomes
  kFeedPressureMargin,
  kBearingFlowMin,
  kBearingFlowMax,
  kFeedTemperatureMax,
  kDrainTemperatureMax,
  kFilmThicknessMin,
  kFilmTemperatureMax,
  kStartUnitLoadMax,
  kStartViscosityMax,
  kPumpInletPressureMin,
  kPumpFlowFractionMin,
  kReliefClosed,
  kRegulatorAuthority,
  kThermostatTravel,
  kFilterBypassClosed,
  kClosingMargin,
  kVelocitySuctionMax,
  kVelocityPressureMax,
  kVelocityReturnMax,
  kDrainCapacityMargin,
  kHousingDrained,
  kBoilingMarginMin,
  kJacketFlowMin,
  kCoolerDutyMargin,
  // Through time (`simulate`, network/time/time_checks.h).
  kCokingTemperatureMax,
  kAfterBoilMarginMin,
  kWarmupTemperature,
  kWarmupTimeMax,
  kReliefOpenTimeMax,
  kBypassOpenTimeMax,
  kStarvedTimeMax,
  kCount
};
inline constexpr int kNumCheckRows = static_cast<int>(CheckId::kCount);

// Where a row's limit comes from.
enum class LimitFrom {
  kCase,       // a limit the case may set under "checks" (with the default below, if any)
  kComponent,  // the component's own parameter (a bearing's flow_min, a valve's crack)
};

// How the margin follows from value and limit; a margin >= 0 passes.
enum class MarginRule {
  kAtLeast,    // value - limit (a least value)
  kAtMost,     // limit - value (a greatest value)
  kShut,       // crack - pressure across the valve: an open/closed check, the valve must stay shut
  kNotACheck,  // a setting that other checks use (closing_margin), evaluated nowhere
};

struct CheckRow {
  CheckId id;
  const char* name;  // the key under "checks", the check's name in outputs
  Dimension dim;     // of the value and the limit
  LimitFrom limit_from;
  double default_si;         // NaN: no default (a case-only limit, or the component's own)
  const char* default_text;  // the default as written in the docs ("10 psi"); parses to default_si
  bool default_absolute;     // the default is an absolute pressure: the case's ambient makes it gauge
  const char* basis;         // where the default (or the limit) comes from
  const char* description;   // what the limit means (schema and docs)
  const char* reads;         // what the check reads at a point (docs)
  MarginRule margin;
  const char* failure;  // what it means when it fails, for explanations

  bool IsCheck() const { return margin != MarginRule::kNotACheck; }
  // An open/closed check: a valve that must stay shut, margin crack - pressure.
  bool IsShut() const { return margin == MarginRule::kShut; }
  bool HasDefault() const { return !std::isnan(default_si); }
  // The margin of `value` against `limit` by the row's rule.
  double Margin(double value, double limit) const { return margin == MarginRule::kAtLeast ? value - limit : limit - value; }
};

// The table, indexed by CheckId.
const std::array<CheckRow, kNumCheckRows>& CheckTable();
inline const CheckRow& Check(CheckId id) { return CheckTable()[static_cast<int>(id)]; }
// The row of a name, or nullptr (for readers and tests; never per point).
const CheckRow* FindCheck(const std::string& name);

// Where the limit in force came from: the check table's default, the case's
// "checks", a loop's, a component's (its "checks", a bearing's feed_margin,
// or the component's own parameter for a kComponent row) or a node's.
enum class LimitSource : std::uint8_t { kDefault, kCase, kComponent, kNone, kLoop, kNode };
// "default", "case", "component", "none", "loop", "node"
const char* LimitSourceName(LimitSource s);

struct LimitInForce {
  double si = std::numeric_limits<double>::quiet_NaN();  // SI (gauge for a pressure); NaN: not set
  LimitSource source = LimitSource::kNone;
  // The object that set it (kLoop: its loop; kComponent and kNode: its loop
  // and the component's or node's index in it); -1 for a default or case limit.
  int loop = -1;
  int item = -1;
  bool Set() const { return source != LimitSource::kNone; }
};

// The limits of a case, read once at load, one per row of the table.
struct CheckLimits {
  std::array<LimitInForce, kNumCheckRows> in_force;
  double operator[](CheckId id) const { return in_force[static_cast<int>(id)].si; }
  const LimitInForce& at(CheckId id) const { return in_force[static_cast<int>(id)]; }
  LimitInForce& at(CheckId id) { return in_force[static_cast<int>(id)]; }
};

// Whether a case limit (kCase row) may be written under "checks" on a
// component of type `t`: the check reads that kind of component (a bearing's
// temperatures, a pump's inlet, a line's velocity of any kind, a valve that
// must stay shut for closing_margin), or, for drain_temperature_max and
// cooler_duty_margin, a cooler or a line that may be a coupling's hot side.
// False for kComponent rows (the component's own parameter) and for
// boiling_margin_min (a node's). The load narrows it by the component's place.
bool LimitMayApplyToType(CheckId id, const ComponentType& t);

// The defaults of every case limit at an ambient (absolute) pressure [Pa];
// rows whose limit is the component's own have source kComponent and NaN.
CheckLimits DefaultCheckLimits(double ambient_pa);

// The README's check table (Markdown), made from the rows.
std::string CheckTableMarkdown();

}  // namespace loopwright
