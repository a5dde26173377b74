// Tolerance-study benchmark (not a test): lw_bench --spread [N] [THREADS]
// solves N samples (default 100,000) of cases/apu_tolerances.json (the APU
// demo, 6 points, thermal, 7 tolerances) over the whole envelope, each point
// started from the nominal answer moved along the exact tangents, and, in
// the same run, samples started cold (plain re-solves from scratch, the
// reference) and from the nominal answer without the tangent step; the
// tangent starts both with the coupled Newton (network/point/coupled_newton.h,
// spread's default) and with the nested passes alone. Prints the wall time
// and the throughput in samples x points per second of each, the ratios to
// the reference, the passes a point and the share of points the coupled
// Newton answered with its steps. The numbers go into README "Speed".
#include <algorithm>
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <string>

#include <nlohmann/json.hpp>

#include "network/case/case.h"
#include "network/tolerance/spread.h"

using namespace loopwright;

namespace {

// What one study took: seconds, samples without a result, passes, cold
// retries, points answered by the coupled Newton and its steps.
struct Timed {
  double seconds = 0;
  uint64_t unsolved = 0, passes = 0, retries = 0, near_points = 0, near_steps = 0;
};

Timed Time(const Case& cs, const SpreadSettings& s) {
  std::string err;
  const nlohmann::json header = SpreadHeader(cs, s, &err);
  if (header.is_null()) {
    std::fprintf(stderr, "spread bench: %s\n", err.c_str());
    std::exit(4);
  }
  const auto t0 = std::chrono::steady_clock::now();
  const std::vector<SpreadBlock> blocks = RunSpreadBlocks(cs, header, s);
  Timed out;
  out.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  for (const SpreadBlock& b : blocks) {
    out.unsolved += b.unsolved;
    out.passes += b.passes;
    out.retries += b.retries;
    out.near_points += b.near_points;
    out.near_steps += b.near_steps;
    for (const nlohmann::json& u : b.unsolved_samples) std::printf("    unsolved: %s\n", u.dump().c_str());
  }
  return out;
}

}  // namespace

int RunSpread(int argc, char** argv) {
  const uint64_t n = argc > 2 ? std::strtoull(argv[2], nullptr, 10) : 100000;
  const int threads = argc > 3 ? std::atoi(argv[3]) : 2;
  const std::string path = std::string(LOOPWRIGHT_LIBRARY_DIR) + "/../cases/apu_tolerances.json";
  LoadResult lr = LoadCaseFile(path, DefaultLibraryDir());
  if (!lr.value) {
    std::fprintf(stderr, "%s", lr.diagnostics.Format(path).c_str());
    return 2;
  }
  const Case& cs = *lr.value;
  const double points = static_cast<double>(cs.envelope.points.size());
  SpreadSettings s;
  s.threads = threads;
  s.samples = n;
  // The references on a tenth of the samples (at least 200; the fourth
  // argument sets it): they are slower.
  const uint64_t nref = argc > 4 ? std::strtoull(argv[4], nullptr, 10)
                                 : std::min<uint64_t>(n, std::max<uint64_t>(200, n / 10));
  std::printf("tolerance study: %s, %.0f points, %zu tolerances, %d threads\n", cs.name.c_str(), points,
              cs.tolerances.size(), threads);
  // The reference solves as `check` does (thermostats settled to 2e-9 K);
  // the samples as `spread` does (SpreadSettings::settle_k), and the
  // tangent predictor at 2e-9 K too, to show what the looser settling buys.
  const double tight = 2e-9, study = SpreadSettings{}.settle_k;
  struct Run {
    const char* what;
    SampleStart start;
    uint64_t samples;
    double settle_k;
    bool coupled;
    double rate = 0;
  } runs[] = {{"cold re-solves (reference)", SampleStart::kCold, nref, tight, false},
              {"warm from nominal", SampleStart::kNominal, nref, tight, true},
              {"tangent, passes, 2e-9 K", SampleStart::kTangent, nref, tight, false},
              {"tangent, coupled, 2e-9 K", SampleStart::kTangent, nref, tight, true},
              {"tangent, passes only", SampleStart::kTangent, nref, study, false},
              {"tangent (spread's default)", SampleStart::kTangent, n, study, true}};
  for (Run& r : runs) {
    s.start = r.start;
    s.samples = r.samples;
    s.settle_k = r.settle_k;
    s.coupled_newton = r.coupled;
    const Timed t = Time(cs, s);
    const double sp = static_cast<double>(r.samples) * points;
    r.rate = sp / t.seconds;
    std::printf("  %-28s %7llu samples  %8.2f s  %9.0f samples x points / s  (%.2f x the reference)  %.2f passes a "
                "point, %.1f %% by the coupled Newton (%.2f steps each), %llu cold retries, %llu unsolved\n",
                r.what, static_cast<unsigned long long>(r.samples), t.seconds, r.rate, r.rate / runs[0].rate,
                static_cast<double>(t.passes) / sp, 100.0 * static_cast<double>(t.near_points) / sp,
                t.near_points ? static_cast<double>(t.near_steps) / static_cast<double>(t.near_points) : 0.0,
                static_cast<unsigned long long>(t.retries), static_cast<unsigned long long>(t.unsolved));
  }
  return 0;
}
