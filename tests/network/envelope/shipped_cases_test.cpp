// Every shipped example case (cases/*.json, not the schema) at every envelope
// point: it loads, the solve converges cold (from the linearised guess) and
// warm (in envelope order, from the previous point), the two agree, every
// reported pressure and flow is finite, and mass balances at every free node
// to 1e-9 relative (net flow / sum of |flows| at the node, computed here from
// the reported branch flows). No regression pin: the demo cases are still
// being tuned, and the invented branched case is checked against an
// independent solution instead (branched_crosscheck_test.py).
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <map>
#include <string>
#include <vector>

#include <Eigen/Core>

#include "network/case/case.h"
#include "network/point/run.h"
#include "network/point/solver.h"
#include "network/point/system.h"
#include "tests/tools/source_dir.h"

using loopwright::testing::SourceDir;

namespace loopwright {
namespace {


std::vector<std::string> ShippedCases() {
  std::vector<std::string> files;
  for (const auto& e : std::filesystem::directory_iterator(SourceDir() + "/cases")) {
    const std::string name = e.path().filename().string();
    if (e.path().extension() == ".json" && name.find(".schema.") == std::string::npos) files.push_back(e.path().string());
  }
  std::sort(files.begin(), files.end());
  return files;
}

// Worst |net| / gross over free nodes, from the reported branch flows.
double WorstMassImbalance(const Case& cs, const PointResult& r, std::string* where) {
  std::map<std::pair<int, int>, double> net, gross;
  for (const auto& b : r.branches) {
    const auto& c = cs.loops[b.loop].components[b.comp];
    net[{b.loop, c.from}] -= b.m;
    net[{b.loop, c.to}] += b.m;
    gross[{b.loop, c.from}] += std::fabs(b.m);
    gross[{b.loop, c.to}] += std::fabs(b.m);
  }
  double worst = 0;
  for (size_t l = 0; l < cs.loops.size(); ++l) {
    for (size_t i = 0; i < cs.loops[l].nodes.size(); ++i) {
      if (cs.loops[l].nodes[i].boundary != BoundaryKind::kNone) continue;
      const std::pair<int, int> key{static_cast<int>(l), static_cast<int>(i)};
      if (gross[key] == 0) continue;
      const double z = std::fabs(net[key]) / gross[key];
      if (z >= worst) {
        worst = z;
        *where = cs.loops[l].id + "/" + cs.loops[l].nodes[i].id;
      }
    }
  }
  return worst;
}

TEST_CASE("the shipped cases folder holds cases") { CHECK(ShippedCases().size() >= 1); }

TEST_CASE("every shipped case converges at every envelope point, with mass balance at every node") {
  for (const std::string& path : ShippedCases()) {
    CAPTURE(path);
    LoadResult lr = LoadCaseFile(path, SourceDir() + "/library");
    INFO(lr.diagnostics.Format(path));
    REQUIRE(lr.value != nullptr);
    const Case& cs = *lr.value;
    REQUIRE(!cs.envelope.points.empty());
    NetworkSystem sys(cs);
    NetworkSolver solver(&sys);
    Eigen::VectorXd warm_u;
    double worst_mb = 0;
    for (size_t i = 0; i < cs.envelope.points.size(); ++i) {
      const OperatingPoint& op = cs.envelope.points[i];
      CAPTURE(op.name);
      Eigen::VectorXd u;
      PointResult cold = SolvePoint(cs, op, &sys, &solver, &u, false);
      INFO(cold.summary.Report());
      REQUIRE(cold.converged);
      std::string where;
      const double mb = WorstMassImbalance(cs, cold, &where);
      INFO("worst mass imbalance " << mb << " at node " << where);
      CHECK(mb <= 1e-9);
      CHECK(cold.max_mass_imbalance_rel <= 1e-9);
      worst_mb = std::max(worst_mb, mb);
      for (const auto& n : cold.nodes) CHECK(std::isfinite(n.pressure_pa));
      for (const auto& b : cold.branches) CHECK(std::isfinite(b.flow_m3s));
      // Warm, in envelope order (as a sweep runs): the same answer.
      PointResult warm = SolvePoint(cs, op, &sys, &solver, &warm_u, i > 0);
      INFO(warm.summary.Report());
      REQUIRE(warm.converged);
      double mmax = 0;
      for (const auto& b : cold.branches) mmax = std::max(mmax, std::fabs(b.m));
      for (size_t k = 0; k < cold.branches.size(); ++k)
        CHECK(std::fabs(warm.branches[k].m - cold.branches[k].m) <= 1e-9 * mmax);
      for (size_t k = 0; k < cold.nodes.size(); ++k)
        CHECK(std::fabs(warm.nodes[k].pressure_pa - cold.nodes[k].pressure_pa) <=
              1e-4 + 1e-9 * std::fabs(cold.nodes[k].pressure_pa));
    }
    MESSAGE(path << ": " << cs.envelope.points.size() << " points converged; worst mass imbalance " << worst_mb);
  }
}

TEST_CASE("demo case: the bearings are fed from feed to housing at every point (the case's stated expectation)") {
  // cases/apu_test_cell.json says: "every running point feeds the bearings
  // above housing pressure". Checked as: flow > 0 through every
  // journal_bearing of the oil loop at every envelope point.
  LoadResult lr = LoadCaseFile(SourceDir() + "/cases/apu_test_cell.json", SourceDir() + "/library");
  REQUIRE(lr.value != nullptr);
  const Case& cs = *lr.value;
  NetworkSystem sys(cs);
  NetworkSolver solver(&sys);
  for (const OperatingPoint& op : cs.envelope.points) {
    CAPTURE(op.name);
    Eigen::VectorXd u;
    PointResult r = SolvePoint(cs, op, &sys, &solver, &u, false);
    REQUIRE(r.converged);
    int bearings = 0;
    for (const auto& b : r.branches) {
      const auto& c = cs.loops[b.loop].components[b.comp];
      if (c.type() != "journal_bearing") continue;
      ++bearings;
      CAPTURE(c.id);
      CHECK(b.flow_m3s > 0);
      CHECK(BranchState(cs, r, b).dp > 0);
    }
    CHECK(bearings == 2);
  }
}

}  // namespace
}  // namespace loopwright
