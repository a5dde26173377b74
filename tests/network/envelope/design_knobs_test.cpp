// Design knobs derived from the parameter specs (issue 11, item 3).
//
// DesignKnobs used to hold a hard-coded type -> parameter table; each
// component's own file now declares its knobs on the parameter spec
// (ParamSpec::knob) and DesignKnobs reads them from the registry. These
// tests pin the derived list to the one the old table gave:
//   * REGRESSION PIN: kOldTable below is the table network/envelope/
//     sensitivity.cpp held at commit 43b95f4, copied as it was. The set of
//     knob-flagged (type, parameter) pairs of the types registered then
//     (kOldTypes; a type added later declares its own knobs and needs no
//     line here) must equal it, and every pair must name a number parameter
//     that exists in its type;
//   * for every demo case (cases/*.json) and every loadable case under
//     tests/network/, the component knobs DesignKnobs returns (name, place,
//     parameter, dimension, bounds) equal those the old algorithm gives
//     with kOldTable, reimplemented here.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <map>
#include <set>
#include <string>
#include <tuple>
#include <vector>

#include "components/registry.h"
#include "network/case/case.h"
#include "network/envelope/sensitivity.h"
#include "tests/tools/source_dir.h"

namespace loopwright {
namespace {

namespace fs = std::filesystem;
using testing::SourceDir;

// Regression pin: the hard-coded knob table of DesignKnobs at 43b95f4.
const std::vector<std::pair<std::string, std::vector<std::string>>> kOldTable = {
    {"valve", {"opening", "kvs"}},
    {"relief_valve", {"crack"}},
    {"orifice", {"diameter"}},
    {"rolling_bearing", {"diameter"}},
    {"displacement_pump", {"displacement", "speed"}},
    {"centrifugal_pump", {"speed"}},
    {"air_cooler", {"conductance"}},
    {"pipe", {"diameter"}},
    {"tube", {"diameter"}},
    {"hose", {"diameter"}},
    {"journal_bearing", {"radial_clearance"}},
};

// The types registered at 43b95f4.
const std::set<std::string> kOldTypes = {
    "pipe",         "tube",        "hose",    "displacement_pump", "centrifugal_pump",
    "filter",       "valve",       "relief_valve", "check_valve",  "orifice",
    "datasheet_loss", "air_cooler", "journal_bearing", "rolling_bearing", "fixed_flow"};

// The component knobs of the old algorithm (43b95f4), from kOldTable.
std::vector<DesignKnob> OldComponentKnobs(const Case& cs) {
  std::vector<DesignKnob> out;
  for (size_t l = 0; l < cs.loops.size(); ++l)
    for (size_t c = 0; c < cs.loops[l].components.size(); ++c) {
      const ComponentSpec& spec = cs.loops[l].components[c];
      for (const auto& [type, params] : kOldTable) {
        if (spec.type() != type) continue;
        for (const auto& pn : params) {
          const int pi = spec.type_info->ParamIndex(pn);
          if (pi < 0 || std::isnan(spec.model->params()[pi])) continue;
          bool bound = false;
          for (const auto& b : spec.bindings()) bound = bound || b.param == pi;
          if (bound) continue;
          const ParamSpec& ps = spec.type_info->params[pi];
          DesignKnob k;
          k.loop = static_cast<int>(l);
          k.comp = static_cast<int>(c);
          k.param = pi;
          k.name = cs.loops[l].id + "/" + spec.id + "." + pn;
          k.dim = ps.dim;
          k.lo = ps.min_si;
          k.hi = ps.max_si;
          if (ps.min_exclusive || !std::isfinite(k.lo)) k.lo = std::max(k.lo, 0.0) + 1e-12;
          out.push_back(k);
        }
      }
    }
  return out;
}

using KnobKey = std::tuple<std::string, int, int, int, int, double, double>;

// Component knobs of the old types.
std::set<KnobKey> Keys(const std::vector<DesignKnob>& knobs, const Case& cs) {
  std::vector<std::vector<std::string>> cs_types;
  for (const auto& loop : cs.loops) {
    cs_types.emplace_back();
    for (const auto& c : loop.components) cs_types.back().emplace_back(c.type());
  }
  std::set<KnobKey> s;
  for (const auto& k : knobs)
    if (k.coupling < 0 && kOldTypes.count(cs_types[k.loop][k.comp]))
      s.insert({k.name, k.loop, k.comp, k.param, static_cast<int>(k.dim), k.lo, k.hi});
  return s;
}

std::vector<fs::path> CaseFiles() {
  std::vector<fs::path> files;
  for (const auto& e : fs::directory_iterator(fs::path(SourceDir()) / "cases"))
    if (e.is_regular_file() && e.path().extension() == ".json" && e.path().filename() != "case.schema.json")
      files.push_back(e.path());
  for (const auto& e : fs::recursive_directory_iterator(fs::path(SourceDir()) / "tests" / "network"))
    if (e.is_regular_file() && e.path().extension() == ".json") files.push_back(e.path());
  std::sort(files.begin(), files.end());
  return files;
}

}  // namespace

TEST_CASE("the knob-flagged parameters of the registry are the old table's, and exist in their types") {
  std::set<std::pair<std::string, std::string>> old, flagged;
  for (const auto& [type, params] : kOldTable)
    for (const auto& p : params) old.insert({type, p});
  for (const auto& t : ComponentTypes())
    for (const auto& p : t.params)
      if (p.knob && kOldTypes.count(t.name)) flagged.insert({t.name, p.name});
  CHECK(kOldTypes.size() == 15);
  CHECK(flagged == old);
  for (const auto& [type, param] : old) {
    CAPTURE(type);
    CAPTURE(param);
    const ComponentType* t = FindComponentType(type);
    REQUIRE(t != nullptr);
    const int i = t->ParamIndex(param);
    REQUIRE(i >= 0);
    const ParamSpec& s = t->params[i];
    CHECK(s.knob);
    CHECK(s.kind == ParamKind::kNumber);
    // Bounds default to the accepted range.
    CHECK(s.KnobMin() == s.min_si);
    CHECK(s.KnobMax() == s.max_si);
  }
}

TEST_CASE("a knob's own bounds replace the accepted range") {
  const ParamSpec s = Num("x", Dimension::kLength, "test").Range(0, 1).Knob(0.25, 0.5);
  CHECK(s.knob);
  CHECK(s.min_si == 0);
  CHECK(s.max_si == 1);
  CHECK(s.KnobMin() == 0.25);
  CHECK(s.KnobMax() == 0.5);
  const ParamSpec u = Num("y", Dimension::kLength, "test").Range(0, 1).Knob();
  CHECK(u.KnobMin() == 0);
  CHECK(u.KnobMax() == 1);
  CHECK_FALSE(Num("z", Dimension::kLength, "test").knob);
}

TEST_CASE("for every demo and test case the derived knobs equal the old table's") {
  int cases = 0, knobs = 0;
  std::set<std::string> types_seen;
  for (const auto& f : CaseFiles()) {
    const LoadResult r = LoadCaseFile(f.string(), DefaultLibraryDir());
    const bool demo = f.parent_path().filename() == "cases";
    if (demo) {
      CAPTURE(f.string());
      REQUIRE_MESSAGE(!r.diagnostics.HasErrors(), r.diagnostics.Format(f.filename().string()));
    }
    if (r.diagnostics.HasErrors() || !r.value) continue;  // invalid-case catalogs and the like
    CAPTURE(f.string());
    const std::vector<DesignKnob> derived = DesignKnobs(*r.value);
    const std::vector<DesignKnob> old = OldComponentKnobs(*r.value);
    CHECK(Keys(derived, *r.value) == Keys(old, *r.value));
    int couplings = 0;
    for (const auto& k : derived) couplings += k.coupling >= 0;
    CHECK(couplings == static_cast<int>(r.value->couplings.size()));
    for (const auto& k : old) types_seen.emplace(r.value->loops[k.loop].components[k.comp].type());
    ++cases;
    knobs += static_cast<int>(old.size());
  }
  MESSAGE(cases << " cases, " << knobs << " component knobs compared; knob types seen: " << types_seen.size());
  CHECK(cases >= 10);
  CHECK(knobs >= 30);
}

}  // namespace loopwright
