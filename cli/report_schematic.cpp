#include "cli/report_schematic.h"

#include <graphviz/cgraph.h>
#include <graphviz/gvc.h>

#include <cmath>
#include <map>

#include <fmt/format.h>

#include "cli/output.h"
#include "components/registry.h"
#include "network/envelope/fixes.h"

namespace loopwright::cli {

namespace {

enum class MarginClass { kNone, kPass, kTight, kFail };

// The worst class of every place ("loop/component", "loop/node") over the
// envelope's check summary.
std::map<std::string, MarginClass> PlaceClasses(const Case& cs, const std::vector<CheckSummary>& summary, double tight) {
  std::map<std::string, MarginClass> out;
  for (const CheckSummary& s : summary) {
    const CheckOutcome& o = s.worst;
    const MarginClass c = !o.pass                                                   ? MarginClass::kFail
                          : o.limit != 0 && o.margin < TightBand(cs, o, tight) ? MarginClass::kTight
                                                                                    : MarginClass::kPass;
    MarginClass& at = out[o.where];
    if (static_cast<int>(c) > static_cast<int>(at)) at = c;
  }
  return out;
}

struct Style {
  const char* fill;
  const char* style;
  const char* pen;
  const char* word;
};

Style StyleOf(MarginClass c) {
  switch (c) {
    case MarginClass::kFail: return {"#f4a6a6", "filled,bold", "3.5", "FAIL"};
    case MarginClass::kTight: return {"#fde3a7", "filled,dashed", "2", "tight"};
    case MarginClass::kPass: return {"#d9f0d3", "filled", "1", "pass"};
    default: return {"#ffffff", "filled,dotted", "1", ""};
  }
}

const char* ShapeOf(unsigned roles) {
  if (roles & kRolePump) return "circle";
  if (roles & kRoleBearing) return "box";  // rounded below
  if (roles & kRoleFilter) return "diamond";
  if (roles & (kRoleValve | kRoleReliefValve | kRoleRegulator | kRoleThermostat)) return "hexagon";
  if (roles & kRoleHeatExchanger) return "doubleoctagon";
  return "box";
}

void Set(void* obj, const char* key, const std::string& value) {
  agsafeset(obj, const_cast<char*>(key), const_cast<char*>(value.c_str()), const_cast<char*>(""));
}

void Paint(void* obj, MarginClass c) {
  const Style s = StyleOf(c);
  Set(obj, "fillcolor", s.fill);
  Set(obj, "style", s.style);
  Set(obj, "penwidth", s.pen);
}

// What a node's label says at point `at`: its gauge pressure and temperature.
std::string NodeLabel(const Case& cs, const PointResult* at, int loop, int node, MarginClass c, UnitSystem us) {
  std::string label = cs.loops[loop].nodes[node].id;
  if (at)
    for (const NodeResult& n : at->nodes)
      if (n.loop == loop && n.node == node)
        label += fmt::format("\n{} {} g, {} {}", FormatValue(n.pressure_pa, Dimension::kPressure, us, 3),
                             DisplayUnit(Dimension::kPressure, us),
                             FormatValue(n.temperature_k, Dimension::kTemperature, us, 3),
                             DisplayUnit(Dimension::kTemperature, us));
  const char* word = StyleOf(c).word;
  return *word ? label + "\n[" + word + "]" : label;
}

std::string ComponentLabel(const ComponentSpec& spec, const PointResult* at, int loop, int comp, MarginClass c,
                           UnitSystem us) {
  std::string label = fmt::format("{}\n{}{}{}", spec.id, spec.type(), spec.part().empty() ? "" : " ", spec.part());
  if (at)
    for (const BranchOutcome& b : at->branches)
      if (b.loop == loop && b.comp == comp)
        label += fmt::format("\n{} {}", FormatValue(b.flow_m3s, Dimension::kVolumeFlow, us, 3),
                             DisplayUnit(Dimension::kVolumeFlow, us));
  const char* word = StyleOf(c).word;
  return *word ? label + "\n[" + word + "]" : label;
}

// The loops as a graph: clusters, nodes, components, couplings.
void BuildGraph(Agraph_t* g, const Case& cs, const PointResult* at, const std::map<std::string, MarginClass>& cls,
                UnitSystem us) {
  auto class_of = [&](const std::string& where) {
    auto it = cls.find(where);
    return it == cls.end() ? MarginClass::kNone : it->second;
  };
  std::map<std::string, Agnode_t*> comps;
  for (size_t l = 0; l < cs.loops.size(); ++l) {
    const LoopSpec& loop = cs.loops[l];
    Agraph_t* sg = agsubg(g, const_cast<char*>(("cluster_" + std::to_string(l)).c_str()), 1);
    Set(sg, "label", fmt::format("loop {} ({})", loop.id, loop.fluid_id));
    Set(sg, "style", "rounded");
    std::vector<Agnode_t*> nodes;
    for (size_t n = 0; n < loop.nodes.size(); ++n) {
      const std::string where = loop.id + "/" + loop.nodes[n].id;
      Agnode_t* v = agnode(sg, const_cast<char*>(("n:" + where).c_str()), 1);
      const MarginClass c = class_of(where);
      Set(v, "label", NodeLabel(cs, at, static_cast<int>(l), static_cast<int>(n), c, us));
      Set(v, "shape", "ellipse");
      Set(v, "fontsize", "9");
      Set(v, "id", "lw-node-" + where);
      Paint(v, c);
      nodes.push_back(v);
    }
    for (size_t k = 0; k < loop.components.size(); ++k) {
      const ComponentSpec& spec = loop.components[k];
      const std::string where = loop.id + "/" + spec.id;
      Agnode_t* v = agnode(sg, const_cast<char*>(("c:" + where).c_str()), 1);
      const MarginClass c = class_of(where);
      Set(v, "label", ComponentLabel(spec, at, static_cast<int>(l), static_cast<int>(k), c, us));
      const unsigned roles = spec.type_info ? spec.type_info->roles : kRoleNone;
      Set(v, "shape", ShapeOf(roles));
      Set(v, "fontsize", "10");
      Set(v, "id", "lw-comp-" + where);
      Paint(v, c);
      if (roles & kRoleBearing) Set(v, "style", std::string(StyleOf(c).style) + ",rounded");
      agedge(g, nodes[spec.from], v, nullptr, 1);
      agedge(g, v, nodes[spec.to], nullptr, 1);
      comps[where] = v;
    }
  }
  for (const Coupling& cp : cs.couplings) {
    auto h = comps.find(cp.hot_ref), c = comps.find(cp.cold_ref);
    if (h == comps.end() || c == comps.end()) continue;
    Agedge_t* e = agedge(g, h->second, c->second, const_cast<char*>(("x:" + cp.id).c_str()), 1);
    Set(e, "style", "dashed");
    Set(e, "dir", "none");
    Set(e, "constraint", "false");
    Set(e, "label", "heat: " + cp.id);
  }
}

}  // namespace

std::string LoopSchematicSvg(const Case& cs, const PointResult* at, const std::vector<CheckSummary>& summary,
                             double tight, UnitSystem us, std::string* error) {
  GVC_t* gvc = gvContext();
  Agraph_t* g = agopen(const_cast<char*>("loops"), Agdirected, nullptr);
  Set(g, "rankdir", "TB");
  Set(g, "nodesep", "0.2");
  Set(g, "ranksep", "0.3");
  Set(g, "fontname", "Helvetica");
  agattr(g, AGNODE, const_cast<char*>("fontname"), const_cast<char*>("Helvetica"));
  BuildGraph(g, cs, at, PlaceClasses(cs, summary, tight), us);
  std::string svg;
  if (gvLayout(gvc, g, "dot") != 0) {
    *error = "Graphviz could not lay the loops out (its \"dot\" layout plugin missing?)";
  } else {
    char* data = nullptr;
    unsigned int len = 0;
    if (gvRenderData(gvc, g, "svg", &data, &len) != 0 || !data) *error = "Graphviz could not render SVG";
    else svg.assign(data, len);
    if (data) gvFreeRenderData(data);
    gvFreeLayout(gvc, g);
  }
  agclose(g);
  gvFreeContext(gvc);
  const size_t start = svg.find("<svg");
  if (start == std::string::npos) return "";
  svg.erase(0, start);
  // Shrunk to the page's width when wider (the viewBox keeps the proportions).
  return "<svg style=\"max-width:100%;height:auto\"" + svg.substr(4);
}

std::string SchematicLegendHtml() {
  std::string out = "<div class=\"legend\">";
  for (MarginClass c : {MarginClass::kFail, MarginClass::kTight, MarginClass::kPass, MarginClass::kNone}) {
    const Style s = StyleOf(c);
    const std::string dash = c == MarginClass::kTight ? " stroke-dasharray=\"6,3\"" : c == MarginClass::kNone ? " stroke-dasharray=\"1,3\"" : "";
    const char* text = c == MarginClass::kFail    ? "[FAIL] a check fails here at some point (bold outline)"
                       : c == MarginClass::kTight ? "[tight] passes with little to spare (dashed outline)"
                       : c == MarginClass::kPass  ? "[pass] every check here passes (thin solid outline)"
                                                  : "no check at this place (dotted outline)";
    out += fmt::format("<span><svg width=\"34\" height=\"18\"><rect x=\"2\" y=\"2\" width=\"30\" height=\"14\" "
                       "fill=\"{}\" stroke=\"black\" stroke-width=\"{}\"{}/></svg> {}</span>",
                       s.fill, s.pen, dash, text);
  }
  return out + "<span>Shapes (our own): circle pump, rounded box bearing, diamond filter, hexagon valve or "
               "regulator, double octagon heat exchanger, box line or other.</span></div>";
}

}  // namespace loopwright::cli
