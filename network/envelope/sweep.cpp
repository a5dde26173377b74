#include "network/envelope/sweep.h"

#include <atomic>
#include <chrono>
#include <functional>
#include <thread>

namespace loopwright {

namespace {

// Solves points [lo, hi) of one block, the first cold; point i goes to
// entry i - base of `out`.
void SolveBlock(const Case& cs, CaseSolver* solver, size_t lo, size_t hi, size_t base, SweepResult* out,
                std::vector<CheckWarning>* warn, std::atomic<size_t>* done) {
  for (size_t i = lo; i < hi; ++i) {
    const OperatingPoint& op = cs.envelope.points[i];
    PointResult r = solver->Solve(op, i > lo);
    if (!r.converged && i > lo) {
      PointResult cold = solver->Solve(op, false);
      if (cold.converged) r = std::move(cold);
    }
    if (r.converged) {
      out->checks[i - base] = EvaluateChecks(cs, op, r, warn);
      // Fluids outside their range (within the slack of failure_causes.h).
      for (const auto& w : r.warnings) warn->push_back({"point " + op.name, w, ""});
    }
    out->points[i - base] = std::move(r);
    ++*done;
  }
}

}  // namespace

SweepResult SolveEnvelope(const Case& cs, int threads, const std::function<void(size_t)>& progress) {
  const size_t n = cs.envelope.points.size();
  return SolveEnvelopeBlocks(cs, 0, (n + kSweepBlock - 1) / kSweepBlock, threads, progress);
}

SweepResult SolveEnvelopeBlocks(const Case& cs, size_t first_block, size_t end_block, int threads,
                                const std::function<void(size_t)>& progress) {
  const size_t all = cs.envelope.points.size();
  const size_t base = std::min(all, first_block * kSweepBlock), end = std::min(all, end_block * kSweepBlock);
  const size_t n = end - base, blocks = end_block > first_block ? end_block - first_block : 0;
  SweepResult out;
  out.points.resize(n);
  out.checks.resize(n);
  threads = std::max(1, std::min<int>(threads, static_cast<int>(blocks)));
  // Warnings per block, merged in envelope order.
  std::vector<std::vector<CheckWarning>> warn(blocks);
  std::atomic<size_t> done{0}, next{0};
  // A new solver per block: a warm start must not reach back into another
  // block (a thermal point after isothermal ones starts from the last
  // thermal answer the solver holds, which was the block before's on one
  // thread and none on another: found by a sharded check differing from the
  // whole one at a point without a result).
  auto work = [&]() {
    for (size_t b = next++; b < blocks; b = next++) {
      CaseSolver solver(cs);
      const size_t lo = base + b * kSweepBlock;
      SolveBlock(cs, &solver, lo, std::min(end, lo + kSweepBlock), base, &out, &warn[b], &done);
    }
  };
  if (threads == 1) {
    work();
  } else {
    std::vector<std::thread> pool;
    for (int t = 0; t < threads; ++t) pool.emplace_back(work);
    if (progress) {
      while (done.load() < n) {
        progress(done.load());
        std::this_thread::sleep_for(std::chrono::milliseconds(200));
      }
    }
    for (auto& th : pool) th.join();
  }
  if (progress) progress(n);
  for (auto& w : warn) out.warnings.insert(out.warnings.end(), w.begin(), w.end());
  return out;
}

}  // namespace loopwright
