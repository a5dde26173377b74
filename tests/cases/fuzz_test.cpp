// Robustness of the case loader: it must return, on any input, either a Case
// or diagnostics -- never crash, throw or hang -- and a Case it returns must be
// usable: the network equations can be built and evaluated at its first
// operating point (no solve).
//
// Inputs, all deterministic (a fixed-seed std::mt19937, whose output sequence
// the C++ standard fixes; only its raw output is used, no distribution):
//   (a) every 7th-byte prefix of the demo case and of 000_valid_minimal;
//   (b) random byte strings, and random JSON-ish token soups;
//   (c) mutations of both valid cases: byte flips, deletions, insertions of
//       the characters { [ " \ and of short fragments, duplicated spans;
//   (d) structural mutations: one to three values of the parsed case replaced
//       by odd ones (0, negative, huge, empty, wrong type, other units, other
//       variables), keys deleted or renamed, array items duplicated. Most of
//       these stay valid JSON, so they reach the validator and, when they pass
//       it, the network builder.
// If the test ever hangs, CTest's timeout reports it.

#include <doctest/doctest.h>

#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <random>
#include <sstream>
#include <string>
#include <vector>

#include <Eigen/Core>
#include <nlohmann/json.hpp>

#include "network/case/case.h"
#include "network/point/run.h"
#include "network/point/system.h"
#include "tests/tools/source_dir.h"

using loopwright::testing::SourceDir;
using loopwright::testing::ReadText;

namespace fs = std::filesystem;
using loopwright::LoadCaseText;
using loopwright::LoadResult;

namespace {



struct Tally {
  int inputs = 0;
  int cases = 0;        // inputs that loaded as a Case
  int diagnosed = 0;    // inputs refused with diagnostics
};

// Loads one input and checks the contract. `path` sits in the catalog folder
// so relative part references resolve somewhere harmless.
void Exercise(const std::string& text, const std::string& path, const std::string& lib, Tally* tally) {
  ++tally->inputs;
  LoadResult r;
  bool threw = false;
  try {
    r = LoadCaseText(text, path, lib);
  } catch (...) {
    threw = true;
  }
  if (threw) {
    // Report the input that made the loader throw (first 200 bytes).
    FAIL_CHECK("LoadCaseText threw on input of ", text.size(), " bytes: ", text.substr(0, 200));
    return;
  }
  if (r.value) {
    ++tally->cases;
    // A returned Case has no errors and is usable.
    CHECK_FALSE(r.diagnostics.HasErrors());
    const loopwright::Case& cs = *r.value;
    REQUIRE(!cs.loops.empty());
    REQUIRE(!cs.envelope.points.empty());
    try {
      loopwright::NetworkSystem sys(cs);
      size_t components = 0;
      for (const auto& l : cs.loops) components += l.components.size();
      CHECK(sys.branches().size() == components);
      loopwright::ApplyPoint(cs, cs.envelope.points.front(), &sys);
      Eigen::VectorXd u, res;
      sys.StartingGuess(&u);
      CHECK(u.size() == sys.NumUnknowns());
      sys.Residuals(u, &res);
      CHECK(res.size() == sys.NumUnknowns());
    } catch (const std::exception& e) {
      FAIL_CHECK("a loaded case could not be built: ", e.what(), "; input: ", text.substr(0, 200));
    }
  } else {
    ++tally->diagnosed;
    // Refused: at least one error, each with an id, a message and a JSON
    // Pointer (empty or starting with '/'); formatting them works.
    CHECK(r.diagnostics.HasErrors());
    for (const auto& d : r.diagnostics.items()) {
      if (d.id.empty() || d.message.empty() || !(d.pointer.empty() || d.pointer[0] == '/')) {
        FAIL_CHECK("incomplete diagnostic [", d.id, "] '", d.pointer, "': ", d.message);
        break;
      }
    }
    CHECK(!r.diagnostics.Format("fuzz").empty());
  }
}

// Raw draws from the generator (portable: mt19937's sequence is standardised).
struct Rng {
  explicit Rng(uint32_t seed) : g(seed) {}
  uint32_t Below(uint32_t n) { return n == 0 ? 0 : static_cast<uint32_t>(g() % n); }
  std::mt19937 g;
};

std::string Mutate(const std::string& base, Rng* rng) {
  static const std::vector<std::string> fragments = {
      "{", "[", "\"", "\\", "}", "]", ",", ":", "//", "/*", "\n", "null", "true", "-", "1e999", "0", "-1",
      "\"$boost\"", "\"nan mm\"", "\"12 mmm\"", "{\"id\": \"x\"}", "[[]]", "\"\\u0000\"", "\xff", "\xc3\x28"};
  std::string s = base;
  const int edits = 1 + static_cast<int>(rng->Below(4));
  for (int k = 0; k < edits && !s.empty(); ++k) {
    const size_t at = rng->Below(static_cast<uint32_t>(s.size()));
    switch (rng->Below(5)) {
      case 0:  // flip a bit
        s[at] = static_cast<char>(s[at] ^ (1u << rng->Below(8)));
        break;
      case 1:  // delete a short span
        s.erase(at, 1 + rng->Below(8));
        break;
      case 2: {  // insert one of { [ " \ .
        static const char kChars[] = {'{', '[', '"', '\\'};
        s.insert(at, 1, kChars[rng->Below(4)]);
        break;
      }
      case 3:  // insert a fragment
        s.insert(at, fragments[rng->Below(static_cast<uint32_t>(fragments.size()))]);
        break;
      default: {  // duplicate a span elsewhere
        const size_t len = 1 + rng->Below(64);
        const std::string span = s.substr(at, len);
        s.insert(rng->Below(static_cast<uint32_t>(s.size())), span);
        break;
      }
    }
  }
  return s;
}

// Replaces, deletes or renames parts of a parsed case.
std::string MutateStructure(const nlohmann::json& base, Rng* rng) {
  static const std::vector<nlohmann::json> palette = {
      0, -1, 1e300, -1e-300, 0.5, 1e6, "0 mm", "-3 mm", "1e308 bar", "1e-300 m", "5 L/min", "90 degC",
      "-300 degC", "1e30 rpm", "0.5 bara", "$boost", "$oil_temperature", "$clogging", "$nosuch", "", "x",
      nullptr, true, nlohmann::json::array(), nlohmann::json::object(), {{1, 2}}, {"a", "b"},
      std::string(300, 'z'), "sump", "pump_out", "housing", "gp-08", "flt-10", "local.json#p"};
  nlohmann::json doc = base;
  const int edits = 1 + static_cast<int>(rng->Below(3));
  for (int k = 0; k < edits; ++k) {
    // Every place in the document, leaves and containers.
    std::vector<nlohmann::json::json_pointer> places;
    std::vector<nlohmann::json::json_pointer> stack = {nlohmann::json::json_pointer()};
    while (!stack.empty()) {
      auto ptr = stack.back();
      stack.pop_back();
      places.push_back(ptr);
      const nlohmann::json& v = doc.at(ptr);
      if (v.is_object()) {
        for (auto it = v.begin(); it != v.end(); ++it) stack.push_back(ptr / it.key());
      } else if (v.is_array()) {
        for (size_t i = 0; i < v.size(); ++i) stack.push_back(ptr / i);
      }
    }
    if (places.size() < 2) break;
    const auto where = places[1 + rng->Below(static_cast<uint32_t>(places.size() - 1))];
    nlohmann::json& parent = doc.at(where.parent_pointer());
    const std::string last = where.back();
    nlohmann::json& target = doc.at(where);
    if (target.is_string() && rng->Below(2) == 0) {
      // A "value unit" string scaled by a large or small factor: usually
      // still valid, so the network is built with extreme values.
      static const double kFactors[] = {1e-9, 1e-3, 0.1, 10, 1e3, 1e9};
      const std::string text = target.get<std::string>();
      const size_t space = text.find(' ');
      char* end = nullptr;
      const double value = std::strtod(text.c_str(), &end);
      if (space != std::string::npos && end == text.c_str() + space) {
        char buf[64];
        std::snprintf(buf, sizeof(buf), "%.6g", value * kFactors[rng->Below(6)]);
        target = buf + text.substr(space);
        continue;
      }
    }
    switch (rng->Below(4)) {
      case 0:
      case 1:  // replace by an odd value, or by another place's value
        if (rng->Below(4) == 0) {
          nlohmann::json other = doc.at(places[rng->Below(static_cast<uint32_t>(places.size()))]);
          doc.at(where) = other;
        } else {
          doc.at(where) = palette[rng->Below(static_cast<uint32_t>(palette.size()))];
        }
        break;
      case 2:  // delete
        if (parent.is_object()) parent.erase(last);
        else parent.erase(static_cast<size_t>(std::stoul(last)));
        break;
      default:  // rename a key, or duplicate an array item
        if (parent.is_object()) {
          nlohmann::json v = parent[last];
          parent.erase(last);
          parent[last + (rng->Below(2) ? "s" : "_")] = v;
        } else {
          parent.push_back(parent[std::stoul(last)]);
        }
        break;
    }
  }
  return doc.dump();
}

struct Seeds {
  std::string demo, minimal;
  std::string demo_path, minimal_path;
};

Seeds LoadSeeds() {
  Seeds s;
  s.demo_path = (fs::path(SourceDir()) / "cases" / "apu_test_cell.json").string();
  s.minimal_path = (fs::path(SourceDir()) / "tests" / "malformed" / "000_valid_minimal.json").string();
  s.demo = ReadText(s.demo_path);
  s.minimal = ReadText(s.minimal_path);
  return s;
}

}  // namespace

TEST_CASE("the seeds load, so mutations start from valid cases") {
  const Seeds s = LoadSeeds();
  const std::string lib = loopwright::DefaultLibraryDir();
  REQUIRE(s.demo.size() > 1000);
  REQUIRE(s.minimal.size() > 1000);
  for (const auto& [text, path] : {std::pair{s.demo, s.demo_path}, std::pair{s.minimal, s.minimal_path}}) {
    CAPTURE(path);
    const LoadResult r = LoadCaseText(text, path, lib);
    CHECK_MESSAGE(r.value != nullptr, r.diagnostics.Format(path));
  }
}

TEST_CASE("every 7th-byte prefix of the valid cases returns") {
  const Seeds s = LoadSeeds();
  const std::string lib = loopwright::DefaultLibraryDir();
  Tally t;
  for (const auto& [text, path] : {std::pair{s.demo, s.demo_path}, std::pair{s.minimal, s.minimal_path}}) {
    for (size_t n = 0; n < text.size(); n += 7) Exercise(text.substr(0, n), path, lib, &t);
  }
  MESSAGE(t.inputs, " prefixes: ", t.cases, " loaded, ", t.diagnosed, " refused");
  // A strict prefix of a JSON object never closes it: all are refused.
  CHECK(t.cases == 0);
  CHECK(t.inputs == t.diagnosed);
  CHECK(t.inputs > 500);
}

TEST_CASE("random byte strings and token soups return") {
  const Seeds s = LoadSeeds();
  const std::string lib = loopwright::DefaultLibraryDir();
  Rng rng(20240611u);
  Tally t;
  static const std::vector<std::string> tokens = {"{", "}", "[", "]", ",", ":", "\"name\"", "\"loops\"",
                                                  "\"fluids\"", "\"id\"", "\"a\"", "1", "-0.5e3", "true",
                                                  "null", "\"8 mm\"", "\"$x\"", "//c\n", " "};
  for (int i = 0; i < 1500; ++i) {
    std::string text;
    const uint32_t len = rng.Below(300);
    if (i % 2 == 0) {
      for (uint32_t k = 0; k < len; ++k) text += static_cast<char>(rng.Below(256));
    } else {
      for (uint32_t k = 0; k < len / 4; ++k) text += tokens[rng.Below(static_cast<uint32_t>(tokens.size()))];
    }
    Exercise(text, s.minimal_path, lib, &t);
  }
  MESSAGE(t.inputs, " random inputs: ", t.cases, " loaded, ", t.diagnosed, " refused");
  CHECK(t.inputs == 1500);
}

TEST_CASE("random mutations of the valid cases return, and loaded ones are usable") {
  const Seeds s = LoadSeeds();
  const std::string lib = loopwright::DefaultLibraryDir();
  Rng rng(77u);
  Tally t;
  for (int i = 0; i < 2000; ++i) {
    const bool demo = i % 2 == 0;
    Exercise(Mutate(demo ? s.demo : s.minimal, &rng), demo ? s.demo_path : s.minimal_path, lib, &t);
  }
  MESSAGE(t.inputs, " mutations: ", t.cases, " loaded, ", t.diagnosed, " refused");
  CHECK(t.inputs == 2000);
  // Both outcomes occur: some mutations (in comments, descriptions) leave a
  // valid case, most break it.
  CHECK(t.cases > 0);
  CHECK(t.diagnosed > 0);
}

TEST_CASE("structural mutations of the valid cases return, and loaded ones are usable") {
  const Seeds s = LoadSeeds();
  const std::string lib = loopwright::DefaultLibraryDir();
  nlohmann::json demo, minimal;
  loopwright::Diagnostics d;
  REQUIRE(loopwright::ParseJsonText(s.demo, &demo, &d));
  REQUIRE(loopwright::ParseJsonText(s.minimal, &minimal, &d));
  Rng rng(4242u);
  Tally t;
  for (int i = 0; i < 3000; ++i) {
    const bool use_demo = i % 2 == 0;
    Exercise(MutateStructure(use_demo ? demo : minimal, &rng), use_demo ? s.demo_path : s.minimal_path, lib, &t);
  }
  MESSAGE(t.inputs, " structural mutations: ", t.cases, " loaded, ", t.diagnosed, " refused");
  CHECK(t.inputs == 3000);
  CHECK(t.cases > 0);
  CHECK(t.diagnosed > 0);
}
