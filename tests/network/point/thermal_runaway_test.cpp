// Thermal runaway and near-zero flows (network/point/run.cpp continuation in
// the heat input; failure_causes.h kinds bearing-starved and thermal-runaway):
//  - a loop whose relief-valve heat leaves only through the sump's loss to
//    ambient converges to the closed-form energy balance of the whole loop,
//    heat in = UA_sump (T_sump - T_room); with a smaller UA it is refused at
//    the sump, its temperature within the bounds the same balance gives;
//  - a bearing whose flow is (nearly) zero while its friction heats it is
//    reported at its node with a cause saying no steady state exists there;
//  - a heated sump fed by a slipping gear pump has steady states up to a
//    fraction of its heat and runs away above it: thermal-runaway at a node.
// All cases invented (tests/network/failure_cases/*.json).
#include <doctest/doctest.h>

#include <cmath>
#include <string>

#include "network/case/case.h"
#include "network/point/run.h"
#include "tests/tools/source_dir.h"

namespace loopwright {
namespace {

using testing::ReadText;
using testing::SourceDir;

std::string CaseText(const std::string& name) { return ReadText(SourceDir() + "/tests/network/failure_cases/" + name); }

// Case text with the first `from` replaced by `to`.
std::string Edited(std::string text, const std::string& from, const std::string& to) {
  REQUIRE(text.find(from) != std::string::npos);
  return text.replace(text.find(from), from.size(), to);
}

std::unique_ptr<Case> LoadText(const std::string& text) {
  LoadResult lr = LoadCaseText(text, "test", SourceDir() + "/library", size_t(1) << 24);
  INFO(lr.diagnostics.Format("test"));
  REQUIRE(lr.value != nullptr);
  return std::move(lr.value);
}

PointResult SolveFirst(const Case& cs) {
  CaseSolver solver(cs);
  return solver.Solve(cs.envelope.points[0], false);
}

bool Has(const std::string& text, const std::string& part) { return text.find(part) != std::string::npos; }

const BranchOutcome& BranchNamed(const Case& cs, const PointResult& r, const std::string& id) {
  for (const BranchOutcome& b : r.branches)
    if (cs.loops[b.loop].components[b.comp].id == id) return b;
  FAIL("no component " << id);
  return r.branches.front();
}

// Case inputs of relief_heat_sump_only.json: 40 cm3/rev at 1450 rpm, the
// default mechanical efficiency 0.85 (components/displacement_pump.h), a
// relief valve cracking at 10 bar and full open at 1.15 x 10 bar (its
// default), room 25 degC.
constexpr double kGeometricFlow = 40e-6 * 1450.0 / 60.0;  // [m3/s]
constexpr double kEtaM = 0.85, kCrack = 10e5, kFull = 1.15 * kCrack, kRoom = 273.15 + 25.0;

}  // namespace

// A point that is not a result, with its termination, cause kind and place.
void ExpectNotResult(const PointResult& r, Termination t, const std::string& kind, const std::string& place) {
  INFO(r.summary.Report());
  REQUIRE_FALSE(r.converged);
  CHECK(r.summary.termination == t);
  CHECK(r.summary.cause_kind == kind);
  CHECK(r.summary.place == place);
}

TEST_CASE("relief-valve heat shed only through the sump: the closed-form energy balance of the loop") {
  // Steady state of the whole loop (first law, closed form): every watt of
  // shaft power P = D n dP / eta_m (the pump's torque on its displaced
  // volume, Merritt 1967 ch. 7) plus the work of the pressure drops around
  // the loop, sum Q_b dp_b (zero for one density; the oil's expansion
  // between branches leaves some 1e-4 of P), leaves through the sump:
  // P + sum Q_b dp_b = UA (T_sump - T_room), UA = 8 W/K.
  auto cs = LoadText(CaseText("relief_heat_sump_only.json"));
  PointResult r = SolveFirst(*cs);
  INFO(r.summary.Report());
  REQUIRE(r.converged);
  const double rise = -BranchState(*cs, r, BranchNamed(*cs, r, "pump")).dp;
  CHECK(rise > kCrack);  // the relief valve lifts: within its band
  CHECK(rise < kFull);
  double heat = kGeometricFlow * rise / kEtaM;
  for (const BranchOutcome& b : r.branches) heat += b.flow_m3s * BranchState(*cs, r, b).dp;
  const double t_sump = r.nodes[0].temperature_k;
  CHECK(t_sump - kRoom == doctest::Approx(heat / 8.0).epsilon(1e-9));
  // A hot answer, not a cold one: about 155 K above the room, inside the oil
  // model (-40 .. 200 degC): a result.
  CHECK(t_sump - kRoom > 100.0);
  CHECK(t_sump < 273.15 + 200.0);
}

TEST_CASE("relief-valve heat with a sump loss too small for it: refused at the sump, at the balance's temperature") {
  // UA 2 W/K: the same balance puts the sump at T_room + P / UA with P
  // between the shaft power at crack and at full open (the drops' work is a
  // small share of it), far beyond the oil model's 200 degC: not a result,
  // refused at the sump with the loop's only sink named.
  auto cs = LoadText(Edited(CaseText("relief_heat_sump_only.json"), "\"8 W/K\"", "\"2 W/K\""));
  PointResult r = SolveFirst(*cs);
  ExpectNotResult(r, Termination::kUnphysical, "heat-sink-too-small", "node oil/sump");
  CHECK(Has(r.summary.cause, "sump's loss to ambient"));
  REQUIRE_FALSE(r.summary.worst.empty());
  CHECK(r.summary.worst[0].unit == "K");
  const double t = r.summary.worst[0].residual;
  CHECK(t >= kRoom + 0.999 * kGeometricFlow * kCrack / kEtaM / 2.0);
  CHECK(t <= kRoom + 1.001 * kGeometricFlow * kFull / kEtaM / 2.0);
}

TEST_CASE("a bearing with near-zero flow and heat input: reported at its node, no steady state there") {
  // starved_bearing.json at its point "starved": the feed valve shut, only
  // its seat leakage (1e-5 of Kvs) feeds the bearing; and the same with a
  // seat that does not leak (no flow at all). The friction heat enters the
  // housing node that almost nothing (or nothing) leaves.
  const std::string text = CaseText("starved_bearing.json");
  for (const std::string& leak : {std::string("1e-5"), std::string("0")}) {
    CAPTURE(leak);
    auto cs = LoadText(Edited(text, "\"leakage\": 1e-5", "\"leakage\": " + leak));
    CaseSolver solver(*cs);
    PointResult r = solver.Solve(cs->envelope.points[FindPoint(*cs, "starved")], false);
    ExpectNotResult(r, Termination::kEnergyBalance, "bearing-starved", "node oil/housing");
    CHECK(Has(r.summary.cause, "no steady state exists"));
    CHECK(Has(r.summary.cause, "journal_bearing oil/bearing"));
    CHECK_FALSE(Has(r.summary.Report(), "non-finite"));
  }
}

TEST_CASE("a heated sump fed by a slipping gear pump: steady up to a fraction of its heat, then runaway") {
  // slip_runaway.json: 10 kW into the sump; the pump's slip C_s dP / mu
  // against the housing's 3 bar grows as the oil thins, so the flow that
  // carries the heat to the cooler falls as the oil heats.
  auto cs = LoadText(CaseText("slip_runaway.json"));
  PointResult r = SolveFirst(*cs);
  INFO(r.summary.Report());
  REQUIRE_FALSE(r.converged);
  CHECK(r.summary.cause_kind == "thermal-runaway");
  CHECK(r.summary.place.rfind("node oil/", 0) == 0);
  CHECK(Has(r.summary.cause, "Continuation in the heat input"));
  CHECK(Has(r.summary.cause, "air_cooler oil/cooler"));
  // Control: with 2 kW the same loop converges (the runaway is the heat's,
  // not the iteration's).
  auto mild = LoadText(Edited(CaseText("slip_runaway.json"), "\"10 kW\"", "\"2 kW\""));
  PointResult m = SolveFirst(*mild);
  INFO(m.summary.Report());
  CHECK(m.converged);
}

}  // namespace loopwright
