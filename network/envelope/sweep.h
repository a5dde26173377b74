// Solving every point of a case's envelope, on several threads.
//
// The case is parsed once and shared, read-only, by every thread; each
// block gets its own new CaseSolver (working copies of the models and
// fluids, network/point/point_state.h), so nothing a solver remembers
// crosses from one block to the next. The points are cut into fixed blocks
// of kSweepBlock consecutive points, whatever the thread count; a block's
// first point starts cold, the others warm from the point before (retrying
// cold when that fails), and threads take the blocks in turn. Every point's
// start therefore depends only on the case, so results come back in
// envelope order and identical to the bit on any number of threads.
#pragma once

#include <functional>
#include <string>
#include <vector>

#include "network/case/case.h"
#include "network/envelope/checks.h"
#include "network/point/run.h"

namespace loopwright {

// Points per block of a sweep: one cold start each.
inline constexpr size_t kSweepBlock = 32;

struct SweepResult {
  std::vector<PointResult> points;                 // envelope order
  std::vector<std::vector<CheckOutcome>> checks;   // per point (empty when not converged)
  std::vector<CheckWarning> warnings;
};

// `progress`, if set, is called from the calling thread with the number of
// points done.
SweepResult SolveEnvelope(const Case& cs, int threads, const std::function<void(size_t)>& progress = {});

// Only the blocks [first_block, end_block) (a shard of `check --shard`):
// the result's vectors hold their points, from point first_block x
// kSweepBlock, each started exactly as in the whole sweep.
SweepResult SolveEnvelopeBlocks(const Case& cs, size_t first_block, size_t end_block, int threads,
                                const std::function<void(size_t)>& progress = {});

}  // namespace loopwright
