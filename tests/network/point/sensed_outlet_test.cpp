// A law that reads its outlet pressure (pressure_reducing_valve,
// Component::SensesOutlet) through every solver path
// (network/point/system.cpp, nodal.cpp): the held outlet against the
// closed form of the valve, IEC 60534-2-1 Eq. (1) at the straight-line
// travel its outlet sets, Q = Kv(t) sqrt((p_in - p_out)[bar] rho0 / rho) with
// t = (p_set + P_b/2 - p_out) / P_b, solved for p_out by bisection here
// (an independent recomputation from the case's input).
//   - fed from a boundary (one free end): the node-pressure Newton folds its
//     outlet term into a positive conductance (no LU step), and the
//     co-content Newton alone converges;
//   - between two free nodes (non-reciprocal): the plain Newton takes LU
//     steps, and the co-content Newton declines the system instead of
//     searching along a field that is not a gradient (the plain Newton that
//     follows it solves the point).
// Constant-property table oil and a fixed demand (invented data).
#include <doctest/doctest.h>

#include <cmath>
#include <cstdlib>
#include <memory>
#include <string>

#include <Eigen/Core>
#include <nlohmann/json.hpp>

#include "network/case/case.h"
#include "network/point/run.h"
#include "network/point/solver.h"
#include "network/point/system.h"

namespace loopwright {
namespace {

using nlohmann::json;

constexpr double kRho = 870.0, kMu = 0.05;  // invented constant-property oil
constexpr double kSet = 2e5, kBand = 0.2e5, kKvMax = 0.8, kKvMin = 0.8e-4;  // the valve (kv_min: 1e-4 kv_max)
constexpr double kDemand = 2e-4;                                              // [m3/s] imposed downstream

std::string LibraryDir() {
  const char* src = std::getenv("LOOPWRIGHT_SOURCE_DIR");
  return src ? std::string(src) + "/library" : DefaultLibraryDir();
}

// supply (6 bar g) [-> line -> header] -> prv -> gallery -> demand -> housing (0 bar g).
std::string CaseText(bool line_before) {
  const json fluid = {{"kind", "table"},
                      {"viscosity", "dynamic"},
                      {"rows", {{250.0, kMu, kRho, 2000.0, 0.13}, {450.0, kMu, kRho, 2000.0, 0.13}}}};
  json nodes = {{{"id", "supply"}, {"elevation", 0.0}, {"boundary", {{"kind", "pressure"}, {"pressure", 6e5}}}},
                {{"id", "gallery"}, {"elevation", 0.0}},
                {{"id", "housing"}, {"elevation", 0.0}, {"boundary", {{"kind", "pressure"}, {"pressure", 0.0}}}}};
  json comps = {{{"id", "prv"}, {"type", "pressure_reducing_valve"}, {"from", line_before ? "header" : "supply"},
                 {"to", "gallery"}, {"set_pressure", kSet}, {"proportional_band", kBand}, {"kv_max", kKvMax}},
                {{"id", "demand"}, {"type", "fixed_flow"}, {"from", "gallery"}, {"to", "housing"}, {"flow", kDemand}}};
  if (line_before) {
    nodes.push_back({{"id", "header"}, {"elevation", 0.0}});
    comps.push_back({{"id", "line"}, {"type", "pipe"}, {"from", "supply"}, {"to", "header"}, {"length", 2.0},
                     {"diameter", 0.01}});
  }
  json doc = {{"name", "sensed-outlet test network (invented)"},
              {"description", "built by tests/network/point/sensed_outlet_test.cpp"},
              {"fluids", {{"oil", fluid}}},
              {"loops", {{{"id", "oil"}, {"fluid", "oil"}, {"temperature", 313.15}, {"nodes", nodes}, {"components", comps}}}}};
  return doc.dump(2);
}

// The outlet that passes kDemand at inlet p_in, by bisection on the closed form (straight travel).
double HeldOutlet(double p_in) {
  auto q = [&](double p_out) {
    const double t = (kSet + 0.5 * kBand - p_out) / kBand;
    return (kKvMin + (kKvMax - kKvMin) * t) * std::sqrt((p_in - p_out) / 1e5 * 1000.0 / kRho) / 3600.0;
  };
  double lo = kSet - 0.4 * kBand, hi = kSet + 0.4 * kBand;  // the straight 80 % of the band
  REQUIRE(q(lo) > kDemand);
  REQUIRE(q(hi) < kDemand);
  for (int i = 0; i < 200; ++i) (q(0.5 * (lo + hi)) > kDemand ? lo : hi) = 0.5 * (lo + hi);
  return 0.5 * (lo + hi);
}

struct Solved {
  std::unique_ptr<Case> cs;
  PointResult res;
  double Pressure(const std::string& id) const {
    for (const auto& n : res.nodes)
      if (cs->loops[n.loop].nodes[n.node].id == id) return n.pressure_pa;
    FAIL("no node " << id);
    return 0;
  }
};

Solved Solve(bool line_before, const SolverOptions& opts) {
  Solved s;
  LoadResult lr = LoadCaseText(CaseText(line_before), "sensed_outlet_case.json", LibraryDir());
  INFO(lr.diagnostics.Format("sensed_outlet_case.json"));
  REQUIRE(lr.value != nullptr);
  s.cs = std::move(lr.value);
  NetworkSystem sys(*s.cs);
  NetworkSolver solver(&sys, opts);
  Eigen::VectorXd u;
  s.res = SolvePoint(*s.cs, s.cs->envelope.points[0], &sys, &solver, &u, false);
  return s;
}

void CheckHeld(const Solved& s) {
  const double p_in = s.Pressure(s.cs->loops[0].components.size() > 2 ? "header" : "supply");
  const double p_out = s.Pressure("gallery");
  CHECK(std::fabs(p_out - HeldOutlet(p_in)) <= 1e-3);  // Pa
  CHECK(p_out > kSet - 0.5 * kBand);
  CHECK(p_out < kSet + 0.5 * kBand);
}

TEST_CASE("reducing valve fed from a boundary: the node-pressure step folds its outlet term, co-content converges") {
  SolverOptions opts;
  Solved a = Solve(false, opts);
  INFO(a.res.summary.Report());
  REQUIRE(a.res.converged);
  CHECK(a.res.summary.lu_steps == 0);
  CheckHeld(a);
  opts.plain_newton = false;
  opts.use_fallback = false;
  Solved b = Solve(false, opts);
  INFO(b.res.summary.Report());
  REQUIRE(b.res.converged);
  CHECK(b.res.summary.nodal_iterations > 0);
  CheckHeld(b);
}

TEST_CASE("reducing valve between free nodes: LU steps; the co-content Newton declines and the plain Newton finishes") {
  SolverOptions opts;
  Solved a = Solve(true, opts);
  INFO(a.res.summary.Report());
  REQUIRE(a.res.converged);
  CHECK(a.res.summary.lu_steps > 0);
  CheckHeld(a);
  // The co-content path first (as --co-content-only): it takes no step on a non-reciprocal system,
  // and the plain Newton that always follows it solves the point from the cold start.
  opts.plain_newton = false;
  opts.use_fallback = false;
  Solved b = Solve(true, opts);
  INFO(b.res.summary.Report());
  REQUIRE(b.res.converged);
  CHECK(b.res.summary.nodal_iterations == 0);
  CHECK(b.res.summary.newton_iterations > 0);
  CheckHeld(b);
}

}  // namespace
}  // namespace loopwright
