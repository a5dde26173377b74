// Solving every point of a case's envelope, on several threads.
//
// The points are split into contiguous chunks, one per thread; each thread
// loads its own copy of the case (component models hold per-point parameter
// values, so copies are never shared), warm-starts each point from the
// previous one of its chunk (retrying cold when that fails) and evaluates the
// checks. Results come back in envelope order, identical whatever the thread
// count (to solver tolerance: warm starts differ only at chunk boundaries).
#pragma once

#include <functional>
#include <string>
#include <vector>

#include "network/case/case.h"
#include "network/envelope/checks.h"
#include "network/point/run.h"

namespace loopwright {

struct SweepResult {
  std::vector<PointResult> points;                 // envelope order
  std::vector<std::vector<CheckOutcome>> checks;   // per point (empty when not converged)
  std::vector<CheckWarning> warnings;
};

// `text` is the case file's content (each thread parses it); `progress`, if
// set, is called from the calling thread with the number of points done.
SweepResult SolveEnvelope(const Case& cs, const std::string& text, int threads,
                          const std::function<void(size_t)>& progress = {});

}  // namespace loopwright
