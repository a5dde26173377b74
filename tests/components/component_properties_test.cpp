// Property tests across every component type, driven by one list
// (DESIGN.md section 7).
//
// The list (tests/components/component_entries.h, shared with the binding
// test) holds, for every type of ComponentTypes() (and extra variants), a
// representative parameter set (invented values of a size found in small
// lube-oil skids) and the known exceptions to each property, each with its
// reason. For every entry:
//   (a) the automatic-differentiation (ceres::Jet) derivatives of every
//       residual with respect to dp, m, rho, mu and the internal unknowns
//       match central differences (relative 1e-6; Richardson-extrapolated
//       central differences with steps 1e-5, 1e-6 and 1e-7 of the value, the
//       best of the three; an absolute floor of 1e-9 of the natural
//       derivative scale and the round-off bound of the difference quotient;
//       the Jet's value equals the double value), at states on the law
//       (dp, x solved for m) over a log-uniform sweep of flows of both signs
//       down to 1e-9 of the nominal flow and m = 0, and at states off the law
//       (a grid of dp and x, including the valves' cracking points);
//   (b) at m = 0, dp = 0 the law holds (residual 0 after solving the
//       internal unknowns), except where the physics says otherwise;
//   (c) odd symmetry under flow reversal, r(-dp, -m, -x) = -r(dp, m, x), for
//       passages that are symmetric;
//   (d) monotone: the dp that satisfies the law (solved by bisection on the
//       residual) rises strictly with m over the sweep, for passive
//       components (and for the displacement pump with slip, whose pressure
//       rise falls with delivery, so dp = -rise rises too); one-way valves
//       for m > 0 only, with no dp giving reverse flow;
//   (f) for a law that reads its outlet's gauge pressure (the reducing
//       valve, Component::SensesOutlet): (a) with the outlet as a further
//       variable at the entry's outlet pressures (p_out_extra, across its
//       band and both saturations), the flow rising strictly with dp at fixed
//       outlet and, at fixed inlet, the forward flow falling strictly as the
//       outlet rises (the valve closes); and the law without a port pressure
//       equal to the law at the type's reference outlet;
//   (e) finite residuals and derivatives over a log-uniform sweep of
//       m (1e-9 .. 1 kg/s, both signs, and 0), mu (1e-4 .. 10 Pa.s),
//       rho (600 .. 1100 kg/m3) and dp; finite starting-guess data
//       (Linearize, GuessInternal).
// A listed exception must really fail the property (so the list cannot go
// stale), and a test checks that the list covers every registered type.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <functional>
#include <limits>
#include <map>
#include <memory>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include "components/component.h"
#include "components/registry.h"
#include "tests/components/component_entries.h"

namespace loopwright {
namespace {

constexpr double kEps = std::numeric_limits<double>::epsilon();
using namespace component_entries;  // NOLINT: the shared property list

// ------------------------------------------------------------- evaluation

// State vector: v[0] dp, v[1] m, v[2] rho, v[3] mu, v[4..] x.
using State = std::vector<double>;

State MakeState(double dp, double m, double rho, double mu, const std::vector<double>& x) {
  State s = {dp, m, rho, mu};
  s.insert(s.end(), x.begin(), x.end());
  return s;
}

// A state one longer than 4 + NumInternal() carries an outlet gauge pressure
// last, for a law that reads it (Component::SensesOutlet): its jet slot is
// 4 + NumInternal(), the state's own index, as the component interface says.
bool HasOutlet(const Component& c, const State& s) {
  return c.SensesOutlet() && static_cast<int>(s.size()) > 4 + c.NumInternal();
}

std::vector<double> Eval(const Component& c, const State& s) {
  std::vector<double> r(1 + c.NumInternal());
  const double* x = c.NumInternal() > 0 ? &s[4] : nullptr;
  if (HasOutlet(c, s)) c.EvaluateSensed(s[0], s.back(), s[1], s[2], s[3], x, r.data());
  else c.Evaluate(s[0], s[1], s[2], s[3], x, r.data());
  return r;
}

std::vector<LocalJet> EvalJet(const Component& c, const State& s) {
  LocalJet x[kMaxInternal];
  for (int i = 0; i < c.NumInternal(); ++i) x[i] = LocalJet(s[4 + i], 4 + i);
  std::vector<LocalJet> r(1 + c.NumInternal());
  const LocalJet dp(s[0], 0), m(s[1], 1), rho(s[2], 2), mu(s[3], 3);
  if (HasOutlet(c, s)) c.EvaluateSensed(dp, LocalJet(s.back(), 4 + c.NumInternal()), m, rho, mu, x, r.data());
  else c.Evaluate(dp, m, rho, mu, x, r.data());
  return r;
}

// Bisection for f(z) = 0, bracketing outward from `center` in steps of
// `scale` x 4^k. Returns false when no sign change is found up to ~1e40.
bool Bisect(const std::function<double(double)>& f, double center, double scale, double* root) {
  double lo = 0, hi = 0, flo = 0, fhi = 0;
  double s = scale;
  bool bracketed = false;
  for (int k = 0; k < 70 && !bracketed; ++k, s *= 4.0) {
    lo = center - s;
    hi = center + s;
    flo = f(lo);
    fhi = f(hi);
    if (!std::isfinite(flo) || !std::isfinite(fhi)) return false;
    if (flo == 0.0) { *root = lo; return true; }
    if (fhi == 0.0) { *root = hi; return true; }
    bracketed = (flo < 0.0) != (fhi < 0.0);
  }
  if (!bracketed) return false;
  for (int it = 0; it < 3000; ++it) {
    const double mid = 0.5 * (lo + hi);
    if (!(mid > lo && mid < hi)) break;
    const double fm = f(mid);
    if (fm == 0.0) { *root = mid; return true; }
    if ((fm < 0.0) == (flo < 0.0)) {
      lo = mid;
      flo = fm;
    } else {
      hi = mid;
      fhi = fm;
    }
  }
  *root = std::fabs(flo) <= std::fabs(fhi) ? lo : hi;
  return true;
}

// Internal unknowns x solving residuals 1.. at (dp, m). One internal
// unknown is all any model has today; more fail loudly here.
bool SolveInternal(const Component& c, double dp, double m, double rho, double mu, double x_scale,
                   std::vector<double>* x) {
  const int n = c.NumInternal();
  x->assign(n, 0.0);
  if (n == 0) return true;
  REQUIRE_MESSAGE(n == 1, "extend SolveInternal to " << n << " internal unknowns");
  double guess[kMaxInternal] = {0, 0};
  c.GuessInternal(dp, m, rho, mu, guess);
  auto f = [&](double xi) { return Eval(c, MakeState(dp, m, rho, mu, {xi}))[1]; };
  double root = 0;
  if (!Bisect(f, std::isfinite(guess[0]) ? guess[0] : 0.0, 1e-6 * x_scale, &root)) return false;
  (*x)[0] = root;
  return true;
}

// dp (and x) satisfying every residual at mass flow m; false if none.
bool SolveDp(const Component& c, double m, double rho, double mu, double dp_scale, double* dp,
             std::vector<double>* x) {
  bool inner_ok = true;
  auto f = [&](double d) {
    std::vector<double> xi;
    if (!SolveInternal(c, d, m, rho, mu, dp_scale, &xi)) {
      inner_ok = false;
      return std::numeric_limits<double>::quiet_NaN();
    }
    return Eval(c, MakeState(d, m, rho, mu, xi))[0];
  };
  if (!Bisect(f, 0.0, 1e-6 * dp_scale, dp) || !inner_ok) return false;
  return SolveInternal(c, *dp, m, rho, mu, dp_scale, x);
}

// Signed log-uniform sweep: 0 and +-m_nom 10^k, k = -9 .. 1 in halves.
std::vector<double> FlowSweep(double m_nom) {
  std::vector<double> m = {0.0};
  for (int k = -18; k <= 2; ++k) {
    const double a = m_nom * std::pow(10.0, 0.5 * k);
    m.push_back(a);
    m.push_back(-a);
  }
  std::sort(m.begin(), m.end());
  return m;
}

// Natural scale of residual k (Pa or m3/s) and of each state variable.
double ResidualScale(const Component& c, int k, const Entry& e) {
  return c.Kind(k) == ResidualKind::kPressure ? e.dp_nom : e.m_nom / kRho;
}
double VariableScale(int v, const Entry& e) {
  switch (v) {
    case 0: return e.dp_nom;
    case 1: return e.m_nom;
    case 2: return kRho;
    case 3: return kMu;
    default: return e.dp_nom;
  }
}

// Magnitude of the terms that cancel in residual k at state s: bounds the
// round-off of r (see the header).
double TermMagnitude(const Component& c, int k, const State& s, double r) {
  if (c.Kind(k) == ResidualKind::kPressure) {
    double t = std::fabs(r) + std::fabs(s[0]) + std::fabs(r + s[0]);
    for (size_t i = 4; i < s.size(); ++i) t += std::fabs(s[i]);
    return t;
  }
  const double q = s[1] / s[2];
  return std::fabs(r) + std::fabs(q) + std::fabs(r - q);
}

struct Tally {
  int checked = 0;
  int failed = 0;
  double worst = 0;  // worst |jet - cd| / max(|jet|, |cd|) among meaningful checks
  std::vector<std::string> first_failures;
  void Fail(const std::string& s) {
    ++failed;
    if (first_failures.size() < 6) first_failures.push_back(s);
  }
};

std::string StateText(const State& s) {
  std::ostringstream o;
  o.precision(10);
  o << "dp=" << s[0] << " m=" << s[1] << " rho=" << s[2] << " mu=" << s[3];
  for (size_t i = 4; i < s.size(); ++i) o << " x" << (i - 4) << "=" << s[i];
  return o.str();
}

const char* kVarName[] = {"dp", "m", "rho", "mu", "x0", "x1"};

// (a) at one state: every residual, every variable.
void CheckJacobianAt(const Component& c, const Entry& e, const State& s, Tally* t) {
  const std::vector<LocalJet> rj = EvalJet(c, s);
  const std::vector<double> r0 = Eval(c, s);
  for (size_t k = 0; k < r0.size(); ++k) {
    // Jet arithmetic divides as f * (1/g): equal to a few ulp of the terms,
    // which may be of the natural scale even where they cancel to a small r
    // (a pump's geometric flow against its slip).
    const double terms = std::max(TermMagnitude(c, static_cast<int>(k), s, r0[k]),
                                  ResidualScale(c, static_cast<int>(k), e));
    if (!(std::fabs(rj[k].a - r0[k]) <= 16 * kEps * terms))
      t->Fail("Jet value differs from double value, residual " + std::to_string(k) + " at " + StateText(s));
  }
  for (size_t v = 0; v < s.size(); ++v) {
    const double vs = VariableScale(static_cast<int>(v), e);
    const double base = std::max(std::fabs(s[v]), 1e-9 * vs);
    // Richardson-extrapolated central difference R = (4 D(h/2) - D(h)) / 3
    // (truncation O(h^4)) on a short ladder of steps: near a cracking point
    // the curvature scale is the distance to it, not the value, so the step
    // that suits is the one that agrees; a wrong derivative agrees at none.
    for (size_t k = 0; k < r0.size(); ++k) {
      const double jet = rj[k].v[v];
      const double natural = ResidualScale(c, static_cast<int>(k), e) / vs;
      double best_diff = INFINITY, best_allowed = 0, best_cd = 0, best_noise = 0;
      for (double factor : {1e-5, 1e-6, 1e-7}) {
        const double h = factor * base;
        double d[2];
        double term = 0;
        for (int half = 0; half < 2; ++half) {
          State sp = s, sm = s;
          sp[v] += half ? 0.5 * h : h;
          sm[v] -= half ? 0.5 * h : h;
          const double rp = Eval(c, sp)[k], rm = Eval(c, sm)[k];
          d[half] = (rp - rm) / (sp[v] - sm[v]);
          term = std::max({term, TermMagnitude(c, static_cast<int>(k), sp, rp),
                           TermMagnitude(c, static_cast<int>(k), sm, rm)});
        }
        const double cd = (4.0 * d[1] - d[0]) / 3.0;
        const double noise = 3e3 * kEps * term / h;
        const double diff = std::fabs(jet - cd);
        const double allowed = 1e-6 * std::max(std::fabs(jet), std::fabs(cd)) + 1e-9 * natural + noise;
        if (diff - allowed < best_diff - best_allowed || !std::isfinite(best_diff)) {
          best_diff = diff;
          best_allowed = allowed;
          best_cd = cd;
          best_noise = noise;
        }
      }
      ++t->checked;
      if (!std::isfinite(jet) || !(best_diff <= best_allowed)) {
        std::ostringstream o;
        o.precision(12);
        o << "d r" << k << "/d " << (static_cast<int>(v) >= 4 + c.NumInternal() ? "p_out" : kVarName[v]) << ": jet " << jet << " vs central difference " << best_cd
          << " (allowed " << best_allowed << ") at " << StateText(s);
        t->Fail(o.str());
      } else if (best_noise + 1e-9 * natural < 1e-3 * std::fabs(best_cd)) {
        t->worst = std::max(t->worst, best_diff / std::max(std::fabs(jet), std::fabs(best_cd)));
      }
    }
  }
}

// States on the law (dp, x solved) over the flow sweep.
std::vector<State> OnLawStates(const Component& c, const Entry& e, double rho, double mu) {
  std::vector<State> out;
  for (double m : FlowSweep(e.m_nom)) {
    double dp = 0;
    std::vector<double> x;
    if (SolveDp(c, m, rho, mu, e.dp_nom, &dp, &x)) out.push_back(MakeState(dp, m, rho, mu, x));
  }
  return out;
}

// States off the law: a grid in dp (and x) at a subset of the flows.
std::vector<State> OffLawStates(const Component& c, const Entry& e, double rho, double mu) {
  std::vector<double> dps = {0.0};
  for (double f : {1e-3, 0.3, 1.0, 3.0}) {
    dps.push_back(f * e.dp_nom);
    dps.push_back(-f * e.dp_nom);
  }
  dps.insert(dps.end(), e.dp_extra.begin(), e.dp_extra.end());
  const auto flows = FlowSweep(e.m_nom);
  std::vector<State> out;
  for (size_t i = 0; i < flows.size(); i += 3) {
    const double m = flows[i];
    for (double dp : dps) {
      if (c.NumInternal() == 0) {
        out.push_back(MakeState(dp, m, rho, mu, {}));
        continue;
      }
      std::vector<double> xs;
      SolveInternal(c, dp, m, rho, mu, e.dp_nom, &xs);
      std::vector<double> xvals = {xs[0], 0.5 * xs[0], 2.0 * xs[0], 0.0, 0.2 * e.dp_nom, -0.2 * e.dp_nom};
      xvals.insert(xvals.end(), e.x_extra.begin(), e.x_extra.end());
      for (double xv : xvals) out.push_back(MakeState(dp, m, rho, mu, {xv}));
    }
  }
  return out;
}

TEST_CASE("the property list covers every registered component type, and only those") {
  std::set<std::string> listed, covered;
  for (const auto& e : Entries()) listed.insert(e.type);
  for (const auto& e : AllEntries()) covered.insert(e.type);
  for (const auto& t : ComponentTypes()) {
    std::string why;
    if (!listed.count(t.name)) DerivedEntry(t, &why);
    INFO("type " << t.name << " has no entry in tests/components/component_entries.h and none can be derived from its "
                 "specs (" << why << "): add one");
    CHECK(covered.count(t.name) == 1);
  }
  for (const auto& name : listed) {
    INFO("listed type " << name << " is not registered");
    CHECK(FindComponentType(name) != nullptr);
  }
}

// The derivation a new type relies on: a type whose specs give valid
// values gets an entry the factory accepts, with the required numbers from
// the spec (defaults kept, else inside the accepted range), and a type with
// a required table gets none, with the reason.
TEST_CASE("an entry is derived from the specs where they give valid values") {
  std::string why;
  const auto pipe = DerivedEntry(*FindComponentType("pipe"), &why);
  REQUIRE_MESSAGE(pipe.has_value(), why);
  CHECK(pipe->numbers.at("length") == 1.0);    // Positive: one above its exclusive lower bound 0
  CHECK(pipe->numbers.at("diameter") == 1.0);
  CHECK(pipe->numbers.count("roughness") == 0);  // optional: its default stays
  CHECK(pipe->m_nom > 0);
  CHECK(Make(*pipe) != nullptr);
  const auto relief = DerivedEntry(*FindComponentType("relief_valve"), &why);
  REQUIRE_MESSAGE(relief.has_value(), why);
  CHECK(relief->numbers.at("crack") == 1.0);
  const auto pump = DerivedEntry(*FindComponentType("centrifugal_pump"), &why);
  CHECK_FALSE(pump.has_value());
  CHECK(why.find("curve") != std::string::npos);
  // Bounded and half-bounded ranges.
  CHECK(DerivedValue(Num("x", Dimension::kDimensionless, "", true).Range(0.2, 0.6)) == doctest::Approx(0.4));
  CHECK(DerivedValue(Num("x", Dimension::kDimensionless, "", true).Max(-3)) == -4.0);
  CHECK(DerivedValue(Num("x", Dimension::kDimensionless, "", false, 0.7)) == 0.7);
}

TEST_CASE("a type whose model may fix its flow has a flow-fixer role (the physical-state test reads no other model)") {
  // network/point/failure_causes.cpp skips every branch whose type has none
  // of kFlowFixerRoles without reading its model: a model that says
  // MayFixFlow under another role would be missed there.
  int fixers = 0;
  for (const auto& e : AllEntries()) {
    auto c = Make(e);
    if (!c->MayFixFlow()) continue;
    ++fixers;
    const ComponentType* t = FindComponentType(e.type);
    INFO(e.label);
    REQUIRE(t != nullptr);
    CHECK((t->roles & kFlowFixerRoles) != 0);
  }
  CHECK(fixers >= 2);  // fixed_flow and displacement_pump
}

TEST_CASE("(a) Jet derivatives match central differences on and off the law") {
  for (const auto& e : AllEntries()) {
    auto c = Make(e);
    Tally t;
    for (double rho : {kRho, 1050.0}) {
      for (double mu : {kMu, 0.5}) {
        for (const State& s : OnLawStates(*c, e, rho, mu)) CheckJacobianAt(*c, e, s, &t);
        for (const State& s : OffLawStates(*c, e, rho, mu)) CheckJacobianAt(*c, e, s, &t);
      }
    }
    std::string fails;
    for (auto& f : t.first_failures) fails += "\n  " + f;
    INFO(e.label << ": " << t.failed << " of " << t.checked << " derivative checks failed" << fails);
    CHECK(t.checked > 100);
    CHECK(t.failed == 0);
    MESSAGE(e.label << ": " << t.checked << " derivative checks, worst relative difference " << t.worst);
  }
}

TEST_CASE("(b) at m = 0 and dp = 0 the law holds, except where the physics says otherwise") {
  for (const auto& e : AllEntries()) {
    auto c = Make(e);
    std::vector<double> x;
    REQUIRE(SolveInternal(*c, 0.0, 0.0, kRho, kMu, e.dp_nom, &x));
    const std::vector<double> r = Eval(*c, MakeState(0.0, 0.0, kRho, kMu, x));
    double worst = 0;
    for (size_t k = 0; k < r.size(); ++k)
      worst = std::max(worst, std::fabs(r[k]) / ResidualScale(*c, static_cast<int>(k), e));
    INFO(e.label << ": largest |r| / natural scale at m = 0, dp = 0: " << worst);
    if (e.zero_law_exception.empty()) {
      CHECK(worst <= 1e-12);
    } else {
      INFO("listed exception: " << e.zero_law_exception << " — yet the law holds at zero; update the list");
      CHECK(worst > 1e-3);
    }
  }
}

// Worst |r(-dp, -m, -x) + r(dp, m, x)| / term magnitude over states.
double WorstOddDefect(const Component& c, const Entry& e, const std::vector<State>& states, std::string* where) {
  double worst = 0;
  for (const State& s : states) {
    State neg = s;
    neg[0] = -s[0];
    neg[1] = -s[1];
    for (size_t i = 4; i < s.size(); ++i) neg[i] = -s[i];
    const std::vector<double> r = Eval(c, s), rn = Eval(c, neg);
    for (size_t k = 0; k < r.size(); ++k) {
      const double scale =
          TermMagnitude(c, static_cast<int>(k), s, r[k]) + 1e-12 * ResidualScale(c, static_cast<int>(k), e);
      const double z = std::fabs(r[k] + rn[k]) / scale;
      if (z > worst) {
        worst = z;
        *where = StateText(s);
      }
    }
  }
  return worst;
}

TEST_CASE("(c) odd symmetry under flow reversal for symmetric passages") {
  for (const auto& e : AllEntries()) {
    auto c = Make(e);
    std::string where, where2;
    double worst = WorstOddDefect(*c, e, OffLawStates(*c, e, kRho, kMu), &where);
    const double worst_on = WorstOddDefect(*c, e, OnLawStates(*c, e, kRho, kMu), &where2);
    if (worst_on > worst) {
      worst = worst_on;
      where = where2;
    }
    INFO(e.label << ": worst |r(-s) + r(s)| / term magnitude " << worst << " at " << where);
    if (e.odd_exception.empty()) {
      CHECK(worst <= 1e-13);
    } else {
      INFO("listed exception: " << e.odd_exception << " — yet the law is odd; update the list");
      CHECK(worst > 1e-3);
    }
  }
}

TEST_CASE("(d) the dp satisfying the law rises strictly with the flow for passive components") {
  for (const auto& e : AllEntries()) {
    if (!e.monotone_exception.empty()) {
      // The exception is real: the law is not a loss rising with flow.
      auto c = Make(e);
      bool all_rise = true, all_solved = true;
      double prev = -INFINITY;
      for (double m : FlowSweep(e.m_nom)) {
        double dp = 0;
        std::vector<double> x;
        if (!SolveDp(*c, m, kRho, kMu, e.dp_nom, &dp, &x)) {
          all_solved = false;
          continue;
        }
        if (!(dp > prev)) all_rise = false;
        prev = dp;
      }
      INFO(e.label << ": listed exception: " << e.monotone_exception << " — yet dp(m) rises everywhere");
      CHECK(!(all_rise && all_solved));
      continue;
    }
    auto c = Make(e);
    for (double mu : {kMu, 2.0}) {
      std::vector<double> flows;
      for (double m : FlowSweep(e.m_nom))
        if (e.forward_only.empty() || m > 0) flows.push_back(m);
      double prev_dp = -INFINITY, prev_m = -INFINITY;
      for (double m : flows) {
        double dp = 0;
        std::vector<double> x;
        const bool ok = SolveDp(*c, m, kRho, mu, e.dp_nom, &dp, &x);
        INFO(e.label << ": mu " << mu << ", m " << m);
        REQUIRE(ok);
        // The solution really satisfies the law.
        const std::vector<double> r = Eval(*c, MakeState(dp, m, kRho, mu, x));
        for (size_t k = 0; k < r.size(); ++k)
          CHECK(std::fabs(r[k]) <= 1e-9 * ResidualScale(*c, static_cast<int>(k), e));
        INFO("dp(" << prev_m << ") = " << prev_dp << ", dp(" << m << ") = " << dp);
        CHECK(dp > prev_dp);
        prev_dp = dp;
        prev_m = m;
      }
      if (!e.forward_only.empty()) {
        // One-way: no dp gives a reverse flow.
        for (double m : {-1e-6 * e.m_nom, -e.m_nom}) {
          double dp = 0;
          std::vector<double> x;
          INFO(e.label << " (" << e.forward_only << "): a dp was found for reverse flow m = " << m);
          CHECK_FALSE(SolveDp(*c, m, kRho, mu, e.dp_nom, &dp, &x));
        }
      }
    }
  }
}

// Flow [m3/s] of a flow-kind sensing law at (dp, p_out): r = m/rho - Q at m = 0.
double SensedFlow(const Component& c, double dp, double p_out) {
  return -Eval(c, {dp, 0.0, kRho, kMu, p_out})[0];
}

TEST_CASE("(f) a law that reads its outlet: derivatives in the outlet, monotone in dp and in the outlet") {
  int sensing = 0;
  for (const auto& e : AllEntries()) {
    auto c = Make(e);
    if (!c->SensesOutlet()) {
      INFO(e.label << " lists outlet pressures but does not read its outlet");
      CHECK(e.p_out_extra.empty());
      continue;
    }
    ++sensing;
    REQUIRE(c->NumInternal() == 0);  // a sensing law's outlet slot follows the internal unknowns; none here
    REQUIRE(c->Kind(0) == ResidualKind::kVolumeFlow);
    REQUIRE(e.p_out_extra.size() >= 3);
    Tally t;
    const double p_ref = c->ReferenceOutletPressure();
    for (double p_out : e.p_out_extra) {
      for (const State& s0 : OffLawStates(*c, e, kRho, kMu)) {
        State s = s0;
        s.push_back(p_out);
        CheckJacobianAt(*c, e, s, &t);
      }
      // At fixed outlet: Q rises strictly with dp over forward and reverse drops.
      double prev = -INFINITY;
      for (double f : {-3.0, -1.0, -0.3, -1e-3, 0.0, 1e-3, 0.3, 1.0, 3.0}) {
        const double q = SensedFlow(*c, f * e.dp_nom, p_out);
        INFO(e.label << ": p_out " << p_out << ", dp " << f * e.dp_nom);
        CHECK(q > prev);
        prev = q;
      }
    }
    std::string fails;
    for (auto& f : t.first_failures) fails += "\n  " + f;
    INFO(e.label << ": " << t.failed << " of " << t.checked << " derivative checks failed" << fails);
    CHECK(t.checked > 100);
    CHECK(t.failed == 0);
    // At fixed inlet (forward flow): Q falls strictly as the outlet rises through the outlets listed.
    std::vector<double> outs = e.p_out_extra;
    std::sort(outs.begin(), outs.end());
    const double p_in = outs.back() + e.dp_nom;
    double prev = INFINITY;
    for (double p_out : outs) {
      const double q = SensedFlow(*c, p_in - p_out, p_out);
      INFO(e.label << ": inlet " << p_in << ", outlet " << p_out);
      CHECK(q < prev);
      prev = q;
    }
    // Without a port pressure: the law at the reference outlet.
    for (double dp : {-e.dp_nom, 0.3 * e.dp_nom, e.dp_nom})
      CHECK(Eval(*c, {dp, 0.1 * e.m_nom, kRho, kMu})[0] == Eval(*c, {dp, 0.1 * e.m_nom, kRho, kMu, p_ref})[0]);
  }
  CHECK(sensing >= 1);
}

TEST_CASE("(e) finite residuals and derivatives over log-uniform sweeps of m, mu, rho and dp") {
  std::vector<double> flows = {0.0};
  for (int k = 0; k <= 9; ++k) {
    const double m = 1e-9 * std::pow(10.0, k);  // 1e-9 .. 1 kg/s
    flows.push_back(m);
    flows.push_back(-m);
  }
  std::vector<double> mus;
  for (int k = 0; k <= 5; ++k) mus.push_back(1e-4 * std::pow(10.0, k));  // 1e-4 .. 10 Pa.s
  const std::vector<double> rhos = {600.0, 780.0, 900.0, 1100.0};
  for (const auto& e : AllEntries()) {
    auto c = Make(e);
    std::vector<double> dps = {0.0, 1e2, -1e2, 1e5, -1e5, 1e7, -1e7};
    dps.insert(dps.end(), e.dp_extra.begin(), e.dp_extra.end());
    std::vector<double> xs = {0.0, 1e4, -1e4, 1e6, -1e6};
    xs.insert(xs.end(), e.x_extra.begin(), e.x_extra.end());
    if (c->NumInternal() == 0) xs = {0.0};
    int bad = 0, n = 0;
    std::string first;
    for (double rho : rhos) {
      for (double mu : mus) {
        const LinearGuess g = c->Linearize(rho, mu);
        if (!(std::isfinite(g.g) && g.g >= 0 && std::isfinite(g.m0))) {
          ++bad;
          if (first.empty()) first = "Linearize at rho " + std::to_string(rho) + " mu " + std::to_string(mu);
        }
        for (double m : flows) {
          for (double dp : dps) {
            double gx[kMaxInternal] = {0, 0};
            c->GuessInternal(dp, m, rho, mu, gx);
            for (int i = 0; i < c->NumInternal(); ++i)
              if (!std::isfinite(gx[i])) ++bad;
            for (double x : xs) {
              const State s = MakeState(dp, m, rho, mu, std::vector<double>(c->NumInternal(), x));
              const std::vector<LocalJet> r = EvalJet(*c, s);
              ++n;
              bool ok = true;
              for (const auto& rk : r) {
                ok = ok && std::isfinite(rk.a);
                for (int v = 0; v < kJetSlots; ++v) ok = ok && std::isfinite(rk.v[v]);
              }
              if (!ok) {
                ++bad;
                if (first.empty()) first = StateText(s);
              }
            }
          }
        }
      }
    }
    INFO(e.label << ": " << bad << " non-finite evaluations of " << n << "; first at " << first);
    CHECK(bad == 0);
  }
}


// (g) The Newton sweep's small jets. A law with one row, no internal
// unknowns and no sensed outlet is evaluated on a two-slot jet (dp, m), or,
// when its type declares r = loss(m) - dp (kLossMinusDrop,
// components/component.h), on a one-slot jet in m with dr/d(dp) = -1 taken
// as given. The declaration is checked here on LocalJets, independently of
// that path: the derivative in dp is exactly -1 at every state on and off
// the law, and the type has one row and reads no outlet. And the sweep's
// residual and slopes are the FlowJet law's to the bit (the network's
// results must not move when a type changes path; a declaration on a law
// that reads dp inside its loss fails both checks).
TEST_CASE("(g) the sweep's small jets: loss-minus-drop declarations hold, slopes equal FlowJet's bit for bit") {
  std::set<std::string> declared;
  for (const auto& e : AllEntries()) {
    auto c = Make(e);
    if (c->NumInternal() > 0 || c->SensesOutlet()) {
      CHECK_MESSAGE(!c->LossMinusDrop(), e.label << " declares loss-minus-drop with internal unknowns or a sensed outlet");
      continue;
    }
    if (c->LossMinusDrop()) declared.insert(e.type);
    int checked = 0, differ = 0;
    std::string first;
    for (double mu : {kMu, 0.5}) {
      std::vector<State> states = OnLawStates(*c, e, kRho, mu);
      for (const State& s : OffLawStates(*c, e, kRho, mu)) states.push_back(s);
      for (const State& s : states) {
        FlowJet fj[1 + kMaxInternal];
        c->Evaluate(FlowJet(s[0], 0), FlowJet(s[1], 1), s[2], s[3], nullptr, fj);
        double a_dp = 0, a_m = 0;
        const double r = c->EvaluateWithSlopes(s[0], s[1], s[2], s[3], &a_dp, &a_m);
        const bool same = r == fj[0].a && a_dp == fj[0].v[0] && a_m == fj[0].v[1];
        const bool drop_ok = !c->LossMinusDrop() || EvalJet(*c, s)[0].v[0] == -1.0;
        ++checked;
        if (!(same && drop_ok)) {
          ++differ;
          if (first.empty())
            first = "dp " + std::to_string(s[0]) + " m " + std::to_string(s[1]) + (same ? "" : ": slopes differ") +
                    (drop_ok ? "" : ": dr/d(dp) is not -1");
        }
      }
    }
    INFO(e.label << ": " << differ << " of " << checked << " states fail; first " << first);
    CHECK(checked > 20);
    CHECK(differ == 0);
  }
  // The declaration is in use (so the checks above are not vacuous).
  CHECK(declared.count("pipe") == 1);
  CHECK(declared.count("orifice") == 1);
}

}  // namespace
}  // namespace loopwright
