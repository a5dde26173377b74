// Every point of a case solved (warm, in envelope order, as `check` does)
// and checked, for the envelope check tests. Requires doctest.
#pragma once

#include <doctest/doctest.h>

#include <string>
#include <utility>
#include <vector>

#include "network/case/case.h"
#include "network/envelope/checks.h"
#include "network/point/run.h"

namespace loopwright {
namespace testing {

struct Sweep {
  std::vector<PointResult> results;
  std::vector<std::vector<CheckOutcome>> per_point;
  std::vector<std::string> names;
  std::vector<CheckWarning> warnings;
};

inline Sweep SolveAndCheck(const Case& cs) {
  Sweep s;
  CaseSolver solver(cs);
  for (const OperatingPoint& op : cs.envelope.points) {
    PointResult r = solver.Solve(op, true);
    CAPTURE(op.name);
    INFO(r.summary.Report());
    REQUIRE(r.converged);
    s.per_point.push_back(EvaluateChecks(cs, op, r, &s.warnings));
    s.names.push_back(op.name);
    s.results.push_back(std::move(r));
  }
  return s;
}

}  // namespace testing
}  // namespace loopwright
