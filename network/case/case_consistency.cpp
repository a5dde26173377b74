// Validation that needs a whole loop and the envelope: boundary pressures
// below vacuum at any point, parts of a loop whose pressure nothing sets
// (joined to the rest only by fixed flows), and parameter pairs (flow_min,
// flow_max) that cross at some point. Each is an error with its pointer, found
// before anything is solved: a contradiction the graph shows is never left to
// the solver as a singular Jacobian.
#include <cmath>
#include <limits>
#include <map>
#include <numeric>
#include <set>

#include <fmt/format.h>

#include "network/case/case_context.h"
#include "network/case/plausible.h"

namespace loopwright {

namespace {

// A component parameter's value as the case writes it (NaN: absent): its
// model's params() begin with the values the loader read, in the order of
// the type's specs (components/component.h); NaN for a component not built
// (the whole-loop checks run only on a loop read without errors).
double GivenParam(const ComponentSpec& comp, int param) {
  return comp.model ? comp.model->params()[param] : std::numeric_limits<double>::quiet_NaN();
}

// A component parameter's value at a point (its binding, else its constant).
double ParamAt(const ComponentSpec& comp, int param, const OperatingPoint& op) {
  for (const Binding& b : comp.bindings())
    if (b.param == param) return op.ValueOr(b.variable, GivenParam(comp, param));
  return GivenParam(comp, param);
}

bool IsBound(const ComponentSpec& comp, int param) {
  for (const Binding& b : comp.bindings())
    if (b.param == param) return true;
  return false;
}

std::string AtPoint(const OperatingPoint& op, bool bound) {
  return bound ? fmt::format(" at envelope point \"{}\"", op.name) : std::string();
}

bool IsFixedFlow(const ComponentSpec& comp) {
  return comp.type_info && (comp.type_info->roles & kRoleBoundaryFlow) && comp.from >= 0 && comp.to >= 0;
}

std::string FixedFlowIds(const std::vector<const ComponentSpec*>& flows) {
  std::vector<std::string> ids;
  for (const ComponentSpec* f : flows) ids.push_back("\"" + f->id + "\"");
  return fmt::format("{}", fmt::join(ids, ", "));
}

// How the imposed flows into one island fail to balance, at the first point
// where they do not; "" when they balance everywhere or cannot be compared
// (volume and mass flows mixed).
std::string FixedFlowImbalance(const std::vector<const ComponentSpec*>& flows, int root,
                               const std::vector<int>& root_of, const Envelope& e) {
  for (const OperatingPoint& op : e.points) {
    double net = 0, scale = 0;
    int kinds = 0;  // bit 1: volume flows, bit 2: mass flows
    bool bound = false;
    std::vector<std::string> terms;
    for (const ComponentSpec* f : flows) {
      const int qi = f->type_info->ParamIndex("flow"), mi = f->type_info->ParamIndex("mass_flow");
      const bool by_volume = qi >= 0 && !std::isnan(GivenParam(*f, qi));
      const int pi = by_volume ? qi : mi;
      if (pi < 0) return std::string();
      kinds |= by_volume ? 1 : 2;
      bound = bound || IsBound(*f, pi);
      const double q = ParamAt(*f, pi, op);
      const double in = (root_of[f->to] == root ? q : 0.0) - (root_of[f->from] == root ? q : 0.0);
      net += in;
      scale += std::fabs(q);
      const Dimension dim = by_volume ? Dimension::kVolumeFlow : Dimension::kMassFlow;
      terms.push_back(fmt::format("\"{}\" {} {:.6g} {}", f->id, in >= 0 ? "brings in" : "takes out",
                                  FromSI(std::fabs(in), dim, UnitSystem::kSI), DisplayUnit(dim, UnitSystem::kSI)));
    }
    if (kinds == 3) return std::string();
    if (std::fabs(net) <= 1e-9 * scale) continue;
    return fmt::format("{}{}", fmt::join(terms, ", "), AtPoint(op, bound));
  }
  return std::string();
}

}  // namespace

void CheckBoundaryPressures(const LoopSpec& loop, const Envelope& e, double ambient_pa, CaseContext& c) {
  for (const NodeSpec& n : loop.nodes) {
    if (n.boundary == BoundaryKind::kNone) continue;
    for (const OperatingPoint& op : e.points) {
      const double gauge = op.ValueOr(n.cond().pressure_variable, n.cond().surface_pressure);
      if (gauge + ambient_pa >= 0) continue;
      c.diag.Error("below-vacuum", loop.NodePointer(n) + "/boundary/pressure",
                   fmt::format("boundary pressure {:.4g} bar g{} is {:.4g} bar abs: below vacuum (the ambient is "
                               "{:.4g} bar abs); an absolute pressure cannot be negative",
                               gauge / 1e5, AtPoint(op, n.cond().pressure_variable >= 0), (gauge + ambient_pa) / 1e5,
                               ambient_pa / 1e5));
      break;
    }
  }
}

// Nodes joined to a pressure reference only through fixed flows have no
// equation for their pressure: with imposed flows that disagree, mass cannot
// balance; with flows that agree, the pressure is still undetermined.
void CheckFixedFlowIslands(const LoopSpec& loop, const Envelope& e, CaseContext& c) {
  const int n = static_cast<int>(loop.nodes.size());
  std::vector<int> parent(n);
  std::iota(parent.begin(), parent.end(), 0);
  auto find = [&](int a) {
    while (parent[a] != a) a = parent[a] = parent[parent[a]];
    return a;
  };
  for (const ComponentSpec& comp : loop.components)
    if (comp.from >= 0 && comp.to >= 0 && !IsFixedFlow(comp)) parent[find(comp.from)] = find(comp.to);
  std::vector<int> root_of(n);
  std::set<int> referenced;
  for (int i = 0; i < n; ++i) {
    root_of[i] = find(i);
    if (loop.nodes[i].boundary != BoundaryKind::kNone) referenced.insert(root_of[i]);
  }
  std::map<int, std::vector<const ComponentSpec*>> touching;  // island root -> fixed flows at its edge
  for (const ComponentSpec& comp : loop.components) {
    if (!IsFixedFlow(comp)) continue;
    for (int end : {comp.from, comp.to})
      if (!referenced.count(root_of[end])) touching[root_of[end]].push_back(&comp);
  }
  for (const auto& [root, flows] : touching) {
    std::vector<std::string> ids;
    for (int i = 0; i < n && ids.size() < 5; ++i)
      if (root_of[i] == root) ids.push_back(loop.nodes[i].id);
    const std::string nodes = fmt::format("{{{}}}", fmt::join(ids, ", "));
    const std::string disagree = FixedFlowImbalance(flows, root, root_of, e);
    const ComponentSpec& first = *flows.front();
    if (!disagree.empty() && flows.size() == 1)
      c.diag.Error("flow-contradiction", loop.ComponentPointer(first),
                   fmt::format("fixed flow {} into nodes {} of loop \"{}\" runs into a dead end: nothing else "
                               "connects these nodes to a pressure reference, so the imposed flow has nowhere to go",
                               disagree, nodes, loop.id));
    else if (!disagree.empty())
      c.diag.Error("flow-contradiction", loop.ComponentPointer(first),
                   fmt::format("the imposed flows into nodes {} of loop \"{}\" disagree: {}; nothing else connects "
                               "these nodes to a pressure reference, so their mass cannot balance",
                               nodes, loop.id, disagree));
    else
      c.diag.Error("undetermined-pressure", loop.ComponentPointer(first),
                   fmt::format("nodes {} of loop \"{}\" connect to a pressure reference only through fixed flows "
                               "({}): nothing sets their pressure; join them to a boundary through a pipe, valve or "
                               "other part, or give one of them a boundary",
                               nodes, loop.id, FixedFlowIds(flows)));
  }
}

// A parameter bound to a variable gets the plausibility check of its own
// field at every point (the variable's values were checked against their
// dimension's hard limit when read): warned once, at the first point outside.
void CheckBoundValues(const LoopSpec& loop, const Envelope& e, CaseContext& c) {
  for (const ComponentSpec& comp : loop.components) {
    if (!comp.type_info) continue;
    for (const Binding& b : comp.bindings()) {
      const ParamSpec& s = comp.type_info->params[b.param];
      for (const OperatingPoint& op : e.points) {
        const std::string w =
            PlausibilityWarning(s.dim, comp.type_info->name, s.name, op.ValueOr(b.variable, 0.0), false);
        if (w.empty()) continue;
        c.diag.Warn("implausible", loop.ComponentPointer(comp) + "/" + PointerToken(s.name),
                    fmt::format("at envelope point \"{}\": {}", op.name, w));
        break;
      }
    }
  }
}

void CheckBoundPairs(const LoopSpec& loop, const Envelope& e, CaseContext& c) {
  for (const ComponentSpec& comp : loop.components) {
    if (!comp.type_info || comp.bindings().empty()) continue;  // a pair is checked when either is bound
    const ComponentType& t = *comp.type_info;
    for (size_t i = 0; i < t.params.size(); ++i) {
      const std::string& name = t.params[i].name;
      if (name.size() < 5 || name.compare(name.size() - 4, 4, "_min") != 0) continue;
      const int lo = static_cast<int>(i), hi = t.ParamIndex(name.substr(0, name.size() - 4) + "_max");
      if (hi < 0 || (!IsBound(comp, lo) && !IsBound(comp, hi))) continue;
      for (const OperatingPoint& op : e.points) {
        const double a = ParamAt(comp, lo, op), b = ParamAt(comp, hi, op);
        if (std::isnan(a) || std::isnan(b) || a <= b) continue;
        const Dimension dim = t.params[i].dim;
        c.diag.Error("bad-parameter", loop.ComponentPointer(comp) + "/" + PointerToken(IsBound(comp, hi) ? t.params[hi].name : name),
                     fmt::format("at envelope point \"{}\": {} = {:.6g} {} is above {} = {:.6g} {}", op.name, name,
                                 FromSI(a, dim, UnitSystem::kSI), DisplayUnit(dim, UnitSystem::kSI),
                                 t.params[hi].name, FromSI(b, dim, UnitSystem::kSI),
                                 DisplayUnit(dim, UnitSystem::kSI)));
        break;
      }
    }
  }
}

}  // namespace loopwright

namespace loopwright {

void CheckBoundaryToBoundary(const LoopSpec& loop, CaseContext& c) {
  for (const ComponentSpec& comp : loop.components) {
    if (comp.from < 0 || comp.to < 0) continue;
    const NodeSpec &a = loop.nodes[comp.from], &b = loop.nodes[comp.to];
    if (a.boundary == BoundaryKind::kNone || b.boundary == BoundaryKind::kNone) continue;
    c.diag.Warn("between-boundaries", loop.ComponentPointer(comp),
                fmt::format("both ends of \"{}\" are boundaries (\"{}\" and \"{}\"): its flow is set by their two "
                            "pressures alone, not by the oil that reaches \"{}\" (a boundary takes whatever flows "
                            "into it); for a drain from a housing, make the housing a plain node or give the "
                            "boundary \"drains_to\" the reservoir",
                            comp.id, a.id, b.id, a.id));
  }
}

void NoteHeatWithoutThermal(const Case& cs, CaseContext& c) {
  if (cs.thermal) return;
  std::string what = !cs.couplings.empty() ? "couplings" : "";
  for (const LoopSpec& loop : cs.loops) {
    for (const ComponentSpec& comp : loop.components)
      if (what.empty() && comp.type() == "air_cooler") what = "an air_cooler (\"" + comp.id + "\")";
    for (const NodeSpec& n : loop.nodes)
      if (what.empty() && (n.cond().heat != 0 || n.cond().heat_variable >= 0)) what = "a node heat (\"" + n.id + "\")";
  }
  if (what.empty()) return;
  c.diag.Warn("not-thermal", "",
              fmt::format("the case has {} but no \"thermal\": true: every point is solved at the loop "
                          "temperatures as given, without the energy balance, so no heat enters or leaves; "
                          "add \"thermal\": true for temperatures",
                          what));
}

}  // namespace loopwright
