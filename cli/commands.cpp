// loopwright command line: argument parsing, tables, file output. Thin: the
// work is done in network/.
#include "cli/commands.h"

#include <unistd.h>

#include <chrono>
#include <thread>
#include <cstdio>
#include <iostream>
#include <set>

#include <CLI/CLI.hpp>
#include <fmt/format.h>

#include "cli/fit_command.h"
#include "cli/simulate_command.h"
#include "cli/output.h"
#include "library/oil.h"
#include "library/parts.h"
#include "network/case/fluid_spec.h"
#include "network/case/case.h"
#include "network/envelope/checks.h"
#include "network/envelope/fixes.h"
#include "network/envelope/sweep.h"
#include "network/design/sizing.h"
#include "network/envelope/results.h"
#include "network/point/run.h"
#include "network/case/schema.h"
#include "network/point/solver.h"
#include "network/point/system.h"

namespace loopwright::cli {

namespace {

constexpr int kExitOk = 0;
constexpr int kExitCheckFailed = 1;
constexpr int kExitInvalid = 2;
constexpr int kExitNotConverged = 3;
constexpr int kExitInternal = 4;

struct Common {
  std::string json_out;
  std::string csv_out;
  std::string units = "si";
  std::string json_detail = "full";
  bool quiet = false;
  UnitSystem system() const { return units == "us" ? UnitSystem::kUS : UnitSystem::kSI; }
};

void AddCommon(CLI::App* cmd, Common* c, bool csv) {
  cmd->add_option("--json", c->json_out, "write the results as JSON to FILE (atomically)");
  if (csv) cmd->add_option("--csv", c->csv_out, "write a CSV table to FILE (atomically)");
  if (csv)
    cmd->add_option("--json-detail", c->json_detail,
                    "full: every component's detail block; summary: flows, pressures, temperatures, checks and "
                    "warnings only (README, \"Results\")")
        ->check(CLI::IsMember({"full", "summary"}));
  cmd->add_option("--units", c->units, "units for printed output")->check(CLI::IsMember({"si", "us"}));
  cmd->add_flag("--quiet,-q", c->quiet, "print only errors and the verdict");
}

// Writes `text` to `file` atomically unless `file` is empty; false (after
// saying so) if it could not.
bool WriteOutput(const std::string& file, const std::string& text) {
  if (file.empty()) return true;
  std::string err;
  if (WriteFileAtomic(file, text, &err)) return true;
  std::fprintf(stderr, "error[write] %s\n", err.c_str());
  return false;
}

// Streams the results document to `file` atomically; false (after saying
// so) if it could not.
bool WriteResults(const std::string& file, const Case& cs, const std::vector<const PointResult*>& points,
                  const std::string& verdict, const ResultsExtras& extras, const std::string& detail_word) {
  JsonDetail detail = JsonDetail::kFull;
  ParseJsonDetail(detail_word, &detail);
  std::string err;
  auto write = [&](std::ostream& os) { WriteResultsJson(os, cs, points, verdict, extras, detail); };
  if (WriteFileAtomicStream(file, write, &err)) return true;
  std::fprintf(stderr, "error[write] %s\n", err.c_str());
  return false;
}

// The unit of an SI value of dimension `dim` as the JSON/CSV writers name it
// ("1" for dimensionless).
std::string UnitName(Dimension dim) { return SiUnitName(dim); }

// With `json_out`, the problems found (none for a clean case) are also
// written there as JSON, atomically (validate --json).
// The case-file size limit: --max-case-size, set once by Dispatch.
size_t case_size_limit = kMaxCaseBytes;

std::unique_ptr<Case> Load(const std::string& path, bool quiet, int* exit_code, const std::string& json_out = "") {
  LoadResult r = LoadCaseFile(path, DefaultLibraryDir(), case_size_limit);
  const std::string text = r.diagnostics.Format(path);
  if (!WriteOutput(json_out, r.diagnostics.ToJson(path))) {
    *exit_code = kExitInternal;
    return nullptr;
  }
  if (!r.value) {
    std::fputs(text.c_str(), stderr);
    std::fprintf(stderr, "%s: %zu error(s); the case was not run\n", path.c_str(), r.diagnostics.ErrorCount());
    *exit_code = kExitInvalid;
    return nullptr;
  }
  if (!quiet && !text.empty()) std::fputs(text.c_str(), stderr);
  return std::move(r.value);
}

int Validate(const std::string& path, const Common& c) {
  int code = kExitOk;
  auto cs = Load(path, c.quiet, &code, c.json_out);
  if (!cs) return code;
  if (!c.quiet) std::fputs(CaseSummary(*cs, c.system()).c_str(), stdout);
  std::printf("%s: valid\n", path.c_str());
  return kExitOk;
}

int Solve(const std::string& path, const std::string& point, const Common& c) {
  int code = kExitOk;
  auto cs = Load(path, c.quiet, &code);
  if (!cs) return code;
  int pi = 0;
  if (!point.empty()) {
    pi = FindPoint(*cs, point);
    if (pi < 0) {
      std::vector<std::string> names;
      for (auto& p : cs->envelope.points) names.push_back(p.name);
      std::string near = NearestName(point, names);
      std::fprintf(stderr, "error[unknown-point] --point: no operating point \"%s\"%s; points: %s\n", point.c_str(),
                   near.empty() ? "" : fmt::format(" (did you mean \"{}\"?)", near).c_str(),
                   fmt::format("{}", fmt::join(names, ", ")).c_str());
      return kExitInvalid;
    }
  }
  CaseSolver solver(*cs);
  PointResult res = solver.Solve(cs->envelope.points[pi], false);
  // The point's checks decide its verdict (the exit code of solve stays 0:
  // `check` is the verification command).
  std::vector<CheckOutcome> checks;
  std::vector<CheckWarning> cwarn;
  if (res.converged) checks = EvaluateChecks(*cs, cs->envelope.points[pi], res, &cwarn);
  bool all_pass = true;
  for (const auto& o : checks) all_pass = all_pass && o.pass;
  const std::string verdict = !res.converged ? "not-converged" : all_pass ? "pass" : "fail";
  ResultsExtras extras;
  extras.point_checks = {&checks};
  if (!c.json_out.empty() && !WriteResults(c.json_out, *cs, {&res}, verdict, extras, c.json_detail))
    return kExitInternal;
  if (!c.csv_out.empty() && !WriteOutput(c.csv_out, PointCsv(*cs, res))) return kExitInternal;
  if (!res.converged) {
    std::fflush(stdout);
    std::fprintf(stderr, "%s: point \"%s\" %s — no result is reported.\n%s\n", path.c_str(), res.name.c_str(),
                 res.summary.termination == Termination::kUnphysical ? "reached a physically impossible state"
                                                                     : "did not converge",
                 Localize(res.summary.Report(), c.system()).c_str());
    return kExitNotConverged;
  }
  if (!c.quiet) std::fputs(SolveTables(*cs, res, c.system()).c_str(), stdout);
  std::printf("%s: point \"%s\" solved (%s)\n", path.c_str(), res.name.c_str(), res.summary.Report().c_str());
  return kExitOk;
}

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

nlohmann::json FixesJson(const std::vector<FixSuggestion>& fixes) {
  nlohmann::json fj = nlohmann::json::array();
  for (const auto& f : fixes) {
    nlohmann::json skipped = nlohmann::json::array();
    for (const auto& k : f.skipped)
      skipped.push_back({{"knob", k.knob}, {"held", k.held}, {"margin_change_per_percent", k.per_percent}});
    fj.push_back({{"check", f.check}, {"where", f.where}, {"point", f.point}, {"knob", f.knob},
                  {"unit", UnitName(f.dim)}, {"current", f.current}, {"suggested", f.suggested}, {"found", f.found},
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

bool WriteCheckJson(const Case& cs, const Common& c, const CheckRun& run) {
  std::vector<const PointResult*> points;
  for (const auto& p : run.sweep.points) points.push_back(&p);
  return WriteResults(c.json_out, cs, points, run.verdict, CheckExtras(run), c.json_detail);
}

std::string CheckCsv(const CheckRun& run) {
  std::string csv = "point,check,where,value,limit,margin,unit,pass\n";
  for (size_t i = 0; i < run.per_point.size(); ++i)
    for (const auto& o : run.per_point[i])
      csv += fmt::format("{},{},{},{:.10g},{:.10g},{:.10g},{},{}\n", CsvField(run.names[i]), CsvField(o.name),
                         CsvField(o.where), o.value, o.limit, o.margin, UnitName(o.dim), o.pass ? "pass" : "fail");
  return csv;
}

// The tables, then the points without a result (stderr), then the outcome.
void PrintCheck(const Case& cs, const std::string& path, const Common& c, const CheckRun& run) {
  if (!c.quiet) std::fputs(CheckTable(cs, run.summary, run.sweep.warnings, c.system()).c_str(), stdout);
  if (!c.quiet) std::fputs(ModelWarningLines(cs, run.sweep.points, c.system()).c_str(), stdout);
  if (!c.quiet && !run.fixes.empty()) std::fputs(FixTable(run.fixes, c.system()).c_str(), stdout);
  if (!c.quiet && !run.fixes_note.empty()) std::printf("%s\n", run.fixes_note.c_str());
  std::fflush(stdout);  // the tables first, then the points without a result, in order
  for (const auto& r : run.sweep.points) {
    if (r.converged) continue;
    std::fprintf(stderr, "point \"%s\" %s and counts as failing: %s\n", r.name.c_str(),
                 r.summary.termination == Termination::kUnphysical ? "reached a physically impossible state"
                                                                   : "did not converge",
                 Localize(r.summary.Report(), c.system()).c_str());
  }
  const std::string& v = run.verdict;
  std::printf("%s: %s — %zu checks at %zu of %zu points, %zu failing%s\n", path.c_str(),
              v == "pass" ? "PASS" : v == "fail" ? "FAIL" : "NOT CONVERGED", run.summary.size(), run.names.size(),
              run.sweep.points.size(), run.nfail,
              run.failed_points.empty() ? "" : fmt::format(", {} point(s) not converged", run.failed_points.size()).c_str());
}

int Check(const std::string& path, const Common& c, bool no_fix, int threads, double tight) {
  int code = kExitOk;
  auto cs = Load(path, c.quiet, &code);
  if (!cs) return code;
  const CheckRun run = RunChecks(*cs, c, no_fix, threads, tight);
  if (!c.json_out.empty() && !WriteCheckJson(*cs, c, run)) return kExitInternal;
  if (!c.csv_out.empty() && !WriteOutput(c.csv_out, CheckCsv(run))) return kExitInternal;
  PrintCheck(*cs, path, c, run);
  if (!run.failed_points.empty()) return kExitNotConverged;
  return run.nfail ? kExitCheckFailed : kExitOk;
}

int Size(const std::string& path, const Common& c) {
  int code = kExitOk;
  auto cs = Load(path, c.quiet, &code);
  if (!cs) return code;
  if (cs->design.empty()) {
    std::fprintf(stderr, "error[no-design] %s /design: the case asks no design questions (add \"design\": [...])\n", path.c_str());
    return kExitInvalid;
  }
  std::vector<SizingAnswer> answers = AnswerDesignQuestions(*cs);
  if (!c.json_out.empty()) {
    nlohmann::json j = {{"tool", "loopwright"}, {"version", LOOPWRIGHT_VERSION}, {"case", cs->name},
                        {"cautions", SafetyCautions()}, {"answers", AnswersJson(answers)}};
    if (!WriteOutput(c.json_out, j.dump(2) + "\n")) return kExitInternal;
  }
  bool all = true;
  size_t infeasible = 0;
  for (const auto& a : answers) {
    all = all && a.feasible;
    infeasible += a.feasible ? 0 : 1;
  }
  if (!c.quiet) {
    std::printf("Case: %s — design questions (every answer checked at every envelope point)\n\n", cs->name.c_str());
    std::fputs(SizeAnswers(answers, c.system()).c_str(), stdout);
    std::printf("\n%s\n", SafetyCautions());
  }
  std::printf("%s: %zu design question(s) answered, %zu infeasible\n", path.c_str(), answers.size(), infeasible);
  return all ? kExitOk : kExitCheckFailed;
}

int LibraryList(const Common& c) {
  PartsCatalog cat = LoadPartsCatalog(DefaultLibraryDir());
  for (auto& e : cat.errors) std::fprintf(stderr, "warning[library] %s\n", e.c_str());
  std::fputs(LibraryTable(cat).c_str(), stdout);
  (void)c;
  return cat.errors.empty() ? kExitOk : kExitInvalid;
}

int LibraryShow(const std::string& id, const Common& c) {
  PartsCatalog cat = LoadPartsCatalog(DefaultLibraryDir());
  const PartEntry* p = cat.Find(id);
  if (!p) {
    std::string near = NearestName(id, cat.Ids());
    std::fprintf(stderr, "error[unknown-part] no part \"%s\" in the library%s\n", id.c_str(),
                 near.empty() ? "" : fmt::format("; did you mean \"{}\"?", near).c_str());
    return kExitInvalid;
  }
  if (!c.json_out.empty() && !WriteOutput(c.json_out, PartJson(*p, UnitSystem::kSI).dump(2) + "\n"))
    return kExitInternal;
  std::printf("%s\n", PartJson(*p, c.system()).dump(2).c_str());
  return kExitOk;
}

int Schema(const std::string& out) {
  std::string text = CaseSchema().dump(2) + "\n";
  if (out.empty()) {
    std::fputs(text.c_str(), stdout);
    return kExitOk;
  }
  return WriteOutput(out, text) ? kExitOk : kExitInternal;
}

// What the command line gave, and the subcommands to tell which was chosen.
struct Args {
  std::string case_path, point, part_id;
  Common common;
  bool no_fix = false;
  double tight = 0.05;
  int threads = 0;
  std::string fit_data, fit_model, fit_part, fit_id;
  std::string schema_out;
  std::string max_case_size;
  SimulateArgs sim;
  CLI::App *simulate = nullptr;
  CLI::App *validate = nullptr, *solve = nullptr, *check = nullptr, *size = nullptr, *fit = nullptr,
           *lib_list = nullptr, *lib_show = nullptr, *schema = nullptr;
};

// validate, solve, check, size: the commands that read a case.
void AddCaseCommands(CLI::App& app, Args* a) {
  a->validate = app.add_subcommand("validate", "check a case file and report every problem with its place");
  a->validate->add_option("CASE", a->case_path, "case file (JSON, // comments allowed)")->required();
  AddCommon(a->validate, &a->common, false);
  a->validate->get_option("--json")->description("write the problems found (errors and warnings) as JSON to FILE (atomically)");

  a->solve = app.add_subcommand("solve", "solve one operating point: pressures and flows");
  a->solve->add_option("CASE", a->case_path, "case file")->required();
  a->solve->add_option("--point", a->point, "operating point name (default: the first)");
  AddCommon(a->solve, &a->common, true);

  auto* check = a->check = app.add_subcommand("check", "solve every envelope point: verdict per check, worst point, margin");
  check->add_option("CASE", a->case_path, "case file")->required();
  AddCommon(check, &a->common, true);
  check->add_flag("--no-fix", a->no_fix, "skip the search for what would fix failing (and tight) checks");
  check->add_option("--tight", a->tight, "a passing check is tight below this fraction of its limit to spare (default 0.05; temperatures: 5 K)")
      ->check(CLI::Range(0.0, 1.0));
  check->add_option("--threads", a->threads, "threads for the sweep (default: one per 200 points, up to the core count)")->check(CLI::Range(0, 256));

  a->size = app.add_subcommand("size", "answer the case's design questions across the whole envelope");
  a->size->add_option("CASE", a->case_path, "case file")->required();
  AddCommon(a->size, &a->common, false);
  auto* sim = a->simulate = app.add_subcommand("simulate", "run a scenario through time: temperatures, flows, peaks");
  sim->add_option("CASE", a->case_path, "case file")->required();
  sim->add_option("--scenario", a->sim.scenario, "scenario id (the case's \"scenarios\")")->required();
  sim->add_option("--json", a->sim.json_out, "write the time series and peaks as JSON to FILE (atomically)");
  sim->add_option("--csv", a->sim.csv_out, "write the time series as CSV to FILE (atomically)");
  sim->add_option("--rtol", a->sim.rtol, "CVODE relative tolerance (default 1e-6)")->check(CLI::Range(1e-12, 1e-2));
  sim->add_option("--atol", a->sim.atol_k, "CVODE absolute tolerance in K (default 1e-4)")->check(CLI::Range(1e-12, 1.0));
  sim->add_option("--interval", a->sim.interval, "output interval in s (default: the scenario's, else end/200)")
      ->check(CLI::PositiveNumber);
  sim->add_option("--units", a->common.units, "units for printed output")->check(CLI::IsMember({"si", "us"}));
  sim->add_flag("--quiet,-q", a->sim.quiet, "print only errors and the outcome");
  for (CLI::App* cmd : {a->validate, a->solve, check, a->size, sim})
    cmd->add_option("--max-case-size", a->max_case_size,
                    "refuse case files larger than this, with a unit (default \"8 MiB\"; e.g. \"64 MiB\")");
}

// fit, library, schema.
void AddOtherCommands(CLI::App& app, Args* a) {
  auto* fit = a->fit = app.add_subcommand("fit", "calibrate a component model from datasheet or test points");
  fit->add_option("DATA", a->fit_data, "points: CSV with 'name [unit]' headers, or JSON")->required();
  fit->add_option("--model", a->fit_model, "centrifugal_pump | displacement_pump | filter | air_cooler | valve")->required();
  fit->add_option("--json", a->common.json_out, "write the fit report as JSON to FILE (atomically)");
  fit->add_option("--part", a->fit_part, "write a parts-library file holding the fitted part (atomically)");
  fit->add_option("--id", a->fit_id, "id of the fitted part (default: fit-<data file stem>)");
  fit->add_flag("--quiet,-q", a->common.quiet, "print only errors and the result");

  auto* library = app.add_subcommand("library", "browse the parts and fluids catalog");
  library->require_subcommand(1);
  a->lib_list = library->add_subcommand("list", "list every part");
  a->lib_show = library->add_subcommand("show", "show one part");
  a->lib_show->add_option("ID", a->part_id, "part id")->required();
  AddCommon(a->lib_show, &a->common, false);

  a->schema = app.add_subcommand("schema", "print the JSON Schema of case files (generated from the component registry)");
  a->schema->add_option("--output,-o", a->schema_out, "write it to FILE (atomically) instead of printing");
}

int Dispatch(const Args& a) {
  const Common& common = a.common;
  std::string error;
  if (!a.max_case_size.empty() && !ParseByteSize(a.max_case_size, &case_size_limit, &error)) {
    std::fprintf(stderr, "error[bad-option] --max-case-size: %s\n", error.c_str());
    return kExitInvalid;
  }
  if (*a.validate) return Validate(a.case_path, common);
  if (*a.solve) return Solve(a.case_path, a.point, common);
  if (*a.simulate) {
    int code = kExitOk;
    auto cs = Load(a.case_path, a.sim.quiet, &code);
    if (!cs) return code;
    SimulateArgs sim = a.sim;
    sim.units = common.system();
    return SimulateMain(*cs, sim);
  }
  if (*a.check) return Check(a.case_path, common, a.no_fix, a.threads, a.tight);
  if (*a.size) return Size(a.case_path, common);
  if (*a.fit) return FitMain(a.fit_data, a.fit_model, common.json_out, a.fit_part, a.fit_id, common.quiet);
  if (*a.lib_list) return LibraryList(common);
  if (*a.lib_show) return LibraryShow(a.part_id, common);
  if (*a.schema) return Schema(a.schema_out);
  return kExitInternal;
}

}  // namespace

int Main(int argc, char** argv) {
  CLI::App app{"loopwright: sizes and verifies oil and coolant loops of pressure-fed bearings.\n" +
               std::string(SafetyCautions())};
  app.set_version_flag("--version", std::string("loopwright ") + LOOPWRIGHT_VERSION);
  app.require_subcommand(1);
  Args args;
  AddCaseCommands(app, &args);
  AddOtherCommands(app, &args);
  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    int r = app.exit(e);
    return r == 0 ? kExitOk : kExitInvalid;
  }
  try {
    return Dispatch(args);
  } catch (const std::exception& e) {
    std::fprintf(stderr, "internal error: %s\n", e.what());
    return kExitInternal;
  } catch (...) {
    std::fprintf(stderr, "internal error\n");
    return kExitInternal;
  }
}

}  // namespace loopwright::cli
