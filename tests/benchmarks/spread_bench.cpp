// Tolerance-study benchmark (not a test): lw_bench --spread [N] [THREADS]
// solves N samples (default 100,000) of cases/apu_tolerances.json (the APU
// demo, 6 points, thermal, 7 tolerances) over the whole envelope, each point
// started from the nominal answer moved along the exact tangents, and, in
// the same run, samples started cold (plain re-solves from scratch, the
// reference) and from the nominal answer without the tangent step. Prints
// the wall time and the throughput in samples x points per second of each,
// and the ratios to the reference. The numbers go into README "Speed".
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

// Seconds and samples-without-a-result of one study.
double Time(const Case& cs, const SpreadSettings& s, uint64_t* unsolved, uint64_t* passes, uint64_t* retries) {
  std::string err;
  const nlohmann::json header = SpreadHeader(cs, s, &err);
  if (header.is_null()) {
    std::fprintf(stderr, "spread bench: %s\n", err.c_str());
    std::exit(4);
  }
  const auto t0 = std::chrono::steady_clock::now();
  const std::vector<SpreadBlock> blocks = RunSpreadBlocks(cs, header, s);
  const double t = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  *unsolved = *passes = *retries = 0;
  for (const SpreadBlock& b : blocks) {
    *unsolved += b.unsolved;
    *passes += b.passes;
    *retries += b.retries;
    for (const nlohmann::json& u : b.unsolved_samples) std::printf("    unsolved: %s\n", u.dump().c_str());
  }
  return t;
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
    double rate = 0;
  } runs[] = {{"cold re-solves (reference)", SampleStart::kCold, nref, tight},
              {"warm from nominal", SampleStart::kNominal, nref, tight},
              {"tangent, settled to 2e-9 K", SampleStart::kTangent, nref, tight},
              {"tangent (spread's default)", SampleStart::kTangent, n, study}};
  for (Run& r : runs) {
    s.start = r.start;
    s.samples = r.samples;
    s.settle_k = r.settle_k;
    uint64_t unsolved = 0, passes = 0, retries = 0;
    const double t = Time(cs, s, &unsolved, &passes, &retries);
    r.rate = static_cast<double>(r.samples) * points / t;
    std::printf("  %-28s %7llu samples  %8.2f s  %9.0f samples x points / s  (%.2f x the reference)  %.1f passes a "
                "point, %llu cold retries, %llu unsolved\n",
                r.what, static_cast<unsigned long long>(r.samples), t, r.rate, r.rate / runs[0].rate,
                static_cast<double>(passes) / (static_cast<double>(r.samples) * points),
                static_cast<unsigned long long>(retries), static_cast<unsigned long long>(unsolved));
  }
  return 0;
}
