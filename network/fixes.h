// What would fix a failing check: for each failing (or tight) check, the
// design parameter ("knob") that moves its margin most at the governing
// point, the value that restores the margin there, and whether that value
// passes the whole envelope or breaks another check.
//
// Knobs: the parameters a designer changes before buying parts and that are
// not bound to envelope variables — valve opening and kvs, relief valve crack,
// orifice and rolling-bearing jet diameter, displacement pump displacement and
// speed, centrifugal pump speed, air cooler conductance, line diameters,
// journal bearing clearance.
//
// Sensitivities d(margin)/d(knob) are central differences of converged
// solves (relative step 1e-4; each solve warm-started and converged to the
// solver's tolerances), ranked by the margin change per 1 % change of the
// knob. The restoring value is found by the secant method on the margin at
// the governing point (target: 2 % of the limit's magnitude above it, so the
// suggestion is not on the edge), then the whole envelope is re-solved with
// it.
#pragma once

#include <string>
#include <vector>

#include "network/case.h"
#include "network/checks.h"

namespace loopwright {

struct FixSuggestion {
  std::string check, where, point;  // the failing check and its governing point
  std::string knob;                 // "loop/component.param"
  Dimension dim = Dimension::kDimensionless;
  double current = 0, suggested = 0;
  double sensitivity_per_percent = 0;  // margin change for +1 % of the knob
  bool found = false;                  // a value restoring the margin at the point
  bool envelope_passes_check = false;  // the check passes at every point with it
  std::vector<std::string> broken;     // other checks that fail with it (and did not before)
  std::string note;
};

// Suggestions for every failing summary check (at most `max_checks`).
std::vector<FixSuggestion> SuggestFixes(const Case& cs, const std::vector<CheckSummary>& summary, int max_checks = 8);

}  // namespace loopwright
