#include "network/envelope/results.h"

#include <cmath>
#include <functional>
#include <algorithm>
#include <map>
#include <sstream>
#include <stdexcept>
#include <unordered_map>
#include <string_view>

#include <fmt/format.h>

#include "library/json_writer.h"
#include "library/oil.h"

namespace loopwright {

using nlohmann::json;

std::string_view SiKeySuffixView(Dimension dim) {
  switch (dim) {
    case Dimension::kDimensionless: return "";
    case Dimension::kPressure: return "_Pa";
    case Dimension::kPressureDifference: return "_Pa";
    case Dimension::kVolumeFlow: return "_m3_s";
    case Dimension::kMassFlow: return "_kg_s";
    case Dimension::kLength: return "_m";
    case Dimension::kArea: return "_m2";
    case Dimension::kVolume: return "_m3";
    case Dimension::kDisplacement: return "_m3_rev";
    case Dimension::kTemperature: return "_K";
    case Dimension::kTemperatureDifference: return "_K";
    case Dimension::kKinematicViscosity: return "_m2_s";
    case Dimension::kDynamicViscosity: return "_Pa_s";
    case Dimension::kDensity: return "_kg_m3";
    case Dimension::kPower: return "_W";
    case Dimension::kConductance: return "_W_K";
    case Dimension::kRotationalSpeed: return "_rad_s";
    case Dimension::kSpecificHeat: return "_J_kgK";
    case Dimension::kThermalConductivity: return "_W_mK";
    case Dimension::kVelocity: return "_m_s";
    case Dimension::kTime: return "_s";
    case Dimension::kSlipCoefficient: return "_m3";
    case Dimension::kInverseTemperature: return "_1_K";
    case Dimension::kFlowCoefficientKv: return "_Kv";
    case Dimension::kForce: return "_N";
    case Dimension::kMass: return "_kg";
    default: return "";
  }
}

std::string SiKeySuffix(Dimension dim) { return std::string(SiKeySuffixView(dim)); }

std::string SiUnitName(Dimension dim) {
  const std::string suffix = SiKeySuffix(dim);
  return suffix.empty() ? "1" : suffix.substr(1);
}

namespace {

// One check outcome (and the envelope's point where it was worst, when
// `point` is given), keys in order.
void WriteCheckOutcome(JsonWriter& w, const Case& cs, const CheckOutcome& o, const std::string* point) {
  w.BeginObject().Member("limit", o.limit).Member("limit_source", LimitSourceName(o.source));
  if (const std::string id = LimitSourceId(cs, o); !id.empty()) w.Member("limit_source_id", id);  // who set it
  w.Member("margin", o.margin).Member("name", o.name()).Member("pass", o.pass);
  if (point) w.Member("point", *point);
  w.Member("unit", SiUnitName(o.dim)).Member("value", o.value).Member("where", o.where).EndObject();
}

// A value written by `write` into a JSON text, parsed (the in-memory
// documents of small cases and tools).
template <typename Write>
json Parsed(const Write& write) {
  std::string text;
  JsonWriter w(&text);
  write(w);
  return json::parse(text);
}

}  // namespace

nlohmann::json CheckOutcomeJson(const Case& cs, const CheckOutcome& o) {
  return Parsed([&](JsonWriter& w) { WriteCheckOutcome(w, cs, o, nullptr); });
}

const char* SafetyCautions() {
  return "These are engineering estimates. Confirm them against the manufacturers' data for the machine, pump, "
         "filter, valves and coolers. Hot oil, pressurised lines and high-speed rotors can injure and can start "
         "fires; follow local codes and licensed practice.";
}

namespace {

// A report item's member of "details": its key and suffix ("_K", or
// "_state" for its text).
struct DetailKey {
  std::string_view key, suffix;
  const ReportItem* item;
  bool state;
};

bool KeyLess(const DetailKey& a, const DetailKey& b) {
  const size_t na = a.key.size() + a.suffix.size(), nb = b.key.size() + b.suffix.size();
  for (size_t i = 0; i < na && i < nb; ++i) {
    const char ca = i < a.key.size() ? a.key[i] : a.suffix[i - a.key.size()];
    const char cb = i < b.key.size() ? b.key[i] : b.suffix[i - b.key.size()];
    if (ca != cb) return static_cast<unsigned char>(ca) < static_cast<unsigned char>(cb);
  }
  return na < nb;
}

// "details": the report items (a summary keeps the temperatures only), keys
// in order; a key written twice keeps its last value, as a JSON object would.
void WriteDetails(JsonWriter& w, const ComponentReport& r, JsonDetail detail) {
  thread_local std::vector<DetailKey> keys;
  keys.clear();
  for (const auto& it : r.items) {
    if (detail == JsonDetail::kSummary && it.dim != Dimension::kTemperature) continue;
    keys.push_back({it.key, SiKeySuffixView(it.dim), &it, false});
    if (detail == JsonDetail::kFull && !it.text.empty()) keys.push_back({it.key, "_state", &it, true});
  }
  std::stable_sort(keys.begin(), keys.end(), KeyLess);
  w.BeginObject();
  for (size_t i = 0; i < keys.size(); ++i) {
    if (i + 1 < keys.size() && !KeyLess(keys[i], keys[i + 1])) continue;  // a later equal key wins
    w.Key(keys[i].key, keys[i].suffix);
    if (keys[i].state) w.String(keys[i].item->text);
    else w.Number(keys[i].item->value);
  }
  w.EndObject();
}

// Branch k's report, made into one buffer per thread (the writers describe
// every component of a point in turn: no allocation per component).
const ComponentReport& ReportOf(const Case& cs, const PointResult& p, size_t k) {
  thread_local ComponentReport r;
  DescribeBranch(cs, p, k, &r);
  return r;
}

void WriteComponent(JsonWriter& w, const Case& cs, const PointResult& p, size_t k, JsonDetail detail) {
  const BranchOutcome& b = p.branches[k];
  const ComponentReport& r = ReportOf(cs, p, k);
  const LoopSpec& loop = cs.loops[b.loop];
  const ComponentSpec& c = loop.components[b.comp];
  w.BeginObject().Key("details");
  WriteDetails(w, r, detail);
  const BranchResult st = BranchState(cs, p, k);
  w.Member("dp_Pa", st.p_from - st.p_to)
      .Member("dp_piezometric_Pa", st.dp)
      .Member("flow_m3_s", b.flow_m3s)
      .Member("from", loop.nodes[c.from].id)
      .Member("heat_W", r.heat_W)
      .Member("id", c.id)
      .Member("loop", loop.id)
      .Member("mass_flow_kg_s", b.m);
  if (r.shaft_power_W > 0) w.Member("shaft_power_W", r.shaft_power_W);
  w.Member("to", loop.nodes[c.to].id).Member("type", c.type()).Member("warnings", r.warnings).EndObject();
}

void WriteNode(JsonWriter& w, const Case& cs, const NodeResult& n) {
  const LoopSpec& loop = cs.loops[n.loop];
  w.BeginObject();
  if (!std::isnan(n.boiling_margin_k)) w.Member("boiling_margin_K", n.boiling_margin_k);
  w.Member("boundary", n.boundary)
      .Member("id", loop.nodes[n.node].id)
      .Member("loop", loop.id)
      .Member("pressure_Pa", n.pressure_pa)
      .Member("pressure_abs_Pa", n.pressure_pa + cs.ambient_pa)
      .Member("temperature_K", n.temperature_k)
      .EndObject();
}

// The compact document (JsonDetail::kSummary): a node or a component is one
// array, its values in the order of the document's "summary_columns", with
// one object after them holding what only some rows have (a component's
// temperatures, shaft power and warnings; a node's boiling margin), left out
// when there is none. What the case file already says (a component's ends and
// type, a node's boundary) and what the document says once (the gauge
// pressure's ambient) is not repeated.
const char* const kNodeColumns[] = {"loop", "id", "pressure_Pa", "temperature_K"};
const char* const kComponentColumns[] = {"loop", "id", "flow_m3_s", "mass_flow_kg_s", "dp_Pa", "dp_piezometric_Pa",
                                         "heat_W"};
// A check group's outcomes (and the top-level summary's, with its point).
const char* const kOutcomeColumns[] = {"where", "value", "margin", "pass"};
const char* const kWorstColumns[] = {"where", "value", "margin", "pass", "point"};

template <size_t N>
json Columns(const char* const (&names)[N]) {
  json a = json::array();
  for (const char* n : names) a.push_back(n);
  return a;
}

json SummaryColumns() {
  return {{"nodes", Columns(kNodeColumns)}, {"components", Columns(kComponentColumns)},
          {"check_outcomes", Columns(kOutcomeColumns)}, {"check_worst", Columns(kWorstColumns)}};
}

void WriteNodeRow(JsonWriter& w, const Case& cs, const NodeResult& n) {
  const LoopSpec& loop = cs.loops[n.loop];
  w.BeginArray().String(loop.id).String(loop.nodes[n.node].id).Number(n.pressure_pa).Number(n.temperature_k);
  if (!std::isnan(n.boiling_margin_k)) w.BeginObject().Member("boiling_margin_K", n.boiling_margin_k).EndObject();
  w.EndArray();
}

void WriteComponentRow(JsonWriter& w, const Case& cs, const PointResult& p, size_t k) {
  const BranchOutcome& b = p.branches[k];
  const ComponentReport& r = ReportOf(cs, p, k);
  const LoopSpec& loop = cs.loops[b.loop];
  const BranchResult st = BranchState(cs, p, k);
  w.BeginArray().String(loop.id).String(loop.components[b.comp].id).Number(b.flow_m3s).Number(b.m);
  w.Number(st.p_from - st.p_to).Number(st.dp).Number(r.heat_W);
  const bool temps = std::any_of(r.items.begin(), r.items.end(),
                                 [](const ReportItem& it) { return it.dim == Dimension::kTemperature; });
  if (temps || r.shaft_power_W > 0 || !r.warnings.empty()) {
    w.BeginObject();
    if (temps) WriteDetails(w.Key("details"), r, JsonDetail::kSummary);
    if (r.shaft_power_W > 0) w.Member("shaft_power_W", r.shaft_power_W);
    if (!r.warnings.empty()) w.Member("warnings", r.warnings);
    w.EndObject();
  }
  w.EndArray();
}

// Energy per loop, coupling duties and passes of a thermal point.
void AddThermal(const Case& cs, const PointResult& p, json* pj) {
  const ThermalReport& t = p.thermal_report;
  json loops = json::array();
  for (size_t l = 0; l < cs.loops.size() && l < t.loop_heat_added.size(); ++l)
    loops.push_back({{"loop", cs.loops[l].id}, {"heat_added_W", t.loop_heat_added[l]},
                     {"heat_removed_W", t.loop_heat_removed[l]}, {"heat_carried_out_W", t.loop_heat_carried[l]},
                     {"work_heat_W", t.loop_work_heat[l]}, {"work_heat_included", cs.work_heat},
                     {"energy_closure_W", t.loop_closure_W[l]}, {"energy_closure_relative", t.loop_closure[l]}});
  (*pj)["energy"] = loops;
  json cps = json::array();
  for (size_t i = 0; i < cs.couplings.size() && i < t.coupling_duty.size(); ++i)
    cps.push_back({{"id", cs.couplings[i].id}, {"duty_W", t.coupling_duty[i]},
                   {"effectiveness", t.coupling_effectiveness[i]}});
  (*pj)["couplings"] = cps;
  (*pj)["coupling_passes"] = p.coupling_iterations;
}

// Every member of a point but its nodes and components.
json PointHead(const Case& cs, const PointResult& p) {
  json pj;
  pj["name"] = p.name;
  json vals = json::object();
  for (size_t i = 0; i < cs.envelope.variables.size() && i < p.values.size(); ++i)
    vals[cs.envelope.variables[i].name + SiKeySuffix(cs.envelope.variables[i].dim)] = p.values[i];
  pj["values"] = vals;
  pj["converged"] = p.converged;
  pj["solver"] = {{"termination", TerminationName(p.summary.termination)},
                  {"newton_iterations", p.summary.newton_iterations},
                  {"coupling_passes", p.summary.coupling_passes},
                  {"lm_iterations", p.summary.lm_iterations},
                  {"max_pressure_residual_Pa", p.summary.max_pressure_residual_pa},
                  {"report", p.summary.Report()}};
  pj["checks"] = json::array();
  if (!p.converged) {
    json worst = json::array();
    for (const auto& w : p.summary.worst) worst.push_back({{"equation", w.what}, {"residual", w.residual}, {"unit", w.unit}});
    pj["largest_residuals"] = worst;
    pj["cause"] = {{"kind", p.summary.cause_kind}, {"place", p.summary.place}, {"text", p.summary.cause}};
    return pj;
  }
  pj["max_mass_imbalance_relative"] = p.max_mass_imbalance_rel;
  pj["mass_balance_closure"] = {
      {"max_imbalance_kg_s", p.max_mass_imbalance_kg_s},
      {"max_imbalance_relative_to_largest_flow", p.max_mass_imbalance_rel},
      {"node", MassImbalanceNode(cs, p)}};
  pj["warnings"] = p.warnings;
  if (p.thermal) AddThermal(cs, p, &pj);
  return pj;
}

// Every member of the document but its points.
json ResultsHead(const Case& cs, const std::string& verdict) {
  json j;
  j["tool"] = "loopwright";
  j["version"] = LOOPWRIGHT_VERSION;
  j["case"] = cs.name;
  j["case_file"] = cs.path;
  j["verdict"] = verdict;
  j["ambient_pressure_Pa"] = cs.ambient_pa;
  j["cautions"] = SafetyCautions();
  // Each fluid by id: its kind and, for an oil, its ASTM D2270 viscosity
  // index (null where D2270 does not define it, KV100 < 2 cSt).
  json fl = json::object();
  for (const auto& [id, f] : cs.fluids) {
    if (!f) continue;
    fl[id] = {{"kind", f->Kind()}};
    if (const auto* oil = dynamic_cast<const OilFluid*>(f.get())) {
      const double vi = oil->ViscosityIndex();
      fl[id]["viscosity_index"] = std::isfinite(vi) ? json(vi) : json(nullptr);
    }
  }
  j["fluids"] = fl;
  return j;
}

// Streaming in dump(2) layout. A member written by a function: `indent` is
// the column of the line the value starts on.
using ValueWriter = std::function<void(std::ostream&, int indent)>;

// `v` as dump(2) writes it nested at `indent`.
void WriteNested(std::ostream& os, const json& v, int indent) {
  const std::string s = v.dump(2);
  const std::string pad(static_cast<size_t>(indent), ' ');
  size_t start = 0;
  for (size_t nl; (nl = s.find('\n', start)) != std::string::npos; start = nl + 1) {
    os.write(s.data() + start, static_cast<std::streamsize>(nl + 1 - start));
    os << pad;
  }
  os.write(s.data() + start, static_cast<std::streamsize>(s.size() - start));
}

// The object `small` with the members of `streamed` (keys not in `small`)
// merged in, in key order as nlohmann::json keeps it.
void WriteObject(std::ostream& os, const json& small, const std::map<std::string, ValueWriter>& streamed, int indent) {
  if (small.empty() && streamed.empty()) {
    os << "{}";
    return;
  }
  const std::string pad(static_cast<size_t>(indent) + 2, ' ');
  os << "{\n";
  auto s = small.begin();
  auto w = streamed.begin();
  for (bool first = true; s != small.end() || w != streamed.end(); first = false) {
    const bool take_w = s == small.end() || (w != streamed.end() && w->first < s.key());
    os << (first ? "" : ",\n") << pad << json(take_w ? w->first : s.key()).dump() << ": ";
    if (take_w) (w++)->second(os, indent + 2);
    else WriteNested(os, *s++, indent + 2);
  }
  os << "\n" << std::string(static_cast<size_t>(indent), ' ') << "}";
}

// The array's text goes to `os` in blocks of about this many bytes (a
// fixed cost: the buffer stays under twice this whatever the case size).
constexpr size_t kBlockBytes = 1 << 16;

void Flush(std::ostream& os, std::string* text) {
  os.write(text->data(), static_cast<std::streamsize>(text->size()));
  text->clear();
}

// An array of n elements, element i appended to the array's text by
// element(&text, i, indent) or written to `os` itself after Flush.
template <typename Element>
void WriteArray(std::ostream& os, size_t n, const Element& element, int indent) {
  if (n == 0) {
    os << "[]";
    return;
  }
  std::string text = "[\n";
  for (size_t i = 0; i < n; ++i) {
    if (i) text.append(",\n");
    text.append(static_cast<size_t>(indent) + 2, ' ');
    element(&text, i, indent + 2);
    if (text.size() >= kBlockBytes) Flush(os, &text);
  }
  text.push_back('\n');
  text.append(static_cast<size_t>(indent), ' ');
  text.push_back(']');
  Flush(os, &text);
}

// An array whose element i is written by write(JsonWriter&, i): a summary
// document puts each on one line, a full one nests it at its indent.
template <typename Write>
void WriteElements(std::ostream& os, size_t n, int indent, JsonDetail detail, const Write& write) {
  WriteArray(os, n, [&](std::string* text, size_t i, int at) {
    JsonWriter w(text, detail == JsonDetail::kSummary ? 0 : 2, at);
    write(w, i);
  }, indent);
}

// Check outcomes in the compact document: one group per check and limit
// (its name, unit, limit, limit_source and limit_source_id, said once), in
// the order of each group's first outcome, then its outcomes in their order,
// each a row of kOutcomeColumns (kWorstColumns with the point where it was
// worst, when `point` gives it). Grouped by a hash of what the group says, so
// the cost is linear in the outcomes.
void WriteCheckGroups(std::ostream& os, const Case& cs, size_t n, const std::function<const CheckOutcome&(size_t)>& outcome,
                      const std::function<const std::string*(size_t)>& point, int indent) {
  if (n == 0) {
    os << "[]";
    return;
  }
  std::unordered_map<std::string, uint32_t> index;
  std::vector<uint32_t> group(n), first, count;
  std::string key;
  for (size_t i = 0; i < n; ++i) {
    const CheckOutcome& o = outcome(i);
    key.assign(o.name()).push_back('\0');
    key.append(reinterpret_cast<const char*>(&o.limit), sizeof o.limit).push_back(static_cast<char>(o.source));
    key.append(reinterpret_cast<const char*>(&o.source_loop), sizeof o.source_loop);
    key.append(reinterpret_cast<const char*>(&o.source_item), sizeof o.source_item);
    const auto [it, added] = index.try_emplace(key, static_cast<uint32_t>(first.size()));
    if (added) first.push_back(static_cast<uint32_t>(i)), count.push_back(0);
    group[i] = it->second;
    ++count[it->second];
  }
  std::vector<uint32_t> start(first.size() + 1, 0), order(n);
  for (size_t g = 0; g < first.size(); ++g) start[g + 1] = start[g] + count[g];
  for (size_t i = 0; i < n; ++i) order[start[group[i]]++] = static_cast<uint32_t>(i);  // start[g]: now its end
  const std::string pad(static_cast<size_t>(indent) + 2, ' '), row_pad = pad + "  ";
  std::string text = "[";
  for (size_t g = 0, at = 0; g < first.size(); at = start[g++]) {
    const CheckOutcome& h = outcome(first[g]);
    text.append(g ? ",\n" : "\n").append(pad);
    JsonWriter w(&text);
    w.BeginObject().Member("limit", h.limit).Member("limit_source", LimitSourceName(h.source));
    if (const std::string id = LimitSourceId(cs, h); !id.empty()) w.Member("limit_source_id", id);
    w.Member("name", h.name()).Member("unit", SiUnitName(h.dim));
    text.append(",\"outcomes\":[");
    for (size_t k = at; k < start[g]; ++k) {
      const CheckOutcome& o = outcome(order[k]);
      text.append(k > at ? ",\n" : "\n").append(row_pad);
      JsonWriter r(&text);
      r.BeginArray().String(o.where).Number(o.value).Number(o.margin).Bool(o.pass);
      if (const std::string* p = point(order[k])) r.String(*p);
      r.EndArray();
      if (text.size() >= kBlockBytes) Flush(os, &text);
    }
    text.append("\n").append(pad).append("]}");
  }
  text.append("\n").append(static_cast<size_t>(indent), ' ').push_back(']');
  Flush(os, &text);
}

// One point, a node and a component at a time.
void WritePoint(std::ostream& os, const Case& cs, const PointResult& p, const std::vector<CheckOutcome>* checks,
                JsonDetail detail, int indent) {
  json head = PointHead(cs, p);
  const bool summary = detail == JsonDetail::kSummary;
  const size_t nn = p.converged ? p.nodes.size() : 0, nb = p.converged ? p.branches.size() : 0;
  std::map<std::string, ValueWriter> streamed = {
      {"nodes", [&](std::ostream& o, int in) {
         WriteElements(o, nn, in, detail, [&](JsonWriter& w, size_t i) {
           if (summary) WriteNodeRow(w, cs, p.nodes[i]);
           else WriteNode(w, cs, p.nodes[i]);
         });
       }},
      {"components", [&](std::ostream& o, int in) {
         WriteElements(o, nb, in, detail, [&](JsonWriter& w, size_t i) {
           if (summary) WriteComponentRow(w, cs, p, i);
           else WriteComponent(w, cs, p, i, detail);
         });
       }}};
  if (checks) {
    head.erase("checks");
    streamed["checks"] = [&](std::ostream& o, int in) {
      if (summary) {
        WriteCheckGroups(o, cs, checks->size(), [&](size_t i) -> const CheckOutcome& { return (*checks)[i]; },
                         [](size_t) -> const std::string* { return nullptr; }, in);
        return;
      }
      WriteElements(o, checks->size(), in, detail,
                    [&](JsonWriter& w, size_t i) { WriteCheckOutcome(w, cs, (*checks)[i], nullptr); });
    };
  }
  WriteObject(os, head, streamed, indent);
}

}  // namespace

json CheckSummaryJson(const Case& cs, const CheckSummary& s) {
  return Parsed([&](JsonWriter& w) { WriteCheckOutcome(w, cs, s.worst, &s.point); });
}

bool ParseJsonDetail(const std::string& word, JsonDetail* detail) {
  if (word == "full") *detail = JsonDetail::kFull;
  else if (word == "summary") *detail = JsonDetail::kSummary;
  else return false;
  return true;
}

json PointJson(const Case& cs, const PointResult& p, JsonDetail detail) {
  if (detail == JsonDetail::kSummary) return json::parse(PointText(cs, p, nullptr, detail));
  json pj = PointHead(cs, p);
  pj["nodes"] = json::array();
  pj["components"] = json::array();
  if (!p.converged) return pj;
  for (const auto& n : p.nodes) pj["nodes"].push_back(Parsed([&](JsonWriter& w) { WriteNode(w, cs, n); }));
  for (size_t k = 0; k < p.branches.size(); ++k)
    pj["components"].push_back(Parsed([&](JsonWriter& w) { WriteComponent(w, cs, p, k, detail); }));
  return pj;
}

json ResultsJson(const Case& cs, const std::vector<PointResult>& points, const std::string& verdict,
                 JsonDetail detail) {
  json j = ResultsHead(cs, verdict);
  if (detail == JsonDetail::kSummary) j["json_detail"] = "summary", j["summary_columns"] = SummaryColumns();
  json pts = json::array();
  for (const auto& p : points) pts.push_back(PointJson(cs, p, detail));
  j["points"] = pts;
  return j;
}

namespace {

// The indent of the elements of the top-level "points" array.
constexpr int kPointIndent = 4;

// The document with its points written by point(os, i, indent).
void WriteResultsWith(std::ostream& os, const Case& cs, size_t npoints,
                      const std::function<void(std::ostream&, size_t, int)>& point, const std::string& verdict,
                      const ResultsExtras& extras, JsonDetail detail) {
  json head = ResultsHead(cs, verdict);
  if (detail == JsonDetail::kSummary) head["json_detail"] = "summary", head["summary_columns"] = SummaryColumns();
  for (const auto& [key, value] : extras.top.items()) head[key] = value;
  std::map<std::string, ValueWriter> streamed = {{"points", [&](std::ostream& o, int in) {
    WriteArray(o, npoints, [&](std::string* text, size_t i, int at) {
      Flush(o, text);  // a point writes to the stream itself
      point(o, i, at);
    }, in);
  }}};
  if (const auto* summary = extras.check_summary) {
    head.erase("checks");
    streamed["checks"] = [&](std::ostream& o, int in) {
      if (detail == JsonDetail::kSummary) {
        WriteCheckGroups(o, cs, summary->size(), [&](size_t i) -> const CheckOutcome& { return (*summary)[i].worst; },
                         [&](size_t i) { return &(*summary)[i].point; }, in);
        return;
      }
      WriteElements(o, summary->size(), in, detail, [&](JsonWriter& w, size_t i) {
        WriteCheckOutcome(w, cs, (*summary)[i].worst, &(*summary)[i].point);
      });
    };
  }
  WriteObject(os, head, streamed, 0);
  os << "\n";
}

}  // namespace

void WriteResultsJson(std::ostream& os, const Case& cs, const std::vector<const PointResult*>& points,
                      const std::string& verdict, const ResultsExtras& extras, JsonDetail detail) {
  auto point = [&](std::ostream& e, size_t i, int at) {
    const auto* checks = i < extras.point_checks.size() ? extras.point_checks[i] : nullptr;
    WritePoint(e, cs, *points[i], checks, detail, at);
  };
  WriteResultsWith(os, cs, points.size(), point, verdict, extras, detail);
}

std::string PointText(const Case& cs, const PointResult& p, const std::vector<CheckOutcome>* checks,
                      JsonDetail detail) {
  std::ostringstream os;
  WritePoint(os, cs, p, checks, detail, kPointIndent);
  return os.str();
}

void WriteResultsJsonFromText(std::ostream& os, const Case& cs, const std::vector<std::string>& point_texts,
                              const std::string& verdict, const ResultsExtras& extras, JsonDetail detail) {
  auto point = [&](std::ostream& e, size_t i, int at) {
    if (at != kPointIndent) throw std::logic_error("WriteResultsJsonFromText: the points are not at their indent");
    e << point_texts[i];
  };
  WriteResultsWith(os, cs, point_texts.size(), point, verdict, extras, detail);
}

}  // namespace loopwright
