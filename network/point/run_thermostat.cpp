// The coupled solve of a thermal point with thermostatic valves
// (components/thermostatic_valve.h).
//
// A wax element's travel follows the temperature at its sensed node, and
// that temperature follows the travel (the split between cooler and bypass).
// Letting the element follow the temperature of the last pass, as the plain
// nested scheme lets viscosity follow it, is a fixed-point iteration
// x <- T_s(x) whose gain is dT_s/dx = (dT_s/dy) / (band width): negative
// (more travel, more cooling) and large for a narrow band. The passes'
// under-relaxation (Relax in run.cpp, down to a factor 1/8) settles it only
// while the gain is above -15: the test case's 10 K band across a cooler
// taking 46 K out of half the flow gives about -9.5 (tests/network/envelope/
// thermostat_test.cpp), a 1 K band ten times that, and the passes then swing
// from one end of the travel to the other for ever.
//
// Instead, every sensed node's temperature x is held (the elements sensing it
// see x, not T) while the nested passes solve the rest, and x is found as the
// root of f(x) = T_s(x) - x by a search that brackets it:
//   1. from x0 (the last answer's temperature there, else the band's middle;
//      every sensed node is held there from the start)
//      a fixed-point step x + f(x), bounded by the band widened by 1 K
//      (x_lo = lowest start_to_open - 1 K, x_hi = highest full_open + 1 K),
//      until f changes sign. At x_hi (hot paths fully open) with f still > 0
//      the valve is saturated hot (the cooler too small): every flow is the
//      same beyond x_hi, so the root is T_s(x_hi), reached by one more step;
//      at x_lo with f < 0, saturated cold, alike.
//   2. once f has both signs, the Anderson-Bjorck variant of regula falsi
//      (N. Anderson, A. Bjorck, BIT 13 (1973) 253-264, from memory): the end
//      kept twice in a row has its f scaled by 1 - f_new/f_replaced (1/2,
//      the Illinois rule, when that is not positive); it keeps the bracket
//      and converges superlinearly, to |f| <= 2e-9 K. (Illinois alone took
//      14 trials on the demo APU skid's idle point, this 12.)
// A trial far from the root needs T_s only to a small part of |f|: its
// passes settle to 1e-3 of the last |f| (between 1e-9 and 1e-4 K), and a
// trial that settles loosely within 2e-9 K is solved again at 1e-9 K (the
// plain passes' tolerance) before it is the answer. That halves the passes
// (393 to 195 there, 167 with both).
// f is continuous in x (the travel is C2, the passes' answer continuous in
// it), so the bracket always holds a root, whatever the sign of dT_s/dx (a
// mixing valve sensing its outlet, a diverting one sensing its inlet).
// Several sensed nodes are settled one after the other (block Gauss-Seidel
// over the nodes, 30 sweeps at most) until every |f| <= 2e-9 K. A failure
// names the valve: a pass that fails at a held temperature (its own cause,
// with the valve and the held temperature added), or a node that does not
// settle (cause kind thermostat-not-settled).
#include <algorithm>
#include <cmath>
#include <functional>

#include <fmt/format.h>

#include "network/point/run.h"

namespace loopwright {

namespace {

// |T_s - x| accepted: CaseSolver::settle_k (2e-9 K, twice the passes' own
// tolerance: an answer then differs from another start's by about 1e-8 K
// at most, as the plain passes' answers do); a bracket narrower than
// kBracketK, with its last trial converged, is accepted too (the passes'
// rounding floor).
constexpr double kBracketK = 1e-9;

}  // namespace

// A sensed node with a free temperature, the band of its elements widened by
// 1 K each side, and one of its sites (to name the valve).
struct SensedNode {
  int node = -1;
  double lo = INFINITY, hi = -INFINITY;
  SensorSite site;
};

namespace {

std::vector<SensedNode> FreeSensedNodes(CaseSolver& s) {
  std::vector<SensedNode> out;
  for (const SensorSite& site : s.sensors) {
    if (s.thermal->UnknownOf(site.node) < 0) continue;  // a fixed temperature: followed directly
    auto it = std::find_if(out.begin(), out.end(), [&](const SensedNode& n) { return n.node == site.node; });
    if (it == out.end()) {
      out.push_back({site.node, INFINITY, -INFINITY, site});
      it = out.end() - 1;
    }
    const ComponentType& type = *s.sys.branch_type(site.branch);
    const ParamArray& prm = s.sys.working_model(site.branch)->params();
    it->lo = std::min(it->lo, prm[type.ParamIndex("start_to_open")] - 1.0);
    it->hi = std::max(it->hi, prm[type.ParamIndex("full_open")] + 1.0);
  }
  return out;
}

std::string ValveName(const Case& cs, const NetworkSystem& sys, const SensorSite& site) {
  const Branch& b = sys.branches()[site.branch];
  const NodeRef& nr = sys.nodes()[site.node];
  return fmt::format("thermostatic valve {}/{} (sensing node {}/{})", cs.loops[b.loop].id,
                     cs.loops[b.loop].components[b.comp].id, cs.loops[nr.loop].id, cs.loops[nr.loop].nodes[nr.node].id);
}

// The root of f from x0 as the header describes; `eval` solves at x and
// returns f(x), false when the solve fails, with f = +inf (-inf) when its
// last iterate ran hot (cold) of x: a held travel with no steady state (the
// hot paths shut on a loop whose cooler is its only sink) is a point on the
// hot side of the root. Returns false on a failure it cannot place (a
// non-finite iterate, or one that ran cold); *settled says whether
// |f| <= settle_k was reached.
// `slope` is a guess of df/dx at the root (NaN: none; the steps before a
// bracket are then the fixed-point steps x + f); *secant gets the slope of
// the last two finite trials at least 1e-6 K apart (NaN when none);
// *accepted the |f| accepted (settle_k, or more at the rounding floor).
bool FindSensedRoot(const std::function<bool(double, double*)>& eval, double x0, double lo, double hi, double settle_k,
                    double slope, bool* settled, double* secant, double* accepted) {
  struct Point {
    double x = NAN, f = NAN;
  } a, b, p, raw;  // a: f > 0 (the root above x for a falling f), b: f < 0; raw: the last finite trial
  *settled = false;
  *secant = NAN;
  // A step x - f / slope with the guess (falling f only), else x + f.
  const double gain = slope < 0 ? -1.0 / slope : 1.0;
  int last_side = 0;
  p.x = x0;
  for (int n = 0; n < 60; ++n) {
    const bool ok = eval(p.x, &p.f);
    if (std::isnan(p.f) || (!ok && p.f < 0)) return false;
    if (std::isfinite(p.f)) {
      if (std::isfinite(raw.f) && std::abs(p.x - raw.x) >= 1e-6) *secant = (p.f - raw.f) / (p.x - raw.x);
      raw = p;
    }
    *accepted = std::max(settle_k, std::abs(p.f));  // what a bracket at the rounding floor accepts
    if (ok && std::abs(p.f) <= settle_k) return *settled = true;
    const int side = p.f > 0 ? 1 : -1;
    Point& same = side > 0 ? a : b;
    // Anderson-Bjorck: the end kept twice in a row has its value scaled by
    // 1 - f_new / f_replaced (by 1/2 when that is not positive).
    if (side == last_side && !std::isinf(same.f)) {
      const double m = 1.0 - p.f / same.f;
      (side > 0 ? b : a).f *= m > 0 ? m : 0.5;
    }
    same = p;
    last_side = side;
    if (!std::isnan(a.x) && !std::isnan(b.x)) {
      if (std::abs(a.x - b.x) <= kBracketK) return *settled = ok;  // at the passes' rounding floor
      p.x = std::isinf(a.f) ? 0.5 * (a.x + b.x) : (a.x * b.f - b.x * a.f) / (b.f - a.f);
    } else if (side > 0) {  // no point below zero yet: step up, to the hot end at most, then its own answer
      p.x = std::isinf(a.f) ? hi : a.x >= hi ? a.x + a.f : std::min(a.x + gain * a.f, hi);
      if (p.x == a.x) return false;  // no steady state with the hot paths fully open
    } else {
      p.x = b.x <= lo ? b.x + b.f : std::max(b.x + gain * b.f, lo);
    }
  }
  return true;
}

// A pass that failed while a sensed temperature was held: its own cause, with
// the valve and the held temperature named.
PointResult ThermostatFailed(CaseSolver& c, const SensorSite& site, int node, int passes, PointResult last) {
  c.passes_tolerance_k = 0.5 * c.settle_k;
  // Named only when the failure may concern the valve: its place is in the
  // valve's or the sensed node's loop, or has no place.
  const std::string& place = last.summary.place;
  const size_t at = place.find(' '), slash = place.find('/');
  const std::string loop = at != std::string::npos && slash > at ? place.substr(at + 1, slash - at - 1) : "";
  const std::string& valve_loop = c.cs.loops[c.sys.branches()[site.branch].loop].id;
  const std::string& sensed_loop = c.cs.loops[c.sys.nodes()[site.node].loop].id;
  if (loop.empty() || loop == valve_loop || loop == sensed_loop) {
    const std::string held = fmt::format(" (while the coupled solve held the element of {} at {:.3f} degC)",
                                         ValveName(c.cs, c.sys, site), c.thermal->held(node) - 273.15);
    last.summary.message += held;
    last.summary.cause += held;
  }
  last.coupling_iterations = passes;
  c.thermal->ReleaseSensed();
  return last;
}

PointResult ThermostatNotSettled(CaseSolver& c, const std::vector<SensedNode>& nodes, PointResult last) {
  const Case& cs = c.cs;
  const NetworkSystem& sys = c.sys;
  ThermalSystem* thermal = c.thermal.get();
  const std::vector<double>& T = c.T;
  const SensedNode* worst = &nodes[0];
  for (const SensedNode& n : nodes)
    if (std::abs(T[n.node] - thermal->held(n.node)) > std::abs(T[worst->node] - thermal->held(worst->node))) worst = &n;
  const double gap = T[worst->node] - thermal->held(worst->node);
  const std::string name = ValveName(cs, sys, worst->site);
  SolverSummary& s = last.summary;
  s.termination = Termination::kCouplingNotSettled;
  s.message = fmt::format("the sensed temperature of {} did not settle ({:.3g} K from the held value)", name, gap);
  s.worst = {{"sensed temperature minus held temperature of " + name, gap, "K", worst->site.branch, worst->node}};
  s.cause_kind = kThermostatNotSettled;
  const Branch& b = sys.branches()[worst->site.branch];
  s.place = "component " + cs.loops[b.loop].id + "/" + cs.loops[b.loop].components[b.comp].id;
  s.cause = fmt::format("{}: no travel was found at which the temperature it senses equals the temperature that "
                        "travel produces (last gap {:.3g} K); the element's band may be narrower than the solver's "
                        "rounding, or several valves fight over one loop.", name, gap);
  last.converged = false;
  last.nodes.clear();
  last.branches.clear();
  thermal->ReleaseSensed();
  return last;
}

}  // namespace

PointResult CaseSolver::SolveCoupled(const OperatingPoint& op, bool warm) {
  if (sensors.empty()) return SolvePasses(op, warm);
  const std::vector<SensedNode> nodes = FreeSensedNodes(*this);
  if (nodes.empty()) return SolvePasses(op, warm);
  // The trials are not described (collect_answers); the answer kept is.
  // When that answer is not a physical state, the search runs again with
  // every trial judged so, as it always did (a trial in such a state then
  // counts as one without a steady state).
  const Eigen::VectorXd u0 = u;
  const std::vector<double> t0 = T;
  const bool had = has_answer;
  collect_answers = false;
  PointResult r = SearchSensed(op, warm, nodes);
  collect_answers = true;
  if (r.converged) {
    CollectAnswer(op, &r);
    thermal->ReleaseSensed();
  }
  if (r.converged || r.summary.termination != Termination::kUnphysical) return r;
  u = u0, T = t0, has_answer = had;
  r = SearchSensed(op, warm, nodes);
  if (r.converged) thermal->ReleaseSensed();
  return r;
}

PointResult CaseSolver::SearchSensed(const OperatingPoint& op, bool warm, const std::vector<SensedNode>& nodes) {
  PointResult last;
  int passes = 0;
  const SensedNode* now = nullptr;
  const double tight = 0.5 * settle_k;  // the passes' own tolerance at an answer
  // A trial far from the root needs its T_s only to a small part of its
  // distance from it: the passes settle to 1e-3 of the last |f| (`tight`
  // at least, 1e-4 K at most); a trial that meets settle_k that loosely is
  // solved again at `tight` before it is accepted.
  double last_f = INFINITY;
  auto trial = [&](double x, double* f) {
    passes_tolerance_k = std::clamp(1e-3 * last_f, tight, std::max(1e-4, tight));
    thermal->HoldSensed(now->node, x);
    last = SolvePasses(op, warm);
    warm = true;  // later solves start from the last answer (when there is one)
    passes += last.coupling_iterations;
    const double t = T.size() > static_cast<size_t>(now->node) ? T[now->node] : NAN;
    *f = last.converged ? t - x : !std::isfinite(t) ? NAN : t > x ? INFINITY : -INFINITY;
    if (last.converged) last_f = std::abs(*f);
    return last.converged;
  };
  auto eval = [&](double x, double* f) {
    if (!trial(x, f) || std::abs(*f) > settle_k || passes_tolerance_k <= tight) return last.converged;
    last_f = 0;  // settled loosely: again at the full tolerance
    return trial(x, f);
  };
  // Every sensed node starts held: at the last answer's temperature there,
  // else the middle of its band (a node not yet settled never follows T).
  const bool have_t = warm && has_answer && T.size() == sys.nodes().size();
  for (const SensedNode& n : nodes)
    thermal->HoldSensed(n.node, have_t && std::isfinite(T[n.node]) ? T[n.node] : 0.5 * (n.lo + n.hi));
  sensed_slopes_found.assign(sys.nodes().size(), NAN);
  std::vector<double> accepted(nodes.size(), settle_k);
  bool settled = false;
  for (int sweep = 0; sweep < 30 && !settled; ++sweep) {
    for (size_t i = 0; i < nodes.size(); ++i) {
      const SensedNode& n = nodes[i];
      now = &n;
      const double hint = warm && sensed_slopes.size() == sys.nodes().size() ? sensed_slopes[n.node] : NAN;
      double secant = NAN;
      if (!FindSensedRoot(eval, thermal->held(n.node), n.lo, n.hi, settle_k, hint, &settled, &secant, &accepted[i]))
        return ThermostatFailed(*this, n.site, n.node, passes, std::move(last));
      if (std::isfinite(secant)) sensed_slopes_found[n.node] = secant;
    }
    settled = true;  // every node within what its search accepted of its hold at the last solve
    for (size_t i = 0; i < nodes.size(); ++i)
      settled = settled && std::abs(T[nodes[i].node] - thermal->held(nodes[i].node)) <= accepted[i];
  }
  passes_tolerance_k = tight;
  last.coupling_iterations = passes;
  last.summary.coupling_passes = passes;
  if (!settled) return ThermostatNotSettled(*this, nodes, std::move(last));
  return last;  // the sensed nodes still held (SolveCoupled describes the answer, then releases them)
}

}  // namespace loopwright
