// Whole-network solves against closed forms worked by hand.
//
// Each test writes a small invented case as JSON text, loads it with
// LoadCaseText (parts library from LOOPWRIGHT_SOURCE_DIR/library), solves it
// with NetworkSystem + NetworkSolver + SolvePoint, and compares flows and
// pressures with the algebra of the textbook laws:
//   Hagen-Poiseuille, laminar pipe:  Q = pi D^4 dp / (128 mu L)   (exact)
//   journal bearing side flow:        Q = K dp / mu,
//                                     K = pi r c^3 (1 + 1.5 eps^2) / (3 l')
//                                     (Shigley, Eq. 12-22, from memory)
//   sharp orifice:                    dp = a Q + b Q^2,
//                                     a = 2 mu / (pi delta^2 d^3),
//                                     b = rho / (2 Cd^2 A0^2)
//                                     (orifice equation with the Wuest
//                                     low-Re term; see components/orifice.h)
//   hydrostatics:                     p = p_surface + rho g (level), and the
//                                     driving head is the difference of
//                                     piezometric heads z + p/(rho g)
//   displacement pump:                Q = D n / (2 pi) - C_s dP / mu
//                                     (Merritt 1967, ch. 7, from memory)
//   centrifugal pump, curve H = H0 - a Q^2 (exact through three points),
//   into a journal bearing:          rho g (H0 - a Q^2) = Q / G_bearing
//                                     (a quadratic in Q; a pump's law falls
//                                     with flow, every other law rises)
//   the hard 64/Re | Colebrook switch: a line whose drop lies between its
//                                     laminar and turbulent drops at
//                                     Re = 2300 carries Q = 2300 pi D mu /
//                                     (4 rho) (the switch's filled graph)
// The fluid is a table fluid of constant properties (rho 870 kg/m3,
// mu 0.05 Pa.s; invented), so the hand algebra uses exactly the state the
// network uses (read back from the system). Every solve also checks mass
// balance at every free node to 1e-9 relative, from the reported flows.
// Every case is solved twice by CTest: by the solver as shipped, and by the
// co-content Newton alone (network/point/nodal.cpp; LW_CO_CONTENT_ONLY).
// Tolerance of the comparisons: 1e-9 relative (the solver converges flows
// to 1e-11 of the largest flow and pressure-law residuals to 1e-6 Pa).
#include <doctest/doctest.h>

#include <cmath>
#include <cstdlib>
#include <map>
#include <memory>
#include <string>
#include <vector>

#include <Eigen/Core>
#include <nlohmann/json.hpp>

#include "network/case/case.h"
#include "network/point/run.h"
#include "network/point/solver.h"
#include "network/point/system.h"

namespace loopwright {
namespace {

using nlohmann::json;

constexpr double kRhoOil = 870.0;  // invented constant-property oil
constexpr double kMuOil = 0.05;

std::string LibraryDir() {
  const char* src = std::getenv("LOOPWRIGHT_SOURCE_DIR");
  return src ? std::string(src) + "/library" : DefaultLibraryDir();
}

json Fluid() {
  return {{"kind", "table"},
          {"viscosity", "dynamic"},
          {"rows", {{250.0, kMuOil, kRhoOil, 2000.0, 0.13}, {450.0, kMuOil, kRhoOil, 2000.0, 0.13}}}};
}

json FreeNode(const std::string& id, double z = 0.0) { return {{"id", id}, {"elevation", z}}; }
json PressureNode(const std::string& id, double p, double z = 0.0) {
  return {{"id", id}, {"elevation", z}, {"boundary", {{"kind", "pressure"}, {"pressure", p}}}};
}
json Reservoir(const std::string& id, double z, double level) {
  return {{"id", id}, {"elevation", z}, {"boundary", {{"kind", "reservoir"}, {"pressure", 0.0}, {"level", level}}}};
}
json Comp(const std::string& id, const std::string& type, const std::string& from, const std::string& to, json params) {
  json c = {{"id", id}, {"type", type}, {"from", from}, {"to", to}};
  for (auto it = params.begin(); it != params.end(); ++it) c[it.key()] = it.value();
  return c;
}

std::string CaseText(const json& nodes, const json& comps) {
  json doc = {{"name", "closed-form test network (invented)"},
              {"description", "built by tests/network/point/closed_form_test.cpp"},
              {"fluids", {{"oil", Fluid()}}},
              {"loops", {{{"id", "oil"}, {"fluid", "oil"}, {"temperature", 313.15}, {"nodes", nodes}, {"components", comps}}}}};
  return doc.dump(2);
}

// A solved case, with look-ups by id.
struct Solved {
  std::unique_ptr<Case> cs;
  std::unique_ptr<NetworkSystem> sys;
  std::unique_ptr<NetworkSolver> solver;
  Eigen::VectorXd u;
  PointResult res;
  double rho = 0, mu = 0;

  double Flow(const std::string& id) const {
    for (const auto& b : res.branches)
      if (cs->loops[b.loop].components[b.comp].id == id) return b.flow_m3s;
    FAIL("no component " << id);
    return 0;
  }
  BranchResult State(const std::string& id) const {
    for (const auto& b : res.branches)
      if (cs->loops[b.loop].components[b.comp].id == id) return BranchState(*cs, res, b);
    FAIL("no component " << id);
    return {};
  }
  double Pressure(const std::string& id) const {
    for (const auto& n : res.nodes)
      if (cs->loops[n.loop].nodes[n.node].id == id) return n.pressure_pa;
    FAIL("no node " << id);
    return 0;
  }
};

// Mass balance at every free node from the reported branch flows.
double WorstMassImbalance(const Solved& s) {
  std::map<int, double> net, gross;
  for (const auto& b : s.res.branches) {
    const auto& c = s.cs->loops[b.loop].components[b.comp];
    net[c.from] -= b.m;
    net[c.to] += b.m;
    gross[c.from] += std::fabs(b.m);
    gross[c.to] += std::fabs(b.m);
  }
  double worst = 0;
  const auto& nodes = s.cs->loops[0].nodes;
  for (size_t i = 0; i < nodes.size(); ++i) {
    if (nodes[i].boundary != BoundaryKind::kNone) continue;
    // Floored at the solver's stated flow floor, 1e-9 m3/s (network/point/solver.h).
    const double scale = std::max(gross[static_cast<int>(i)], 1e-9 * kRhoOil);
    worst = std::max(worst, std::fabs(net[static_cast<int>(i)]) / scale);
  }
  return worst;
}

std::unique_ptr<Solved> SolveText(const std::string& text) {
  LoadResult lr = LoadCaseText(text, "closed_form_case.json", LibraryDir());
  INFO(lr.diagnostics.Format("closed_form_case.json"));
  REQUIRE(lr.value != nullptr);
  auto s = std::make_unique<Solved>();
  s->cs = std::move(lr.value);
  s->sys = std::make_unique<NetworkSystem>(*s->cs);
  // LW_CO_CONTENT_ONLY (set by the second CTest registration of this file):
  // every case solved by the co-content Newton alone, with no plain Newton
  // before it and no Levenberg-Marquardt after it.
  SolverOptions opts;
  if (std::getenv("LW_CO_CONTENT_ONLY")) opts.plain_newton = false, opts.use_fallback = false;
  s->solver = std::make_unique<NetworkSolver>(s->sys.get(), opts);
  s->res = SolvePoint(*s->cs, s->cs->envelope.points[0], s->sys.get(), s->solver.get(), &s->u, false);
  INFO(s->res.summary.Report());
  REQUIRE(s->res.converged);
  s->rho = s->sys->loop_states()[0].rho;
  s->mu = s->sys->loop_states()[0].mu;
  CHECK(std::fabs(s->rho - kRhoOil) <= 1e-12 * kRhoOil);
  CHECK(std::fabs(s->mu - kMuOil) <= 1e-12 * kMuOil);
  const double mb = WorstMassImbalance(*s);
  CHECK(mb <= 1e-9);
  CHECK(s->res.max_mass_imbalance_rel <= 1e-9);
  return s;
}

double Rel(double a, double b) { return std::fabs(a - b) / std::fabs(b); }

// Laminar pipe resistance dp/Q (Hagen-Poiseuille).
double PipeR(double mu, double L, double D) { return 128.0 * mu * L / (M_PI * std::pow(D, 4)); }
// Journal bearing conductance Q/dp (Shigley Eq. 12-22).
double BearingG(double mu, double D, double L, double w, double c, double e) {
  return M_PI * 0.5 * D * c * c * c * (1 + 1.5 * e * e) / (3.0 * mu * 0.5 * (L - w));
}
// Orifice coefficients of dp = a Q + b Q^2 (beta = 0): the viscous term is
// Sampson's creeping flow through a thin plate, dp = 24 mu Q / d^3 (Sampson
// 1891), the inertial term the orifice equation with Cd = 0.61.
void OrificeAB(double rho, double mu, double d, double* a, double* b) {
  const double a0 = M_PI * d * d / 4, cd = 0.61;
  *a = 24.0 * mu / (d * d * d);
  *b = rho / (2.0 * cd * cd * a0 * a0);
}
// Positive root of B u^2 + A u - C = 0 (A, B, C > 0), cancellation-free.
double PosRoot(double B, double A, double C) { return 2.0 * C / (A + std::sqrt(A * A + 4.0 * B * C)); }
// Reynolds number of a pipe flow.
double Re(double rho, double mu, double q, double D) { return 4.0 * rho * std::fabs(q) / (M_PI * D * mu); }

const json kPipe = {{"length", 2.0}, {"diameter", 0.004}};
const json kBearing = {{"diameter", 0.03}, {"length", 0.02}, {"groove_width", 0.004},
                       {"radial_clearance", 60e-6}, {"eccentricity", 0.5}};
const json kBearing2 = {{"diameter", 0.025}, {"length", 0.018}, {"groove_width", 0.004},
                        {"radial_clearance", 45e-6}, {"eccentricity", 0.3}};
const json kOrifice = {{"diameter", 0.001}};

TEST_CASE("Hagen-Poiseuille: one laminar pipe between two pressure boundaries (exact); declared backwards it "
          "carries the same flow negative") {
  auto s = SolveText(CaseText({PressureNode("a", 2e5), PressureNode("b", 0.0)},
                              {Comp("p", "pipe", "a", "b", kPipe), Comp("p_back", "pipe", "b", "a", kPipe)}));
  const double q = 2e5 / PipeR(s->mu, 2.0, 0.004);
  REQUIRE(Re(s->rho, s->mu, q, 0.004) < 100);  // Churchill = 64/Re exactly
  CHECK(Rel(s->Flow("p"), q) <= 1e-9);
  CHECK(Rel(s->Flow("p_back"), -q) <= 1e-9);
  MESSAGE("Hagen-Poiseuille pipe: rel. error " << Rel(s->Flow("p"), q));
}

TEST_CASE("series of linear resistances: laminar pipe + journal bearing") {
  auto s = SolveText(CaseText({PressureNode("a", 3e5), FreeNode("n1"), PressureNode("b", 0.0)},
                              {Comp("feed", "pipe", "a", "n1", kPipe), Comp("brg", "journal_bearing", "n1", "b", kBearing)}));
  const double rp = PipeR(s->mu, 2.0, 0.004), rb = 1.0 / BearingG(s->mu, 0.03, 0.02, 0.004, 60e-6, 0.5);
  const double q = 3e5 / (rp + rb);
  REQUIRE(Re(s->rho, s->mu, q, 0.004) < 100);
  CHECK(Rel(s->Flow("feed"), q) <= 1e-9);
  CHECK(Rel(s->Flow("brg"), q) <= 1e-9);
  CHECK(Rel(s->Pressure("n1"), 3e5 - rp * q) <= 1e-9);
  MESSAGE("pipe + bearing in series: rel. errors Q " << Rel(s->Flow("feed"), q) << ", p "
                                                    << Rel(s->Pressure("n1"), 3e5 - rp * q));
}

TEST_CASE("series of a linear and a quadratic resistance: laminar pipe + orifice") {
  auto s = SolveText(CaseText({PressureNode("a", 4e5), FreeNode("n1"), PressureNode("b", 0.0)},
                              {Comp("feed", "pipe", "a", "n1", kPipe), Comp("jet", "orifice", "n1", "b", kOrifice)}));
  const double rp = PipeR(s->mu, 2.0, 0.004);
  double a, b;
  OrificeAB(s->rho, s->mu, 0.001, &a, &b);
  // 4e5 = (rp + a) Q + b Q^2
  const double q = PosRoot(b, rp + a, 4e5);
  REQUIRE(Re(s->rho, s->mu, q, 0.004) < 100);
  CHECK(b * q * q > 0.1 * a * q);  // the quadratic term matters
  CHECK(Rel(s->Flow("jet"), q) <= 1e-9);
  CHECK(Rel(s->Pressure("n1"), a * q + b * q * q) <= 1e-9);
  MESSAGE("pipe + orifice in series: rel. error Q " << Rel(s->Flow("jet"), q));
}

TEST_CASE("parallel branches: a feed pipe into two journal bearings and an orifice") {
  auto s = SolveText(CaseText({PressureNode("a", 5e5), FreeNode("n1"), PressureNode("b", 0.0)},
                              {Comp("feed", "pipe", "a", "n1", {{"length", 1.0}, {"diameter", 0.005}}),
                               Comp("brg1", "journal_bearing", "n1", "b", kBearing),
                               Comp("brg2", "journal_bearing", "n1", "b", kBearing2),
                               Comp("jet", "orifice", "n1", "b", kOrifice)}));
  const double rp = PipeR(s->mu, 1.0, 0.005);
  const double g1 = BearingG(s->mu, 0.03, 0.02, 0.004, 60e-6, 0.5);
  const double g2 = BearingG(s->mu, 0.025, 0.018, 0.004, 45e-6, 0.3);
  double a, b;
  OrificeAB(s->rho, s->mu, 0.001, &a, &b);
  // Node n1 at p, orifice flow u with p = a u + b u^2, and
  // P_A - p = rp (G p + u), G = g1 + g2:
  //   (1 + rp G) b u^2 + ((1 + rp G) a + rp) u - P_A = 0.
  const double k = 1.0 + rp * (g1 + g2);
  const double u = PosRoot(k * b, k * a + rp, 5e5);
  const double p = a * u + b * u * u;
  REQUIRE(Re(s->rho, s->mu, (5e5 - p) / rp, 0.005) < 100);
  double worst = 0;
  for (auto [got, want] : std::vector<std::pair<double, double>>{{s->Flow("jet"), u},
                                                               {s->Pressure("n1"), p},
                                                               {s->Flow("brg1"), g1 * p},
                                                               {s->Flow("brg2"), g2 * p},
                                                               {s->Flow("feed"), (5e5 - p) / rp}}) {
    CHECK(Rel(got, want) <= 1e-9);
    worst = std::max(worst, Rel(got, want));
  }
  MESSAGE("parallel bearings + orifice: worst rel. error " << worst);
}

TEST_CASE("hydrostatic column: two reservoirs, a siphon over a crest; no flow when the levels balance") {
  // Reservoir "upper": node 3 m up, surface at the node (level 0); reservoir
  // "lower": node at 0 m, surface `level` above it. Piezometric heads
  // z + p/(rho g): 3 m and `level`. The line rises to a crest at 10 m, so
  // the crest's gauge pressure is below ambient (a siphon):
  //   p_crest = 0 + rho g (3 - 10) - R1 Q.
  const json pipe = {{"length", 5.0}, {"diameter", 0.004}};
  for (double level : {3.0, 1.0, 5.0}) {
    CAPTURE(level);
    auto s = SolveText(CaseText({Reservoir("upper", 3.0, 0.0), FreeNode("crest", 10.0), Reservoir("lower", 0.0, level)},
                                {Comp("up_leg", "pipe", "upper", "crest", pipe), Comp("down_leg", "pipe", "crest", "lower", pipe)}));
    const double g = 9.80665;  // kGravity of the network (standard gravity)
    const double r = PipeR(s->mu, 5.0, 0.004);
    const double q = s->rho * g * (3.0 - level) / (2.0 * r);
    const double p_crest = s->rho * g * (3.0 - 10.0) - r * q;
    CHECK(Rel(s->Pressure("lower"), s->rho * g * level) <= 1e-12);
    CHECK(Rel(s->Pressure("crest"), p_crest) <= 1e-9);
    if (level == 3.0) {
      // Balanced: no flow (to far below the flow of a 1 m imbalance).
      const double q1 = s->rho * g * 1.0 / (2.0 * r);
      CHECK(std::fabs(s->Flow("up_leg")) <= 1e-9 * q1);
      CHECK(std::fabs(s->Flow("down_leg")) <= 1e-9 * q1);
    } else {
      REQUIRE(Re(s->rho, s->mu, q, 0.004) < 100);
      CHECK(Rel(s->Flow("up_leg"), q) <= 1e-9);
      CHECK(Rel(s->Flow("down_leg"), q) <= 1e-9);
      CHECK((s->Flow("up_leg") > 0) == (level < 3.0));  // downhill in head
      // Each leg as read back (BranchState): its ends at the closed-form node
      // pressures, its piezometric drop p_from - p_to + rho g (z_from - z_to)
      // its own Hagen-Poiseuille drop R Q, the oil's density and viscosity.
      const BranchResult up = s->State("up_leg"), down = s->State("down_leg");
      CHECK(std::fabs(up.p_from) <= 1e-12 * std::fabs(p_crest));
      CHECK(Rel(up.p_to, p_crest) <= 1e-9);
      CHECK(Rel(down.p_from, p_crest) <= 1e-9);
      CHECK(Rel(down.p_to, s->rho * g * level) <= 1e-12);
      CHECK(Rel(up.dp, r * q) <= 1e-9);
      CHECK(Rel(down.dp, r * q) <= 1e-9);
      CHECK(Rel(up.rho, kRhoOil) <= 1e-12);
      CHECK(Rel(down.mu, kMuOil) <= 1e-12);
      CHECK(up.t_in == 313.15);  // the loop's temperature (an isothermal point)
      MESSAGE("hydrostatic column, lower level " << level << " m: rel. errors Q " << Rel(s->Flow("up_leg"), q)
                                                 << ", p(crest) " << Rel(s->Pressure("crest"), p_crest));
    }
  }
}

TEST_CASE("positive-displacement pump against one orifice: Q and dp in closed form, without and with slip") {
  // Pump from the sump into node "out", orifice from "out" back to the sump.
  const double disp = 5e-6, n = 1500.0 * 2 * M_PI / 60;  // 5 cm3/rev at 1500 rpm: 7.5 L/min
  const double qg = disp * n / (2 * M_PI);
  const json orf = {{"diameter", 0.0015}};
  for (double cs : {0.0, 2e-13}) {
    CAPTURE(cs);
    json pump = {{"displacement", disp}, {"speed", n}};
    if (cs > 0) pump["slip"] = cs;
    auto s = SolveText(CaseText({Reservoir("sump", 0.0, 0.0), FreeNode("out")},
                                {Comp("pump", "displacement_pump", "sump", "out", pump), Comp("jet", "orifice", "out", "sump", orf)}));
    double a, b;
    OrificeAB(s->rho, s->mu, 0.0015, &a, &b);
    double q = qg;
    if (cs > 0) {
      // dp = a Q + b Q^2 = mu (qg - Q) / cs  ->  b Q^2 + (a + mu/cs) Q - mu qg / cs = 0
      q = PosRoot(b, a + s->mu / cs, s->mu * qg / cs);
      CHECK(q < 0.99 * qg);
    }
    CHECK(Rel(s->Flow("pump"), q) <= 1e-9);
    CHECK(Rel(s->Flow("jet"), q) <= 1e-9);
    CHECK(Rel(s->Pressure("out"), a * q + b * q * q) <= 1e-9);
    MESSAGE("pump vs orifice, slip " << cs << ": rel. errors Q " << Rel(s->Flow("pump"), q) << ", dp "
                                     << Rel(s->Pressure("out"), a * q + b * q * q));
  }
}

TEST_CASE("flow reversal in a branch: a bearing declared from the drain to the feed runs negative") {
  // a (3 bar) -> pipe R1 -> n1 -> pipe R2 -> b (0); the bearing "back" is
  // declared from b to n1, so its flow n1 -> b is negative:
  //   p = (P_A / R1) / (1/R1 + 1/R2 + G),  m(back) = G (0 - p) rho < 0.
  auto s = SolveText(CaseText({PressureNode("a", 3e5), FreeNode("n1"), PressureNode("b", 0.0)},
                              {Comp("p1", "pipe", "a", "n1", kPipe), Comp("p2", "pipe", "n1", "b", kPipe),
                               Comp("back", "journal_bearing", "b", "n1", kBearing)}));
  const double r = PipeR(s->mu, 2.0, 0.004), g = BearingG(s->mu, 0.03, 0.02, 0.004, 60e-6, 0.5);
  const double p = (3e5 / r) / (2.0 / r + g);
  CHECK(Rel(s->Pressure("n1"), p) <= 1e-9);
  CHECK(s->Flow("back") < 0);
  CHECK(Rel(s->Flow("back"), -g * p) <= 1e-9);
  CHECK(Rel(s->Flow("p2"), p / r) <= 1e-9);
  MESSAGE("reversed branch: rel. error " << Rel(s->Flow("back"), -g * p));
}

}  // namespace
}  // namespace loopwright

namespace loopwright {
namespace {

// The filled graph of the hard switch. Line B (laminar_colebrook) is fed
// through line A (laminar, Re_A = 1150). The feed pressure is chosen so that
// at B's switch flow Q_sw = 2300 pi D_B mu / (4 rho) B's drop is 1.3 times
// its laminar drop there: above the laminar value (64/2300) and below the
// turbulent one (Colebrook at Re 2300 and rr 7.5e-5: f = 0.04734, python3-
// fluids 1.0 Colebrook; 1.70 times the laminar), so the only answer is
// Q = Q_sw and p(n1) = 1.3 x the laminar drop of B (closed form).
TEST_CASE("the hard 64/Re | Colebrook switch: a line whose drop lies in the jump carries the switch flow") {
  const double rho = kRhoOil, mu = kMuOil, db = 0.02, lb = 1.0, da = 0.04, la = 10.0;
  const double q_sw = 2300.0 * M_PI * db * mu / (4.0 * rho);
  const double v = q_sw / (M_PI * db * db / 4.0);
  const double lam_b = 64.0 / 2300.0 * lb / db * rho * v * v / 2.0;
  const double p_n1 = 1.3 * lam_b, p_feed = p_n1 + PipeR(mu, la, da) * q_sw;
  const json line_a = {{"length", la}, {"diameter", da}, {"friction", "laminar_colebrook"}};
  const json line_b = {{"length", lb}, {"diameter", db}, {"friction", "laminar_colebrook"}};
  auto s = SolveText(CaseText({PressureNode("a", p_feed), FreeNode("n1"), PressureNode("b", 0.0)},
                              {Comp("A", "pipe", "a", "n1", line_a), Comp("B", "pipe", "n1", "b", line_b)}));
  CHECK(Rel(s->Flow("B"), q_sw) <= 1e-9);
  CHECK(Rel(s->Pressure("n1"), p_n1) <= 1e-9);
  std::string regime;
  for (const auto& b : s->res.branches)
    if (s->cs->loops[0].components[b.comp].id == "B")
      for (const auto& it : BranchReport(*s->cs, s->res, b).items)
        if (it.key == "reynolds") regime = it.text;
  CHECK(regime == "at_switch");
  MESSAGE("switch: Q rel. error " << Rel(s->Flow("B"), q_sw) << ", p rel. error " << Rel(s->Pressure("n1"), p_n1)
                                   << "; " << s->res.summary.Report());
}

}  // namespace
}  // namespace loopwright

namespace loopwright {
namespace {

TEST_CASE("centrifugal pump into a journal bearing: the operating point in closed form") {
  // H(Q) = 40 m - 2e6 s2/m5 Q^2 through (0, 40), (0.002, 32), (0.004, 8) (invented curve).
  const json pump = {{"curve", {{0.0, 40.0}, {0.002, 32.0}, {0.004, 8.0}}}, {"speed", 300.0}, {"rated_speed", 300.0}};
  auto s = SolveText(CaseText({PressureNode("sump", 0.0), FreeNode("out"), PressureNode("drain", 0.0)},
                              {Comp("pump", "centrifugal_pump", "sump", "out", pump),
                               Comp("brg", "journal_bearing", "out", "drain", kBearing)}));
  const double g = 9.80665, G = BearingG(s->mu, 0.03, 0.02, 0.004, 60e-6, 0.5);
  const double q = PosRoot(s->rho * g * 2e6, 1.0 / G, s->rho * g * 40.0);
  CHECK(Rel(s->Flow("brg"), q) <= 1e-9);
  CHECK(Rel(s->Pressure("out"), q / G) <= 1e-9);
  MESSAGE("centrifugal pump + bearing: rel. errors Q " << Rel(s->Flow("brg"), q) << ", p "
                                                      << Rel(s->Pressure("out"), q / G));
}

}  // namespace
}  // namespace loopwright
