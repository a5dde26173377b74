#include "network/envelope/fixes.h"

#include <algorithm>
#include <cmath>
#include <set>

#include <fmt/format.h>
#include <fmt/ranges.h>

#include "network/point/run.h"
#include "network/envelope/sensitivity.h"
#include "library/units.h"

namespace loopwright {

namespace {

bool IsShut(const CheckOutcome& o) { return o.id != CheckId::kCount && Check(o.id).IsShut(); }

}  // namespace

double TightBand(const Case& cs, const CheckOutcome& o, double fraction) {
  if (IsShut(o)) return std::max(ShutTargetMargin(cs, o), fraction * std::abs(o.limit));
  return o.dim == Dimension::kTemperature ? kTightTemperatureK : fraction * std::abs(o.limit);
}

namespace {

// The margin a suggestion aims for, from the check's outcome at the present
// iterate (an open/closed check's target moves with its crack, which may be
// the knob itself): for a failing check 2 % of the limit's magnitude (so the
// suggestion is not on the edge), or the closing margin for an open/closed
// check; for a tight one the band plus 1 % of it, so it is tight no more.
double TargetMargin(const Case& cs, const CheckOutcome& o, bool tight, double fraction) {
  if (tight) return 1.01 * TightBand(cs, o, fraction);
  if (IsShut(o)) return ShutTargetMargin(cs, o);
  return 0.02 * std::max(std::abs(o.limit), 1e-12) + (o.limit == 0 ? 1e-12 : 0.0);
}

// The check a suggestion is for, and what it aims at.
struct Aim {
  const Case& cs;
  const OperatingPoint& op;
  CheckId check;
  std::string where;
  bool tight = false;
  double fraction = 0.05;

  const CheckOutcome* Find(const std::vector<CheckOutcome>& all) const {
    for (const auto& o : all)
      if (o.id == check && o.where == where) return &o;
    return nullptr;
  }
  // The branch the check was found at (-1: not yet, or not a branch's):
  // once known, Excess evaluates that branch's checks alone.
  mutable int branch = -1;

  // margin - target at a solved point (NaN when the check is absent there).
  double Excess(const PointResult& r, double* target = nullptr) const {
    std::vector<CheckWarning> w;
    std::vector<CheckOutcome> all;
    const CheckOutcome* o = nullptr;
    if (branch >= 0 && static_cast<size_t>(branch) < r.branches.size()) {
      all = EvaluateBranchChecks(cs, op, r, static_cast<size_t>(branch), &w);
      o = Find(all);
    }
    if (!o) {  // a node's, a coupling's, or the first look
      all = EvaluateChecks(cs, op, r, &w);
      o = Find(all);
      if (o && o->loop >= 0 && o->comp >= 0) branch = BranchOffsets(cs)[o->loop] + o->comp;
    }
    if (!o) return NAN;
    const double t = TargetMargin(cs, *o, tight, fraction);
    if (target) *target = t;
    return o->margin - t;
  }
  double Target(const PointResult& r) const {
    double t = NAN;
    Excess(r, &t);
    return t;
  }
  // Solves the point (warm, then cold) and returns Excess there.
  double ExcessAt(CaseSolver* solver, double* target = nullptr) const {
    PointResult r = solver->Solve(op, true);
    if (!r.converged) r = solver->Solve(op, false);
    return r.converged ? Excess(r, target) : NAN;
  }
  // d Excess / d knob at the point `solver` has just solved (exact tangent).
  double Slope(CaseSolver* solver, const DesignKnob& k) const {
    PointTangents pt(solver, op);
    if (!pt.ok()) return NAN;
    StateTangent t = pt.Tangent(k);
    if (!t.ok) return NAN;
    return pt.Derivative(k, t, [&](const PointResult& r) { return Excess(r); });
  }
};

struct Ranked {
  const DesignKnob* knob;
  double slope;    // d (margin - target) / d knob, for Newton
  double per_pct;  // margin change per +1 % of the knob, for ranking and the report
};

// Knobs ranked by |d margin / d ln knob|: exact tangents at the governing
// point (which `solver` has just solved), one factorisation for every knob.
std::vector<Ranked> RankKnobs(CaseSolver* solver, const Aim& aim, const std::vector<DesignKnob>& knobs) {
  std::vector<Ranked> ranked;
  PointTangents pt(solver, aim.op);
  for (const DesignKnob& k : knobs) {
    StateTangent t = pt.Tangent(k);
    if (!t.ok) continue;
    // d (margin - target) and d margin from the same two described points.
    double d[2];
    pt.Derivatives(k, t, 2, [&](const PointResult& r, double* v) {
      double target = NAN;
      v[0] = aim.Excess(r, &target);
      v[1] = v[0] + target;
    }, d);
    const double slope = d[0], dmargin = d[1];
    const double per_pct = dmargin * 0.01 * KnobValue(solver, k);
    if (std::isfinite(per_pct) && per_pct != 0) ranked.push_back({&k, slope, per_pct});
  }
  std::sort(ranked.begin(), ranked.end(),
            [](const Ranked& x, const Ranked& y) { return std::abs(x.per_pct) > std::abs(y.per_pct); });
  return ranked;
}

// Newton on Excess(v) = 0 with the exact slope at each iterate, steps kept
// within a factor of 4 of the present value. On success fx->suggested and
// fx->target hold the value and the margin it gives; the knob is restored.
bool NewtonOnKnob(CaseSolver* solver, const Aim& aim, const Ranked& rk, double f0, FixSuggestion* fx) {
  const DesignKnob& kb = *rk.knob;
  const double v0 = KnobValue(solver, kb), vlo = std::max(kb.lo, v0 / 4), vhi = std::min(kb.hi, v0 * 4);
  double x1 = v0, f1 = f0, slope = rk.slope, target = fx->target;
  bool found = false;
  fx->newton_steps = 0;
  for (int it = 0; it < 20; ++it) {
    if (!std::isfinite(slope) || slope == 0) break;
    const double x2 = std::clamp(x1 - f1 / slope, vlo, vhi);
    if (x2 == x1) break;
    x1 = x2;
    SetKnobValue(solver, kb, x1);
    f1 = aim.ExcessAt(solver, &target);
    ++fx->newton_steps;
    if (!std::isfinite(f1)) break;
    // At the target to a millionth of it, or above it by at most 1 %.
    if (f1 >= -1e-6 * std::abs(target) && f1 <= 0.01 * std::abs(target) + 1e-12) {
      found = true;
      break;
    }
    slope = aim.Slope(solver, kb);
  }
  found = found || (std::isfinite(f1) && f1 >= 0);
  if (found) {
    fx->suggested = x1;
    fx->target = target;
  }
  SetKnobValue(solver, kb, v0);
  return found;
}

// When Newton cannot get there because the margin is not monotone in the
// knob (a lifting relief's margin falls as its crack rises, its full-open
// pressure moving with it, and rises one for one once it shuts): scan
// geometric steps out to a factor of 4 (first the way the slope points,
// then the other) for a value meeting the target, then bisect between it
// and the last value that did not. The knob is restored.
bool BracketOnKnob(CaseSolver* solver, const Aim& aim, const Ranked& rk, FixSuggestion* fx) {
  const DesignKnob& kb = *rk.knob;
  const double v0 = KnobValue(solver, kb), vlo = std::max(kb.lo, v0 / 4), vhi = std::min(kb.hi, v0 * 4);
  double target = fx->target;
  auto excess = [&](double x) {
    SetKnobValue(solver, kb, x);
    return aim.ExcessAt(solver, &target);
  };
  const double first = rk.slope > 0 ? 1.0 : -1.0;
  bool found = false;
  for (double dir : {first, -first}) {
    double fail = v0, pass = NAN;
    for (int k = 1; k <= 8 && std::isnan(pass); ++k) {
      const double x = std::clamp(v0 * std::pow(4.0, dir * k / 8.0), vlo, vhi);
      const double f = excess(x);
      if (std::isfinite(f) && f >= 0) pass = x;
      else fail = x;
    }
    if (std::isnan(pass)) continue;
    // Bisection (geometric: knobs are positive) to the target band.
    for (int it = 0; it < 40; ++it) {
      const double mid = std::sqrt(fail * pass), f = excess(mid);
      if (!(std::isfinite(f) && f >= 0)) {
        fail = mid;
        continue;
      }
      pass = mid;
      if (f <= 0.01 * std::abs(target) + 1e-12) break;
    }
    excess(pass);  // the target at the value suggested
    fx->suggested = pass;
    fx->target = target;
    fx->note = "found by a scan and bisection: Newton's steps did not settle (the margin is not monotone in this knob, or bends sharply)";
    found = true;
    break;
  }
  SetKnobValue(solver, kb, v0);
  return found;
}

// What the whole envelope says with a knob value in place.
struct Confirmation {
  bool passes = false;                // the check passes at every point (all converged)
  std::vector<std::string> broken;    // other checks that fail (and did not before)
  double worst_margin = kNoValue;     // the check's smallest margin over the points
  bool all_converged = true;
};

// Re-solves the whole envelope with the solver's present design overrides:
// does the check pass everywhere, and which checks that passed before now fail.
Confirmation ConfirmOverEnvelope(const Case& cs, CaseSolver* solver,
                                 const std::set<std::pair<std::string, std::string>>& failing_before,
                                 const FixSuggestion& fx) {
  Confirmation out;
  std::vector<std::vector<CheckOutcome>> per;
  std::vector<std::string> names;
  for (const auto& p : cs.envelope.points) {
    PointResult r = solver->Solve(p, true);
    if (!r.converged) r = solver->Solve(p, false);
    if (!r.converged) {
      out.all_converged = false;
      continue;
    }
    std::vector<CheckWarning> w;
    per.push_back(EvaluateChecks(cs, p, r, &w));
    names.push_back(p.name);
  }
  out.passes = out.all_converged;
  for (const auto& sm : SummariseChecks(per, names)) {
    if (sm.worst.id == fx.id && sm.worst.where == fx.where) {
      out.passes = out.passes && sm.worst.pass;
      out.worst_margin = sm.worst.margin;
    }
    if (!sm.worst.pass && !failing_before.count({std::string(sm.worst.name()), sm.worst.where}))
      out.broken.push_back(fmt::format("{} at {} ({})", sm.worst.name(), sm.worst.where, sm.point));
  }
  return out;
}

// The catalog size of a line's family next to `suggested` in the direction
// it moves from `current` (network/envelope/fixes.h CatalogSnap); null when none.
const CatalogLine* NextCatalogSize(const Case& cs, const std::string& family, double current, double suggested) {
  const CatalogLine* best = nullptr;
  const double tol = 1e-9 * suggested;  // a catalog bore equal to the suggestion meets it
  for (const CatalogLine& c : cs.knobs.lines) {
    if (c.type != family) continue;
    if (suggested >= current ? c.bore >= suggested - tol && (!best || c.bore < best->bore)
                             : c.bore <= suggested + tol && (!best || c.bore > best->bore))
      best = &c;
  }
  return best;
}

// Snaps a suggested line diameter to the catalog and confirms it over the
// envelope (the knob is restored). Lines only: other knobs are continuous.
void SnapToCatalog(const Case& cs, CaseSolver* solver, const DesignKnob& k,
                   const std::set<std::pair<std::string, std::string>>& failing_before, FixSuggestion* fx) {
  if (k.comp < 0) return;
  const ComponentSpec& comp = cs.loops[k.loop].components[k.comp];
  const std::string& family = comp.type_info->name;
  if (comp.type_info->params[k.param].name != "diameter" || (family != "pipe" && family != "tube" && family != "hose"))
    return;
  fx->snapped = true;
  CatalogSnap& sn = fx->snap;
  const CatalogLine* c = NextCatalogSize(cs, family, fx->current, fx->suggested);
  if (!c) {
    sn.note = fmt::format("no {} size in the parts library meets {} m", family, FormatNumber(fx->suggested));
    return;
  }
  sn.part = c->id;
  sn.bore = c->bore;
  const double v0 = KnobValue(solver, k);
  SetKnobValue(solver, k, c->bore);
  const Confirmation cf = ConfirmOverEnvelope(cs, solver, failing_before, *fx);
  SetKnobValue(solver, k, v0);
  sn.envelope_passes_check = cf.passes;
  sn.broken = cf.broken;
  sn.worst_margin = cf.worst_margin;
  if (!cf.all_converged) sn.note = "some points did not converge with the catalog size";
}

void FillKnob(CaseSolver* solver, const Ranked& rk, FixSuggestion* fx) {
  fx->knob = rk.knob->name;
  fx->dim = rk.knob->dim;
  fx->current = KnobValue(solver, *rk.knob);
  fx->sensitivity_per_percent = rk.per_pct;
}

// Held knobs ranked above `used` (every held one when null): named in
// `skipped` and the note.
void NoteSkipped(const std::vector<Ranked>& ranked, const Ranked* used, FixSuggestion* fx) {
  for (const Ranked& r : ranked) {
    if (used && r.knob == used->knob) break;
    if (!r.knob->held.empty()) fx->skipped.push_back({r.knob->name, r.knob->held, r.per_pct});
  }
  if (fx->skipped.empty()) return;
  std::string s;
  if (fx->skipped.size() == 1) {
    const bool first = ranked[0].knob->name == fx->skipped[0].knob;
    s = fmt::format("{}, {}, is {}: skipped", first ? "the most effective knob" : "a more effective knob",
                    fx->skipped[0].knob, fx->skipped[0].held);
  } else {
    std::vector<std::string> items;
    for (const auto& k : fx->skipped) items.push_back(fmt::format("{} ({})", k.knob, k.held));
    s = fmt::format("more effective knobs held and skipped: {}", fmt::join(items, ", "));
  }
  fx->note = fx->note.empty() ? s : fx->note + "; " + s;
}

// The suggestion of `fx` breaks a check or leaves its own failing somewhere:
// try the free knobs ranked after `used_index` (up to the third) for a value
// that restores the margin, passes the check everywhere and breaks nothing.
void FindCleanAlternative(const Case& cs, CaseSolver* solver, const Aim& aim, const std::vector<Ranked>& ranked,
                          size_t used_index, double f0,
                          const std::set<std::pair<std::string, std::string>>& failing_before, FixSuggestion* fx) {
  for (size_t ri = used_index + 1; ri < ranked.size() && ri < 3; ++ri) {
    FixSuggestion trial;
    trial.id = fx->id;
    trial.where = fx->where;
    trial.target = fx->target;
    const Ranked& rk = ranked[ri];
    const bool found = NewtonOnKnob(solver, aim, rk, f0, &trial) || BracketOnKnob(solver, aim, rk, &trial);
    bool clean = false;
    if (found) {
      const double v0 = KnobValue(solver, *rk.knob);
      SetKnobValue(solver, *rk.knob, trial.suggested);
      const Confirmation cf = ConfirmOverEnvelope(cs, solver, failing_before, trial);
      SetKnobValue(solver, *rk.knob, v0);
      clean = cf.passes && cf.broken.empty();
    }
    if (!clean) {
      fx->alternatives_tried.push_back(rk.knob->name);
      continue;
    }
    fx->has_alternative = true;
    fx->alternative = {rk.knob->name, rk.knob->dim, KnobValue(solver, *rk.knob), trial.suggested, rk.per_pct,
                       trial.newton_steps};
    return;
  }
}

// One suggestion: rank the knobs at the governing point, try the three most
// effective free ones in turn (a margin may peak inside the range of the
// most effective one, e.g. a bearing clearance), confirm over the envelope,
// snap a line diameter to the catalog.
FixSuggestion SuggestOne(const Case& cs, CaseSolver* solver, const std::vector<DesignKnob>& knobs,
                         const std::set<std::pair<std::string, std::string>>& failing_before, const CheckSummary& s,
                         bool tight, double tight_fraction) {
  FixSuggestion fx;
  fx.tight = tight;
  fx.margin = s.worst.margin;
  fx.check = s.worst.name();
  fx.where = s.worst.where;
  fx.point = s.point;
  fx.margin_dim = s.worst.dim == Dimension::kTemperature ? Dimension::kTemperatureDifference : s.worst.dim;
  fx.id = s.worst.id;
  const Aim aim{cs, cs.envelope.points[FindPoint(cs, s.point)], fx.id, fx.where, tight, tight_fraction};
  fx.target = TargetMargin(cs, s.worst, tight, tight_fraction);
  const double f0 = aim.ExcessAt(solver, &fx.target);
  std::vector<Ranked> all, ranked;
  if (std::isfinite(f0)) all = RankKnobs(solver, aim, knobs);
  for (const Ranked& r : all)
    if (r.knob->held.empty()) ranked.push_back(r);
  if (ranked.empty()) {
    fx.note = !std::isfinite(f0) ? "the governing point did not re-solve"
              : all.empty()      ? "no design parameter moves this margin"
                                 : "every knob that moves this margin is held";
    NoteSkipped(all, nullptr, &fx);
    return fx;
  }
  std::vector<std::string> tried;
  const Ranked* used = nullptr;
  size_t used_index = 0;
  for (size_t ri = 0; ri < ranked.size() && ri < 3 && !used; ++ri) {
    FillKnob(solver, ranked[ri], &fx);
    if (NewtonOnKnob(solver, aim, ranked[ri], f0, &fx) || BracketOnKnob(solver, aim, ranked[ri], &fx))
      used = &ranked[ri], used_index = ri;
    else tried.push_back(ranked[ri].knob->name);
  }
  if (!used) {
    // Report the most effective free knob; none restores the margin.
    FillKnob(solver, ranked[0], &fx);
    fx.suggested = NAN;
    fx.note = fmt::format("no value of {} within a factor of 4 of the present one restores the margin",
                          fmt::join(tried, ", nor of "));
    NoteSkipped(all, &ranked[0], &fx);
    return fx;
  }
  fx.found = true;
  const double v0 = KnobValue(solver, *used->knob);
  SetKnobValue(solver, *used->knob, fx.suggested);
  const Confirmation cf = ConfirmOverEnvelope(cs, solver, failing_before, fx);
  SetKnobValue(solver, *used->knob, v0);
  fx.envelope_passes_check = cf.passes;
  fx.broken = cf.broken;
  if (!cf.all_converged) fx.note = "some points did not converge with the suggested value";
  NoteSkipped(all, used, &fx);
  SnapToCatalog(cs, solver, *used->knob, failing_before, &fx);
  if (cf.all_converged && (!cf.passes || !cf.broken.empty()))
    FindCleanAlternative(cs, solver, aim, ranked, used_index, f0, failing_before, &fx);
  return fx;
}

}  // namespace

namespace {

// The `n` checks with the least relative margin (MarginRank), left in the
// summary's order: a long list is cut at its mildest, not at its end.
void KeepWorst(std::vector<const CheckSummary*>* checks, int n) {
  if (static_cast<int>(checks->size()) <= n) return;
  std::vector<const CheckSummary*> ranked = *checks;
  std::stable_sort(ranked.begin(), ranked.end(), [](const CheckSummary* a, const CheckSummary* b) {
    return MarginRank(a->worst) < MarginRank(b->worst);
  });
  const std::set<const CheckSummary*> kept(ranked.begin(), ranked.begin() + n);
  checks->erase(std::remove_if(checks->begin(), checks->end(), [&](const CheckSummary* s) { return !kept.count(s); }),
                checks->end());
}

}  // namespace

std::vector<FixSuggestion> SuggestFixes(const Case& cs, const std::vector<CheckSummary>& summary, int max_checks,
                                        double tight_fraction) {
  std::vector<FixSuggestion> out;
  const std::vector<DesignKnob> knobs = DesignKnobs(cs);
  std::set<std::pair<std::string, std::string>> failing_before;
  for (const auto& s : summary)
    if (!s.worst.pass) failing_before.insert({std::string(s.worst.name()), s.worst.where});
  CaseSolver solver(cs);
  // Failing checks first, then tight ones (passing with less than their
  // band to spare: see TightBand).
  std::vector<const CheckSummary*> failing, tight;
  for (const auto& s : summary) {
    if (!s.worst.pass) failing.push_back(&s);
    else if (s.worst.limit != 0 && s.worst.margin < TightBand(cs, s.worst, tight_fraction)) tight.push_back(&s);
  }
  KeepWorst(&failing, max_checks);
  KeepWorst(&tight, max_checks);
  for (const CheckSummary* s : failing) out.push_back(SuggestOne(cs, &solver, knobs, failing_before, *s, false, tight_fraction));
  for (const CheckSummary* s : tight) out.push_back(SuggestOne(cs, &solver, knobs, failing_before, *s, true, tight_fraction));
  return out;
}

}  // namespace loopwright
