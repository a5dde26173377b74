// lw_probe commands for whole-network solves, so that Python cross-checks
// (tests/network/*_test.py) can compare loopwright's answer with an
// independent solution of the same network.
//
//   solve CASE_PATH [POINT]  -> the results document of network/envelope/results.h
//                               (ResultsJson) for POINT, or for every envelope
//                               point when POINT is omitted, plus
//                               "fluid_states": per point and loop the
//                               temperature, density and dynamic viscosity
//                               the network used, so that a cross-check
//                               compares the network only, not the fluid
//                               models. Each point is solved cold (from the
//                               linearised starting guess).
// A case that does not load raises (lw_probe exits 2 with the diagnostics).
#include <stdexcept>
#include <string>
#include <vector>

#include <Eigen/Core>

#include "network/case/case.h"
#include "network/envelope/results.h"
#include "network/point/run.h"
#include "network/point/solver.h"
#include "network/point/system.h"
#include "tests/tools/probe.h"

namespace loopwright::probe {
namespace {

using nlohmann::json;

json Solve(const Args& a) {
  if (a.empty()) throw std::runtime_error("usage: solve CASE_PATH [POINT]");
  LoadResult lr = LoadCaseFile(a[0], DefaultLibraryDir());
  if (!lr.value) throw std::runtime_error("the case does not load:\n" + lr.diagnostics.Format(a[0]));
  const Case& cs = *lr.value;
  std::vector<int> which;
  if (a.size() > 1) {
    const int pi = FindPoint(cs, a[1]);
    if (pi < 0) throw std::runtime_error("no operating point \"" + a[1] + "\"");
    which.push_back(pi);
  } else {
    for (size_t i = 0; i < cs.envelope.points.size(); ++i) which.push_back(static_cast<int>(i));
  }
  NetworkSystem sys(cs);
  NetworkSolver solver(&sys);
  std::vector<PointResult> results;
  json states = json::array();
  bool all = true;
  for (int pi : which) {
    Eigen::VectorXd u;
    results.push_back(SolvePoint(cs, cs.envelope.points[pi], &sys, &solver, &u, false));
    all = all && results.back().converged;
    json loops = json::array();
    for (size_t l = 0; l < cs.loops.size(); ++l) {
      const LoopState& s = sys.loop_states()[l];
      loops.push_back({{"loop", cs.loops[l].id},
                       {"temperature_K", s.temperature},
                       {"rho_kg_m3", s.rho},
                       {"mu_Pa_s", s.mu}});
    }
    states.push_back({{"point", cs.envelope.points[pi].name}, {"loops", loops}});
  }
  json out = ResultsJson(cs, results, all ? "solved" : "not-converged");
  out["fluid_states"] = states;
  return out;
}

LW_PROBE_COMMAND("solve", Solve);

}  // namespace
}  // namespace loopwright::probe
