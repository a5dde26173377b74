#include "cli/report_plots.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <map>
#include <set>

#include <fmt/format.h>

#include "cli/output.h"
#include "network/envelope/results.h"

namespace loopwright::cli {

using nlohmann::json;

namespace {

// A value in the units printed (null for NaN: Vega leaves it out).
json Shown(double si, Dimension dim, UnitSystem us) {
  const double v = FromSI(si, dim, us);
  return std::isfinite(v) ? json(v) : json(nullptr);
}

// "flow (L/min)"; a dimensionless quantity has no unit.
std::string Titled(const std::string& what, Dimension dim, UnitSystem us) {
  return dim == Dimension::kDimensionless ? what : fmt::format("{} ({})", what, DisplayUnit(dim, us));
}

json Axis(const std::string& field, const std::string& title, bool zero = false) {
  return {{"field", field}, {"type", "quantitative"}, {"title", title}, {"scale", {{"zero", zero}}}};
}

json BaseSpec(const std::string& title) {
  return {{"title", title}, {"width", 520}, {"height", 300},
          {"config", {{"font", "sans-serif"}, {"axis", {{"labelFontSize", 11}, {"titleFontSize", 12}}}}}};
}

}  // namespace

ReportPlot PumpCurvesPlot(const std::string& where, const std::vector<const PumpSystemCurves*>& at_points,
                          UnitSystem us) {
  const Dimension Q = Dimension::kVolumeFlow, P = Dimension::kPressureDifference;
  json lines = json::array(), ops = json::array();
  for (const PumpSystemCurves* c : at_points) {
    auto add = [&](const std::vector<CurveSample>& v, const char* curve) {
      for (const CurveSample& s : v)
        lines.push_back({{"point", c->point}, {"curve", curve}, {"flow", Shown(s.flow_m3s, Q, us)},
                         {"rise", Shown(s.rise_pa, P, us)}, {"flow_m3_s", s.flow_m3s}, {"rise_Pa", s.rise_pa}});
    };
    add(c->pump, "pump");
    add(c->system, "system");
    ops.push_back({{"point", c->point}, {"flow", Shown(c->op_flow_m3s, Q, us)}, {"rise", Shown(c->op_rise_pa, P, us)},
                   {"flow_m3_s", c->op_flow_m3s}, {"rise_Pa", c->op_rise_pa}});
  }
  const json x = Axis("flow", Titled("flow", Q, us), true), y = Axis("rise", Titled("pressure rise", P, us));
  json spec = BaseSpec(where + ": pump and system curves");
  spec["layer"] = json::array(
      {{{"data", {{"values", lines}}},
        {"mark", {{"type", "line"}, {"strokeWidth", 2}}},
        {"encoding",
         {{"x", x}, {"y", y}, {"color", {{"field", "point"}, {"type", "nominal"}, {"title", "point"}}},
          {"strokeDash", {{"field", "curve"}, {"type", "nominal"}, {"title", "curve"},
                          {"scale", {{"domain", {"pump", "system"}}, {"range", {json::array(), {6, 4}}}}}}},
          {"detail", {{"field", "curve"}}},
          {"order", {{"field", "flow"}, {"type", "quantitative"}}}}}},
       {{"data", {{"values", ops}}},
        {"mark", {{"type", "point"}, {"shape", "diamond"}, {"filled", true}, {"size", 90}, {"stroke", "black"}}},
        {"encoding",
         {{"x", x}, {"y", y}, {"color", {{"field", "point"}, {"type", "nominal"}}},
          {"tooltip", json::array({{{"field", "point"}}, {{"field", "flow"}, {"format", ".4g"}, {"title", x["title"]}},
                                   {{"field", "rise"}, {"format", ".4g"}, {"title", y["title"]}}})}}}}});
  return {"plot-pump-" + where, where + ": pump curve against the system curve",
          "Solid: the pump's own curve at each point (its speed, the oil there). Dashed: what the loop asks of "
          "the pump at each flow (the pump replaced by an imposed flow, the network solved again). Diamonds: the "
          "solved operating points, where the two cross.",
          spec};
}

namespace {

// One heat-map cell of check outcome `o` at point `point`.
json HeatCell(const Case& cs, const std::string& row, const std::string& point, const CheckOutcome& o, UnitSystem us) {
  const Dimension md = MarginDimension(o.dim);
  const std::string unit = o.dim == Dimension::kDimensionless ? "-" : DisplayUnit(o.dim, us);
  return {{"row", row}, {"point", point}, {"relative_margin", std::clamp(MarginRank(o), -1.0, 1.0)},
          {"value", FormatValue(o.value, o.dim, us)}, {"limit", FormatValue(o.limit, o.dim, us)},
          {"margin", FormatValue(o.margin, md, us)}, {"unit", unit}, {"limit_from", LimitSourceText(cs, o)},
          {"verdict", o.pass ? "pass" : "FAIL"}, {"mark", o.pass ? "" : "x"}, {"outcome", CheckOutcomeJson(cs, o)}};
}

}  // namespace

ReportPlot MarginHeatmapPlot(const Case& cs, const std::vector<PointResult>& points,
                             const std::vector<std::vector<CheckOutcome>>& per_point,
                             const std::vector<CheckSummary>& summary, UnitSystem us) {
  std::vector<const CheckSummary*> rows;
  for (const auto& s : summary) rows.push_back(&s);
  std::stable_sort(rows.begin(), rows.end(),
                   [](const CheckSummary* a, const CheckSummary* b) { return MarginRank(a->worst) < MarginRank(b->worst); });
  json order = json::array(), cells = json::array(), columns = json::array();
  std::map<std::pair<std::string, std::string>, std::string> label;
  for (const CheckSummary* s : rows) {
    const std::string l = std::string(s->worst.name()) + " @ " + s->worst.where;
    label[{std::string(s->worst.name()), s->worst.where}] = l;
    order.push_back(l);
  }
  for (size_t i = 0; i < points.size(); ++i) {
    columns.push_back(points[i].name);
    if (!points[i].converged) {
      for (const json& l : order)
        cells.push_back({{"row", l}, {"point", points[i].name}, {"relative_margin", nullptr}, {"mark", "?"},
                         {"verdict", "no result (not converged)"}});
      continue;
    }
    for (const CheckOutcome& o : per_point[i]) {
      auto it = label.find({std::string(o.name()), o.where});
      if (it != label.end()) cells.push_back(HeatCell(cs, it->second, points[i].name, o, us));
    }
  }
  json tooltip = json::array();
  for (const char* f : {"row", "point", "verdict", "value", "limit", "margin", "unit", "limit_from"})
    tooltip.push_back({{"field", f}, {"type", "nominal"}});
  json spec = BaseSpec("Margin of every check at every point");
  spec["width"] = std::max<size_t>(240, 70 * points.size());
  spec["height"] = std::max<size_t>(120, 18 * rows.size());
  spec["data"] = {{"values", cells}};
  const json x = {{"field", "point"}, {"type", "nominal"}, {"sort", columns}, {"title", "point"}};
  const json y = {{"field", "row"},
                  {"type", "nominal"},
                  {"sort", order},
                  {"title", "check @ place (worst first)"},
                  {"axis", {{"labelLimit", 420}}}};
  spec["layer"] = json::array(
      {{{"mark", {{"type", "rect"}, {"stroke", "white"}}},
        {"encoding",
         {{"x", x}, {"y", y},
          {"color", {{"field", "relative_margin"}, {"type", "quantitative"}, {"title", "margin / |limit|"},
                     {"scale", {{"scheme", "redyellowblue"}, {"domain", {-0.5, 0.5}}, {"clamp", true}}}}},
          {"tooltip", tooltip}}}},
       {{"mark", {{"type", "text"}, {"fontWeight", "bold"}, {"fontSize", 13}}},
        {"encoding", {{"x", x}, {"y", y}, {"text", {{"field", "mark"}}}, {"tooltip", tooltip}}}}});
  return {"plot-margins", "Margin of every check at every point",
          "Rows worst first (margin relative to the limit's magnitude); blue spare, red short. A cell marked x "
          "fails; ? is a point without a result. Hover for value, limit, margin and where the limit came from.",
          spec};
}

std::vector<int> GridAxes(const Case& cs) {
  std::vector<int> axes;
  const auto& pts = cs.envelope.points;
  for (size_t v = 0; v < cs.envelope.variables.size(); ++v) {
    std::set<double> seen;
    for (const auto& p : pts)
      if (!p.name.empty() && p.name.back() == ']' && v < p.values.size()) seen.insert(p.values[v]);
    if (seen.size() > 1) axes.push_back(static_cast<int>(v));
  }
  return axes;
}

ReportPlot GridPlot(const Case& cs, const std::vector<PointResult>& points,
                    const std::vector<std::vector<CheckOutcome>>& per_point, const std::string& check,
                    const std::string& where, int axis, UnitSystem us) {
  const std::vector<int> axes = GridAxes(cs);
  const Variable& xv = cs.envelope.variables[axis];
  Dimension ydim = Dimension::kDimensionless;
  json rows = json::array();
  for (size_t i = 0; i < points.size(); ++i) {
    const PointResult& p = points[i];
    if (p.name.empty() || p.name.back() != ']' || !p.converged) continue;
    std::string series;
    for (int a : axes)
      if (a != axis)
        series += fmt::format("{}{} {} {}", series.empty() ? "" : ", ", cs.envelope.variables[a].name,
                              FormatValue(p.values[a], cs.envelope.variables[a].dim, us),
                              DisplayUnit(cs.envelope.variables[a].dim, us));
    for (const CheckOutcome& o : per_point[i])
      if (o.name() == check && o.where == where) {
        ydim = o.dim;
        rows.push_back({{"x", Shown(p.values[axis], xv.dim, us)}, {"y", Shown(o.value, o.dim, us)},
                        {"value_si", o.value}, {"series", series.empty() ? "(the only axis)" : series}, {"point", p.name}});
      }
  }
  json spec = BaseSpec(fmt::format("{} at {} against {}", check, where, xv.name));
  spec["data"] = {{"values", rows}};
  spec["mark"] = {{"type", "line"}, {"point", true}};
  spec["encoding"] = {{"x", Axis("x", Titled(xv.name, xv.dim, us))},
                      {"y", Axis("y", Titled(check + " value", ydim, us))},
                      {"color", {{"field", "series"}, {"type", "nominal"}, {"title", "other axes"}}},
                      {"shape", {{"field", "series"}, {"type", "nominal"}}},
                      {"tooltip", json::array({{{"field", "point"}}, {{"field", "y"}, {"format", ".4g"}}})}};
  return {fmt::format("plot-grid-{}-{}-{}", check, where, xv.name),
          fmt::format("{} at {} against {}", check, where, xv.name),
          "Grid envelope: the check's value along one axis, one line per combination of the other axes.", spec};
}

namespace {

// The passing window of a sizing answer: a bypass window as written
// ("a .. b"), else from the answer to the largest passing value scanned.
std::pair<double, double> Window(const SizingScan& scan, const SizingAnswer& a) {
  double lo = NAN, hi = NAN;
  if (std::sscanf(a.value_text.c_str(), "%lf .. %lf", &lo, &hi) == 2) return {lo, hi};
  if (!a.feasible || std::isnan(a.value)) return {NAN, NAN};
  hi = a.value;
  for (const auto& s : scan.samples)
    if (s.pass && s.value > hi) hi = s.value;
  return {a.value, hi};
}

}  // namespace

ReportPlot SizingPlot(const SizingScan& scan, const SizingAnswer& a, UnitSystem us) {
  const Dimension md = scan.margin_dim;
  json rows = json::array();
  for (const auto& s : scan.samples)
    rows.push_back({{"value", Shown(s.value, scan.dim, us)}, {"margin", Shown(s.margin, md, us)},
                    {"value_si", s.value}, {"margin_si", std::isnan(s.margin) ? json(nullptr) : json(s.margin)},
                    {"envelope", !s.converged ? "not converged" : s.pass ? "every check passes" : "a check fails"},
                    {"point", s.point}});
  const auto [wlo, whi] = Window(scan, a);
  const json x = Axis("value", Titled(scan.param, scan.dim, us));
  json xs = x;
  if (scan.geometric) xs["scale"] = {{"type", "log"}};
  json layers = json::array();
  if (std::isfinite(wlo) && std::isfinite(whi))
    layers.push_back({{"data", {{"values", {{{"lo", Shown(wlo, scan.dim, us)}, {"hi", Shown(whi, scan.dim, us)}}}}}},
                      {"mark", {{"type", "rect"}, {"color", "#9ecae1"}, {"opacity", 0.35}}},
                      {"encoding", {{"x", {{"field", "lo"}, {"type", "quantitative"}}}, {"x2", {{"field", "hi"}}}}}});
  layers.push_back({{"data", {{"values", rows}}},
                    {"mark", {{"type", "line"}, {"point", true}}},
                    {"encoding", {{"x", xs}, {"y", Axis("margin", Titled(scan.check + " margin", md, us))},
                                  {"tooltip", json::array({{{"field", "value"}, {"format", ".4g"}},
                                                           {{"field", "margin"}, {"format", ".4g"}},
                                                           {{"field", "envelope"}}, {{"field", "point"}}})}}}});
  layers.push_back({{"data", {{"values", {{{"y", 0}}}}}},
                    {"mark", {{"type", "rule"}, {"strokeDash", {6, 4}}, {"color", "black"}}},
                    {"encoding", {{"y", {{"field", "y"}, {"type", "quantitative"}}}}}});
  if (std::isfinite(a.value))
    layers.push_back({{"data", {{"values", {{{"x", Shown(a.value, scan.dim, us)}, {"label", "answer"}}}}}},
                      {"mark", {{"type", "rule"}, {"strokeWidth", 2}, {"color", "#08306b"}}},
                      {"encoding", {{"x", {{"field", "x"}, {"type", "quantitative"}}},
                                    {"tooltip", json::array({{{"field", "label"}}, {{"field", "x"}, {"format", ".4g"}}})}}}});
  json spec = BaseSpec(fmt::format("{}: {} margin against {}", scan.question, scan.check, scan.param));
  spec["layer"] = layers;
  return {"plot-size-" + scan.question, fmt::format("Sizing {}: margin against {}", scan.question, scan.param),
          fmt::format("The worst margin over the envelope of {} at {} (the answer's binding check) for each value "
                      "of {}; dashed: its limit; solid rule: the answer; shaded: the values that pass every check.",
                      scan.check, scan.where, scan.param),
          spec};
}

ReportPlot ScenarioPlot(const TimeSeriesPlot& t, UnitSystem us) {
  std::map<Dimension, json> lines, rules;
  for (const TimeSeries& s : t.series)
    for (size_t i = 0; i < t.times_s.size() && i < s.si.size(); ++i)
      lines[s.dim].push_back({{"time_s", t.times_s[i]}, {"series", s.name}, {"y", Shown(s.si[i], s.dim, us)}});
  for (const WatchedLimit& w : t.limits) rules[w.dim].push_back({{"limit", w.name}, {"y", Shown(w.si, w.dim, us)}});
  json panels = json::array();
  for (auto& [dim, values] : lines) {
    const json y = Axis("y", Titled(DimensionName(dim), dim, us));
    json layer = json::array({{{"data", {{"values", values}}},
                               {"mark", {{"type", "line"}}},
                               {"encoding", {{"x", Axis("time_s", "time (s)", true)}, {"y", y},
                                             {"color", {{"field", "series"}, {"type", "nominal"}}},
                                             {"strokeDash", {{"field", "series"}, {"type", "nominal"}}}}}}});
    if (rules.count(dim))
      layer.push_back({{"data", {{"values", rules[dim]}}},
                       {"mark", {{"type", "rule"}, {"strokeDash", {6, 4}}, {"color", "black"}}},
                       {"encoding", {{"y", y}, {"tooltip", json::array({{{"field", "limit"}}, {{"field", "y"}}})}}}});
    panels.push_back({{"width", 520}, {"height", 220}, {"layer", layer}});
  }
  json spec = {{"title", t.title}, {"vconcat", panels}, {"resolve", {{"scale", {{"color", "independent"}}}}}};
  return {"plot-scenario-" + t.id, t.title, t.caption, spec};
}

namespace {

std::string SpreadLabel(const json& c) { return c["name"].get<std::string>() + " at " + c["where"].get<std::string>(); }

// The histogram's bins: kSpreadBins equal ones over [min(m, 0), max(m, 0)].
json HistogramBins(const std::vector<double>& m, Dimension md, UnitSystem us) {
  double lo = 0, hi = 0;
  for (double v : m) lo = std::min(lo, v), hi = std::max(hi, v);
  if (hi == lo) hi = lo + 1;
  std::vector<uint64_t> count(kSpreadBins, 0);
  const double w = (hi - lo) / kSpreadBins;
  for (double v : m) count[std::min<int>(kSpreadBins - 1, static_cast<int>((v - lo) / w))] += 1;
  json bins = json::array();
  for (int b = 0; b < kSpreadBins; ++b) {
    const double a = lo + b * w, z = b + 1 == kSpreadBins ? hi : lo + (b + 1) * w;
    bins.push_back({{"lo", Shown(a, md, us)}, {"hi", Shown(z, md, us)}, {"lo_si", a}, {"hi_si", z},
                    {"count", count[b]}, {"fails", z <= 0 ? "below the limit" : a >= 0 ? "passes" : "straddles it"}});
  }
  return bins;
}

}  // namespace

ReportPlot SpreadHistogramPlot(const json& check, int index, const std::vector<double>& margins, UnitSystem us) {
  const Dimension md = MarginDimension(DimensionNamed(check["dimension"].get<std::string>()));
  std::vector<double> m;
  for (double v : margins)
    if (std::isfinite(v)) m.push_back(v);
  json spec = BaseSpec("Sampled margin of " + SpreadLabel(check));
  const std::string x_title = Titled("margin", md, us);
  spec["layer"] = json::array(
      {{{"data", {{"values", HistogramBins(m, md, us)}}},
        {"mark", {{"type", "bar"}, {"stroke", "white"}}},
        {"encoding", {{"x", Axis("lo", x_title)}, {"x2", {{"field", "hi"}}},
                      {"y", {{"field", "count"}, {"type", "quantitative"}, {"title", "samples"}}},
                      {"color", {{"field", "fails"}, {"type", "nominal"}, {"title", "bin"},
                                 {"scale", {{"domain", {"below the limit", "straddles it", "passes"}},
                                            {"range", {"#b2182b", "#f4a582", "#4d4d4d"}}}}}}}}},
       {{"data", {{"values", json::array({{{"limit", 0}}})}}},
        {"mark", {{"type", "rule"}, {"strokeDash", {6, 3}}, {"strokeWidth", 2}}},
        {"encoding", {{"x", {{"field", "limit"}, {"type", "quantitative"}}}}}}});
  ReportPlot p{fmt::format("plot-spread-hist-{}", index), "Sampled margin: " + SpreadLabel(check), "", spec};
  p.caption = fmt::format("{} samples with a result; dashed: the limit (margin 0); left of it the check fails",
                          m.size());
  return p;
}

ReportPlot SpreadContributorsPlot(const json& check, int index) {
  json bars = json::array();
  const json& fo = check["first_order"];
  if (fo.value("available", false))
    for (const auto& c : fo["contributors"])
      bars.push_back({{"tolerance", c["tolerance"]}, {"share_percent", 100 * c["share"].get<double>()},
                      {"slope", c["slope"]}});
  json spec = BaseSpec("Variance contributors of " + SpreadLabel(check));
  spec["height"] = std::max<size_t>(80, 22 * bars.size());
  spec["data"] = {{"values", bars}};
  spec["mark"] = "bar";
  spec["encoding"] = {{"y", {{"field", "tolerance"}, {"type", "nominal"}, {"sort", "-x"}, {"title", "tolerance"}}},
                      {"x", {{"field", "share_percent"}, {"type", "quantitative"}, {"title", "share of the variance (%)"}}}};
  ReportPlot p{fmt::format("plot-spread-share-{}", index), "Contributors: " + SpreadLabel(check), "", spec};
  p.caption = fo.value("available", false) ? "first order: each tolerance's share of the margin's variance at the "
                                             "governing point (a negative share lowers it through a correlation)"
                                           : "no first-order estimate: " + fo.value("note", std::string());
  return p;
}

}  // namespace loopwright::cli
