// Plausible magnitudes of case values; see plausible.h. Every range below is
// common practice for the oil and coolant loops of machines on pressure-fed
// bearings (skids, test rigs, gearboxes, turbomachinery), chosen wide: a
// warning means "look again", not "wrong". Hard limits are wider still, by
// orders of magnitude: nothing in a machine comes near them.
#include "network/case/plausible.h"

#include <array>
#include <cmath>
#include <string_view>
#include <unordered_map>
#include <vector>

#include <fmt/format.h>

namespace loopwright {
namespace {

using D = Dimension;
constexpr double kRpm = 2.0 * 3.14159265358979323846 / 60.0;  // rad/s per rpm

// clang-format off
const std::vector<PlausibleRange>& RangeTable() {
  static const std::vector<PlausibleRange> r = {
    // Parameters of one type.
    {"pipe", "length", D::kLength, 1e-3, 200.0, "a line length", "1 mm to 200 m"},
    {"hose", "length", D::kLength, 1e-3, 200.0, "a line length", "1 mm to 200 m"},
    {"tube", "length", D::kLength, 1e-3, 200.0, "a line length", "1 mm to 200 m"},
    {"journal_bearing", "length", D::kLength, 1e-3, 2.0, "a bearing length", "1 mm to 2 m"},
    {"centrifugal_pump", "speed", D::kRotationalSpeed, 100 * kRpm, 12000 * kRpm, "a pump speed", "100 to 12,000 rpm"},
    {"centrifugal_pump", "rated_speed", D::kRotationalSpeed, 100 * kRpm, 12000 * kRpm, "a pump speed", "100 to 12,000 rpm"},
    {"displacement_pump", "speed", D::kRotationalSpeed, 50 * kRpm, 12000 * kRpm, "a pump speed", "50 to 12,000 rpm"},
    {"displacement_pump", "rated_speed", D::kRotationalSpeed, 50 * kRpm, 12000 * kRpm, "a pump speed", "50 to 12,000 rpm"},
    {"relief_valve", "crack", D::kPressureDifference, 1e3, 7e7, "a valve setting", "10 mbar to 700 bar"},
    {"relief_valve", "full_open", D::kPressureDifference, 1e3, 7e7, "a valve setting", "10 mbar to 700 bar"},
    {"filter", "bypass_crack", D::kPressureDifference, 1e3, 7e7, "a valve setting", "10 mbar to 700 bar"},
    {"filter", "bypass_full", D::kPressureDifference, 1e3, 7e7, "a valve setting", "10 mbar to 700 bar"},
    {"displacement_pump", "relief_crack", D::kPressureDifference, 1e3, 7e7, "a valve setting", "10 mbar to 700 bar"},
    {"displacement_pump", "relief_full", D::kPressureDifference, 1e3, 7e7, "a valve setting", "10 mbar to 700 bar"},
    // Parameters of any type.
    {"", "diameter", D::kLength, 1e-4, 1.0, "a diameter", "0.1 mm to 1 m"},
    {"", "pipe_diameter", D::kLength, 1e-3, 1.0, "a pipe bore", "1 mm to 1 m"},
    {"", "size", D::kLength, 1e-3, 1.0, "a valve size", "1 mm to 1 m"},
    {"", "roughness", D::kLength, 0.0, 5e-3, "a wall roughness", "0 to 5 mm"},
    {"", "radial_clearance", D::kLength, 1e-6, 2e-3, "a bearing clearance", "1 um to 2 mm"},
    {"", "groove_width", D::kLength, 1e-4, 0.5, "a groove width", "0.1 mm to 0.5 m"},
    // Any other field, by dimension.
    {"", "", D::kPressure, 0.0, 7e7, "a pressure", "within 700 bar"},
    {"", "", D::kPressureDifference, 0.0, 7e7, "a pressure difference", "within 700 bar"},
    {"", "", D::kVolumeFlow, 0.0, 1.0, "a volumetric flow", "up to 1 m3/s (60,000 L/min)"},
    {"", "", D::kMassFlow, 0.0, 1e3, "a mass flow", "up to 1000 kg/s"},
    {"", "", D::kLength, 0.0, 100.0, "a length", "up to 100 m"},
    {"", "", D::kArea, 0.0, 10.0, "an area", "up to 10 m2"},
    {"", "", D::kVolume, 0.0, 100.0, "a volume", "up to 100 m3"},
    {"", "", D::kDisplacement, 0.0, 1e-2, "a pump displacement", "up to 10 L/rev"},
    {"", "", D::kTemperature, 200.0, 600.0, "a temperature", "200 K to 600 K (-73 degC to 327 degC)"},
    {"", "", D::kTemperatureDifference, 0.0, 300.0, "a temperature difference", "up to 300 K"},
    {"", "", D::kKinematicViscosity, 1e-7, 0.1, "a kinematic viscosity", "0.1 cSt to 100,000 cSt"},
    {"", "", D::kDynamicViscosity, 1e-5, 100.0, "a dynamic viscosity", "0.01 mPa.s to 100 Pa.s"},
    {"", "", D::kDensity, 0.5, 3000.0, "a density", "0.5 to 3000 kg/m3"},
    {"", "", D::kPower, 0.0, 5e7, "a power or heat flow", "up to 50 MW"},
    {"", "", D::kConductance, 0.0, 1e7, "a thermal conductance", "up to 10 MW/K"},
    {"", "", D::kRotationalSpeed, 0.0, 300000 * kRpm, "a rotational speed", "up to 300,000 rpm"},
    {"", "", D::kSpecificHeat, 100.0, 1e4, "a specific heat", "0.1 to 10 kJ/(kg.K) (solids from lead to water)"},
    {"", "", D::kThermalConductivity, 0.0, 500.0, "a thermal conductivity", "up to 500 W/(m.K)"},
    {"", "", D::kVelocity, 0.0, 100.0, "a velocity", "up to 100 m/s"},
    {"", "", D::kSlipCoefficient, 0.0, 1e-8, "a pump slip coefficient", "up to 1e-8 m3"},
    {"", "", D::kInverseTemperature, 0.0, 1e-2, "an expansion coefficient", "up to 0.01 1/K"},
    {"", "", D::kFlowCoefficientKv, 0.0, 1e4, "a flow coefficient", "up to Kv 10,000"},
    {"", "", D::kForce, 0.0, 1e7, "a force", "up to 10 MN"},
    {"", "", D::kMass, 0.0, 1e5, "a mass", "up to 100 t"},
  };
  return r;
}

const std::vector<HardLimit>& LimitTable() {
  static const std::vector<HardLimit> l = {
    {D::kDimensionless, 1e12, "1e12"},
    {D::kPressure, 1e9, "10,000 bar"},
    {D::kPressureDifference, 1e9, "10,000 bar"},
    {D::kVolumeFlow, 100.0, "100 m3/s"},
    {D::kMassFlow, 1e5, "100,000 kg/s"},
    {D::kLength, 1e4, "10 km"},
    {D::kArea, 1e4, "10,000 m2"},
    {D::kVolume, 1e6, "1,000,000 m3"},
    {D::kDisplacement, 1.0, "1 m3/rev"},
    {D::kTemperature, 1e4, "10,000 K"},
    {D::kTemperatureDifference, 1e4, "10,000 K"},
    {D::kKinematicViscosity, 100.0, "100 m2/s"},
    {D::kDynamicViscosity, 1e5, "100,000 Pa.s"},
    {D::kDensity, 1e5, "100,000 kg/m3"},
    {D::kPower, 1e10, "10 GW"},
    {D::kConductance, 1e10, "10 GW/K"},
    {D::kRotationalSpeed, 1e7 * kRpm, "10,000,000 rpm"},
    {D::kSpecificHeat, 1e6, "1000 kJ/(kg.K)"},
    {D::kThermalConductivity, 1e5, "100,000 W/(m.K)"},
    {D::kVelocity, 1e4, "10 km/s"},
    {D::kTime, 1e10, "1e10 s"},
    {D::kSlipCoefficient, 1.0, "1 m3"},
    {D::kInverseTemperature, 1.0, "1 1/K"},
    {D::kFlowCoefficientKv, 1e7, "Kv 1e7"},
    {D::kForce, 1e10, "1e10 N"},
    {D::kMass, 1e9, "1e9 kg"},
  };
  return l;
}
// clang-format on

bool Is(const char* a, const std::string& b) { return b == a; }

}  // namespace

const std::vector<PlausibleRange>& PlausibleRanges() { return RangeTable(); }
const std::vector<HardLimit>& HardLimits() { return LimitTable(); }

namespace {

// The range table indexed once: the rows naming each parameter, and each
// dimension's first row for any field, both in table order.
struct RangeIndex {
  std::unordered_map<std::string_view, std::vector<const PlausibleRange*>> by_param;
  std::unordered_map<int, const PlausibleRange*> by_dim;
  RangeIndex() {
    for (const PlausibleRange& r : RangeTable()) {
      if (r.param[0] != '\0') by_param[r.param].push_back(&r);
      else by_dim.try_emplace(static_cast<int>(r.dim), &r);
    }
  }
};

}  // namespace

// The first row of the table (in its order) for (type, parameter), else for
// the parameter of any type, else for the dimension.
const PlausibleRange* FindPlausibleRange(Dimension dim, const std::string& type, const std::string& param) {
  static const RangeIndex index;
  const PlausibleRange* any_type = nullptr;
  if (!param.empty()) {
    if (auto it = index.by_param.find(param); it != index.by_param.end()) {
      for (const PlausibleRange* r : it->second) {
        if (r->dim != dim) continue;
        if (Is(r->type, type)) return r;
        if (r->type[0] == '\0' && !any_type) any_type = r;
      }
    }
  }
  if (any_type) return any_type;
  auto it = index.by_dim.find(static_cast<int>(dim));
  return it == index.by_dim.end() ? nullptr : it->second;
}

const HardLimit* FindHardLimit(Dimension dim) {
  for (const HardLimit& l : LimitTable())
    if (l.dim == dim) return &l;
  return nullptr;
}

FieldLimits FindFieldLimits(Dimension dim, std::string_view type, std::string_view param) {
  struct Entry {
    std::string type, param;
    Dimension dim;
    FieldLimits limits;
    bool used = false;
  };
  thread_local std::array<Entry, 128> memo{};  // a slot per hash of the names; a clash only looks up again
  if (param.empty()) type = {};                // a field of no parameter has its dimension's range
  // Hashed on a few bytes (the names are verified below).
  const auto at = [](std::string_view s, size_t i) { return s.empty() ? size_t(0) : static_cast<unsigned char>(s[i]); };
  const size_t h = static_cast<size_t>(dim) * 37 + param.size() * 11 + type.size() * 5 + at(param, 0) * 3 +
                   at(param, param.size() / 2) * 7 + at(type, 0) + at(type, type.size() / 2) * 13;
  Entry& e = memo[h % memo.size()];
  if (e.used && e.dim == dim && e.param == param && e.type == type) return e.limits;
  const std::string t(type), p(param);
  e = {t, p, dim, {FindHardLimit(dim), FindPlausibleRange(dim, t, p)}, true};
  return e.limits;
}

std::string HardLimitError(Dimension dim, const std::string& type, const std::string& param, double si) {
  const HardLimit* l = FindHardLimit(dim);
  if (!l || std::fabs(si) <= l->max_abs) return std::string();
  const PlausibleRange* r = FindPlausibleRange(dim, type, param);
  const std::string field = param.empty() ? DimensionName(dim) : param;
  const std::string si_unit = SiUnit(dim);
  const std::string shown = DisplayUnit(dim, UnitSystem::kSI);
  const std::string also =
      shown.empty() || shown == si_unit ? "" : fmt::format(" ({:.4g} {})", FromSI(si, dim, UnitSystem::kSI), shown);
  return fmt::format("{} = {:.4g}{}{} is beyond any machine: no {} exceeds {} in magnitude{}; the value is refused, "
                     "not passed to the solver",
                     field, si, dim == Dimension::kDimensionless ? std::string() : " " + si_unit, also, DimensionName(dim), l->range,
                     r ? fmt::format(" (plausible for {}: {})", r->what, r->range) : std::string());
}

std::string PlausibilityWarning(Dimension dim, const std::string& type, const std::string& param, double si,
                                bool bare) {
  const PlausibleRange* r = FindPlausibleRange(dim, type, param);
  const double m = std::fabs(si);
  if (!r || m == 0.0 || (m >= r->lo && m <= r->hi)) return std::string();
  const std::string si_unit = SiUnit(dim);
  const std::string shown = DisplayUnit(dim, UnitSystem::kSI);
  std::string slip = "check the value and its unit";
  if (bare && !shown.empty() && shown != si_unit)
    slip = fmt::format("a bare number is read in SI ({}): was \"{:g} {}\" meant?", si_unit, si, shown);
  else if (bare)
    slip = fmt::format("a bare number is read in SI ({}); check the value", si_unit);
  const std::string field = param.empty() ? DimensionName(dim) + " of " : param + " = ";
  return fmt::format("{}{:g} {} is outside the plausible range of {} ({}); {}", field, si, si_unit, r->what, r->range,
                     slip);
}

}  // namespace loopwright
