// Checks through time: the rows of the check table read by `simulate`
// (coking_temperature_max, after_boil_margin_min, warmup_time_max with
// warmup_temperature, relief_open_time_max, bypass_open_time_max,
// starved_time_max; network/case/check_table.cpp gives each default and its
// basis). Evaluated on a finished run's output instants (durations are
// resolved to the output interval) and peaks; limits are the case's
// ("checks" at the top level) over the defaults.
#pragma once

#include <string>
#include <vector>

#include "network/case/case.h"
#include "network/time/simulate.h"

namespace loopwright {

struct TimeCheck {
  CheckId id = CheckId::kCount;
  std::string where;  // mass id, "loop/node" or "loop/component"
  double value = 0, limit = 0, margin = 0;  // SI, in the row's dimension
  double time = 0;    // [s] when the value was taken (a peak's time, the least margin's instant, the time reached)
  bool pass = true;
};

// The worst entry per check and place; empty when the run has none to check.
std::vector<TimeCheck> EvaluateTimeChecks(const Case& cs, const Scenario& sc, const SimulationResult& r);

}  // namespace loopwright
