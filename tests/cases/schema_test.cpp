// The JSON Schema of case files against the registry and the shipped files:
//   * the shipped cases/case.schema.json is exactly CaseSchema() (regenerate
//     it with `loopwright schema -o cases/case.schema.json` after changing a
//     component type, a check limit or a vocabulary);
//   * the component type enum is ComponentTypeNames();
//   * every parameter spec of every type appears in its component definition,
//     with the schema shape its kind calls for;
//   * every shipped case loads with no errors and uses only enum types.

#include <doctest/doctest.h>

#include <algorithm>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "components/registry.h"
#include "network/case/case.h"
#include "network/case/schema.h"
#include "tests/tools/source_dir.h"

using loopwright::testing::SourceDir;

namespace fs = std::filesystem;
using nlohmann::json;

namespace {


json ShippedSchema() {
  std::ifstream in(fs::path(SourceDir()) / "cases" / "case.schema.json");
  REQUIRE_MESSAGE(in.good(), "cases/case.schema.json is missing; write it with `loopwright schema -o cases/case.schema.json`");
  return json::parse(in);  // plain JSON, no comments
}

std::vector<fs::path> ShippedCases() {
  std::vector<fs::path> files;
  for (const auto& e : fs::directory_iterator(fs::path(SourceDir()) / "cases"))
    if (e.is_regular_file() && e.path().extension() == ".json" && e.path().filename() != "case.schema.json")
      files.push_back(e.path());
  std::sort(files.begin(), files.end());
  return files;
}

// The first differing place of two JSON values, for a readable failure.
std::string FirstDifference(const json& a, const json& b) {
  const json patch = json::diff(a, b);
  return patch.empty() ? "" : patch[0].dump().substr(0, 300);
}

}  // namespace

TEST_CASE("the shipped schema is the generated one") {
  const json shipped = ShippedSchema();
  const json generated = loopwright::CaseSchema();
  CHECK_MESSAGE(shipped == generated,
                "cases/case.schema.json is stale (a component type, check limit or vocabulary changed); regenerate it "
                "from the source root with `build/loopwright schema -o cases/case.schema.json` (generated from the "
                "registry, never edited by hand). "
                "First difference (shipped -> generated): ",
                FirstDifference(shipped, generated));
}

TEST_CASE("the schema declares draft 2020-12 and the case's top-level keys") {
  const json s = loopwright::CaseSchema();
  CHECK(s.at("$schema") == "https://json-schema.org/draft/2020-12/schema");
  CHECK(s.at("type") == "object");
  CHECK(s.at("additionalProperties") == false);
  for (const char* key : {"name", "fluids", "loops"}) {
    CAPTURE(key);
    const auto& req = s.at("required");
    CHECK(std::find(req.begin(), req.end(), key) != req.end());
  }
  for (const char* key : {"fluids", "loops", "couplings", "envelope", "checks", "design"}) {
    CAPTURE(key);
    CHECK(s.at("properties").contains(key));
  }
}

TEST_CASE("the component type enum is the registry's type list") {
  const json s = loopwright::CaseSchema();
  const json& e = s.at("$defs").at("component").at("properties").at("type").at("enum");
  const std::vector<std::string> names = loopwright::ComponentTypeNames();
  CHECK(e.get<std::vector<std::string>>() == names);
  // One conditional branch per type, each pointing at its definition.
  const json& all_of = s.at("$defs").at("component").at("allOf");
  REQUIRE(all_of.size() == names.size());
  for (size_t i = 0; i < names.size(); ++i) {
    CAPTURE(names[i]);
    CHECK(all_of[i].at("if").at("properties").at("type").at("const") == names[i]);
    CHECK(all_of[i].at("then").at("$ref") == "#/$defs/component_" + names[i]);
  }
}

TEST_CASE("every parameter spec of every type is in its component definition") {
  const json s = loopwright::CaseSchema();
  int specs = 0;
  for (const auto& t : loopwright::ComponentTypes()) {
    CAPTURE(t.name);
    const std::string def_name = "component_" + t.name;
    REQUIRE(s.at("$defs").contains(def_name));
    const json& def = s.at("$defs").at(def_name);
    CHECK(def.at("additionalProperties") == false);
    CHECK(def.at("properties").at("type").at("const") == t.name);
    for (const char* key : {"id", "from", "to", "part"}) CHECK(def.at("properties").contains(key));
    CHECK(def.at("properties").contains("feed_margin") == ((t.roles & loopwright::kRoleBearing) != 0));
    for (const auto& p : t.params) {
      CAPTURE(p.name);
      ++specs;
      REQUIRE(def.at("properties").contains(p.name));
      const json& ps = def.at("properties").at(p.name);
      switch (p.kind) {
        case loopwright::ParamKind::kNumber:
          // A number (SI) or a "value unit" string.
          CHECK(ps.at("anyOf").size() == 2);
          break;
        case loopwright::ParamKind::kBool:
          CHECK(ps.at("type") == "boolean");
          break;
        case loopwright::ParamKind::kChoice:
          CHECK(ps.at("enum").get<std::vector<std::string>>() == p.choices);
          break;
        case loopwright::ParamKind::kNameList:
          CHECK(ps.at("type") == "array");
          CHECK(ps.at("items").at("enum").get<std::vector<std::string>>() == p.choices);
          break;
        case loopwright::ParamKind::kTable:
          CHECK(ps.at("type") == "array");
          CHECK(ps.at("minItems") == p.min_rows);
          CHECK(ps.at("items").at("prefixItems").size() == p.columns.size());
          CHECK(ps.at("items").at("minItems") == p.columns.size());
          CHECK(ps.at("items").at("maxItems") == p.columns.size());
          break;
      }
    }
    // Nothing in the definition that the loader would reject as unknown.
    std::set<std::string> allowed = {"id",     "type",        "from",  "to",          "part",  "feed_margin",
                                     "checks", "sensed_node", "fixed", "description", "notes",
                                     "volume"};
    for (const auto& p : t.params) allowed.insert(p.name);
    for (auto it = def.at("properties").begin(); it != def.at("properties").end(); ++it) {
      CAPTURE(it.key());
      CHECK(allowed.count(it.key()) == 1);
    }
  }
  CHECK(specs > 50);
}

TEST_CASE("every shipped case loads with no errors and uses only enum types") {
  const json s = loopwright::CaseSchema();
  const auto types = s.at("$defs").at("component").at("properties").at("type").at("enum").get<std::vector<std::string>>();
  const auto files = ShippedCases();
  REQUIRE(!files.empty());
  for (const auto& f : files) {
    CAPTURE(f.filename().string());
    const loopwright::LoadResult r = loopwright::LoadCaseFile(f.string(), loopwright::DefaultLibraryDir());
    CHECK_MESSAGE(!r.diagnostics.HasErrors(), r.diagnostics.Format(f.filename().string()));
    if (!r.value) continue;
    int n = 0;
    for (const auto& loop : r.value->loops) {
      for (const auto& c : loop.components) {
        CAPTURE(c.id);
        CHECK(std::find(types.begin(), types.end(), c.type()) != types.end());
        ++n;
      }
    }
    CHECK(n > 0);
  }
}
