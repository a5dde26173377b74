#include "network/design/sizing.h"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <fstream>
#include <optional>
#include <sstream>

#include <fmt/format.h>

#include "library/parts.h"
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

// A knob held at a value while the envelope is evaluated (a coupling's
// conductance lives in each solver, so it is set on every new one).
struct Setting {
  const DesignKnob* knob = nullptr;
  double value = 0;
};

void CollectWarnings(const Case& cs, const PointResult& p, WarningTally* out) {
  for (const auto& x : p.warnings) out->Add(x, p.name);
  for (const auto& br : p.branches)
    for (const auto& x : br.report.warnings)
      out->Add(fmt::format("{}/{}: {}", cs.loops[br.loop].id, cs.loops[br.loop].components[br.comp].id, x), p.name);
}

EnvEval Evaluate(const Case& cs, Setting set = {}) {
  EnvEval e;
  CaseSolver solver(cs);
  if (set.knob) *KnobValue(&solver, *set.knob) = set.value;
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

struct Target {
  int loop = -1, comp = -1;
};

Target Resolve(const Case& cs, const std::string& ref) {
  Target t;
  const size_t slash = ref.find('/');
  for (size_t l = 0; l < cs.loops.size(); ++l)
    if (cs.loops[l].id == ref.substr(0, slash)) {
      t.loop = static_cast<int>(l);
      t.comp = cs.loops[l].ComponentIndex(ref.substr(slash + 1));
    }
  return t;
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
  a->binding_check = b->worst.name;
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

double ReadSi(const json& q, const json& key_default, Dimension dim, double fallback) {
  (void)key_default;
  if (q.is_number()) return q.get<double>();
  if (q.is_string()) {
    ParsedQuantity p = ParseQuantity(q.get<std::string>(), dim);
    if (p.ok) return p.si;
  }
  return fallback;
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
    *KnobValue(solver_, k_) = x[0][0];
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
  double* kv = KnobValue(&solver, k);
  if (!kv) return out;
  *kv = knob_value;
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
  *kv = x;
  PointResult res = solver.Solve(op, true);
  if (!res.converged) res = solver.Solve(op, false);
  if (res.converged) out.g = g(res);
  out.ok = res.converged && std::isfinite(out.g) && std::abs(out.g) <= 1e-8 * scale;
  *kv = knob_value;
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
    r.check = w->worst.name;
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
    const EnvEval ef = Evaluate(cs, {&k, fail});
    const CheckSummary* w = WorstFailing(ef);
    if (w) {
      why = fmt::format(" of {} at {} ({})", w->worst.name, w->worst.where, w->point);
      edge = {w->worst.name, w->worst.where, w->point, fail < pass ? "smaller" : "larger",
              k.name.substr(k.name.rfind('.') + 1)};
    }
    if (!w || w->worst.limit == 0) break;
    const int pi = FindPoint(cs, w->point);
    if (pi < 0) break;
    const std::string check = w->worst.name, where = w->worst.where;
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
    if (Evaluate(cs, {&k, cand}).pass) {
      const std::string m = fmt::format("Ceres root of {} at {} ({})", check, where, w->point);
      a->method = a->method.empty() ? m : a->method + "; " + m;
      return cand;
    }
    fail = cand;
  }
  a->method = (a->method.empty() ? "" : a->method + "; ") + "bisection" + why;
  for (int it = 0; it < 30 && std::abs(pass - fail) > 1e-4 * std::max(std::abs(pass), 1e-9); ++it) {
    const double mid = geometric && fail > 0 && pass > 0 ? std::sqrt(fail * pass) : 0.5 * (fail + pass);
    (Evaluate(cs, {&k, mid}).pass ? pass : fail) = mid;
  }
  return pass;
}

// Smallest knob value in [lo, hi] that passes the envelope: a log-spaced
// scan finds the first passing value (so a window closed at both ends, e.g. a
// pump too small for the feed and too large for its suction line, is found),
// then RefineEdge settles the edge below it.
void SmallestPassing(const Case& cs, const DesignKnob& k, double lo, double hi, SizingAnswer* a) {
  CaseSolver probe(cs);
  const double keep = *KnobValue(&probe, k);
  const int n = 17;
  std::vector<double> x(n);
  int first = -1;
  for (int i = 0; i < n; ++i) {
    x[i] = lo > 0 ? lo * std::pow(hi / lo, double(i) / (n - 1)) : lo + (hi - lo) * i / (n - 1);
    if (Evaluate(cs, {&k, x[i]}).pass) {
      first = i;
      break;
    }
  }
  if (first < 0) {
    a->feasible = false;
    EnvEval e = Evaluate(cs, {&k, keep});
    Fill(a, e);
    a->range_lo = lo;
    a->range_hi = hi;
    a->note = fmt::format("no value in the searched range passes every check; with the present value the binding check is {} at {} ({})",
                          e.binding.worst.name, e.binding.worst.where, e.binding.point);
    return;
  }
  double pass = x[first];
  if (first > 0) {
    pass = RefineEdge(cs, k, keep, x[first - 1], pass, true, a);
  } else {
    a->note = "the lower bound already passes";
  }
  EnvEval e = Evaluate(cs, {&k, pass});
  a->feasible = e.pass;
  a->value = pass;
  Fill(a, e);
  *KnobValue(&probe, k) = keep;
}

// Loads a copy of the case with component (l, c) switched to part `id`.
std::unique_ptr<Case> WithPart(const Case& cs, const std::string& text, int l, int c, const std::string& id,
                               std::string* error) {
  json doc;
  Diagnostics d;
  if (!ParseJsonText(text, &doc, &d)) return nullptr;
  PartsCatalog cat = LoadPartsCatalog(DefaultLibraryDir());
  const PartEntry* p = cat.Find(id);
  if (!p) {
    *error = fmt::format("no library part \"{}\"", id);
    return nullptr;
  }
  json& comp = doc["loops"][l]["components"][c];
  comp["part"] = id;
  if (comp.contains("type") && comp["type"] != p->type) comp["type"] = p->type;
  for (auto it = p->params.begin(); it != p->params.end(); ++it) comp.erase(it.key());
  LoadResult lr = LoadCaseText(doc.dump(), cs.path, DefaultLibraryDir());
  if (!lr.value) {
    *error = lr.diagnostics.items().empty() ? "invalid" : lr.diagnostics.items()[0].message;
    return nullptr;
  }
  return std::move(lr.value);
}

// The knob `param` of the question's component; for a cooler's conductance
// on a component that is one side of a liquid coupling, the coupling's.
std::optional<DesignKnob> FindKnob(const Case& cs, const Target& t, const std::string& param) {
  const ComponentSpec& spec = cs.loops[t.loop].components[t.comp];
  const std::string ref = cs.loops[t.loop].id + "/" + spec.id;
  for (const DesignKnob& k : DesignKnobs(cs)) {
    if (k.loop == t.loop && k.comp == t.comp && spec.type_info->params[k.param].name == param) return k;
    if (k.coupling >= 0 && param == "conductance") {
      const Coupling& cp = cs.couplings[k.coupling];
      if (cp.hot_ref == ref || cp.cold_ref == ref) return k;
    }
  }
  return std::nullopt;
}

}  // namespace

std::vector<SizingAnswer> AnswerDesignQuestions(const Case& cs) {
  std::vector<SizingAnswer> out;
  std::string text;
  {
    std::ifstream in(cs.path, std::ios::binary);
    std::stringstream ss;
    ss << in.rdbuf();
    text = ss.str();
  }
  for (const auto& q : cs.design) {
    const auto t0 = std::chrono::steady_clock::now();
    SizingAnswer a;
    a.question = q.value("id", "");
    a.kind = q.value("kind", "");
    const Target t = Resolve(cs, q.value("component", ""));
    if (t.loop < 0 || t.comp < 0) continue;
    const ComponentSpec& spec = cs.loops[t.loop].components[t.comp];
    a.loop_prefix = cs.loops[t.loop].id + "/";
    auto param = [&](const char* name) -> double* {
      const int i = spec.type_info->ParamIndex(name);
      return i >= 0 ? &spec.model->params()[i] : nullptr;
    };
    auto bounds = [&](Dimension dim, double lo, double hi) {
      return std::make_pair(q.contains("min") ? ReadSi(q["min"], nullptr, dim, lo) : lo,
                            q.contains("max") ? ReadSi(q["max"], nullptr, dim, hi) : hi);
    };
    if (a.kind == "cooler_conductance" || a.kind == "pump_displacement" || a.kind == "pump_speed" ||
        a.kind == "relief_setting") {
      const char* pn = a.kind == "cooler_conductance" ? "conductance"
                       : a.kind == "pump_displacement" ? "displacement"
                       : a.kind == "pump_speed"        ? "speed"
                                                       : "crack";
      const std::optional<DesignKnob> k = FindKnob(cs, t, pn);
      CaseSolver probe(cs);
      const double now = k ? *KnobValue(&probe, *k) : NAN;
      if (!k || std::isnan(now)) {
        a.note = fmt::format("{} has no {} to size{}", q.value("component", ""), pn,
                             a.kind == "cooler_conductance" ? " (an air_cooler, or one side of a coupling)" : "");
      } else {
        a.dim = k->dim;
        auto [lo, hi] = bounds(a.dim, now / 20, now * 20);
        SmallestPassing(cs, *k, std::max(lo, k->lo), std::min(hi, k->hi), &a);
        *KnobValue(&probe, *k) = now;
      }
    } else if (a.kind == "bypass_opening") {
      double* k = param("opening");
      const std::optional<DesignKnob> kn = FindKnob(cs, t, "opening");
      if (!k || !kn) {
        a.note = k ? "the valve opening is bound to an envelope variable, so it is no design choice"
                   : "the component is not a valve";
      } else {
        a.dim = Dimension::kDimensionless;
        auto [lo, hi] = bounds(a.dim, 0.0, 1.0);
        const double keep = *k;
        // Scan the window of passing openings, then refine both edges.
        const int n = 21;
        std::vector<bool> ok(n);
        std::vector<double> x(n);
        for (int i = 0; i < n; ++i) {
          x[i] = lo + (hi - lo) * i / (n - 1);
          *k = x[i];
          ok[i] = Evaluate(cs).pass;
        }
        int first = -1, last = -1;
        for (int i = 0; i < n; ++i)
          if (ok[i]) {
            if (first < 0) first = i;
            last = i;
          }
        if (first < 0) {
          *k = keep;
          EnvEval e = Evaluate(cs);
          Fill(&a, e);
          a.note = fmt::format("no opening in [{:.3g}, {:.3g}] passes every check; binding: {} at {}", lo, hi,
                               e.binding.worst.name, e.binding.worst.where);
        } else {
          const double a_lo = first > 0 ? RefineEdge(cs, *kn, keep, x[first - 1], x[first], false, &a) : x[first];
          const double a_hi = last < n - 1 ? RefineEdge(cs, *kn, keep, x[last + 1], x[last], false, &a) : x[last];
          *k = keep;
          a.feasible = true;
          a.value = 0.5 * (a_lo + a_hi);
          a.value_text = fmt::format("{:.6f} .. {:.6f}", a_lo, a_hi);
          *k = a.value;
          Fill(&a, Evaluate(cs));
          a.note = "window of openings passing every check at every point; the value is its middle";
        }
        *k = keep;
      }
    } else if (a.kind == "restrictor_diameter") {
      double* k = param("diameter");
      const std::string point = q.value("point", cs.envelope.points[0].name);
      const double target = q.contains("target") ? ReadSi(q["target"], nullptr, Dimension::kVolumeFlow, NAN) : NAN;
      if (!k || std::isnan(target)) {
        a.note = "needs an orifice or jet-fed component and a target flow";
      } else {
        a.dim = Dimension::kLength;
        const double keep = *k;
        const std::optional<DesignKnob> kn = FindKnob(cs, t, "diameter");
        const int pi = FindPoint(cs, point);
        const int tl = t.loop, tc = t.comp;
        auto flow = [&](const PointResult& r) {
          for (const auto& b : r.branches)
            if (b.loop == tl && b.comp == tc) return b.flow_m3s - target;
          return static_cast<double>(NAN);
        };
        RootResult rr;
        if (kn && pi >= 0)
          rr = CeresRoot(cs, *kn, keep, cs.envelope.points[pi], flow, std::abs(target), std::max(keep / 20, kn->lo),
                         std::min(keep * 20, kn->hi), keep);
        a.method = "Ceres root of the flow at " + point;
        a.root_iterations = rr.iterations;
        *k = std::isfinite(rr.x) ? rr.x : keep;
        EnvEval e = Evaluate(cs);
        a.value = *k;
        a.feasible = rr.ok && e.pass;
        Fill(&a, e);
        if (!rr.ok) a.note = "no diameter within a factor of 20 gives the target flow";
        else if (!e.pass) a.note = fmt::format("gives the target flow, but the envelope fails: {} at {}", e.binding.worst.name, e.binding.worst.where);
        *k = keep;
      }
    } else if (a.kind == "pump_choice" || a.kind == "line_size" || a.kind == "cooler_size") {
      std::vector<std::string> cands;
      if (q.contains("candidates") && q["candidates"].is_array())
        for (const auto& c : q["candidates"])
          if (c.is_string()) cands.push_back(c.get<std::string>());
      struct Row { std::string id; double key; EnvEval e; };
      std::vector<Row> passing;
      std::string firstfail;
      PartsCatalog cat = LoadPartsCatalog(DefaultLibraryDir());
      for (const auto& id : cands) {
        std::string err;
        auto c2 = WithPart(cs, text, t.loop, t.comp, id, &err);
        if (!c2) {
          a.note += fmt::format("{}: {}; ", id, err);
          a.rejected.push_back({id, "", "", "", err});
          continue;
        }
        EnvEval e = Evaluate(*c2);
        if (!e.pass) {
          if (firstfail.empty()) firstfail = fmt::format("{} fails {} at {} ({})", id, e.binding.worst.name, e.binding.worst.where, e.binding.point);
          a.rejected.push_back(Rejected(id, e));
          continue;
        }
        double key = 0;
        const ComponentSpec& s2 = c2->loops[t.loop].components[t.comp];
        if (a.kind == "pump_choice") {
          for (const auto& p : e.points)
            for (const auto& b : p.branches)
              if (b.loop == t.loop && b.comp == t.comp) key = std::max(key, b.report.shaft_power_W);
        } else {
          const int di = s2.type_info->ParamIndex(a.kind == "line_size" ? "diameter" : "rated_flow");
          key = di >= 0 ? s2.model->params()[di] : 0;
          if (a.kind == "cooler_size") {
            const int ci = s2.type_info->ParamIndex("rated_heat");
            if (ci >= 0 && !std::isnan(s2.model->params()[ci])) key = s2.model->params()[ci];
          }
        }
        passing.push_back({id, key, std::move(e)});
      }
      std::sort(passing.begin(), passing.end(), [](const Row& x, const Row& y) { return x.key < y.key; });
      if (passing.empty()) {
        a.note += firstfail.empty() ? "no candidate passes" : "no candidate passes; e.g. " + firstfail;
      } else {
        a.feasible = true;
        a.value_text = passing[0].id;
        a.value = passing[0].key;
        a.dim = a.kind == "pump_choice" ? Dimension::kPower : a.kind == "line_size" ? Dimension::kLength : Dimension::kPower;
        Fill(&a, passing[0].e);
        for (const auto& r : passing)
          a.ranking.push_back(a.kind == "pump_choice" ? fmt::format("{}: shaft power {:.0f} W (largest over the envelope)", r.id, r.key)
                                                      : r.id);
      }
    } else {
      a.note = "not a kind this version answers";
    }
    Explain(q.value("component", ""), &a);
    a.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
    out.push_back(std::move(a));
  }
  return out;
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
