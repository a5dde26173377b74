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
  // The sweep. Restored from shards' parts (cli/check_shard.h), a point
  // holds only its name, whether it converged and its solver summary's
  // termination and cause: the rest of it is in the parts' text.
  SweepResult sweep;
  std::vector<std::vector<std::string>> model_warnings;  // per point: PointModelWarnings (SI text)
  std::vector<std::vector<CheckOutcome>> per_point;  // converged points only
  std::vector<std::string> names, failed_points;     // converged / not converged
  std::vector<std::string> failed_what, failed_reports;  // per failed point: "did not converge" ..., the solver's report (SI)
  std::vector<CheckSummary> summary;
  std::vector<FixSuggestion> fixes;
  std::string fixes_note, verdict;
  size_t nfail = 0;
};

// Solves the envelope's sweep blocks [first_block, end_block) (a progress
// line on a terminal after 1 s; threads 0: one per 200 points, up to the
// core count).
SweepResult SweepBlocks(const Case& cs, const Common& c, int threads, size_t first_block, size_t end_block);

// Solves every envelope point (a progress line on a terminal after 1 s),
// evaluates the checks, summarises them and (unless no_fix) seeks fixes.
CheckRun RunChecks(const Case& cs, const Common& c, bool no_fix, int threads, double tight);

// What each point of run->sweep adds for printing: model_warnings, and
// failed_what and failed_reports of the points without a result.
void NotePoints(const Case& cs, CheckRun* run);

// From run->sweep (its points' names, convergence and checks): per_point,
// names, failed_points, summary, nfail, verdict, fixes (unless no_fix) and
// fixes_note.
void ConcludeChecks(const Case& cs, bool no_fix, double tight, CheckRun* run);

// check --csv: one row per check outcome of each converged point.
std::string CheckCsv(const CheckRun& run);

// The tables (unless quiet), then the points without a result (stderr),
// then the one-line outcome; `path` as the user gave the case.
void PrintCheck(const Case& cs, const std::string& path, const Common& c, const CheckRun& run);

// What happened to a point without a result, in words ("did not converge").
const char* FailedWhat(Termination t);

// check's exit code: 3 a point without a result, 1 a failing check, else 0.
int CheckExitCode(const CheckRun& run);

// The fix suggestions as check --json writes them.
nlohmann::json FixesJson(const std::vector<FixSuggestion>& fixes);

// What check adds to the results document: each converged point's checks,
// the summary, fixes, warnings and the points without a result.
ResultsExtras CheckExtras(const CheckRun& run);

}  // namespace loopwright::cli
