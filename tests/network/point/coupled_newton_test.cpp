// The coupled Newton of a thermal point from a nearby start
// (network/point/coupled_newton.h, CaseSolver::SolveNear): its answer
// against the nested passes' answer of the same point, solved cold by the
// other method, and against the first law and the mass balances.
//
// Sources of the check values:
//   (a) the nested passes (CaseSolver::SolvePasses and the thermostat search
//       of run_thermostat.cpp), solved from a cold start: a different
//       iteration on the same equations, converged to 1e-9 K. Two answers of
//       one steady state agree to the passes' tolerance: the thermostat
//       search accepts |T_s - x| <= 2e-9 K, so a sensed node's answer may
//       sit up to ~1e-8 K from another start's (DEVELOPERS "Thermostatic
//       valves"); 5e-8 K and 1e-7 relative on flows and pressures leave room
//       for that and nothing more.
//   (b) the first law for a steady open system per loop: heat added = heat
//       removed + enthalpy carried out, to 1e-9 of the loop's heat (the
//       closure every accepted thermal answer meets, thermal.h), and the
//       mass balance of every free node recomputed here from the branch
//       flows of the result, to 1e-10 of the loop's largest flow.
//   (c) a Jacobian of the wrong sign makes the chord's steps grow: the point
//       must then be solved by the passes (no coupled answer), with the
//       passes' answer.
// Cases: the shipped demo cases with thermal points (invented data).
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <memory>
#include <string>
#include <vector>

#include "network/case/case.h"
#include "network/envelope/sensitivity.h"
#include "network/point/coupled_newton.h"
#include "network/point/run.h"
#include "tests/tools/source_dir.h"

using loopwright::testing::SourceDir;

namespace loopwright {
namespace {

std::unique_ptr<Case> Load(const std::string& path) {
  LoadResult r = LoadCaseFile(path, SourceDir() + "/library");
  REQUIRE_MESSAGE(r.value, "case " << path << " did not load");
  return std::move(r.value);
}

// The shipped thermal demo cases.
std::vector<std::string> ThermalCases() {
  std::vector<std::string> out;
  for (const auto& e : std::filesystem::directory_iterator(SourceDir() + "/cases"))
    if (e.path().extension() == ".json" && e.path().filename().string().find("schema") == std::string::npos) {
      auto cs = Load(e.path().string());
      if (cs->thermal) out.push_back(e.path().string());
    }
  std::sort(out.begin(), out.end());
  return out;
}

// The first unheld component knob of the case that is not a line length or
// diameter (those also move the case's geometry checks): a parameter the
// samples of a tolerance study move.
DesignKnob AKnob(const Case& cs) {
  for (const DesignKnob& k : DesignKnobs(cs))
    if (k.comp >= 0 && k.name.find("diameter") == std::string::npos) return k;
  return DesignKnobs(cs).front();
}

void CompareAnswers(const PointResult& near, const PointResult& passes) {
  REQUIRE(near.nodes.size() == passes.nodes.size());
  REQUIRE(near.branches.size() == passes.branches.size());
  double p_big = 1.0, m_big = 1e-12;
  for (const auto& n : passes.nodes) p_big = std::max(p_big, std::abs(n.pressure_pa));
  for (const auto& b : passes.branches) m_big = std::max(m_big, std::abs(b.m));
  for (size_t g = 0; g < near.nodes.size(); ++g) {
    CAPTURE(g);
    CHECK(std::abs(near.nodes[g].temperature_k - passes.nodes[g].temperature_k) <= 5e-8);
    CHECK(std::abs(near.nodes[g].pressure_pa - passes.nodes[g].pressure_pa) <= 1e-7 * p_big);
  }
  for (size_t k = 0; k < near.branches.size(); ++k) {
    CAPTURE(k);
    CHECK(std::abs(near.branches[k].m - passes.branches[k].m) <= 1e-7 * m_big);
  }
}

// (b): the first law per loop and the mass balance of every free node.
void CheckBalances(const Case& cs, const CaseSolver& solver, const PointResult& r) {
  for (size_t l = 0; l < cs.loops.size(); ++l) {
    CAPTURE(cs.loops[l].id);
    CHECK(r.thermal_report.loop_closure[l] <= 1e-9);
  }
  std::vector<double> net(r.nodes.size(), 0.0), loop_max(cs.loops.size(), 1e-12);
  for (size_t k = 0; k < r.branches.size(); ++k) {
    const Branch& b = solver.sys.branches()[k];
    net[b.from_node] -= r.branches[k].m;
    net[b.to_node] += r.branches[k].m;
    loop_max[b.loop] = std::max(loop_max[b.loop], std::abs(r.branches[k].m));
  }
  for (size_t g = 0; g < r.nodes.size(); ++g)
    if (!r.nodes[g].boundary) CHECK(std::abs(net[g]) <= 1e-10 * loop_max[r.nodes[g].loop]);
}

// Solves point `op` of `cs` with `knob` at `value`: cold by the passes
// alone, and from the nominal answer (u0, T0) with the coupled Jacobian
// `k`; returns whether the coupled Newton answered.
bool SolveBoth(const Case& cs, const OperatingPoint& op, const DesignKnob& knob, double value,
               const Eigen::VectorXd& u0, const std::vector<double>& T0, std::shared_ptr<const CoupledJacobian> k,
               PointResult* near, PointResult* passes) {
  CaseSolver cold(cs), warm(cs);
  cold.Apply(op);
  REQUIRE(SetKnobValue(&cold, knob, value));
  *passes = cold.Solve(op, false);
  REQUIRE(passes->converged);
  warm.Apply(op);
  REQUIRE(SetKnobValue(&warm, knob, value));
  warm.u = u0;
  warm.T = T0;
  warm.has_answer = true;
  warm.coupled = std::move(k);
  *near = warm.Solve(op, true);
  REQUIRE(near->converged);
  CheckBalances(cs, warm, *near);
  CompareAnswers(*near, *passes);
  return warm.near_points == 1;
}

TEST_CASE("(a, b) the coupled Newton's answer is the passes' answer, and it balances mass and energy") {
  int points = 0, answered = 0;
  for (const std::string& path : ThermalCases()) {
    auto cs = Load(path);
    const DesignKnob knob = AKnob(*cs);
    for (const OperatingPoint& op : cs->envelope.points) {
      if (op.isothermal) continue;
      CAPTURE(path);
      CAPTURE(op.name);
      CAPTURE(knob.name);
      CaseSolver nominal(*cs);
      const PointResult r0 = nominal.Solve(op, false);
      if (!r0.converged) continue;  // a demo point without a steady state (its case's tests say why)
      const double th0 = KnobValue(&nominal, knob);
      auto k = BuildCoupledJacobian(&nominal);
      REQUIRE_MESSAGE(k->ok, k->message);
      PointResult near, passes;
      answered += SolveBoth(*cs, op, knob, th0 * 1.03, nominal.u, nominal.T, k, &near, &passes);
      ++points;
    }
  }
  MESSAGE(answered << " of " << points << " thermal points answered by the coupled Newton");
  CHECK(points >= 8);
  // A 3 % change of one knob from the nominal answer is well within reach
  // of the chord: every point but a few near a switch of regime.
  CHECK(answered >= points - 2);
}

TEST_CASE("(c) a chord that grows hands the point to the passes") {
  auto cs = Load(SourceDir() + "/cases/apu_tolerances.json");
  const DesignKnob knob = AKnob(*cs);
  const OperatingPoint& op = cs->envelope.points[FindPoint(*cs, "full_power_hot_day")];
  CaseSolver nominal(*cs);
  REQUIRE(nominal.Solve(op, false).converged);
  auto wrong = std::make_shared<CoupledJacobian>();
  Eigen::MatrixXd K;
  REQUIRE(CoupledJacobianAt(&nominal, wrong.get(), &K));
  REQUIRE(wrong->Factor(-K));
  PointResult near, passes;
  const double th0 = KnobValue(&nominal, knob);
  CHECK_FALSE(SolveBoth(*cs, op, knob, th0 * 1.03, nominal.u, nominal.T, wrong, &near, &passes));
}

}  // namespace
}  // namespace loopwright
