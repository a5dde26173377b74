#include "network/fixes.h"

#include <algorithm>
#include <cmath>
#include <set>

#include <fmt/format.h>

#include "network/run.h"

namespace loopwright {

namespace {

struct Knob {
  int loop, comp, param;
  std::string name;
  Dimension dim;
  double lo, hi;  // accepted range
};

std::vector<Knob> Knobs(const Case& cs) {
  static const std::vector<std::pair<std::string, std::vector<std::string>>> table = {
      {"valve", {"opening", "kvs"}},
      {"relief_valve", {"crack"}},
      {"orifice", {"diameter"}},
      {"rolling_bearing", {"diameter"}},
      {"displacement_pump", {"displacement", "speed"}},
      {"centrifugal_pump", {"speed"}},
      {"air_cooler", {"conductance"}},
      {"pipe", {"diameter"}},
      {"tube", {"diameter"}},
      {"hose", {"diameter"}},
      {"journal_bearing", {"radial_clearance"}},
  };
  std::vector<Knob> out;
  for (size_t l = 0; l < cs.loops.size(); ++l)
    for (size_t c = 0; c < cs.loops[l].components.size(); ++c) {
      const ComponentSpec& spec = cs.loops[l].components[c];
      for (const auto& [type, params] : table) {
        if (spec.type != type) continue;
        for (const auto& pn : params) {
          const int pi = spec.type_info->ParamIndex(pn);
          if (pi < 0 || std::isnan(spec.model->params()[pi])) continue;
          bool bound = false;
          for (const auto& b : spec.bindings) bound = bound || b.param == pi;
          if (bound) continue;
          const ParamSpec& ps = spec.type_info->params[pi];
          double lo = ps.min_si, hi = ps.max_si;
          if (ps.min_exclusive || !std::isfinite(lo)) lo = std::max(lo, 0.0) + 1e-12;
          out.push_back({static_cast<int>(l), static_cast<int>(c), pi,
                         cs.loops[l].id + "/" + spec.id + "." + pn, ps.dim, lo, hi});
        }
      }
    }
  return out;
}

double& KnobRef(const Case& cs, const Knob& k) { return cs.loops[k.loop].components[k.comp].model->params()[k.param]; }

// Margin of (check, where) at one point, NaN if not converged or absent.
double MarginAt(const Case& cs, CaseSolver* solver, const OperatingPoint& op, const std::string& check,
                const std::string& where) {
  PointResult r = solver->Solve(op, true);
  if (!r.converged) r = solver->Solve(op, false);
  if (!r.converged) return NAN;
  std::vector<CheckWarning> w;
  for (const auto& o : EvaluateChecks(cs, op, r, &w))
    if (o.name == check && o.where == where) return o.margin;
  return NAN;
}

}  // namespace

std::vector<FixSuggestion> SuggestFixes(const Case& cs, const std::vector<CheckSummary>& summary, int max_checks) {
  std::vector<FixSuggestion> out;
  const std::vector<Knob> knobs = Knobs(cs);
  std::set<std::pair<std::string, std::string>> failing_before;
  for (const auto& s : summary)
    if (!s.worst.pass) failing_before.insert({s.worst.name, s.worst.where});
  CaseSolver solver(cs);
  int done = 0;
  for (const auto& s : summary) {
    if (s.worst.pass || done >= max_checks) continue;
    ++done;
    FixSuggestion fx;
    fx.check = s.worst.name;
    fx.where = s.worst.where;
    fx.point = s.point;
    const int pi = FindPoint(cs, s.point);
    const OperatingPoint& op = cs.envelope.points[pi];
    const double target = 0.02 * std::max(std::abs(s.worst.limit), 1e-12) + (s.worst.limit == 0 ? 1e-12 : 0.0);
    // Rank knobs by |d margin / d ln knob|.
    double best = 0;
    const Knob* kb = nullptr;
    double best_slope = 0;
    for (const Knob& k : knobs) {
      double& v = KnobRef(cs, k);
      const double v0 = v, h = 1e-4;
      v = std::min(v0 * (1 + h), k.hi);
      const double mp = MarginAt(cs, &solver, op, fx.check, fx.where);
      v = std::max(v0 * (1 - h), k.lo);
      const double mm = MarginAt(cs, &solver, op, fx.check, fx.where);
      const double dv = std::min(v0 * (1 + h), k.hi) - std::max(v0 * (1 - h), k.lo);
      v = v0;
      if (!std::isfinite(mp) || !std::isfinite(mm) || dv <= 0) continue;
      const double slope = (mp - mm) / dv;  // d margin / d knob
      const double per_pct = slope * 0.01 * v0;
      if (std::abs(per_pct) > best) {
        best = std::abs(per_pct);
        kb = &k;
        best_slope = slope;
      }
    }
    if (!kb) {
      fx.note = "no design parameter moves this margin";
      out.push_back(fx);
      continue;
    }
    double& v = KnobRef(cs, *kb);
    const double v0 = v;
    fx.knob = kb->name;
    fx.dim = kb->dim;
    fx.current = v0;
    fx.sensitivity_per_percent = best_slope * 0.01 * v0;
    // Secant on margin(v) = target, from the linear estimate.
    double x0 = v0, f0 = s.worst.margin - target;
    double x1 = std::clamp(v0 - f0 / best_slope, kb->lo, kb->hi);
    // Keep steps within a factor of 4 of the current value.
    x1 = std::clamp(x1, v0 / 4, v0 * 4);
    double f1 = NAN;
    for (int it = 0; it < 12; ++it) {
      v = x1;
      f1 = MarginAt(cs, &solver, op, fx.check, fx.where) - target;
      if (!std::isfinite(f1)) break;
      if (std::abs(f1) <= 0.01 * target + 1e-12 || (f1 >= 0 && f1 <= target)) {
        fx.found = true;
        break;
      }
      if (f1 == f0) break;
      const double x2 = std::clamp(x1 - f1 * (x1 - x0) / (f1 - f0), std::max(kb->lo, v0 / 4), std::min(kb->hi, v0 * 4));
      x0 = x1;
      f0 = f1;
      x1 = x2;
    }
    if (!fx.found && std::isfinite(f1) && f1 >= 0) fx.found = true;
    fx.suggested = x1;
    if (fx.found) {
      // Confirm over the whole envelope.
      std::vector<std::vector<CheckOutcome>> per;
      std::vector<std::string> names;
      bool all_conv = true;
      for (const auto& p : cs.envelope.points) {
        PointResult r = solver.Solve(p, true);
        if (!r.converged) r = solver.Solve(p, false);
        if (!r.converged) {
          all_conv = false;
          continue;
        }
        std::vector<CheckWarning> w;
        per.push_back(EvaluateChecks(cs, p, r, &w));
        names.push_back(p.name);
      }
      fx.envelope_passes_check = all_conv;
      for (const auto& sm : SummariseChecks(per, names)) {
        if (sm.worst.name == fx.check && sm.worst.where == fx.where) fx.envelope_passes_check = fx.envelope_passes_check && sm.worst.pass;
        if (!sm.worst.pass && !failing_before.count({sm.worst.name, sm.worst.where}))
          fx.broken.push_back(fmt::format("{} at {} ({})", sm.worst.name, sm.worst.where, sm.point));
      }
      if (!all_conv) fx.note = "some points did not converge with the suggested value";
    } else {
      fx.note = fmt::format("no value of {} within a factor of 4 restores the margin", kb->name);
    }
    v = v0;
    out.push_back(fx);
  }
  return out;
}

}  // namespace loopwright
