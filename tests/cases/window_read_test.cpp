// The case loader reads a loop's nodes and components in windows of whole
// elements (network/case/window_scan.h, network/case/fast_parse.h). Here the
// windows are made small (64 B to 4 KiB) so that every fault below lies deep
// inside, at or across a window's edge: each case must load as the exact
// parser reads it (ParseJsonText, nlohmann; forced by a comment appended to
// the text), message for message, and what the windows cannot read exactly
// (a syntax error the scan finds between elements, a comment, a repeated
// key, nesting beyond the limit) must go to the exact parser. Places are
// written by hand from HeaderText's layout (tests/tools/header_text.h).

#include <doctest/doctest.h>

#include <unistd.h>

#include <cstdio>
#include <filesystem>
#include <fstream>
#include <string>
#include <vector>

#include <fmt/format.h>

#include "network/case/case.h"
#include "network/case/fast_parse.h"
#include "tests/tools/header_text.h"

namespace {

using loopwright::CaseTextsParsedExactly;
using loopwright::LoadCaseText;
using loopwright::LoadResult;
using loopwright::test::HeaderText;

// Windows of `bytes` while alive (0 restores the default).
struct WindowBytes {
  explicit WindowBytes(size_t bytes) { loopwright::SetCaseWindowBytes(bytes); }
  ~WindowBytes() { loopwright::SetCaseWindowBytes(0); }
};

std::string Edited(std::string text, const std::string& from, const std::string& to) {
  const size_t at = text.find(from);
  REQUIRE(at != std::string::npos);
  return text.replace(at, from.size(), to);
}

void CheckSameDiagnostics(const LoadResult& a, const LoadResult& b) {
  REQUIRE(a.diagnostics.items().size() == b.diagnostics.items().size());
  for (size_t i = 0; i < a.diagnostics.items().size(); ++i) {
    const auto &x = a.diagnostics.items()[i], &y = b.diagnostics.items()[i];
    CAPTURE(x.message);
    CHECK(x.id == y.id);
    CHECK(x.pointer == y.pointer);
    CHECK(x.message == y.message);
    CHECK(x.line == y.line);
    CHECK(x.column == y.column);
    CHECK(x.warning == y.warning);
  }
}

// The one problem reported: its id, line and column.
void CheckOneProblem(const LoadResult& r, const char* id, int line, int column) {
  REQUIRE(r.diagnostics.items().size() == 1);
  const auto& d = r.diagnostics.items()[0];
  CHECK(d.id == id);
  CHECK(d.line == line);
  CHECK(d.column == column);
}

const int kN = 200;  // bearings: components 2 + 3 * 200 = 602, nodes 3 + 2 * 200 = 403

}  // namespace

TEST_CASE("a header read in windows of a few elements gives each element its place") {
  const std::string text = HeaderText(kN), lib = loopwright::DefaultLibraryDir();
  for (const size_t bytes : {size_t(1), size_t(64), size_t(512), size_t(4096), size_t(0)}) {
    CAPTURE(bytes);
    WindowBytes w(bytes);
    const size_t exact = CaseTextsParsedExactly(), parsed = loopwright::CaseWindowsParsed();
    const LoadResult r = LoadCaseText(text, "header", lib, text.size());
    REQUIRE(r.value != nullptr);
    CHECK(CaseTextsParsedExactly() == exact);
    const auto& loop = r.value->loops[0];
    REQUIRE(loop.components.size() == 602u);
    REQUIRE(loop.nodes.size() == 403u);
    // HeaderText's layout: tube h_i, branch l_i and bearing b_i at 2 + 3 i,
    // 3 + 3 i, 4 + 3 i; nodes n_i and f_i at 3 + 2 i and 4 + 2 i.
    for (int i : {0, 1, 99, 199}) {
      CHECK(loop.components[2 + 3 * i].id == fmt::format("h{}", i));
      CHECK(loop.components[3 + 3 * i].id == fmt::format("l{}", i));
      CHECK(loop.components[4 + 3 * i].id == fmt::format("b{}", i));
      CHECK(loop.nodes[3 + 2 * i].id == fmt::format("n{}", i));
      CHECK(loop.nodes[4 + 2 * i].id == fmt::format("f{}", i));
    }
    CHECK(loop.components[601].model->params()[0] == doctest::Approx(0.040).epsilon(1e-15));  // 40 mm
    const size_t windows = loopwright::CaseWindowsParsed() - parsed;
    if (bytes == 1) CHECK(windows == 602u + 403u);  // one element each
    // A window closes after the element that reaches its size: at most
    // that size plus one element (a bearing's line, 150 characters). The
    // default for this 100 kB text is the least, 4 KiB (1/256 of it is less).
    const size_t size = bytes ? bytes : 4096;
    if (bytes != 1) CHECK(loopwright::LargestCaseWindow() < size + 160);
    // The components' text alone (its "[" to its "]") fills this many windows.
    const size_t components = text.find("\n]") - text.find(R"("components": [)");
    if (bytes != 1) CHECK(windows >= components / (size + 160));
  }
}

TEST_CASE("faults deep in a windowed header read as the exact parser reads them") {
  const std::string text = HeaderText(kN), lib = loopwright::DefaultLibraryDir();
  const std::string b190 = R"("id": "b190", "type": "journal_bearing", "from": "f190", "to": "housing")";
  struct Fault {
    std::string what, text, id, pointer;
    bool exact;  // the windows cannot read it: the exact parser must
  };
  // Bearing b190 is component 4 + 3 * 190 = 574; node f150 is 4 + 2 * 150 = 304.
  const std::vector<Fault> faults = {
      {"a repeated node id", Edited(text, R"({"id": "f150"})", R"({"id": "n150"})"), "duplicate-id",
       "/loops/0/nodes/304/id", false},
      {"a repeated component id", Edited(text, b190, R"("id": "b189", "type": "journal_bearing", "from": "f190", "to": "housing")"),
       "duplicate-id", "/loops/0/components/574/id", false},
      {"an unknown end", Edited(text, b190, R"("id": "b190", "type": "journal_bearing", "from": "f190", "to": "nowhere")"),
       "unknown-reference", "/loops/0/components/574/to", false},
      {"a repeated key in a bearing", Edited(text, R"("eccentricity": 0.5},
  {"id": "h191")", R"("eccentricity": 0.5, "eccentricity": 0.5},
  {"id": "h191")"), "duplicate-key", "/loops/0/components/574/eccentricity", true},
      {"a repeated key in a node", Edited(text, R"({"id": "f150"})", R"({"id": "f150", "id": "f150"})"),
       "duplicate-key", "/loops/0/nodes/304/id", true},
      {"a comment between bearings", Edited(text, "\n  {\"id\": \"h191\"", "\n  // h191\n  {\"id\": \"h191\""), "", "",
       true},
      {"a comment inside a bearing", Edited(text, b190, b190 + " /* b */"), "", "", true},
      {"a comma left out", Edited(text, R"({"id": "n150"}, {"id": "f150"})", R"({"id": "n150"} {"id": "f150"})"),
       "malformed-json", "", true},
      {"a comma doubled", Edited(text, "0.5},\n  {\"id\": \"h191\"", "0.5},,\n  {\"id\": \"h191\""), "malformed-json",
       "", true},
      {"a comma before the first node", Edited(text, R"("nodes": [{"id": "sump")", R"("nodes": [, {"id": "sump")"),
       "malformed-json", "", true},
      {"a comma after the last bearing", Edited(text, "0.5}\n]", "0.5},\n]"), "malformed-json", "", true},
      {"a brace for a bracket", Edited(text, "0.5}\n]", "0.5}\n}"), "malformed-json", "", true},
      {"a colon between nodes", Edited(text, R"({"id": "n150"}, {"id": "f150"})", R"({"id": "n150"}: {"id": "f150"})"),
       "malformed-json", "", true},
      {"a bare word between nodes", Edited(text, R"({"id": "n150"}, {"id": "f150"})", R"({"id": "n150"}, nul, {"id": "f150"})"),
       "malformed-json", "", true},
      {"a node given as a string", Edited(text, R"({"id": "f150"})", R"("f150")"), "*", "", false},
      {"a node given as a number", Edited(text, R"({"id": "f150"})", R"(150)"), "*", "", false},
      {"brackets, quotes and a slash inside a string", Edited(text, b190, b190 + R"(, "notes": "say \"}],{[\" / \\ here, \u00e9t\u00e9 é")"),
       "", "", false},
      {"a number beyond a double", Edited(text, R"("eccentricity": 0.5},
  {"id": "h191")", R"("eccentricity": 1e999},
  {"id": "h191")"), "not-finite", "", true},
  };
  for (const size_t bytes : {size_t(64), size_t(300), size_t(4096)}) {
    WindowBytes w(bytes);
    for (const Fault& f : faults) {
      CAPTURE(bytes);
      CAPTURE(f.what);
      const size_t exact = CaseTextsParsedExactly();
      const LoadResult r = LoadCaseText(f.text, "header", lib, f.text.size());
      CHECK(CaseTextsParsedExactly() == exact + (f.exact ? 1 : 0));
      const std::string forced = f.text + "\n// read by the exact parser";
      const LoadResult e = LoadCaseText(forced, "header", lib, forced.size());
      CHECK(CaseTextsParsedExactly() == exact + (f.exact ? 2 : 1));
      CheckSameDiagnostics(r, e);
      if (f.id == "*") {  // some message, the exact parser's
        CHECK(r.value == nullptr);
        continue;
      }
      if (f.id.empty()) {
        CHECK(r.value != nullptr);  // a comment is allowed
        continue;
      }
      CHECK(r.value == nullptr);
      REQUIRE(!r.diagnostics.items().empty());
      bool found = false;
      for (const auto& d : r.diagnostics.items()) found = found || (d.id == f.id && d.pointer == f.pointer);
      CHECK(found);
    }
  }
}

TEST_CASE("a syntax error found between windows is at the exact parser's line and column") {
  // Drop the comma after bearing b195's line: bearing i is on line
  // 7 + 3 i, so the next line (tube h196's, 5 + 3 * 196 = 593) starts,
  // column 3, where "," or "]" was expected.
  const std::string text = Edited(HeaderText(kN), "0.5},\n  {\"id\": \"h196\"", "0.5}\n  {\"id\": \"h196\"");
  for (const size_t bytes : {size_t(1), size_t(100), size_t(0)}) {
    CAPTURE(bytes);
    WindowBytes w(bytes);
    CheckOneProblem(LoadCaseText(text, "header", loopwright::DefaultLibraryDir(), text.size()), "malformed-json", 593, 3);
  }
}

TEST_CASE("nesting inside a windowed element: 64 levels load, 65 are refused at the bracket that goes deeper") {
  // Tube h0 (line 5) carries "notes" of k nested arrays: the root is level
  // 1, "loops" 2, the loop 3, "components" 4, the tube 5, the arrays 6 ..
  // k + 5; so 59 arrays reach level 64 and a 60th is level 65.
  const std::string h0 = R"({"id": "h0", "type": "tube",)";
  auto nested = [&](int k) {
    return Edited(HeaderText(kN), h0,
                  R"({"id": "h0", "notes": )" + std::string(k, '[') + std::string(k, ']') + R"(, "type": "tube",)");
  };
  WindowBytes w(256);
  const std::string lib = loopwright::DefaultLibraryDir(), ok = nested(59), deep = nested(60);
  const size_t exact = CaseTextsParsedExactly();
  CHECK(LoadCaseText(ok, "header", lib, ok.size()).value != nullptr);
  CHECK(CaseTextsParsedExactly() == exact);
  // Line 5 is `  {"id": "h0", "notes": [[[...`: two spaces and 22
  // characters before the first "[" (column 25); the 60th is column 84.
  CheckOneProblem(LoadCaseText(deep, "header", lib, deep.size()), "too-deep", 5, 84);
}

TEST_CASE("a case file is read in windows, and read whole again when the exact parser must") {
  const std::filesystem::path dir = std::filesystem::temp_directory_path() /
                                    fmt::format("lw_window_read_{}", static_cast<long>(::getpid()));
  std::filesystem::create_directories(dir);
  const std::string plain = HeaderText(kN);
  const std::string broken = Edited(plain, "0.5},\n  {\"id\": \"h196\"", "0.5}\n  {\"id\": \"h196\"");
  auto write = [&](const std::string& name, const std::string& text) {
    std::ofstream(dir / name, std::ios::binary) << text;
    return (dir / name).string();
  };
  const std::string lib = loopwright::DefaultLibraryDir();
  WindowBytes w(512);
  const size_t exact = CaseTextsParsedExactly(), parsed = loopwright::CaseWindowsParsed();
  const LoadResult r = loopwright::LoadCaseFile(write("plain.json", plain), lib, plain.size());
  REQUIRE(r.value != nullptr);
  CHECK(r.value->loops[0].components.size() == 602u);
  CHECK(r.value->loops[0].components[574].id == "b190");
  CHECK(CaseTextsParsedExactly() == exact);
  CHECK(loopwright::CaseWindowsParsed() - parsed > 100u);  // 40 kB of elements in 512 B windows
  const LoadResult b = loopwright::LoadCaseFile(write("broken.json", broken), lib, broken.size());
  REQUIRE(b.diagnostics.items().size() == 1);
  CHECK(b.diagnostics.items()[0].line == 593);
  CHECK(CaseTextsParsedExactly() == exact + 1);
  // One byte over its limit: refused before anything is read, as before.
  const LoadResult big = loopwright::LoadCaseFile((dir / "plain.json").string(), lib, plain.size() - 1);
  REQUIRE(big.diagnostics.items().size() == 1);
  CHECK(big.diagnostics.items()[0].id == "too-large");
  std::filesystem::remove_all(dir);
}
