// The regulator_authority, drain_capacity_margin and housing_drained checks
// on solved points of two small invented cases
// (tests/network/check_cases/regulator_sweep.json, prv_sweep.json,
// drain_cold_start.json; all data invented): the back-pressure regulator's
// and the pressure-reducing valve's held pressure against their band (the
// case's input) and their flow against IEC 60534-2-1 Eq. (1); the
// drain's flood verdict at a cold start against Hagen–Poiseuille at the
// viscosity of the point (the fluid model's, not the drain's); and the
// warning that suggests a gravity drain for a line running full.
#include <doctest/doctest.h>

#include <cmath>
#include <string>
#include <vector>

#include "network/case/case.h"
#include "network/case/check_table.h"
#include "network/envelope/checks.h"
#include "network/point/run.h"
#include "tests/tools/check_sweep.h"
#include "tests/tools/source_dir.h"

using loopwright::testing::SolveAndCheck;
using loopwright::testing::SourceDir;
using loopwright::testing::Sweep;

namespace loopwright {
namespace {

constexpr double kG = 9.80665;  // standard gravity [m/s2] (CGPM 1901)

std::unique_ptr<Case> LoadText(const std::string& text, const std::string& path) {
  LoadResult lr = LoadCaseText(text, path, SourceDir() + "/library");
  INFO(lr.diagnostics.Format(path));
  REQUIRE(lr.value != nullptr);
  return std::move(lr.value);
}

std::string CasePath(const std::string& name) { return SourceDir() + "/tests/network/check_cases/" + name; }

const BranchOutcome& Branch(const Case& cs, const PointResult& r, const std::string& id) {
  for (const BranchOutcome& b : r.branches)
    if (cs.loops[b.loop].components[b.comp].id == id) return b;
  FAIL("no component " << id);
  return r.branches.front();
}

const CheckOutcome* Outcome(const std::vector<CheckOutcome>& out, const std::string& name) {
  for (const CheckOutcome& c : out)
    if (c.name() == name) return &c;
  return nullptr;
}

bool HasWarning(const std::vector<CheckWarning>& w, const std::string& text) {
  for (const CheckWarning& x : w)
    if (x.text.find(text) != std::string::npos) return true;
  return false;
}

TEST_CASE("back-pressure regulator: held within its band across the sweep, authority fails where it saturates") {
  const std::string path = CasePath("regulator_sweep.json");
  auto cs = LoadText(testing::ReadText(path), path);
  const Sweep s = SolveAndCheck(*cs);
  // The case's input: set 3 bar, proportional band 0.3 bar, kv_max 0.4; kv_min its default 1e-4 kv_max.
  const double lo = 2.85e5, hi = 3.15e5, kv_max = 0.4, kv_min = 0.4e-4;
  double prev_dp = 0;
  for (size_t i = 0; i < s.names.size(); ++i) {
    CAPTURE(s.names[i]);
    const BranchOutcome& b = Branch(*cs, s.results[i], "pcv");
    const CheckOutcome* a = Outcome(s.per_point[i], "regulator_authority");
    REQUIRE(a != nullptr);
    if (s.names[i] == "starved" || s.names[i] == "overspeed") {
      CHECK_FALSE(a->pass);  // closed (the jets take all the pump gives below the band) / wide open
      continue;
    }
    CHECK(a->pass);
    CHECK(BranchState(*cs, s.results[i], b).dp > lo);  // the held pressure inside set +- band/2
    CHECK(BranchState(*cs, s.results[i], b).dp < hi);
    CHECK(BranchState(*cs, s.results[i], b).dp > prev_dp);  // droop: more spill, higher held pressure
    prev_dp = BranchState(*cs, s.results[i], b).dp;
    // Travel straight across the middle of the band; flow by IEC 60534-2-1 Eq. (1), rho0 = 1000 kg/m3.
    const double t = (BranchState(*cs, s.results[i], b).dp - lo) / (hi - lo);
    if (t > 0.1 && t < 0.9) {
      const double kv = kv_min + (kv_max - kv_min) * t;
      const double q = kv * std::sqrt(BranchState(*cs, s.results[i], b).dp / 1e5 * 1000.0 / BranchState(*cs, s.results[i], b).rho) / 3600.0;
      CHECK(std::fabs(b.flow_m3s - q) <= 1e-6 * q);
    }
  }
  // The summary names the point where it saturates; the warnings say how.
  bool found = false;
  for (const CheckSummary& c : SummariseChecks(s.per_point, s.names)) {
    if (c.worst.name() != "regulator_authority") continue;
    found = true;
    CHECK_FALSE(c.worst.pass);
    CHECK(c.point == "starved");
    CHECK(c.worst.where == "oil/pcv");
  }
  CHECK(found);
  CHECK(HasWarning(s.warnings, "regulator closed at starved"));
  CHECK(HasWarning(s.warnings, "regulator wide open at overspeed"));
  // The regulator is not judged as a relief valve.
  for (const auto& out : s.per_point)
    for (const CheckOutcome& c : out) CHECK_FALSE((c.where == "oil/pcv" && c.name() == "relief_closed"));
}

TEST_CASE("pressure-reducing valve: outlet held within its band across a demand sweep, authority fails outside it") {
  const std::string path = CasePath("prv_sweep.json");
  auto cs = LoadText(testing::ReadText(path), path);
  const Sweep s = SolveAndCheck(*cs);
  // The case's input: set 2 bar g, band 0.2 bar, kv_max 0.8, kv_min 0.001.
  const double lo = 1.9e5, hi = 2.1e5, kv_max = 0.8, kv_min = 0.001;
  double prev_p = INFINITY, prev_q = 0;
  int regulating = 0;
  for (size_t i = 0; i < s.names.size(); ++i) {
    CAPTURE(s.names[i]);
    const BranchOutcome& b = Branch(*cs, s.results[i], "prv");
    const CheckOutcome* a = Outcome(s.per_point[i], "regulator_authority");
    REQUIRE(a != nullptr);
    if (s.names[i] == "no_demand" || s.names[i] == "low_supply") {
      CHECK_FALSE(a->pass);  // closed (the jets take less than the seat leak) / wide open (supply below set)
      if (s.names[i] == "low_supply") CHECK(BranchState(*cs, s.results[i], b).p_to < lo);
      if (s.names[i] == "no_demand") CHECK(BranchState(*cs, s.results[i], b).p_to > hi);
      continue;
    }
    CHECK(a->pass);
    ++regulating;
    const double p_out = BranchState(*cs, s.results[i], b).p_to;
    CHECK(p_out > lo);  // the held outlet inside set +- band/2
    CHECK(p_out < hi);
    CHECK(p_out < prev_p);  // droop: more demand, lower held pressure
    CHECK(b.flow_m3s > prev_q);
    prev_p = p_out;
    prev_q = b.flow_m3s;
    // Travel straight across the middle of the band, falling as the outlet rises; flow by
    // IEC 60534-2-1 Eq. (1), rho0 = 1000 kg/m3, across the drop supply - outlet.
    const double t = (hi - p_out) / (hi - lo);
    if (t > 0.1 && t < 0.9) {
      const double kv = kv_min + (kv_max - kv_min) * t;
      const double q = kv * std::sqrt((BranchState(*cs, s.results[i], b).p_from - p_out) / 1e5 * 1000.0 / BranchState(*cs, s.results[i], b).rho) / 3600.0;
      CHECK(std::fabs(b.flow_m3s - q) <= 1e-6 * q);
    }
  }
  CHECK(regulating == 5);
  bool found = false;
  for (const CheckSummary& c : SummariseChecks(s.per_point, s.names)) {
    if (c.worst.name() != "regulator_authority") continue;
    found = true;
    CHECK_FALSE(c.worst.pass);
    CHECK((c.point == "no_demand" || c.point == "low_supply"));
    CHECK(c.worst.where == "oil/prv");
  }
  CHECK(found);
  CHECK(HasWarning(s.warnings, "regulator closed at no_demand"));
  CHECK(HasWarning(s.warnings, "regulator wide open at low_supply"));
}

TEST_CASE("gravity drain: a cold start floods the housing, the warm point drains") {
  const std::string path = CasePath("drain_cold_start.json");
  auto cs = LoadText(testing::ReadText(path), path);
  const Sweep s = SolveAndCheck(*cs);
  REQUIRE(s.names.size() == 2);
  // The case's drain: bore 40 mm, 5 m, fall 0.5 m, no minor losses.
  const double d = 0.04, len = 5.0, fall = 0.5;
  for (size_t i = 0; i < 2; ++i) {
    CAPTURE(s.names[i]);
    const BranchOutcome& b = Branch(*cs, s.results[i], "drain");
    const CheckOutcome* h = Outcome(s.per_point[i], "housing_drained");
    REQUIRE(h != nullptr);
    const double rho = BranchState(*cs, s.results[i], b).rho, mu = BranchState(*cs, s.results[i], b).mu;
    const double p_cavity = BranchState(*cs, s.results[i], b).p_from - BranchState(*cs, s.results[i], b).p_to;  // the housing above the sump
    if (s.names[i] == "cold_start") {
      // Thick oil: laminar running full, Hagen–Poiseuille under the fall's head,
      // Q = pi D^4 rho g H / (128 mu L), at the viscosity of the fluid model at 0 degC.
      CHECK(mu / rho > 300e-6);
      const double full = M_PI * std::pow(d, 4) * rho * kG * fall / (128.0 * mu * len);
      CHECK(std::fabs(h->limit - full) <= 1e-6 * full);
      CHECK_FALSE(h->pass);
      CHECK(b.flow_m3s > full);
      // Flooded: the housing backs up above the sump, by the full pipe's drop beyond the fall's head.
      const double backed = 128.0 * mu * len * b.flow_m3s / (M_PI * std::pow(d, 4)) - rho * kG * fall;
      CHECK(std::fabs(p_cavity - backed) <= 1e-3 * backed);
      CHECK(std::string(Check(CheckId::kHousingDrained).failure).find("housing floods") != std::string::npos);
    } else {
      CHECK(h->pass);  // positive control: the same drain with warm oil
      // Vented: the housing sits at the sump's pressure within the law's 1 %-per-m/s slope.
      CHECK(std::fabs(p_cavity) < 0.01 * rho * kG * fall);
      const CheckOutcome* m = Outcome(s.per_point[i], "drain_capacity_margin");
      REQUIRE(m != nullptr);
      CHECK(m->pass);
    }
  }
  CHECK(HasWarning(s.warnings, "housing floods at cold_start"));
  CHECK_FALSE(HasWarning(s.warnings, "housing floods at warm"));
  CHECK_FALSE(HasWarning(s.warnings, "modelled running full"));
}

TEST_CASE("a line running full from a housing down to the sump is told to use a gravity drain") {
  const std::string path = CasePath("drain_cold_start.json");
  std::string text = testing::ReadText(path);
  const std::string drain = "\"type\": \"gravity_drain\"";
  const size_t at = text.find(drain);
  REQUIRE(at != std::string::npos);
  text.replace(at, drain.size(), "\"type\": \"pipe\"");
  const size_t fall = text.find(",\n         \"fall\": \"0.5 m\", \"minor_k\": 0");
  REQUIRE(fall != std::string::npos);
  text.erase(fall, std::string(",\n         \"fall\": \"0.5 m\", \"minor_k\": 0").size());
  auto cs = LoadText(text, path);
  const Sweep s = SolveAndCheck(*cs);
  CHECK(HasWarning(s.warnings, "line from housing to sump modelled running full"));
}

}  // namespace
}  // namespace loopwright

namespace loopwright {
namespace {

TEST_CASE("scavenge pump: a cavity below the sump drains while the pump displaces more than arrives, floods below") {
  const std::string path = CasePath("scavenge.json");
  auto cs = LoadText(testing::ReadText(path), path);
  const Sweep s = SolveAndCheck(*cs);
  REQUIRE(s.names.size() == 2);
  for (size_t i = 0; i < 2; ++i) {
    CAPTURE(s.names[i]);
    const BranchOutcome& b = Branch(*cs, s.results[i], "scavenge");
    const CheckOutcome* h = Outcome(s.per_point[i], "housing_drained");
    REQUIRE(h != nullptr);
    // The case's pump: 20 cm3/rev at the point's speed, displacement flow V n (Merritt §5, from memory).
    const double rpm = s.names[i] == "scavenging" ? 1450.0 : 400.0;
    const double qd = 20e-6 * rpm / 60.0;
    CHECK(std::fabs(h->limit - qd) <= 1e-12 * qd);
    const double p_cavity = BranchState(*cs, s.results[i], b).p_from - BranchState(*cs, s.results[i], b).p_to;  // the cavity's pressure above the sump's
    if (s.names[i] == "scavenging") {
      CHECK(h->pass);
      CHECK(b.flow_m3s < 0.5 * qd);  // the oil is under half what it displaces: it draws air too
      // Vented: the cavity stands at the sump's gas pressure, within the law's 0.01 bar at full displacement.
      CHECK(std::fabs(p_cavity) < 1e3);
    } else {
      CHECK_FALSE(h->pass);  // less displaced than arrives: the cavity floods and its pressure rises
      CHECK(p_cavity > 1e4);
    }
  }
  CHECK(HasWarning(s.warnings, "housing floods at slow_scavenge"));
  CHECK_FALSE(HasWarning(s.warnings, "housing floods at scavenging"));
}

}  // namespace
}  // namespace loopwright
