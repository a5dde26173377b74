#include "cli/report.h"

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <cctype>
#include <fstream>
#include <numeric>
#include <set>
#include <sstream>
#include <thread>

#include <fmt/format.h>

#include "cli/output.h"
#include "cli/report_schematic.h"
#include "network/envelope/results.h"
#include "network/tolerance/spread.h"
#include "network/time/simulate.h"
#include "network/time/time_checks.h"

namespace loopwright::cli {

namespace {

// Points whose pump curves are drawn: every converged point up to this many
// (a grid envelope: its named points, the drawing's point, then grid points).
constexpr size_t kCurvePoints = 10;

// The summary entry worst by relative margin (null for none).
const CheckSummary* WorstCheck(const std::vector<CheckSummary>& summary) {
  const CheckSummary* w = nullptr;
  for (const auto& s : summary)
    if (!w || MarginRank(s.worst) < MarginRank(w->worst)) w = &s;
  return w;
}

int PointIndex(const CheckRun& run, const std::string& name) {
  for (size_t i = 0; i < run.sweep.points.size(); ++i)
    if (run.sweep.points[i].name == name) return static_cast<int>(i);
  return -1;
}

// The drawing's point: as asked, else the governing point of the worst
// check, else the first converged point.
void ChooseAnnotated(const CheckRun& run, const std::string& asked, ReportData* d) {
  if (!asked.empty()) {
    d->annotated = PointIndex(run, asked);
    d->annotated_why = "as asked (--point)";
  } else if (const CheckSummary* w = WorstCheck(run.summary)) {
    d->annotated = PointIndex(run, w->point);
    d->annotated_why = fmt::format("the governing point of the worst check, {} at {}", w->worst.name(), w->worst.where);
  }
  if (d->annotated >= 0 && run.sweep.points[d->annotated].converged) return;
  for (size_t i = 0; i < run.sweep.points.size(); ++i)
    if (run.sweep.points[i].converged) {
      d->annotated = static_cast<int>(i);
      d->annotated_why = "the first point with a result";
      return;
    }
  d->annotated = -1;
}

std::vector<int> CurvePoints(const Case& cs, const CheckRun& run, int annotated) {
  std::vector<int> out;
  auto add = [&](int i) {
    if (i >= 0 && run.sweep.points[i].converged && out.size() < kCurvePoints &&
        std::find(out.begin(), out.end(), i) == out.end())
      out.push_back(i);
  };
  for (size_t i = 0; i < cs.envelope.points.size(); ++i)
    if (cs.envelope.points[i].name.empty() || cs.envelope.points[i].name.back() != ']') add(static_cast<int>(i));
  add(annotated);
  for (size_t i = 0; i < cs.envelope.points.size(); ++i) add(static_cast<int>(i));
  std::sort(out.begin(), out.end());
  return out;
}

void AddPumpPlots(const Case& cs, const CheckRun& run, const ReportOptions& opt, ReportData* d) {
  std::vector<PumpSystemCurves> all;
  for (int i : CurvePoints(cs, run, d->annotated))
    for (auto& c : PumpAndSystemCurves(cs, cs.envelope.points[i], opt.curve_samples)) all.push_back(std::move(c));
  std::vector<std::string> pumps;
  for (const auto& c : all)
    if (std::find(pumps.begin(), pumps.end(), c.where) == pumps.end()) pumps.push_back(c.where);
  for (const std::string& where : pumps) {
    std::vector<const PumpSystemCurves*> at;
    for (const auto& c : all)
      if (c.where == where) at.push_back(&c);
    d->plots.push_back(PumpCurvesPlot(where, at, d->us));
  }
}

// Grid plots: the chosen checks (or the three worst) against every axis.
void AddGridPlots(const Case& cs, const CheckRun& run, const ReportOptions& opt, ReportData* d) {
  const std::vector<int> axes = GridAxes(cs);
  if (axes.empty()) return;
  std::vector<const CheckSummary*> ranked;
  for (const auto& s : run.summary) ranked.push_back(&s);
  std::stable_sort(ranked.begin(), ranked.end(), [](const CheckSummary* a, const CheckSummary* b) {
    return MarginRank(a->worst) < MarginRank(b->worst);
  });
  std::vector<const CheckSummary*> chosen;
  std::set<std::string> names;
  for (const CheckSummary* s : ranked) {
    const bool asked = std::find(opt.grid_checks.begin(), opt.grid_checks.end(), s->worst.name()) != opt.grid_checks.end();
    if ((opt.grid_checks.empty() ? chosen.size() < 3 : asked) && names.insert(std::string(s->worst.name())).second) chosen.push_back(s);
  }
  std::vector<std::vector<CheckOutcome>> per_point = run.sweep.checks;
  for (const CheckSummary* s : chosen)
    for (int a : axes) d->plots.push_back(GridPlot(cs, run.sweep.points, per_point, std::string(s->worst.name()), s->worst.where, a, d->us));
}

void AddSizingPlots(const Case& cs, ReportData* d) {
  for (const SizingAnswer& a : d->answers)
    for (const DesignQuestion& q : cs.design)
      if (q.id == a.question)
        if (auto scan = ScanDesignQuestion(cs, q, a, 13)) d->plots.push_back(SizingPlot(*scan, a, d->us));
}

}  // namespace

namespace {

// One scenario through time as a plot: every thermal mass and every watched
// node's temperature, the node pressures and flows left to the JSON of
// `simulate`; the temperature limits of its checks through time as rules.
TimeSeriesPlot ScenarioTraces(const Case& cs, const Scenario& sc) {
  TimeSeriesPlot t;
  t.id = sc.id;
  t.title = "Scenario " + sc.id + ": temperatures through time";
  const SimulationResult r = Simulate(cs, sc, SimulateOptions{});
  if (!r.ok) {
    t.caption = "NOT RUN TO THE END: " + r.failure;
    return t;
  }
  for (const TimeSample& s : r.samples) t.times_s.push_back(s.t);
  for (size_t k = 0; k < r.mass_names.size(); ++k) {
    TimeSeries ts{r.mass_names[k] + " T", Dimension::kTemperature, {}};
    for (const TimeSample& s : r.samples) ts.si.push_back(s.mass_t[k]);
    t.series.push_back(std::move(ts));
  }
  for (const PeakValue& pk : r.peaks) {
    const auto it = std::find(r.node_names.begin(), r.node_names.end(), pk.what);
    if (it == r.node_names.end()) continue;
    const size_t g = static_cast<size_t>(it - r.node_names.begin());
    TimeSeries ts{pk.what + " T", Dimension::kTemperature, {}};
    for (const TimeSample& s : r.samples) ts.si.push_back(s.node_t[g]);
    t.series.push_back(std::move(ts));
  }
  std::set<std::string> seen;
  for (const TimeCheck& c : EvaluateTimeChecks(cs, sc, r)) {
    const CheckRow& row = Check(c.id);
    if (row.dim != Dimension::kTemperature || !seen.insert(row.name).second) continue;
    t.limits.push_back({row.name, Dimension::kTemperature, c.limit});
  }
  t.caption = fmt::format("simulate --scenario {}: {} s simulated; each mass and watched node; dashed: the limits of "
                          "its checks through time", sc.id, r.samples.empty() ? 0.0 : r.samples.back().t);
  return t;
}

// The tolerance study (as `spread --samples N`, whole) and its plots: the
// histogram and contributors of the checks most likely to fail (6 at most).
void AddSpread(const Case& cs, const ReportOptions& opt, ReportData* d) {
  SpreadSettings s;
  s.samples = opt.spread_samples;
  s.threads = opt.threads > 0 ? opt.threads : static_cast<int>(std::max(1u, std::thread::hardware_concurrency()));
  const nlohmann::json header = SpreadHeader(cs, s, &d->spread_error);
  if (header.is_null()) return;
  const std::vector<SpreadBlock> blocks = RunSpreadBlocks(cs, header, s, {}, &d->spread_margins);
  const nlohmann::json part = nlohmann::json::parse(SpreadPart(header, s, blocks).dump());
  if (!MergeParts({part}, &d->spread, &d->spread_error)) return;
  const nlohmann::json& checks = d->spread["checks"];
  std::vector<size_t> order(checks.size());
  std::iota(order.begin(), order.end(), size_t(0));
  std::stable_sort(order.begin(), order.end(), [&](size_t a, size_t b) { return Likelihood(checks[a]) > Likelihood(checks[b]); });
  for (size_t k = 0; k < order.size() && k < 6; ++k) {
    std::vector<double> m;
    for (size_t i = order[k]; i < d->spread_margins.size(); i += checks.size()) m.push_back(d->spread_margins[i]);
    d->plots.push_back(SpreadHistogramPlot(checks[order[k]], static_cast<int>(order[k]), m, d->us));
    d->plots.push_back(SpreadContributorsPlot(checks[order[k]], static_cast<int>(order[k])));
  }
}

}  // namespace

ReportData BuildReport(const Case& cs, const std::string& case_path, const CheckRun* run, const ReportOptions& opt,
                       UnitSystem us, std::string* error) {
  ReportData d;
  d.cs = &cs;
  d.case_path = case_path;
  d.us = us;
  d.tight = opt.tight;
  d.run = run;
  if (run) {
    ChooseAnnotated(*run, opt.point, &d);
    const PointResult* at = d.annotated >= 0 ? &run->sweep.points[d.annotated] : nullptr;
    d.svg = LoopSchematicSvg(cs, at, run->summary, opt.tight, us, &d.svg_error);
    AddPumpPlots(cs, *run, opt, &d);
    d.plots.push_back(MarginHeatmapPlot(cs, run->sweep.points, run->sweep.checks, run->summary, us));
    AddGridPlots(cs, *run, opt, &d);
  } else {
    d.svg = LoopSchematicSvg(cs, nullptr, {}, opt.tight, us, &d.svg_error);
  }
  if (opt.sizing && !cs.design.empty()) {
    d.sizing_run = true;
    d.answers = AnswerDesignQuestions(cs);
    AddSizingPlots(cs, &d);
  }
  if (opt.scenarios)
    for (const Scenario& sc : cs.scenarios) d.scenarios.push_back(ScenarioTraces(cs, sc));
  if (opt.spread && !cs.tolerances.empty()) AddSpread(cs, opt, &d);
  if (!d.svg_error.empty()) *error = d.svg_error;
  return d;
}

namespace {

// A table the summary prints in Markdown and in HTML alike.
struct Table {
  std::vector<std::string> head;
  std::vector<std::vector<std::string>> rows;
};

std::string Escape(const std::string& s) {
  std::string out;
  for (char c : s) {
    switch (c) {
      case '&': out += "&amp;"; break;
      case '<': out += "&lt;"; break;
      case '>': out += "&gt;"; break;
      case '"': out += "&quot;"; break;
      default: out += c;
    }
  }
  return out;
}

std::string MdCell(std::string s) {
  for (size_t i = s.find('|'); i != std::string::npos; i = s.find('|', i + 2)) s.replace(i, 1, "\\|");
  return s;
}

std::string ToMarkdown(const Table& t) {
  std::string out = "|";
  for (const auto& h : t.head) out += " " + MdCell(h) + " |";
  out += "\n|";
  for (size_t i = 0; i < t.head.size(); ++i) out += " --- |";
  out += "\n";
  for (const auto& r : t.rows) {
    out += "|";
    for (const auto& c : r) out += " " + MdCell(c) + " |";
    out += "\n";
  }
  return out;
}

std::string ToHtml(const Table& t) {
  std::string out = "<table><thead><tr>";
  for (const auto& h : t.head) out += "<th>" + Escape(h) + "</th>";
  out += "</tr></thead><tbody>";
  for (const auto& r : t.rows) {
    out += r.empty() || r[0] != "FAIL" ? "<tr>" : "<tr class=\"fail\">";
    for (const auto& c : r) out += "<td>" + Escape(c) + "</td>";
    out += "</tr>";
  }
  return out + "</tbody></table>";
}

// The verdict line: what a reviewer reads first.
std::string VerdictLine(const ReportData& d) {
  std::string out;
  if (d.run) {
    const CheckRun& r = *d.run;
    const std::string& v = r.verdict;
    out = fmt::format("{}: {} checks at {} of {} points, {} failing", v == "pass" ? "PASS" : v == "fail" ? "FAIL" : "NOT CONVERGED",
                      r.summary.size(), r.names.size(), r.sweep.points.size(), r.nfail);
    if (!r.failed_points.empty())
      out += fmt::format("; {} point(s) did not converge and have no result (they count as failing)", r.failed_points.size());
  }
  if (d.sizing_run) {
    size_t infeasible = 0;
    for (const auto& a : d.answers) infeasible += a.feasible ? 0 : 1;
    out += fmt::format("{}{} design question(s) answered, {} infeasible", out.empty() ? "" : ". ", d.answers.size(), infeasible);
  }
  return out;
}

// The points without a result, each with its cause.
std::vector<std::string> NotConvergedLines(const ReportData& d) {
  std::vector<std::string> out;
  if (!d.run) return out;
  for (const auto& p : d.run->sweep.points)
    if (!p.converged)
      out.push_back(fmt::format("point \"{}\" {}: {}", p.name,
                                p.summary.termination == Termination::kUnphysical ? "reached a physically impossible state"
                                                                                  : "did not converge",
                                Localize(p.summary.Report(), d.us)));
  return out;
}

// Failing, then tight, then the smallest margins, worst first: up to 12 rows.
Table GoverningTable(const ReportData& d) {
  Table t{{"verdict", "check", "where", "governing point", "value", "limit", "margin", "unit", "limit from"}, {}};
  if (!d.run) return t;
  std::vector<const CheckSummary*> rows;
  for (const auto& s : d.run->summary) rows.push_back(&s);
  std::stable_sort(rows.begin(), rows.end(), [](const CheckSummary* a, const CheckSummary* b) {
    return MarginRank(a->worst) < MarginRank(b->worst);
  });
  for (const CheckSummary* s : rows) {
    const CheckOutcome& o = s->worst;
    const bool tight = o.pass && o.limit != 0 && o.margin < TightBand(*d.cs, o, d.tight);
    if (t.rows.size() >= 12 && o.pass) break;
    t.rows.push_back({o.pass ? (tight ? "tight" : "pass") : "FAIL", std::string(o.name()), o.where, s->point,
                      FormatValue(o.value, o.dim, d.us), FormatValue(o.limit, o.dim, d.us),
                      FormatValue(o.margin, MarginDimension(o.dim), d.us),
                      o.dim == Dimension::kDimensionless ? "-" : DisplayUnit(o.dim, d.us), LimitSourceText(*d.cs, o)});
  }
  return t;
}

// Every check of the tolerance study, most likely to fail first.
Table SpreadTable(const ReportData& d) {
  Table t{{"check", "where", "governing point", "P(fail) first order", "P(fail) sampled", "95 % interval (Wilson)",
           "first order", "top contributors"}, {}};
  const nlohmann::json& checks = d.spread["checks"];
  std::vector<size_t> order(checks.size());
  std::iota(order.begin(), order.end(), size_t(0));
  std::stable_sort(order.begin(), order.end(), [&](size_t a, size_t b) { return Likelihood(checks[a]) > Likelihood(checks[b]); });
  for (size_t i : order) {
    const nlohmann::json& c = checks[i];
    const nlohmann::json &fo = c["first_order"], &sm = c["sampled"];
    const std::string reliable = c["first_order_reliable"].is_boolean()
                                     ? (c["first_order_reliable"].get<bool>() ? "ok" : "UNRELIABLE") : "-";
    t.rows.push_back({c["name"].get<std::string>(), c["where"].get<std::string>(), c["nominal"]["point"].get<std::string>(),
                      fo.value("available", false) ? Probability(fo["probability"]) : "-", Probability(sm["probability"]),
                      fmt::format("{} ... {}", Probability(sm["interval"]["low"]), Probability(sm["interval"]["high"])),
                      reliable, Contributors(fo, 3)});
  }
  return t;
}

std::string SpreadSection(const ReportData& d) {
  if (d.spread.is_null() && d.spread_error.empty()) return "";
  std::string h = "<h2 id=\"spread\">Tolerance study</h2>";
  if (d.spread.is_null()) return h + "<p class=\"nc\">No tolerance study: " + Escape(d.spread_error) + "</p>";
  const nlohmann::json& st = d.spread["settings"];
  h += fmt::format("<p class=\"caption\">{} samples (Latin hypercube, seed {}) over the {} points, {} without a "
                   "result; first order from the exact sensitivities at each check's governing point; UNRELIABLE: the "
                   "first-order probability lies outside the sampled 99.9 % interval. The same study as <code>loopwright "
                   "spread --samples {}</code>.</p>",
                   st["samples"].get<uint64_t>(), st["seed"].get<uint64_t>(), d.spread["points"].size(),
                   d.spread["samples_unsolved"].get<uint64_t>(), st["samples"].get<uint64_t>());
  return h + "<div id=\"spread-table\">" + ToHtml(SpreadTable(d)) + "</div>";
}

std::string FixText(const ReportData& d) {
  if (!d.run) return "";
  std::string s = FixTable(d.run->fixes, d.us);
  if (!d.run->fixes_note.empty()) s += "\n" + d.run->fixes_note + "\n";
  while (!s.empty() && s.front() == '\n') s.erase(0, 1);
  return s;
}

}  // namespace

std::string ReportMarkdown(const ReportData& d) {
  std::string md = fmt::format("# loopwright report: {}\n\nCase file `{}`, loopwright {}.\n\n**{}**\n", d.cs->name,
                               d.case_path, LOOPWRIGHT_VERSION, VerdictLine(d));
  for (const auto& l : NotConvergedLines(d)) md += "\n- NOT CONVERGED: " + l;
  if (d.run) md += "\n\n## Governing checks (worst first)\n\n" + ToMarkdown(GoverningTable(d));
  const std::string fixes = FixText(d);
  if (!fixes.empty()) md += "\n## What would fix what\n\n```text\n" + fixes + "```\n";
  if (d.sizing_run) md += "\n## Sizing answers\n\n```text\n" + SizeAnswers(d.answers, d.us) + "```\n";
  md += fmt::format("\n## Cautions\n\n{}\n", SafetyCautions());
  return md;
}

std::string DefaultWebDir() {
  if (const char* e = std::getenv("LOOPWRIGHT_WEB_DIR"); e && *e) return e;
  return LOOPWRIGHT_WEB_DIR;
}

namespace {

// A browser build read from the web dir, made safe to inline in <script>.
bool ReadScript(const std::string& path, std::string* out, std::string* error) {
  std::ifstream in(path, std::ios::binary);
  if (!in) {
    *error = fmt::format("cannot read the plot script \"{}\" (the build installs it with npm ci from "
                         "cli/web/package-lock.json; or set LOOPWRIGHT_WEB_DIR to a node_modules holding vega, "
                         "vega-lite and vega-embed)", path);
    return false;
  }
  std::ostringstream ss;
  ss << in.rdbuf();
  std::string s = ss.str();
  const size_t map = s.rfind("//# sourceMappingURL=");
  if (map != std::string::npos) s.erase(map);
  for (size_t i = s.find("</script"); i != std::string::npos; i = s.find("</script", i + 2)) s.replace(i, 2, "<\\/");
  *out = s;
  return true;
}

std::string ElementId(const std::string& id) {
  std::string out;
  for (char c : id) out += std::isalnum(static_cast<unsigned char>(c)) || c == '-' ? c : '-';
  return out;
}

constexpr const char* kStyle = R"(body{font-family:sans-serif;margin:1.5em auto;max-width:1100px;color:#111;padding:0 1em}
h1{font-size:1.5em;margin-bottom:.2em}h2{border-bottom:1px solid #999;margin-top:1.6em}
.verdict{font-size:1.2em;font-weight:bold;padding:.5em .8em;border:3px solid #333;margin:.6em 0}
.verdict.fail{background:#fbd5d5;border-style:solid}.verdict.pass{background:#dff0d8;border-style:dotted}
.verdict.not-converged{background:#fde3a7;border-style:double;border-width:5px}
.nc{font-weight:bold;color:#8a1c00}table{border-collapse:collapse;font-size:.85em;margin:.5em 0}
td,th{border:1px solid #bbb;padding:2px 6px;text-align:left}tr.fail td{font-weight:bold;background:#fbe3e3}
pre{background:#f4f4f4;padding:.6em;overflow-x:auto;font-size:.85em;white-space:pre-wrap}
textarea{width:100%;height:14em;font-family:monospace;font-size:.8em}.schematic{overflow-x:auto;border:1px solid #ccc}
.legend span{display:inline-block;margin:.2em 1em .2em 0;font-size:.85em;vertical-align:middle}
.legend svg{vertical-align:middle}.caption{font-size:.85em;color:#333}.cautions{border-left:4px solid #b00;padding-left:.8em}
)";

// Captures console errors and uncaught failures into #lw-errors (read by
// the browser test and shown to a reader), before any other script runs.
constexpr const char* kErrorCapture = R"(<script>(function(){var box=[];window.lwErrors=box;
function note(m){box.push(String(m));var e=document.getElementById('lw-errors');if(e){e.textContent=box.join('\n');e.hidden=false;}}
var ce=console.error;console.error=function(){note(Array.prototype.join.call(arguments,' '));ce.apply(console,arguments);};
window.addEventListener('error',function(e){note('error: '+e.message);});
window.addEventListener('unhandledrejection',function(e){note('unhandled: '+(e.reason&&e.reason.message||e.reason));});})();</script>
)";

constexpr const char* kRender = R"(<script>(function(){
var specs=JSON.parse(document.getElementById('lw-plot-specs').textContent);var jobs=[];
Object.keys(specs).forEach(function(id){var el=document.getElementById(id);
jobs.push(vegaEmbed(el,specs[id],{renderer:'svg',actions:false,mode:'vega-lite'}).catch(function(e){console.error('plot '+id+': '+e);}));});
Promise.all(jobs).then(function(){document.body.setAttribute('data-plots-rendered',String(jobs.length));});})();</script>
)";

std::string FirstScreen(const ReportData& d, const std::string& md) {
  const std::string v = d.run ? d.run->verdict : "sizing";
  std::string h = fmt::format("<h1>loopwright report: {}</h1><p>Case file <code>{}</code>, loopwright {}.</p>",
                              Escape(d.cs->name), Escape(d.case_path), LOOPWRIGHT_VERSION);
  h += fmt::format("<div class=\"verdict {}\" id=\"verdict\">{}</div>", v, Escape(VerdictLine(d)));
  for (const auto& l : NotConvergedLines(d)) h += "<p class=\"nc\">NOT CONVERGED: " + Escape(l) + "</p>";
  if (d.run) h += "<h2>Governing checks (worst first)</h2>" + ToHtml(GoverningTable(d));
  const std::string fixes = FixText(d);
  if (!fixes.empty()) h += "<h2>What would fix what</h2><pre>" + Escape(fixes) + "</pre>";
  if (d.sizing_run) h += "<h2>Sizing answers</h2><pre>" + Escape(SizeAnswers(d.answers, d.us)) + "</pre>";
  h += fmt::format("<p class=\"cautions\"><b>Cautions.</b> {}</p>", Escape(SafetyCautions()));
  h += "<details><summary>This summary as Markdown (to paste into a review or a ticket)</summary><textarea readonly>" +
       Escape(md) + "</textarea></details>";
  return h;
}

std::string Drawing(const ReportData& d) {
  std::string h = "<h2>The loops</h2>";
  if (d.run && d.annotated >= 0)
    h += fmt::format("<p class=\"caption\">Annotated at point <b>{}</b> ({}): node gauge pressure and temperature, "
                     "component flow. Outlines and labels: the worst margin of each place's checks over the envelope.</p>",
                     Escape(d.run->sweep.points[d.annotated].name), Escape(d.annotated_why));
  else
    h += "<p class=\"caption\">Topology only: no point with a result to annotate.</p>";
  if (!d.svg_error.empty()) h += "<p class=\"nc\">" + Escape(d.svg_error) + "</p>";
  return h + SchematicLegendHtml() + "<div class=\"schematic\" id=\"schematic\">" + d.svg + "</div>";
}

}  // namespace

bool ReportHtml(const ReportData& d, const std::string& web_dir, std::string* html, std::string* error) {
  std::string vega, lite, embed;
  if (!ReadScript(web_dir + "/vega/build/vega.min.js", &vega, error) ||
      !ReadScript(web_dir + "/vega-lite/build/vega-lite.min.js", &lite, error) ||
      !ReadScript(web_dir + "/vega-embed/build/vega-embed.min.js", &embed, error))
    return false;
  std::vector<ReportPlot> plots = d.plots;
  for (const TimeSeriesPlot& t : d.scenarios) plots.push_back(ScenarioPlot(t, d.us));
  nlohmann::json specs = nlohmann::json::object();
  std::string body;
  for (const ReportPlot& p : plots) {
    const std::string id = ElementId(p.id);
    specs[id] = p.spec;
    body += fmt::format("<h3>{}</h3><p class=\"caption\">{}</p><div class=\"plot\" id=\"{}\"></div>", Escape(p.title),
                        Escape(p.caption), id);
  }
  std::string spec_text = specs.dump();
  for (size_t i = spec_text.find("</"); i != std::string::npos; i = spec_text.find("</", i + 3)) spec_text.replace(i, 2, "<\\/");
  std::string& h = *html;
  h = "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\"><title>loopwright report: " + Escape(d.cs->name) +
      "</title><style>" + kStyle + "</style>" + kErrorCapture + "</head><body>";
  h += FirstScreen(d, ReportMarkdown(d)) + Drawing(d) + SpreadSection(d);
  h += "<h2>Plots</h2>" + (plots.empty() ? std::string("<p>No plots: the envelope was not run.</p>") : body);
  h += "<pre id=\"lw-errors\" hidden></pre>";
  h += "<script>" + vega + "</script><script>" + lite + "</script><script>" + embed + "</script>";
  h += "<script type=\"application/json\" id=\"lw-plot-specs\">" + spec_text + "</script>" + kRender;
  h += "</body></html>\n";
  return true;
}

}  // namespace loopwright::cli
