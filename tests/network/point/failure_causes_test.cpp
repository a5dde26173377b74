// Every failure has a cause and a place (network/point/failure_causes.h): the
// pressure floors of the fluids against IAPWS-IF97; physically impossible
// converged states rejected with the node and the component; the cause
// classifier on small invented cases that provoke each cause
// (tests/network/failure_cases/*.json and check_cases/dead_headed.json, all
// data invented); the mass-balance closure figure on a node that carries
// round-off only.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include "library/glycol.h"
#include "library/oil.h"
#include "library/water.h"
#include "network/case/case.h"
#include "network/point/failure_causes.h"
#include "network/point/run.h"
#include "tests/tools/source_dir.h"

using loopwright::testing::ReadText;

namespace loopwright {
namespace {

using testing::SourceDir;


std::unique_ptr<Case> LoadText(const std::string& text, const std::string& path) {
  LoadResult lr = LoadCaseText(text, path, SourceDir() + "/library", size_t(1) << 24);
  INFO(lr.diagnostics.Format(path));
  REQUIRE(lr.value != nullptr);
  return std::move(lr.value);
}

std::string CasePath(const std::string& name) { return SourceDir() + "/tests/network/" + name; }

std::unique_ptr<Case> Load(const std::string& name) { return LoadText(ReadText(CasePath(name)), CasePath(name)); }

PointResult SolveNamed(const Case& cs, const std::string& point) {
  CaseSolver solver(cs);
  const int pi = FindPoint(cs, point);
  REQUIRE(pi >= 0);
  return solver.Solve(cs.envelope.points[pi], false);
}

bool Has(const std::string& text, const std::string& part) { return text.find(part) != std::string::npos; }

// Every point that is not a result names its equations and a cause.
void RequireExplained(const PointResult& r) {
  INFO(r.summary.Report());
  REQUIRE_FALSE(r.converged);
  CHECK_FALSE(r.summary.worst.empty());
  CHECK_FALSE(r.summary.cause.empty());
  CHECK_FALSE(r.summary.cause_kind.empty());
  CHECK_FALSE(r.summary.place.empty());
  CHECK(r.nodes.empty());
  CHECK(r.branches.empty());
}

// A point that is not a result, for the expected reason and kind.
void ExpectCause(const PointResult& r, Termination t, const std::string& kind) {
  RequireExplained(r);
  CHECK(r.summary.termination == t);
  CHECK(r.summary.cause_kind == kind);
}

// Point `point` of case `name` solved cold: not a result, of `kind` at `place`.
PointResult ExpectAt(const std::string& name, const std::string& point, const std::string& kind,
                     const std::string& place) {
  auto cs = Load(name);
  PointResult r = SolveNamed(*cs, point);
  RequireExplained(r);
  CHECK(r.summary.cause_kind == kind);
  CHECK(r.summary.place == place);
  return r;
}

// Case `name` with the first `from` replaced by `to` (a control variant).
std::unique_ptr<Case> LoadEdited(const std::string& name, const std::string& from, const std::string& to) {
  std::string text = ReadText(CasePath(name));
  REQUIRE(Has(text, from));
  text.replace(text.find(from), from.size(), to);
  return LoadText(text, CasePath(name));
}

}  // namespace

TEST_CASE("pressure floors: water and glycol by IF97 Eq. 30, oils by the air-release floor") {
  // IAPWS-IF97 (R7-97(2012)) Table 35 verification values of psat(T).
  WaterFluid water;
  CHECK(water.LowestPressure(300.0).p_abs_Pa == doctest::Approx(0.353658941e-2 * 1e6).epsilon(1e-8));
  CHECK(water.LowestPressure(500.0).p_abs_Pa == doctest::Approx(0.263889776e1 * 1e6).epsilon(1e-8));
  CHECK(water.LowestPressure(600.0).p_abs_Pa == doctest::Approx(0.123443146e2 * 1e6).epsilon(1e-8));
  // At loop temperatures, against python3-iapws (iapws.iapws97._PSat_T):
  // 40 degC 7384.427 Pa, 90 degC 70182.36 Pa.
  CHECK(water.LowestPressure(313.15).p_abs_Pa == doctest::Approx(7384.42748706953).epsilon(1e-9));
  CHECK(water.LowestPressure(363.15).p_abs_Pa == doctest::Approx(70182.36074477127).epsilon(1e-9));
  CHECK(Has(water.LowestPressure(363.15).what, "vapour"));
  // Glycol mixtures: water's vapour pressure (conservative: glycol lowers it).
  auto eg = GlycolWaterFluid::Create(Glycol::kEthylene, 0.5);
  REQUIRE(eg != nullptr);
  CHECK(eg->LowestPressure(363.15).p_abs_Pa == doctest::Approx(70182.36074477127).epsilon(1e-9));
  // Oils: the documented floor, inside the 1-10 kPa abs band quoted for
  // gaseous cavitation of mineral oils (common practice).
  auto case_oil = Load("failure_cases/reversed_pump.json");
  const PressureFloor f = case_oil->loops[0].fluid->LowestPressure(323.15);
  CHECK(f.p_abs_Pa >= 1e3);
  CHECK(f.p_abs_Pa <= 10e3);
  CHECK(Has(f.what, "air-release"));
}

TEST_CASE("a pump placed backwards pulls its inlet below vacuum: not a result, with node and component") {
  PointResult r = ExpectAt("failure_cases/reversed_pump.json", "run", "cavitation", "node oil/pump_out");
  CHECK(r.summary.termination == Termination::kUnphysical);
  CHECK(Has(r.summary.cause, "displacement_pump oil/pump"));
  CHECK(Has(r.summary.cause, "below zero absolute"));
  CHECK(Has(r.summary.cause, "from/to are swapped"));
  REQUIRE(r.summary.worst.size() == 1);
  CHECK(r.summary.worst[0].violation);
  // p_abs - floor < -floor: below zero absolute.
  CHECK(r.summary.worst[0].residual < -kAirReleaseFloorPa);
  // Positive control: the same loop with the pump the right way round is a
  // result, and every node stays above the oil's floor.
  auto fixed = LoadEdited("failure_cases/reversed_pump.json", "\"from\": \"pump_out\", \"to\": \"pump_in\"",
                          "\"from\": \"pump_in\", \"to\": \"pump_out\"");
  PointResult ok = SolveNamed(*fixed, "run");
  INFO(ok.summary.Report());
  REQUIRE(ok.converged);
  for (const auto& n : ok.nodes) CHECK(n.pressure_pa + fixed->ambient_pa > kAirReleaseFloorPa);
}

TEST_CASE("a backwards pump in a thermal loop: the cavitation is the cause, not the energy balance that fails on it") {
  PointResult r = ExpectAt("failure_cases/reversed_pump_thermal.json", "sweep[boost=0 psi, tin=15 degC]", "cavitation",
                           "node oil/pout");
  CHECK(r.summary.termination == Termination::kUnphysical);
  CHECK(Has(r.summary.cause, "from/to are swapped"));
  // The energy balance now closes at this state too (a draining boundary
  // that nothing flows into holds its receiver's oil, thermal.h), so the
  // converged state itself is refused: no energy-balance failure is named.
  CHECK_FALSE(Has(r.summary.cause, "energy balance"));
  CHECK(r.summary.newton_iterations > 0);  // the solver's own figures are kept
}

// A campaign network (seed 6750): the housing at 1.75 bar g stands above a
// bearing's feed, so the bearing runs backwards, oil drawn out of its
// housing. The housing that nothing drains into holds the oil of the sump it
// drains to (thermal.h), so the point converges; the reversed bearing is
// named in its component warnings (and fails feed_pressure_margin in a
// check), as at an isothermal point.
TEST_CASE("a bearing run backwards out of its housing: the point converges and names the bearing") {
  auto cs = Load("failure_cases/reversed_bearing_housing_above_feed.json");
  PointResult r = SolveNamed(*cs, "nominal");
  INFO(r.summary.Report());
  REQUIRE(r.converged);
  const BranchOutcome* bearing = nullptr;
  for (const auto& b : r.branches)
    if (cs->loops[b.loop].components[b.comp].id == "journal_bearing_8") bearing = &b;
  REQUIRE(bearing != nullptr);
  CHECK(bearing->m < 0);
  bool warned = false;
  for (const auto& w : BranchReport(*cs, r, *bearing).warnings) warned |= Has(w, "flow reversed");
  CHECK(warned);
  // The housing n1 (nothing arrives: its only bearing runs out of it) is at
  // the temperature of the sump n0 it drains to.
  double t_housing = NAN, t_sump = NAN;
  for (const auto& n : r.nodes) {
    if (cs->loops[n.loop].nodes[n.node].id == "n1") t_housing = n.temperature_k;
    if (cs->loops[n.loop].nodes[n.node].id == "n0") t_sump = n.temperature_k;
  }
  CHECK(t_housing == doctest::Approx(t_sump).epsilon(1e-9));
}

TEST_CASE("water below its vapour pressure is rejected; just above it is a result") {
  // A water loop at 90 degC: psat = 70182.36 Pa (python3-iapws). The states
  // are set by hand on the case's nodes; RejectUnphysical reads only them.
  auto cs = Load("failure_cases/pipe_on_switch.json");
  auto state = [&](double p_abs) {
    PointResult r;
    r.converged = true;
    r.summary.termination = Termination::kConverged;
    for (int i = 0; i < 3; ++i) {
      NodeResult n;
      n.loop = 0;
      n.node = i;
      n.boundary = true;  // no branches here: held pressures, not solved ones
      n.pressure_pa = (i == 1 ? p_abs : 101325.0) - cs->ambient_pa;
      n.temperature_k = 363.15;
      r.nodes.push_back(n);
    }
    return r;
  };
  PointResult below = state(70182.36 - 500.0);
  CHECK(RejectUnphysical(*cs, &below));
  CHECK(below.summary.cause_kind == "cavitation");
  CHECK(below.summary.place == "node line/middle");
  CHECK(Has(below.summary.cause, "boil"));
  CHECK(below.summary.worst.at(0).residual == doctest::Approx(-500.0).epsilon(1e-3));
  PointResult above = state(70182.36 + 500.0);
  CHECK_FALSE(RejectUnphysical(*cs, &above));
  CHECK(above.converged);
}

TEST_CASE("temperatures: within the slack of the fluid's range a warning, beyond it not a result") {
  // Water's model range ends at 150 degC (IAPWS-IF97 region 1 as used here);
  // the slack is kFluidRangeSlackK = 20 K. At 10 bar g the liquid is below
  // its vapour pressure at neither temperature (psat(175 degC) = 0.892 MPa,
  // IF97 Eq. 30).
  auto cs = Load("failure_cases/pipe_on_switch.json");
  auto state = [&](double t_c) {
    PointResult r;
    r.converged = true;
    r.thermal = true;
    r.summary.termination = Termination::kConverged;
    NodeResult n;
    n.loop = 0;
    n.node = 1;
    n.boundary = true;  // no branches here: a held pressure, not a solved one
    n.pressure_pa = 10e5;
    n.temperature_k = 273.15 + t_c;
    r.nodes.push_back(n);
    return r;
  };
  PointResult mild = state(150.0 + kFluidRangeSlackK - 5.0);
  CHECK_FALSE(RejectUnphysical(*cs, &mild));
  PointResult far = state(150.0 + kFluidRangeSlackK + 5.0);
  CHECK(RejectUnphysical(*cs, &far));
  CHECK(far.summary.cause_kind == "fluid-temperature-range");
  CHECK(far.summary.place == "node line/middle");
  PointResult nan = state(NAN);
  CHECK(RejectUnphysical(*cs, &nan));
}

TEST_CASE("a bearing fed through a nearly shut valve: warning, rejected, runaway") {
  auto cs = Load("failure_cases/starved_bearing.json");
  CaseSolver solver(*cs);
  auto solve = [&](const std::string& name) { return solver.Solve(cs->envelope.points[FindPoint(*cs, name)], false); };
  PointResult fed = solve("fed");
  INFO(fed.summary.Report());
  REQUIRE(fed.converged);
  CHECK(fed.warnings.empty());
  // Opening 0.0135: the drain runs a few kelvin past the oil model (its
  // viscosity falls below D341's 2 cSt): a result with a warning naming the node.
  PointResult warm = solve("warm");
  INFO(warm.summary.Report());
  REQUIRE(warm.converged);
  REQUIRE_FALSE(warm.warnings.empty());
  CHECK(Has(warm.warnings[0], "node housing"));
  // Opening 0.002: converges hundreds of kelvin past the model: not a result.
  PointResult throttled = solve("throttled");
  // (its 449 W would raise its own 0.019 L/min by thousands of kelvin)
  ExpectCause(throttled, Termination::kUnphysical, "bearing-starved");
  CHECK(throttled.summary.place == "node oil/housing");
  CHECK(Has(throttled.summary.cause, "journal_bearing oil/bearing"));
  CHECK(throttled.summary.worst.at(0).residual > 273.15 + 200.0 + kFluidRangeSlackK);
  // Shut (seat leakage only): the energy balance runs away.
  PointResult starved = solve("starved");
  ExpectCause(starved, Termination::kEnergyBalance, "bearing-starved");
  CHECK(Has(starved.summary.cause, "journal_bearing oil/bearing"));
  for (const auto& w : starved.summary.worst) CHECK(w.unit == "W");
  CHECK_FALSE(Has(starved.summary.Report(), "non-finite"));
}

TEST_CASE("a starved bearing's outlet stream far out of range, its drain mixed into range") {
  auto cs = Load("failure_cases/mixed_drain.json");
  for (const char* point : {"throttled", "shut"}) {
    CAPTURE(point);
    PointResult r = SolveNamed(*cs, point);
    ExpectCause(r, Termination::kUnphysical, "bearing-starved");
    // Named by the component: every node passed the range test first.
    CHECK(r.summary.place == "component oil/bearing");
    CHECK(r.summary.worst.at(0).branch >= 0);
    CHECK(r.summary.worst.at(0).residual > 273.15 + 200.0 + kFluidRangeSlackK);
  }
}

TEST_CASE("a loop whose only heat sink is far too small runs hot as a whole") {
  PointResult r = ExpectAt("failure_cases/heat_sink_small.json", "fed", "heat-sink-too-small", "node oil/sump");
  CHECK(r.summary.termination == Termination::kUnphysical);
  CHECK(Has(r.summary.cause, "sump's loss to ambient"));
  // Steady state (closed form): the sump sheds all the heat, G (T - T_room)
  // = H, and H holds at least the bearing's 600 W of heat soak, so
  // T >= 25 degC + 600 W / 2 W/K = 325 degC.
  CHECK(r.summary.worst.at(0).unit == "K");
  CHECK(r.summary.worst.at(0).residual >= 273.15 + 25.0 + 600.0 / 2.0);
}

TEST_CASE("heat in and no heat out: the energy balance has no outlet") {
  auto cs = Load("failure_cases/no_heat_outlet.json");
  PointResult r = SolveNamed(*cs, "fed");
  ExpectCause(r, Termination::kEnergyBalance, "energy-no-outlet");
  CHECK(Has(r.summary.cause, "Loop oil"));
  // Control: the same loop with the sump losing heat to the room converges.
  auto with_loss = Load("failure_cases/starved_bearing.json");
  CHECK(SolveNamed(*with_loss, "fed").converged);
}

TEST_CASE("a gear pump dead-headed against a shut valve") {
  PointResult r = ExpectAt("check_cases/dead_headed.json", "closed", "dead-headed-pump", "node oil/delivery");
  CHECK(Has(r.summary.cause, "displacement_pump oil/pump"));
  CHECK(Has(r.summary.cause, "valve oil/valve"));
}

TEST_CASE("two components that both impose their flow at one node, disagreeing") {
  PointResult r = ExpectAt("failure_cases/fixed_flows_disagree.json", "run", "fixed-flows-disagree",
                           "node oil/delivery");
  // The imposed flows by closed form: 4 cm3/rev x 1450 rpm = 5.8 L/min in,
  // the consumer's 2 L/min out.
  CHECK(Has(r.summary.cause, "displacement_pump oil/pump brings in 5.8 L/min"));
  CHECK(Has(r.summary.cause, "fixed_flow oil/consumer takes out 2 L/min"));
}

TEST_CASE("a node between two components that impose the same flow has no pressure") {
  PointResult r = ExpectAt("failure_cases/undetermined_pressure.json", "run", "pressure-undetermined",
                           "node oil/delivery");
  CHECK(r.summary.termination == Termination::kUnphysical);
  CHECK(Has(r.summary.cause, "displacement_pump oil/pump"));
  CHECK(Has(r.summary.cause, "fixed_flow oil/consumer"));
  // Control: with slip (Q = 6 L/min - C_s dp / mu) the pump's flow depends on
  // its pressure rise, which fixes the node's pressure: the consumer's 6 L/min
  // needs no slip, so the node sits at the sump's pressure.
  auto slipping = LoadEdited("failure_cases/undetermined_pressure.json", "\"slip\": 0}", "\"slip\": 2e-13}");
  PointResult ok = SolveNamed(*slipping, "run");
  INFO(ok.summary.Report());
  REQUIRE(ok.converged);
  // Zero to the solver's flow tolerance: |dp| <= 1e-11 Q mu / C_s, about
  // 1e-11 x 1e-4 m3/s x 0.017 Pa.s / 2e-13 m3 = 9e-5 Pa (VG 32 at 50 degC).
  CHECK(std::abs(BranchState(*slipping, ok, 0).dp) < 1e-4);  // [Pa]
}

// The switch's filled graph (components/correlations/friction.h): both lines
// carry the switch flow Q = 2300 pi D mu / (4 rho) (Re = rho V D / mu with
// V = 4 Q / (pi D^2)), and the middle pressure is not determined by the laws,
// which the result says at that node.
TEST_CASE("two lines held on the laminar-turbulent switch of a hard friction law") {
  const std::string path = CasePath("failure_cases/pipe_on_switch.json");
  auto cs = Load("failure_cases/pipe_on_switch.json");
  PointResult r = SolveNamed(*cs, "run");
  INFO(r.summary.Report());
  REQUIRE(r.converged);
  for (const auto& b : r.branches) {
    const double q_sw = 2300.0 * M_PI * 0.010 * BranchState(*cs, r, b).mu / (4.0 * BranchState(*cs, r, b).rho);
    CHECK(std::abs(b.m / BranchState(*cs, r, b).rho - q_sw) <= 1e-9 * q_sw);
    bool at_switch = false;
    for (const auto& it : BranchReport(*cs, r, b).items) at_switch = at_switch || (it.key == "reynolds" && it.text == "at_switch");
    CHECK(at_switch);
  }
  bool warned = false;
  for (const auto& w : r.warnings) warned = warned || (Has(w, "line/middle") && Has(w, "not determined"));
  CHECK(warned);
  // Control: the same lines with the smooth Churchill law, in the transition
  // range (the premise of the case: the drop sits at the switch).
  std::string text = ReadText(path);
  const std::string hard = "laminar_colebrook";
  for (size_t at; (at = text.find(hard)) != std::string::npos;) text.replace(at, hard.size(), "churchill_1977");
  auto smooth = LoadText(text, path);
  PointResult ok = SolveNamed(*smooth, "run");
  INFO(ok.summary.Report());
  REQUIRE(ok.converged);
  for (const auto& it : BranchReport(*smooth, ok, 0).items)
    if (it.key == "reynolds") {
      CHECK(it.value > 2000);
      CHECK(it.value < 4000);
    }
}

TEST_CASE("classifier on hand-made states: non-finite law, unsettled coupling, generic residual") {
  // States set by hand on the pipe_on_switch case's nodes and tubes; the
  // classifier reads only the summary's rows and these states.
  auto cs = Load("failure_cases/pipe_on_switch.json");
  PointResult at;
  const double pressure[3] = {1000.0, 500.0, 0.0};  // [Pa] gauge: the tubes run 0 -> 1 -> 2
  for (int i = 0; i < 3; ++i) {
    NodeResult n;
    n.node = i;
    n.boundary = i != 1;
    n.pressure_pa = pressure[i];
    n.temperature_k = 293.15;
    at.nodes.push_back(n);
  }
  at.loop_states = {{0, 293.15, 998.2, 1.0e-3, nullptr}};
  for (int k = 0; k < 2; ++k) {
    BranchOutcome b;
    b.comp = k;
    b.m = 0.01;
    b.flow_m3s = 0.01 / 998.2;
    at.branches.push_back(b);
  }
  SolverSummary nf;
  nf.termination = Termination::kLineSearchFailed;
  nf.worst = {{"component line/run_b (tube)", NAN, "Pa", 1, -1}};
  ExplainFailure(*cs, at, &nf);
  CHECK(nf.cause_kind == "non-finite-law");
  CHECK(nf.place == "component line/run_b");
  SolverSummary cp;
  cp.termination = Termination::kCouplingNotSettled;
  cp.worst = {{"temperature change between passes at node line/middle", 0.25, "K", -1, 1}};
  ExplainFailure(*cs, at, &cp);
  CHECK(cp.cause_kind == "coupling-not-settled");
  CHECK(cp.place == "node line/middle");
  SolverSummary gen;
  gen.termination = Termination::kMaxIterations;
  gen.worst = {{"component line/run_a (tube)", 3.0, "Pa", 0, -1}};
  ExplainFailure(*cs, at, &gen);
  CHECK(gen.cause_kind == "residual-not-resolved");
  CHECK(gen.place == "component line/run_a");
  CHECK(Has(gen.cause, "0.005 bar"));  // its drop, (1000 - 500) Pa
}

TEST_CASE("mass-balance closure: a node with round-off flow only does not read 1.0") {
  auto cs = Load("failure_cases/closed_check_valve.json");
  PointResult r = SolveNamed(*cs, "run");
  INFO(r.summary.Report());
  REQUIRE(r.converged);
  // Independent recomputation from the reported branch flows: net mass flow
  // at each free node, the loop's largest branch flow.
  std::vector<double> net(cs->loops[0].nodes.size(), 0.0), gross(net.size(), 0.0);
  double largest = 0;
  for (const auto& b : r.branches) {
    const ComponentSpec& c = cs->loops[0].components[b.comp];
    net[c.from] -= b.m;
    net[c.to] += b.m;
    gross[c.from] += std::abs(b.m);
    gross[c.to] += std::abs(b.m);
    largest = std::max(largest, std::abs(b.m));
  }
  double worst_abs = 0, noise_over_noise = 0;
  for (const auto& n : r.nodes) {
    if (n.boundary) continue;
    worst_abs = std::max(worst_abs, std::abs(net[n.node]));
    if (gross[n.node] > 0) noise_over_noise = std::max(noise_over_noise, std::abs(net[n.node]) / gross[n.node]);
  }
  // The case provokes the old figure (|net| / sum |m| at the node): the
  // standby node's round-off flow over itself.
  CHECK(noise_over_noise > 0.5);
  // (scale 0: doctest's default scale of 1 would make any tiny pair equal)
  CHECK(worst_abs > 0);
  CHECK(r.max_mass_imbalance_kg_s == doctest::Approx(worst_abs).epsilon(1e-12).scale(0));
  CHECK(r.max_mass_imbalance_rel == doctest::Approx(worst_abs / largest).epsilon(1e-12).scale(0));
  CHECK(r.max_mass_imbalance_rel < 1e-12);
}

}  // namespace loopwright
