// The report's plots as Vega-Lite specs (JSON built here with nlohmann_json;
// rendered in the page by vega-embed). Every spec carries its data inline:
// the values in the units printed (--units) and, beside them, the SI values
// under keys ending in the SI unit ("flow_m3_s", "margin_si"), which the
// tests read.
#pragma once

#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "library/units.h"
#include "network/case/case.h"
#include "network/design/sizing.h"
#include "network/envelope/checks.h"
#include "network/envelope/pump_curves.h"
#include "network/point/run.h"

namespace loopwright::cli {

// One plot of the page: its element id ("plot-..."), title, a line saying
// what it shows, and the spec.
struct ReportPlot {
  std::string id, title, caption;
  nlohmann::json spec;
};

// A pump's curve and the system curve it sees at every point given (one
// colour per point; pump solid, system dashed), operating points marked.
ReportPlot PumpCurvesPlot(const std::string& where, const std::vector<const PumpSystemCurves*>& at_points,
                          UnitSystem us);

// The margin of every check (rows: check at its place, worst first by the
// margin relative to its limit) at every point (columns, envelope order;
// points without a result marked). Hover: value, limit, margin, unit and
// where the limit came from. `per_point[i]` is the checks of point i (empty
// for a point without a result).
ReportPlot MarginHeatmapPlot(const Case& cs, const std::vector<PointResult>& points,
                             const std::vector<std::vector<CheckOutcome>>& per_point,
                             const std::vector<CheckSummary>& summary, UnitSystem us);

// The axes of a grid envelope: variables whose value differs between the
// grid points (points named "grid[i,j]"); empty when there is no grid.
std::vector<int> GridAxes(const Case& cs);

// For a grid envelope: the value of the check `check` at `where` against
// grid axis `axis`, one line per combination of the other axes' values.
ReportPlot GridPlot(const Case& cs, const std::vector<PointResult>& points,
                    const std::vector<std::vector<CheckOutcome>>& per_point, const std::string& check,
                    const std::string& where, int axis, UnitSystem us);

// A sizing question: the binding check's worst margin over the envelope
// against the sized parameter, its limit (margin 0), the answer and the
// passing window marked.
ReportPlot SizingPlot(const SizingScan& scan, const SizingAnswer& answer, UnitSystem us);

// The hook for scenario traces (a transient run): quantities against time,
// one panel per dimension, each watched limit drawn as a dashed rule in the
// panel of its dimension. Values SI; drawn in the units printed.
struct TimeSeries {
  std::string name;                // "oil/housing T"
  Dimension dim = Dimension::kDimensionless;
  std::vector<double> si;          // one per time
};
struct WatchedLimit {
  std::string name;                // "drain_temperature_max at oil/housing"
  Dimension dim = Dimension::kDimensionless;
  double si = 0;
};
struct TimeSeriesPlot {
  std::string id, title, caption;  // id: unique within the page
  std::vector<double> times_s;
  std::vector<TimeSeries> series;
  std::vector<WatchedLimit> limits;
};
ReportPlot ScenarioPlot(const TimeSeriesPlot& t, UnitSystem us);

// A tolerance study (network/tolerance/spread.h), per check of its merged
// result: the histogram of the sampled margins (`margins`, SI, the non-
// finite left out) in kSpreadBins equal bins spanning them and zero, the
// limit (margin 0) drawn as a rule; each bin's edges also in SI ("lo_si",
// "hi_si") and its count. And the first-order contributors as bars (share
// of the margin's variance, %).
inline constexpr int kSpreadBins = 24;
ReportPlot SpreadHistogramPlot(const nlohmann::json& check, int index, const std::vector<double>& margins, UnitSystem us);
ReportPlot SpreadContributorsPlot(const nlohmann::json& check, int index);

}  // namespace loopwright::cli
