#include "network/design/sizing.h"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <optional>
#include <tuple>

#include <fmt/format.h>

#include <ceres/ceres.h>

#include "network/envelope/results.h"
#include "network/point/ceres_options.h"
#include "network/point/run.h"
#include "network/envelope/sensitivity.h"
#include "network/envelope/warning_tally.h"

namespace loopwright {

using nlohmann::json;

namespace {

struct EnvEval {
  bool converged = true;
  WarningTally warnings;  // model-range and fluid warnings over the points, repeats counted
  bool pass = true;
  CheckSummary binding;  // smallest relative margin
  std::vector<CheckSummary> summary;
  std::vector<PointResult> points;
};

double RelativeMargin(const CheckOutcome& o) {
  const double scale = std::abs(o.limit) > 0 ? std::abs(o.limit) : std::max(std::abs(o.value), 1e-12);
  return o.margin / scale;
}

// The design overrides that hold knob `k` at `value`.
DesignOverrides Holding(const DesignKnob& k, double value) {
  DesignOverrides ov;
  if (k.coupling >= 0) ov.SetCoupling(k.coupling, value);
  else ov.SetParam(k.loop, k.comp, k.param, value);
  return ov;
}

void CollectWarnings(const Case& cs, const PointResult& p, WarningTally* out) {
  for (const auto& x : p.warnings) out->Add(x, p.name);
  ComponentReport report;
  for (size_t k = 0; k < p.branches.size(); ++k) {
    const BranchOutcome& br = p.branches[k];
    DescribeBranch(cs, p, k, &report);
    for (const auto& x : report.warnings)
      out->Add(fmt::format("{}/{}: {}", cs.loops[br.loop].id, cs.loops[br.loop].components[br.comp].id, x), p.name);
  }
}

// Every point of the envelope with the design choices `ov` held.
EnvEval Evaluate(const Case& cs, const DesignOverrides& ov = {}) {
  EnvEval e;
  CaseSolver solver(cs);
  solver.overrides = ov;
  std::vector<std::vector<CheckOutcome>> per;
  std::vector<std::string> names;
  for (const auto& op : cs.envelope.points) {
    PointResult r = solver.Solve(op, true);
    if (!r.converged) r = solver.Solve(op, false);
    if (!r.converged) {
      e.converged = false;
      e.pass = false;
      e.points.push_back(std::move(r));
      continue;
    }
    std::vector<CheckWarning> w;
    per.push_back(EvaluateChecks(cs, op, r, &w));
    names.push_back(op.name);
    CollectWarnings(cs, r, &e.warnings);
    e.points.push_back(std::move(r));
  }
  e.summary = SummariseChecks(per, names);
  double best = INFINITY;
  for (const auto& s : e.summary) {
    e.pass = e.pass && s.worst.pass;
    // Closed/open checks (relief, bypass) that pass have no margin to speak of.
    if (s.worst.pass && s.worst.limit == 0) continue;
    const double rm = RelativeMargin(s.worst);
    if (rm < best) {
      best = rm;
      e.binding = s;
    }
  }
  return e;
}

// The binding check: the smallest relative margin, among the checks of the
// question's own loop (a->loop_prefix) when it has any.
void Fill(SizingAnswer* a, const EnvEval& e) {
  const CheckSummary* b = &e.binding;
  double best = INFINITY;
  for (const auto& s : e.summary) {
    if (s.worst.pass && s.worst.limit == 0) continue;
    if (s.worst.where.rfind(a->loop_prefix, 0) != 0) continue;
    const double rm = RelativeMargin(s.worst);
    if (rm < best) {
      best = rm;
      b = &s;
    }
  }
  a->binding_check = b->worst.name();
  a->binding_where = b->worst.where;
  a->point = b->point;
  a->margin = b->worst.margin;
  a->margin_dim = b->worst.dim == Dimension::kTemperature ? Dimension::kTemperatureDifference : b->worst.dim;
  if (!e.converged) {
    a->note = "some points did not converge";
    for (const auto& p : e.points)
      if (!p.converged) {
        a->note += fmt::format(" (first, {}: {})", p.name, p.summary.cause);
        break;
      }
  }
  // Models outside their range with this answer: said, never silent (kinds
  // of warning, each once with the count of points raising it).
  a->warnings = e.warnings.Lines(8);
}

// Ceres root of g(point result) = 0 in the knob over [lo, hi], starting at
// `start`: one bounded parameter, one residual g / scale at the point `op`,
// whose derivative is the exact tangent of the re-solved point
// (network/envelope/sensitivity.h). The solver's state is warm-started along the way.
class RootCost : public ceres::CostFunction {
 public:
  RootCost(CaseSolver* solver, const DesignKnob& k, const OperatingPoint& op,
           std::function<double(const PointResult&)> g, double scale)
      : solver_(solver), k_(k), op_(op), g_(std::move(g)), scale_(scale) {
    set_num_residuals(1);
    mutable_parameter_block_sizes()->push_back(1);
  }
  bool Evaluate(double const* const* x, double* r, double** jac) const override {
    SetKnobValue(solver_, k_, x[0][0]);
    PointResult res = solver_->Solve(op_, true);
    if (!res.converged) res = solver_->Solve(op_, false);
    if (!res.converged) return false;
    r[0] = g_(res) / scale_;
    if (!std::isfinite(r[0])) return false;
    if (jac && jac[0]) {
      PointTangents pt(solver_, op_);
      StateTangent t = pt.Tangent(k_);
      if (!t.ok) return false;
      jac[0][0] = pt.Derivative(k_, t, g_) / scale_;
      if (!std::isfinite(jac[0][0])) return false;
    }
    return true;
  }

 private:
  CaseSolver* solver_;
  const DesignKnob& k_;
  const OperatingPoint& op_;
  std::function<double(const PointResult&)> g_;
  double scale_;
};

struct RootResult {
  bool ok = false;
  double x = NAN, g = NAN;
  int iterations = 0;
};

RootResult CeresRoot(const Case& cs, const DesignKnob& k, double knob_value, const OperatingPoint& op,
                     const std::function<double(const PointResult&)>& g, double scale, double lo, double hi,
                     double start) {
  RootResult out;
  CaseSolver solver(cs);
  if (!SetKnobValue(&solver, k, knob_value)) return out;
  double x = std::clamp(start, lo, hi);
  ceres::Problem::Options po;
  po.cost_function_ownership = ceres::TAKE_OWNERSHIP;
  ceres::Problem problem(po);
  problem.AddResidualBlock(new RootCost(&solver, k, op, g, scale), nullptr, &x);
  if (lo < hi) {
    problem.SetParameterLowerBound(&x, 0, lo);
    problem.SetParameterUpperBound(&x, 0, hi);
  }
  ceres::Solver::Summary sum;
  ceres::Solve(QuietCeresOptions({ceres::DENSE_QR, 40, 1e-20, 1e-30, 1e-12}), &problem, &sum);
  out.iterations = static_cast<int>(sum.iterations.size());
  out.x = x;
  SetKnobValue(&solver, k, x);
  PointResult res = solver.Solve(op, true);
  if (!res.converged) res = solver.Solve(op, false);
  if (res.converged) out.g = g(res);
  out.ok = res.converged && std::isfinite(out.g) && std::abs(out.g) <= 1e-8 * scale;
  return out;
}

// The failing check with the smallest relative margin of an evaluation.
const CheckSummary* WorstFailing(const EnvEval& e) {
  const CheckSummary* w = nullptr;
  for (const auto& s : e.summary)
    if (!s.worst.pass && (!w || RelativeMargin(s.worst) < RelativeMargin(w->worst))) w = &s;
  return w;
}

// Why a candidate part was rejected: its worst failing check.
Rejection Rejected(const std::string& id, const EnvEval& e) {
  Rejection r{id, "", "", "", "", kNoValue, Dimension::kDimensionless};
  if (const CheckSummary* w = WorstFailing(e)) {
    r.check = w->worst.name();
    r.where = w->worst.where;
    r.point = w->point;
    r.margin = w->worst.margin;
    r.dim = w->worst.dim == Dimension::kTemperature ? Dimension::kTemperatureDifference : w->worst.dim;
  }
  if (!e.converged) r.reason = "some points did not converge with it";
  return r;
}

// Why the binding check binds, in words: what a value beyond each edge
// makes fail; for a part choice, which rejected candidate fails the binding
// check; otherwise that it has the least to spare with the answer.
void Explain(const std::string& component, SizingAnswer* a) {
  for (const auto& e : a->edges)
    a->reasons.push_back(fmt::format("with a {} {} than the answer, at {} {} ({} at {})", e.side, e.param, e.point,
                                     CheckFailureText(e.check), e.check, e.where));
  if (a->binding_check.empty() || a->binding_where.rfind(component, 0) == 0) return;
  if (a->margin < 0) {
    a->reasons.push_back(fmt::format("{} at {} fails with this answer: at {} {}; changing {} alone does not mend it",
                                     a->binding_check, a->binding_where, a->point, CheckFailureText(a->binding_check),
                                     component));
    return;
  }
  for (const auto& e : a->edges)
    if (e.check == a->binding_check && e.where == a->binding_where) return;  // explained above
  for (const auto& r : a->rejected)
    if (r.check == a->binding_check && r.where == a->binding_where) {
      a->reasons.push_back(fmt::format("{} at {} is not at {}, yet it binds: with {} in its place, at {} {}",
                                       a->binding_check, a->binding_where, component, r.candidate, r.point,
                                       CheckFailureText(r.check)));
      return;
    }
  a->reasons.push_back(fmt::format("{} at {} is not at {}: no candidate or edge fails it; it is named as the check "
                                   "with the least to spare with this answer (were it to fail, {})",
                                   a->binding_check, a->binding_where, component, CheckFailureText(a->binding_check)));
}

// The edge between a failing knob value and a passing one (either order):
// the check that fails at `fail` with the smallest relative margin, at its
// governing point, is driven to its limit by a Ceres root (exact tangents)
// and the envelope re-verified just on the passing side; if another check
// governs in between, the root is taken again on that one. Open/closed
// checks (relief lifting, bypass open: margin zero when passing) and anything
// the roots cannot settle are bisected instead (geometric midpoints when
// `geometric`). Returns the passing edge; a->method says how.
double RefineEdge(const Case& cs, const DesignKnob& k, double keep, double fail, double pass, bool geometric,
                  SizingAnswer* a) {
  const double lo = std::min(fail, pass), hi = std::max(fail, pass);
  std::string why;
  EdgeCheck edge;
  // Whichever way the edge is settled, the answer records what sets it.
  struct Record {
    SizingAnswer* a;
    EdgeCheck* e;
    ~Record() {
      if (!e->check.empty()) a->edges.push_back(*e);
    }
  } record{a, &edge};
  for (int round = 0; round < 4; ++round) {
    const EnvEval ef = Evaluate(cs, Holding(k, fail));
    const CheckSummary* w = WorstFailing(ef);
    if (w) {
      why = fmt::format(" of {} at {} ({})", w->worst.name(), w->worst.where, w->point);
      edge = {std::string(w->worst.name()), w->worst.where, w->point, fail < pass ? "smaller" : "larger",
              k.name.substr(k.name.rfind('.') + 1)};
    }
    if (!w || w->worst.limit == 0) break;
    const int pi = FindPoint(cs, w->point);
    if (pi < 0) break;
    const std::string check(w->worst.name()), where = w->worst.where;
    const OperatingPoint& op = cs.envelope.points[pi];
    RootResult rr = CeresRoot(cs, k, keep, op,
                              [&](const PointResult& r) { return CheckMargin(cs, op, r, check, where); },
                              std::abs(w->worst.limit), std::min(fail, pass), std::max(fail, pass), pass);
    if (!rr.ok) break;
    a->root_iterations += rr.iterations;
    // Step onto the passing side of the root by 1e-6 of it, clear of the
    // solver's tolerance (a margin of ~1e-11 may read either way when the
    // envelope is re-solved from other starting points).
    const double cand = std::clamp(rr.x + std::copysign(1e-6 * std::max(std::abs(rr.x), 1e-9), pass - fail), lo, hi);
    if (Evaluate(cs, Holding(k, cand)).pass) {
      const std::string m = fmt::format("Ceres root of {} at {} ({})", check, where, w->point);
      a->method = a->method.empty() ? m : a->method + "; " + m;
      return cand;
    }
    fail = cand;
  }
  a->method = (a->method.empty() ? "" : a->method + "; ") + "bisection" + why;
  for (int it = 0; it < 30 && std::abs(pass - fail) > 1e-4 * std::max(std::abs(pass), 1e-9); ++it) {
    const double mid = geometric && fail > 0 && pass > 0 ? std::sqrt(fail * pass) : 0.5 * (fail + pass);
    (Evaluate(cs, Holding(k, mid)).pass ? pass : fail) = mid;
  }
  return pass;
}

// Smallest knob value in [lo, hi] that passes the envelope: a log-spaced
// scan finds the first passing value (so a window closed at both ends, e.g. a
// pump too small for the feed and too large for its suction line, is found),
// then RefineEdge settles the edge below it.
void SmallestPassing(const Case& cs, const DesignKnob& k, double lo, double hi, SizingAnswer* a) {
  CaseSolver probe(cs);
  const double keep = KnobValue(&probe, k);
  const int n = 17;
  std::vector<double> x(n);
  int first = -1;
  for (int i = 0; i < n; ++i) {
    x[i] = lo > 0 ? lo * std::pow(hi / lo, double(i) / (n - 1)) : lo + (hi - lo) * i / (n - 1);
    if (Evaluate(cs, Holding(k, x[i])).pass) {
      first = i;
      break;
    }
  }
  if (first < 0) {
    a->feasible = false;
    EnvEval e = Evaluate(cs, Holding(k, keep));
    Fill(a, e);
    a->range_lo = lo;
    a->range_hi = hi;
    a->note = fmt::format("no value in the searched range passes every check; with the present value the binding check is {} at {} ({})",
                          e.binding.worst.name(), e.binding.worst.where, e.binding.point);
    return;
  }
  double pass = x[first];
  if (first > 0) {
    pass = RefineEdge(cs, k, keep, x[first - 1], pass, true, a);
  } else {
    a->note = "the lower bound already passes";
  }
  EnvEval e = Evaluate(cs, Holding(k, pass));
  a->feasible = e.pass;
  a->value = pass;
  Fill(a, e);
}

// The knob `param` of the question's component; for a cooler's conductance
// on a component that is one side of a liquid coupling, the coupling's.
std::optional<DesignKnob> FindKnob(const Case& cs, const DesignQuestion& q, const std::string& param) {
  const ComponentSpec& spec = cs.loops[q.loop].components[q.comp];
  const std::string ref = cs.loops[q.loop].id + "/" + spec.id;
  for (const DesignKnob& k : DesignKnobs(cs)) {
    if (k.loop == q.loop && k.comp == q.comp && spec.type_info->params[k.param].name == param) return k;
    if (k.coupling >= 0 && param == "conductance") {
      const Coupling& cp = cs.couplings[k.coupling];
      if (cp.hot_ref == ref || cp.cold_ref == ref) return k;
    }
  }
  return std::nullopt;
}

// A question's bounds: as the case gives them, else the defaults.
std::pair<double, double> Bounds(const DesignQuestion& q, double lo, double hi) {
  return {std::isnan(q.min) ? lo : q.min, std::isnan(q.max) ? hi : q.max};
}

// The parameter a scalar question sizes.
const char* SizedParam(DesignKind kind) {
  switch (kind) {
    case DesignKind::kCoolerConductance: return "conductance";
    case DesignKind::kPumpDisplacement: return "displacement";
    case DesignKind::kPumpSpeed: return "speed";
    case DesignKind::kReliefSetting: return "crack";
    case DesignKind::kBypassOpening: return "opening";
    case DesignKind::kRestrictorDiameter: return "diameter";
    default: return nullptr;
  }
}

// cooler_conductance, pump_displacement, pump_speed, relief_setting: the
// smallest passing value within a factor of 20 of the present one (or the
// question's bounds).
void AnswerSmallest(const Case& cs, const DesignQuestion& q, SizingAnswer* a) {
  const char* pn = SizedParam(q.kind);
  const std::optional<DesignKnob> k = FindKnob(cs, q, pn);
  CaseSolver probe(cs);
  const double now = k ? KnobValue(&probe, *k) : NAN;
  if (!k || std::isnan(now)) {
    a->note = fmt::format("{} has no {} to size{}", q.component, pn,
                          q.kind == DesignKind::kCoolerConductance ? " (an air_cooler, or one side of a coupling)" : "");
    return;
  }
  a->dim = k->dim;
  auto [lo, hi] = Bounds(q, now / 20, now * 20);
  SmallestPassing(cs, *k, std::max(lo, k->lo), std::min(hi, k->hi), a);
}

// bypass_opening: the window of passing openings (a scan, then both edges
// refined); the value is its middle.
void AnswerBypass(const Case& cs, const DesignQuestion& q, SizingAnswer* a) {
  const ComponentSpec& spec = cs.loops[q.loop].components[q.comp];
  const int oi = spec.type_info->ParamIndex("opening");
  const std::optional<DesignKnob> kn = FindKnob(cs, q, "opening");
  if (oi < 0 || !kn) {
    a->note = oi >= 0 ? "the valve opening is bound to an envelope variable, so it is no design choice"
                      : "the component is not a valve";
    return;
  }
  a->dim = Dimension::kDimensionless;
  auto [lo, hi] = Bounds(q, 0.0, 1.0);
  const double keep = spec.model->params()[oi];
  const int n = 21;
  std::vector<double> x(n);
  int first = -1, last = -1;
  for (int i = 0; i < n; ++i) {
    x[i] = lo + (hi - lo) * i / (n - 1);
    if (!Evaluate(cs, Holding(*kn, x[i])).pass) continue;
    if (first < 0) first = i;
    last = i;
  }
  if (first < 0) {
    EnvEval e = Evaluate(cs);
    Fill(a, e);
    a->note = fmt::format("no opening in [{:.3g}, {:.3g}] passes every check; binding: {} at {}", lo, hi,
                          e.binding.worst.name(), e.binding.worst.where);
    return;
  }
  const double a_lo = first > 0 ? RefineEdge(cs, *kn, keep, x[first - 1], x[first], false, a) : x[first];
  const double a_hi = last < n - 1 ? RefineEdge(cs, *kn, keep, x[last + 1], x[last], false, a) : x[last];
  a->feasible = true;
  a->value = 0.5 * (a_lo + a_hi);
  a->value_text = fmt::format("{:.6f} .. {:.6f}", a_lo, a_hi);
  Fill(a, Evaluate(cs, Holding(*kn, a->value)));
  a->note = "window of openings passing every check at every point; the value is its middle";
}

// restrictor_diameter: the diameter giving the target flow at the point (a
// Ceres root with exact tangents), checked over the envelope.
void AnswerRestrictor(const Case& cs, const DesignQuestion& q, SizingAnswer* a) {
  const ComponentSpec& spec = cs.loops[q.loop].components[q.comp];
  const int di = spec.type_info->ParamIndex("diameter");
  const std::string point = q.point.empty() ? cs.envelope.points[0].name : q.point;
  if (di < 0 || std::isnan(q.target)) {
    a->note = "needs an orifice or jet-fed component and a target flow";
    return;
  }
  a->dim = Dimension::kLength;
  const double keep = spec.model->params()[di], target = q.target;
  const std::optional<DesignKnob> kn = FindKnob(cs, q, "diameter");
  const int pi = FindPoint(cs, point);
  auto flow = [&](const PointResult& r) {
    for (const auto& b : r.branches)
      if (b.loop == q.loop && b.comp == q.comp) return b.flow_m3s - target;
    return static_cast<double>(NAN);
  };
  RootResult rr;
  if (kn && pi >= 0)
    rr = CeresRoot(cs, *kn, keep, cs.envelope.points[pi], flow, std::abs(target), std::max(keep / 20, kn->lo),
                   std::min(keep * 20, kn->hi), keep);
  a->method = "Ceres root of the flow at " + point;
  a->root_iterations = rr.iterations;
  a->value = std::isfinite(rr.x) ? rr.x : keep;
  EnvEval e = kn ? Evaluate(cs, Holding(*kn, a->value)) : Evaluate(cs);
  a->feasible = rr.ok && e.pass;
  Fill(a, e);
  if (!rr.ok) a->note = "no diameter within a factor of 20 gives the target flow";
  else if (!e.pass) a->note = fmt::format("gives the target flow, but the envelope fails: {} at {}", e.binding.worst.name(), e.binding.worst.where);
}

// What ranks a passing candidate: a pump's largest shaft power over the
// envelope; a line's bore; a cooler's rated heat (else its rated flow).
double ChoiceKey(const Case& cs, const DesignQuestion& q, const PartCandidate& cand, const EnvEval& e) {
  double key = 0;
  if (q.kind == DesignKind::kPumpChoice) {
    for (const auto& p : e.points)
      for (const auto& b : p.branches)
        if (b.loop == q.loop && b.comp == q.comp) key = std::max(key, BranchReport(cs, p, b).shaft_power_W);
    return key;
  }
  const ParamArray& prm = cand.model->params();
  const int di = cand.type_info->ParamIndex(q.kind == DesignKind::kLineSize ? "diameter" : "rated_flow");
  key = di >= 0 ? prm[di] : 0;
  if (q.kind == DesignKind::kCoolerSize) {
    const int ci = cand.type_info->ParamIndex("rated_heat");
    if (ci >= 0 && !std::isnan(prm[ci])) key = prm[ci];
  }
  return key;
}

// pump_choice, line_size, cooler_size: every candidate swapped in through
// the design overrides (the case is never changed nor re-read), the passing
// ones ranked by ChoiceKey.
void AnswerChoice(const Case& cs, const DesignQuestion& q, SizingAnswer* a) {
  struct Row { std::string id; double key; EnvEval e; };
  std::vector<Row> passing;
  std::string firstfail;
  for (const PartCandidate& cand : q.candidates) {
    if (!cand.model) {
      a->note += fmt::format("{}: {}; ", cand.id, cand.error);
      a->rejected.push_back({cand.id, "", "", "", cand.error});
      continue;
    }
    DesignOverrides ov;
    ov.SetPart(q.loop, q.comp, &cand);
    EnvEval e = Evaluate(cs, ov);
    if (!e.pass) {
      if (firstfail.empty()) firstfail = fmt::format("{} fails {} at {} ({})", cand.id, e.binding.worst.name(), e.binding.worst.where, e.binding.point);
      a->rejected.push_back(Rejected(cand.id, e));
      continue;
    }
    const double key = ChoiceKey(cs, q, cand, e);
    passing.push_back({cand.id, key, std::move(e)});
  }
  std::sort(passing.begin(), passing.end(), [](const Row& x, const Row& y) { return x.key < y.key; });
  if (passing.empty()) {
    a->note += firstfail.empty() ? "no candidate passes" : "no candidate passes; e.g. " + firstfail;
    return;
  }
  const bool pump = q.kind == DesignKind::kPumpChoice;
  a->feasible = true;
  a->value_text = passing[0].id;
  a->value = passing[0].key;
  a->dim = q.kind == DesignKind::kLineSize ? Dimension::kLength : Dimension::kPower;
  Fill(a, passing[0].e);
  for (const auto& r : passing)
    a->ranking.push_back(pump ? fmt::format("{}: shaft power {:.0f} W (largest over the envelope)", r.id, r.key) : r.id);
}

SizingAnswer AnswerOne(const Case& cs, const DesignQuestion& q) {
  const auto t0 = std::chrono::steady_clock::now();
  SizingAnswer a;
  a.question = q.id;
  a.kind = q.kind_name;
  a.loop_prefix = cs.loops[q.loop].id + "/";
  // A question on a held knob is refused at load (network/case/knobs.cpp);
  // a case assembled otherwise gets the same answer here.
  if (const char* pn = SizedParam(q.kind)) {
    const std::optional<DesignKnob> k = FindKnob(cs, q, pn);
    if (k && !k->held.empty()) {
      a.note = fmt::format("the {} of {} is {}: it is not sized", pn, q.component, k->held);
      return a;
    }
  }
  switch (q.kind) {
    case DesignKind::kCoolerConductance:
    case DesignKind::kPumpDisplacement:
    case DesignKind::kPumpSpeed:
    case DesignKind::kReliefSetting: AnswerSmallest(cs, q, &a); break;
    case DesignKind::kBypassOpening: AnswerBypass(cs, q, &a); break;
    case DesignKind::kRestrictorDiameter: AnswerRestrictor(cs, q, &a); break;
    case DesignKind::kPumpChoice:
    case DesignKind::kLineSize:
    case DesignKind::kCoolerSize: AnswerChoice(cs, q, &a); break;
  }
  Explain(q.component, &a);
  a.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  return a;
}

}  // namespace

std::vector<SizingAnswer> AnswerDesignQuestions(const Case& cs) {
  std::vector<SizingAnswer> out;
  for (const DesignQuestion& q : cs.design)
    if (q.loop >= 0 && q.comp >= 0) out.push_back(AnswerOne(cs, q));
  return out;
}

namespace {

// The range a scalar question is searched in (see AnswerSmallest,
// AnswerBypass; the restrictor a factor of 3 about its answer), clipped to
// the knob's accepted range; false when there is none.
bool ScanRange(const Case& cs, const DesignQuestion& q, const SizingAnswer& a, const DesignKnob& k, double* lo,
               double* hi, bool* geometric) {
  CaseSolver probe(cs);
  const double now = KnobValue(&probe, k);
  *geometric = q.kind != DesignKind::kBypassOpening;
  if (q.kind == DesignKind::kBypassOpening) std::tie(*lo, *hi) = Bounds(q, 0.0, 1.0);
  else if (q.kind == DesignKind::kRestrictorDiameter) std::tie(*lo, *hi) = std::make_pair(a.value / 3, a.value * 3);
  else std::tie(*lo, *hi) = Bounds(q, now / 20, now * 20);
  *lo = std::max(*lo, k.lo);
  *hi = std::min(*hi, k.hi);
  return std::isfinite(*lo) && std::isfinite(*hi) && *hi > *lo && (!*geometric || *lo > 0);
}

}  // namespace

std::optional<SizingScan> ScanDesignQuestion(const Case& cs, const DesignQuestion& q, const SizingAnswer& a, int n) {
  const char* pn = SizedParam(q.kind);
  if (!pn || a.binding_check.empty() || n < 2) return std::nullopt;
  const std::optional<DesignKnob> k = FindKnob(cs, q, pn);
  double lo = 0, hi = 0;
  SizingScan scan;
  if (!k || !k->held.empty() || !ScanRange(cs, q, a, *k, &lo, &hi, &scan.geometric)) return std::nullopt;
  scan.question = q.id;
  scan.param = k->name;
  scan.check = a.binding_check;
  scan.where = a.binding_where;
  scan.dim = k->dim;
  scan.margin_dim = a.margin_dim;
  for (int i = 0; i < n; ++i) {
    SizingScanSample s;
    s.value = scan.geometric ? lo * std::pow(hi / lo, double(i) / (n - 1)) : lo + (hi - lo) * i / (n - 1);
    const EnvEval e = Evaluate(cs, Holding(*k, s.value));
    s.converged = e.converged;
    s.pass = e.pass;
    for (const CheckSummary& c : e.summary)
      if (c.worst.name() == scan.check && c.worst.where == scan.where) {
        s.margin = c.worst.margin;
        s.point = c.point;
      }
    scan.samples.push_back(s);
  }
  return scan;
}

json AnswersJson(const std::vector<SizingAnswer>& answers) {
  json arr = json::array();
  for (const auto& a : answers) {
    json j = {{"question", a.question}, {"kind", a.kind}, {"feasible", a.feasible},
              {"unit", SiKeySuffix(a.dim).empty() ? "1" : SiKeySuffix(a.dim).substr(1)},
              {"method", a.method}, {"root_iterations", a.root_iterations},
              {"binding_check", a.binding_check}, {"binding_where", a.binding_where}, {"point", a.point},
              {"note", a.note}, {"seconds", a.seconds}};
    j["value"] = std::isnan(a.value) ? json(nullptr) : json(a.value);
    j["margin"] = std::isnan(a.margin) ? json(nullptr) : json(a.margin);
    if (!std::isnan(a.range_lo)) j["searched"] = {a.range_lo, a.range_hi};
    j["margin_unit"] = SiKeySuffix(a.margin_dim).empty() ? "1" : SiKeySuffix(a.margin_dim).substr(1);
    j["binding_reasons"] = a.reasons;
    json rj = json::array();
    for (const auto& r : a.rejected) {
      json x = {{"candidate", r.candidate}, {"check", r.check}, {"where", r.where}, {"point", r.point},
                {"unit", SiKeySuffix(r.dim).empty() ? "1" : SiKeySuffix(r.dim).substr(1)}, {"reason", r.reason}};
      x["margin"] = std::isnan(r.margin) ? json(nullptr) : json(r.margin);
      rj.push_back(x);
    }
    j["rejected"] = rj;
    if (!a.value_text.empty()) j["value_text"] = a.value_text;
    if (!a.ranking.empty()) j["ranking"] = a.ranking;
    j["warnings"] = a.warnings;
    arr.push_back(j);
  }
  return arr;
}

}  // namespace loopwright
