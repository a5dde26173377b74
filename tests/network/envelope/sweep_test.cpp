// The envelope sweep (network/envelope/sweep.h) over one read-only case:
// the case text is read once, by the loader, and never again by the sweep
// (each thread solves from the same const Case with its own per-point state),
// and the results are the same to the bit on 1 and 2 threads. The property
// under test is equality between two runs of our own code (issue 11), so
// comparing them is the test. Both demo cases are thermal; each gets an
// invented grid (several sweep blocks, so two threads really split it).
#include <doctest/doctest.h>

#include <functional>
#include <memory>
#include <string>
#include <type_traits>

#include <nlohmann/json.hpp>

#include "network/case/case.h"
#include "network/envelope/sweep.h"
#include "tests/tools/same_bits.h"
#include "tests/tools/source_dir.h"

namespace loopwright {
namespace {

using nlohmann::json;
using testing::CheckNumbers;
using testing::CheckTexts;
using testing::DiffBits;
using testing::PointNumbers;
using testing::PointTexts;
using testing::SourceDir;

// The structure says it: a sweep takes the case and nothing to parse, and a
// loaded case holds read-only models and oils.
static_assert(std::is_same_v<decltype(&SolveEnvelope),
                             SweepResult (*)(const Case&, int, const std::function<void(size_t)>&)>,
              "SolveEnvelope takes no case text");
static_assert(std::is_same_v<decltype(ComponentSpec::model), std::unique_ptr<const Component, ModelDeleter>>,
              "a loaded model is read-only");
static_assert(std::is_same_v<decltype(FluidBinding::oil), std::shared_ptr<const OilFluid>>,
              "a bound oil is read-only in the case");

std::unique_ptr<Case> LoadWithGrid(const std::string& rel, const json& axes) {
  json doc;
  Diagnostics d;
  REQUIRE(ParseJsonText(testing::ReadText(SourceDir() + "/" + rel), &doc, &d));
  doc["envelope"]["grids"] = json::array({{{"name", "test"}, {"axes", axes}}});
  LoadResult lr = LoadCaseText(doc.dump(), SourceDir() + "/" + rel, SourceDir() + "/library");
  INFO(lr.diagnostics.Format(rel));
  REQUIRE(lr.value != nullptr);
  return std::move(lr.value);
}

void RequireSameOnOneAndTwoThreads(const Case& cs) {
  REQUIRE(cs.thermal);
  REQUIRE(cs.envelope.points.size() > 2 * kSweepBlock);  // three blocks at least
  const size_t read_before = CaseTextsRead();
  const SweepResult one = SolveEnvelope(cs, 1);
  const SweepResult two = SolveEnvelope(cs, 2);
  CHECK(CaseTextsRead() == read_before);  // the sweep parsed nothing
  REQUIRE(one.points.size() == cs.envelope.points.size());
  REQUIRE(two.points.size() == one.points.size());
  size_t converged = 0;
  for (size_t i = 0; i < one.points.size(); ++i) {
    CAPTURE(one.points[i].name);
    converged += one.points[i].converged ? 1 : 0;
    CHECK(one.points[i].name == two.points[i].name);
    CHECK(DiffBits(PointNumbers(cs, one.points[i]), PointNumbers(cs, two.points[i])) == 0);
    CHECK(PointTexts(cs, one.points[i]) == PointTexts(cs, two.points[i]));
    CHECK(DiffBits(CheckNumbers(one.checks[i]), CheckNumbers(two.checks[i])) == 0);
    CHECK(CheckTexts(one.checks[i]) == CheckTexts(two.checks[i]));
  }
  CHECK(converged == one.points.size());  // a sweep of failures would prove little
  REQUIRE(one.warnings.size() == two.warnings.size());
  for (size_t i = 0; i < one.warnings.size(); ++i) CHECK(one.warnings[i].text == two.warnings[i].text);
}

TEST_CASE("sweep of apu_test_cell with a grid: no parse, bit-identical on 1 and 2 threads") {
  const json axes = {{"boost", {"0 psi", "15 psi", "30 psi"}},
                     {"ambient", {"-10 degC", "20 degC", "45 degC"}},
                     {"clogging", {1.0, 2.0, 3.0}},
                     {"heat_soak", {"100 W", "200 W", "300 W"}}};
  RequireSameOnOneAndTwoThreads(*LoadWithGrid("cases/apu_test_cell.json", axes));
}

TEST_CASE("sweep of gearbox_lube_skid with a grid: no parse, bit-identical on 1 and 2 threads") {
  const json axes = {{"pump_speed", {"1200 rpm", "1450 rpm", "1750 rpm"}},
                     {"water_inlet", {"15 degC", "25 degC", "35 degC"}},
                     {"mesh_loss", {"1.5 kW", "2.5 kW", "3.5 kW"}},
                     {"clogging", {1.0, 2.0, 3.0}}};
  RequireSameOnOneAndTwoThreads(*LoadWithGrid("cases/gearbox_lube_skid.json", axes));
}

}  // namespace
}  // namespace loopwright
