// The check table (network/case/check_table.h) drives the docs, the schema
// and the loader: every check has a default (or says it is set by the case,
// or is the component's own), a source/basis, a dimension its documented
// default reads in, a row in the README's check table and an entry in the
// shipped JSON Schema (cases/case.schema.json, read from the source tree);
// limits are typed at load with their source, an unknown limit is a load
// error at its JSON Pointer. The defaults themselves are common practice
// (their basis texts say which); the test holds each coded default to the
// text the docs print for it, parsed by the units library.
#include <doctest/doctest.h>

#include <cmath>
#include <set>
#include <string>

#include <nlohmann/json.hpp>

#include "library/units.h"
#include "network/case/case.h"
#include "network/case/check_table.h"
#include "network/envelope/checks.h"
#include "network/point/run.h"
#include "tests/tools/source_dir.h"

using loopwright::testing::ReadText;
using loopwright::testing::SourceDir;

namespace loopwright {
namespace {

TEST_CASE("check table: every row has a name, a dimension, a default or a stated source, a basis and texts") {
  std::set<std::string> names;
  int settings = 0;
  for (int i = 0; i < kNumCheckRows; ++i) {
    const CheckRow& r = CheckTable()[i];
    CAPTURE(r.name);
    CHECK(static_cast<int>(r.id) == i);  // indexed by CheckId
    CHECK(names.insert(r.name).second);
    CHECK(FindCheck(r.name) == &r);
    CHECK(std::string(r.basis).size() > 0);
    CHECK(std::string(r.description).size() > 0);
    CHECK(std::string(r.reads).size() > 0);
    CHECK(DimensionName(r.dim) != std::string());
    if (r.IsCheck()) CHECK(std::string(r.failure).size() > 0);
    else ++settings;
    if (r.limit_from == LimitFrom::kComponent) {
      // The component's own parameter: no default, and the basis names it.
      CHECK(!r.HasDefault());
      CHECK(r.IsCheck());
    } else if (!r.HasDefault()) {
      // A case-only limit documents that the case sets it.
      CHECK(std::string(r.basis).rfind("set by the case", 0) == 0);
    } else {
      // The documented default reads, in the row's dimension, as the coded
      // default (an absolute default against a non-standard ambient).
      const double ambient = 90e3;
      ParsedQuantity q = ParseQuantity(r.default_text, r.dim, ambient);
      REQUIRE(q.ok);
      const double want = r.default_absolute ? r.default_si - ambient : r.default_si;
      CHECK(q.si == doctest::Approx(want).epsilon(1e-12));
      CHECK(q.absolute == r.default_absolute);
    }
  }
  CHECK(settings == 2);  // closing_margin, warmup_temperature
  CHECK(!Check(CheckId::kClosingMargin).IsCheck());
  // The open/closed kinds are exactly the two valve checks.
  for (const CheckRow& r : CheckTable())
    CHECK(r.IsShut() == (r.id == CheckId::kReliefClosed || r.id == CheckId::kFilterBypassClosed));
  CHECK(FindCheck("no_such_check") == nullptr);
}

TEST_CASE("check table: the README's check table is the table's, and the shipped schema has every limit") {
  const std::string readme = ReadText(SourceDir() + "/README.md");
  REQUIRE(!readme.empty());
  const std::string table = CheckTableMarkdown();
  INFO("README.md \"### Checks\" must hold, verbatim:\n" << table);
  CHECK(readme.find(table) != std::string::npos);
  for (const CheckRow& r : CheckTable()) CHECK(table.find(std::string("| `") + r.name + "` |") != std::string::npos);

  const nlohmann::json schema = nlohmann::json::parse(ReadText(SourceDir() + "/cases/case.schema.json"));
  const nlohmann::json& checks = schema["$defs"]["checks"];
  REQUIRE(checks.is_object());
  CHECK(checks["additionalProperties"] == false);
  const std::string own = checks.value("description", "");
  for (const CheckRow& r : CheckTable()) {
    CAPTURE(r.name);
    if (r.limit_from == LimitFrom::kComponent) {
      // Not settable: named, with its source, in the section's description.
      CHECK(!checks["properties"].contains(r.name));
      CHECK(own.find(std::string(r.name) + " (" + r.basis + ")") != std::string::npos);
      continue;
    }
    REQUIRE(checks["properties"].contains(r.name));
    const nlohmann::json& p = checks["properties"][r.name];
    const std::string desc = p.value("description", "");
    CHECK(desc.find(r.basis) != std::string::npos);
    CHECK((desc.find(DimensionName(r.dim)) != std::string::npos || r.dim == Dimension::kDimensionless));
    if (r.HasDefault()) CHECK(p.value("default", "") == r.default_text);
    else CHECK(!p.contains("default"));
  }
}

std::unique_ptr<Case> LoadText(const std::string& text, Diagnostics* diag) {
  LoadResult lr = LoadCaseText(text, "typed.json", SourceDir() + "/library");
  *diag = lr.diagnostics;
  return std::move(lr.value);
}

// Invented loop: a pump feeding a bearing through a line, at 2000 m.
std::string CaseText(const std::string& checks, const std::string& couplings = "") {
  return R"J({"name": "typed limits (invented)", "ambient_pressure": "79.50 kPa",
    "fluids": {"oil": {"kind": "oil", "kv40": "32 cSt", "kv100": "5.4 cSt"}},
    "loops": [{"id": "l", "fluid": "oil", "temperature": "50 degC",
      "nodes": [{"id": "sump", "boundary": {"kind": "reservoir", "pressure": "0 bar"}}, {"id": "feed"}],
      "components": [{"id": "pump", "type": "fixed_flow", "from": "sump", "to": "feed", "flow": "2 L/min"},
                     {"id": "line", "type": "pipe", "from": "feed", "to": "sump", "length": "3 m", "diameter": "8 mm"}]}])J" +
         (couplings.empty() ? "" : ", \"couplings\": " + couplings) + (checks.empty() ? "" : ", \"checks\": " + checks) + "}";
}

TEST_CASE("typed limits: read once at load with their source; an unknown limit or coupling kind is a load error") {
  Diagnostics d;
  auto cs = LoadText(CaseText(R"({"velocity_return_max": "0.5 m/s", "jacket_flow_min": "3 L/min"})"), &d);
  INFO(d.Format("typed.json"));
  REQUIRE(cs != nullptr);
  const CheckLimits& l = cs->checks;
  CHECK(l[CheckId::kVelocityReturnMax] == doctest::Approx(0.5).epsilon(1e-12));
  CHECK(l.at(CheckId::kVelocityReturnMax).source == LimitSource::kCase);
  CHECK(l[CheckId::kJacketFlowMin] == doctest::Approx(3.0 / 60000.0).epsilon(1e-12));
  CHECK(l.at(CheckId::kJacketFlowMin).source == LimitSource::kCase);
  CHECK(l.at(CheckId::kFeedPressureMargin).source == LimitSource::kDefault);
  CHECK(l.at(CheckId::kReliefClosed).source == LimitSource::kComponent);
  CHECK(std::isnan(l[CheckId::kReliefClosed]));
  // 0.7 bar abs at the case's ambient, 79.50 kPa (ISO 2533 at 2000 m, from memory).
  CHECK(l[CheckId::kPumpInletPressureMin] == doctest::Approx(0.7e5 - 79.50e3).epsilon(1e-12));
  // Without "checks": every default, jacket_flow_min unset (case-only).
  auto plain = LoadText(CaseText(""), &d);
  REQUIRE(plain != nullptr);
  CHECK(std::isnan(plain->checks[CheckId::kJacketFlowMin]));
  CHECK(plain->checks.at(CheckId::kVelocityReturnMax).source == LimitSource::kDefault);
  // The outcomes carry the source: the return line's velocity against the
  // case's 0.5 m/s, the default elsewhere.
  CaseSolver solver(*cs);
  PointResult r = solver.Solve(cs->envelope.points[0], false);
  REQUIRE(r.converged);
  std::vector<CheckWarning> w;
  int seen = 0;
  for (const CheckOutcome& o : EvaluateChecks(*cs, cs->envelope.points[0], r, &w)) {
    CAPTURE(o.name());
    CHECK(o.name() == Check(o.id).name);
    if (o.id == CheckId::kVelocityReturnMax) {
      ++seen;
      CHECK(o.source == LimitSource::kCase);
      CHECK(o.limit == doctest::Approx(0.5).epsilon(1e-12));
    }
    if (o.id == CheckId::kDrainCapacityMargin) CHECK(o.source == LimitSource::kDefault);
  }
  CHECK(seen == 1);
  // A misspelt limit, a limit in the wrong dimension and an unknown
  // coupling kind: load errors at their pointers.
  CHECK(LoadText(CaseText(R"({"velocity_retrun_max": 0.5})"), &d) == nullptr);
  CHECK(d.Format("t").find("/checks/velocity_retrun_max") != std::string::npos);
  CHECK(d.Format("t").find("did you mean \"velocity_return_max\"") != std::string::npos);
  CHECK(LoadText(CaseText(R"({"velocity_return_max": "3 bar"})"), &d) == nullptr);
  CHECK(d.Format("t").find("/checks/velocity_return_max") != std::string::npos);
  CHECK(LoadText(CaseText("", R"([{"id": "x", "type": "heat_pipe", "arrangement": "counterflow", "hot": "l/line",
                                   "cold": "l/line", "conductance": "10 W/K"}])"),
                 &d) == nullptr);
  CHECK(d.Format("t").find("/couplings/0/type") != std::string::npos);
}

}  // namespace
}  // namespace loopwright
