// Robustness of the network solve: bad starting guesses, warm starts, and
// networks with no physical answer.
//
//   * From deliberately bad starting guesses (all zeros; pressures of
//     +-1000 bar; seeded random pressures, flows and internals; the answer
//     with every flow of the wrong sign) the solver converges to the same
//     answer as the cold start (the linearised guess), within a bound set by
//     the solver's tolerances, on the demo case and on the invented branched
//     case tests/network/branched_case.json, at every envelope point.
//   * A warm start from a neighbouring point gives the cold start's answer.
//   * Impossible networks (a zero-slip displacement pump dead-headed against
//     a closed valve with no relief path; a pump feeding a node with no
//     outlet) give summary.converged() == false with a diagnosis naming the
//     node or components; `loopwright solve` on such a case exits 3 and
//     prints no results table.
// The answer comparison: pressures within 1e-4 Pa + 1e-9 |p|, flows within
// 1e-9 of the largest flow, internal unknowns (Pa) as pressures — far
// tighter than any engineering use, looser than the convergence tests
// (1e-6 Pa on pressure laws, 1e-11 of the largest flow on flow laws) allow
// solutions to differ by on these well-conditioned networks.
#include <doctest/doctest.h>

#include <sys/wait.h>

#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <memory>
#include <random>
#include <sstream>
#include <string>
#include <vector>

#include <Eigen/Core>
#include <nlohmann/json.hpp>

#include "network/case/case.h"
#include "network/point/run.h"
#include "network/point/solver.h"
#include "network/point/system.h"
#include "tests/tools/run_command.h"
#include "tests/tools/source_dir.h"

using loopwright::testing::SourceDir;

namespace loopwright {
namespace {


struct Net {
  std::unique_ptr<Case> cs;
  std::unique_ptr<NetworkSystem> sys;
  std::unique_ptr<NetworkSolver> solver;
};

// The system and solver of a loaded case (`where` names it in a failure).
Net FromLoad(LoadResult lr, const std::string& where) {
  INFO(lr.diagnostics.Format(where));
  REQUIRE(lr.value != nullptr);
  Net n;
  n.cs = std::move(lr.value);
  n.sys = std::make_unique<NetworkSystem>(*n.cs);
  n.solver = std::make_unique<NetworkSolver>(n.sys.get());
  return n;
}

Net LoadNet(const std::string& path) { return FromLoad(LoadCaseFile(path, SourceDir() + "/library"), path); }

Net LoadText(const std::string& text) {
  return FromLoad(LoadCaseText(text, "impossible_case.json", SourceDir() + "/library"), "impossible_case.json");
}

enum class Role { kPressure, kFlow, kInternal };

std::vector<Role> Roles(const NetworkSystem& sys) {
  std::vector<Role> r(sys.NumUnknowns(), Role::kPressure);
  for (const Branch& b : sys.branches()) {
    r[b.m] = Role::kFlow;
    for (int i = 0; i < b.nint; ++i) r[b.x0() + i] = Role::kInternal;
  }
  return r;
}

// Largest violation of the answer comparison (<= 1 passes), with its place.
double Distance(const NetworkSystem& sys, const Eigen::VectorXd& a, const Eigen::VectorXd& ref, std::string* where) {
  const auto roles = Roles(sys);
  double mmax = 0;
  for (int i = 0; i < ref.size(); ++i)
    if (roles[i] == Role::kFlow) mmax = std::max(mmax, std::fabs(ref[i]));
  double worst = 0;
  for (int i = 0; i < ref.size(); ++i) {
    const double tol = roles[i] == Role::kFlow ? 1e-9 * mmax : 1e-4 + 1e-9 * std::fabs(ref[i]);
    const double z = std::fabs(a[i] - ref[i]) / tol;
    if (!(z <= worst)) {
      worst = std::isfinite(z) ? z : INFINITY;
      *where = sys.UnknownName(i);
    }
  }
  return worst;
}

// The bad starting guesses, each named.
std::vector<std::pair<std::string, Eigen::VectorXd>> BadGuesses(const NetworkSystem& sys, const Eigen::VectorXd& ans) {
  const auto roles = Roles(sys);
  const int n = sys.NumUnknowns();
  std::vector<std::pair<std::string, Eigen::VectorXd>> g;
  g.emplace_back("all zeros", Eigen::VectorXd::Zero(n));
  Eigen::VectorXd huge = Eigen::VectorXd::Zero(n);
  for (int i = 0; i < n; ++i)
    if (roles[i] == Role::kPressure) huge[i] = 1e8;  // 1000 bar everywhere
  g.emplace_back("pressures +1000 bar", huge);
  Eigen::VectorXd alt = Eigen::VectorXd::Zero(n);
  for (int i = 0, k = 0; i < n; ++i)
    if (roles[i] == Role::kPressure) alt[i] = (k++ % 2 ? -1e8 : 1e8);
  g.emplace_back("pressures alternating +-1000 bar", alt);
  std::mt19937 rng(12345);
  for (int trial = 0; trial < 3; ++trial) {
    Eigen::VectorXd r(n);
    std::uniform_real_distribution<double> p(-20e5, 20e5), m(-1.0, 1.0), x(-5e5, 5e5);
    for (int i = 0; i < n; ++i)
      r[i] = roles[i] == Role::kPressure ? p(rng) : roles[i] == Role::kFlow ? m(rng) : x(rng);
    g.emplace_back("random #" + std::to_string(trial + 1), r);
  }
  Eigen::VectorXd wrong = ans;
  for (int i = 0; i < n; ++i)
    if (roles[i] == Role::kFlow) wrong[i] = -ans[i];
  g.emplace_back("answer with every flow of the wrong sign", wrong);
  Eigen::VectorXd wrong_only = Eigen::VectorXd::Zero(n);
  for (int i = 0; i < n; ++i)
    if (roles[i] == Role::kFlow) wrong_only[i] = -ans[i];
  g.emplace_back("zero pressures, flows of the wrong sign", wrong_only);
  return g;
}

void CheckBadGuesses(const std::string& path) {
  Net net = LoadNet(path);
  double worst_all = 0;
  for (const OperatingPoint& op : net.cs->envelope.points) {
    CAPTURE(path);
    CAPTURE(op.name);
    Eigen::VectorXd ref;
    PointResult cold = SolvePoint(*net.cs, op, net.sys.get(), net.solver.get(), &ref, false);
    INFO(cold.summary.Report());
    REQUIRE(cold.converged);
    for (auto& [name, guess] : BadGuesses(*net.sys, ref)) {
      CAPTURE(name);
      ApplyPoint(*net.cs, op, net.sys.get());
      Eigen::VectorXd u = guess;
      NetworkSolver solver(net.sys.get());
      SolverSummary s = solver.Solve(&u);
      INFO(s.Report());
      CHECK(s.converged());
      if (!s.converged()) continue;
      std::string where;
      const double d = Distance(*net.sys, u, ref, &where);
      INFO("largest difference from the cold start: " << d << " x tolerance, at " << where);
      CHECK(d <= 1.0);
      worst_all = std::max(worst_all, d);
    }
  }
  MESSAGE(path << ": from every bad guess, worst distance to the cold-start answer " << worst_all
               << " x tolerance");
}

TEST_CASE("bad starting guesses converge to the cold-start answer: demo case") {
  CheckBadGuesses(SourceDir() + "/cases/apu_test_cell.json");
}

TEST_CASE("bad starting guesses converge to the cold-start answer: invented branched case") {
  CheckBadGuesses(SourceDir() + "/tests/network/branched_case.json");
}

TEST_CASE("a warm start from a neighbouring point equals a cold start") {
  for (const std::string rel : {"/cases/apu_test_cell.json", "/tests/network/branched_case.json"}) {
    Net net = LoadNet(SourceDir() + rel);
    const auto& pts = net.cs->envelope.points;
    const int tvar = net.cs->envelope.VariableIndex("oil_temperature");
    REQUIRE(tvar >= 0);
    for (size_t i = 0; i < pts.size(); ++i) {
      // Neighbours: the same point 2 K warmer, and the next envelope point.
      OperatingPoint near = pts[i];
      near.name += "_plus_2K";
      near.values[tvar] += 2.0;
      std::vector<OperatingPoint> targets = {near};
      if (i + 1 < pts.size()) targets.push_back(pts[i + 1]);
      for (const OperatingPoint& target : targets) {
        CAPTURE(rel);
        CAPTURE(pts[i].name);
        CAPTURE(target.name);
        Eigen::VectorXd u;
        PointResult from = SolvePoint(*net.cs, pts[i], net.sys.get(), net.solver.get(), &u, false);
        REQUIRE(from.converged);
        PointResult warm = SolvePoint(*net.cs, target, net.sys.get(), net.solver.get(), &u, true);
        INFO(warm.summary.Report());
        REQUIRE(warm.converged);
        Eigen::VectorXd cold_u;
        PointResult cold = SolvePoint(*net.cs, target, net.sys.get(), net.solver.get(), &cold_u, false);
        REQUIRE(cold.converged);
        std::string where;
        const double d = Distance(*net.sys, u, cold_u, &where);
        INFO("warm vs cold: " << d << " x tolerance at " << where);
        CHECK(d <= 1.0);
      }
    }
  }
}

// --------------------------------------------------- impossible networks

// Invented: a gear pump from a sump into node `to`, followed by `more`
// components; `name` says what makes the network impossible.
std::string GearPumpCase(const std::string& name, const std::string& to, const nlohmann::json& more) {
  nlohmann::json components = nlohmann::json::array();
  components.push_back({{"id", "gear_pump"}, {"type", "displacement_pump"}, {"from", "sump"}, {"to", to},
                        {"displacement", "8 cm3/rev"}, {"speed", "1450 rpm"}});
  for (const auto& c : more) components.push_back(c);
  nlohmann::json doc = {
      {"name", name},
      {"fluids", {{"oil", {{"kind", "oil"}, {"kv40", "32 cSt"}, {"kv100", "5.4 cSt"}}}}},
      {"loops",
       {{{"id", "oil"},
         {"fluid", "oil"},
         {"nodes",
          {{{"id", "sump"}, {"boundary", {{"kind", "reservoir"}, {"pressure", "0 bar"}, {"level", "0.2 m"}}}},
           {{"id", to}}}},
         {"components", components}}}}};
  return doc.dump(2);
}

std::string DeadHeadCase() {
  // A gear pump without slip or relief pumping into a closed valve whose
  // seat is perfectly tight (leakage 0): no flow can leave "out".
  nlohmann::json valve = {{"id", "shut_valve"}, {"type", "valve"}, {"from", "out"}, {"to", "sump"}, {"kvs", 1.0},
                          {"opening", 0.0}, {"leakage", 0.0}};
  return GearPumpCase("dead-headed pump (invented, impossible)", "out", nlohmann::json::array({valve}));
}

std::string NoOutletCase() {
  // A gear pump feeding a node that nothing drains.
  return GearPumpCase("pump into a node with no outlet (invented, impossible)", "blind_end",
                      nlohmann::json::array());
}

TEST_CASE("impossible networks are reported as not converged, with a diagnosis that names the place") {
  struct Impossible {
    std::string label, text;
    std::vector<std::string> names;  // at least one must appear in the report
  };
  for (const Impossible& c : {Impossible{"dead-headed pump", DeadHeadCase(), {"out", "gear_pump", "shut_valve"}},
                              Impossible{"no outlet", NoOutletCase(), {"blind_end", "gear_pump"}}}) {
    CAPTURE(c.label);
    Net net = LoadText(c.text);
    Eigen::VectorXd u;
    PointResult res = SolvePoint(*net.cs, net.cs->envelope.points[0], net.sys.get(), net.solver.get(), &u, false);
    const std::string report = res.summary.Report();
    INFO(report);
    CHECK_FALSE(res.summary.converged());
    CHECK_FALSE(res.converged);
    CHECK(res.nodes.empty());  // no results are reported for it
    bool named = false;
    for (const auto& n : c.names) named = named || report.find(n) != std::string::npos;
    CHECK(named);
    MESSAGE(c.label << ": " << std::string(TerminationName(res.summary.termination)));
  }
}

TEST_CASE("`loopwright solve` on an impossible case exits 3 and prints no results table") {
  const char* bin = std::getenv("LOOPWRIGHT_BIN");
  REQUIRE_MESSAGE(bin != nullptr, "LOOPWRIGHT_BIN is not set");
  const auto dir = std::filesystem::temp_directory_path() /
                   ("lw_robustness_" + std::to_string(static_cast<long>(::getpid())));
  std::filesystem::create_directories(dir);
  for (const auto& [name, text] : {std::pair<std::string, std::string>{"dead_head.json", DeadHeadCase()},
                                   std::pair<std::string, std::string>{"no_outlet.json", NoOutletCase()}}) {
    CAPTURE(name);
    const auto path = dir / name;
    const auto json_out = dir / (name + ".results.json");
    const auto err = dir / (name + ".stderr");
    std::ofstream(path) << text;
    std::string out;
    const int code = testing::RunCommand(
        std::string(bin) + " solve '" + path.string() + "' --json '" + json_out.string() + "' 2>'" + err.string() + "'",
        &out);
    std::stringstream es;
    es << std::ifstream(err).rdbuf();
    INFO("stdout:\n" << out << "\nstderr:\n" << es.str());
    CHECK(code == 3);
    CHECK(out.find("components") == std::string::npos);  // no table
    CHECK(out.find("nodes") == std::string::npos);
    CHECK(out.find("solved") == std::string::npos);
    // No result either way: not converged, or equations solved at a state
    // no liquid can be in (the dead-headed pump's pressure beyond 1e9 Pa).
    CHECK((es.str().find("did not converge") != std::string::npos ||
           es.str().find("physically impossible state") != std::string::npos));
    // The JSON results say so too, with no flows or pressures.
    std::ifstream jf(json_out);
    REQUIRE(jf.good());
    const nlohmann::json j = nlohmann::json::parse(jf);
    CHECK(j["verdict"] == "not-converged");
    REQUIRE(j["points"].size() == 1);
    CHECK(j["points"][0]["converged"] == false);
    CHECK(j["points"][0]["components"].empty());
    CHECK(j["points"][0]["nodes"].empty());
  }
  std::filesystem::remove_all(dir);
}

}  // namespace
}  // namespace loopwright
