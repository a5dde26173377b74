// lw_bench --campaign N [--first-seed S] [--save DIR] (or --campaign 0 --print SEED): the random-network
// campaign at scale (tests/tools/random_network.h, network_verifier.h).
// Prints the convergence rate, the non-converged points by cause, the silent
// wrong answers (converged but failing the independent verification, or not
// converged without a cause), the slowest case and the total time; with
// --save, writes every silent or non-converged case to DIR as a reproducer.
#include <algorithm>
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <map>
#include <string>

#include <fmt/format.h>

#include "tests/tools/network_verifier.h"
#include "tests/tools/random_network.h"

using namespace loopwright::campaign;

namespace {

void Save(const std::string& dir, uint64_t seed, const char* what) {
  if (dir.empty()) return;
  std::ofstream(fmt::format("{}/{}_seed_{}.json", dir, what, seed)) << GenerateCase(seed).doc.dump(2) << "\n";
}

}  // namespace

int RunCampaign(int argc, char** argv) {
  int n = 10000;
  uint64_t first = 1;
  std::string save;
  for (int i = 1; i + 1 < argc; ++i) {
    const std::string a = argv[i];
    if (a == "--campaign") n = std::atoi(argv[i + 1]);
    if (a == "--first-seed") first = std::strtoull(argv[i + 1], nullptr, 10);
    if (a == "--save") save = argv[i + 1];
    if (a == "--print") {  // the case document of one seed, for a reproducer
      std::printf("%s\n", GenerateCase(std::strtoull(argv[i + 1], nullptr, 10)).doc.dump(2).c_str());
      return 0;
    }
  }
  int converged = 0, silent = 0, unplaced = 0, thermal = 0, laws = 0, skipped = 0, energy = 0;
  std::map<std::string, int> causes;
  CaseOutcome slowest;
  uint64_t slowest_seed = 0;
  const auto t0 = std::chrono::steady_clock::now();
  for (uint64_t seed = first; seed < first + n; ++seed) {
    CaseOutcome o = RunCampaignSeed(seed);
    thermal += o.thermal;
    laws += o.check.laws_checked;
    skipped += o.check.laws_skipped;
    energy += o.check.energy_checked;
    unplaced += o.unplaced;
    if (o.converged) ++converged;
    else ++causes[o.cause], Save(save, seed, o.unplaced ? "unplaced" : "not_converged");
    if (o.silent) {
      ++silent;
      std::printf("SILENT seed %llu (%s):\n%s\n", static_cast<unsigned long long>(seed), o.converged ? "converged" : "no cause",
                  o.detail.c_str());
      Save(save, seed, "silent");
    }
    if (o.seconds > slowest.seconds) slowest = o, slowest_seed = seed;
  }
  const double total = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  std::printf("campaign: %d random networks (seeds %llu..%llu), %d thermal\n", n, static_cast<unsigned long long>(first),
              static_cast<unsigned long long>(first + n - 1), thermal);
  std::printf("converged %d (%.2f %%); not converged %d; silent wrong answers %d\n", converged, 100.0 * converged / n,
              n - converged, silent);
  for (const auto& [c, k] : causes) std::printf("  not converged: %5d x %s\n", k, c.c_str());
  std::printf("not converged with a message but no residual rows naming the place: %d\n", unplaced);
  std::printf("independent checks: %d component laws (%d components without a checked law), %d energy balances\n", laws,
              skipped, energy);
  std::printf("slowest: seed %llu, %.1f ms (%d components, %d pipes, %s, %s)\n", static_cast<unsigned long long>(slowest_seed),
              slowest.seconds * 1e3, slowest.components, slowest.pipes, slowest.thermal ? "thermal" : "isothermal",
              slowest.converged ? "converged" : "not converged");
  std::printf("total %.1f s, %.2f ms per network (load + solve + verify, one core)\n", total, total / n * 1e3);
  return silent == 0 ? 0 : 1;
}
