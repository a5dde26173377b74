// Tangents of converged points (network/envelope/sensitivity.h):
//  - against closed forms: Hagen-Poiseuille, dp = 128 mu L Q / (pi D^4), so
//    d dp / dD = -4 dp / D, and the mean velocity v = 4 Q / (pi D^2), so
//    dv/dD = -2 v / D (a reported value that depends on the knob directly);
//    a counterflow exchanger between two fixed-flow streams of constant cp,
//    whose hot outlet temperature T_ho = T_hi - eps(NTU, Cr) C_min (T_hi -
//    T_ci) / C_h has d T_ho / d UA in closed form (Incropera, Fundamentals of
//    Heat and Mass Transfer, Table 11.3, counterflow eps-NTU relation, from
//    memory);
//  - against central differences of re-solved points, for every knob and
//    every check margin of the thermal demo case and the two-loop test case
//    (the coupled hydraulic-thermal tangent, couplings included).
#include <doctest/doctest.h>

#include <cmath>
#include <cstdlib>
#include <string>

#include <nlohmann/json.hpp>

#include "network/case/case.h"
#include "network/envelope/checks.h"
#include "network/point/run.h"
#include "network/envelope/sensitivity.h"

using namespace loopwright;

namespace {

std::string Src() {
  const char* src = std::getenv("LOOPWRIGHT_SOURCE_DIR");
  REQUIRE(src != nullptr);
  return src;
}

std::unique_ptr<Case> LoadText(const std::string& text) {
  LoadResult lr = LoadCaseText(text, Src() + "/tests/network/sensitivity_case.json", Src() + "/library");
  INFO(lr.diagnostics.Format("sensitivity_case.json"));
  REQUIRE(lr.value != nullptr);
  return std::move(lr.value);
}

std::unique_ptr<Case> LoadFile(const std::string& rel) {
  LoadResult lr = LoadCaseFile(Src() + "/" + rel, Src() + "/library");
  INFO(lr.diagnostics.Format(rel));
  REQUIRE(lr.value != nullptr);
  return std::move(lr.value);
}

const DesignKnob& Knob(const std::vector<DesignKnob>& ks, const std::string& name) {
  for (const auto& k : ks)
    if (k.name == name) return k;
  FAIL("no knob " << name);
  return ks.front();
}

// Invented constant-property oil (rho 870 kg/m3, mu 0.05 Pa.s): a metering
// pump pushes 2 L/min through a 4 m laminar pipe of bore `d` into a vented
// reservoir.
std::string LaminarCase(double d) {
  nlohmann::json fluid = {{"kind", "table"}, {"viscosity", "dynamic"},
                          {"rows", {{250.0, 0.05, 870.0, 2000.0, 0.13}, {450.0, 0.05, 870.0, 2000.0, 0.13}}}};
  nlohmann::json doc = {
      {"name", "laminar line tangent (invented)"},
      {"fluids", {{"oil", fluid}}},
      {"loops",
       {{{"id", "oil"},
         {"fluid", "oil"},
         {"temperature", 313.15},
         {"nodes",
          {{{"id", "sump"}, {"boundary", {{"kind", "reservoir"}, {"pressure", 0.0}, {"level", 0.0}}}},
           {{"id", "feed"}},
           {{"id", "tank"}, {"boundary", {{"kind", "pressure"}, {"pressure", 0.0}}}}}},
         {"components",
          {{{"id", "pump"}, {"type", "fixed_flow"}, {"from", "sump"}, {"to", "feed"}, {"flow", "2 L/min"}},
           {{"id", "line"}, {"type", "pipe"}, {"from", "feed"}, {"to", "tank"}, {"length", 4.0}, {"diameter", d}}}}}}}};
  return doc.dump();
}

// Solves the case's first point and takes the tangent of `knob` there.
struct Tangented {
  std::unique_ptr<Case> cs;
  std::unique_ptr<CaseSolver> solver;
  PointResult result;
  std::unique_ptr<PointTangents> pt;
  DesignKnob knob;
  StateTangent t;
};

Tangented TangentAt(std::unique_ptr<Case> cs, const std::string& knob) {
  Tangented x;
  x.cs = std::move(cs);
  x.solver = std::make_unique<CaseSolver>(*x.cs);
  const OperatingPoint& op = x.cs->envelope.points[0];
  x.result = x.solver->Solve(op, false);
  REQUIRE(x.result.converged);
  x.knob = Knob(DesignKnobs(*x.cs), knob);
  x.pt = std::make_unique<PointTangents>(x.solver.get(), op);
  REQUIRE(x.pt->ok());
  x.t = x.pt->Tangent(x.knob);
  INFO(x.t.message);
  REQUIRE(x.t.ok);
  return x;
}

}  // namespace

TEST_CASE("laminar line: d p_feed / dD = -4 p/D and d v / dD = -2 v/D (Hagen-Poiseuille)") {
  const double d = 0.006;
  Tangented x = TangentAt(LoadText(LaminarCase(d)), "oil/line.diameter");
  const CaseSolver& solver = *x.solver;
  const StateTangent& t = x.t;
  // Node "feed" is the only free node: unknown 0 is its pressure.
  const double q = 2.0 / 60000.0, mu = 0.05, len = 4.0;
  const double p = 128 * mu * len * q / (M_PI * std::pow(d, 4));
  CHECK(solver.u[0] == doctest::Approx(p).epsilon(1e-8));
  CHECK(t.du[0] == doctest::Approx(-4 * p / d).epsilon(1e-7));
  // The mean velocity reported by the line (a function of the knob itself).
  const double v = 4 * q / (M_PI * d * d);
  const double dv = x.pt->Derivative(x.knob, t, [&](const PointResult& res) {
    for (const auto& b : res.branches)
      for (const auto& it : BranchReport(*x.cs, res, b).items)
        if (b.comp == 1 && it.key == "velocity") return it.value;
    return static_cast<double>(NAN);
  });
  CHECK(dv == doctest::Approx(-2 * v / d).epsilon(1e-7));
  // The solver's answer is left as it was.
  CHECK(solver.u[0] == doctest::Approx(p).epsilon(1e-8));
}

TEST_CASE("counterflow exchanger between fixed flows: d T_hot,out / d UA in closed form (e-NTU)") {
  Tangented x = TangentAt(LoadFile("tests/network/sizing_cases/oil_cooler_worked_example.json"),
                         "oil_cooler.conductance");
  auto t_feed = [&](const PointResult& res) {
    for (const auto& b : res.branches)
      if (b.loop == 0 && b.comp == 2)
        for (const auto& it : BranchReport(*x.cs, res, b).items)
          if (it.key == "inlet_temperature") return it.value;
    return static_cast<double>(NAN);
  };
  const double dT = x.pt->Derivative(x.knob, x.t, t_feed);
  // Closed form. The oil loop is closed and adiabatic: the cooler rejects the
  // node heat Qh (plus the loop's flow work, well under 1 W), so the oil
  // temperature at the cooler outlet is T_ho = T_ci + Qh/C_h * (1/eps - 1)
  // ... with eps = q / (C_min (T_hi - T_ci)) and T_hi = T_ho + Qh / C_h:
  // T_ho = T_ci + Qh (1/(eps C_min) - 1/C_h); dT_ho/dUA = -Qh/C_min eps'/eps^2.
  const double ch = 0.1 * 2131.0, cc = 0.2 * 4178.0, cmin = std::min(ch, cc), cr = cmin / std::max(ch, cc);
  const double ua = 400.0, ntu = ua / cmin, qh = 8524.0;
  const double e = std::exp(-ntu * (1 - cr));
  const double eps = (1 - e) / (1 - cr * e);
  const double deps_dntu = ((1 - cr) * e * (1 - cr * e) - (1 - e) * cr * (1 - cr) * e) / std::pow(1 - cr * e, 2);
  const double expect = -qh / cmin * (deps_dntu / cmin) / (eps * eps);
  // Flow work of the loops (well under 1 W against 8524 W) moves the
  // temperatures by under 1e-3 K and the duty by under 1e-4.
  CHECK(dT == doctest::Approx(expect).epsilon(2e-4));
  CHECK(std::abs(t_feed(x.result) - (303.15 + qh * (1 / (eps * cmin) - 1 / ch))) <= 2e-3);
}

namespace {

// Every knob, every check margin at `point`: tangent vs central differences
// of re-solved points (relative step 1e-4). The re-solves carry the solver's
// tolerances (temperatures to 1e-9 K, pressures to ~1e-6 Pa), hence the
// absolute floor; the truncation error of the differences is ~1e-8 relative.
void CompareWithResolves(const std::string& rel, const std::string& point, TangentOptions options = {}) {
  auto cs = LoadFile(rel);
  const int pi = FindPoint(*cs, point);
  REQUIRE(pi >= 0);
  const OperatingPoint& op = cs->envelope.points[pi];
  CaseSolver solver(*cs);
  PointResult r0 = solver.Solve(op, false);
  REQUIRE(r0.converged);
  std::vector<CheckWarning> w;
  const std::vector<CheckOutcome> checks = EvaluateChecks(*cs, op, r0, &w);
  const auto knobs = DesignKnobs(*cs);
  REQUIRE(knobs.size() >= 3);
  int compared = 0;
  for (const DesignKnob& k : knobs) {
    CaseSolver s(*cs);
    REQUIRE(s.Solve(op, false).converged);
    PointTangents pt(&s, op, options);
    REQUIRE(pt.ok());
    StateTangent t = pt.Tangent(k);
    INFO(k.name << ": " << t.message);
    REQUIRE(t.ok);
    const double v0 = KnobValue(&s, k), h = 1e-4 * v0;
    // Margins are read with the knob still at the perturbed value: a limit
    // may be the knob itself (relief_closed: the margin is crack - pressure).
    std::vector<double> mp, mm;
    SetKnobValue(&s, k, v0 + h);
    PointResult rp = s.Solve(op, false);
    REQUIRE(rp.converged);
    for (const auto& c : checks) mp.push_back(CheckMargin(*cs, op, rp, std::string(c.name()), c.where));
    SetKnobValue(&s, k, v0 - h);
    PointResult rm = s.Solve(op, false);
    REQUIRE(rm.converged);
    for (const auto& c : checks) mm.push_back(CheckMargin(*cs, op, rm, std::string(c.name()), c.where));
    SetKnobValue(&s, k, v0);
    for (size_t ci = 0; ci < checks.size(); ++ci) {
      const CheckOutcome& c = checks[ci];
      if (c.limit == 0) continue;  // a limit of zero: no margin to differentiate
      const double exact = pt.Derivative(k, t, [&](const PointResult& x) { return CheckMargin(*cs, op, x, std::string(c.name()), c.where); });
      const double fd = (mp[ci] - mm[ci]) / (2 * h);
      // Compare as margin change per 1 % of the knob.
      const double a = exact * 0.01 * v0, b = fd * 0.01 * v0;
      const double floor = 1e-5 * std::max(std::abs(c.limit), 1e-3);
      INFO(k.name << " -> " << c.name() << " at " << c.where << ": tangent " << a << ", re-solves " << b);
      CHECK(std::abs(a - b) <= 1e-3 * std::max(std::abs(a), std::abs(b)) + floor);
      ++compared;
    }
  }
  CHECK(compared >= 20);
}

}  // namespace

TEST_CASE("coupled tangents match re-solves: thermal demo case, every knob and check") {
  CompareWithResolves("cases/apu_test_cell.json", "full_power_hot_day");
}

TEST_CASE("coupled tangents match re-solves: two-loop case with a liquid coupling") {
  CompareWithResolves("tests/network/two_loop_case.json", "hot_room");
}

TEST_CASE("tangents match re-solves: a pressure-reducing valve between free nodes (its outlet in the Jacobian)") {
  // The valve's flow depends on its outlet pressure beyond the drop; a Jacobian column without that term
  // would tilt every tangent through the gallery pressure away from the re-solves.
  CompareWithResolves("tests/network/check_cases/prv_skid.json", "rated");
}

TEST_CASE("hot journal bearings at speed: the block sweeps and the direct tangent both match re-solves") {
  // Two 25 mm journal bearings at 48,000 rpm heat their oil to about 160 degC;
  // their flow rises steeply as the film thins with temperature. The block
  // sweeps settle (they did not while the film temperature was a bisection's
  // staircase: see the next case); the direct tangent (the temperatures' Schur
  // complement, refined), the fallback where they do not, is taken here on
  // its own. Both are compared with re-solves.
  const char* rel = "tests/network/check_cases/hot_journal_rig.json";
  auto cs = LoadFile(rel);
  const OperatingPoint& op = cs->envelope.points[FindPoint(*cs, "hot_fast")];
  CaseSolver s(*cs);
  REQUIRE(s.Solve(op, false).converged);
  TangentOptions sweeps_only, direct_only;
  sweeps_only.direct_unknowns = 0;
  direct_only.direct_only = true;
  PointTangents sweeps(&s, op, sweeps_only), direct(&s, op, direct_only);
  REQUIRE(sweeps.ok());
  REQUIRE(direct.ok());
  for (const DesignKnob& k : DesignKnobs(*cs)) {
    const StateTangent a = sweeps.Tangent(k), b = direct.Tangent(k);
    INFO(k.name << ": " << a.message << " / " << b.message);
    CHECK(a.ok);
    CHECK(b.ok);
    CHECK(b.sweeps > 0);
  }
  CompareWithResolves(rel, "hot_fast", sweeps_only);
  CompareWithResolves(rel, "hot_fast", direct_only);
}

TEST_CASE("isothermal point: the tangent is one linear solve") {
  Tangented x = TangentAt(LoadText(LaminarCase(0.008)), "oil/line.diameter");
  CHECK(x.t.sweeps == 1);
}

TEST_CASE("every design knob acts on the solution where its component carries flow") {
  // A knob whose value a model copied at construction would be inert: its
  // tangent would vanish. Relief cracking pressures are the known exception
  // while the relief is shut (its law is exactly flat there).
  for (const char* rel : {"cases/apu_test_cell.json", "cases/gearbox_lube_skid.json", "tests/network/two_loop_case.json",
                          "tests/network/sizing_cases/small_loop_questions.json"}) {
    auto cs = LoadFile(rel);
    // A running point (couplings act only where the energy balance is solved).
    size_t pi = 0;
    while (pi + 1 < cs->envelope.points.size() && cs->envelope.points[pi].isothermal) ++pi;
    const OperatingPoint& op = cs->envelope.points[pi];
    CaseSolver solver(*cs);
    PointResult r = solver.Solve(op, false);
    REQUIRE(r.converged);
    PointTangents pt(&solver, op);
    REQUIRE(pt.ok());
    for (const DesignKnob& k : DesignKnobs(*cs)) {
      if (k.name.find(".crack") != std::string::npos) continue;
      StateTangent t = pt.Tangent(k);
      INFO(std::string(rel) << ": " << k.name << " " << t.message);
      REQUIRE(t.ok);
      double size = t.du.lpNorm<Eigen::Infinity>();
      for (double d : t.dT) size = std::max(size, std::abs(d));
      CHECK(size > 0);
    }
  }
}

TEST_CASE("bearings whose film temperature follows from load: every tangent settles and matches re-solves") {
  // Two journal bearings take their eccentricity at the film temperature
  // T_f = T_in + rise(T_f)/2, a root found inside the law. Found by a bisection
  // stopped at a 1e-9 K bracket, T_f was a staircase of the stream: the
  // tangents' directional differences (a step of ~3e-5 K) read its steps,
  // and four tangents of this case never settled (r2.diameter at "normal";
  // pump displacement and speed at "hot_day").
  const char* rel = "tests/network/check_cases/feed_pump_rack.json";
  for (const char* point : {"normal", "hot_day"}) {
    auto cs = LoadFile(rel);
    const OperatingPoint& op = cs->envelope.points[FindPoint(*cs, point)];
    CaseSolver s(*cs);
    REQUIRE(s.Solve(op, false).converged);
    PointTangents pt(&s, op);
    REQUIRE(pt.ok());
    for (const DesignKnob& k : DesignKnobs(*cs)) {
      const StateTangent t = pt.Tangent(k);
      INFO(point << " " << k.name << ": " << t.message);
      CHECK(t.ok);
    }
    CompareWithResolves(rel, point);
  }
}

TEST_CASE("a point's report read after its solver moved on: the line's velocity at its own point's diameter") {
  // Reports are made when read (network/point/run.h BranchReport), from the
  // model in effect at the point: a report read after the solver has solved
  // another diameter must still describe its own. Closed form: the fixed
  // 2 L/min through the bore, v = 4 Q / (pi D^2).
  auto cs = LoadText(LaminarCase(0.006));
  CaseSolver solver(*cs);
  const OperatingPoint& op = cs->envelope.points[0];
  const DesignKnob k = Knob(DesignKnobs(*cs), "oil/line.diameter");  // a copy: the list is a temporary
  REQUIRE(solver.SetKnob(k.loop, k.comp, k.param, k.coupling, 0.008));
  const PointResult wide = solver.Solve(op, false);
  REQUIRE(solver.SetKnob(k.loop, k.comp, k.param, k.coupling, 0.005));
  const PointResult narrow = solver.Solve(op, false);
  REQUIRE(wide.converged);
  REQUIRE(narrow.converged);
  const double q = 2.0 / 60000.0;
  auto velocity = [&](const PointResult& r) {
    for (const ReportItem& it : BranchReport(*cs, r, 1).items)
      if (it.key == "velocity") return it.value;
    return static_cast<double>(NAN);
  };
  CHECK(velocity(wide) == doctest::Approx(4 * q / (M_PI * 0.008 * 0.008)).epsilon(1e-9));
  CHECK(velocity(narrow) == doctest::Approx(4 * q / (M_PI * 0.005 * 0.005)).epsilon(1e-9));
  // A result outlives its solver (`solve` frees the solver before the checks
  // and the writers): it refers to the case alone. (Run under valgrind, this
  // also shows that nothing read here lay in the solver's memory.)
  const PointResult own = CaseSolver(*cs).Solve(op, false);
  REQUIRE(own.converged);
  CHECK(velocity(own) == doctest::Approx(4 * q / (M_PI * 0.006 * 0.006)).epsilon(1e-9));
}
