#include "network/fixes.h"

#include <algorithm>
#include <cmath>
#include <set>

#include <fmt/format.h>
#include <fmt/ranges.h>

#include "network/run.h"
#include "network/sensitivity.h"

namespace loopwright {

namespace {

// Solves `op` (warm, then cold) and returns the margin of (check, where), NaN
// if the point does not converge or the check is absent there.
double MarginAt(const Case& cs, CaseSolver* solver, const OperatingPoint& op, const std::string& check,
                const std::string& where) {
  PointResult r = solver->Solve(op, true);
  if (!r.converged) r = solver->Solve(op, false);
  if (!r.converged) return NAN;
  return CheckMargin(cs, op, r, check, where);
}

// d margin / d knob at the point `solver` has just solved (exact tangent).
double Slope(const Case& cs, CaseSolver* solver, const OperatingPoint& op, const DesignKnob& k,
             const std::string& check, const std::string& where) {
  PointTangents pt(solver, op);
  if (!pt.ok()) return NAN;
  StateTangent t = pt.Tangent(k);
  if (!t.ok) return NAN;
  return pt.Derivative(k, t, [&](const PointResult& r) { return CheckMargin(cs, op, r, check, where); });
}

// The band under which a passing check is tight: a fraction of its limit's
// magnitude, or kTightTemperatureK for a temperature limit (measured on an
// arbitrary zero).
double TightBand(const CheckOutcome& o, double fraction) {
  return o.dim == Dimension::kTemperature ? kTightTemperatureK : fraction * std::abs(o.limit);
}

}  // namespace

std::vector<FixSuggestion> SuggestFixes(const Case& cs, const std::vector<CheckSummary>& summary, int max_checks,
                                        double tight_fraction) {
  std::vector<FixSuggestion> out;
  const std::vector<DesignKnob> knobs = DesignKnobs(cs);
  std::set<std::pair<std::string, std::string>> failing_before;
  for (const auto& s : summary)
    if (!s.worst.pass) failing_before.insert({s.worst.name, s.worst.where});
  CaseSolver solver(cs);
  // Failing checks first, then tight ones (passing with less than
  // tight_fraction of the limit to spare; open/closed checks have no margin
  // to speak of).
  std::vector<const CheckSummary*> order;
  for (const auto& s : summary)
    if (!s.worst.pass) order.push_back(&s);
  const size_t nfailing = order.size();
  for (const auto& s : summary) {
    if (!s.worst.pass || s.worst.limit == 0) continue;
    // A temperature limit is measured on an arbitrary zero: its band is a
    // fixed kTightTemperatureK instead of a fraction of the limit.
    if (s.worst.margin < TightBand(s.worst, tight_fraction)) order.push_back(&s);
  }
  int done = 0, done_tight = 0;
  for (size_t oi = 0; oi < order.size(); ++oi) {
    const CheckSummary& s = *order[oi];
    const bool tight = oi >= nfailing;
    if ((tight ? done_tight : done) >= max_checks) continue;
    ++(tight ? done_tight : done);
    FixSuggestion fx;
    fx.tight = tight;
    fx.margin = s.worst.margin;
    fx.check = s.worst.name;
    fx.where = s.worst.where;
    fx.point = s.point;
    fx.margin_dim = s.worst.dim == Dimension::kTemperature ? Dimension::kTemperatureDifference : s.worst.dim;
    const int pi = FindPoint(cs, s.point);
    const OperatingPoint& op = cs.envelope.points[pi];
    // Target margin: 2 % of the limit's magnitude for a failing check (so the
    // suggestion is not on the edge); the tight band (plus 1 % of it) for a
    // tight one, so it is tight no more.
    const double target = tight ? 1.01 * TightBand(s.worst, tight_fraction)
                                : 0.02 * std::max(std::abs(s.worst.limit), 1e-12) + (s.worst.limit == 0 ? 1e-12 : 0.0);
    fx.target = target;
    // Rank knobs by |d margin / d ln knob|: exact tangents at the governing
    // point, one factorisation for every knob.
    struct Ranked {
      const DesignKnob* knob;
      double slope, per_pct;
    };
    std::vector<Ranked> ranked;
    const double m0 = MarginAt(cs, &solver, op, fx.check, fx.where);
    if (std::isfinite(m0)) {
      PointTangents pt(&solver, op);
      for (const DesignKnob& k : knobs) {
        StateTangent t = pt.Tangent(k);
        if (!t.ok) continue;
        const double slope =
            pt.Derivative(k, t, [&](const PointResult& r) { return CheckMargin(cs, op, r, fx.check, fx.where); });
        const double per_pct = slope * 0.01 * *KnobValue(&solver, k);
        if (std::isfinite(per_pct) && per_pct != 0) ranked.push_back({&k, slope, per_pct});
      }
    }
    std::sort(ranked.begin(), ranked.end(),
              [](const Ranked& x, const Ranked& y) { return std::abs(x.per_pct) > std::abs(y.per_pct); });
    if (ranked.empty()) {
      fx.note = std::isfinite(m0) ? "no design parameter moves this margin" : "the governing point did not re-solve";
      out.push_back(fx);
      continue;
    }
    // Newton on margin(v) = target with the exact slope at each iterate,
    // steps kept within a factor of 4 of the current value; the three most
    // effective knobs are tried in turn (a margin may peak inside the range
    // of the most effective one, e.g. a bearing clearance).
    const DesignKnob* kb = nullptr;
    double v0 = 0;
    std::vector<std::string> tried;
    for (size_t ri = 0; ri < ranked.size() && ri < 3 && !fx.found; ++ri) {
      kb = ranked[ri].knob;
      double& v = *KnobValue(&solver, *kb);
      v0 = v;
      fx.knob = kb->name;
      fx.dim = kb->dim;
      fx.current = v0;
      fx.sensitivity_per_percent = ranked[ri].per_pct;
      const double vlo = std::max(kb->lo, v0 / 4), vhi = std::min(kb->hi, v0 * 4);
      double x1 = v0, f1 = m0 - target, slope = ranked[ri].slope;
      fx.newton_steps = 0;
      for (int it = 0; it < 20; ++it) {
        if (!std::isfinite(slope) || slope == 0) break;
        const double x2 = std::clamp(x1 - f1 / slope, vlo, vhi);
        if (x2 == x1) break;
        x1 = x2;
        v = x1;
        f1 = MarginAt(cs, &solver, op, fx.check, fx.where) - target;
        ++fx.newton_steps;
        if (!std::isfinite(f1)) break;
        // At the target (which keeps 2 % spare) to a millionth of it, or
        // above it by at most 1 %.
        if (f1 >= -1e-6 * std::abs(target) && f1 <= 0.01 * std::abs(target) + 1e-12) {
          fx.found = true;
          break;
        }
        slope = Slope(cs, &solver, op, *kb, fx.check, fx.where);
      }
      if (!fx.found && std::isfinite(f1) && f1 >= 0) fx.found = true;
      fx.suggested = x1;
      if (!fx.found) {
        tried.push_back(kb->name);
        v = v0;
      }
    }
    if (!fx.found) {
      // Report the most effective knob; none restores the margin.
      kb = ranked[0].knob;
      fx.knob = kb->name;
      fx.dim = kb->dim;
      fx.current = v0 = *KnobValue(&solver, *kb);
      fx.sensitivity_per_percent = ranked[0].per_pct;
      fx.suggested = NAN;
    }
    double& v = *KnobValue(&solver, *kb);
    if (fx.found) {
      v = fx.suggested;
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
      fx.note = fmt::format("no value of {} within a factor of 4 of the present one restores the margin",
                            fmt::join(tried, ", nor of "));
    }
    v = v0;
    out.push_back(fx);
  }
  return out;
}

}  // namespace loopwright
