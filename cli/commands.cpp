// loopwright command line: argument parsing, tables, file output. Thin: the
// work is done in network/.
#include "cli/commands.h"

#include <unistd.h>

#include <algorithm>
#include <chrono>
#include <memory>
#include <thread>
#include <cstdio>
#include <iostream>
#include <set>

#include <CLI/CLI.hpp>
#include <fmt/format.h>

#include "cli/check_run.h"
#include "cli/check_shard.h"
#include "cli/fit_command.h"
#include "cli/report.h"
#include "cli/spread_command.h"
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


// The case-file size limit: --max-case-size, set once by Dispatch.
size_t case_size_limit = kMaxCaseBytes;

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
  // The solver is gone before the checks and the writers run: a point's
  // result refers to the case alone (network/point/run.h), and a plant-size
  // case's checks and output reuse the solver's memory.
  PointResult res = SolveOnce(*cs, cs->envelope.points[pi]);
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
  if (!c.quiet) std::fputs((SolveTables(*cs, res, c.system()) + PointCheckLines(checks, c.system())).c_str(), stdout);
  size_t failing = 0;
  for (const auto& o : checks) failing += o.pass ? 0 : 1;
  std::printf("%s: point \"%s\" solved (%s); its checks: %s\n", path.c_str(), res.name.c_str(),
              res.summary.Report().c_str(),
              failing == 0 ? fmt::format("all {} pass", checks.size()).c_str()
                           : fmt::format("{} of {} FAIL", failing, checks.size()).c_str());
  return kExitOk;
}

bool WriteCheckJson(const Case& cs, const Common& c, const CheckRun& run) {
  std::vector<const PointResult*> points;
  for (const auto& p : run.sweep.points) points.push_back(&p);
  return WriteResults(c.json_out, cs, points, run.verdict, CheckExtras(run), c.json_detail);
}

// `shard`: --shard, --shard-count, --no-shard (cli/check_shard.h).
int Check(const std::string& path, const Common& c, bool no_fix, int threads, double tight, const SpreadArgs& shard) {
  ShardChoice choice;
  if (!PickShard(shard.shard, shard.shard_count, shard.no_shard, c.json_out, c.csv_out, &choice)) return kExitInvalid;
  int code = kExitOk;
  auto cs = Load(path, c.quiet, &code);
  if (!cs) return code;
  if (!choice.source.empty()) return CheckShard(*cs, path, c, no_fix, threads, tight, choice.shard, choice.shards);
  const CheckRun run = RunChecks(*cs, c, no_fix, threads, tight);
  if (!c.json_out.empty() && !WriteCheckJson(*cs, c, run)) return kExitInternal;
  if (!c.csv_out.empty() && !WriteOutput(c.csv_out, CheckCsv(run))) return kExitInternal;
  PrintCheck(*cs, path, c, run);
  return CheckExitCode(run);
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

// report: what it runs, then the page (and the Markdown summary), each
// written atomically. The exit code is 0 once written, whatever the verdict
// (as for solve: `check` is the verification command).
int Report(const std::string& path, const Common& c, const ReportOptions& opt, const std::string& html_out,
           const std::string& md_out) {
  int code = kExitOk;
  auto cs = Load(path, c.quiet, &code);
  if (!cs) return code;
  if (!opt.point.empty() && FindPoint(*cs, opt.point) < 0) {
    std::vector<std::string> names;
    for (auto& p : cs->envelope.points) names.push_back(p.name);
    std::fprintf(stderr, "error[unknown-point] --point: no operating point \"%s\"; points: %s\n", opt.point.c_str(),
                 fmt::format("{}", fmt::join(names, ", ")).c_str());
    return kExitInvalid;
  }
  const auto t0 = std::chrono::steady_clock::now();
  std::unique_ptr<CheckRun> run;
  if (opt.envelope) run = std::make_unique<CheckRun>(RunChecks(*cs, c, opt.no_fix, opt.threads, opt.tight));
  std::string error, html;
  const ReportData data = BuildReport(*cs, path, run.get(), opt, c.system(), &error);
  if (!error.empty()) std::fprintf(stderr, "warning[report] %s\n", error.c_str());
  if (!ReportHtml(data, DefaultWebDir(), &html, &error)) {
    std::fprintf(stderr, "error[report] %s\n", error.c_str());
    return kExitInternal;
  }
  if (!WriteOutput(html_out, html) || !WriteOutput(md_out, ReportMarkdown(data))) return kExitInternal;
  const double seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  if (!c.quiet) std::printf("%s\n", ReportMarkdown(data).c_str());
  std::printf("%s: report written to %s (%zu bytes, %.2f s)%s\n", path.c_str(), html_out.c_str(), html.size(), seconds,
              md_out.empty() ? "" : fmt::format(", summary to {}", md_out).c_str());
  return kExitOk;
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
  ReportOptions report;
  std::vector<std::string> report_runs;
  std::string report_out, report_md;
  CLI::App *report_cmd = nullptr;
  SpreadArgs spread_args;
  SpreadArgs check_shard;  // check's --shard, --shard-count, --no-shard
  CLI::App *spread = nullptr, *merge = nullptr;
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
  check->add_option("--shard", a->check_shard.shard, "solve only slice K of N of the envelope (1 <= K <= N) and write its "
                    "partial result (--json); default: the scheduler's array index variables (README, \"Sharding\")");
  check->add_option("--shard-count", a->check_shard.shard_count, "N where the scheduler gives only the index (Kubernetes, GNU parallel)")
      ->check(CLI::Range(1, 1000000));
  check->add_flag("--no-shard", a->check_shard.no_shard, "check the whole envelope even where a scheduler's index variables are set");

  a->size = app.add_subcommand("size", "answer the case's design questions across the whole envelope");
  a->size->add_option("CASE", a->case_path, "case file")->required();
  AddCommon(a->size, &a->common, false);
  auto* report = a->report_cmd = app.add_subcommand(
      "report", "write one self-contained HTML page for a review: verdict, margins, fixes, the loops drawn, plots");
  report->add_option("CASE", a->case_path, "case file")->required();
  report->add_option("--output,-o", a->report_out, "the page: write it to FILE.html (atomically)")->required();
  report->add_option("--md", a->report_md, "also write the summary as Markdown to FILE (atomically)");
  report->add_option("--run", a->report_runs,
                     "what to run: envelope, sizing, scenarios, spread (default all; comma-separated; spread: "
                     "the tolerance study, when the case has tolerances)")
      ->delimiter(',')
      ->check(CLI::IsMember({"envelope", "sizing", "scenarios", "spread"}));
  report->add_option("--spread-samples", a->report.spread_samples, "samples of the tolerance study (default 200)")
      ->check(CLI::Range(1ULL, 100000000ULL));
  report->add_option("--point", a->report.point,
                     "point the drawing is annotated at (default: the governing point of the worst check)");
  report->add_option("--grid-check", a->report.grid_checks,
                     "check plotted against each grid axis (repeatable; default: the three worst)");
  report->add_option("--units", a->common.units, "units for the page")->check(CLI::IsMember({"si", "us"}));
  report->add_flag("--quiet,-q", a->common.quiet, "print only errors and the outcome");
  report->add_flag("--no-fix", a->report.no_fix, "skip the search for what would fix failing (and tight) checks");
  report->add_option("--tight", a->report.tight, "tight band, as for check (default 0.05)")->check(CLI::Range(0.0, 1.0));
  report->add_option("--threads", a->report.threads, "threads for the sweep (as for check)")->check(CLI::Range(0, 256));
  auto* sim = a->simulate = app.add_subcommand("simulate", "run a scenario through time: temperatures, flows, peaks");
  sim->add_option("CASE", a->case_path, "case file")->required();
  sim->add_option("--scenario", a->sim.scenario, "scenario id (the case's \"scenarios\"; may be left out when the case has one)");
  sim->add_option("--json", a->sim.json_out, "write the time series and peaks as JSON to FILE (atomically)");
  sim->add_option("--csv", a->sim.csv_out, "write the time series as CSV to FILE (atomically)");
  sim->add_option("--rtol", a->sim.rtol, "CVODE relative tolerance (default 1e-6)")->check(CLI::Range(1e-12, 1e-2));
  sim->add_option("--atol", a->sim.atol_k, "CVODE absolute tolerance in K (default 1e-4)")->check(CLI::Range(1e-12, 1.0));
  sim->add_option("--interval", a->sim.interval, "output interval in s (default: the scenario's, else end/200)")
      ->check(CLI::PositiveNumber);
  sim->add_option("--units", a->common.units, "units for printed output")->check(CLI::IsMember({"si", "us"}));
  sim->add_flag("--quiet,-q", a->sim.quiet, "print only errors and the outcome");
  sim->add_option("--earliest", a->sim.earliest,
                  "sizing in time: the earliest time of this event (e.g. the one ending an after-run) that keeps --keep "
                  "at or below --below through the scenario");
  sim->add_option("--keep", a->sim.keep, "with --earliest: the mass or \"loop/node\" to keep below the limit");
  sim->add_option("--below", a->sim.below, "with --earliest: the limit, a temperature (e.g. \"100 degC\")");
  sim->add_option("--up-to", a->sim.up_to, "with --earliest: the latest event time searched (default the scenario's end)");
  for (CLI::App* cmd : {a->validate, a->solve, check, a->size, report, sim})
    cmd->add_option("--max-case-size", a->max_case_size,
                    "refuse case files larger than this, with a unit (default \"8 MiB\"; e.g. \"64 MiB\")");
}

// spread, merge: the tolerance study.
void AddSpreadCommands(CLI::App& app, Args* a) {
  SpreadArgs& s = a->spread_args;
  auto* sp = a->spread = app.add_subcommand("spread", "tolerance study: probability of failing each check, first order and sampled");
  sp->add_option("CASE", s.case_path, "case file with \"tolerances\"")->required();
  sp->add_option("--samples", s.samples, "samples to solve over the envelope (default 1000)");
  sp->add_option("--method", s.method, "lhs: Latin hypercube (default); mc: Monte Carlo")->check(CLI::IsMember({"lhs", "mc"}));
  sp->add_option("--seed", s.seed, "seed of the random streams (default 1)");
  sp->add_option("--threads", s.threads, "threads (default: the core count); results do not depend on it")->check(CLI::Range(0, 256));
  sp->add_option("--shard", s.shard, "run only slice K of N (1 <= K <= N) and write its partial result (--json); "
                                     "default: the scheduler's array index variables (README, \"Sharding\")");
  sp->add_option("--shard-count", s.shard_count, "N where the scheduler gives only the index (Kubernetes, GNU parallel)")
      ->check(CLI::Range(1, 1000000));
  sp->add_flag("--no-shard", s.no_shard, "run the whole study even where a scheduler's index variables are set");
  sp->add_option("--settle", s.settle_k, "the thermostats' sensed temperatures settled to this many K at each sampled "
                                        "point (default 1e-6; `check` uses 2e-9)")
      ->check(CLI::Range(1e-12, 1e-3));
  sp->add_option("--margins-csv", s.margins_csv, "write every sample's least margin of every check (SI) as CSV (atomically)");
  sp->add_option("--samples-csv", s.samples_csv, "write every sample's drawn values (this shard's) as CSV (atomically)");
  AddCommon(sp, &a->common, false);
  sp->add_option("--csv", a->common.csv_out, "write one row per check as CSV to FILE (atomically)");
  sp->get_option("--json")->description("write the result as JSON to FILE (atomically); with a shard, its partial result");
  sp->add_option("--max-case-size", a->max_case_size, "refuse case files larger than this, with a unit (default \"8 MiB\")");

  auto* mg = a->merge = app.add_subcommand("merge", "combine the partial results of `spread --shard` or `check --shard` into the whole run's result");
  mg->add_option("PARTS", s.parts, "partial result files, one per shard, in any order")->required();
  mg->add_option("--case", s.merge_case, "check parts: the case file (default: the path the shards were given); "
                                        "refused unless its bytes are the ones they solved");
  mg->add_option("--json,-o", a->common.json_out, "write the result as JSON to FILE (atomically)");
  mg->add_option("--csv", a->common.csv_out, "write one row per check as CSV to FILE (atomically)");
  mg->add_option("--units", a->common.units, "units for printed output")->check(CLI::IsMember({"si", "us"}));
  mg->add_flag("--quiet,-q", a->common.quiet, "print only errors and the one-line outcome");
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
  if (*a.check) return Check(a.case_path, common, a.no_fix, a.threads, a.tight, a.check_shard);
  if (*a.size) return Size(a.case_path, common);
  if (*a.report_cmd) {
    ReportOptions opt = a.report;
    if (!a.report_runs.empty()) {
      auto has = [&](const char* w) { return std::find(a.report_runs.begin(), a.report_runs.end(), w) != a.report_runs.end(); };
      opt.envelope = has("envelope");
      opt.sizing = has("sizing");
      opt.scenarios = has("scenarios");
      opt.spread = has("spread");
    }
    return Report(a.case_path, common, opt, a.report_out, a.report_md);
  }
  if (*a.fit) return FitMain(a.fit_data, a.fit_model, common.json_out, a.fit_part, a.fit_id, common.quiet);
  if (*a.lib_list) return LibraryList(common);
  if (*a.lib_show) return LibraryShow(a.part_id, common);
  if (*a.schema) return Schema(a.schema_out);
  if (*a.spread)
    return SpreadMain(a.spread_args, common.json_out, common.csv_out, common.units == "us", common.quiet);
  if (*a.merge) return MergeMain(a.spread_args, common.json_out, common.csv_out, common.units == "us", common.quiet);
  return kExitInternal;
}

}  // namespace

// Writes `text` to `file` atomically unless `file` is empty; false (after
// saying so) if it could not.
bool WriteOutput(const std::string& file, const std::string& text) {
  if (file.empty()) return true;
  std::string err;
  if (WriteFileAtomic(file, text, &err)) return true;
  std::fprintf(stderr, "error[write] %s\n", err.c_str());
  return false;
}

// With `json_out`, the problems found (none for a clean case) are also
// written there as JSON, atomically (validate --json).
std::unique_ptr<Case> Load(const std::string& path, bool quiet, int* exit_code, const std::string& json_out) {
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

int Main(int argc, char** argv) {
  CLI::App app{"loopwright: sizes and verifies oil and coolant loops of pressure-fed bearings.\n" +
               std::string(SafetyCautions())};
  app.set_version_flag("--version", std::string("loopwright ") + LOOPWRIGHT_VERSION);
  app.require_subcommand(1);
  Args args;
  AddCaseCommands(app, &args);
  AddOtherCommands(app, &args);
  AddSpreadCommands(app, &args);
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
