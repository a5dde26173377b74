// No state leaks between points (network/point/point_state.h): a point P
// solved, then another point Q with different bound values (an oil grade,
// pump speed, filter clogging, heats), design overrides (a relief crack, the
// plate cooler's conductance) and a pump swapped for a library part, then P
// again on the same CaseSolver, gives P's results to the bit (P is the
// demo's hot_running point). The property
// under test is equality between runs of our own code (issue 11). The case
// is the gearbox_lube_skid demo with its oil grade bound to two envelope
// variables and an invented pump_choice question (the part candidates).
#include <doctest/doctest.h>

#include <memory>
#include <string>

#include <nlohmann/json.hpp>

#include "network/case/case.h"
#include "network/envelope/sensitivity.h"
#include "network/point/run.h"
#include "tests/tools/same_bits.h"
#include "tests/tools/source_dir.h"

namespace loopwright {
namespace {

using nlohmann::json;
using testing::DiffBits;
using testing::PointNumbers;
using testing::PointTexts;
using testing::SourceDir;

std::unique_ptr<Case> GradeBoundGearbox() {
  json doc;
  Diagnostics d;
  const std::string rel = "cases/gearbox_lube_skid.json";
  REQUIRE(ParseJsonText(testing::ReadText(SourceDir() + "/" + rel), &doc, &d));
  doc["fluids"]["gear_oil"] = {{"kind", "oil"}, {"kv40", "$kv40"}, {"kv100", "$kv100"}};
  doc["envelope"]["variables"]["kv40"] = {{"dimension", "kinematic_viscosity"}, {"default", "46 cSt"}};
  doc["envelope"]["variables"]["kv100"] = {{"dimension", "kinematic_viscosity"}, {"default", "6.8 cSt"}};
  doc["envelope"]["points"] = json::array(
      {{{"name", "hot_running"}, {"values", {{"mesh_loss", "3.5 kW"}, {"water_inlet", "32 degC"}}}},
       {{"name", "Q"},
        {"values", {{"kv40", "32 cSt"}, {"kv100", "5.4 cSt"}, {"pump_speed", "1750 rpm"}, {"clogging", 3.0},
                    {"mesh_loss", "1.5 kW"}, {"water_inlet", "15 degC"}}}}});
  doc["design"].push_back({{"id", "pump_swap"}, {"kind", "pump_choice"}, {"component", "lube/pump"},
                           {"candidates", {"gp-12", "gr-05"}}});
  LoadResult lr = LoadCaseText(doc.dump(), SourceDir() + "/" + rel, SourceDir() + "/library");
  INFO(lr.diagnostics.Format(rel));
  REQUIRE(lr.value != nullptr);
  return std::move(lr.value);
}

const DesignQuestion& Question(const Case& cs, const std::string& id) {
  for (const DesignQuestion& q : cs.design)
    if (q.id == id) return q;
  FAIL("no question " << id);
  return cs.design.front();
}

TEST_CASE("a point solved again after another point, with other bindings, knobs and a part, is the same to the bit") {
  auto owned = GradeBoundGearbox();
  const Case& cs = *owned;
  REQUIRE(cs.fluid_bindings.size() == 1);
  REQUIRE(cs.thermal);
  const OperatingPoint& p = cs.envelope.points[FindPoint(cs, "hot_running")];
  const OperatingPoint& q = cs.envelope.points[FindPoint(cs, "Q")];
  const DesignQuestion& swap = Question(cs, "pump_swap");
  REQUIRE(swap.candidates.size() == 2);
  REQUIRE(swap.candidates[0].model != nullptr);

  CaseSolver solver(cs);
  const PointResult first = solver.Solve(p, false);
  REQUIRE(first.converged);
  const int lube = 0, relief = cs.loops[lube].ComponentIndex("relief");
  const int crack = cs.loops[lube].components[relief].type_info->ParamIndex("crack");
  REQUIRE(crack >= 0);

  // Q with design overrides: a higher crack, a larger plate cooler, another pump.
  const double crack0 = solver.Knob(lube, relief, crack, -1);
  REQUIRE(solver.SetKnob(lube, relief, crack, -1, 1.2 * crack0));
  REQUIRE(solver.SetKnob(-1, -1, -1, 0, 1.5 * solver.Knob(-1, -1, -1, 0)));
  solver.overrides.SetPart(swap.loop, swap.comp, &swap.candidates[0]);
  const PointResult other = solver.Solve(q, true);
  REQUIRE(other.converged);
  // Q really ran with them: the swapped pump's parameters, the crack, the grade.
  const int pump = cs.loops[lube].ComponentIndex("pump");
  CHECK(DiffBits(other.branches[pump].params, first.branches[pump].params) > 0);
  CHECK(other.branches[relief].params[crack] == 1.2 * crack0);
  REQUIRE(other.fluids.size() == cs.loops.size());
  CHECK(other.fluids[lube].get() != first.fluids[lube].get());
  // Tangents at Q move knobs and put them back (through the state).
  PointTangents tangents(&solver, q);
  REQUIRE(tangents.ok());
  for (const DesignKnob& k : DesignKnobs(cs)) tangents.Tangent(k);

  solver.overrides = DesignOverrides{};
  const PointResult again = solver.Solve(p, false);
  REQUIRE(again.converged);
  CHECK(DiffBits(PointNumbers(cs, first), PointNumbers(cs, again)) == 0);
  CHECK(PointTexts(cs, first) == PointTexts(cs, again));
  // So does a fresh solver that never saw Q.
  CaseSolver fresh(cs);
  const PointResult alone = fresh.Solve(p, false);
  CHECK(DiffBits(PointNumbers(cs, first), PointNumbers(cs, alone)) == 0);
}

}  // namespace
}  // namespace loopwright
