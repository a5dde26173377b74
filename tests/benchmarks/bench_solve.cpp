// Solve-speed benchmark (not a test): microseconds per solve of the demo loop,
// warm and cold, and milliseconds for a synthetic supply header with N
// bearing branches; then the cost of sensitivities per design knob (exact
// tangent vs two re-solves); the envelope sweep also times EvaluateChecks
// alone over its converged points. Run: build/tests/benchmarks/lw_bench [max_N]
// (or lw_bench --campaign N: the random-network campaign, campaign_bench.cpp;
// lw_bench --spread [N] [T]: the tolerance study, spread_bench.cpp;
// lw_bench --sweep [R]: only the envelope sweep, R times; lw_bench --load
// [max_N]: only the load time of the header case; lw_bench --case FILE:
// one case file as `loopwright solve --json OUT --json-detail summary` runs
// it, with load, solve, checks and write timed apart and the peak RSS, as one
// JSON line, for tests/benchmarks/header_bench.py)
#include <algorithm>
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <sstream>
#include <string>

#include <sys/resource.h>
#ifdef __GLIBC__
#include <malloc.h>
#endif

#include <fmt/format.h>
#include <nlohmann/json.hpp>

#include "library/process_memory.h"
#include "network/case/case.h"
#include "network/envelope/checks.h"
#include "network/envelope/results.h"
#include "network/point/run.h"
#include "network/envelope/sensitivity.h"
#include "network/envelope/sweep.h"
#include "network/point/solver.h"
#include "network/point/system.h"

using namespace loopwright;
using Clock = std::chrono::steady_clock;

namespace {

double Seconds(Clock::time_point a, Clock::time_point b) { return std::chrono::duration<double>(b - a).count(); }

// The process's resident peak since the last call [kB] (Linux: VmHWM of
// /proc/self/status, then reset by writing 5 to /proc/self/clear_refs), so
// that each phase of `--case` reports its own peak; -1 elsewhere.
long PhasePeakKb() {
  long kb = -1;
  std::ifstream st("/proc/self/status");
  for (std::string line; std::getline(st, line);)
    if (line.rfind("VmHWM:", 0) == 0) kb = std::atol(line.c_str() + 6);
  std::ofstream("/proc/self/clear_refs") << "5";
  return kb;
}

// The heap's live bytes now [kB] (glibc mallinfo2: blocks in use from the
// arena and from mmap), to tell what each stage holds; -1 elsewhere.
long LiveHeapKb() {
#ifdef __GLIBC__
  const struct mallinfo2 mi = mallinfo2();
  return static_cast<long>((mi.uordblks + mi.hblkhd) / 1024);
#else
  return -1;
#endif
}

// A header of N segments, each feeding one journal bearing through a tube.
std::string HeaderCase(int n) {
  std::string nodes = R"({"id": "sump", "boundary": {"kind": "reservoir", "pressure": 0}},
    {"id": "pump_out"}, {"id": "housing", "boundary": {"kind": "pressure", "pressure": "0.5 bar"}})";
  std::string comps = fmt::format(
      R"({{"id": "pump", "type": "displacement_pump", "from": "sump", "to": "pump_out",
          "displacement": "{} cm3/rev", "speed": "1450 rpm", "slip": 1.5e-13}},
         {{"id": "relief", "type": "relief_valve", "from": "pump_out", "to": "sump", "crack": "8 bar", "rated_flow": "{} L/min"}},
         {{"id": "h0", "type": "tube", "from": "pump_out", "to": "n0", "length": "1 m", "diameter": "{} mm"}})",
      0.05 * n + 2, 0.05 * n * 1.45 + 5, 10 + 0.2 * std::sqrt(n));
  for (int i = 0; i < n; ++i) {
    nodes += fmt::format(R"(, {{"id": "n{}"}}, {{"id": "f{}"}})", i, i);
    if (i + 1 < n)
      comps += fmt::format(R"(, {{"id": "h{}", "type": "tube", "from": "n{}", "to": "n{}", "length": "0.3 m", "diameter": "{:.3f} mm"}})",
                           i + 1, i, i + 1, 10 + 0.2 * std::sqrt(n - i));
    comps += fmt::format(R"(, {{"id": "l{}", "type": "tube", "from": "n{}", "to": "f{}", "length": "0.5 m", "diameter": "4 mm"}})", i, i, i);
    comps += fmt::format(
        R"(, {{"id": "b{}", "type": "journal_bearing", "from": "f{}", "to": "housing", "diameter": "40 mm", "length": "30 mm",
            "radial_clearance": "{:.1f} um", "eccentricity": 0.5}})",
        i, i, 40.0 + (i % 7));
  }
  return fmt::format(R"({{"name": "header {}", "fluids": {{"oil": {{"kind": "oil", "kv40": "32 cSt", "kv100": "5.4 cSt"}}}},
      "loops": [{{"id": "l", "fluid": "oil", "temperature": "60 degC", "nodes": [{}], "components": [{}]}}]}})",
                     n, nodes, comps);
}

// Load time of the header case (the text is built beforehand): the JSON parse
// alone, then the whole LoadCaseText (parse, validation, topology), best of
// `reps`.
void ReportLoad(int n, int reps) {
  const std::string text = HeaderCase(n);
  double parse = 1e30, load = 1e30;
  for (int r = 0; r < reps; ++r) {
    nlohmann::json doc;
    Diagnostics d;
    auto a = Clock::now();
    if (!ParseJsonText(text, &doc, &d, text.size())) std::exit(2);
    auto b = Clock::now();
    LoadResult lr = LoadCaseText(text, "bench", DefaultLibraryDir(), text.size());
    auto c = Clock::now();
    if (!lr.value) std::exit(2);
    parse = std::min(parse, Seconds(a, b));
    load = std::min(load, Seconds(b, c));
  }
  std::printf("%-28s %8.1f MB  parse %9.3f ms  load %9.3f ms  (%.2f us/bearing)\n",
              fmt::format("load header N={}", n).c_str(), text.size() / 1e6, 1e3 * parse, 1e3 * load, 1e6 * load / n);
}

void Report(const char* what, const std::string& path_or_text, bool is_text, int reps) {
  LoadResult lr = is_text ? LoadCaseText(path_or_text, "bench", DefaultLibraryDir(), size_t(1) << 30)
                          : LoadCaseFile(path_or_text, DefaultLibraryDir());
  if (!lr.value) {
    std::fprintf(stderr, "%s", lr.diagnostics.Format("bench").c_str());
    std::exit(2);
  }
  const Case& cs = *lr.value;
  auto t0 = Clock::now();
  NetworkSystem sys(cs);
  NetworkSolver solver(&sys);
  auto t1 = Clock::now();
  Eigen::VectorXd u;
  // First solve includes the symbolic analysis.
  PointResult first = SolvePoint(cs, cs.envelope.points[0], &sys, &solver, &u, false);
  auto t2 = Clock::now();
  if (!first.converged) {
    std::fprintf(stderr, "%s: not converged: %s\n", what, first.summary.Report().c_str());
    std::exit(3);
  }
  // Cold solves: linear starting guess each time, structure reused.
  double cold = 0;
  int cold_iters = 0;
  for (int r = 0; r < reps; ++r) {
    auto a = Clock::now();
    ApplyPoint(cs, cs.envelope.points[0], &sys);
    sys.StartingGuess(&u);
    SolverSummary s = solver.Solve(&u);
    cold += Seconds(a, Clock::now());
    cold_iters += s.newton_iterations;
  }
  // Warm solves: from the previous answer after a small change of a
  // parameter (the loop temperature by 0.5 K, alternating).
  double warm = 0;
  int warm_iters = 0;
  OperatingPoint op = cs.envelope.points[0];
  for (int r = 0; r < reps; ++r) {
    auto& loop = const_cast<LoopSpec&>(cs.loops[0]);
    if (loop.temperature_variable >= 0) op.values[loop.temperature_variable] += (r % 2 ? -0.5 : 0.5);
    else loop.temperature += (r % 2 ? -0.5 : 0.5);
    auto a = Clock::now();
    ApplyPoint(cs, op, &sys);
    SolverSummary s = solver.Solve(&u);
    warm += Seconds(a, Clock::now());
    warm_iters += s.newton_iterations;
    if (!s.converged()) std::fprintf(stderr, "warm solve failed\n");
  }
  std::printf("%-28s unknowns %8d  build %9.3f ms  first %9.3f ms  cold %10.2f us (%.1f it)  warm %10.2f us (%.1f it)\n",
              what, sys.NumUnknowns(), 1e3 * Seconds(t0, t1), 1e3 * Seconds(t1, t2), 1e6 * cold / reps,
              double(cold_iters) / reps, 1e6 * warm / reps, double(warm_iters) / reps);
}

// Sensitivities: per knob, the exact tangent (one factorisation per point
// shared by every knob) against a central difference of two re-solves.
void ReportTangents(const char* what, const std::string& path_or_text, bool is_text, const char* point) {
  LoadResult lr = is_text ? LoadCaseText(path_or_text, "bench", DefaultLibraryDir(), size_t(1) << 30)
                          : LoadCaseFile(path_or_text, DefaultLibraryDir());
  if (!lr.value) std::exit(2);
  const Case& cs = *lr.value;
  const int pi = point ? FindPoint(cs, point) : 0;
  const OperatingPoint& op = cs.envelope.points[pi < 0 ? 0 : pi];
  CaseSolver solver(cs);
  if (!solver.Solve(op, false).converged) std::exit(3);
  const auto knobs = DesignKnobs(cs);
  const size_t nk = std::min<size_t>(knobs.size(), 50);
  auto t0 = Clock::now();
  PointTangents pt(&solver, op);
  auto t1 = Clock::now();
  int sweeps = 0, settled = 0;
  for (size_t i = 0; i < nk; ++i) {
    const StateTangent t = pt.Tangent(knobs[i]);
    sweeps += t.sweeps;
    settled += t.ok;
  }
  auto t2 = Clock::now();
  // The same tangents by block Gauss-Seidel sweeps alone (the reference in
  // this run; thermal points only).
  TangentOptions gs;
  gs.direct_unknowns = 0;
  PointTangents pg(&solver, op, gs);
  int gs_sweeps = 0, gs_settled = 0;
  auto g0 = Clock::now();
  for (size_t i = 0; i < nk; ++i) {
    const StateTangent t = pg.Tangent(knobs[i]);
    gs_sweeps += t.sweeps;
    gs_settled += t.ok;
  }
  auto g1 = Clock::now();
  for (size_t i = 0; i < nk; ++i) {
    const double v0 = KnobValue(&solver, knobs[i]);
    SetKnobValue(&solver, knobs[i], v0 * (1 + 1e-4));
    solver.Solve(op, true);
    SetKnobValue(&solver, knobs[i], v0 * (1 - 1e-4));
    solver.Solve(op, true);
    SetKnobValue(&solver, knobs[i], v0);
  }
  auto t3 = Clock::now();
  std::printf("%-28s knobs %4zu  factorise %8.3f ms  tangent %9.3f ms/knob (%.1f iterations, %d settled)  "
              "sweeps alone %9.3f ms/knob (%.1f, %d settled)  two re-solves %9.3f ms/knob\n",
              what, nk, 1e3 * Seconds(t0, t1), 1e3 * Seconds(t1, t2) / nk, double(sweeps) / nk, settled,
              1e3 * Seconds(g0, g1) / nk, double(gs_sweeps) / nk, gs_settled, 1e3 * Seconds(t2, t3) / nk);
}

// Envelope sweep of the thermal demo with a full-factorial grid added
// (boost x ambient x coolant temperature x clogging x heat soak), on 1 and 2
// threads, as `loopwright check` runs it.
void ReportSweep(const std::string& path) {
  std::ifstream in(path);
  std::stringstream ss;
  ss << in.rdbuf();
  nlohmann::json doc;
  Diagnostics d;
  if (!ParseJsonText(ss.str(), &doc, &d)) std::exit(2);
  doc["envelope"]["grids"] = nlohmann::json::array(
      {{{"name", "bench"},
        {"axes",
         {{"boost", {"0 psi", "5 psi", "10 psi", "15 psi", "20 psi", "25 psi", "30 psi"}},
          {"ambient", {"-10 degC", "5 degC", "20 degC", "35 degC", "45 degC"}},
          {"coolant_temperature", {"60 degC", "70 degC", "80 degC"}},
          {"clogging", {1.0, 2.0, 3.0}},
          {"heat_soak", {"100 W", "200 W", "300 W"}}}}}});
  const std::string text = doc.dump();
  LoadResult lr = LoadCaseText(text, path, DefaultLibraryDir(), size_t(1) << 30);
  if (!lr.value) {
    std::fprintf(stderr, "%s", lr.diagnostics.Format("bench").c_str());
    std::exit(2);
  }
  SweepResult r;
  for (int threads : {1, 2}) {
    auto a = Clock::now();
    r = SolveEnvelope(*lr.value, threads);
    const double t = Seconds(a, Clock::now());
    size_t conv = 0;
    for (const auto& p : r.points) conv += p.converged ? 1 : 0;
    std::printf("%-28s points %5zu  threads %d  %8.3f s  (%zu converged)\n", "demo apu_test_cell + grid",
                r.points.size(), threads, t, conv);
  }
  // The checks alone: EvaluateChecks at every converged point of the sweep,
  // 20 times over (the part of the sweep the check table makes typed).
  const Case& cs = *lr.value;
  size_t evaluated = 0, outcomes = 0;
  auto a = Clock::now();
  for (int rep = 0; rep < 20; ++rep)
    for (size_t i = 0; i < r.points.size(); ++i) {
      if (!r.points[i].converged) continue;
      std::vector<CheckWarning> w;
      outcomes += EvaluateChecks(cs, cs.envelope.points[i], r.points[i], &w).size();
      ++evaluated;
    }
  const double t = Seconds(a, Clock::now());
  std::printf("%-28s points %5zu  checks %5zu/point  %8.2f us/point\n", "checks alone (EvaluateChecks)", evaluated,
              evaluated ? outcomes / evaluated : 0, 1e6 * t / std::max<size_t>(evaluated, 1));
}

// --case FILE [--json OUT] [--json-detail summary|full] [--max-case-size SIZE]
// [--flow ID] [--co-content-only] [--load-only]: loads FILE (with --load-only: only that), solves its first point (CaseSolver, as `solve`),
// evaluates the point's checks and writes the results document to OUT
// (default: discarded, written to /dev/null), each timed alone; prints
// {"load_s", "solve_s", "checks_s", "write_s", "peak_rss_kB", "converged",
// "newton_iterations", "flow_m3_s", "phase_peak_kB"} (each phase's own
// resident peak, Linux), "live_heap_kB" (the heap in use after the load,
// the solver's construction, the solve, the solver's release and the
// checks; glibc); the flow of component ID of the first
// loop, default "h0").
struct CaseFileArgs {
  std::string path, out = "/dev/null", flow_id = "h0";
  JsonDetail detail = JsonDetail::kSummary;
  bool co_content_only = false;  // the co-content Newton alone (no plain Newton first)
  bool load_only = false;        // stop after the load: {"load_s", "peak_rss_kB"}
  size_t limit = kMaxCaseBytes;
};

// --case's arguments; false (the usage printed) when they do not read.
bool ParseCaseFileArgs(int argc, char** argv, CaseFileArgs* a) {
  std::string detail_word = "summary";
  for (int i = 2; i < argc; ++i) {
    const std::string w = argv[i];
    const bool has_value = i + 1 < argc;
    if (w == "--json" && has_value) a->out = argv[++i];
    else if (w == "--json-detail" && has_value) detail_word = argv[++i];
    else if (w == "--flow" && has_value) a->flow_id = argv[++i];
    else if (w == "--co-content-only") a->co_content_only = true;
    else if (w == "--load-only") a->load_only = true;
    else if (w == "--glibc-defaults") continue;  // read by main
    else if (w == "--max-case-size" && has_value) {
      std::string err;
      if (!ParseByteSize(argv[++i], &a->limit, &err)) {
        std::fprintf(stderr, "--max-case-size: %s\n", err.c_str());
        return false;
      }
    } else a->path = w;
  }
  if (a->path.empty() || !ParseJsonDetail(detail_word, &a->detail)) {
    std::fprintf(stderr, "usage: lw_bench --case FILE [--json OUT] [--json-detail summary|full] [--max-case-size SIZE] [--flow ID] [--glibc-defaults]\n");
    return false;
  }
  return true;
}

int RunCaseFile(int argc, char** argv) {
  CaseFileArgs args;
  if (!ParseCaseFileArgs(argc, argv, &args)) return 2;
  const std::string& path = args.path;
  const std::string& out = args.out;
  const std::string& flow_id = args.flow_id;
  const JsonDetail detail = args.detail;
  const bool co_content_only = args.co_content_only, load_only = args.load_only;
  const size_t limit = args.limit;
  PhasePeakKb();
  auto t0 = Clock::now();
  LoadResult lr = LoadCaseFile(path, DefaultLibraryDir(), limit);
  auto t1 = Clock::now();
  const long load_peak = PhasePeakKb();
  if (!lr.value) {
    std::fprintf(stderr, "%s", lr.diagnostics.Format(path).c_str());
    return 2;
  }
  if (load_only) {
    rusage ru{};
    getrusage(RUSAGE_SELF, &ru);
    std::printf("%s\n", nlohmann::json({{"load_s", Seconds(t0, t1)}, {"peak_rss_kB", ru.ru_maxrss}}).dump().c_str());
    return 0;
  }
  const Case& cs = *lr.value;
  PointResult res;
  const long case_heap = LiveHeapKb();
  long solver_heap = -1, solved_heap = -1;
  {  // as `solve` does: the solver freed before the checks and the write
    CaseSolver solver(cs);
    solver.one_shot = true;  // as SolveOnce
    solver_heap = LiveHeapKb();
    if (co_content_only) {
      SolverOptions o = solver.solver.options();
      o.plain_newton = false;
      solver.solver.set_options(o);
    }
    res = solver.Solve(cs.envelope.points[0], false);
    solved_heap = LiveHeapKb();
  }
  GiveBackFreedMemory();  // as SolveOnce does
  auto t2 = Clock::now();
  const long solve_peak = PhasePeakKb();
  const long freed_heap = LiveHeapKb();
  std::vector<CheckOutcome> checks;
  std::vector<CheckWarning> cwarn;
  bool pass = true;
  if (res.converged) checks = EvaluateChecks(cs, cs.envelope.points[0], res, &cwarn);
  for (const auto& o : checks) pass = pass && o.pass;
  auto t3 = Clock::now();
  const long checks_peak = PhasePeakKb();
  const long checked_heap = LiveHeapKb();
  {
    ResultsExtras extras;
    extras.point_checks = {&checks};
    std::ofstream os(out, std::ios::binary);
    WriteResultsJson(os, cs, {&res}, !res.converged ? "not-converged" : pass ? "pass" : "fail", extras, detail);
  }
  auto t4 = Clock::now();
  const long write_peak = PhasePeakKb();
  double flow = std::nan("");
  for (const auto& b : res.branches)
    if (b.loop == 0 && cs.loops[0].components[b.comp].id == flow_id) flow = b.flow_m3s;
  rusage ru{};
  getrusage(RUSAGE_SELF, &ru);
  // The process's peak: the largest phase's (each reset the kernel's mark,
  // which getrusage reads too).
  ru.ru_maxrss = std::max({ru.ru_maxrss, load_peak, solve_peak, checks_peak, write_peak});
  nlohmann::json j = {{"load_s", Seconds(t0, t1)}, {"solve_s", Seconds(t1, t2)}, {"checks_s", Seconds(t2, t3)},
                      {"write_s", Seconds(t3, t4)}, {"peak_rss_kB", ru.ru_maxrss}, {"converged", res.converged},
                      {"newton_iterations", res.summary.newton_iterations}, {"co_content_iterations", res.summary.nodal_iterations}};
  j["phase_peak_kB"] = {{"load", load_peak}, {"solve", solve_peak}, {"checks", checks_peak}, {"write", write_peak}};
  j["live_heap_kB"] = {{"case", case_heap}, {"solver_built", solver_heap}, {"solved", solved_heap},
                       {"solver_freed", freed_heap}, {"checked", checked_heap}};
  j["flow_m3_s"] = std::isfinite(flow) ? nlohmann::json(flow) : nlohmann::json(nullptr);
  std::printf("%s\n", j.dump().c_str());
  return res.converged ? 0 : 3;
}

}  // namespace

int RunCampaign(int argc, char** argv);  // campaign_bench.cpp
int RunSpread(int argc, char** argv);    // spread_bench.cpp

int main(int argc, char** argv) {
  // As the command line does (cli/main.cpp); `--glibc-defaults` anywhere
  // keeps the allocator's defaults, the reference run for a ratio.
  bool keep = true;
  for (int i = 1; i < argc; ++i) keep = keep && std::string(argv[i]) != "--glibc-defaults";
  if (keep) loopwright::KeepFreedMemory();
  if (argc > 1 && std::string(argv[1]) == "--campaign") return RunCampaign(argc, argv);
  if (argc > 1 && std::string(argv[1]) == "--case") return RunCaseFile(argc, argv);
  if (argc > 1 && std::string(argv[1]) == "--spread") return RunSpread(argc, argv);
  if (argc > 1 && std::string(argv[1]) == "--sweep") {  // the envelope sweep alone, N times
    const int reps = argc > 2 ? std::atoi(argv[2]) : 1;
    for (int i = 0; i < reps; ++i) ReportSweep(std::string(LOOPWRIGHT_LIBRARY_DIR) + "/../cases/apu_test_cell.json");
    return 0;
  }
  if (argc > 1 && std::string(argv[1]) == "--load") {  // load time alone, N = 10^3 ... max_N
    const int max_load = argc > 2 ? std::atoi(argv[2]) : 100000;
    for (int n = 1000; n <= max_load; n *= 10) ReportLoad(n, 3);
    return 0;
  }
  const std::string src = std::string(LOOPWRIGHT_LIBRARY_DIR) + "/..";
  if (argc > 1 && std::string(argv[1]) == "--tangents") {  // the sensitivities alone, the thermal demos and a hot rig
    ReportTangents("demo apu_test_cell (thermal)", src + "/cases/apu_test_cell.json", false, "full_power_hot_day");
    ReportTangents("demo gearbox_lube_skid", src + "/cases/gearbox_lube_skid.json", false, "hot_running");
    ReportTangents("hot_journal_rig (thermal)", src + "/tests/network/check_cases/hot_journal_rig.json", false, "hot_fast");
    return 0;
  }
  int max_n = argc > 1 ? std::atoi(argv[1]) : 100000;
  Report("demo apu_test_cell", src + "/cases/apu_test_cell.json", false, 2000);
  Report("demo gearbox_lube_skid", src + "/cases/gearbox_lube_skid.json", false, 2000);
  for (int n : {100, 1000, 10000, 100000}) {
    if (n > max_n) break;
    Report(fmt::format("header N={}", n).c_str(), HeaderCase(n), true, n >= 10000 ? 5 : 50);
  }
  std::printf("\nload (the header case's text built beforehand)\n");
  for (int n = 1000; n <= max_n; n *= 10) ReportLoad(n, n >= 100000 ? 1 : 3);
  std::printf("\nenvelope sweep (check)\n");
  ReportSweep(src + "/cases/apu_test_cell.json");
  std::printf("\nsensitivities (per knob: exact tangent vs central difference of re-solves)\n");
  ReportTangents("demo apu_test_cell (thermal)", src + "/cases/apu_test_cell.json", false, "full_power_hot_day");
  ReportTangents("demo gearbox_lube_skid", src + "/cases/gearbox_lube_skid.json", false, "hot_running");
  for (int n : {1000, 10000}) {
    if (n > max_n) break;
    ReportTangents(fmt::format("header N={}", n).c_str(), HeaderCase(n), true, nullptr);
  }
  return 0;
}
