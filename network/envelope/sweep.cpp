#include "network/envelope/sweep.h"

#include <atomic>
#include <chrono>
#include <functional>
#include <thread>

namespace loopwright {

SweepResult SolveEnvelope(const Case& cs, const std::string& text, int threads,
                          const std::function<void(size_t)>& progress) {
  const size_t n = cs.envelope.points.size();
  SweepResult out;
  out.points.resize(n);
  out.checks.resize(n);
  threads = std::max(1, std::min<int>(threads, static_cast<int>(n)));
  std::vector<std::vector<CheckWarning>> warn(threads);
  std::atomic<size_t> done{0};
  auto work = [&](int t) {
    const size_t lo = n * t / threads, hi = n * (t + 1) / threads;
    LoadResult lr = LoadCaseText(text, cs.path, DefaultLibraryDir(), size_t(1) << 30);
    if (!lr.value) return;  // cannot happen: the same text loaded before
    const Case& mine = *lr.value;
    CaseSolver solver(mine);
    for (size_t i = lo; i < hi; ++i) {
      const OperatingPoint& op = mine.envelope.points[i];
      PointResult r = solver.Solve(op, true);
      if (!r.converged) {
        PointResult cold = solver.Solve(op, false);
        if (cold.converged) r = std::move(cold);
      }
      if (r.converged) {
        out.checks[i] = EvaluateChecks(mine, op, r, &warn[t]);
        // Fluids outside their range (within the slack of failure_causes.h).
        for (const auto& w : r.warnings) warn[t].push_back({"point " + op.name, w});
      }
      out.points[i] = std::move(r);
      ++done;
    }
  };
  if (threads == 1) {
    work(0);
  } else {
    std::vector<std::thread> pool;
    for (int t = 0; t < threads; ++t) pool.emplace_back(work, t);
    if (progress) {
      while (done.load() < n) {
        progress(done.load());
        std::this_thread::sleep_for(std::chrono::milliseconds(200));
        bool alive = false;
        for (auto& th : pool) alive = alive || th.joinable();
        if (!alive) break;
        if (done.load() >= n) break;
      }
    }
    for (auto& th : pool) th.join();
  }
  if (progress) progress(n);
  for (auto& w : warn) out.warnings.insert(out.warnings.end(), w.begin(), w.end());
  return out;
}

}  // namespace loopwright
