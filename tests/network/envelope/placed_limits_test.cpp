// Limits set on loops and components reach the checks that read them
// indirectly (network/envelope/checks.h, LimitAt): a relief valve's own
// closing_margin sets the target fix suggestions aim for below its crack
// (ShutTargetMargin), and a loop's drain_temperature_max sets the hottest oil
// the cooler duty margin of that loop's coupling is judged at, a cooler's own
// beating it. The limits are the cases' inputs (tests/network/check_cases/
// relief_lift.json and the gearbox demo, invented data); the test asserts
// which limit each item was judged by and its source, and recomputes the
// cooler duty margin by hand from the coupling's stream inlet temperatures:
// the exchanger's duty at a hotter oil inlet, same effectiveness, scales
// with the inlet temperature difference (the definition of effectiveness,
// q = eps C_min (T_h,in - T_c,in); Incropera & DeWitt, Fundamentals of Heat
// and Mass Transfer, ch. 11, from memory).
#include <doctest/doctest.h>

#include <cmath>
#include <string>

#include <nlohmann/json.hpp>

#include "network/case/case.h"
#include "network/envelope/checks.h"
#include "network/point/run.h"
#include "tests/tools/source_dir.h"

using loopwright::testing::ReadText;
using loopwright::testing::SourceDir;

namespace loopwright {
namespace {

template <class Edit>
std::unique_ptr<Case> LoadEdited(const std::string& path, Edit edit) {
  nlohmann::json doc;
  Diagnostics d;
  REQUIRE(ParseJsonText(ReadText(path), &doc, &d));
  edit(doc);
  LoadResult lr = LoadCaseText(doc.dump(), path, SourceDir() + "/library");
  INFO(lr.diagnostics.Format(path));
  REQUIRE(lr.value != nullptr);
  return std::move(lr.value);
}

const OperatingPoint& Point(const Case& cs, const std::string& name) {
  for (const auto& op : cs.envelope.points)
    if (op.name == name) return op;
  FAIL("no point " << name);
  return cs.envelope.points[0];
}

TEST_CASE("placed limits: a relief valve's own closing_margin is the target below its crack") {
  const std::string path = SourceDir() + "/tests/network/check_cases/relief_lift.json";
  auto cs = LoadEdited(path, [](nlohmann::json& doc) {
    doc["checks"] = {{"closing_margin", 0.08}};
    for (auto& c : doc["loops"][0]["components"])
      if (c["id"] == "relief") c["checks"] = {{"closing_margin", 0.12}};
  });
  CaseSolver solver(*cs);
  const OperatingPoint& op = Point(*cs, "full_speed");
  PointResult r = solver.Solve(op, false);
  REQUIRE(r.converged);
  std::vector<CheckWarning> w;
  int seen = 0;
  for (const CheckOutcome& o : EvaluateChecks(*cs, op, r, &w)) {
    if (o.id != CheckId::kReliefClosed) continue;
    CAPTURE(o.where);
    if (o.where == "oil/relief") {
      ++seen;
      // The crack the case gives (2 bar), from the component's own parameter.
      CHECK(o.limit == doctest::Approx(2e5).epsilon(1e-12));
      CHECK(o.source == LimitSource::kComponent);
      CHECK(LimitSourceId(*cs, o) == "oil/relief");
      CHECK(ShutTargetMargin(*cs, o) == doctest::Approx(0.12 * 2e5).epsilon(1e-12));  // its own 0.12
    } else {
      // The pump's internal relief: the case's 0.08 of its crack.
      CHECK(ShutTargetMargin(*cs, o) == doctest::Approx(0.08 * std::abs(o.limit)).epsilon(1e-12));
    }
  }
  CHECK(seen == 1);
  CHECK(LimitAt(*cs, CheckId::kClosingMargin, 0, -1).source == LimitSource::kCase);
}

TEST_CASE("placed limits: a loop's drain_temperature_max judges its bearings and its coupling's duty margin") {
  const std::string path = SourceDir() + "/cases/gearbox_lube_skid.json";
  const double t_loop = 273.15 + 80.0, t_cooler = 273.15 + 75.0;
  for (bool cooler_own : {false, true}) {
    CAPTURE(cooler_own);
    auto cs = LoadEdited(path, [&](nlohmann::json& doc) {
      doc["loops"][0]["checks"] = {{"drain_temperature_max", "80 degC"}};
      if (cooler_own)
        for (auto& c : doc["loops"][0]["components"])
          if (c["id"] == "cooler") c["checks"] = {{"drain_temperature_max", "75 degC"}};
    });
    CaseSolver solver(*cs);
    const OperatingPoint& op = Point(*cs, "hot_running");
    PointResult r = solver.Solve(op, false);
    REQUIRE(r.converged);
    REQUIRE(r.thermal_report.coupling_hot_in.size() == 1);
    const double hot_in = r.thermal_report.coupling_hot_in[0], cold_in = r.thermal_report.coupling_cold_in[0];
    std::vector<CheckWarning> w;
    int bearings = 0, coolers = 0;
    for (const CheckOutcome& o : EvaluateChecks(*cs, op, r, &w)) {
      CAPTURE(o.where);
      if (o.id == CheckId::kDrainTemperatureMax) {
        ++bearings;
        CHECK(o.limit == doctest::Approx(t_loop).epsilon(1e-12));
        CHECK(o.source == LimitSource::kLoop);
        CHECK(LimitSourceId(*cs, o) == "lube");
      }
      if (o.id == CheckId::kCoolerDutyMargin) {
        ++coolers;
        const double t_lim = cooler_own ? t_cooler : t_loop;
        CHECK(o.where == "lube/cooler");
        CHECK(o.value == doctest::Approx((t_lim - cold_in) / (hot_in - cold_in) - 1.0).epsilon(1e-9));
        CHECK(o.limit == doctest::Approx(0.10).epsilon(1e-12));  // its own limit: the default 0.10
        CHECK(o.source == LimitSource::kDefault);
      }
    }
    CHECK(bearings == 5);  // three journal and two rolling bearings
    CHECK(coolers == 1);
  }
}

TEST_CASE("placed limits: a bearing's feed_margin is its feed_pressure_margin; both at once is an error") {
  const std::string path = SourceDir() + "/tests/network/check_cases/feed_margin.json";
  auto with_bearing = [&](const nlohmann::json& extra, Diagnostics* diag) {
    nlohmann::json doc;
    REQUIRE(ParseJsonText(ReadText(path), &doc, diag));
    std::string ptr;
    for (size_t i = 0; i < doc["loops"][0]["components"].size(); ++i) {
      auto& c = doc["loops"][0]["components"][i];
      if (c["id"] != "bearing") continue;
      c.update(extra);
      ptr = "/loops/0/components/" + std::to_string(i);
    }
    REQUIRE(!ptr.empty());
    LoadResult lr = LoadCaseText(doc.dump(), path, SourceDir() + "/library");
    *diag = lr.diagnostics;
    return std::make_pair(std::move(lr.value), ptr);
  };
  Diagnostics d;
  // Written under "checks": the bearing's own limit, 6 psi (NIST SP 811 B.8: 1 psi = 6894.757 Pa).
  auto [cs, ptr] = with_bearing({{"checks", {{"feed_pressure_margin", "6 psi"}}}}, &d);
  REQUIRE(cs != nullptr);
  int ci = -1;
  for (size_t i = 0; i < cs->loops[0].components.size(); ++i)
    if (cs->loops[0].components[i].id == "bearing") ci = int(i);
  const LimitInForce& l = LimitAt(*cs, CheckId::kFeedPressureMargin, 0, ci);
  CHECK(l.si == doctest::Approx(6 * 6894.757293168).epsilon(1e-12));
  CHECK(l.source == LimitSource::kComponent);
  // Both: an error at the checks entry; a "checks" that is not an object: an error at it.
  auto [both, p2] = with_bearing({{"feed_margin", "5 psi"}, {"checks", {{"feed_pressure_margin", "6 psi"}}}}, &d);
  CHECK(both == nullptr);
  CHECK(d.Format("t").find(p2 + "/checks/feed_pressure_margin") != std::string::npos);
  auto [bad, p3] = with_bearing({{"feed_margin", "5 psi"}, {"checks", 5}}, &d);
  CHECK(bad == nullptr);
  CHECK(d.Format("t").find(p3 + "/checks") != std::string::npos);
  CHECK(d.Format("t").find("wrong-type") != std::string::npos);
}

}  // namespace
}  // namespace loopwright
