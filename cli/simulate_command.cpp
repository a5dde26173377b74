#include "cli/simulate_command.h"

#include <unistd.h>

#include <algorithm>
#include <chrono>
#include <cstdio>

#include <fmt/format.h>
#include <nlohmann/json.hpp>

#include "cli/output.h"
#include "network/envelope/results.h"
#include "network/time/event_timing.h"
#include "network/time/simulate.h"
#include "network/time/time_checks.h"

namespace loopwright::cli {

namespace {

nlohmann::json Series(const SimulationResult& r, const std::vector<std::string>& names,
                      std::vector<double> TimeSample::*field) {
  nlohmann::json j = nlohmann::json::object();
  for (size_t i = 0; i < names.size(); ++i) {
    nlohmann::json col = nlohmann::json::array();
    for (const TimeSample& s : r.samples) col.push_back((s.*field)[i]);
    j[names[i]] = col;
  }
  return j;
}

nlohmann::json ChecksJson(const std::vector<TimeCheck>& checks) {
  nlohmann::json j = nlohmann::json::array();
  for (const TimeCheck& c : checks) {
    const std::string unit = SiUnitName(Check(c.id).dim);
    j.push_back({{"name", Check(c.id).name}, {"where", c.where}, {"value", c.value}, {"limit", c.limit},
                 {"margin", c.margin}, {"unit", unit}, {"time_s", c.time}, {"pass", c.pass}});
  }
  return j;
}

nlohmann::json WarningsJson(const SimulationResult& r) {
  nlohmann::json j = nlohmann::json::array();
  for (const RunWarning& w : r.warnings) j.push_back({{"where", w.where}, {"text", w.text}, {"from_s", w.from}, {"to_s", w.to}});
  return j;
}

std::string WarningLines(const SimulationResult& r) {
  std::string out;
  for (const RunWarning& w : r.warnings)
    out += fmt::format("  warning {} ({:.0f} s to {:.0f} s): {}\n", w.where, w.from, w.to, w.text);
  return out.empty() ? out : "\nwarnings through the run\n" + out;
}

// A watched value whose highest point is the run's last instant and above
// its start: it may still be rising when the scenario ends.
bool PeakAtEnd(const SimulationResult& r, const PeakValue& p) {
  if (r.samples.empty()) return false;
  const double end = r.samples.back().t;
  return p.time >= end - 1e-6 * std::max(1.0, end) && p.value > p.start;
}

std::string PeakAtEndNotes(const SimulationResult& r, const std::string& only = "") {
  std::string out;
  for (const PeakValue& p : r.peaks)
    if ((only.empty() || p.what == only) && PeakAtEnd(r, p))
      out += fmt::format("note: {} is highest at the run's end ({:.0f} s) and may still be rising: its peak lies beyond "
                         "the scenario; lengthen its \"end\" to see it\n", p.what, p.time);
  return out;
}

std::string RunJson(const Case& cs, const Scenario& sc, const SimulateOptions& opt, const SimulationResult& r,
                    const std::vector<TimeCheck>& checks, double seconds) {
  nlohmann::json peaks = nlohmann::json::array();
  for (const PeakValue& p : r.peaks)
    peaks.push_back({{"what", p.what}, {"start_K", p.start}, {"peak_K", p.value}, {"time_s", p.time},
                     {"at_end", PeakAtEnd(r, p)}});
  nlohmann::json times = nlohmann::json::array();
  for (const TimeSample& s : r.samples) times.push_back(s.t);
  nlohmann::json j = {
      {"tool", "loopwright"}, {"version", LOOPWRIGHT_VERSION}, {"case", cs.name}, {"scenario", sc.id},
      {"outcome", r.ok ? "completed" : "stopped"}, {"cautions", SafetyCautions()},
      {"integrator", {{"method", "CVODE BDF (SUNDIALS 6), dense Newton"}, {"rtol", opt.rtol}, {"atol_K", opt.atol_k},
                      {"steps", r.steps}, {"rhs_evaluations", r.rhs_evals}, {"jacobian_evaluations", r.jac_evals},
                      {"error_test_failures", r.error_test_fails}, {"hydraulic_solves", r.hydraulic_solves},
                      {"settle_time_s", r.settle_time}, {"settle_rate_K_s", r.settle_rate}, {"run_time_s", seconds}}},
      {"peaks", peaks},
      {"warnings", WarningsJson(r)},
      {"checks", ChecksJson(checks)},
      {"time_s", times},
      {"node_temperature_K", Series(r, r.node_names, &TimeSample::node_t)},
      {"node_pressure_Pa", Series(r, r.node_names, &TimeSample::node_p)},
      {"mass_temperature_K", Series(r, r.mass_names, &TimeSample::mass_t)},
      {"flow_m3_s", Series(r, r.branch_names, &TimeSample::flow)}};
  if (!r.ok) j["failure"] = r.failure;
  return j.dump(1) + "\n";
}

std::string RunCsv(const SimulationResult& r) {
  std::string out = "time_s";
  for (const std::string& n : r.node_names) out += "," + CsvField("T " + n + " [K]");
  for (const std::string& n : r.mass_names) out += "," + CsvField("T " + n + " [K]");
  for (const std::string& n : r.branch_names) out += "," + CsvField("Q " + n + " [m3/s]");
  for (const std::string& n : r.node_names) out += "," + CsvField("p " + n + " [Pa]");
  out += "\n";
  for (const TimeSample& s : r.samples) {
    out += fmt::format("{:.9g}", s.t);
    for (const auto* v : {&s.node_t, &s.mass_t, &s.flow, &s.node_p})
      for (double x : *v) out += fmt::format(",{:.9g}", x);
    out += "\n";
  }
  return out;
}

std::string PeakTable(const SimulationResult& r, UnitSystem us) {
  const std::string unit = DisplayUnit(Dimension::kTemperature, us);
  std::string out = fmt::format("{:<28} {:>10} {:>10} {:>12}\n", "watched", "start", "peak", "peak at");
  for (const PeakValue& p : r.peaks)
    out += fmt::format("{:<28} {:>10} {:>10} {:>12}\n", p.what,
                       fmt::format("{:.1f} {}", FromSI(p.start, Dimension::kTemperature, us), unit),
                       fmt::format("{:.1f} {}", FromSI(p.value, Dimension::kTemperature, us), unit),
                       fmt::format("{:.0f} s", p.time));
  return out + PeakAtEndNotes(r);
}

// A value of dimension `dim` as printed: temperatures in degC/degF, times in s.
std::string Shown(double si, Dimension dim, UnitSystem us) {
  if (dim == Dimension::kTime) return fmt::format("{:.0f} s", si);
  return fmt::format("{:.1f} {}", FromSI(si, dim, us), DisplayUnit(dim, us));
}

std::string CheckLines(const std::vector<TimeCheck>& checks, UnitSystem us) {
  if (checks.empty()) return "";
  std::string out = fmt::format("\n{:<24} {:<28} {:>11} {:>11} {:>11} {:>8} {}\n", "check", "where", "value", "limit",
                                "margin", "at", "verdict");
  for (const TimeCheck& c : checks) {
    const Dimension dim = Check(c.id).dim;
    const Dimension mdim = dim == Dimension::kTemperature ? Dimension::kTemperatureDifference : dim;
    out += fmt::format("{:<24} {:<28} {:>11} {:>11} {:>11} {:>8} {}\n", Check(c.id).name, c.where, Shown(c.value, dim, us),
                       Shown(c.limit, dim, us), Shown(c.margin, mdim, us), fmt::format("{:.0f} s", c.time),
                       c.pass ? "PASS" : "FAIL");
  }
  return out;
}

// A progress bar on stderr when it is a terminal.
std::function<void(double)> ProgressBar(bool quiet) {
  if (quiet || !::isatty(2)) return {};
  return [last = -1](double f) mutable {
    const int pct = static_cast<int>(100 * f);
    if (pct == last) return;
    last = pct;
    const int w = 30, fill = pct * w / 100;
    std::fprintf(stderr, "\rsimulating [%s%s] %3d%%", std::string(fill, '#').c_str(), std::string(w - fill, ' ').c_str(),
                 pct);
    if (pct >= 100) std::fprintf(stderr, "\n");
  };
}

// A text quantity of an option, or an error naming the option (exit 2).
bool OptionQuantity(const char* name, const std::string& text, Dimension dim, double* out) {
  const ParsedQuantity q = ParseQuantity(text, dim);
  if (!q.ok) std::fprintf(stderr, "error[bad-option] %s: %s\n", name, q.error.c_str());
  *out = q.si;
  return q.ok;
}

// `simulate --earliest EVENT --keep WHAT --below LIMIT`: the answer, its
// verifying run's peak and the runs it took; the verifying run as --json.
int EventTimingMain(const Case& cs, const Scenario& sc, const SimulateArgs& a, const SimulateOptions& opt) {
  EventTimingQuestion q;
  q.event = a.earliest;
  q.watched = a.keep;
  q.hi = sc.end;
  if (a.keep.empty() || a.below.empty()) {
    std::fprintf(stderr, "error[bad-option] --earliest needs --keep and --below\n");
    return 2;
  }
  if (const std::string why = UnknownWatched(cs, q.watched); !why.empty()) {
    std::fprintf(stderr, "error[bad-option] --keep: %s\n", why.c_str());
    return 2;
  }
  if (!OptionQuantity("--below", a.below, Dimension::kTemperature, &q.limit) ||
      (!a.up_to.empty() && !OptionQuantity("--up-to", a.up_to, Dimension::kTime, &q.hi)))
    return 2;
  const EventTimingAnswer r = EarliestEventTime(cs, sc, q, opt);
  if (!r.ok) {
    std::fprintf(stderr, "error[no-answer] %s: %s\n", sc.id.c_str(), r.failure.c_str());
    return 1;
  }
  std::string err;
  if (!a.json_out.empty()) {
    nlohmann::json j = nlohmann::json::parse(RunJson(cs, sc, opt, r.verify, EvaluateTimeChecks(cs, sc, r.verify), 0));
    j["event_timing"] = {{"event", q.event}, {"keep", q.watched}, {"limit_K", q.limit}, {"time_s", r.time},
                         {"peak_K", r.peak}, {"peak_time_s", r.peak_time}, {"runs", r.runs}};
    if (!WriteFileAtomic(a.json_out, j.dump(1) + "\n", &err)) return std::fprintf(stderr, "error[write] %s\n", err.c_str()), 4;
  }
  std::printf("%s: the earliest \"%s\" that keeps %s at or below %s is at %.1f s; verified: peak %s at %.0f s (%d runs)\n"
              "\n%s\n", sc.id.c_str(), q.event.c_str(), q.watched.c_str(), Shown(q.limit, Dimension::kTemperature, a.units).c_str(),
              r.time, Shown(r.peak, Dimension::kTemperature, a.units).c_str(), r.peak_time, r.runs,
              (PeakAtEndNotes(r.verify, q.watched) + SafetyCautions()).c_str());
  return 0;
}

}  // namespace

int SimulateMain(const Case& cs, const SimulateArgs& a) {
  // Without --scenario, a case's only scenario is the one meant.
  const Scenario* sc = a.scenario.empty() && cs.scenarios.size() == 1 ? &cs.scenarios[0] : FindScenario(cs, a.scenario);
  if (!sc && a.scenario.empty()) {
    std::vector<std::string> ids;
    for (const Scenario& s : cs.scenarios) ids.push_back(s.id);
    std::fprintf(stderr, "error[no-scenario] --scenario: %s\n",
                 ids.empty() ? "the case declares no scenario under /scenarios (README, \"Through time\")"
                             : fmt::format("name one of the case's scenarios: {}", fmt::join(ids, ", ")).c_str());
    return 2;
  }
  if (!sc) {
    std::vector<std::string> ids;
    for (const Scenario& s : cs.scenarios) ids.push_back(s.id);
    const std::string near = NearestName(a.scenario, ids);
    std::fprintf(stderr, "error[unknown-scenario] --scenario: no scenario \"%s\"%s; scenarios: %s\n", a.scenario.c_str(),
                 near.empty() ? "" : fmt::format(" (did you mean \"{}\"?)", near).c_str(),
                 ids.empty() ? "(the case declares none under /scenarios)" : fmt::format("{}", fmt::join(ids, ", ")).c_str());
    return 2;
  }
  SimulateOptions opt;
  opt.rtol = a.rtol;
  opt.atol_k = a.atol_k;
  opt.output_interval = a.interval;
  opt.progress = ProgressBar(a.quiet);
  if (!a.earliest.empty()) return EventTimingMain(cs, *sc, a, opt);
  const auto t0 = std::chrono::steady_clock::now();
  SimulationResult r = Simulate(cs, *sc, opt);
  const double seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  const std::vector<TimeCheck> checks = EvaluateTimeChecks(cs, *sc, r);
  std::string err;
  if ((!a.json_out.empty() && !WriteFileAtomic(a.json_out, RunJson(cs, *sc, opt, r, checks, seconds), &err)) ||
      (!a.csv_out.empty() && r.ok && !WriteFileAtomic(a.csv_out, RunCsv(r), &err))) {
    std::fprintf(stderr, "error[write] %s\n", err.c_str());
    return 4;
  }
  if (!r.ok) {
    std::fprintf(stderr, "error[run-stopped] scenario \"%s\": %s\n", sc->id.c_str(), r.failure.c_str());
    return 3;
  }
  if (!a.quiet) {
    std::printf("scenario %s: %g s simulated (%ld steps, %ld hydraulic solves, rtol %g, atol %g K) in %.2f s\n",
                sc->id.c_str(), sc->end, r.steps, r.hydraulic_solves, opt.rtol, opt.atol_k, seconds);
    std::fputs(PeakTable(r, a.units).c_str(), stdout);
    std::fputs(CheckLines(checks, a.units).c_str(), stdout);
    std::fputs(WarningLines(r).c_str(), stdout);
    std::printf("\n%s\n", SafetyCautions());
  }
  const size_t failed = std::count_if(checks.begin(), checks.end(), [](const TimeCheck& c) { return !c.pass; });
  std::printf("%s: completed; %s\n", sc->id.c_str(),
              failed ? fmt::format("{} of {} checks FAIL", failed, checks.size()).c_str()
                     : fmt::format("all {} checks pass", checks.size()).c_str());
  return failed ? 1 : 0;
}

}  // namespace loopwright::cli
