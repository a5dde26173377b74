// Loading is linear in the case's size, counted, not timed: on generated
// supply-header cases of N = 1,000, 4,000 and 16,000 bearings, the parser's
// events (ParseJsonText's SAX handler: one per value, key and bracket) and
// the heap allocations of the exact parse and of the whole load (the fast
// parse's, network/case/fast_parse.h; counted by a replaced global operator
// new in this test executable) per bearing stay constant. A quadratic step (a rescan of the parent array after every
// object, a copy of the growing document, a per-item search of a growing
// list that allocates) makes the counts per bearing grow with N. Also: the
// duplicate-key pointers the SAX handler builds (nested, in arrays, escaped),
// the document keeping the last of a repeated key, and the line and column of
// a syntax error deep in a large case, each written by hand from the text.
// The windows the fast parse reads the loops' elements in (set to 4 KiB)
// per bearing stay constant too. And the heap the load holds beyond the case it keeps (live bytes counted
// by the same operator new): less than half the text, so neither the whole
// text nor a parsed document of it (DEVELOPERS.md, "Reading in windows").
// (The malformed-input catalog, tests/cases/validation_catalog_test.cpp, pins
// every earlier diagnostic and passes unchanged.)

#include <doctest/doctest.h>

#include <malloc.h>

#include <atomic>
#include <cmath>
#include <cstdlib>
#include <map>
#include <new>
#include <string>
#include <vector>

#include <fmt/format.h>
#include <nlohmann/json.hpp>

#include "network/case/case.h"
#include "network/case/fast_parse.h"
#include "tests/tools/header_text.h"

namespace {
std::atomic<size_t> allocations{0};
// Heap bytes in use and their peak (malloc_usable_size of each block).
std::atomic<long long> live_bytes{0}, peak_bytes{0};

void CountBytes(long long delta) {
  const long long now = live_bytes += delta;
  long long peak = peak_bytes.load();
  while (now > peak && !peak_bytes.compare_exchange_weak(peak, now)) {
  }
}
}  // namespace

void* operator new(std::size_t n) {
  ++allocations;
  if (void* p = std::malloc(n ? n : 1)) {
    CountBytes(static_cast<long long>(malloc_usable_size(p)));
    return p;
  }
  throw std::bad_alloc();
}
void operator delete(void* p) noexcept {
  if (p) CountBytes(-static_cast<long long>(malloc_usable_size(p)));
  std::free(p);
}
void operator delete(void* p, std::size_t) noexcept { operator delete(p); }

namespace {

using loopwright::Diagnostics;
using nlohmann::json;
using loopwright::test::HeaderText;

struct Counts {
  double events = 0, parse_allocations = 0, load_allocations = 0;  // per bearing
};

Counts CountPerBearing(int n) {
  const std::string text = HeaderText(n);
  Counts c;
  json doc;
  Diagnostics diag;
  const size_t e0 = loopwright::JsonEventsParsed();
  const size_t a0 = allocations.load();
  REQUIRE(loopwright::ParseJsonText(text, &doc, &diag, text.size()));
  c.parse_allocations = double(allocations.load() - a0) / n;
  c.events = double(loopwright::JsonEventsParsed() - e0) / n;
  const size_t a1 = allocations.load(), exact = loopwright::CaseTextsParsedExactly();
  const loopwright::LoadResult r = loopwright::LoadCaseText(text, "header", loopwright::DefaultLibraryDir(), text.size());
  c.load_allocations = double(allocations.load() - a1) / n;
  CHECK(loopwright::CaseTextsParsedExactly() == exact);  // the load counted is the fast parse's
  INFO(r.diagnostics.Format("header"));
  REQUIRE(r.value != nullptr);
  REQUIRE(r.value->loops[0].components.size() == size_t(3 * n + 2));
  return c;
}

}  // namespace

TEST_CASE("parser events and allocations per bearing stay constant from N = 1,000 to 16,000") {
  // A small case first: what a process builds once (the component
  // registry, the plausible ranges, the parts library's statics: about
  // 1,150 allocations) is not charged to the first N measured (with about 7
  // allocations per bearing it would be 0.4 of them at N = 1,000).
  CountPerBearing(10);
  const Counts small = CountPerBearing(1000), mid = CountPerBearing(4000), large = CountPerBearing(16000);
  // The cost of each bearing added, from 1,000 to 4,000 and from 4,000 to
  // 16,000, within 2 % (the fixed part, pump, fluids and the parts library,
  // cancels out; the vectors' doublings remain); a quadratic step would make
  // the second four times the first.
  auto added = [](double per_a, int a, double per_b, int b) { return (per_b * b - per_a * a) / (b - a); };
  CHECK(added(small.events, 1000, mid.events, 4000) / added(mid.events, 4000, large.events, 16000) ==
        doctest::Approx(1).epsilon(0.02));
  CHECK(added(small.parse_allocations, 1000, mid.parse_allocations, 4000) /
            added(mid.parse_allocations, 4000, large.parse_allocations, 16000) ==
        doctest::Approx(1).epsilon(0.02));
  CHECK(added(small.load_allocations, 1000, mid.load_allocations, 4000) /
            added(mid.load_allocations, 4000, large.load_allocations, 16000) ==
        doctest::Approx(1).epsilon(0.02));
  // Each bearing's three components and two nodes, counted from the text: a
  // tube has 6 keys and 6 values in braces (14 events), a bearing 8 and 8
  // (18), a node 1 and 1 (4): 14 + 14 + 18 + 4 + 4 = 54 events per bearing.
  MESSAGE(small.load_allocations, " ", mid.load_allocations, " ", large.load_allocations);
  CHECK(large.events == doctest::Approx(54).epsilon(0.001));
}

TEST_CASE("windows of a set size: their number per bearing stays constant from N = 1,000 to 16,000") {
  // Each window closes after the element that reaches 4 KiB: a bearing's
  // 414 bytes of text (three components and two nodes) fill 0.1 of one, so
  // windows per bearing are constant (about 0.1) whatever N; a scan that
  // split the arrays wrongly or read a window twice would change it.
  loopwright::SetCaseWindowBytes(4096);
  double per[3] = {0, 0, 0};
  const int ns[3] = {1000, 4000, 16000};
  for (int k = 0; k < 3; ++k) {
    const std::string text = HeaderText(ns[k]);
    const size_t w0 = loopwright::CaseWindowsParsed();
    const loopwright::LoadResult r = loopwright::LoadCaseText(text, "header", loopwright::DefaultLibraryDir(), text.size());
    REQUIRE(r.value != nullptr);
    per[k] = double(loopwright::CaseWindowsParsed() - w0) / ns[k];
    // At least the elements' text over the window's size plus one element.
    CHECK(double(loopwright::CaseWindowsParsed() - w0) >= double(text.size() - 1000) / (4096 + 160));
  }
  loopwright::SetCaseWindowBytes(0);
  MESSAGE("windows per bearing: ", per[0], " ", per[1], " ", per[2]);
  CHECK(per[0] / per[2] == doctest::Approx(1).epsilon(0.02));
  CHECK(per[1] / per[2] == doctest::Approx(1).epsilon(0.02));
}

TEST_CASE("the load holds neither the whole text nor a parsed document of it: windows") {
  // The heap's peak during the load of a header file, over what the loaded
  // case keeps, at N = 4,000 and 16,000 (texts of 1.9 and 7.7 MB): read
  // whole, the text alone would be 1.0 of its size and simdjson's document
  // of all of it about 1.8 (its tape 8 bytes per value); in windows
  // (network/case/window_scan.h) the windows are 1/256 of the text at these
  // sizes, each held with its document, and the loops' slots 16 B per node
  // and component (80 B per bearing of about 414: 0.19 of the text); what
  // the readers hold while they build the case comes on top. Measured
  // 2026-12-05: 0.37 of the text at both sizes; the bound is 0.5, which a
  // whole text or a whole parsed document crosses.
  for (const int n : {4000, 16000}) {
    const std::string text = HeaderText(n);
    const long long base = live_bytes.load();
    peak_bytes = base;
    const loopwright::LoadResult r = loopwright::LoadCaseText(text, "header", loopwright::DefaultLibraryDir(), text.size());
    REQUIRE(r.value != nullptr);
    const double kept = double(live_bytes.load() - base), extra = double(peak_bytes.load() - base) - kept;
    MESSAGE("N = ", n, ": text ", text.size(), " B, case kept ", kept, " B, the load's extra ", extra, " B (",
            extra / double(text.size()), " of the text)");
    CHECK(extra < 0.5 * double(text.size()));
  }
}

TEST_CASE("a repeated key is reported at its pointer, nested, in arrays and escaped; the last one is kept") {
  const std::string text = R"({"a": 1, "b": {"c": [1, {"d": 1, "e": [], "d": {"f": 2}}]},
    "x/y~z": 1, "x/y~z": 2, "list": [{"k": 1}, {"k": 1}], "a": 3})";
  json doc;
  Diagnostics diag;
  REQUIRE(loopwright::ParseJsonText(text, &doc, &diag));
  const auto& items = diag.items();
  REQUIRE(items.size() == 3);  // the two objects in "list" each hold "k" once
  CHECK(items[0].id == "duplicate-key");
  CHECK(items[0].pointer == "/b/c/1/d");
  CHECK(items[1].pointer == "/x~1y~0z");
  CHECK(items[2].pointer == "/a");
  CHECK(doc["a"] == 3);
  CHECK(doc["b"]["c"][1]["d"] == json{{"f", 2}});
  CHECK(doc["b"]["c"][1]["e"] == json::array());
  CHECK(doc["x/y~z"] == 2);
  CHECK(doc["list"].size() == 2);
}

TEST_CASE("a syntax error deep in a large case is reported at its line and column") {
  const int n = 16000;
  std::string text = HeaderText(n);
  // Drop the comma after bearing 9,999's line (line 7 + 3 * 9,999): the
  // next line's "{" (column 3) is where the array of components expected
  // "," or "]".
  const std::string bearing = "{\"id\": \"b9999\"";
  const size_t at = text.find(bearing);
  REQUIRE(at != std::string::npos);
  const size_t comma = text.find("},\n", at);
  REQUIRE(comma != std::string::npos);
  text.erase(comma + 1, 1);
  json doc;
  Diagnostics diag;
  CHECK_FALSE(loopwright::ParseJsonText(text, &doc, &diag, text.size()));
  REQUIRE(diag.items().size() == 1);
  const auto& d = diag.items()[0];
  CHECK(d.id == "malformed-json");
  CHECK(d.line == 30005);
  CHECK(d.column == 3);
  CHECK(d.message.find("expected ']'") != std::string::npos);
}

TEST_CASE("the case-size option takes a unit and a sane range") {
  size_t bytes = 0;
  std::string error;
  CHECK(loopwright::ParseByteSize("64 MiB", &bytes, &error));
  CHECK(bytes == 64u * 1024u * 1024u);
  CHECK(loopwright::ParseByteSize("1.5GiB", &bytes, &error));
  CHECK(bytes == 1610612736u);  // 1.5 * 2^30
  CHECK(loopwright::ParseByteSize("500 kB", &bytes, &error));
  CHECK(bytes == 500000u);
  for (const char* bad : {"64", "64 mib", "MiB", "-1 MiB", "0.5 KiB", "2 TB", "nan MiB", ""}) {
    CAPTURE(bad);
    CHECK_FALSE(loopwright::ParseByteSize(bad, &bytes, &error));
    CHECK(!error.empty());
  }
}

namespace {

// The header's text with `from` replaced by `to` (once; required to be there).
std::string Edited(std::string text, const std::string& from, const std::string& to) {
  const size_t at = text.find(from);
  REQUIRE(at != std::string::npos);
  return text.replace(at, from.size(), to);
}

}  // namespace

TEST_CASE("the fast parse reads a plain case; what it cannot read exactly goes to the exact parser, same messages") {
  using loopwright::CaseTextsParsedExactly;
  using loopwright::LoadCaseText;
  const int n = 1000;
  const std::string text = HeaderText(n);
  const std::string lib = loopwright::DefaultLibraryDir();
  size_t exact = CaseTextsParsedExactly();
  const auto plain = LoadCaseText(text, "header", lib, text.size());
  REQUIRE(plain.value != nullptr);
  CHECK(plain.value->loops[0].components.size() == size_t(3 * n + 2));
  CHECK(CaseTextsParsedExactly() == exact);  // the fast parse read it

  SUBCASE("a repeated key in a bearing is reported at its pointer") {
    // Bearing b5 is component 4 + 3 * 5 = 19 (pump 0, relief 1, then h_i,
    // l_i, b_i at 2 + 3 i, 3 + 3 i, 4 + 3 i: HeaderText's layout).
    const std::string t = Edited(text, R"("id": "b5", "type": "journal_bearing",)",
                                 R"("id": "b5", "type": "journal_bearing", "type": "journal_bearing",)");
    const auto r = LoadCaseText(t, "header", lib, t.size() + 100);
    CHECK(r.value == nullptr);
    REQUIRE(!r.diagnostics.items().empty());
    CHECK(r.diagnostics.items()[0].id == "duplicate-key");
    CHECK(r.diagnostics.items()[0].pointer == "/loops/0/components/19/type");
    CHECK(CaseTextsParsedExactly() == exact + 1);
  }
  SUBCASE("a component's repeated parameter, note or nested key is found while its members are gathered") {
    // Each goes to the exact parser, which names the repeated key (nlohmann's
    // reader, not the fast parse's gathering: the pointers below come from it).
    // Tube h5 is component 2 + 3 * 5 = 17.
    const std::string h5 = R"("id": "h5", "type": "tube",)";
    const std::pair<std::string, std::string> cases[] = {
        {R"("id": "h5", "type": "tube", "length": "1 m",)", "/loops/0/components/17/length"},
        {R"("id": "h5", "notes": "a", "type": "tube", "notes": "b",)", "/loops/0/components/17/notes"},
        {R"("id": "h5", "checks": {"velocity_pressure_max": "2 m/s", "velocity_pressure_max": "3 m/s"}, "type": "tube",)",
         "/loops/0/components/17/checks/velocity_pressure_max"},
        {R"("id": "h5", "type": "tube", "id": "h5",)", "/loops/0/components/17/id"},
    };
    for (const auto& [edit, pointer] : cases) {
      CAPTURE(edit);
      const size_t before = CaseTextsParsedExactly();
      const std::string t = Edited(text, h5, edit);
      const auto r = LoadCaseText(t, "header", lib, t.size() + 100);
      CHECK(r.value == nullptr);
      REQUIRE(!r.diagnostics.items().empty());
      CHECK(r.diagnostics.items()[0].id == "duplicate-key");
      CHECK(r.diagnostics.items()[0].pointer == pointer);
      CHECK(CaseTextsParsedExactly() == before + 1);
    }
  }
  SUBCASE("a parameter text read again warns again: only quiet readings are remembered") {
    // 500 m is beyond the plausible length of a line (network/case/
    // plausible.cpp's table: up to 200 m); tubes h5 and h6 (components 17
    // and 20) both carry it, with quiet "0.3 m" tubes before, between and after.
    std::string t = Edited(text, R"("id": "h5", "type": "tube", "from": "n4", "to": "n5", "length": "0.3 m")",
                           R"("id": "h5", "type": "tube", "from": "n4", "to": "n5", "length": "500 m")");
    t = Edited(t, R"("id": "h6", "type": "tube", "from": "n5", "to": "n6", "length": "0.3 m")",
               R"("id": "h6", "type": "tube", "from": "n5", "to": "n6", "length": "500 m")");
    const auto r = LoadCaseText(t, "header", lib, t.size());
    REQUIRE(r.value != nullptr);
    std::vector<std::string> warned;
    for (const auto& d : r.diagnostics.items())
      if (d.warning && d.id == "implausible") warned.push_back(d.pointer);
    CHECK(warned == std::vector<std::string>{"/loops/0/components/17/length", "/loops/0/components/20/length"});
    CHECK(r.value->loops[0].components[17].model->params()[0] == 500.0);
    CHECK(r.value->loops[0].components[20].model->params()[0] == 500.0);
    CHECK(r.value->loops[0].components[23].model->params()[0] == doctest::Approx(0.3).epsilon(1e-15));
  }
  SUBCASE("unknown keys of a bearing read from the tape are reported in key order, as the exact parser lists them") {
    const std::string t = Edited(text, R"("id": "b5", "type": "journal_bearing",)",
                                 R"("id": "b5", "zeta": 1, "type": "journal_bearing", "alpha": {"b": 1},)");
    for (const std::string& variant : {t, "// exact\n" + t}) {
      const auto r = LoadCaseText(variant, "header", lib, variant.size());
      CHECK(r.value == nullptr);
      REQUIRE(r.diagnostics.items().size() == 2);
      CHECK(r.diagnostics.items()[0].id == "unknown-field");
      CHECK(r.diagnostics.items()[0].pointer == "/loops/0/components/19/alpha");
      CHECK(r.diagnostics.items()[1].pointer == "/loops/0/components/19/zeta");
    }
    CHECK(CaseTextsParsedExactly() == exact + 1);  // the comment's variant only
  }
  SUBCASE("a repeated key inside a node's boundary sends the text to the exact parser") {
    const std::string t = Edited(text, R"({"kind": "pressure", "pressure": "0.5 bar"})",
                                 R"({"kind": "pressure", "pressure": "0.5 bar", "kind": "pressure"})");
    const auto r = LoadCaseText(t, "header", lib, t.size());
    CHECK(r.value == nullptr);
    REQUIRE(r.diagnostics.items().size() == 1);
    CHECK(r.diagnostics.items()[0].id == "duplicate-key");
    CHECK(r.diagnostics.items()[0].pointer == "/loops/0/nodes/2/boundary/kind");
    CHECK(CaseTextsParsedExactly() == exact + 1);
  }
  SUBCASE("a parameter of the wrong type, read from the tape, names its type") {
    const std::string t = Edited(text, R"("length": "0.3 m")", R"("length": {"b": 1, "a": [2]})");
    const auto r = LoadCaseText(t, "header", lib, t.size());
    REQUIRE(r.diagnostics.items().size() == 1);
    const auto& d = r.diagnostics.items()[0];
    CHECK(d.id == "wrong-type");
    CHECK(d.pointer == "/loops/0/components/2/length");
    CHECK(d.message == "expected a number (SI) or a \"value unit\" string for a length, got an object");
    CHECK(CaseTextsParsedExactly() == exact);
  }
  SUBCASE("a comment") {
    const std::string t = "// a header\n" + text;
    const auto r = LoadCaseText(t, "header", lib, t.size());
    REQUIRE(r.value != nullptr);
    CHECK(r.value->loops[0].components.size() == size_t(3 * n + 2));
    CHECK(CaseTextsParsedExactly() == exact + 1);
  }
  SUBCASE("negative zeros read as nlohmann reads them: -0 the integer 0, -0.0 the double -0.0") {
    const std::string t = Edited(Edited(text, R"({"id": "n3"})", R"({"id": "n3", "elevation": -0})"),
                                 R"({"id": "n4"})", R"({"id": "n4", "elevation": -0.0})");
    const auto r = LoadCaseText(t, "header", lib, t.size());
    REQUIRE(r.value != nullptr);
    const auto& loop = r.value->loops[0];
    const int i3 = loop.NodeIndex("n3"), i4 = loop.NodeIndex("n4");
    REQUIRE(i3 >= 0);
    REQUIRE(i4 >= 0);
    CHECK(loop.nodes[i3].elevation == 0.0);
    CHECK_FALSE(std::signbit(loop.nodes[i3].elevation));
    CHECK(loop.nodes[i4].elevation == 0.0);
    CHECK(std::signbit(loop.nodes[i4].elevation));
    CHECK(CaseTextsParsedExactly() == exact);
    // The exact parser (a comment sends the text there) reads the same.
    const auto e = LoadCaseText("// exact\n" + t, "header", lib, t.size() + 100);
    REQUIRE(e.value != nullptr);
    CHECK_FALSE(std::signbit(e.value->loops[0].nodes[i3].elevation));
    CHECK(std::signbit(e.value->loops[0].nodes[i4].elevation));
  }
  SUBCASE("nesting: 64 levels load, 65 are refused at the bracket that goes deeper") {
    // The root object is level 1; "notes" (a key every object may carry)
    // holds k nested arrays, levels 2 .. k + 1.
    auto nested = [&](int k) {
      return "{\"notes\": " + std::string(k, '[') + std::string(k, ']') + ", " + text.substr(1);
    };
    const std::string ok = nested(63), deep = nested(64);
    const auto r_ok = LoadCaseText(ok, "header", lib, ok.size());
    CHECK(r_ok.value != nullptr);
    CHECK(CaseTextsParsedExactly() == exact);
    const auto r_deep = LoadCaseText(deep, "header", lib, deep.size());
    CHECK(r_deep.value == nullptr);
    REQUIRE(r_deep.diagnostics.items().size() == 1);
    const auto& d = r_deep.diagnostics.items()[0];
    CHECK(d.id == "too-deep");
    // `{"notes": ` is 10 characters; the 64th "[" (level 65) is the 74th.
    CHECK(d.line == 1);
    CHECK(d.column == 74);
  }
  SUBCASE("a number beyond a double, in a component, at its line and column") {
    // Tube h0 is on line 5 (the pump on 3, the relief valve on 4).
    const std::string t = Edited(text, R"("id": "h0", "type": "tube", "from": "pump_out", "to": "n0", "length": "0.3 m")",
                                 R"("id": "h0", "type": "tube", "from": "pump_out", "to": "n0", "length": 1e999)");
    const auto r = LoadCaseText(t, "header", lib, t.size());
    CHECK(r.value == nullptr);
    REQUIRE(r.diagnostics.items().size() == 1);
    CHECK(r.diagnostics.items()[0].id == "not-finite");
    CHECK(r.diagnostics.items()[0].line == 5);
  }
}

TEST_CASE("the id table finds every id after growing and keeps the first of a repeated id") {
  // Checked against std::map (an independent index). Ids repeat (every
  // seventh is an earlier one), so element indices run past the table's
  // count, and they are many enough for the table to grow to 2^18 slots
  // (a tag of 14 bits beside the index).
  std::vector<std::string> ids;
  std::map<std::string, int> first;
  loopwright::IdTable table;
  auto id_of = [&](int i) -> const std::string& { return ids[i]; };
  for (int i = 0; i < 100000; ++i) {
    ids.push_back(i % 7 == 6 ? ids[i / 2] : fmt::format("n{}", i));
    const bool fresh = first.emplace(ids.back(), i).second;
    CHECK(table.Add(ids.back(), i, id_of) == fresh);
  }
  CHECK(table.size() == first.size());
  size_t found = 0;
  for (const auto& [id, index] : first) found += table.Find(id, id_of) == index;
  CHECK(found == first.size());
  for (const char* absent : {"n6", "n13", "x", "", "n100000"}) CHECK(table.Find(absent, id_of) == -1);
}
