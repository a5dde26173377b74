#include "network/point/failure_causes.h"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>
#include <fmt/ranges.h>

#include "network/point/run.h"
#include "network/point/system.h"
#include "network/point/thermal.h"

namespace loopwright {

namespace {

constexpr double kBar = 1e5;
constexpr double kLpm = 1e-3 / 60.0;
constexpr double kZeroCelsius = 273.15;
constexpr double kSwitchReLow = 2000, kSwitchReHigh = 4000;
constexpr double kStarvedFraction = 1e-4;  // through-flow below this share of the loop's largest flow
// A component whose heat would raise its own stream by more than this is
// starved (common practice: no lubricating oil or coolant survives a rise of
// 150 K through one component; a bearing's rise is typically 10-30 K).
constexpr double kRunawayRiseK = 150.0;
// Above this a temperature out of range is too hot, not too cold (no
// fluid model's lower limit is above it).
constexpr double kHotK = 373.15;
// A node's own heater explains its temperature when it raises its stream by
// this much; below it, the whole loop is too hot (heat-sink-too-small).
constexpr double kLocalRiseK = 50.0;

std::string NodeName(const Case& cs, int loop, int node) {
  return cs.loops[loop].id + "/" + cs.loops[loop].nodes[node].id;
}

std::string NodeName(const Case& cs, const NodeResult& n) { return NodeName(cs, n.loop, n.node); }

const ComponentSpec& Spec(const Case& cs, const BranchOutcome& b) { return cs.loops[b.loop].components[b.comp]; }

// Whether the branch's model imposes its flow whatever the pressure (a
// property of the model as built, not of values a point binds). Only a
// model that may fix its flow (Component::MayFixFlow) is linearised.
bool FixesFlow(const Case& cs, const PointResult& at, const BranchOutcome& b) {
  if (!(BranchType(cs, b).roles & kFlowFixerRoles)) return false;  // no model read: a plant-size case's lie scattered
  const Component* m = b.base_model ? b.base_model : Spec(cs, b).model.get();
  if (!m->MayFixFlow()) return false;
  const BranchResult st = BranchState(cs, at, b);
  return m->Linearize(st.rho, st.mu).fixes_flow;
}

// "displacement_pump oil/pump"
std::string CompName(const Case& cs, const BranchOutcome& b) {
  return std::string(Spec(cs, b).type()) + " " + cs.loops[b.loop].id + "/" + Spec(cs, b).id;
}

bool TypeHas(const Case& cs, const BranchOutcome& b, const char* word) {
  return Spec(cs, b).type().find(word) != std::string::npos;
}

// Whether branch b touches node n; *out gets the mass flow leaving n through b.
bool Touches(const Case& cs, const BranchOutcome& b, const NodeResult& n, double* out) {
  if (b.loop != n.loop) return false;
  const ComponentSpec& c = Spec(cs, b);
  if (c.from == n.node) *out = b.m;
  else if (c.to == n.node) *out = -b.m;
  else return false;
  return true;
}

// Gauge pressure at the end of b away from n.
double OtherEnd(const Case& cs, const PointResult& at, const BranchOutcome& b, const NodeResult& n) {
  const BranchResult st = BranchState(cs, at, b);
  return Spec(cs, b).from == n.node ? st.p_to : st.p_from;
}

double LoopMaxFlow(const PointResult& at, int loop) {
  double m = 0;
  for (const auto& b : at.branches)
    if (b.loop == loop && std::isfinite(b.m)) m = std::max(m, std::abs(b.m));
  return m;
}

double Lpm(const BranchOutcome& b) { return std::abs(b.flow_m3s) / kLpm; }

// Which neighbour pulls node g down: the one drawing flow out of it to a
// higher pressure (a pump's suction), and the one feeding it with the
// largest drop into it.
std::string PullDown(const Case& cs, const PointResult& at, int g) {
  const NodeResult& n = at.nodes[g];
  const BranchOutcome *pull = nullptr, *feed = nullptr;
  double best_rise = 0, best_drop = 0;
  for (const auto& b : at.branches) {
    double out = 0;
    if (!Touches(cs, b, n, &out)) continue;
    const double diff = OtherEnd(cs, at, b, n) - n.pressure_pa;  // > 0: the other end is higher
    if (out > 0 && diff > best_rise) best_rise = diff, pull = &b;
    if (out < 0 && diff > best_drop) best_drop = diff, feed = &b;
  }
  std::string s;
  if (pull) {
    s = fmt::format("It is pulled down by {}, which draws {:.3g} L/min out of it against a rise of {:.3g} bar",
                    CompName(cs, *pull), Lpm(*pull), best_rise / kBar);
    if (TypeHas(cs, *pull, "pump"))
      s += fmt::format(" (if that pump should deliver into node {}, its from/to are swapped: `from` is the suction side)",
                       NodeName(cs, n));
  }
  if (feed)
    s += fmt::format("{} fed through {}, which drops {:.3g} bar into it at {:.3g} L/min", pull ? "; it is" : "It is",
                     CompName(cs, *feed), best_drop / kBar, Lpm(*feed));
  if (!pull && !feed) s = "No neighbouring component drives flow out of it: the low pressure comes from a boundary or the elevation above it";
  return s + ".";
}

// The heat a component adds to its stream at the point [W] (its report's).
double Heat(const Case& cs, const PointResult& at, const BranchOutcome& b) { return BranchReport(cs, at, b).heat_W; }

// The neighbour of node n adding the most heat to the flow arriving at n
// (or to n itself when nothing flows), or nullptr.
const BranchOutcome* HeatSource(const Case& cs, const PointResult& at, const NodeResult& n) {
  const BranchOutcome* src = nullptr;
  double src_heat = 0;
  for (const auto& b : at.branches) {
    double out = 0;
    if (!Touches(cs, b, n, &out)) continue;
    const double heat = Heat(cs, at, b);
    if (heat > 0 && (!src || heat > src_heat)) src = &b, src_heat = heat;
  }
  return src;
}

double ThroughFlow(const Case& cs, const PointResult& at, const NodeResult& n) {
  double in = 0;
  for (const auto& b : at.branches) {
    double out = 0;
    if (Touches(cs, b, n, &out) && std::isfinite(out)) in += std::abs(out);
  }
  return 0.5 * in;
}

// The rise of a branch's own stream by its heat, H / (|m| cp) [K]; NaN
// without a specific heat (isothermal description).
double OwnRise(const Case& cs, const PointResult& at, const BranchOutcome& b) {
  const BranchResult st = BranchState(cs, at, b);
  return st.cp > 0 ? Heat(cs, at, b) / (std::abs(b.m) * st.cp) : NAN;
}

// Why a node heated by a starved component has no steady state, in words:
// with (almost) no flow leaving it the heat has no outlet; with some, the
// steady state lies far beyond any fluid's range.
std::string NoSteadyState(const Case& cs, const NodeResult& n, bool starved) {
  return starved ? fmt::format("Almost no flow leaves node {} and nothing else cools it: heat enters a node with no "
                               "outflow, so no steady state exists there.", NodeName(cs, n))
                 : fmt::format("No steady state within the fluid's range exists at node {}.", NodeName(cs, n));
}

// The heat at node g in words; sets *kind to bearing-starved when a bearing
// heats it with almost no flow (or with far too little for its heat),
// energy-no-outlet when another component heats a node almost nothing leaves.
std::string HeatCause(const Case& cs, const PointResult& at, int g, std::string* kind, double* rise_out = nullptr) {
  const NodeResult& n = at.nodes[g];
  const BranchOutcome* src = HeatSource(cs, at, n);
  if (!src) {
    const BranchOutcome* sink = nullptr;
    double sink_heat = 0;
    for (const auto& b : at.branches) {
      double out = 0;
      if (!Touches(cs, b, n, &out)) continue;
      const double heat = Heat(cs, at, b);
      if (heat < 0 && (!sink || heat < sink_heat)) sink = &b, sink_heat = heat;
    }
    if (!sink) return "No neighbouring component adds or removes heat there.";
    return fmt::format("It is cooled by {} ({:.4g} W at {:.3g} L/min).", CompName(cs, *sink), sink_heat,
                       Lpm(*sink));
  }
  const double loop_max = LoopMaxFlow(at, n.loop);
  const bool starved = ThroughFlow(cs, at, n) <= kStarvedFraction * loop_max || !(loop_max > 0);
  const double rise = OwnRise(cs, at, *src);
  const double src_heat = Heat(cs, at, *src);
  if (rise_out) *rise_out = rise;
  if ((starved || rise > kRunawayRiseK) && TypeHas(cs, *src, "bearing")) {
    *kind = "bearing-starved";
    return fmt::format("{} passes {:.3g} L/min ({:.2g} of the loop's largest flow) while its friction makes {:.4g} W{}: "
                       "its flow is far too small for its heat and its temperature runs away. {} Check what feeds it (a "
                       "closed valve, a blocked orifice, a feed pressure below its housing) and what sets its friction "
                       "(speed, clearance, viscosity).",
                       CompName(cs, *src), Lpm(*src), loop_max > 0 ? std::abs(src->m) / loop_max : 0.0,
                       src_heat,
                       std::isfinite(rise) ? fmt::format(", enough to raise its own oil by {:.3g} K", rise) : "",
                       NoSteadyState(cs, n, starved));
  }
  if (starved) {
    *kind = "energy-no-outlet";
    return fmt::format("{} adds {:.4g} W at node {}, which almost no flow leaves and nothing cools: the energy "
                       "balance has no outlet there.", CompName(cs, *src), src_heat, NodeName(cs, n));
  }
  if (rise > kRunawayRiseK) {
    *kind = "heat-exceeds-flow";
    return fmt::format("{} adds {:.4g} W to its own {:.3g} L/min, enough to raise it by {:.3g} K: its flow is far too "
                       "small for its heat (or the heat is far too large: check its inputs).",
                       CompName(cs, *src), src_heat, Lpm(*src), rise);
  }
  return fmt::format("It is heated by {} ({:.4g} W at {:.3g} L/min{}).", CompName(cs, *src), src_heat,
                     Lpm(*src), std::isfinite(rise) ? fmt::format(", a rise of {:.3g} K through it", rise) : "");
}

// Where loop l gives off heat, in words ("" when nowhere): coolers,
// reservoir losses to ambient, fixed temperatures, heat exchangers.
std::string HeatSinks(const Case& cs, const PointResult& at, int l) {
  std::vector<std::string> sinks;
  for (const auto& b : at.branches)
    if (const double heat = b.loop == l ? Heat(cs, at, b) : 0.0; heat < 0)
      sinks.push_back(fmt::format("{} ({:.4g} W)", CompName(cs, b), heat));
  for (const NodeSpec& ns : cs.loops[l].nodes) {
    if (ns.cond().loss_conductance > 0) sinks.push_back(fmt::format("{}'s loss to ambient ({:.3g} W/K)", ns.id, ns.cond().loss_conductance));
    if (!std::isnan(ns.cond().temperature) || ns.cond().temperature_variable >= 0) sinks.push_back(ns.id + "'s fixed temperature");
  }
  for (const Coupling& cp : cs.couplings)
    if (cp.hot_loop == l) sinks.push_back("heat exchanger " + cp.id);
  return fmt::format("{}", fmt::join(sinks, ", "));
}

// A whole loop too hot: the heat it takes in against the sinks it has.
std::string LoopTooHot(const Case& cs, const PointResult& at, int l, std::string* kind) {
  double added = 0;
  const BranchOutcome* top = nullptr;
  double top_heat = 0;
  for (const auto& b : at.branches)
    if (const double heat = b.loop == l ? Heat(cs, at, b) : 0.0; heat > 0) {
      added += heat;
      if (!top || heat > top_heat) top = &b, top_heat = heat;
    }
  // The loop's whole heat intake when the point carries its accounting
  // (node heats and exchanger duties too), else its components' heats.
  const auto& added_all = at.thermal_report.loop_heat_added;
  if (l < static_cast<int>(added_all.size()) && added_all[l] > added) added = added_all[l];
  const std::string sinks = HeatSinks(cs, at, l);
  if (!top || sinks.empty()) return "";
  *kind = "heat-sink-too-small";
  return fmt::format(" Loop {} takes in {:.4g} W (the most from {}, {:.4g} W) and gives heat off only through {}: "
                     "too little for that heat, so the whole loop runs hot. A larger cooler (or less heat) is needed.",
                     cs.loops[l].id, added, CompName(cs, *top), top_heat, sinks);
}

// The node with the deepest violation of its liquid's pressure floor, or -1.
int WorstPressure(const Case& cs, const PointResult& res, double* floor_pa, const char** what) {
  int worst = -1;
  double depth = 0;
  // The floor of the last node's fluid and temperature, reused while they
  // repeat (every node of an isothermal loop: one evaluation, not one a node).
  const Fluid* last_fluid = nullptr;
  double last_t = NAN;
  PressureFloor f;
  for (size_t g = 0; g < res.nodes.size(); ++g) {
    const NodeResult& n = res.nodes[g];
    const Fluid* fluid = &PointFluid(cs, res, n.loop);
    if (fluid != last_fluid || !(n.temperature_k == last_t)) {
      f = fluid->LowestPressure(n.temperature_k);
      last_fluid = fluid;
      last_t = n.temperature_k;
    }
    const double p_abs = n.pressure_pa + cs.ambient_pa;
    const double d = std::max(f.p_abs_Pa, 0.0) - p_abs;
    if (d > depth || !std::isfinite(p_abs)) {
      depth = std::isfinite(p_abs) ? d : INFINITY;
      worst = static_cast<int>(g);
      *floor_pa = f.p_abs_Pa;
      *what = f.what;
    }
  }
  return worst;
}

// Whether T is outside the fluid's range by more than the slack. The range
// is probed at 1 MPa abs, where water is liquid up to 179 degC, so that only
// the temperature decides (pressure floors are checked separately).
bool FarOutOfRange(const Fluid& f, double T) {
  constexpr double kProbePa = 1e6;
  if (!std::isfinite(T)) return true;
  if (f.InRange(T, kProbePa).in_range) return false;
  return !f.InRange(T - kFluidRangeSlackK, kProbePa).in_range && !f.InRange(T + kFluidRangeSlackK, kProbePa).in_range;
}

void Reject(PointResult* res, std::string kind, std::string place, std::string cause, RowDiagnosis row) {
  res->converged = false;
  res->summary.termination = Termination::kUnphysical;
  res->summary.cause_kind = std::move(kind);
  res->summary.place = std::move(place);
  res->summary.cause = std::move(cause);
  res->summary.worst = {std::move(row)};
}

bool RejectPressure(const Case& cs, PointResult* res) {
  double floor_pa = 0;
  const char* what = "";
  const int g = WorstPressure(cs, *res, &floor_pa, &what);
  if (g < 0) return false;
  const NodeResult& n = res->nodes[g];
  const double p_abs = n.pressure_pa + cs.ambient_pa;
  const bool vapour = std::string(what).rfind("vapour", 0) == 0;
  std::string cause = fmt::format(
      "node {} is at {:.4g} bar abs ({:.4g} bar g){} below the {}'s {} of {:.3g} kPa abs at {:.1f} degC: the liquid "
      "would {} there, so the computed flows are not physical. {}",
      NodeName(cs, n), p_abs / kBar, n.pressure_pa / kBar, p_abs < 0 ? ", below zero absolute and" : ",",
      cs.loops[n.loop].fluid_id, what, floor_pa / 1e3, n.temperature_k - kZeroCelsius,
      vapour ? "boil (vapour cavitation)" : "release its dissolved air and cavitate", PullDown(cs, *res, g));
  RowDiagnosis row{fmt::format("absolute pressure at node {} minus its {} ({:.4g} Pa abs)", NodeName(cs, n), what, floor_pa),
                   p_abs - floor_pa, "Pa", -1, g, true};
  Reject(res, "cavitation", "node " + NodeName(cs, n), cause, row);
  return true;
}

// "reaches T degC, more than 20 K beyond ... (range message)".
std::string BeyondRange(const Case& cs, const Fluid& fluid, int loop, double T) {
  return fmt::format("reaches {:.4g} degC, more than {:g} K beyond the nearest temperature where the {} model is valid "
                     "({}): no property of the fluid is known there, so this is not a result.",
                     T - kZeroCelsius, kFluidRangeSlackK, cs.loops[loop].fluid_id,
                     fluid.InRange(T, 1e6).message);
}

// The outlet stream temperature a component reports (thermal points: its
// report's outlet_temperature item is the state's, BranchReport), or NaN.
double OutletTemperature(const PointResult& p, size_t k) {
  return p.branch_heats.empty() ? NAN : p.branch_heats[k].t_out;
}

bool RejectTemperature(const Case& cs, PointResult* res) {
  for (size_t g = 0; g < res->nodes.size(); ++g) {
    const NodeResult& n = res->nodes[g];
    if (!FarOutOfRange(PointFluid(cs, *res, n.loop), n.temperature_k)) continue;
    std::string kind = "fluid-temperature-range";
    double rise = 0;
    std::string heat = HeatCause(cs, *res, static_cast<int>(g), &kind, &rise);
    if (kind == "energy-no-outlet") kind = "fluid-temperature-range";
    if (kind == "fluid-temperature-range" && n.temperature_k > kHotK && !(rise >= kLocalRiseK))
      heat += LoopTooHot(cs, *res, n.loop, &kind);
    Reject(res, kind, "node " + NodeName(cs, n),
           fmt::format("node {} {} {}", NodeName(cs, n),
                       BeyondRange(cs, PointFluid(cs, *res, n.loop), n.loop, n.temperature_k), heat),
           {fmt::format("temperature at node {}", NodeName(cs, n)), n.temperature_k, "K", -1, static_cast<int>(g), true});
    return true;
  }
  // A component's outlet stream (mixed into a node with cooler streams, so
  // the node itself may be in range): a bearing whose flow is too small for
  // its heat.
  for (size_t k = 0; k < res->branches.size(); ++k) {
    const BranchOutcome& b = res->branches[k];
    const double t = OutletTemperature(*res, k);
    const Fluid& f = PointFluid(cs, *res, b.loop);
    if (std::isnan(t)) continue;
    if (!FarOutOfRange(f, t)) {
      const RangeReport rr = f.InRange(t, 1e6);
      if (!rr.in_range) res->warnings.push_back(fmt::format("{}: outlet stream {}", CompName(cs, b), rr.message));
      continue;
    }
    const std::string place = cs.loops[b.loop].id + "/" + Spec(cs, b).id;
    const double heat = Heat(cs, *res, b);
    Reject(res, TypeHas(cs, b, "bearing") ? "bearing-starved" : "fluid-temperature-range", "component " + place,
           fmt::format("the stream leaving {} {} It {} {:.4g} W {} {:.3g} L/min: {}", CompName(cs, b),
                       BeyondRange(cs, f, b.loop, t), heat >= 0 ? "adds" : "takes", std::abs(heat),
                       heat >= 0 ? "to" : "from", Lpm(b),
                       heat >= 0 ? "its flow is too small for its heat. Check what feeds it."
                                            : "it takes out more heat than its stream can give."),
           {fmt::format("outlet temperature of {}", CompName(cs, b)), t, "K", static_cast<int>(k), -1, true});
    return true;
  }
  return false;
}

// Free nodes whose pressure nothing determines: every path from them to a
// boundary passes a component that imposes its flow (LinearGuess::
// fixes_flow), so the solver's answer there is whatever the start was.
// Nodes joined by the other components are grouped (union-find); a group
// with no boundary node has no pressure datum.
bool RejectUndetermined(const Case& cs, PointResult* res) {
  // A loop that loads is one connected piece holding a boundary
  // (CheckLoopTopology): with no branch that fixes its flow, every node
  // reaches a boundary through branches whose flow depends on pressure.
  if (std::none_of(res->branches.begin(), res->branches.end(),
                   [&cs, res](const BranchOutcome& b) { return FixesFlow(cs, *res, b); }))
    return false;
  const size_t n = res->nodes.size();
  std::vector<std::vector<int>> global(cs.loops.size());
  for (size_t l = 0; l < cs.loops.size(); ++l) global[l].assign(cs.loops[l].nodes.size(), -1);
  for (size_t g = 0; g < n; ++g) global[res->nodes[g].loop][res->nodes[g].node] = static_cast<int>(g);
  std::vector<int> root(n);
  for (size_t g = 0; g < n; ++g) root[g] = static_cast<int>(g);
  auto find = [&](int x) {
    while (root[x] != x) x = root[x] = root[root[x]];
    return x;
  };
  for (const auto& b : res->branches) {
    if (FixesFlow(cs, *res, b)) continue;
    const int a = global[b.loop][Spec(cs, b).from], c = global[b.loop][Spec(cs, b).to];
    if (a >= 0 && c >= 0) root[find(a)] = find(c);
  }
  std::vector<bool> datum(n, false);
  for (size_t g = 0; g < n; ++g)
    if (res->nodes[g].boundary) datum[find(static_cast<int>(g))] = true;
  for (size_t g = 0; g < n; ++g) {
    if (datum[find(static_cast<int>(g))]) continue;
    const NodeResult& nd = res->nodes[g];
    std::vector<std::string> fixing;
    for (const auto& b : res->branches) {
      double out = 0;
      if (Touches(cs, b, nd, &out) && FixesFlow(cs, *res, b))
        fixing.push_back(CompName(cs, b));
    }
    Reject(res, "pressure-undetermined", "node " + NodeName(cs, nd),
           fmt::format("nothing determines the pressure at node {}: every path from it to a boundary passes a "
                       "component that imposes its flow ({}), so any pressure satisfies the equations and the one "
                       "found is arbitrary. Give it a path to a reservoir or tank through a component whose flow "
                       "depends on pressure.", NodeName(cs, nd), fmt::join(fixing, ", ")),
           {fmt::format("pressure at node {} (undetermined)", NodeName(cs, nd)), nd.pressure_pa, "Pa", -1,
            static_cast<int>(g), true});
    return true;
  }
  return false;
}

}  // namespace

bool RejectUnphysical(const Case& cs, PointResult* res) {
  if (!res->converged) return false;
  if (RejectUndetermined(cs, res) || RejectPressure(cs, res)) return true;
  return res->thermal && RejectTemperature(cs, res);
}

namespace {

// The node a flow is forced into with nowhere to go: the free node with the
// largest |p| when it is beyond any loop's pressure (or the solver said so),
// else the node of a worst mass-balance row that almost nothing leaves.
int DeadEndNode(const Case& cs, const PointResult& at, const SolverSummary& s, std::string* where) {
  constexpr double kUnbounded = 1e8;  // 1000 bar: no lubrication or coolant loop
  int g = -1;
  for (size_t i = 0; i < at.nodes.size(); ++i)
    if (!at.nodes[i].boundary && (g < 0 || !(std::abs(at.nodes[i].pressure_pa) <= std::abs(at.nodes[g].pressure_pa))))
      g = static_cast<int>(i);
  if (g >= 0 && (!(std::abs(at.nodes[g].pressure_pa) <= kUnbounded) || s.termination == Termination::kUnphysical)) {
    *where = fmt::format("the pressure there ran away to {:.3g} bar g", at.nodes[g].pressure_pa / kBar);
    return g;
  }
  for (const auto& w : s.worst) {
    if (w.node < 0 || w.node >= static_cast<int>(at.nodes.size()) || w.unit != "kg/s") continue;
    double in = 0, out = 0;
    for (const auto& b : at.branches) {
      double o = 0;
      if (Touches(cs, b, at.nodes[w.node], &o) && std::isfinite(o)) (o > 0 ? out : in) += std::abs(o);
    }
    if (in > 0 && out <= 1e-3 * in) {
      *where = fmt::format("{:.3g} kg/s arrive there and {:.2g} kg/s leave", in, out);
      return w.node;
    }
  }
  return -1;
}

// A node every neighbour of which imposes its own flow (fixed flows, pumps
// with no slip): when their flows do not balance, no pressure reconciles them.
bool ExplainFixedFlows(const Case& cs, const PointResult& at, SolverSummary* s) {
  for (const auto& w : s->worst) {
    if (w.node < 0 || w.node >= static_cast<int>(at.nodes.size()) || w.unit != "kg/s") continue;
    const NodeResult& n = at.nodes[w.node];
    std::vector<std::string> parts;
    bool all_fixed = true;
    double net = 0;  // of the imposed flows, into the node [kg/s]
    for (const auto& b : at.branches) {
      double out = 0;
      if (!Touches(cs, b, n, &out)) continue;
      const BranchResult st = BranchState(cs, at, b);
      const LinearGuess lg = BranchModel(cs, b)->Linearize(st.rho, st.mu);
      all_fixed = all_fixed && lg.fixes_flow;
      const double in = Spec(cs, b).to == n.node ? lg.m0 : -lg.m0;  // imposed, into the node
      net += in;
      parts.push_back(fmt::format("{} {} {:.4g} L/min", CompName(cs, b), in < 0 ? "takes out" : "brings in",
                                  std::abs(lg.m0 / st.rho) / kLpm));
    }
    if (!all_fixed || parts.empty()) continue;
    s->cause_kind = "fixed-flows-disagree";
    s->place = "node " + NodeName(cs, n);
    s->cause = fmt::format("every component at node {} imposes its own flow ({}) and they do not balance "
                           "({:.3g} kg/s left over): no pressure can reconcile them. Give one of them a pressure-"
                           "dependent path (a relief valve, a spill line) or make the flows agree.",
                           NodeName(cs, n), fmt::join(parts, "; "), net);
    return true;
  }
  return false;
}

// A flow with nowhere to go: the pump (or other component) delivering into
// the dead-end node, and the neighbours that pass nothing on.
bool ExplainUnbounded(const Case& cs, const PointResult& at, SolverSummary* s) {
  std::string where;
  const int g = DeadEndNode(cs, at, *s, &where);
  if (g < 0) return false;
  const NodeResult& n = at.nodes[g];
  const BranchOutcome* pump = nullptr;
  std::vector<std::string> stuck;
  for (const auto& b : at.branches) {
    double out = 0;
    if (!Touches(cs, b, n, &out)) continue;
    if (out < 0 && (!pump || (TypeHas(cs, b, "pump") && !TypeHas(cs, *pump, "pump")) ||
                    (TypeHas(cs, b, "pump") == TypeHas(cs, *pump, "pump") && -out > std::abs(pump->m))))
      pump = &b;
  }
  for (const auto& b : at.branches) {
    double out = 0;
    if (&b != pump && Touches(cs, b, n, &out)) stuck.push_back(CompName(cs, b));
  }
  s->place = "node " + NodeName(cs, n);
  const std::string on = stuck.empty() ? "nothing else is connected to the node"
                                       : fmt::format("{} pass{} almost nothing on", fmt::join(stuck, ", "),
                                                     stuck.size() == 1 ? "es" : "");
  if (pump && TypeHas(cs, *pump, "pump")) {
    s->cause_kind = "dead-headed-pump";
    s->cause = fmt::format("{} is dead-headed at node {}: {}; {} (a closed valve or a blocked line downstream). A "
                           "positive-displacement pump needs an open path or a relief valve.",
                           CompName(cs, *pump), NodeName(cs, n), where, on);
  } else {
    s->cause_kind = "pressure-unbounded";
    s->cause = fmt::format("flow is forced into node {} with nowhere to go: {}{}; {}. A fixed flow into a closed path "
                           "has no pressure that balances it.", NodeName(cs, n), where,
                           pump ? fmt::format(" ({} feeds it)", CompName(cs, *pump)) : "", on);
  }
  return true;
}

// The worst row's component at the Reynolds-number switch, if any.
bool ExplainSwitch(const Case& cs, const PointResult& at, SolverSummary* s) {
  for (const auto& w : s->worst) {
    if (w.branch < 0 || w.branch >= static_cast<int>(at.branches.size())) continue;
    const BranchOutcome& b = at.branches[w.branch];
    const ComponentReport report = BranchReport(cs, at, b);
    for (const auto& it : report.items) {
      if (it.key != "reynolds" || !(it.value >= kSwitchReLow && it.value <= kSwitchReHigh)) continue;
      s->cause_kind = "laminar-turbulent-switch";
      s->place = "component " + cs.loops[b.loop].id + "/" + Spec(cs, b).id;
      s->cause = fmt::format("{} runs at Re = {:.0f}, on the laminar-turbulent switch ({:.0f}..{:.0f}), where its "
                             "friction law changes slope; Newton can cycle between the two sides. A smooth friction "
                             "law (churchill_1977) or a diameter that moves it off the switch will settle it.",
                             CompName(cs, b), it.value, kSwitchReLow, kSwitchReHigh);
      return true;
    }
  }
  return false;
}

void ExplainResidual(const Case& cs, const PointResult& at, SolverSummary* s) {
  const RowDiagnosis* w = s->worst.empty() ? nullptr : &s->worst[0];
  const bool nonfinite = w && !std::isfinite(w->residual);
  s->cause_kind = nonfinite ? "non-finite-law" : s->termination == Termination::kSingularJacobian ? "singular-network"
                                                                                                  : "residual-not-resolved";
  std::string state;
  if (w && w->branch >= 0 && w->branch < static_cast<int>(at.branches.size())) {
    const BranchOutcome& b = at.branches[w->branch];
    s->place = "component " + cs.loops[b.loop].id + "/" + Spec(cs, b).id;
    const BranchResult st = BranchState(cs, at, b);
    state = fmt::format("{} carries {:.4g} L/min with a drop of {:.4g} bar at the last iterate", CompName(cs, b),
                        b.flow_m3s / kLpm, (st.p_from - st.p_to) / kBar);
  } else if (w && w->node >= 0 && w->node < static_cast<int>(at.nodes.size())) {
    s->place = "node " + NodeName(cs, at.nodes[w->node]);
    state = fmt::format("the flows at node {} do not balance (pressure there {:.4g} bar g at the last iterate)",
                        NodeName(cs, at.nodes[w->node]), at.nodes[w->node].pressure_pa / kBar);
  }
  if (nonfinite)
    s->cause = fmt::format("the law of {} gives a non-finite value at the last iterate: the state lies outside what its "
                           "model can evaluate. {}.", s->place, state);
  else if (s->termination == Termination::kSingularJacobian)
    s->cause = fmt::format("part of the network has no defined pressure or flow (a node with no path to a boundary, two "
                           "fixed flows in series, a fixed flow into a dead end); the largest residual: {}.", state);
  else
    s->cause = fmt::format("Newton could not reduce the residuals further ({}); the largest is {}: {}. A component "
                           "near a switch of its law (a valve or relief at its crack, a check valve at zero flow) or "
                           "with no flow path can do this.", TerminationName(s->termination),
                           w ? w->what : std::string("unknown"), state);
}

// Whether anything takes heat out of loop l (heat `added` into it): a
// component removing at least a tenth of that heat at the last iterate (a
// cooler's duty grows with the temperature it runs away to; a pump or valve
// at a wrong iterate may show a few negative watts), a coupling, a node with
// a fixed temperature, negative heat or a loss to ambient.
bool LoopHasHeatOutlet(const Case& cs, const PointResult& at, int l, double added) {
  double removed = 0;
  for (const auto& b : at.branches)
    if (const double heat = b.loop == l ? Heat(cs, at, b) : 0.0; heat < 0) removed -= heat;
  if (removed >= 0.1 * added) return true;
  for (const NodeSpec& ns : cs.loops[l].nodes)
    if (!std::isnan(ns.cond().temperature) || ns.cond().temperature_variable >= 0 || ns.cond().heat < 0 || ns.cond().heat_variable >= 0 ||
        ns.cond().loss_conductance > 0)
      return true;
  for (const Coupling& cp : cs.couplings)
    if (cp.hot_loop == l || cp.cold_loop == l) return true;
  return false;
}

// A bearing whose flow runs backwards out of the boundary it drains to (a
// housing held at boost above the bearing's feed): the bearing starves, and
// a housing that nothing drains into has no temperature, so the energy
// balance cannot close. Returns the cause ("" if none) and sets *place.
std::string ReversedBearing(const Case& cs, const PointResult& at, std::string* place) {
  for (const BranchOutcome& b : at.branches) {
    const ComponentSpec& c = Spec(cs, b);
    if (!TypeHas(cs, b, "bearing") || !(b.m < 0)) continue;
    const BranchResult st = BranchState(cs, at, b);
    if (cs.loops[b.loop].nodes[c.to].boundary == BoundaryKind::kNone) continue;
    *place = "component " + cs.loops[b.loop].id + "/" + c.id;
    return fmt::format(
        "{} runs backwards: the boundary it drains to, node {}, stands at {:.4g} bar g, above its feed node {} at {:.4g} "
        "bar g, so {:.3g} L/min of oil flows out of the housing back into the feed. The bearing starves, and oil "
        "drawn back out of a housing whose temperature only what drains into it sets leaves the energy balance "
        "without a closed answer. Raise the feed pressure (pump, relief setting, bypass opening, line sizes) or lower the housing pressure.",
        CompName(cs, b), NodeName(cs, b.loop, c.to), st.p_to / kBar, NodeName(cs, b.loop, c.from),
        st.p_from / kBar, -b.flow_m3s * 6e4);
  }
  return "";
}

void ExplainEnergy(const Case& cs, const PointResult& at, SolverSummary* s) {
  const RowDiagnosis* w = s->worst.empty() ? nullptr : &s->worst[0];
  if (!w || w->node < 0 || w->node >= static_cast<int>(at.nodes.size())) {
    s->cause_kind = "residual-not-resolved";
    s->cause = "the energy balance did not converge and names no node.";
    return;
  }
  // The first of the worst rows whose node is heated with no flow to carry
  // the heat names the cause (a damped Newton spreads the residual of a
  // runaway node over its neighbours); else the worst row.
  std::string kind = "residual-not-resolved", heat;
  double rise = 0;
  for (const auto& row : s->worst) {
    if (row.node < 0 || row.node >= static_cast<int>(at.nodes.size())) continue;
    std::string k = "residual-not-resolved";
    double r = 0;
    std::string h = HeatCause(cs, at, row.node, &k, &r);
    if (k == "residual-not-resolved" && row.node != w->node) continue;
    w = &row, kind = k, heat = h, rise = r;
    if (k != "residual-not-resolved") break;
  }
  const NodeResult& n = at.nodes[w->node];
  s->place = "node " + NodeName(cs, n);
  s->cause_kind = kind;
  s->cause = fmt::format("the energy balance at node {} does not close ({:.3g} W left over; {:.4g} degC at the last "
                         "pass). {}", NodeName(cs, n), w->residual, n.temperature_k - kZeroCelsius, heat);
  if (kind != "residual-not-resolved") return;
  std::string reversed_place;
  const std::string reversed = ReversedBearing(cs, at, &reversed_place);
  if (!reversed.empty()) {
    s->cause_kind = "bearing-flow-reversed";
    s->place = reversed_place;
    s->cause = reversed + " (" + s->cause + ")";
    return;
  }
  double added = 0;
  for (const auto& b : at.branches)
    if (const double heat = b.loop == n.loop ? Heat(cs, at, b) : 0.0; heat > 0) added += heat;
  if (added > 0 && !LoopHasHeatOutlet(cs, at, n.loop, added)) {
    s->cause_kind = "energy-no-outlet";
    s->cause += fmt::format(" Loop {} takes in {:.4g} W and nothing takes heat out of it (no cooler, no heat exchanger, "
                            "no fixed-temperature boundary, no reservoir loss to ambient): its energy balance has no "
                            "outlet, so its temperatures rise without limit. Add the heat sink the machine has.",
                            cs.loops[n.loop].id, added);
  } else if (n.temperature_k > kHotK && !(rise >= kLocalRiseK)) {
    s->cause += LoopTooHot(cs, at, n.loop, &s->cause_kind);
  }
}

}  // namespace

void ExplainRunaway(const Case& cs, const PointResult& at_ok, double lam_ok, double lam_bad, int g, double t_fail,
                    SolverSummary* s) {
  if (g < 0 || g >= static_cast<int>(at_ok.nodes.size())) return;
  const NodeResult& n = at_ok.nodes[g];
  int hot = g;
  for (size_t i = 0; i < at_ok.nodes.size(); ++i)
    if (at_ok.nodes[i].loop == n.loop && at_ok.nodes[i].temperature_k > at_ok.nodes[hot].temperature_k) hot = static_cast<int>(i);
  const int l = n.loop;
  const ThermalReport& tr = at_ok.thermal_report;
  const double added = l < static_cast<int>(tr.loop_heat_added.size()) ? tr.loop_heat_added[l] : NAN;
  const Fluid& fluid = PointFluid(cs, at_ok, l);
  const std::string range = FarOutOfRange(fluid, t_fail) ? fmt::format(", beyond the {} model's range ({})",
                                                                       cs.loops[l].fluid_id, fluid.InRange(t_fail, 1e6).message)
                                                         : "";
  const std::string runaway = fmt::format(
      "Continuation in the heat input: loop {} has a steady state within its fluid's range up to {:.3g} % of its heat "
      "sources (there it takes in {:.4g} W and its hottest node, {}, is at {:.4g} degC), and none from {:.3g} % on: "
      "the temperatures run away, node {} reaching {:.4g} degC at the last pass{}.",
      cs.loops[l].id, 100 * lam_ok, added, NodeName(cs, at_ok.nodes[hot]),
      at_ok.nodes[hot].temperature_k - kZeroCelsius, 100 * lam_bad, NodeName(cs, n), t_fail - kZeroCelsius, range);
  // A starved bearing stays the cause when it is starved already at the
  // steady state of the fraction (its flow a tiny share of the loop's, or
  // its heat enough for a 150 K rise): at the failed iterate every flow of a
  // runaway loop has collapsed, so that iterate cannot tell.
  std::string kind_ok;
  HeatCause(cs, at_ok, g, &kind_ok);
  const bool specific = s->cause_kind == "bearing-flow-reversed" || s->cause_kind == "energy-no-outlet" ||
                        (s->cause_kind == "bearing-starved" && kind_ok == "bearing-starved");
  // Only a last pass beyond the fluid's range is a runaway; a failure
  // within it keeps its own cause, with the fraction added.
  if (specific || !FarOutOfRange(fluid, t_fail)) {
    s->cause += " " + runaway;
    return;
  }
  const std::string sinks = HeatSinks(cs, at_ok, l);
  s->cause_kind = "thermal-runaway";
  s->place = "node " + NodeName(cs, n);
  s->cause = fmt::format(
      "thermal runaway at node {}: no steady state within the fluid's range was found at the full heat input. {} "
      "As the oil heats its viscosity falls, and the flow that carries the heat to the loop's sinks ({}) falls "
      "with it (the pump slips more, the split moves): the heat sinks cannot take the full heat. A larger cooler, "
      "more flow, or less heat is needed.",
      NodeName(cs, n), runaway, sinks.empty() ? "none" : sinks);
}

bool ExplainByHydraulicState(const Case& cs, const PointResult& at, SolverSummary* s) {
  PointResult probe = at;
  probe.converged = true;
  if (!RejectUndetermined(cs, &probe) && !RejectPressure(cs, &probe)) return false;
  const std::string thermal_failure = s->message;
  s->termination = probe.summary.termination;
  s->cause_kind = probe.summary.cause_kind;
  s->place = probe.summary.place;
  s->cause = probe.summary.cause;
  s->worst = probe.summary.worst;
  s->cause += fmt::format(" (The hydraulics converged at this state; {}: a consequence, not the cause.)",
                          thermal_failure.empty() ? "the temperatures did not" : thermal_failure);
  return true;
}

void ExplainFailure(const Case& cs, const PointResult& at, SolverSummary* s) {
  if (s->termination == Termination::kEnergyBalance) return ExplainEnergy(cs, at, s);
  if (s->termination == Termination::kCouplingNotSettled) {
    const RowDiagnosis* w = s->worst.empty() ? nullptr : &s->worst[0];
    s->cause_kind = "coupling-not-settled";
    s->place = w && w->node >= 0 && w->node < static_cast<int>(at.nodes.size()) ? "node " + NodeName(cs, at.nodes[w->node])
                                                                                 : "the coupled loops";
    s->cause = fmt::format("the temperatures and flows kept moving each other between passes{}: viscosity changes the "
                           "flow split, which changes the heat each branch carries. A branch near zero or reversing "
                           "flow, or a valve at its crack, can do this.",
                           w ? fmt::format(" (largest change {:.3g} K at {})", w->residual, s->place) : "");
    return;
  }
  if (ExplainFixedFlows(cs, at, s) || ExplainUnbounded(cs, at, s) || ExplainSwitch(cs, at, s)) return;
  ExplainResidual(cs, at, s);
}

std::vector<RowDiagnosis> EnergyRows(const Case& cs, const NetworkSystem& sys, ThermalSystem* thermal,
                                     const Eigen::VectorXd& u, const std::vector<double>& T) {
  Eigen::VectorXd r;
  thermal->Residuals(u, T, &r, nullptr);
  std::vector<std::pair<double, int>> order;
  for (size_t g = 0; g < sys.nodes().size(); ++g) {
    const int k = thermal->UnknownOf(static_cast<int>(g));
    if (k >= 0) order.emplace_back(std::isfinite(r[k]) ? std::abs(r[k]) : INFINITY, static_cast<int>(g));
  }
  std::sort(order.rbegin(), order.rend());
  std::vector<RowDiagnosis> rows;
  for (size_t i = 0; i < std::min<size_t>(5, order.size()); ++i) {
    const int g = order[i].second;
    const NodeRef& nr = sys.nodes()[g];
    rows.push_back({"energy balance at node " + NodeName(cs, nr.loop, nr.node), r[thermal->UnknownOf(g)], "W", -1, g});
  }
  return rows;
}

std::vector<RowDiagnosis> TemperatureChangeRows(const Case& cs, const NetworkSystem& sys, const std::vector<double>& T,
                                                const std::vector<double>& t_prev) {
  std::vector<std::pair<double, int>> order;
  for (size_t g = 0; g < T.size() && g < t_prev.size(); ++g) {
    const double d = T[g] - t_prev[g];
    order.emplace_back(std::isfinite(d) ? std::abs(d) : INFINITY, static_cast<int>(g));
  }
  std::sort(order.rbegin(), order.rend());
  std::vector<RowDiagnosis> rows;
  for (size_t i = 0; i < std::min<size_t>(3, order.size()); ++i) {
    const int g = order[i].second;
    const NodeRef& nr = sys.nodes()[g];
    rows.push_back({"temperature change between passes at node " + NodeName(cs, nr.loop, nr.node), T[g] - t_prev[g],
                    "K", -1, g});
  }
  return rows;
}

}  // namespace loopwright
