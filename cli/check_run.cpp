#include "cli/check_run.h"

#include <unistd.h>

#include <chrono>
#include <cmath>
#include <cstdio>
#include <thread>

#include <fmt/format.h>

namespace loopwright::cli {

namespace {

// What the fix list covers, or why it is empty ("" when it covers every
// failing check of a fully converged envelope).
std::string FixesNote(bool no_fix, size_t nfail, size_t nfixes, size_t nconverged, size_t nfailed_points) {
  if (no_fix) return nfail ? "Fixes: not computed (--no-fix)." : "";
  std::string s;
  if (nfailed_points)
    s = nconverged == 0
            ? std::string("Fixes: none — no point has a result, so no check could be evaluated; remove the cause "
                          "given below first.")
            : fmt::format("Fixes: computed from the {} converged point(s) only; {} point(s) have no result (not "
                          "converged or physically impossible) and their checks are not covered (causes below).",
                          nconverged, nfailed_points);
  if (nconverged > 0 && nfail > 0 && nfixes == 0)
    s += std::string(s.empty() ? "" : " ") + "Fixes: none found for the failing checks.";
  return s;
}

// The cause of every point that is not a result, for check --json.
nlohmann::json NotConvergedCauses(const std::vector<PointResult>& results) {
  nlohmann::json causes = nlohmann::json::array();
  for (const auto& r : results)
    if (!r.converged)
      causes.push_back({{"point", r.name}, {"termination", TerminationName(r.summary.termination)},
                        {"kind", r.summary.cause_kind}, {"place", r.summary.place}, {"cause", r.summary.cause}});
  return causes;
}


// Solves every envelope point (a progress line on a terminal after 1 s).
SweepResult SweepWithProgress(const Case& cs, const Common& c, int threads) {
  const size_t n = cs.envelope.points.size();
  const bool tty = ::isatty(2);
  const auto t0 = std::chrono::steady_clock::now();
  bool shown = false;
  auto progress = [&](size_t done) {
    if (!tty || c.quiet) return;
    if (std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count() < 1.0) return;
    std::fprintf(stderr, "\rsolving points %zu/%zu", done, n);
    shown = true;
  };
  const int hw = static_cast<int>(std::max(1u, std::thread::hardware_concurrency()));
  // Auto: a thread per 200 points at most (each thread sets up its own
  // solver; a small sweep is faster on one core), up to the core count. The
  // results do not depend on the thread count.
  const int autothreads = std::max(1, std::min(hw, static_cast<int>(n / 200)));
  SweepResult sweep = SolveEnvelope(cs, threads > 0 ? threads : autothreads, progress);
  if (shown) std::fprintf(stderr, "\n");
  return sweep;
}

}  // namespace

CheckRun RunChecks(const Case& cs, const Common& c, bool no_fix, int threads, double tight) {
  CheckRun run;
  run.sweep = SweepWithProgress(cs, c, threads);
  for (size_t i = 0; i < run.sweep.points.size(); ++i) {
    if (run.sweep.points[i].converged) {
      run.per_point.push_back(run.sweep.checks[i]);
      run.names.push_back(run.sweep.points[i].name);
    } else {
      run.failed_points.push_back(run.sweep.points[i].name);
    }
  }
  run.summary = SummariseChecks(run.per_point, run.names);
  for (const auto& s : run.summary) run.nfail += s.worst.pass ? 0 : 1;
  run.verdict = !run.failed_points.empty() ? "not-converged" : run.nfail ? "fail" : "pass";
  // Fixes are computed from the converged points even when others did not
  // converge; the note says so, and says why when there are none.
  if (!no_fix) run.fixes = SuggestFixes(cs, run.summary, 8, tight);
  run.fixes_note = FixesNote(no_fix, run.nfail, run.fixes.size(), run.names.size(), run.failed_points.size());
  return run;
}

namespace {

// A line diameter snapped to the catalog (null for a continuous knob).
nlohmann::json SnapJson(const FixSuggestion& f) {
  if (!f.snapped) return nullptr;
  const CatalogSnap& s = f.snap;
  nlohmann::json j = {{"part", s.part.empty() ? nlohmann::json(nullptr) : nlohmann::json(s.part)},
                      {"envelope_passes_check", s.envelope_passes_check}, {"breaks", s.broken}, {"note", s.note}};
  j["bore_m"] = std::isnan(s.bore) ? nlohmann::json(nullptr) : nlohmann::json(s.bore);
  j["worst_margin"] = std::isnan(s.worst_margin) ? nlohmann::json(nullptr) : nlohmann::json(s.worst_margin);
  return j;
}

}  // namespace

nlohmann::json FixesJson(const std::vector<FixSuggestion>& fixes) {
  nlohmann::json fj = nlohmann::json::array();
  for (const auto& f : fixes) {
    nlohmann::json skipped = nlohmann::json::array();
    for (const auto& k : f.skipped)
      skipped.push_back({{"knob", k.knob}, {"held", k.held}, {"margin_change_per_percent", k.per_percent}});
    fj.push_back({{"check", f.check}, {"where", f.where}, {"point", f.point}, {"knob", f.knob},
                  {"unit", SiUnitName(f.dim)}, {"current", f.current}, {"suggested", f.suggested}, {"found", f.found},
                  {"margin_change_per_percent", f.sensitivity_per_percent},
                  {"sensitivity_method", "implicit-function tangent"}, {"newton_steps", f.newton_steps},
                  {"tight", f.tight}, {"margin", f.margin}, {"target_margin", f.target},
                  {"envelope_passes_check", f.envelope_passes_check}, {"breaks", f.broken}, {"note", f.note},
                  {"skipped_held", skipped}, {"catalog", SnapJson(f)}});
  }
  return fj;
}

// What check adds to the results document: each converged point's checks,
// the summary, fixes, warnings and the points without a result.
ResultsExtras CheckExtras(const CheckRun& run) {
  const std::vector<PointResult>& results = run.sweep.points;
  ResultsExtras extras;
  for (size_t i = 0; i < results.size(); ++i)
    extras.point_checks.push_back(results[i].converged ? &run.sweep.checks[i] : nullptr);
  nlohmann::json& j = extras.top;
  j["fixes"] = FixesJson(run.fixes);
  j["fixes_note"] = run.fixes_note;
  extras.check_summary = &run.summary;
  nlohmann::json wj = nlohmann::json::array();
  for (const auto& w : run.sweep.warnings) wj.push_back({{"where", w.where}, {"warning", w.text}});
  j["check_warnings"] = wj;
  j["not_converged_points"] = run.failed_points;
  j["not_converged_causes"] = NotConvergedCauses(results);
  return extras;
}

}  // namespace loopwright::cli
