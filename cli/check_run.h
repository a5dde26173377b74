// One envelope check run (the sweep, the checks at every point, their
// summary, fixes and verdict) and what it adds to the results document:
// shared by `check` and `report`.
#pragma once

#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "library/units.h"
#include "network/case/case.h"
#include "network/envelope/checks.h"
#include "network/envelope/fixes.h"
#include "network/envelope/results.h"
#include "network/envelope/sweep.h"

namespace loopwright::cli {

// Options every case command shares.
struct Common {
  std::string json_out;
  std::string csv_out;
  std::string units = "si";
  std::string json_detail = "full";
  bool quiet = false;
  UnitSystem system() const { return units == "us" ? UnitSystem::kUS : UnitSystem::kSI; }
};


// One envelope check run: the sweep, its checks per converged point and the
// summary, fixes and verdict drawn from them.
struct CheckRun {
  SweepResult sweep;
  std::vector<std::vector<CheckOutcome>> per_point;  // converged points only
  std::vector<std::string> names, failed_points;     // converged / not converged
  std::vector<CheckSummary> summary;
  std::vector<FixSuggestion> fixes;
  std::string fixes_note, verdict;
  size_t nfail = 0;
};

// Solves every envelope point (a progress line on a terminal after 1 s),
// evaluates the checks, summarises them and (unless no_fix) seeks fixes.
CheckRun RunChecks(const Case& cs, const Common& c, bool no_fix, int threads, double tight);

// The fix suggestions as check --json writes them.
nlohmann::json FixesJson(const std::vector<FixSuggestion>& fixes);

// What check adds to the results document: each converged point's checks,
// the summary, fixes, warnings and the points without a result.
ResultsExtras CheckExtras(const CheckRun& run);

}  // namespace loopwright::cli
