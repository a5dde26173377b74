// The streamed results document (WriteResultsJson, what `--json` writes) is
// the in-memory document (ResultsJson with each point's checks and the extra
// top-level members, the check summary among them, merged in by
// nlohmann::json, then dump(2)) byte for byte
// in full detail, and the compact document (summary detail) holds the full
// one's values in its rows and check groups (CheckCompactRows), for every
// shipped case, a two-loop thermal case and a case whose point does not
// converge. The property under test is equality between the two writers.
// The streamed numbers carry the shortest, closest digits (Dragonbox) and
// nlohmann's dump() Grisu2's, which differ in about one number in a
// thousand: the layout is compared with every number masked, the numbers as
// parsed doubles.
#include <doctest/doctest.h>

#include <sstream>
#include <string>
#include <vector>

#include "network/case/case.h"
#include "network/envelope/results.h"
#include "network/envelope/sweep.h"
#include "tests/tools/source_dir.h"

using loopwright::testing::SourceDir;
using nlohmann::json;

namespace loopwright {
namespace {

struct Written {
  std::string streamed;
  json in_memory;
};

// `text` with every number outside a string replaced by "#".
std::string NumbersMasked(const std::string& text) {
  std::string out;
  bool in_string = false, in_number = false;
  for (size_t i = 0; i < text.size(); ++i) {
    const char c = text[i];
    if (in_string) {
      out.push_back(c);
      if (c == '\\') out.push_back(text[++i]);
      else if (c == '"') in_string = false;
      continue;
    }
    const bool number_char = (c >= '0' && c <= '9') || c == '-' || c == '+' || c == '.' || c == 'e' || c == 'E';
    if (number_char && (in_number || (c == '-' || (c >= '0' && c <= '9')))) {
      if (!in_number) out.push_back('#');
      in_number = true;
      continue;
    }
    in_number = false;
    in_string = c == '"';
    out.push_back(c);
  }
  return out;
}

Written BothWays(const Case& cs, const SweepResult& sweep, JsonDetail detail) {
  ResultsExtras extras;
  extras.top = {{"fixes", json::array()}, {"fixes_note", "a note"}, {"zz_last", {{"a", 1}}}};
  std::vector<const PointResult*> points;
  Written w;
  w.in_memory = ResultsJson(cs, sweep.points, "fail", detail);
  for (size_t i = 0; i < sweep.points.size(); ++i) {
    points.push_back(&sweep.points[i]);
    extras.point_checks.push_back(sweep.points[i].converged ? &sweep.checks[i] : nullptr);
    if (!sweep.points[i].converged) continue;
    json arr = json::array();
    for (const auto& o : sweep.checks[i]) arr.push_back(CheckOutcomeJson(cs, o));
    w.in_memory["points"][i]["checks"] = arr;
  }
  for (const auto& [k, v] : extras.top.items()) w.in_memory[k] = v;
  std::vector<std::vector<CheckOutcome>> per_point;
  std::vector<std::string> names;
  for (size_t i = 0; i < sweep.points.size(); ++i)
    if (sweep.points[i].converged) {
      per_point.push_back(sweep.checks[i]);
      names.push_back(sweep.points[i].name);
    }
  const std::vector<CheckSummary> summary = SummariseChecks(per_point, names);
  extras.check_summary = &summary;
  w.in_memory["checks"] = json::array();
  for (const auto& s : summary) {
    w.in_memory["checks"].push_back(CheckOutcomeJson(cs, s.worst));
    w.in_memory["checks"].back()["point"] = s.point;
  }
  std::ostringstream os;
  WriteResultsJson(os, cs, points, "fail", extras, detail);
  w.streamed = os.str();
  return w;
}

// The compact document's node and component rows, read by its own
// "summary_columns" (and the trailing object of some rows), hold the full
// document's values; every check outcome is in a group whose name, unit and
// limit are the full outcome's (tests/cli/json_detail_cli_test.py compares
// every value of the demo cases' documents).
void CheckCompactRows(const json& compact, const json& full) {
  const json& cols = compact.at("summary_columns");
  REQUIRE(compact.at("points").size() == full.at("points").size());
  for (size_t i = 0; i < full["points"].size(); ++i) {
    const json &cp = compact["points"][i], &fp = full["points"][i];
    for (const char* part : {"nodes", "components"}) {
      REQUIRE(cp.at(part).size() == fp.at(part).size());
      for (size_t r = 0; r < fp[part].size(); ++r) {
        const json& row = cp[part][r];
        const json& c = cols.at(part);
        REQUIRE((row.size() == c.size() || row.size() == c.size() + 1));
        for (size_t k = 0; k < c.size(); ++k) CHECK(row[k] == fp[part][r].at(c[k].get<std::string>()));
        if (row.size() > c.size()) {
          for (const auto& [key, v] : row.back().items()) {
            if (key == "details") {
              for (const auto& [dk, dv] : v.items()) CHECK(dv == fp[part][r]["details"].at(dk));
            } else {
              CHECK(v == fp[part][r].at(key));
            }
          }
        }
      }
    }
    size_t outcomes = 0;
    for (const json& g : cp.at("checks"))
      for (const json& row : g.at("outcomes")) {
        ++outcomes;
        bool found = false;
        for (const json& o : fp["checks"])
          if (o["name"] == g["name"] && o["where"] == row[0]) {
            found = true;
            CHECK(o["value"] == row[1]);
            CHECK(o["margin"] == row[2]);
            CHECK(o["pass"] == row[3]);
            CHECK(o["limit"] == g["limit"]);
            CHECK(o["unit"] == g["unit"]);
          }
        CHECK(found);
      }
    CHECK(outcomes == fp["checks"].size());
  }
}

TEST_CASE("the streamed results document equals the in-memory one") {
  const std::string src = SourceDir();
  size_t converged = 0, not_converged = 0, components = 0;
  for (const char* file : {"/cases/apu_test_cell.json", "/cases/gearbox_lube_skid.json",
                           "/tests/network/two_loop_case.json", "/tests/network/failure_cases/reversed_pump.json"}) {
    CAPTURE(file);
    LoadResult lr = LoadCaseFile(src + file, DefaultLibraryDir());
    REQUIRE(lr.value);
    const SweepResult sweep = SolveEnvelope(*lr.value, 1);
    for (const auto& p : sweep.points) {
      (p.converged ? converged : not_converged) += 1;
      components += p.converged ? p.branches.size() : 0;
    }
    const Written full = BothWays(*lr.value, sweep, JsonDetail::kFull);
    CHECK(NumbersMasked(full.streamed) == NumbersMasked(full.in_memory.dump(2) + "\n"));
    CHECK(json::parse(full.streamed) == full.in_memory);
    const Written summary = BothWays(*lr.value, sweep, JsonDetail::kSummary);
    const json compact = json::parse(summary.streamed);
    CHECK(compact["json_detail"] == "summary");
    CheckCompactRows(compact, full.in_memory);
    CHECK(full.in_memory.count("json_detail") == 0);
  }
  CHECK(converged > 0);
  CHECK(not_converged > 0);  // a point without a result is written too
  CHECK(components > 0);
}

}  // namespace
}  // namespace loopwright
