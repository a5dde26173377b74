#include "cli/check_run.h"

#include <unistd.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <thread>

#include <fmt/format.h>

#include "cli/output.h"

namespace loopwright::cli {

namespace {

// What the fix list covers, or why it is empty ("" when it covers every
// failing check of a fully converged envelope); `nfixes` counts the
// suggestions for failing checks.
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
  else if (nfixes > 0 && nfail > nfixes)
    s += std::string(s.empty() ? "" : " ") +
         fmt::format("Fixes: searched for the {} failing checks furthest below their limits, of {} failing; a fix "
                     "often clears others too: apply one and check again.", nfixes, nfail);
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


// On a terminal, before a fix search that will take a while: it ranks every
// design knob of the case for each failing and tight check, re-describing
// the whole point per knob, so its cost grows about as the square of the
// case's size (README "Large cases").
void NoteLongFixSearch(const Case& cs, const CheckRun& run) {
  size_t components = 0;
  for (const auto& loop : cs.loops) components += loop.components.size();
  if (components < 1000 || !::isatty(2) || run.summary.empty()) return;
  std::fprintf(stderr,
               "searching what would fix the failing and tight checks on %zu components: this takes minutes on a case this "
               "size (it grows about as the square of the size); --no-fix skips it\n",
               components);
}

}  // namespace

SweepResult SweepBlocks(const Case& cs, const Common& c, int threads, size_t first_block, size_t end_block) {
  const size_t all = cs.envelope.points.size();
  const size_t n = std::min(all, end_block * kSweepBlock) - std::min(all, first_block * kSweepBlock);
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
  SweepResult sweep = SolveEnvelopeBlocks(cs, first_block, end_block, threads > 0 ? threads : autothreads, progress);
  if (shown) std::fprintf(stderr, "\n");
  return sweep;
}

CheckRun RunChecks(const Case& cs, const Common& c, bool no_fix, int threads, double tight) {
  CheckRun run;
  run.sweep = SweepBlocks(cs, c, threads, 0, (cs.envelope.points.size() + kSweepBlock - 1) / kSweepBlock);
  NotePoints(cs, &run);
  ConcludeChecks(cs, no_fix, tight, &run);
  return run;
}

void NotePoints(const Case& cs, CheckRun* run) {
  for (const PointResult& r : run->sweep.points) {
    run->model_warnings.push_back(PointModelWarnings(cs, r));
    if (r.converged) continue;
    run->failed_what.push_back(FailedWhat(r.summary.termination));
    run->failed_reports.push_back(r.summary.Report());
  }
}

void ConcludeChecks(const Case& cs, bool no_fix, double tight, CheckRun* run) {
  for (size_t i = 0; i < run->sweep.points.size(); ++i) {
    if (run->sweep.points[i].converged) {
      run->per_point.push_back(run->sweep.checks[i]);
      run->names.push_back(run->sweep.points[i].name);
    } else {
      run->failed_points.push_back(run->sweep.points[i].name);
    }
  }
  run->summary = SummariseChecks(run->per_point, run->names);
  for (const auto& s : run->summary) run->nfail += s.worst.pass ? 0 : 1;
  run->verdict = !run->failed_points.empty() ? "not-converged" : run->nfail ? "fail" : "pass";
  // Fixes are computed from the converged points even when others did not
  // converge; the note says so, and says why when there are none.
  if (!no_fix) {
    NoteLongFixSearch(cs, *run);
    run->fixes = SuggestFixes(cs, run->summary, 8, tight);
  }
  const size_t failing_fixed = std::count_if(run->fixes.begin(), run->fixes.end(), [](const FixSuggestion& f) { return !f.tight; });
  run->fixes_note = FixesNote(no_fix, run->nfail, failing_fixed, run->names.size(), run->failed_points.size());
}

std::string CheckCsv(const CheckRun& run) {
  std::string csv = "point,check,where,value,limit,margin,unit,pass\n";
  for (size_t i = 0; i < run.per_point.size(); ++i)
    for (const auto& o : run.per_point[i])
      csv += fmt::format("{},{},{},{:.10g},{:.10g},{:.10g},{},{}\n", CsvField(run.names[i]), CsvField(std::string(o.name())),
                         CsvField(o.where), o.value, o.limit, o.margin, SiUnitName(o.dim), o.pass ? "pass" : "fail");
  return csv;
}

void PrintCheck(const Case& cs, const std::string& path, const Common& c, const CheckRun& run) {
  if (!c.quiet) std::fputs(CheckTable(cs, run.summary, run.sweep.warnings, c.system()).c_str(), stdout);
  if (!c.quiet) {
    std::vector<std::string> names;
    for (const auto& r : run.sweep.points) names.push_back(r.name);
    std::fputs(ModelWarningLines(names, run.model_warnings, c.system()).c_str(), stdout);
  }
  if (!c.quiet && !run.fixes.empty()) std::fputs(FixTable(run.fixes, c.system()).c_str(), stdout);
  if (!c.quiet && !run.fixes_note.empty()) std::printf("%s\n", run.fixes_note.c_str());
  std::fflush(stdout);  // the tables first, then the points without a result, in order
  for (size_t i = 0; i < run.failed_points.size(); ++i)
    std::fprintf(stderr, "point \"%s\" %s and counts as failing: %s\n", run.failed_points[i].c_str(),
                 run.failed_what[i].c_str(), Localize(run.failed_reports[i], c.system()).c_str());
  const std::string& v = run.verdict;
  std::printf("%s: %s — %zu checks at %zu of %zu points, %zu failing%s\n", path.c_str(),
              v == "pass" ? "PASS" : v == "fail" ? "FAIL" : "NOT CONVERGED", run.summary.size(), run.names.size(),
              run.sweep.points.size(), run.nfail,
              run.failed_points.empty() ? "" : fmt::format(", {} point(s) not converged", run.failed_points.size()).c_str());
}

const char* FailedWhat(Termination t) {
  return t == Termination::kUnphysical ? "reached a physically impossible state" : "did not converge";
}

int CheckExitCode(const CheckRun& run) {
  if (!run.failed_points.empty()) return 3;
  return run.nfail ? 1 : 0;
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

// The knob that restores the margin and breaks nothing (null when none).
nlohmann::json AlternativeJson(const FixSuggestion& f) {
  if (!f.has_alternative) return nullptr;
  const FixSuggestion::Alternative& a = f.alternative;
  return {{"knob", a.knob}, {"unit", SiUnitName(a.dim)}, {"current", a.current}, {"suggested", a.suggested},
          {"margin_change_per_percent", a.per_percent}, {"newton_steps", a.newton_steps},
          {"envelope_passes_check", true}, {"breaks", nlohmann::json::array()}};
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
                  {"skipped_held", skipped}, {"catalog", SnapJson(f)}, {"alternative", AlternativeJson(f)},
                  {"alternatives_tried", f.alternatives_tried}});
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
