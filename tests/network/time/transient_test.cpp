// Through time (network/time/simulate.h): the integrator against closed
// forms, the energy account of a run, consistency with the steady solver,
// convergence under tighter tolerances, independence from the output
// interval. The cases are small invented rigs built here.
//
// Sources of the check values:
//   (a) a lumped mass cooled through a constant conductance G to a fixed
//       temperature: T(t) = T_b + (T_0 - T_b) exp(-G t / (m c))
//       (Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed.,
//       Eq. 5.6, lumped capacitance).
//   (b) two masses coupled by G12, the second losing to ambient through G2:
//       a linear system dx/dt = A x with A's eigenvalues from the quadratic
//       lambda^2 - tr(A) lambda + det(A) = 0 and x(t) = sum c_i v_i e^(l_i t)
//       (any linear-ODE text), computed here by hand, not by the code.
//   (c) a well-mixed volume V flushed by a mass flow m_dot whose inlet
//       temperature steps: T(t) = T_new + (T_old - T_new) exp(-t / tau),
//       tau = rho V / m_dot (residence time; first-order mixing tank,
//       Levenspiel, Chemical Reaction Engineering, ch. 11, from memory).
//   (d) first law for a closed system: with no losses and no work heat the
//       stored energy sum C_i (T_i(t) - T_i(0)) equals the heat put in,
//       Q t (constant properties: C_i fixed).
//   (e) the steady solver's answer (network/point/run.h) for the same
//       inputs is the limit of a long run with constant inputs.
#include <doctest/doctest.h>

#include <cmath>
#include <string>

#include <fmt/format.h>

#include "network/case/case.h"
#include "network/point/run.h"
#include "network/time/simulate.h"
#include "network/time/time_checks.h"

using namespace loopwright;

namespace {

// An oil with constant density and specific heat (expansion 0, a fixed cp):
// the closed forms assume constant properties.
const char* kFluids = R"J("fluids": {"oil": {"kind": "oil", "kv40": "46 cSt", "kv100": "6.8 cSt",
  "density_15C": "870 kg/m3", "expansion": 0, "specific_heat": "2000 J/(kg.K)"}})J";

std::unique_ptr<Case> Load(const std::string& text) {
  LoadResult r = LoadCaseText(text, "transient_test.json", DefaultLibraryDir());
  if (!r.value) FAIL(r.diagnostics.Format("transient_test.json"));
  return std::move(r.value);
}

// A stagnant loop: two reservoirs at 20 degC and 0 bar joined by a pipe
// through node "mid"; `masses` and `scenarios` are spliced in.
std::string StagnantCase(const std::string& masses, const std::string& scenarios) {
  return fmt::format(R"J({{"name": "stagnant", "thermal": true, {},
  "loops": [{{"id": "oil", "fluid": "oil", "temperature": "20 degC",
    "nodes": [{{"id": "a", "boundary": {{"kind": "reservoir", "pressure": "0 bar", "temperature": "20 degC"}}}},
              {{"id": "mid"}},
              {{"id": "b", "boundary": {{"kind": "reservoir", "pressure": "0 bar", "temperature": "20 degC"}}}}],
    "components": [{{"id": "p1", "type": "pipe", "from": "a", "to": "mid", "diameter": "10 mm", "length": "1 m"}},
                   {{"id": "p2", "type": "pipe", "from": "mid", "to": "b", "diameter": "10 mm", "length": "1 m"}}]}}],
  "thermal_masses": [{}], "scenarios": [{}]}})J",
                     kFluids, masses, scenarios);
}

// A closed circuit: reservoir R (2 L) -> metering branch (fixed mass flow)
// -> node A (0.5 L) -> pipe (0.3 L stated) -> R. `extra` adds to the
// case (thermal masses, scenarios, envelope); `heat_a` is node A's heat.
std::string CircuitCase(const std::string& extra, const std::string& r_loss, const std::string& heat_a) {
  return fmt::format(R"J({{"name": "circuit", "thermal": true, "work_heat": false, {},
  "envelope": {{"variables": {{"inlet": {{"dimension": "temperature", "default": "20 degC"}},
                               "source": {{"dimension": "power", "default": "500 W"}}}},
                "points": [{{"name": "run", "values": {{}}}}]}},
  "loops": [{{"id": "oil", "fluid": "oil", "temperature": "20 degC",
    "nodes": [{{"id": "R", "volume": "2 L", "boundary": {{"kind": "reservoir", "pressure": "0 bar",
                "loss_conductance": "{}", "ambient_temperature": "20 degC"}}}},
              {{"id": "A", "volume": "0.5 L", "heat": "{}"}}],
    "components": [{{"id": "meter", "type": "fixed_flow", "from": "R", "to": "A", "mass_flow": "0.02 kg/s"}},
                   {{"id": "line", "type": "pipe", "from": "A", "to": "R", "diameter": "12 mm", "length": "2 m",
                     "volume": "0.3 L"}}]}}]{}}})J",
                     kFluids, r_loss, heat_a, extra);
}

// Two coupled masses (m1 c1 = 1000 J/K at 120 degC, m2 c2 = 400 J/K at
// 20 degC, G12 = 4 W/K, G2 = 2 W/K to 20 degC): x = T - 20 degC obeys
// x' = A x, A = [[-4/1000, 4/1000], [4/400, -(4+2)/400]]; eigenvalues l1, l2,
// eigenvectors (b, l - a), x0 = (100, 0) = c1 v1 + c2 v2.
const char* kTwoMasses =
    R"J({"id": "hot", "mass": "2 kg", "specific_heat": "500 J/(kg.K)", "initial_temperature": "120 degC",
        "to_masses": [{"mass": "cold", "conductance": "4 W/K"}]},
       {"id": "cold", "mass": "1 kg", "specific_heat": "400 J/(kg.K)", "initial_temperature": "20 degC",
        "ambient": {"conductance": "2 W/K", "temperature": "20 degC"}})J";
struct TwoMasses {
  double a = -0.004, b = 0.004, c = 0.01, d = -0.015;
  double l1 = 0, l2 = 0, v1y = 0, v2y = 0, c1 = 0, c2 = 0;
  TwoMasses() {
    const double tr = a + d, det = a * d - b * c, disc = std::sqrt(tr * tr / 4 - det);
    l1 = tr / 2 + disc, l2 = tr / 2 - disc;
    v1y = l1 - a, v2y = l2 - a;
    c2 = -100.0 * v1y / (b * (v2y - v1y)), c1 = (100.0 - c2 * b) / b;
  }
  double X1(double t) const { return c1 * b * std::exp(l1 * t) + c2 * b * std::exp(l2 * t); }
  double X2(double t) const { return c1 * v1y * std::exp(l1 * t) + c2 * v2y * std::exp(l2 * t); }
};

SimulateOptions Tight() {
  SimulateOptions o;
  o.rtol = 1e-9;
  o.atol_k = 1e-9;
  return o;
}

}  // namespace

TEST_CASE("one mass through a constant conductance decays exponentially (lumped capacitance)") {
  auto cs = Load(StagnantCase(
      R"J({"id": "block", "mass": "2 kg", "specific_heat": "500 J/(kg.K)", "initial_temperature": "100 degC",
          "to_fluid": [{"node": "oil/a", "conductance": "5 W/K"}]})J",
      R"J({"id": "cool", "start": {"temperature": "20 degC"}, "end": "1000 s", "output_interval": "50 s"})J"));
  SimulationResult r = Simulate(*cs, cs->scenarios[0], Tight());
  REQUIRE_MESSAGE(r.ok, r.failure);
  const double tau = 2.0 * 500.0 / 5.0;  // m c / G = 200 s
  REQUIRE(r.samples.size() == 21);
  for (const TimeSample& s : r.samples) {
    const double exact = 293.15 + 80.0 * std::exp(-s.t / tau);
    CHECK(std::abs(s.mass_t[0] - exact) < 1e-5);
  }
  // Looser tolerances give a larger but bounded error (error control acts).
  SimulateOptions loose;
  loose.rtol = 1e-4;
  loose.atol_k = 1e-4;
  SimulationResult rl = Simulate(*cs, cs->scenarios[0], loose);
  double worst = 0;
  for (const TimeSample& s : rl.samples) worst = std::max(worst, std::abs(s.mass_t[0] - 293.15 - 80.0 * std::exp(-s.t / tau)));
  CHECK(worst < 0.1);
  CHECK(worst > 1e-6);
}

TEST_CASE("two coupled masses follow their eigen-solution") {
  // m1 c1 = 1000 J/K, m2 c2 = 400 J/K, G12 = 4 W/K, G2 = 2 W/K to 20 degC.
  auto cs = Load(StagnantCase(
      kTwoMasses,
      R"J({"id": "soak", "start": {"temperature": "20 degC"}, "end": "2000 s", "output_interval": "100 s"})J"));
  SimulationResult r = Simulate(*cs, cs->scenarios[0], Tight());
  REQUIRE_MESSAGE(r.ok, r.failure);
  const TwoMasses m;
  for (const TimeSample& s : r.samples) {
    CHECK(std::abs(s.mass_t[0] - 293.15 - m.X1(s.t)) < 1e-5);
    CHECK(std::abs(s.mass_t[1] - 293.15 - m.X2(s.t)) < 1e-5);
  }
}

TEST_CASE("a volume flushed by an inlet step responds with its residence time") {
  // Open line: inlet reservoir at $inlet -> metering 0.02 kg/s -> node V
  // (0.5 L) -> pipe with no hold-up -> outlet reservoir.
  const std::string text = fmt::format(R"J({{"name": "flush", "thermal": true, "work_heat": false, {},
  "envelope": {{"variables": {{"inlet": {{"dimension": "temperature", "default": "20 degC"}}}},
                "points": [{{"name": "run", "values": {{}}}}]}},
  "loops": [{{"id": "oil", "fluid": "oil", "temperature": "20 degC",
    "nodes": [{{"id": "in", "boundary": {{"kind": "reservoir", "pressure": "0 bar", "temperature": "$inlet"}}}},
              {{"id": "V", "volume": "0.5 L"}},
              {{"id": "out", "boundary": {{"kind": "reservoir", "pressure": "0 bar", "temperature": "20 degC"}}}}],
    "components": [{{"id": "meter", "type": "fixed_flow", "from": "in", "to": "V", "mass_flow": "0.02 kg/s"}},
                   {{"id": "line", "type": "pipe", "from": "V", "to": "out", "diameter": "12 mm", "length": "2 m",
                     "volume": 0}}]}}],
  "scenarios": [{{"id": "step", "start": {{"point": "run"}}, "end": "200 s", "output_interval": "5 s",
                  "events": [{{"at": "0 s", "set": {{"inlet": "80 degC"}}}}]}}]}})J",
                                       kFluids);
  auto cs = Load(text);
  SimulationResult r = Simulate(*cs, cs->scenarios[0], Tight());
  REQUIRE_MESSAGE(r.ok, r.failure);
  const double tau = 870.0 * 0.5e-3 / 0.02;  // rho V / m_dot = 21.75 s
  int v = -1;
  for (size_t i = 0; i < r.node_names.size(); ++i)
    if (r.node_names[i] == "oil/V") v = int(i);
  REQUIRE(v >= 0);
  for (const TimeSample& s : r.samples) {
    if (s.t == 0) continue;
    const double exact = 353.15 - 60.0 * std::exp(-s.t / tau);
    CHECK(std::abs(s.node_t[v] - exact) < 1e-4);
  }
}

TEST_CASE("energy account: stored energy change equals the heat put in (closed circuit, no losses)") {
  auto cs = Load(CircuitCase(
      R"J(, "thermal_masses": [{"id": "heater", "mass": "3 kg", "specific_heat": "460 J/(kg.K)",
           "initial_temperature": "20 degC", "heat": "$source",
           "to_fluid": [{"node": "oil/A", "conductance": "20 W/K", "flow_of": "oil/meter", "rated_flow": "1.5 L/min",
                         "natural": "1 W/K"}]}],
         "scenarios": [{"id": "heat", "start": {"temperature": "20 degC"}, "end": "1800 s",
                        "events": [{"at": "900 s", "set": {"source": "200 W"}}]}])J",
      "0 W/K", "0 W"));
  SimulationResult r = Simulate(*cs, cs->scenarios[0], Tight());
  REQUIRE_MESSAGE(r.ok, r.failure);
  const TimeSample &s0 = r.samples.front(), &s1 = r.samples.back();
  REQUIRE(s1.t == doctest::Approx(1800));
  // Hold-ups: R 2 L + half the line's 0.3 L; A 0.5 L + half the line's.
  double stored = 3 * 460 * (s1.mass_t[0] - s0.mass_t[0]);
  for (size_t i = 0; i < r.node_names.size(); ++i) {
    const double v = r.node_names[i] == "oil/R" ? 2.15e-3 : 0.65e-3;
    stored += 870.0 * 2000.0 * v * (s1.node_t[i] - s0.node_t[i]);
  }
  const double heat_in = 500.0 * 900 + 200.0 * 900;  // J
  CHECK(stored == doctest::Approx(heat_in).epsilon(1e-6));
}

TEST_CASE("a run with no events from a steady point stays there; a long run reaches the steady answer") {
  // With losses: the reservoir loses 5 W/K to 20 degC; node A takes 500 W.
  auto cs = Load(CircuitCase(
      R"J(, "scenarios": [{"id": "hold", "start": {"point": "run"}, "end": "3600 s"},
                         {"id": "warm", "start": {"temperature": "20 degC"}, "end": "60000 s"}])J",
      "5 W/K", "$source"));
  CaseSolver steady(*cs);
  PointResult p = steady.Solve(cs->envelope.points[0], false);
  REQUIRE(p.converged);
  SimulationResult hold = Simulate(*cs, cs->scenarios[0], Tight());
  REQUIRE_MESSAGE(hold.ok, hold.failure);
  SimulationResult warm = Simulate(*cs, cs->scenarios[1], Tight());
  REQUIRE_MESSAGE(warm.ok, warm.failure);
  for (size_t i = 0; i < hold.node_names.size(); ++i) {
    for (const TimeSample& s : hold.samples) CHECK(std::abs(s.node_t[i] - p.nodes[i].temperature_k) < 1e-6);
    CHECK(std::abs(warm.samples.back().node_t[i] - p.nodes[i].temperature_k) < 1e-6);
  }
  // The reservoir's steady temperature closes the first law: 500 W = 5 W/K x rise.
  CHECK(p.nodes[0].temperature_k == doctest::Approx(293.15 + 100.0).epsilon(1e-9));
}

TEST_CASE("peaks converge with the tolerances and do not depend on the output interval") {
  const std::string extra =
      R"J(, "thermal_masses": [{"id": "heater", "mass": "3 kg", "specific_heat": "460 J/(kg.K)", "heat": "$source",
           "ambient": {"conductance": "0.5 W/K", "area": "0.05 m2", "emissivity": 0.8, "temperature": "20 degC"},
           "to_fluid": [{"node": "oil/A", "conductance": "20 W/K", "flow_of": "oil/meter", "rated_flow": "1.5 L/min",
                         "natural": "1 W/K"}]}],
         "scenarios": [{"id": "stop", "start": {"point": "run"}, "end": "3000 s", "watch": ["heater", "oil/A"],
                        "events": [{"at": "0 s", "set": {"oil/meter/mass_flow": "0 kg/s"}},
                                    {"at": "300 s", "ramp": "60 s", "set": {"source": "0 W"}}]}])J";
  auto cs = Load(CircuitCase(extra, "5 W/K", "0 W"));
  SimulateOptions a;  // the defaults: rtol 1e-6, atol 1e-4 K
  SimulateOptions b = a;
  b.rtol /= 2, b.atol_k /= 2;
  SimulationResult ra = Simulate(*cs, cs->scenarios[0], a), rb = Simulate(*cs, cs->scenarios[0], b);
  REQUIRE_MESSAGE(ra.ok, ra.failure);
  REQUIRE_MESSAGE(rb.ok, rb.failure);
  // The heater, its flow stopped, soaks up: its peak comes after the stop.
  CHECK(ra.peaks[0].value > ra.peaks[0].start + 1.0);
  // Stated amount: halving rtol and atol moves a peak by less than 0.05 K
  // (peaks are read at the internal steps and outputs); both lie within
  // 0.05 K of a run at 1e-10.
  SimulationResult ref = Simulate(*cs, cs->scenarios[0], [] {
    SimulateOptions o;
    o.rtol = o.atol_k = 1e-10;
    return o;
  }());
  REQUIRE(ref.ok);
  for (size_t i = 0; i < ra.peaks.size(); ++i) {
    CHECK(std::abs(ra.peaks[i].value - rb.peaks[i].value) < 0.05);
    CHECK(std::abs(ra.peaks[i].value - ref.peaks[i].value) < 0.05);
    CHECK(std::abs(rb.peaks[i].value - ref.peaks[i].value) < 0.05);
  }
  SimulateOptions c = a;
  c.output_interval = 7.0;
  SimulateOptions d = a;
  d.output_interval = 35.0;
  SimulationResult rc = Simulate(*cs, cs->scenarios[0], c), rd = Simulate(*cs, cs->scenarios[0], d);
  REQUIRE(rc.ok);
  REQUIRE(rd.ok);
  for (const TimeSample& s : rd.samples) {
    const TimeSample* match = nullptr;
    for (const TimeSample& x : rc.samples)
      if (std::abs(x.t - s.t) < 1e-9) match = &x;
    if (!match) continue;
    CHECK(std::abs(match->mass_t[0] - s.mass_t[0]) < 1e-6);
  }
}

TEST_CASE("after-boil margin: saturation at the node's absolute pressure minus its temperature (IF97)") {
  // Stagnant water between two open reservoirs at 0 bar g, ambient 100 kPa:
  // the node sits at 100 kPa abs, whose saturation temperature is
  // 372.755919 K (IAPWS-IF97, Table 35 verification value for 0.1 MPa, from
  // memory). A hot block heats it; the least margin comes at the end.
  const std::string text = R"J({"name": "jacket", "thermal": true, "ambient_pressure": "100 kPa",
  "fluids": {"w": {"kind": "water"}},
  "loops": [{"id": "water", "fluid": "w", "temperature": "20 degC",
    "nodes": [{"id": "a", "boundary": {"kind": "reservoir", "pressure": "0 bar", "temperature": "20 degC"}},
              {"id": "mid", "volume": "0.1 L"},
              {"id": "b", "boundary": {"kind": "reservoir", "pressure": "0 bar", "temperature": "20 degC"}}],
    "components": [{"id": "p1", "type": "pipe", "from": "a", "to": "mid", "diameter": "10 mm", "length": "1 m", "volume": 0},
                   {"id": "p2", "type": "pipe", "from": "mid", "to": "b", "diameter": "10 mm", "length": "1 m", "volume": 0}]}],
  "thermal_masses": [{"id": "block", "mass": "1 kg", "specific_heat": "460 J/(kg.K)", "initial_temperature": "150 degC",
                      "to_fluid": [{"node": "water/mid", "conductance": "5 W/K"}]}],
  "scenarios": [{"id": "soak", "start": {"temperature": "20 degC"}, "end": "600 s", "output_interval": "60 s"}]})J";
  auto cs = Load(text);
  SimulationResult r = Simulate(*cs, cs->scenarios[0], Tight());
  REQUIRE_MESSAGE(r.ok, r.failure);
  int mid = -1;
  for (size_t i = 0; i < r.node_names.size(); ++i)
    if (r.node_names[i] == "water/mid") mid = int(i);
  REQUIRE(mid >= 0);
  const double t_end = r.samples.back().node_t[mid];
  CHECK(t_end > 320.0);  // the block has heated the water well above its start
  bool found = false;
  for (const TimeCheck& c : EvaluateTimeChecks(*cs, cs->scenarios[0], r)) {
    if (c.id != CheckId::kAfterBoilMarginMin || c.where != "water/mid") continue;
    found = true;
    CHECK(c.value == doctest::Approx(372.755919 - t_end).epsilon(1e-6));
    CHECK(c.time == doctest::Approx(600.0));
    CHECK(c.pass == (c.value >= 0));
  }
  CHECK(found);
}

TEST_CASE("a peak between output instants is located on the integrator's polynomial (closed-form time and value)") {
  // The two coupled masses above: the cold mass rises and falls; its peak is
  // where x2' = c1 v1y l1 e^{l1 t} + c2 v2y l2 e^{l2 t} = 0, i.e.
  // t* = ln(-c2 v2y l2 / (c1 v1y l1)) / (l1 - l2) (about 165 s), far inside the
  // 1000 s output interval and narrower than it.
  auto cs = Load(StagnantCase(
      kTwoMasses,
      R"J({"id": "soak", "start": {"temperature": "20 degC"}, "end": "2000 s", "output_interval": "1000 s"})J"));
  const TwoMasses m;
  const double t_star = std::log(-m.c2 * m.v2y * m.l2 / (m.c1 * m.v1y * m.l1)) / (m.l1 - m.l2);
  const double x_star = m.X2(t_star);
  SimulateOptions opt;  // the default tolerances: steps of tens of seconds near the peak
  SimulationResult r = Simulate(*cs, cs->scenarios[0], opt);
  REQUIRE_MESSAGE(r.ok, r.failure);
  REQUIRE(r.samples.size() == 3);
  const PeakValue& p = r.peaks[1];
  REQUIRE(p.what == "cold");
  INFO("t* " << t_star << " s, code " << p.time << " s; x* " << x_star << " K, code " << p.value - 293.15 << " K");
  CHECK(std::abs(p.time - t_star) < 0.5);
  CHECK(std::abs(p.value - 293.15 - x_star) < 1e-3);
  CHECK(p.value - 293.15 <= x_star + 1e-3);
}

TEST_CASE("a mass's and a node's own limits judge their checks through time") {
  std::string text = StagnantCase(
      R"J({"id": "block", "mass": "2 kg", "specific_heat": "500 J/(kg.K)", "initial_temperature": "100 degC",
          "checks": {"coking_temperature_max": "90 degC"}, "to_fluid": [{"node": "oil/a", "conductance": "5 W/K"}]})J",
      R"J({"id": "cool", "start": {"temperature": "20 degC"}, "end": "100 s", "output_interval": "50 s"})J");
  const std::string mid = R"J({"id": "mid"})J";
  text.replace(text.find(mid), mid.size(), R"J({"id": "mid", "checks": {"coking_temperature_max": "15 degC"}})J");
  auto cs = Load(text);
  SimulationResult r = Simulate(*cs, cs->scenarios[0], SimulateOptions{});
  REQUIRE_MESSAGE(r.ok, r.failure);
  int seen = 0;
  for (const TimeCheck& c : EvaluateTimeChecks(*cs, cs->scenarios[0], r)) {
    if (c.id != CheckId::kCokingTemperatureMax) continue;
    if (c.where == "block") {  // 100 degC at t = 0 against its own 90 degC (the case's default is 200 degC)
      CHECK(c.limit == doctest::Approx(363.15));
      CHECK(c.value == doctest::Approx(373.15));
      CHECK(!c.pass);
      ++seen;
    } else if (c.where == "oil/mid") {  // 20 degC throughout against its own 15 degC
      CHECK(c.limit == doctest::Approx(288.15));
      CHECK(!c.pass);
      ++seen;
    }
  }
  CHECK(seen == 2);
}
