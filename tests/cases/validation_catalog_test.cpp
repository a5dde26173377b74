// The malformed-input catalog: every tests/malformed/NNN_name.json is a small
// case derived from 000_valid_minimal.json with one thing broken. Its first
// line names the diagnostic the loader must produce:
//
//   // expect: <error-id> <json-pointer | line:col | (document)>
//   // message contains: <text>            (optional second line)
//
// 000_valid_minimal.json says "// expect: valid" and must load with no error.
// The expectations were written from the files' content (which field was
// broken, where the JSON text breaks) and checked against the loader.
//
// Also: the 8 MiB size limit, with a file generated at run time into a
// temporary folder; and, for every catalog file that parses as JSON, every
// pointer the loader reports must name a place that exists in the document.

#include <doctest/doctest.h>

#include <unistd.h>

#include <algorithm>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <regex>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "network/case/case.h"
#include "tests/tools/source_dir.h"

using loopwright::testing::SourceDir;
using loopwright::testing::ReadText;

namespace fs = std::filesystem;
using loopwright::Diagnostic;
using loopwright::Diagnostics;
using loopwright::LoadCaseFile;
using loopwright::LoadCaseText;
using loopwright::LoadResult;

namespace {


fs::path CatalogDir() { return fs::path(SourceDir()) / "tests" / "malformed"; }


struct Expectation {
  std::string id;
  std::string where;    // JSON Pointer, "" for the document, or "line:col"
  bool line_col = false;
  int line = 0, column = 0;
  std::string message;  // substring the message must contain ("" = any)
};

// Reads the header comment of a catalog file.
Expectation ReadExpectation(const std::string& text) {
  Expectation e;
  std::istringstream in(text);
  std::string first, second;
  std::getline(in, first);
  std::getline(in, second);
  static const std::regex expect_re(R"(^// expect: (\S+)(?: (\S+))?\s*$)");
  std::smatch m;
  REQUIRE_MESSAGE(std::regex_match(first, m, expect_re), "first line must be \"// expect: ID WHERE\": ", first);
  e.id = m[1];
  e.where = m[2];
  if (e.where == "(document)") e.where.clear();
  static const std::regex lc_re(R"(^(\d+):(\d+)$)");
  std::smatch lc;
  if (std::regex_match(e.where, lc, lc_re)) {
    e.line_col = true;
    e.line = std::stoi(lc[1]);
    e.column = std::stoi(lc[2]);
  }
  const std::string prefix = "// message contains: ";
  if (second.rfind(prefix, 0) == 0) e.message = second.substr(prefix.size());
  return e;
}

bool Matches(const Diagnostic& d, const Expectation& e) {
  if (d.warning || d.id != e.id) return false;
  if (e.line_col) {
    if (d.line != e.line || d.column != e.column) return false;
  } else if (d.pointer != e.where) {
    return false;
  }
  return e.message.empty() || d.message.find(e.message) != std::string::npos;
}

std::string Listing(const Diagnostics& diag) { return diag.Format("case"); }

std::vector<fs::path> CatalogFiles() {
  std::vector<fs::path> files;
  for (const auto& entry : fs::directory_iterator(CatalogDir()))
    if (entry.is_regular_file() && entry.path().extension() == ".json") files.push_back(entry.path());
  std::sort(files.begin(), files.end());
  return files;
}

}  // namespace

TEST_CASE("the catalog is large and its files are named NNN_short_name.json") {
  const auto files = CatalogFiles();
  CHECK(files.size() >= 37);  // the valid minimal case and at least 36 broken ones
  REQUIRE(!files.empty());
  CHECK(files.front().filename() == "000_valid_minimal.json");
  static const std::regex name_re(R"(^\d{3}_[a-z0-9_]+\.json$)");
  std::set<std::string> numbers;
  for (const auto& f : files) {
    const std::string name = f.filename().string();
    INFO(name);
    CHECK(std::regex_match(name, name_re));
    CHECK(numbers.insert(name.substr(0, 3)).second);  // numbers are unique
  }
}

TEST_CASE("every catalog file gives its expected diagnostic") {
  const std::string lib = loopwright::DefaultLibraryDir();
  std::set<std::string> ids_seen;
  int broken = 0;
  for (const auto& f : CatalogFiles()) {
    const std::string name = f.filename().string();
    CAPTURE(name);
    const std::string text = ReadText(f);
    const Expectation e = ReadExpectation(text);
    const LoadResult r = LoadCaseFile(f.string(), lib);
    if (e.id == "valid") {
      CHECK_MESSAGE(!r.diagnostics.HasErrors(), Listing(r.diagnostics));
      CHECK(r.value != nullptr);
      continue;
    }
    ++broken;
    ids_seen.insert(e.id);
    CHECK(r.value == nullptr);
    CHECK(r.diagnostics.HasErrors());
    const auto& items = r.diagnostics.items();
    const bool found = std::any_of(items.begin(), items.end(), [&](const Diagnostic& d) { return Matches(d, e); });
    CHECK_MESSAGE(found, "expected ", e.id, " at ", e.where.empty() ? "(document)" : e.where,
                  e.message.empty() ? "" : " with \"" + e.message + "\"", "; got:\n", Listing(r.diagnostics));
    // Loading the same text directly gives the same diagnostics (the file
    // reader adds nothing of its own below the size limit).
    const LoadResult t = LoadCaseText(text, f.string(), lib);
    CHECK(t.diagnostics.Format("x") == r.diagnostics.Format("x"));
    // Every diagnostic is complete: an id, a message, a pointer that is a
    // JSON Pointer (empty or starting with '/').
    for (const auto& d : items) {
      CHECK(!d.id.empty());
      CHECK(!d.message.empty());
      CHECK((d.pointer.empty() || d.pointer[0] == '/'));
    }
  }
  CHECK(broken >= 36);
  // The catalog covers the main families of errors.
  for (const char* id : {"malformed-json", "wrong-type", "missing-field", "out-of-range", "bad-quantity",
                         "not-finite", "unknown-unit", "wrong-dimension", "unknown-reference", "unknown-part",
                         "unknown-variable", "duplicate-id", "self-loop", "no-pressure-reference", "unreached-node",
                         "disconnected", "unknown-type", "unknown-field", "unknown-choice", "part-path-outside",
                         "too-deep", "bad-fluid", "bad-parameter", "missing-unit", "below-vacuum",
                         "flow-contradiction", "undetermined-pressure", "bad-part"}) {
    CAPTURE(id);
    CHECK(ids_seen.count(id) == 1);
  }
}

TEST_CASE("a broken variable declaration is reported once, not again at every use") {
  // 069: a loop and a point use it; 162: a bearing's speed is bound to it
  // (no second error saying that the bearing has no speed).
  const auto files = CatalogFiles();
  for (const char* name : {"069_broken_variable_no_cascade.json", "162_broken_variable_bound_bearing.json"}) {
    CAPTURE(name);
    const auto it = std::find_if(files.begin(), files.end(), [&](const fs::path& f) { return f.filename() == name; });
    REQUIRE(it != files.end());
    const LoadResult r = LoadCaseFile(it->string(), loopwright::DefaultLibraryDir());
    INFO(Listing(r.diagnostics));
    CHECK(r.diagnostics.ErrorCount() == 1);
  }
}

TEST_CASE("every pointer the loader reports names a place in the document") {
  const std::string lib = loopwright::DefaultLibraryDir();
  int checked = 0;
  for (const auto& f : CatalogFiles()) {
    const std::string name = f.filename().string();
    CAPTURE(name);
    const std::string text = ReadText(f);
    nlohmann::json doc;
    Diagnostics parse_diag;
    if (!loopwright::ParseJsonText(text, &doc, &parse_diag)) {
      // Malformed JSON: the diagnostic carries a line and column instead.
      REQUIRE(!parse_diag.items().empty());
      CHECK(parse_diag.items().front().line > 0);
      CHECK(parse_diag.items().front().column > 0);
      continue;
    }
    const LoadResult r = LoadCaseFile(f.string(), lib);
    for (const auto& d : r.diagnostics.items()) {
      if (d.pointer.empty()) continue;
      CAPTURE(d.pointer);
      bool exists = false;
      try {
        exists = doc.contains(nlohmann::json::json_pointer(d.pointer));
      } catch (const std::exception&) {
        exists = false;  // not even a well-formed pointer
      }
      CHECK(exists);
      ++checked;
    }
  }
  CHECK(checked >= 36);
}

TEST_CASE("a file over the 8 MiB limit is refused; one at the limit is read") {
  const fs::path tmp = fs::temp_directory_path() / ("loopwright_catalog_" + std::to_string(::getpid()));
  fs::create_directories(tmp);
  const std::string valid = ReadText(CatalogDir() / "000_valid_minimal.json");
  REQUIRE(valid.size() + 3 < loopwright::kMaxCaseBytes);
  // The valid case followed by one comment line, `size` bytes in all.
  auto padded = [&](size_t size) { return valid + "//" + std::string(size - valid.size() - 3, '.') + "\n"; };
  const std::string lib = loopwright::DefaultLibraryDir();
  const size_t limit = loopwright::kMaxCaseBytes;
  CHECK(limit == 8u * 1024u * 1024u);  // DESIGN.md / case.h: 8 MiB
  {
    const fs::path p = tmp / "over.json";
    {
      std::ofstream out(p, std::ios::binary);
      out << padded(limit + 1);
    }
    REQUIRE(fs::file_size(p) == limit + 1);
    const LoadResult r = LoadCaseFile(p.string(), lib);
    CHECK(r.value == nullptr);
    const auto& items = r.diagnostics.items();
    REQUIRE(items.size() == 1);
    CHECK(items[0].id == "too-large");
    CHECK(items[0].pointer.empty());
    CHECK(items[0].message.find("8 MiB") != std::string::npos);
    // The text entry point has the same limit.
    const LoadResult t = LoadCaseText(padded(limit + 1), p.string(), lib);
    REQUIRE(!t.diagnostics.items().empty());
    CHECK(t.diagnostics.items()[0].id == "too-large");
  }
  {
    const fs::path p = tmp / "at_limit.json";
    {
      std::ofstream out(p, std::ios::binary);
      out << padded(limit);
    }
    REQUIRE(fs::file_size(p) == limit);
    const LoadResult r = LoadCaseFile(p.string(), lib);
    CHECK_MESSAGE(!r.diagnostics.HasErrors(), Listing(r.diagnostics));
  }
  std::error_code ec;
  fs::remove_all(tmp, ec);
}

TEST_CASE("a missing file and a folder are reported, not thrown") {
  const std::string lib = loopwright::DefaultLibraryDir();
  const LoadResult a = LoadCaseFile((CatalogDir() / "no_such_file.json").string(), lib);
  REQUIRE(a.diagnostics.items().size() == 1);
  CHECK(a.diagnostics.items()[0].id == "cannot-read");
  const LoadResult b = LoadCaseFile(CatalogDir().string(), lib);
  REQUIRE(b.diagnostics.items().size() == 1);
  CHECK(b.diagnostics.items()[0].id == "cannot-read");
}

// Values far outside what their field can physically be load with a warning
// naming the field and the likely slip (the plausible ranges are common
// practice, network/case/plausible.cpp); the case still loads.
TEST_CASE("implausible values load with a warning naming the field and the likely slip") {
  const std::string lib = loopwright::DefaultLibraryDir();
  const std::string valid = ReadText(CatalogDir() / "000_valid_minimal.json");
  struct Slip {
    const char* from;
    const char* to;
    const char* pointer;
    const char* message;
  };
  const Slip slips[] = {
      // A 2,500 m bearing feed line from a bare number (SI metres).
      {R"("length": "1.5 m")", R"("length": 2500)", "/loops/0/components/4/length",
       "length = 2500 m is outside the plausible range of a line length (1 mm to 200 m); a bare number is read in SI "
       "(m): was \"2500 mm\" meant?"},
      // A tank written in psia, below the atmosphere.
      {R"("pressure": "0.3 bar")", R"("pressure": "12 psia")", "/loops/1/nodes/0/boundary/pressure",
       "boundary pressure \"12 psia\" is 0.1859 bar below the atmosphere (1.013 bar abs)"},
      // A loop temperature as a bare number: 60 K.
      {R"("temperature": "60 degC")", R"("temperature": 60)", "/loops/0/temperature",
       "temperature of 60 K is outside the plausible range of a temperature (200 K to 600 K (-73 degC to 327 degC)); "
       "a bare number is read in SI (K): was \"60 degC\" meant?"},
      // A relief crack of 6 Pa.
      {R"("crack": "6 bar")", R"("crack": 6)", "/loops/0/components/1/crack",
       "crack = 6 Pa is outside the plausible range of a valve setting (10 mbar to 700 bar); a bare number is read in "
       "SI (Pa): was \"6 bar\" meant?"},
      // A pump at 1450 rad/s (13,846 rpm) from a bare number.
      {R"("speed": "1450 rpm", "volumetric_efficiency")", R"("speed": 1450, "volumetric_efficiency")",
       "/loops/0/components/0/speed", "speed = 1450 rad/s is outside the plausible range of a pump speed (50 to 12,000 rpm)"},
  };
  for (const Slip& s : slips) {
    CAPTURE(s.to);
    std::string text = valid;
    const size_t at = text.find(s.from);
    REQUIRE(at != std::string::npos);
    text.replace(at, std::string(s.from).size(), s.to);
    const LoadResult r = LoadCaseText(text, "slip.json", lib);
    INFO(Listing(r.diagnostics));
    CHECK(r.value != nullptr);
    const auto& items = r.diagnostics.items();
    CHECK(std::any_of(items.begin(), items.end(), [&](const Diagnostic& d) {
      return d.warning && d.id == "implausible" && d.pointer == s.pointer &&
             d.message.find(s.message) != std::string::npos;
    }));
  }
  // A line length bound to a variable that is 2500 m at one point: the
  // parameter's own range applies at every point.
  {
    std::string text = valid;
    auto sub = [&](const std::string& from, const std::string& to) {
      const size_t at = text.find(from);
      REQUIRE(at != std::string::npos);
      text.replace(at, from.size(), to);
    };
    sub(R"("boost": {"dimension": "pressure", "default": "0 bar"})",
        R"("boost": {"dimension": "pressure", "default": "0 bar"}, "run": {"dimension": "length", "default": "1.5 m"})");
    sub(R"("values": {"boost": "0.2 bar"})", R"("values": {"boost": "0.2 bar", "run": 2500})");
    sub(R"("length": "1.5 m")", R"("length": "$run")");
    const LoadResult r = LoadCaseText(text, "bound.json", lib);
    INFO(Listing(r.diagnostics));
    CHECK(r.value != nullptr);
    const auto& items = r.diagnostics.items();
    CHECK(std::any_of(items.begin(), items.end(), [&](const Diagnostic& d) {
      return d.warning && d.id == "implausible" && d.pointer == "/loops/0/components/4/length" &&
             d.message.find("at envelope point \"nominal\": length = 2500 m is outside the plausible range of a "
                            "line length (1 mm to 200 m)") != std::string::npos;
    }));
  }
  // The valid case itself has no implausible value.
  const LoadResult r = LoadCaseText(valid, "valid.json", lib);
  for (const auto& d : r.diagnostics.items()) CHECK(d.id != "implausible");
}
