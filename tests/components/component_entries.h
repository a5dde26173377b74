// The property list of every component type: one or more representative
// parameter sets per registered type (invented values of a size found in
// small lube-oil skids), shared by tests/components/component_properties_test.cpp
// (derivatives, zero flow, symmetry, monotonicity, finiteness) and
// tests/components/component_binding_test.cpp (every bindable parameter acts
// through params() exactly as the same value written in the case).
//
// Types are discovered from the registry (AllEntries): a registered type
// with no entry below gets one derived from its parameter specs
// (DerivedEntry: defaults, else a value inside the accepted range), so a new
// type needs an entry here only where the spec cannot give a valid value (a
// required table, a cross-parameter rule its factory enforces), where a
// property does not hold for a stated physical reason (the exception
// strings), or to give its optional parameters a value (the binding test's
// coverage names each one it misses).
#pragma once

#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <map>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "components/component.h"
#include "components/registry.h"

namespace loopwright {
namespace component_entries {

inline constexpr double kRho = 870.0;  // [kg/m3] representative mineral oil (invented state)
inline constexpr double kMu = 0.03;    // [Pa.s]  ~34 cSt

using Rows = std::vector<std::vector<double>>;

// One entry of the property list. Exception strings: empty = the property
// holds; otherwise the reason it does not.
struct Entry {
  std::string type;   // registry name
  std::string label;  // variant label for messages
  std::map<std::string, double> numbers;        // SI, by spec name
  std::map<std::string, std::string> choices;   // by spec name
  std::map<std::string, Rows> tables;           // by spec name
  std::map<std::string, std::vector<std::string>> name_lists;
  double m_nom;   // [kg/s] a typical design mass flow
  double dp_nom;  // [Pa]   a typical |dp|
  std::vector<double> dp_extra = {};  // [Pa] interesting dp values (cracking points)
  std::vector<double> x_extra = {};   // [Pa] interesting internal values
  std::string zero_law_exception = "";
  std::string odd_exception = "";
  std::string monotone_exception = "";
  std::string forward_only = "";  // monotone checked for m > 0 only, with reason
  // [Pa] outlet gauge pressures at which a law that reads its outlet
  // (Component::SensesOutlet) is checked besides its reference outlet
  // (component_properties_test.cpp (f); the binding test observes them too).
  std::vector<double> p_out_extra = {};
};

inline constexpr double kLpm = 1.0 / 60000.0;  // 1 L/min in m3/s
inline constexpr double kRpm = 2.0 * M_PI / 60.0;

inline const std::vector<Entry>& Entries() {
  static const std::vector<Entry> e = {
      {"pipe", "pipe, constant K and 2-K rows", {{"length", 2.0}, {"diameter", 0.012}, {"minor_k", 0.5}}, {},
       {{"hooper_fittings", {{2, 800, 0.25}}}}, {}, 0.2, 3e4},
      {"tube", "tube, named fittings (Hooper 2-K)", {{"length", 1.0}, {"diameter", 0.008}}, {}, {},
       {{"fittings", {"elbow_90_long_radius", "tee_through_run_threaded", "entrance_sharp"}}}, 0.05, 3e4},
      {"tube", "tube, named fittings (Darby 3-K)", {{"length", 1.0}, {"diameter", 0.008}},
       {{"fitting_method", "darby_3k"}}, {}, {{"fittings", {"elbow_90_long_radius", "exit"}}}, 0.05, 3e4},
      {"hose", "hose, 3-K rows", {{"length", 1.5}, {"diameter", 0.0127}}, {},
       {{"darby_fittings", {{1, 800, 0.071, 4.2}}}}, {}, 0.2, 1e4},
      {"pipe", "pipe, fixed Darcy f", {{"length", 3.0}, {"diameter", 0.02}, {"darcy_f", 0.03}},
       {{"friction", "fixed"}}, {}, {}, 0.5, 1e4},
      {"tube", "tube, fixed Darcy f, rough wall", {{"length", 0.8}, {"diameter", 0.01}, {"darcy_f", 0.025},
                                                  {"roughness", 20e-6}},
       {{"friction", "fixed"}}, {}, {}, 0.1, 1e4},
      {"hose", "hose, fixed Darcy f", {{"length", 2.5}, {"diameter", 0.016}, {"darcy_f", 0.03}},
       {{"friction", "fixed"}}, {}, {}, 0.3, 1e4},
      {"displacement_pump", "gear pump, volumetric efficiency, internal relief",
       {{"displacement", 8e-6}, {"speed", 1450 * kRpm}, {"volumetric_efficiency", 0.93},
        {"rated_pressure_rise", 7e5}, {"rated_viscosity", 0.028}, {"rated_speed", 1450 * kRpm},
        {"relief_crack", 10e5}, {"relief_full", 12e5}, {"relief_flow", 10 * kLpm}},
       {}, {}, {}, 0.168, 5e5, {-10e5, -10.5e5, -12e5, -14e5}, {},
       "a pump delivers its geometric flow at zero pressure rise",
       "displacement x speed is a delivery in one direction; the internal relief is one-way"},
      {"displacement_pump", "gerotor pump, slip coefficient, no internal relief",
       {{"displacement", 5e-6}, {"speed", 2900 * kRpm}, {"slip", 2e-13}, {"mechanical_efficiency", 0.8}},
       {}, {}, {}, 0.2, 4e5, {}, {},
       "a pump delivers its geometric flow at zero pressure rise",
       "displacement x speed is a delivery in one direction; the internal relief is one-way"},
      {"centrifugal_pump", "centrifugal pump at 80 % of rated speed",
       {{"speed", 0.8 * 2900 * kRpm}, {"rated_speed", 2900 * kRpm}}, {},
       {{"curve", {{0, 20}, {20 * kLpm, 18.5}, {40 * kLpm, 14}, {60 * kLpm, 7}}},
        {"efficiency", {{10 * kLpm, 0.25}, {40 * kLpm, 0.48}, {60 * kLpm, 0.40}}}},
       {}, 0.5, 1.5e5, {}, {},
       "a rotodynamic pump holds its shut-off head at zero flow",
       "the head-flow curve is not odd (shut-off head, H ~ Q^2 even term)",
       ""},  // monotone: the quadratic term is odd in reverse flow (components/centrifugal_pump.h)
      {"filter", "filter with bypass",
       {{"rated_flow", 20 * kLpm}, {"element_dp", 0.25e5}, {"rated_viscosity", 32e-6}, {"housing_dp", 0.05e5},
        {"bypass_crack", 1.7e5}, {"bypass_full", 2.2e5}, {"bypass_flow", 25 * kLpm}, {"clogging", 1.0}},
       {}, {}, {}, 0.25, 0.3e5, {1.7e5, 2.2e5, 3e5}, {1.69e5, 1.7e5, 1.701e5, 1.9e5, 2.2e5, 3e5, -1.7e5}, "",
       "the bypass relief opens for a positive element drop only (one-way)"},
      {"filter", "filter without bypass, clogged",
       {{"rated_flow", 20 * kLpm}, {"element_dp", 0.25e5}, {"rated_viscosity", 32e-6}, {"housing_dp", 0.05e5},
        {"clogging", 3.0}},
       {}, {}, {}, 0.25, 0.8e5, {}, {1e5, -1e5}},
      {"valve", "needle valve with size (IEC F_R)", {{"kvs", 0.6}, {"opening", 0.45}, {"size", 0.006}}, {}, {}, {},
       0.1, 2e5},
      {"valve", "valve, no size (F_R = 1), equal percentage", {{"kvs", 4.5}, {"opening", 0.7}},
       {{"characteristic", "equal_percentage"}}, {}, {}, 0.5, 1e5},
      {"valve", "valve, quick opening, with size and pipe", {{"kvs", 2.0}, {"opening", 0.02}, {"size", 0.01},
                                                             {"pipe_diameter", 0.012}},
       {{"characteristic", "quick_opening"}}, {}, {}, 0.05, 1e5},
      {"relief_valve", "relief valve", {{"crack", 5.5e5}, {"full_open", 6.5e5}, {"rated_flow", 30 * kLpm}}, {}, {},
       {}, 0.2, 6e5, {5.5e5, 5.5e5 * (1 + 1e-6), 5.6e5, 6.5e5, 7e5, 14e5}, {}, "",
       "a relief valve spills one way only, above its cracking pressure", "",
       "no dp gives a reverse flow through a relief valve"},
      {"relief_valve", "relief valve, default full open, water-rated", {{"crack", 3e5}, {"rated_flow", 12 * kLpm},
                                                                        {"rated_density", 998.0}},
       {}, {}, {}, 0.1, 3e5, {3e5, 3e5 * (1 + 1e-6), 3.1e5, 3.45e5, 5e5}, {}, "",
       "a relief valve spills one way only, above its cracking pressure", "",
       "no dp gives a reverse flow through a relief valve"},
      {"check_valve", "check valve", {{"kv", 3.0}, {"crack", 0.3e5}, {"open_dp", 0.3e5}}, {}, {}, {}, 0.3, 0.6e5,
       {0.3e5, 0.3e5 * (1 + 1e-6), 0.45e5, 0.6e5, 1e5}, {}, "",
       "a check valve seals in reverse (one-way by design)", "", "a check valve seals in reverse"},
      {"orifice", "restrictor, two holes in a pipe", {{"diameter", 0.0015}, {"pipe_diameter", 0.008}, {"count", 2}},
       {}, {}, {}, 0.02, 5e4},
      {"orifice", "oil jet into a cavity, viscous", {{"diameter", 0.0008}, {"cd", 0.65}, {"low_re_delta", 0.15}}, {},
       {}, {}, 0.005, 3e5},
      {"datasheet_loss", "datasheet loss, rated point",
       {{"rated_flow", 40 * kLpm}, {"rated_dp", 0.45e5}, {"laminar_fraction", 0.3}, {"rated_viscosity", 32e-6}},
       {}, {}, {}, 0.58, 0.45e5},
      {"datasheet_loss", "datasheet loss, fitted points", {{"rated_viscosity", 32e-6}}, {},
       {{"points", {{1e-4, 0.1e5}, {3e-4, 0.5e5}, {6e-4, 1.4e5}}}}, {}, 0.4, 1e5},
      {"air_cooler", "air cooler, oil side",
       {{"rated_flow", 30 * kLpm}, {"rated_dp", 0.6e5}, {"rated_viscosity", 20e-6}, {"conductance", 300},
        {"air_flow", 0.5}},
       {}, {}, {}, 0.43, 0.6e5},
      {"air_cooler", "air cooler, rating point, fan stopped part-way",
       {{"rated_flow", 30 * kLpm}, {"rated_dp", 0.6e5}, {"rated_viscosity", 20e-6}, {"rated_heat", 6000},
        {"rated_itd", 40}, {"rated_liquid_flow", 30 * kLpm}, {"rated_air_flow", 0.8}, {"fan_on", 0.7},
        {"air_inlet_temperature", 303.15}},
       {}, {}, {}, 0.43, 0.6e5},
      {"journal_bearing", "journal bearing",
       {{"diameter", 0.03}, {"length", 0.02}, {"groove_width", 0.004}, {"radial_clearance", 50e-6},
        {"eccentricity", 0.6}},
       {}, {}, {}, 0.0044, 4e5},
      {"journal_bearing", "journal bearing, speed, load and checks",
       {{"diameter", 0.04}, {"length", 0.03}, {"groove_width", 0.005}, {"radial_clearance", 40e-6},
        {"eccentricity", 0.4}, {"speed", 3000 * kRpm}, {"load", 2000}, {"heat_soak", 50},
        {"flow_min", 0.2 * kLpm}, {"flow_max", 2 * kLpm}},
       {}, {}, {}, 0.003, 3e5},
      {"journal_bearing", "journal bearing, eccentricity from load (Raimondi & Boyd)",
       {{"diameter", 0.04}, {"length", 0.03}, {"groove_width", 0.005}, {"radial_clearance", 40e-6},
        {"speed", 3000 * kRpm}, {"load", 2000}, {"heat_soak", 50}, {"flow_min", 0.2 * kLpm}, {"flow_max", 2 * kLpm}},
       {{"eccentricity_method", "raimondi_boyd_1958"}}, {}, {}, 0.003, 3e5},
      {"journal_bearing", "journal bearing, eccentricity from load (short-bearing theory)",
       {{"diameter", 0.04}, {"length", 0.03}, {"groove_width", 0.005}, {"radial_clearance", 40e-6},
        {"speed", 3000 * kRpm}, {"load", 2000}},
       {{"eccentricity_method", "ocvirk_1952"}}, {}, {}, 0.003, 3e5},
      {"rolling_bearing", "rolling bearing, jets behind a feed bore, checks",
       {{"diameter", 0.0012}, {"pipe_diameter", 0.004}, {"count", 3}, {"loss_power", 250}, {"heat_soak", 40},
        {"flow_min", 0.5 * kLpm}, {"flow_max", 4 * kLpm}},
       {}, {}, {}, 0.02, 2e5},
      {"rolling_bearing", "jet-fed rolling bearing", {{"diameter", 0.001}, {"count", 2}, {"loss_power", 100}}, {},
       {}, {}, 0.01, 2e5},
      {"rolling_bearing", "rolling bearing with its oil demand (Palmgren's moment, both terms)",
       {{"diameter", 0.001}, {"count", 2}, {"loss_power", 80}, {"speed", 6000 * kRpm}, {"pitch_diameter", 0.06},
        {"palmgren_f0", 4.0}, {"palmgren_f1", 7e-4}, {"friction_load", 2000}, {"allowed_rise", 12}},
       {}, {}, {}, 0.01, 2e5},
      // Floating ring bearings: the ring must be wider than the shaft and its
      // clearances (the factory's rule), so the spec alone cannot give one.
      {"floating_ring_bearing", "floating ring bearing, small turbocharger, running, checks",
       {{"diameter", 0.011}, {"inner_length", 0.007}, {"inner_groove_width", 0.0015}, {"inner_clearance", 25e-6},
        {"ring_diameter", 0.015}, {"outer_length", 0.009}, {"outer_groove_width", 0.003}, {"outer_clearance", 60e-6},
        {"hole_count", 4}, {"hole_diameter", 0.0012}, {"inner_eccentricity", 0.4}, {"outer_eccentricity", 0.6},
        {"speed", 100000 * kRpm}, {"heat_soak", 60}, {"flow_min", 0.1 * kLpm}, {"flow_max", 2.5 * kLpm}},
       {}, {}, {}, 0.015, 2.5e5},
      {"floating_ring_bearing", "floating ring bearing, films' eccentricities from load (short-bearing theory)",
       {{"diameter", 0.011}, {"inner_length", 0.007}, {"inner_groove_width", 0.0015}, {"inner_clearance", 25e-6},
        {"ring_diameter", 0.015}, {"outer_length", 0.009}, {"outer_groove_width", 0.003}, {"outer_clearance", 60e-6},
        {"hole_count", 4}, {"hole_diameter", 0.0012}, {"speed", 100000 * kRpm}, {"load", 15}},
       {{"eccentricity_method", "ocvirk_1952"}}, {}, {}, 0.015, 2.5e5},
      {"floating_ring_bearing", "floating ring bearing, no grooves, standing shaft",
       {{"diameter", 0.02}, {"inner_length", 0.012}, {"inner_clearance", 30e-6}, {"ring_diameter", 0.028},
        {"outer_length", 0.014}, {"outer_clearance", 70e-6}, {"hole_count", 6}, {"hole_diameter", 0.0015}},
       {}, {}, {}, 0.02, 3e5},
      {"fixed_flow", "fixed volumetric flow", {{"flow", 2e-4}}, {}, {}, {}, 0.17, 1e5, {}, {},
       "it imposes its flow whatever the pressure", "the imposed flow has one direction",
       "the law does not depend on dp"},
      {"fixed_flow", "fixed mass flow, negative", {{"mass_flow", -0.05}}, {}, {}, {}, 0.05, 1e5, {}, {},
       "it imposes its flow whatever the pressure", "the imposed flow has one direction",
       "the law does not depend on dp"},
      {"back_pressure_regulator", "back-pressure regulator, band and leak given",
       {{"set_pressure", 4e5}, {"proportional_band", 0.4e5}, {"kv_max", 1.5}, {"kv_min", 1e-3}}, {}, {}, {}, 0.39, 4e5,
       {3.8e5, 3.8e5 * (1 + 1e-6), 3.9e5, 4e5, 4.2e5, 6e5}, {}, "",
       "the plug opens for a positive drop only (its travel follows the drop)"},
      {"back_pressure_regulator", "back-pressure regulator, default band and leak", {{"set_pressure", 2.5e5}, {"kv_max", 0.8}},
       {}, {}, {}, 0.15, 2.5e5, {2.375e5, 2.5e5, 2.625e5}, {}, "",
       "the plug opens for a positive drop only (its travel follows the drop)"},
      // The reducing valve reads its outlet: properties (a)-(e) see its law of
      // dp alone at the reference outlet (its set point, mid travel), where
      // it is an odd, monotone fixed-Kv passage, so no exception is listed;
      // its outlet dependence, which makes it non-reciprocal, is checked at
      // p_out_extra by (f) (wide open, both corners, straight part, closed).
      {"pressure_reducing_valve", "pressure-reducing valve, band and leak given",
       {{"set_pressure", 2e5}, {"proportional_band", 0.2e5}, {"kv_max", 1.2}, {"kv_min", 1e-3}}, {}, {}, {}, 0.3, 3e5,
       {}, {}, "", "", "", "", {0.0, 1.9e5, 1.905e5, 1.95e5, 2.05e5, 2.095e5, 2.1e5, 2.5e5, 8e5}},
      {"pressure_reducing_valve", "pressure-reducing valve, default band and leak",
       {{"set_pressure", 3.5e5}, {"kv_max", 0.5}}, {}, {}, {}, 0.15, 2e5,
       {}, {}, "", "", "", "", {3.3e5, 3.4e5, 3.5e5, 3.68e5, 4e5}},
      {"gravity_drain", "gravity drain, vented cavity, warm oil",
       {{"diameter", 0.04}, {"length", 2.0}, {"fall", 0.1}, {"roughness", 20e-6}, {"design_fill", 0.5},
        {"cavity_pressure", 0.0}, {"minor_k", 1.5}},
       {}, {}, {}, 0.39, 1e3, {853.0, 1e4}, {},
       "a drain holds its fall's head at zero flow: the cavity vents at the reservoir's pressure",
       "the vented branch is not odd (the fall's head and the cavity pressure are one-signed)"},
      {"gravity_drain", "gravity drain, pressurised cavity",
       {{"diameter", 0.025}, {"length", 3.0}, {"fall", 0.3}, {"cavity_pressure", 0.5e5}, {"design_fill", 0.4}},
       {}, {}, {}, 0.3, 5.3e4, {5.26e4, 1e5}, {},
       "a drain holds its fall's head and the cavity pressure at zero flow",
       "the vented branch is not odd (the fall's head and the cavity pressure are one-signed)"},
      // Thermostatic valve paths: start-to-open and full-open must be ordered (the factory's rule).
      {"thermostatic_valve", "thermostatic valve, cooler path in its band, leak given",
       {{"start_to_open", 344.15}, {"full_open", 354.15}, {"kv", 2.0}, {"kv_leak", 1e-3}, {"sensed_temperature", 349.15}},
       {{"path", "opens_hot"}}, {}, {}, 0.15, 3e4},
      {"thermostatic_valve", "thermostatic valve, bypass path, cold element, default leak",
       {{"start_to_open", 344.15}, {"full_open", 354.15}, {"kv", 0.8}, {"sensed_temperature", 330.0}},
       {{"path", "closes_hot"}}, {}, {}, 0.1, 3e4},
      {"scavenge_pump", "scavenge pump lifting from a pressurised cavity",
       {{"displacement", 10e-6}, {"speed", 1450 * kRpm}, {"lift", 0.4}, {"cavity_pressure", 0.3e5}}, {}, {}, {}, 0.1, 3e4,
       {2.6e4, 1e5}, {},
       "the cavity stands at its gas pressure less the lift's head at zero flow",
       "the vented branch is not odd (the cavity pressure and the lift are one-signed)"},
  };
  return e;
}

// ParamValues from the specs: defaults everywhere, then the entry's values.
inline ParamValues BuildValues(const ComponentType& t, const Entry& e) {
  ParamValues v;
  v.values.assign(t.params.size(), kNoValue);
  v.tables.assign(t.params.size(), {});
  for (size_t i = 0; i < t.params.size(); ++i) v.values[i] = t.params[i].default_si;
  for (const auto& [name, x] : e.numbers) {
    const int i = t.ParamIndex(name);
    REQUIRE_MESSAGE(i >= 0, e.label << ": no parameter " << name);
    REQUIRE(t.params[i].kind == ParamKind::kNumber);
    v.values[i] = x;
  }
  for (const auto& [name, c] : e.choices) {
    const int i = t.ParamIndex(name);
    REQUIRE_MESSAGE(i >= 0, e.label << ": no parameter " << name);
    const auto& ch = t.params[i].choices;
    auto it = std::find(ch.begin(), ch.end(), c);
    REQUIRE_MESSAGE(it != ch.end(), e.label << ": no choice " << c);
    v.values[i] = static_cast<double>(it - ch.begin());
  }
  for (const auto& [name, rows] : e.tables) {
    const int i = t.ParamIndex(name);
    REQUIRE_MESSAGE(i >= 0, e.label << ": no parameter " << name);
    REQUIRE(t.params[i].kind == ParamKind::kTable);
    v.tables[i] = rows;
    v.values[i] = 1.0;
  }
  for (const auto& [name, names] : e.name_lists) {
    const int i = t.ParamIndex(name);
    REQUIRE_MESSAGE(i >= 0, e.label << ": no parameter " << name);
    const auto& ch = t.params[i].choices;
    for (const auto& n : names) {
      auto it = std::find(ch.begin(), ch.end(), n);
      REQUIRE_MESSAGE(it != ch.end(), e.label << ": no name " << n);
      v.tables[i].push_back({static_cast<double>(it - ch.begin())});
    }
    v.values[i] = 1.0;
  }
  return v;
}

// A valid value of number spec s from the spec alone: its default, else a
// point inside its accepted range (the middle of a bounded range, one above
// a lower bound, one below an upper bound, else 1, in SI).
inline double DerivedValue(const ParamSpec& s) {
  if (std::isfinite(s.default_si)) return s.default_si;
  const bool lo = std::isfinite(s.min_si), hi = std::isfinite(s.max_si);
  if (lo && hi) return 0.5 * (s.min_si + s.max_si);
  if (lo) return s.min_si + 1.0;
  if (hi) return s.max_si - 1.0;
  return 1.0;
}

// An entry for type t derived from its specs: every required number from
// DerivedValue, choices at their default; nominal dp 1 bar (common practice
// for a lube-oil branch) and the flow its linearised law gives there.
// Empty, with *why, when a required table has no derivable rows or the
// factory refuses the derived values.
inline std::optional<Entry> DerivedEntry(const ComponentType& t, std::string* why) {
  Entry e{t.name, t.name + " (derived from its specs)", {}, {}, {}, {}, 0.0, 1e5};
  for (const auto& s : t.params) {
    if (s.kind == ParamKind::kTable && s.required) {
      *why = "required table parameter " + s.name + " cannot be derived from its spec";
      return std::nullopt;
    }
    if (s.kind == ParamKind::kNumber && s.required) e.numbers[s.name] = DerivedValue(s);
  }
  ParamValues v;
  v.values.assign(t.params.size(), kNoValue);
  v.tables.assign(t.params.size(), {});
  for (size_t i = 0; i < t.params.size(); ++i) {
    const auto it = e.numbers.find(t.params[i].name);
    v.values[i] = it != e.numbers.end() ? it->second : t.params[i].default_si;
  }
  std::vector<ParamError> errors;
  const auto c = t.make(v, &errors);
  if (!c) {
    *why = "the factory refuses the derived values:";
    for (const auto& er : errors) *why += " " + er.param + ": " + er.message + ";";
    return std::nullopt;
  }
  const LinearGuess g = c->Linearize(kRho, kMu);
  e.m_nom = std::abs(g.g * e.dp_nom + g.m0);
  if (!(std::isfinite(e.m_nom) && e.m_nom > 0)) e.m_nom = 0.1;  // [kg/s] a small skid's flow (invented)
  return e;
}

// Entries(), and a derived entry for every registered type that has none
// there and can be derived (the coverage test demands an entry for the
// rest, with the reason).
inline const std::vector<Entry>& AllEntries() {
  static const std::vector<Entry> all = [] {
    std::vector<Entry> a = Entries();
    for (const auto& t : ComponentTypes()) {
      if (std::any_of(a.begin(), a.end(), [&](const Entry& e) { return e.type == t.name; })) continue;
      std::string why;
      if (auto d = DerivedEntry(t, &why)) a.push_back(*d);
    }
    return a;
  }();
  return all;
}

inline std::unique_ptr<Component> Make(const Entry& e) {
  const ComponentType* t = FindComponentType(e.type);
  REQUIRE_MESSAGE(t != nullptr, "unregistered type " << e.type);
  std::vector<ParamError> errors;
  auto c = t->make(BuildValues(*t, e), &errors);
  std::string msg;
  for (auto& er : errors) msg += er.param + ": " + er.message + "; ";
  REQUIRE_MESSAGE(c != nullptr, e.label << ": factory refused the parameters: " << msg);
  REQUIRE(c->NumInternal() <= kMaxInternal);
  return c;
}

}  // namespace component_entries
}  // namespace loopwright
