// Envelope checks (network/envelope/checks.h): limits in force, the worst point of a
// sweep, the checks evaluated on solved points of small invented cases
// (tests/network/check_cases/*.json, all data invented), the verdicts the
// shipped demo cases state in their descriptions, and warm-started sweeps
// giving the cold-start answers to solver tolerance.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <fstream>
#include <map>
#include <sstream>
#include <tuple>
#include <string>
#include <vector>

#include "network/case/case.h"
#include "network/case/check_table.h"
#include "network/envelope/checks.h"
#include "network/point/run.h"
#include "tests/tools/check_sweep.h"
#include "tests/tools/source_dir.h"

using loopwright::testing::SolveAndCheck;
using loopwright::testing::SourceDir;
using loopwright::testing::Sweep;

namespace loopwright {
namespace {

constexpr double kPsi = 6894.757293168;  // Pa per psi, NIST SP 811 B.8


std::unique_ptr<Case> Load(const std::string& path) {
  LoadResult lr = LoadCaseFile(path, SourceDir() + "/library");
  INFO(lr.diagnostics.Format(path));
  REQUIRE(lr.value != nullptr);
  return std::move(lr.value);
}

std::unique_ptr<Case> LoadTestCase(const std::string& name) {
  return Load(SourceDir() + "/tests/network/check_cases/" + name);
}

// A test case loaded with its "checks" section replaced by `checks` (when not
// null) and, when given, an ambient pressure: limits are read at load.
std::unique_ptr<Case> LoadTestCaseWith(const std::string& name, const nlohmann::json& checks,
                                       const char* ambient = nullptr) {
  const std::string path = SourceDir() + "/tests/network/check_cases/" + name;
  nlohmann::json doc;
  Diagnostics d;
  REQUIRE(ParseJsonText(loopwright::testing::ReadText(path), &doc, &d));
  if (!checks.is_null()) doc["checks"] = checks;
  if (ambient) doc["ambient_pressure"] = ambient;
  LoadResult lr = LoadCaseText(doc.dump(), path, SourceDir() + "/library");
  INFO(lr.diagnostics.Format(path));
  REQUIRE(lr.value != nullptr);
  return std::move(lr.value);
}

double NodePressure(const Case& cs, const PointResult& r, const std::string& loop, const std::string& node) {
  for (const auto& n : r.nodes)
    if (cs.loops[n.loop].id == loop && cs.loops[n.loop].nodes[n.node].id == node) return n.pressure_pa;
  FAIL("no node " << loop << "/" << node);
  return 0;
}

TEST_CASE("limits in force: defaults from check_table.cpp, overrides from the case") {
  auto cs = LoadTestCase("feed_margin.json");
  // Common practice (network/case/check_table.cpp): 10 psi feed margin.
  CHECK(CheckLimitValue(*cs, "feed_pressure_margin") == doctest::Approx(10.0 * kPsi).epsilon(1e-12));
  // Common practice: 1000 cSt start viscosity; pump inlet at least 0.7 bar
  // absolute, i.e. 0.7 bar - 1.01325 bar = -0.31325 bar gauge at sea level
  // (standard atmosphere 101325 Pa, ISO 2533) ...
  CHECK(CheckLimitValue(*cs, "start_viscosity_max") == doctest::Approx(1000e-6).epsilon(1e-12));
  REQUIRE(cs->ambient_pa == 101325.0);
  CHECK(CheckLimitValue(*cs, "pump_inlet_pressure_min") == doctest::Approx(-0.31325e5).epsilon(1e-12));
  // ... and -0.0950 bar gauge at 2000 m, where the standard atmosphere is
  // 79.50 kPa (ISO 2533:1975 table, from memory): the limit is absolute.
  // (The limits are read at load: the case is loaded again at that ambient.)
  auto high = LoadTestCaseWith("feed_margin.json", nlohmann::json(), "79.50 kPa");
  REQUIRE(high->ambient_pa == doctest::Approx(79.50e3).epsilon(1e-12));
  CHECK(CheckLimitValue(*high, "pump_inlet_pressure_min") == doctest::Approx(0.7e5 - 79.50e3).epsilon(1e-12));
  cs = LoadTestCaseWith("feed_margin.json", nlohmann::json{{"pump_inlet_pressure_min", "0.5 bar abs"}});
  CHECK(CheckLimitValue(*cs, "pump_inlet_pressure_min") == doctest::Approx(0.5e5 - 101325.0).epsilon(1e-12));
  CHECK(std::isnan(CheckLimitValue(*cs, "no_such_check")));
  CHECK(std::isnan(CheckLimitValue(*cs, "jacket_flow_min")));  // no default: set by the case
  cs = LoadTestCaseWith("feed_margin.json", nlohmann::json{{"feed_pressure_margin", "5 psi"}, {"velocity_suction_max", 0.5}});
  CHECK(CheckLimitValue(*cs, "feed_pressure_margin") == doctest::Approx(5.0 * kPsi).epsilon(1e-12));
  CHECK(CheckLimitValue(*cs, "velocity_suction_max") == 0.5);  // a bare number is SI
}

TEST_CASE("SummariseChecks: the worst margin of each (check, place), its point and the count") {
  const auto o = [](const std::string& name, const std::string& where, double margin) {
    CheckOutcome c;
    c.id = FindCheck(name)->id;  // an outcome names its check by its row
    c.where = where;
    c.value = margin + 1;
    c.limit = 1;
    c.margin = margin;
    c.pass = margin >= 0;
    return c;
  };
  std::vector<std::vector<CheckOutcome>> per_point = {
      {o("feed_pressure_margin", "oil/a", 3.0), o("feed_pressure_margin", "oil/b", 2.0)},
      {o("feed_pressure_margin", "oil/a", -1.0), o("feed_pressure_margin", "oil/b", 5.0)},
      {o("feed_pressure_margin", "oil/a", 0.5), o("bearing_flow_min", "oil/a", 1.0)},
  };
  std::vector<CheckSummary> s = SummariseChecks(per_point, {"p0", "p1", "p2"});
  REQUIRE(s.size() == 3);
  std::map<std::string, const CheckSummary*> by;
  for (const auto& x : s) by[std::string(x.worst.name()) + "@" + x.worst.where] = &x;
  REQUIRE(by.count("feed_pressure_margin@oil/a"));
  REQUIRE(by.count("feed_pressure_margin@oil/b"));
  REQUIRE(by.count("bearing_flow_min@oil/a"));
  CHECK(by["feed_pressure_margin@oil/a"]->point == "p1");
  CHECK(by["feed_pressure_margin@oil/a"]->worst.margin == -1.0);
  CHECK(!by["feed_pressure_margin@oil/a"]->worst.pass);
  CHECK(by["feed_pressure_margin@oil/a"]->points == 3);
  CHECK(by["feed_pressure_margin@oil/b"]->point == "p0");
  CHECK(by["feed_pressure_margin@oil/b"]->points == 2);
  CHECK(by["bearing_flow_min@oil/a"]->point == "p2");
  CHECK(by["bearing_flow_min@oil/a"]->points == 1);
}

TEST_CASE("feed_pressure_margin = p(delivery) - p(housing) - 10 psi, failing only at 30 psig boost") {
  // Invented case: delivery a little under 40 psig at 30 psig boost; common
  // practice rule (check_table.cpp): delivery >= boost + 10 psi.
  auto cs = LoadTestCase("feed_margin.json");
  Sweep s = SolveAndCheck(*cs);
  REQUIRE(s.names == std::vector<std::string>{"boost_0", "boost_15", "boost_30"});
  const double boost[] = {0.0, 15.0 * kPsi, 30.0 * kPsi};
  for (size_t i = 0; i < s.names.size(); ++i) {
    CAPTURE(s.names[i]);
    const double delivery = NodePressure(*cs, s.results[i], "oil", "delivery");
    const double housing = NodePressure(*cs, s.results[i], "oil", "housing");
    CHECK(housing == doctest::Approx(boost[i]).epsilon(1e-9).scale(kPsi));
    int feed = 0;
    for (const auto& c : s.per_point[i]) {
      CAPTURE(c.name());
      if (c.name() != "feed_pressure_margin") {
        CHECK(c.pass);
        continue;
      }
      ++feed;
      CHECK(c.where == "oil/bearing");
      CHECK(c.limit == doctest::Approx(10.0 * kPsi).epsilon(1e-12));
      CHECK(c.margin == doctest::Approx(delivery - housing - 10.0 * kPsi).epsilon(1e-9).scale(kPsi));
      CHECK(c.pass == (i != 2));
    }
    CHECK(feed == 1);
  }
  // Sized "a little under 40 psig" at 30 psig boost.
  const double d30 = NodePressure(*cs, s.results[2], "oil", "delivery");
  CHECK(d30 < 40.0 * kPsi);
  CHECK(d30 > 38.0 * kPsi);
  std::vector<CheckSummary> sum = SummariseChecks(s.per_point, s.names);
  int failing = 0;
  for (const auto& x : sum) {
    if (x.worst.pass) continue;
    ++failing;
    CHECK(x.worst.name() == "feed_pressure_margin");
    CHECK(x.point == "boost_30");
  }
  CHECK(failing == 1);
  // A bearing's own feed_margin (read at load) overrides the case limit.
  nlohmann::json doc;
  Diagnostics d;
  const std::string path = SourceDir() + "/tests/network/check_cases/feed_margin.json";
  REQUIRE(ParseJsonText(loopwright::testing::ReadText(path), &doc, &d));
  for (auto& c : doc["loops"][0]["components"])
    if (c["id"] == "bearing") c["feed_margin"] = "5 psi";
  LoadResult lr = LoadCaseText(doc.dump(), path, SourceDir() + "/library");
  REQUIRE(lr.value != nullptr);
  Sweep s5 = SolveAndCheck(*lr.value);
  for (const auto& pp : s5.per_point)
    for (const auto& c : pp) {
      CHECK(c.pass);
      if (c.id == CheckId::kFeedPressureMargin) CHECK(LimitSourceId(*lr.value, c) == "oil/bearing");
    }
}

TEST_CASE("filter bypass: a warning at the isothermal cold start, a failing check at a running point") {
  auto cs = LoadTestCase("filter_bypass.json");
  Sweep s = SolveAndCheck(*cs);
  REQUIRE(s.names == std::vector<std::string>{"cold_start", "cold_running", "running"});
  for (const auto& c : s.per_point[0]) {
    CAPTURE(c.name());
    CHECK(c.name() != "filter_bypass_closed");  // not evaluated at the cold start
    CHECK(c.pass);
  }
  REQUIRE(s.warnings.size() == 1);
  CHECK(s.warnings[0].where == "oil/filter");
  CHECK(s.warnings[0].text.find("cold_start") != std::string::npos);
  // The bypass fraction reported by the filter model at cold_running.
  double frac = NAN;
  for (const auto& b : s.results[1].branches)
    if (cs->loops[b.loop].components[b.comp].id == "filter")
      for (const auto& it : BranchReport(*cs, s.results[1], b).items)
        if (it.key == "bypass_fraction") frac = it.value;
  REQUIRE(frac > 1e-3);
  int bypass_checks = 0;
  for (size_t i = 1; i < 3; ++i)
    for (const auto& c : s.per_point[i]) {
      CAPTURE(s.names[i]);
      CAPTURE(c.name());
      if (c.name() != "filter_bypass_closed") {
        CHECK(c.pass);
        continue;
      }
      ++bypass_checks;
      CHECK(c.pass == (i == 2));
      // The element drop against the bypass crack of the case file (1 bar).
      CHECK(c.limit == doctest::Approx(1e5).epsilon(1e-12));
      CHECK(c.margin == doctest::Approx(c.limit - c.value).epsilon(1e-12));
      CHECK((c.value > 1e5) == (i == 1));
    }
  CHECK(bypass_checks == 2);
}

TEST_CASE("shipped demo cases: the verdicts their descriptions state") {
  {
    auto cs = Load(SourceDir() + "/cases/apu_test_cell.json");
    Sweep s = SolveAndCheck(*cs);
    size_t n = 0;
    for (size_t i = 0; i < s.per_point.size(); ++i)
      for (const auto& c : s.per_point[i]) {
        CAPTURE(s.names[i]);
        CAPTURE(c.name());
        CAPTURE(c.where);
        CHECK(c.pass);
        ++n;
      }
    CHECK(n > 0);
  }
  {
    // "the three journal bearings get far less than their minimum flow: the
    // expected verdict is FAIL, governed by the cold start".
    auto cs = Load(SourceDir() + "/cases/gearbox_lube_skid.json");
    Sweep s = SolveAndCheck(*cs);
    std::vector<CheckSummary> sum = SummariseChecks(s.per_point, s.names);
    int failing = 0;
    for (const auto& x : sum) {
      if (x.worst.pass) continue;
      ++failing;
      CAPTURE(x.worst.where);
      CHECK(x.worst.name() == "bearing_flow_min");
      CHECK(x.point == "cold_start");
    }
    CHECK(failing >= 1);
  }
}

// Warm-started sweeps give the cold-start answers: node pressures to 1e-6 Pa
// + 1e-10 relative, branch flows to 1e-10 of the largest (the solver stops at
// flow residuals <= 1e-11 of it, README "Solving"), temperatures to 1e-7 K
// (the thermal passes stop at 1e-9 K).
void CompareSameAnswer(const PointResult& a, const PointResult& b) {
  REQUIRE(a.nodes.size() == b.nodes.size());
  REQUIRE(a.branches.size() == b.branches.size());
  for (size_t k = 0; k < a.nodes.size(); ++k) {
    CAPTURE(k);
    CHECK(std::fabs(a.nodes[k].pressure_pa - b.nodes[k].pressure_pa) <= 1e-6 + 1e-10 * std::fabs(a.nodes[k].pressure_pa));
    CHECK(std::fabs(a.nodes[k].temperature_k - b.nodes[k].temperature_k) <= 1e-7);
  }
  double qmax = 0;
  for (const auto& br : a.branches) qmax = std::max(qmax, std::fabs(br.flow_m3s));
  for (size_t k = 0; k < a.branches.size(); ++k) {
    CAPTURE(k);
    CHECK(std::fabs(a.branches[k].flow_m3s - b.branches[k].flow_m3s) <= 1e-10 * qmax);
  }
}

TEST_CASE("demo case: warm-started sweeps, forward and reverse, give the cold-start answers") {
  auto cs = Load(SourceDir() + "/cases/apu_test_cell.json");
  const auto& pts = cs->envelope.points;
  REQUIRE(pts.size() >= 2);
  std::vector<PointResult> cold;
  {
    CaseSolver solver(*cs);
    for (const auto& op : pts) {
      cold.push_back(solver.Solve(op, false));
      CAPTURE(op.name);
      REQUIRE(cold.back().converged);
    }
  }
  for (bool reverse : {false, true}) {
    CAPTURE(reverse);
    CaseSolver solver(*cs);
    for (size_t j = 0; j < pts.size(); ++j) {
      const size_t i = reverse ? pts.size() - 1 - j : j;
      CAPTURE(pts[i].name);
      PointResult warm = solver.Solve(pts[i], true);
      INFO(warm.summary.Report());
      REQUIRE(warm.converged);
      CompareSameAnswer(cold[i], warm);
    }
  }
}

}  // namespace
}  // namespace loopwright

namespace loopwright {

TEST_CASE("derived hot corner: the highest declared value, or the lowest for a variable declared severe low") {
  std::string text;
  {
    std::ifstream in(SourceDir() + "/cases/apu_test_cell.json");
    std::stringstream ss;
    ss << in.rdbuf();
    text = ss.str();
  }
  auto fan_at_corner = [&](const std::string& t) {
    LoadResult lr = LoadCaseText(t, SourceDir() + "/cases/apu_test_cell.json", SourceDir() + "/library");
    INFO(lr.diagnostics.Format("apu_test_cell.json"));
    REQUIRE(lr.value != nullptr);
    const Case& cs = *lr.value;
    int fan = -1;
    for (size_t i = 0; i < cs.envelope.variables.size(); ++i)
      if (cs.envelope.variables[i].name == "fan") fan = static_cast<int>(i);
    REQUIRE(fan >= 0);
    const int hc = FindPoint(cs, "hot_corner");
    REQUIRE(hc >= 0);
    // The declared running points hold fan values 1 (default) and 0 (fan_stopped).
    double lo = INFINITY, hi = -INFINITY;
    for (const auto& p : cs.envelope.points)
      if (!p.isothermal && p.name != "hot_corner") {
        lo = std::min(lo, p.values[fan]);
        hi = std::max(hi, p.values[fan]);
      }
    REQUIRE(lo < hi);
    return std::make_tuple(cs.envelope.points[hc].values[fan], lo, hi);
  };
  const std::string key = "\"fan\": {\"dimension\": \"dimensionless\", \"default\": 1.0}";
  REQUIRE(text.find(key) != std::string::npos);
  auto [high_side, lo1, hi1] = fan_at_corner(text);
  CHECK(high_side == hi1);
  std::string low = text;
  low.replace(low.find(key), key.size(), "\"fan\": {\"dimension\": \"dimensionless\", \"default\": 1.0, \"severe\": \"low\"}");
  auto [low_side, lo2, hi2] = fan_at_corner(low);
  CHECK(low_side == lo2);
  (void)hi2;
  (void)lo1;
  // A misspelt side is an error at its pointer, with a suggestion.
  std::string bad = text;
  bad.replace(bad.find(key), key.size(), "\"fan\": {\"dimension\": \"dimensionless\", \"default\": 1.0, \"severe\": \"lwo\"}");
  LoadResult lr = LoadCaseText(bad, "bad.json", SourceDir() + "/library");
  CHECK(lr.value == nullptr);
  const std::string msg = lr.diagnostics.Format("bad.json");
  CHECK(msg.find("/envelope/variables/fan/severe") != std::string::npos);
  CHECK(msg.find("did you mean \"low\"") != std::string::npos);
}

}  // namespace loopwright

namespace loopwright {

// An oil grade swept over the envelope: "kv40"/"kv100" bound to variables.
// At an isothermal point at 40 degC the loop's kinematic viscosity is the
// point's KV40 itself (ASTM D341 anchors the Walther line there), and at
// 100 degC its KV100. Invented test loop: a metering pump and a laminar line.
TEST_CASE("oil grade as envelope variables: KV40/KV100 follow the point") {
  const std::string text = R"J({
    "name": "oil grade sweep (invented)",
    "fluids": {"oil": {"kind": "oil", "kv40": "$kv40", "kv100": "$kv100"}},
    "envelope": {
      "variables": {"kv40": {"dimension": "kinematic_viscosity", "default": "32 cSt"},
                    "kv100": {"dimension": "kinematic_viscosity", "default": "5.4 cSt"},
                    "t": {"dimension": "temperature", "default": "40 degC"}},
      "points": [{"name": "vg32_40C", "isothermal": true, "values": {}},
                 {"name": "vg46_40C", "isothermal": true, "values": {"kv40": "46 cSt", "kv100": "6.8 cSt"}},
                 {"name": "vg46_100C", "isothermal": true, "values": {"kv40": "46 cSt", "kv100": "6.8 cSt", "t": "100 degC"}},
                 {"name": "vg32_again", "isothermal": true, "values": {}}]},
    "loops": [{"id": "l", "fluid": "oil", "temperature": "$t",
               "nodes": [{"id": "sump", "boundary": {"kind": "reservoir", "pressure": "0 bar"}}, {"id": "feed"}],
               "components": [{"id": "pump", "type": "fixed_flow", "from": "sump", "to": "feed", "flow": "2 L/min"},
                              {"id": "line", "type": "pipe", "from": "feed", "to": "sump", "length": "3 m", "diameter": "8 mm"}]}]})J";
  LoadResult lr = LoadCaseText(text, "grade.json", SourceDir() + "/library");
  INFO(lr.diagnostics.Format("grade.json"));
  REQUIRE(lr.value != nullptr);
  const Case& cs = *lr.value;
  REQUIRE(cs.fluid_bindings.size() == 1);
  CaseSolver solver(cs);
  const double cst = 1e-6;
  const std::vector<double> want = {32 * cst, 46 * cst, 6.8 * cst, 32 * cst};
  for (size_t i = 0; i < cs.envelope.points.size(); ++i) {
    const OperatingPoint& op = cs.envelope.points[i];
    PointResult r = solver.Solve(op, true);
    REQUIRE(r.converged);
    CAPTURE(op.name);
    const BranchResult b = BranchState(cs, r, 1);
    CHECK(b.mu / b.rho == doctest::Approx(want[i]).epsilon(1e-9));
  }
  // A point where the grade is not an oil (KV100 above KV40) is refused at
  // load, naming the point.
  auto swap = [](std::string t, const std::string& from, const std::string& to) {
    const size_t at = t.find(from);
    REQUIRE(at != std::string::npos);
    return t.replace(at, from.size(), to);
  };
  const std::string bad = swap(text, R"("kv40": "46 cSt", "kv100": "6.8 cSt"})", R"("kv40": "4 cSt", "kv100": "6.8 cSt"})");
  LoadResult lb = LoadCaseText(bad, "bad.json", SourceDir() + "/library");
  CHECK(lb.value == nullptr);
  const std::string msg = lb.diagnostics.Format("bad.json");
  INFO(msg);
  CHECK(msg.find("error[bad-fluid] bad.json /fluids/oil/kv40: at envelope point \"vg46_40C\"") != std::string::npos);
  // An ISO VG grade cannot be bound: its KV40 is the grade's.
  const std::string vg = swap(text, R"("kv40": "$kv40", )", R"("iso_vg": 32, )");
  LoadResult lv = LoadCaseText(vg, "vg.json", SourceDir() + "/library");
  CHECK(lv.value == nullptr);
  CHECK(lv.diagnostics.Format("vg.json").find("error[not-bindable] vg.json /fluids/oil/kv100") != std::string::npos);
}

}  // namespace loopwright

namespace loopwright {
namespace {

// bearing_flow_min from a rolling bearing's own oil demand (issue 14, item 4):
// the feed_margin case's jet-fed bearing given a speed, pitch diameter and
// Palmgren's f0 (invented data) is judged against its heat-balance demand,
// limit from the component; a flow_min written in the case overrides it.
TEST_CASE("bearing_flow_min: a rolling bearing's oil demand when the case gives no flow_min") {
  const std::string path = SourceDir() + "/tests/network/check_cases/feed_margin.json";
  auto load = [&](const char* flow_min) {
    nlohmann::json doc;
    Diagnostics d;
    REQUIRE(ParseJsonText(loopwright::testing::ReadText(path), &doc, &d));
    for (auto& c : doc["loops"][0]["components"])
      if (c["id"] == "bearing") {
        c["speed"] = "6000 rpm", c["pitch_diameter"] = "60 mm", c["palmgren_f0"] = 4, c["allowed_rise"] = "10 K";
        if (flow_min) c["flow_min"] = flow_min;
      }
    LoadResult lr = LoadCaseText(doc.dump(), path, SourceDir() + "/library");
    INFO(lr.diagnostics.Format(path));
    REQUIRE(lr.value != nullptr);
    return std::move(lr.value);
  };
  auto cs = load(nullptr);
  Sweep s = SolveAndCheck(*cs);
  for (size_t i = 0; i < s.names.size(); ++i) {
    CAPTURE(s.names[i]);
    const BranchOutcome* b = nullptr;
    for (const auto& o : s.results[i].branches)
      if (cs->loops[o.loop].components[o.comp].id == "bearing") b = &o;
    REQUIRE(b);
    // Palmgren (1959, from memory) at the stream's viscosity: nu n >= 2000, so
    // M = 1e-7 x 4 x (nu_cSt x 6000)^(2/3) x 60^3 N mm; Q = M omega / (rho cp 10 K),
    // cp of the oil at the loop's 50 degC from the library's fluid.
    const double nu_cst = BranchState(*cs, s.results[i], *b).mu / BranchState(*cs, s.results[i], *b).rho * 1e6;
    const double m_nm = 1e-3 * 1e-7 * 4 * std::pow(nu_cst * 6000, 2.0 / 3.0) * 216000;
    const double cp = cs->loops[0].fluid->Evaluate(323.15, cs->ambient_pa + std::max(0.0, BranchState(*cs, s.results[i], *b).p_from)).cp;
    const double demand = m_nm * 6000 * 2 * M_PI / 60 / (BranchState(*cs, s.results[i], *b).rho * cp * 10.0);
    int n = 0;
    for (const auto& c : s.per_point[i]) {
      if (c.id != CheckId::kBearingFlowMin) continue;
      ++n;
      CHECK(c.limit == doctest::Approx(demand).epsilon(1e-9).scale(0));
      CHECK(c.source == LimitSource::kComponent);
      CHECK(LimitSourceId(*cs, c) == "oil/bearing");
    }
    CHECK(n == 1);
  }
  // Written, the case's flow_min (0.01 L/min) is the limit.
  auto written = load("0.01 L/min");
  Sweep w = SolveAndCheck(*written);
  for (const auto& pp : w.per_point)
    for (const auto& c : pp)
      if (c.id == CheckId::kBearingFlowMin) CHECK(c.limit == doctest::Approx(0.01 / 60000).epsilon(1e-12).scale(0));
}

}  // namespace
}  // namespace loopwright
