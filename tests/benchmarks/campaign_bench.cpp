// lw_bench --campaign N [--first-seed S] [--save DIR] [--failures FILE] [--speed-probe]
// (or --campaign 0 --print SEED): the random-network campaign at scale
// (tests/tools/random_network.h, network_verifier.h).
// Prints the convergence rate, the non-converged points by cause (isothermal
// and thermal apart), the silent wrong answers (converged but failing the
// independent verification, or not converged without a cause), the slowest
// case and the total time; with --save, writes every silent or non-converged
// case to DIR as a reproducer; with --failures, one line per non-converged
// seed (seed, isothermal|thermal, termination: cause kind, place); with
// --speed-probe, every non-converged seed is solved again with each pump's
// speed 0.01 % lower and higher, and the seeds that converge there are
// listed (a network that converges 0.01 % away should converge at its own).
#include <algorithm>
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <map>
#include <string>

#include <fmt/format.h>

#include "network/case/case.h"
#include "network/point/run.h"
#include "tests/tools/network_verifier.h"
#include "tests/tools/random_network.h"

using namespace loopwright::campaign;

namespace {

void Save(const std::string& dir, uint64_t seed, const char* what, const nlohmann::json& doc) {
  if (dir.empty()) return;
  std::ofstream(fmt::format("{}/{}_seed_{}.json", dir, what, seed)) << doc.dump(2) << "\n";
}

// The place (SolverSummary::place) of the first non-converged point of a case.
std::string FailurePlace(const nlohmann::json& doc) {
  loopwright::LoadResult lr = loopwright::LoadCaseText(doc.dump(), "seed", loopwright::DefaultLibraryDir());
  if (!lr.value) return "(not loaded)";
  loopwright::CaseSolver solver(*lr.value);
  for (const auto& op : lr.value->envelope.points) {
    loopwright::PointResult r = solver.Solve(op, false);
    if (!r.converged) return r.summary.place.empty() ? "(no place)" : r.summary.place;
  }
  return "(converged)";
}

// The case with every pump's speed times `factor`.
nlohmann::json ScalePumpSpeeds(nlohmann::json doc, double factor) {
  for (auto& l : doc["loops"])
    for (auto& c : l["components"]) {
      const std::string t = c["type"];
      if ((t != "displacement_pump" && t != "centrifugal_pump") || !c.contains("speed")) continue;
      const std::string q = c["speed"];
      c["speed"] = fmt::format("{:.15g} rpm", std::strtod(q.c_str(), nullptr) * factor);
    }
  return doc;
}

// The case of a seed; with `wide`, its oil loop's temperature (the point's
// temperature when isothermal, the start when thermal) is redrawn over
// 0..120 degC, the range of the campaign issue 12 quotes.
nlohmann::json CaseDoc(uint64_t seed, bool wide) {
  nlohmann::json doc = GenerateCase(seed).doc;
  if (wide) {
    const double u = static_cast<double>((seed * 6364136223846793005ULL + 1442695040888963407ULL) >> 11) * 0x1.0p-53;
    doc["loops"][0]["temperature"] = fmt::format("{:.6g} degC", 120.0 * u);
  }
  return doc;
}

// One seed's outcome; `wide`: its oil loop started anywhere in 0-120 degC.
CaseOutcome RunSeed(uint64_t seed, bool wide) {
  if (!wide) return RunCampaignSeed(seed);
  const GeneratedCase g = GenerateCase(seed);
  CaseOutcome w = RunCaseDocument(CaseDoc(seed, true), fmt::format("campaign_seed_{}.json", seed));
  w.thermal = g.thermal, w.water_loop = g.water_loop, w.pipes = g.pipes, w.components = g.components;
  return w;
}

// True when the case converges at a pump speed 0.01 % below or above its own.
bool ConvergesNearby(const nlohmann::json& doc) {
  for (double f : {1 - 1e-4, 1 + 1e-4}) {
    CaseOutcome p = RunCaseDocument(ScalePumpSpeeds(doc, f), "probe");
    if (p.converged && !p.silent) return true;
  }
  return false;
}

}  // namespace

int RunCampaign(int argc, char** argv) {
  int n = 10000;
  uint64_t first = 1;
  std::string save, failures;
  bool probe = false, wide = false;
  for (int i = 1; i + 1 < argc; ++i) {
    const std::string a = argv[i];
    if (a == "--campaign") n = std::atoi(argv[i + 1]);
    if (a == "--first-seed") first = std::strtoull(argv[i + 1], nullptr, 10);
    if (a == "--save") save = argv[i + 1];
    if (a == "--failures") failures = argv[i + 1];
    if (a == "--print") {  // the case document of one seed, for a reproducer
      std::printf("%s\n", GenerateCase(std::strtoull(argv[i + 1], nullptr, 10)).doc.dump(2).c_str());
      return 0;
    }
  }
  for (int i = 1; i < argc; ++i) probe |= std::string(argv[i]) == "--speed-probe", wide |= std::string(argv[i]) == "--wide";
  std::FILE* fail_out = failures.empty() ? nullptr : std::fopen(failures.c_str(), "w");
  int probed = 0, probe_converged = 0;
  int converged = 0, silent = 0, unplaced = 0, thermal = 0, laws = 0, skipped = 0, energy = 0;
  std::map<std::string, int> causes, iso_causes;
  int thermal_failed = 0;
  CaseOutcome slowest;
  uint64_t slowest_seed = 0;
  const auto t0 = std::chrono::steady_clock::now();
  for (uint64_t seed = first; seed < first + n; ++seed) {
    CaseOutcome o = RunSeed(seed, wide);
    thermal += o.thermal;
    laws += o.check.laws_checked;
    skipped += o.check.laws_skipped;
    energy += o.check.energy_checked;
    unplaced += o.unplaced;
    if (o.converged) ++converged;
    else {
      ++(o.thermal ? causes : iso_causes)[o.cause];
      thermal_failed += o.thermal;
      Save(save, seed, o.unplaced ? "unplaced" : "not_converged", CaseDoc(seed, wide));
      const nlohmann::json doc = CaseDoc(seed, wide);
      if (fail_out)
        std::fprintf(fail_out, "%llu %s %s | %s\n", static_cast<unsigned long long>(seed),
                     o.thermal ? "thermal" : "isothermal", o.cause.c_str(), FailurePlace(doc).c_str());
      if (probe) {
        ++probed;
        const bool any = ConvergesNearby(doc);
        probe_converged += any;
        if (any) std::printf("seed %llu converges at a pump speed 0.01 %% away (%s)\n", static_cast<unsigned long long>(seed), o.cause.c_str());
      }
    }
    if (o.silent) {
      ++silent;
      std::printf("SILENT seed %llu (%s):\n%s\n", static_cast<unsigned long long>(seed), o.converged ? "converged" : "no cause",
                  o.detail.c_str());
      Save(save, seed, "silent", CaseDoc(seed, wide));
    }
    if (o.seconds > slowest.seconds) slowest = o, slowest_seed = seed;
  }
  const double total = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  std::printf("campaign: %d random networks (seeds %llu..%llu), %d thermal\n", n, static_cast<unsigned long long>(first),
              static_cast<unsigned long long>(first + n - 1), thermal);
  std::printf("converged %d (%.2f %%); not converged %d; silent wrong answers %d\n", converged, 100.0 * converged / n,
              n - converged, silent);
  std::printf("isothermal: %d of %d not converged; thermal: %d of %d not converged\n",
              n - converged - thermal_failed, n - thermal, thermal_failed, thermal);
  for (const auto& [c, k] : iso_causes) std::printf("  isothermal not converged: %5d x %s\n", k, c.c_str());
  for (const auto& [c, k] : causes) std::printf("  thermal not converged: %5d x %s\n", k, c.c_str());
  if (probe) std::printf("speed probe: %d of %d non-converged seeds converge at a pump speed 0.01 %% away\n", probe_converged, probed);
  if (fail_out) std::fclose(fail_out);
  std::printf("not converged with a message but no residual rows naming the place: %d\n", unplaced);
  std::printf("independent checks: %d component laws (%d components without a checked law), %d energy balances\n", laws,
              skipped, energy);
  std::printf("slowest: seed %llu, %.1f ms (%d components, %d pipes, %s, %s)\n", static_cast<unsigned long long>(slowest_seed),
              slowest.seconds * 1e3, slowest.components, slowest.pipes, slowest.thermal ? "thermal" : "isothermal",
              slowest.converged ? "converged" : "not converged");
  std::printf("total %.1f s, %.2f ms per network (load + solve + verify, one core)\n", total, total / n * 1e3);
  return silent == 0 ? 0 : 1;
}
