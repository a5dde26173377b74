// Load-time notes on two modelling slips found by a new user's first case:
// a line between two boundaries (its flow is set by the two boundary
// pressures, not by the oil that arrives) and heat exchangers in a case that
// is not thermal (no energy balance is solved, so they do nothing). Both load
// (warnings, not errors); the shipped demo cases raise neither.
#include <doctest/doctest.h>

#include <filesystem>
#include <string>

#include "network/case/case.h"
#include "tests/tools/source_dir.h"

namespace {

std::string RigCase(bool thermal, bool drain_from_boundary) {
  const std::string housing = drain_from_boundary ? R"({"id": "case", "boundary": {"kind": "pressure", "pressure": "0.05 bar"}})"
                                                  : R"({"id": "case"})";
  return std::string(R"({"name": "notes", )") + (thermal ? R"("thermal": true, )" : "") +
         R"("fluids": {"oil": {"kind": "oil", "kv40": "46 cSt", "kv100": "6.8 cSt"}},
  "loops": [{"id": "lube", "fluid": "oil", "temperature": "40 degC",
    "nodes": [{"id": "tank", "boundary": {"kind": "reservoir", "pressure": "0 bar"}}, {"id": "out"}, {"id": "cool"}, )" +
         housing + R"(],
    "components": [
      {"id": "pump", "type": "displacement_pump", "from": "tank", "to": "out", "displacement": "4 cm3/rev", "speed": "1450 rpm", "slip": 2e-13},
      {"id": "cooler", "type": "air_cooler", "from": "out", "to": "cool", "rated_flow": "6 L/min", "rated_dp": "0.2 bar",
       "rated_viscosity": "20 cSt", "conductance": "25 W/K", "air_flow": "0.15 kg/s", "air_inlet_temperature": "25 degC"},
      {"id": "brg", "type": "journal_bearing", "from": "cool", "to": "case", "diameter": "30 mm", "length": "20 mm", "radial_clearance": "60 um"},
      {"id": "drain", "type": "pipe", "from": "case", "to": "tank", "length": "1 m", "diameter": "20 mm"}]}]})";
}

const loopwright::Diagnostic* Find(const loopwright::Diagnostics& d, const std::string& id) {
  for (const auto& item : d.items())
    if (item.id == id) return &item;
  return nullptr;
}

}  // namespace

TEST_CASE("a drain between two boundaries and an air cooler in a non-thermal case are noted at load") {
  const auto r = loopwright::LoadCaseText(RigCase(false, true), "notes.json", loopwright::DefaultLibraryDir());
  REQUIRE(r.value != nullptr);  // notes, not errors
  const auto* between = Find(r.diagnostics, "between-boundaries");
  REQUIRE(between != nullptr);
  CHECK(between->warning);
  CHECK(between->pointer == "/loops/0/components/3");
  CHECK(between->message.find("\"drain\"") != std::string::npos);
  const auto* heat = Find(r.diagnostics, "not-thermal");
  REQUIRE(heat != nullptr);
  CHECK(heat->warning);
  CHECK(heat->message.find("air_cooler (\"cooler\")") != std::string::npos);
}

TEST_CASE("neither note when the housing is a plain node and the case is thermal") {
  const auto r = loopwright::LoadCaseText(RigCase(true, false), "notes.json", loopwright::DefaultLibraryDir());
  REQUIRE(r.value != nullptr);
  CHECK(Find(r.diagnostics, "between-boundaries") == nullptr);
  CHECK(Find(r.diagnostics, "not-thermal") == nullptr);
}

TEST_CASE("the shipped demo cases raise neither note") {
  for (const auto& e : std::filesystem::directory_iterator(loopwright::testing::SourceDir() + "/cases")) {
    if (e.path().extension() != ".json" || e.path().filename() == "case.schema.json") continue;
    CAPTURE(e.path().string());
    const auto r = loopwright::LoadCaseFile(e.path().string(), loopwright::DefaultLibraryDir());
    CHECK(Find(r.diagnostics, "between-boundaries") == nullptr);
    CHECK(Find(r.diagnostics, "not-thermal") == nullptr);
  }
}
