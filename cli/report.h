// `loopwright report`: one self-contained HTML page (and optionally the same
// summary as Markdown) for a design review: verdict, governing points,
// margins, fixes, sizing answers, the loops drawn (report_schematic.h), and
// plots (report_plots.h) rendered in the page by Vega-Lite. The page needs
// no network: the vega, vega-lite and vega-embed browser builds (installed
// by the build from cli/web/package-lock.json) are inlined into it.
#pragma once

#include <string>
#include <vector>

#include "cli/check_run.h"
#include "cli/report_plots.h"
#include "network/case/case.h"
#include "network/design/sizing.h"
#include "network/envelope/pump_curves.h"

namespace loopwright::cli {

// What the report runs and shows.
struct ReportOptions {
  bool envelope = true;              // the checks over the envelope, fixes, pump curves, heat map
  bool sizing = true;                // the design questions (when the case asks any)
  bool scenarios = true;             // every scenario of the case run through time (simulate)
  bool spread = true;                // the tolerance study (when the case has "tolerances")
  unsigned long long spread_samples = 200;  // its samples (Latin hypercube, seed 1: as `spread`)
  std::string point;                 // the point the drawing is annotated at ("": governing point of the worst check)
  std::vector<std::string> grid_checks;  // checks plotted against grid axes ("": the three worst)
  int curve_samples = 24;
  double tight = 0.05;
  bool no_fix = false;
  int threads = 0;
};

// Everything the page and the summary are made of.
struct ReportData {
  const Case* cs = nullptr;
  std::string case_path;
  UnitSystem us = UnitSystem::kSI;
  double tight = 0.05;
  const CheckRun* run = nullptr;             // null: the envelope was not run
  std::vector<SizingAnswer> answers;          // empty: not run or no questions
  bool sizing_run = false;
  int annotated = -1;                         // index of the drawing's point in run->sweep.points
  std::string annotated_why;
  std::string svg, svg_error;
  std::vector<ReportPlot> plots;
  // Scenario traces (a transient run), drawn by ScenarioPlot: the hook for
  // `simulate` results; empty until a scenario runs.
  std::vector<TimeSeriesPlot> scenarios;
  // The tolerance study: its merged result (network/tolerance/spread.h; null
  // when not run), every sample's margins (sample major, its checks' order),
  // or why it has none.
  nlohmann::json spread;
  std::vector<double> spread_margins;
  std::string spread_error;
};

// Runs what `opt` asks for and draws and plots it.
ReportData BuildReport(const Case& cs, const std::string& case_path, const CheckRun* run, const ReportOptions& opt,
                       UnitSystem us, std::string* error);

// The pasteable summary as Markdown (--md).
std::string ReportMarkdown(const ReportData& d);

// The page. The plot scripts are read from `web_dir` (node_modules of the
// build, or LOOPWRIGHT_WEB_DIR); false and *error when one is missing.
bool ReportHtml(const ReportData& d, const std::string& web_dir, std::string* html, std::string* error);

// Where the plot scripts are: $LOOPWRIGHT_WEB_DIR, else the build's.
std::string DefaultWebDir();

}  // namespace loopwright::cli
