#include "network/envelope/sweep.h"

#include <atomic>
#include <chrono>
#include <functional>
#include <thread>

namespace loopwright {

namespace {

// Solves points [lo, hi) of one block, the first cold.
void SolveBlock(const Case& cs, CaseSolver* solver, size_t lo, size_t hi, SweepResult* out,
                std::vector<CheckWarning>* warn, std::atomic<size_t>* done) {
  for (size_t i = lo; i < hi; ++i) {
    const OperatingPoint& op = cs.envelope.points[i];
    PointResult r = solver->Solve(op, i > lo);
    if (!r.converged && i > lo) {
      PointResult cold = solver->Solve(op, false);
      if (cold.converged) r = std::move(cold);
    }
    if (r.converged) {
      out->checks[i] = EvaluateChecks(cs, op, r, warn);
      // Fluids outside their range (within the slack of failure_causes.h).
      for (const auto& w : r.warnings) warn->push_back({"point " + op.name, w, ""});
    }
    out->points[i] = std::move(r);
    ++*done;
  }
}

}  // namespace

SweepResult SolveEnvelope(const Case& cs, int threads, const std::function<void(size_t)>& progress) {
  const size_t n = cs.envelope.points.size();
  const size_t blocks = (n + kSweepBlock - 1) / kSweepBlock;
  SweepResult out;
  out.points.resize(n);
  out.checks.resize(n);
  threads = std::max(1, std::min<int>(threads, static_cast<int>(blocks)));
  // Warnings per block, merged in envelope order.
  std::vector<std::vector<CheckWarning>> warn(blocks);
  std::atomic<size_t> done{0}, next{0};
  auto work = [&]() {
    CaseSolver solver(cs);
    for (size_t b = next++; b < blocks; b = next++)
      SolveBlock(cs, &solver, b * kSweepBlock, std::min(n, (b + 1) * kSweepBlock), &out, &warn[b], &done);
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
