// Thermal solve (network/point/thermal.h, CaseSolver::Solve in network/point/run.cpp):
// energy closure, the effect of the coupling, convergence and independence
// from the starting temperatures, the fan-stopped radiator, the boiling
// margin, and the bearing friction heat against the hand formula.
//
// Sources of the check values:
//   (a) energy closure: the first law for a steady open system (every loop's
//       heat added = heat removed + carried out), tolerance 1e-6 relative.
//   (b) the feed pressure, set by the bearings' viscosity at the feed, lies
//       between the isothermal answers at the loop's coldest and hottest
//       temperature (monotone laws); the bearing flows do NOT: the pump's
//       laminar slip C_s dP/mu (Merritt 1967 ch. 7, from memory) sees hot
//       oil and the cold-feed pressure at once, so the coupled flows fall
//       below both isothermal answers by the extra slip (mass balance).
//   (c) a fixed point of the nested scheme is unique for this case: two
//       different starts must give the same temperatures to 1e-8 K.
//   (d) e-NTU: less air flow, smaller C_air and NTU, so less heat rejected
//       at a given inlet difference (Incropera 6th ed. Table 11.3, from
//       memory); in steady state the loops then run hotter.
//   (e) IF97 (IAPWS R7-97(2012)) Table 35 verification values of Tsat(p)
//       (from memory): 0.1 MPa -> 372.755919 K, 1 MPa -> 453.035632 K,
//       10 MPa -> 584.149488 K; boiling margin = Tsat(p_abs) - T.
//   (f) Petroff: P = 2 pi mu omega^2 r^3 L / c, eccentric film divided by
//       sqrt(1 - eps^2) (Shigley 9th ed. Eq. 12-6, from memory; see
//       components/correlations/bearing_friction.h); plus the dissipation
//       Q dp of the side flow (steady-flow energy equation).
// Cases: the shipped cases/*.json and tests/network/two_loop_case.json
// (invented); small cases built here are invented.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <map>
#include <memory>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "library/water.h"
#include "network/case/case.h"
#include "network/envelope/checks.h"
#include "network/point/run.h"
#include "tests/tools/source_dir.h"

using loopwright::testing::SourceDir;

namespace loopwright {
namespace {

using nlohmann::json;

std::string LibraryDir() { return SourceDir() + "/library"; }

std::unique_ptr<Case> Load(const std::string& path) {
  LoadResult r = LoadCaseFile(path, LibraryDir());
  REQUIRE_MESSAGE(r.value, "case " << path << " did not load");
  return std::move(r.value);
}

std::unique_ptr<Case> LoadText(const std::string& text) {
  LoadResult r = LoadCaseText(text, SourceDir() + "/tests/network/inline.json", LibraryDir());
  REQUIRE_MESSAGE(r.value, "inline case did not load");
  return std::move(r.value);
}

std::string TwoLoopPath() { return SourceDir() + "/tests/network/two_loop_case.json"; }

int VarIndex(const Case& cs, const std::string& name) {
  for (size_t i = 0; i < cs.envelope.variables.size(); ++i)
    if (cs.envelope.variables[i].name == name) return static_cast<int>(i);
  FAIL("no variable " << name);
  return -1;
}

const OperatingPoint& Point(const Case& cs, const std::string& name) {
  const int i = FindPoint(cs, name);
  REQUIRE(i >= 0);
  return cs.envelope.points[i];
}

double NodeT(const Case& cs, const PointResult& r, const std::string& loop, const std::string& node) {
  for (const auto& n : r.nodes)
    if (cs.loops[n.loop].id == loop && cs.loops[n.loop].nodes[n.node].id == node) return n.temperature_k;
  FAIL("no node " << loop << "/" << node);
  return 0;
}
double NodeP(const Case& cs, const PointResult& r, const std::string& loop, const std::string& node) {
  for (const auto& n : r.nodes)
    if (cs.loops[n.loop].id == loop && cs.loops[n.loop].nodes[n.node].id == node) return n.pressure_pa;
  FAIL("no node " << loop << "/" << node);
  return 0;
}
const BranchOutcome& Branch(const Case& cs, const PointResult& r, const std::string& loop, const std::string& comp) {
  for (const auto& b : r.branches)
    if (cs.loops[b.loop].id == loop && cs.loops[b.loop].components[b.comp].id == comp) return b;
  FAIL("no component " << loop << "/" << comp);
  return r.branches.front();
}

// The shipped demo cases (sorted) and the two-loop test case.
std::vector<std::string> ThermalCasePaths() {
  std::vector<std::string> paths;
  for (const auto& e : std::filesystem::directory_iterator(SourceDir() + "/cases"))
    if (e.path().extension() == ".json" && e.path().filename().string().find("schema") == std::string::npos)
      paths.push_back(e.path().string());
  std::sort(paths.begin(), paths.end());
  paths.push_back(TwoLoopPath());
  return paths;
}

TEST_CASE("(a) energy closes to 1e-6 on every thermal point of every shipped case and the two-loop case") {
  const std::vector<std::string> paths = ThermalCasePaths();
  int thermal_points = 0;
  double worst = 0;
  for (const auto& path : paths) {
    auto cs = Load(path);
    if (!cs->thermal) continue;
    CaseSolver solver(*cs);
    for (const auto& op : cs->envelope.points) {
      if (op.isothermal) continue;
      CAPTURE(path);
      CAPTURE(op.name);
      PointResult r = solver.Solve(op, true);
      REQUIRE(r.converged);
      REQUIRE(r.thermal);
      REQUIRE(r.thermal_report.loop_closure.size() == cs->loops.size());
      for (size_t l = 0; l < cs->loops.size(); ++l) {
        CAPTURE(cs->loops[l].id);
        CHECK(r.thermal_report.loop_heat_added[l] > 0);
        CHECK(r.thermal_report.loop_closure[l] <= 1e-6);
        worst = std::max(worst, r.thermal_report.loop_closure[l]);
      }
      ++thermal_points;
    }
  }
  CHECK(thermal_points >= 5);
  MESSAGE("thermal points " << thermal_points << ", worst energy closure " << worst);
}

TEST_CASE("(b) the coupling matters: isothermal solves at the coldest and hottest oil temperature") {
  auto cs = Load(TwoLoopPath());
  CaseSolver solver(*cs);
  const OperatingPoint& op = Point(*cs, "hot_room");
  PointResult coupled = solver.Solve(op, false);
  REQUIRE(coupled.converged);
  double t_lo = INFINITY, t_hi = -INFINITY;
  for (const auto& n : coupled.nodes)
    if (cs->loops[n.loop].id == "oil") {
      t_lo = std::min(t_lo, n.temperature_k);
      t_hi = std::max(t_hi, n.temperature_k);
    }
  REQUIRE(t_hi - t_lo > 5.0);  // a real spread of temperature round the loop
  const int tv = VarIndex(*cs, "oil_temperature");
  auto iso = [&](double t) {
    OperatingPoint p = op;
    p.isothermal = true;
    p.values[tv] = t;
    CaseSolver s(*cs);
    PointResult r = s.Solve(p, false);
    REQUIRE(r.converged);
    REQUIRE_FALSE(r.thermal);
    return r;
  };
  PointResult cold = iso(t_lo), hot = iso(t_hi);
  auto bracketed = [](double lo_end, double mid, double hi_end) {
    const double a = std::min(lo_end, hi_end), b = std::max(lo_end, hi_end);
    return mid > a && mid < b && (b - a) > 1e-3 * std::abs(b);
  };
  // Bearing flows. The gear pump's slip C_s dP / mu sees the hot reservoir
  // oil while the feed pressure dP is set by the cold oil leaving the
  // cooler, so the coupled pump slips more than at either end and the
  // bearings get less than both isothermal answers: outside the bracket, the
  // reason an isothermal solve at any single temperature misjudges them.
  auto slip = [&](const PointResult& r) {
    for (const auto& it : BranchReport(*cs, r, Branch(*cs, r, "oil", "pump")).items)
      if (it.key == "slip_flow") return it.value;
    FAIL("no slip_flow");
    return 0.0;
  };
  const double slip_c = slip(coupled);
  CHECK(slip_c > std::max(slip(cold), slip(hot)) * 1.05);
  for (const char* b : {"drive_bearing", "free_bearing"}) {
    const double qc = Branch(*cs, coupled, "oil", b).flow_m3s;
    const double q1 = Branch(*cs, cold, "oil", b).flow_m3s, q2 = Branch(*cs, hot, "oil", b).flow_m3s;
    CAPTURE(b);
    CAPTURE(q1);
    CAPTURE(qc);
    CAPTURE(q2);
    CHECK(qc < std::min(q1, q2) * (1 - 1e-3));
  }
  // Mass conservation: the lost bearing flow is the extra slip (within the
  // density change between pump and feed oil, 2 %).
  const double lost = Branch(*cs, cold, "oil", "drive_bearing").flow_m3s + Branch(*cs, cold, "oil", "free_bearing").flow_m3s -
                      Branch(*cs, coupled, "oil", "drive_bearing").flow_m3s - Branch(*cs, coupled, "oil", "free_bearing").flow_m3s;
  CHECK(lost == doctest::Approx(slip_c - slip(cold)).epsilon(0.02));
  // Feed pressure: set by the bearings' viscosity at the feed, inside the
  // bracket.
  const double pc = NodeP(*cs, coupled, "oil", "feed");
  const double p1 = NodeP(*cs, cold, "oil", "feed"), p2 = NodeP(*cs, hot, "oil", "feed");
  CAPTURE(p1);
  CAPTURE(pc);
  CAPTURE(p2);
  CHECK(bracketed(p1, pc, p2));
  // Cold oil is thicker: the isothermal feed pressure falls with temperature.
  CHECK(p1 > p2);
}

TEST_CASE("(c) the nested scheme converges on the coldest thermal start and does not depend on the initial temperatures") {
  // The stiffest shipped point: the APU test cell's cold start (-10 degC oil,
  // relief lifting), here solved with the energy balance instead of
  // isothermally.
  auto cs = Load(SourceDir() + "/cases/apu_test_cell.json");
  OperatingPoint op = Point(*cs, "cold_start");
  op.isothermal = false;
  CaseSolver a(*cs);
  PointResult ra = a.Solve(op, false);
  REQUIRE(ra.converged);
  REQUIRE(ra.thermal);
  CHECK(ra.coupling_iterations < 200);
  // Second start: every free temperature 60 K hotter than the first start,
  // and the hydraulic guess of another point.
  CaseSolver b(*cs);
  PointResult warmup = b.Solve(Point(*cs, "full_power_hot_day"), false);
  REQUIRE(warmup.converged);
  for (double& t : b.T) t += 60.0;
  PointResult rb = b.Solve(op, true);
  REQUIRE(rb.converged);
  REQUIRE(ra.nodes.size() == rb.nodes.size());
  double worst = 0;
  for (size_t i = 0; i < ra.nodes.size(); ++i)
    worst = std::max(worst, std::abs(ra.nodes[i].temperature_k - rb.nodes[i].temperature_k));
  MESSAGE("cold thermal start: passes " << ra.coupling_iterations << " and " << rb.coupling_iterations
                                        << ", largest temperature difference " << worst << " K");
  CHECK(worst <= 1e-8);
}

TEST_CASE("(d) a radiator with the fan stopped rejects less heat and the loops run hotter") {
  auto cs = Load(TwoLoopPath());
  const OperatingPoint& on = Point(*cs, "hot_room");
  OperatingPoint off = on;
  off.values[VarIndex(*cs, "fan")] = 0.0;
  CaseSolver s1(*cs), s2(*cs);
  PointResult r_on = s1.Solve(on, false), r_off = s2.Solve(off, false);
  REQUIRE(r_on.converged);
  REQUIRE(r_off.converged);
  const double q_on = -BranchReport(*cs, r_on, Branch(*cs, r_on, "water", "radiator")).heat_W;
  const double q_off = -BranchReport(*cs, r_off, Branch(*cs, r_off, "water", "radiator")).heat_W;
  CAPTURE(q_on);
  CAPTURE(q_off);
  CHECK(q_off > 0);
  CHECK(q_off < q_on);
  for (const char* n : {"tank", "radiator_in"}) CHECK(NodeT(*cs, r_off, "water", n) > NodeT(*cs, r_on, "water", n) + 1.0);
  for (const char* n : {"feed", "housing"}) CHECK(NodeT(*cs, r_off, "oil", n) > NodeT(*cs, r_on, "oil", n) + 1.0);
}

TEST_CASE("(e) boiling margin of water nodes is IF97 Tsat(p_abs) - T") {
  // IF97 Table 35 (from memory).
  // Table values have 9 significant digits: agreement to half a unit of the
  // last one, 5e-7 K.
  CHECK(std::abs(Iapws97SaturationTemperature(0.1e6) - 372.755919) <= 5e-7);
  CHECK(std::abs(Iapws97SaturationTemperature(1e6) - 453.035632) <= 5e-7);
  CHECK(std::abs(Iapws97SaturationTemperature(10e6) - 584.149488) <= 5e-7);
  auto cs = Load(TwoLoopPath());
  CaseSolver s(*cs);
  PointResult r = s.Solve(Point(*cs, "hot_room"), false);
  REQUIRE(r.converged);
  int water_nodes = 0;
  for (const auto& n : r.nodes) {
    const bool water = cs->loops[n.loop].id == "water";
    if (!water) {
      CHECK(std::isnan(n.boiling_margin_k));  // the oil model does not boil
      continue;
    }
    ++water_nodes;
    const double p_abs = n.pressure_pa + cs->ambient_pa;
    CHECK(p_abs > 1.2e5);  // pressurised loop: Tsat above 378 K
    const double want = Iapws97SaturationTemperature(p_abs) - n.temperature_k;
    CHECK(n.boiling_margin_k == doctest::Approx(want).epsilon(1e-12));
    CHECK(n.boiling_margin_k > 50.0);
  }
  CHECK(water_nodes == 4);
}

// Invented single-bearing case: a feed held at 2 bar and 50 degC, a
// constant-property oil (table fluid), no load (no load term), no soak.
constexpr double kSbMu = 0.025, kSbRho = 860.0, kSbCp = 2000.0;  // invented
constexpr double kSbD = 0.05, kSbLength = 0.04, kSbC = 100e-6, kSbEps = 0.4, kSbRpm = 6000.0, kSbFeed = 2e5;

json SingleBearingCase() {
  const double mu = kSbMu, rho = kSbRho, cp = kSbCp;
  const double d = kSbD, length = kSbLength, c = kSbC, eps = kSbEps, rpm = kSbRpm, p_feed = kSbFeed;
  json fluid = {{"kind", "table"}, {"viscosity", "dynamic"},
                {"rows", {{250.0, mu, rho, cp, 0.13}, {450.0, mu, rho, cp, 0.13}}}};
  return {
      {"name", "single bearing friction test (invented)"},
      {"description", "built by tests/network/point/thermal_test.cpp"},
      {"thermal", true},
      {"fluids", {{"oil", fluid}}},
      {"loops",
       {{{"id", "oil"},
         {"fluid", "oil"},
         {"temperature", 323.15},
         {"nodes",
          {{{"id", "feed"}, {"elevation", 0.0},
            {"boundary", {{"kind", "pressure"}, {"pressure", p_feed}, {"temperature", 323.15}}}},
           {{"id", "housing"}, {"elevation", 0.0}, {"boundary", {{"kind", "pressure"}, {"pressure", 0.0}}}}}},
         {"components",
          {{{"id", "bearing"}, {"type", "journal_bearing"}, {"from", "feed"}, {"to", "housing"},
            {"diameter", d}, {"length", length}, {"radial_clearance", c}, {"eccentricity", eps},
            {"speed", std::to_string(rpm) + " rpm"}}}}}}}};
}

TEST_CASE("(f) bearing friction heat against Petroff's formula for the eccentric film") {
  const double mu = kSbMu, rho = kSbRho, cp = kSbCp;
  const double d = kSbD, length = kSbLength, c = kSbC, eps = kSbEps, rpm = kSbRpm, p_feed = kSbFeed;
  json doc = SingleBearingCase();
  auto cs = LoadText(doc.dump(2));
  REQUIRE(cs->thermal);
  CaseSolver s(*cs);
  REQUIRE_FALSE(cs->envelope.points.empty());
  PointResult r = s.Solve(cs->envelope.points.front(), false);
  REQUIRE(r.converged);
  REQUIRE(r.thermal);
  const BranchOutcome& b = Branch(*cs, r, "oil", "bearing");
  const double omega = rpm * 2.0 * M_PI / 60.0, rj = 0.5 * d;
  const double petroff = 2.0 * M_PI * mu * omega * omega * rj * rj * rj * length / c / std::sqrt(1.0 - eps * eps);
  // Side flow (Shigley Eq. 12-22, from memory): lands of L/2 each.
  const double q = M_PI * p_feed * rj * c * c * c * (1 + 1.5 * eps * eps) / (3.0 * mu * 0.5 * length);
  CHECK(b.flow_m3s == doctest::Approx(q).epsilon(1e-9));
  const double want = petroff + q * p_feed;
  const double heat = BranchReport(*cs, r, b).heat_W;
  MESSAGE("Petroff " << petroff << " W, dissipation " << q * p_feed << " W, reported " << heat << " W");
  CHECK(heat == doctest::Approx(want).epsilon(1e-9));
  // The oil leaves hotter by heat / (m cp) (cp constant); thermal.h's axial
  // conduction vanishes along a flowing branch, so the rise agrees to the
  // Newton tolerance (1e-12 of the heat over m cp): 1e-9 relative.
  const double dt_want = want / (rho * q * cp);
  CHECK(NodeT(*cs, r, "oil", "housing") - 323.15 == doctest::Approx(dt_want).epsilon(1e-9));
  CHECK(dt_want > 5.0);
}

}  // namespace
}  // namespace loopwright

// ---------------------------------------------------------------------------
// Energy balance (issue: temperatures that agree with the energy balance,
// work heat, a closure that can fail).

namespace loopwright {
namespace {

using nlohmann::json;

json HandBalanceLoop(bool work_heat);

bool DrainReceiver(const LoopSpec& loop, int node) {
  for (const auto& n : loop.nodes)
    if (n.cond().drains_to == node) return true;
  return false;
}

TEST_CASE("(g) an outlet temperature is the temperature of the node its component alone feeds, to 1e-9 K") {
  // Node balance (thermal.h) of a node fed by one branch, with no heat,
  // loss, drain or coupling of its own: m (h(T_in) - h(T_n)) + H = 0, i.e.
  // the branch's outlet temperature h^-1(h(T_in) + H/m). The node comes from
  // the Newton solve of all balances, the outlet from library/enthalpy.h's
  // inversion: two routes. Bearings: oil_temperature_rise = T_n - T_in and
  // the drain_temperature_max check reads the same T_n.
  const std::vector<std::string> paths = ThermalCasePaths();
  std::vector<std::unique_ptr<Case>> cases;
  for (const auto& path : paths) cases.push_back(Load(path));
  // A bearing that alone feeds its drain: the single bearing of (f) and the
  // hand-balance loop of (h), with and without work heat.
  cases.push_back(LoadText(SingleBearingCase().dump(2)));
  cases.push_back(LoadText(HandBalanceLoop(true).dump(2)));
  cases.push_back(LoadText(HandBalanceLoop(false).dump(2)));
  int compared = 0, bearings = 0, drain_checks = 0;
  double worst = 0;
  for (auto& cs : cases) {
    if (!cs->thermal) continue;
    CaseSolver solver(*cs);
    for (const auto& op : cs->envelope.points) {
      if (op.isothermal) continue;
      CAPTURE(cs->name);
      CAPTURE(op.name);
      PointResult r = solver.Solve(op, true);
      REQUIRE(r.converged);
      double m_max = 0;
      for (const auto& b : r.branches) m_max = std::max(m_max, std::abs(b.m));
      // Per node: branches delivering into it, and whether any touching branch is stopped.
      std::map<std::pair<int, int>, std::vector<const BranchOutcome*>> into;
      std::map<std::pair<int, int>, bool> stopped;
      for (const auto& b : r.branches) {
        const ComponentSpec& c = cs->loops[b.loop].components[b.comp];
        const bool slow = std::abs(b.m) < 1e-6 * m_max;
        stopped[{b.loop, c.from}] = stopped[{b.loop, c.from}] || slow;
        stopped[{b.loop, c.to}] = stopped[{b.loop, c.to}] || slow;
        if (!slow) into[{b.loop, b.m > 0 ? c.to : c.from}].push_back(&b);
      }
      for (const auto& n : r.nodes) {
        const LoopSpec& loop = cs->loops[n.loop];
        const NodeSpec& ns = loop.nodes[n.node];
        auto it = into.find({n.loop, n.node});
        if (it == into.end() || it->second.size() != 1 || stopped[{n.loop, n.node}]) continue;
        if (!std::isnan(ns.cond().temperature) || ns.cond().heat != 0 || ns.cond().heat_variable >= 0 || ns.cond().loss_conductance != 0 ||
            DrainReceiver(loop, n.node))
          continue;
        const BranchOutcome& b = *it->second.front();
        const ComponentSpec& c = loop.components[b.comp];
        double t_out = NAN, t_in = NAN, rise = NAN;
        for (const auto& item : BranchReport(*cs, r, b).items) {
          if (item.key == "outlet_temperature") t_out = item.value;
          if (item.key == "inlet_temperature") t_in = item.value;
          if (item.key == "oil_temperature_rise") rise = item.value;
        }
        CAPTURE(c.id);
        REQUIRE(std::isfinite(t_out));
        CHECK(std::abs(t_out - n.temperature_k) <= 1e-9);
        worst = std::max(worst, std::abs(t_out - n.temperature_k));
        ++compared;
        if (c.type_info->roles & kRoleBearing) {
          ++bearings;
          if (std::isfinite(rise)) CHECK(std::abs(rise - (n.temperature_k - t_in)) <= 1e-9);
          std::vector<CheckWarning> warnings;
          for (const auto& chk : EvaluateChecks(*cs, op, r, &warnings))
            if (chk.name() == "drain_temperature_max" && chk.where == loop.id + "/" + c.id) {
              CHECK(std::abs(chk.value - n.temperature_k) <= 1e-9);
              ++drain_checks;
            }
        }
      }
    }
  }
  MESSAGE("outlet vs node temperature: " << compared << " single-feeder nodes (" << bearings
                                          << " bearing drains), worst difference " << worst << " K");
  CHECK(compared >= 20);
  CHECK(bearings >= 3);
  CHECK(drain_checks == bearings);
}

// A closed loop of invented data: reservoir -> gear pump -> air cooler ->
// supply tube -> rolling bearing (a known 2 kW loss) -> reservoir.
json HandBalanceLoop(bool work_heat) {
  json fluid = {{"kind", "table"}, {"viscosity", "dynamic"},
                {"rows", {{250.0, 0.03, 870.0, 2000.0, 0.13}, {450.0, 0.03, 870.0, 2000.0, 0.13}}}};
  return {
      {"name", "hand energy balance loop (invented)"},
      {"description", "built by tests/network/point/thermal_test.cpp"},
      {"thermal", true},
      {"work_heat", work_heat},
      {"fluids", {{"oil", fluid}}},
      {"loops",
       {{{"id", "oil"},
         {"fluid", "oil"},
         {"temperature", "60 degC"},
         {"nodes",
          {{{"id", "reservoir"}, {"elevation", 0.0}, {"boundary", {{"kind", "reservoir"}, {"pressure", 0.0}, {"level", 0.2}}}},
           {{"id", "pump_out"}, {"elevation", 0.0}},
           {{"id", "cooler_out"}, {"elevation", 0.0}},
           {{"id", "feed"}, {"elevation", 0.5}}}},
         {"components",
          {{{"id", "pump"}, {"type", "displacement_pump"}, {"from", "reservoir"}, {"to", "pump_out"},
            {"displacement", "4 cm3/rev"}, {"speed", "1450 rpm"}, {"slip", 2e-13}, {"mechanical_efficiency", 0.85}},
           {{"id", "cooler"}, {"type", "air_cooler"}, {"from", "pump_out"}, {"to", "cooler_out"},
            {"rated_flow", "10 L/min"}, {"rated_dp", "0.4 bar"}, {"laminar_fraction", 0.7},
            {"rated_viscosity", "30 cSt"}, {"rated_density", "870 kg/m3"},
            {"conductance", "120 W/K"}, {"air_flow", "0.6 kg/s"}, {"air_inlet_temperature", "30 degC"}},
           {{"id", "supply"}, {"type", "tube"}, {"from", "cooler_out"}, {"to", "feed"}, {"length", "3 m"},
            {"diameter", "10 mm"}, {"roughness", "1.5 um"}},
           {{"id", "bearing"}, {"type", "rolling_bearing"}, {"from", "feed"}, {"to", "reservoir"},
            {"diameter", "1.2 mm"}, {"count", 2.0}, {"loss_power", "2 kW"}}}}}}}};
}

const BranchOutcome& BranchOf(const Case& cs, const PointResult& r, const std::string& comp) { return Branch(cs, r, "oil", comp); }

TEST_CASE("(h) work heat off: a hand energy balance holds exactly; on: the difference is sum Q dp + pump losses") {
  // Hand balance (first law, steady, closed loop, no loss to the room): the
  // cooler rejects what the bearing gives, 2000 W. With work heat on it
  // rejects 2000 W + sum over components of Q dp (piezometric drop; the
  // pump's is minus its hydraulic power) + the pump's shaft power
  // D n/(2 pi) dP / eta_m (gear pump, Merritt 1967 ch. 7, from memory),
  // recomputed here from the reported flows and drops and the pump's data.
  double duty[2], work_recomputed[2], work_reported[2];
  for (int on = 0; on < 2; ++on) {
    CAPTURE(on);
    auto cs = LoadText(HandBalanceLoop(on == 1).dump(2));
    REQUIRE(cs->work_heat == (on == 1));
    CaseSolver s(*cs);
    PointResult r = s.Solve(cs->envelope.points.front(), false);
    REQUIRE(r.converged);
    REQUIRE(r.thermal);
    const BranchOutcome& pump = BranchOf(*cs, r, "pump");
    const double dp_pump = -BranchState(*cs, r, pump).dp;  // pressure rise
    const double shaft = 4e-6 * 1450.0 / 60.0 * dp_pump / 0.85;
    double w = shaft;
    for (const auto& b : r.branches) w += b.flow_m3s * BranchState(*cs, r, b).dp;
    work_recomputed[on] = w;
    work_reported[on] = r.thermal_report.loop_work_heat[0];
    double d = NAN;
    for (const auto& it : BranchReport(*cs, r, BranchOf(*cs, r, "cooler")).items)
      if (it.key == "duty") d = it.value;
    duty[on] = d;
    CHECK(BranchReport(*cs, r, BranchOf(*cs, r, "bearing")).heat_W == doctest::Approx(on ? 2000.0 + BranchOf(*cs, r, "bearing").flow_m3s * BranchState(*cs, r, BranchOf(*cs, r, "bearing")).dp : 2000.0).epsilon(1e-12));
    CHECK(work_reported[on] == doctest::Approx(w).epsilon(1e-9));
    CHECK(w > 10.0);  // the work heat is real in this loop
  }
  MESSAGE("cooler duty: work heat off " << duty[0] << " W, on " << duty[1] << " W; work heat " << work_recomputed[1] << " W");
  CHECK(std::abs(duty[0] - 2000.0) <= 1e-9 * 2000.0);
  CHECK(std::abs(duty[1] - 2000.0 - work_recomputed[1]) <= 1e-9 * duty[1]);
}

TEST_CASE("(i) the energy closure reports an unbalanced state: m cp dT of a shifted drain temperature") {
  // Single bearing of (f): at the solved point the closure is rounding. With
  // the housing (where the oil leaves the loop) dT hotter than the balance
  // gives, the oil carries m cp dT more out than the bearing put in (cp
  // constant, table fluid), and the closure added - removed - carried must
  // report exactly -m cp dT. Evaluated through CaseSolver::Describe.
  auto cs = LoadText(SingleBearingCase().dump(2));
  CaseSolver s(*cs);
  const OperatingPoint& op = cs->envelope.points.front();
  PointResult r = s.Solve(op, false);
  REQUIRE(r.converged);
  CHECK(std::abs(r.thermal_report.loop_closure[0]) <= 1e-12);
  int housing = -1;
  for (size_t g = 0; g < r.nodes.size(); ++g)
    if (cs->loops[0].nodes[r.nodes[g].node].id == "housing") housing = static_cast<int>(g);
  REQUIRE(housing >= 0);
  std::vector<double> T = s.T;
  const double shift = 0.5;
  T[housing] += shift;
  PointResult off = s.Describe(op, s.u, T);
  const double want = -Branch(*cs, r, "oil", "bearing").m * kSbCp * shift;
  CAPTURE(want);
  CHECK(off.thermal_report.loop_closure_W[0] == doctest::Approx(want).epsilon(1e-9));
  CHECK(off.thermal_report.loop_closure[0] > 1e-3);
}

}  // namespace
}  // namespace loopwright
