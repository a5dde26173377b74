// The results document (JSON, SI values with the unit in the key name), as
// described in DESIGN.md section 5 and the README.
#pragma once

#include <ostream>
#include <string>
#include <string_view>
#include <vector>

#include <nlohmann/json.hpp>

#include "network/case/case.h"
#include "network/envelope/checks.h"
#include "network/point/run.h"

namespace loopwright {

// "_Pa", "_m3_s", ... for a dimension ("" for dimensionless).
std::string SiKeySuffix(Dimension dim);
std::string_view SiKeySuffixView(Dimension dim);  // the same, without a copy

// The SI unit of a dimension as the JSON's "unit" fields name it ("Pa",
// "m3_s", ...; "1" for dimensionless).
std::string SiUnitName(Dimension dim);

// One check outcome: name, where, value, limit, margin (SI), unit, pass and
// limit_source ("default", "case", "loop", "component" or "node": where its
// limit came from, network/case/check_table.h), with limit_source_id (the
// loop's id, "loop/component" or "loop/node") for the last three.
nlohmann::json CheckOutcomeJson(const Case& cs, const CheckOutcome& o);

// The cautions every report carries.
const char* SafetyCautions();

// How much of each component a results document carries. kFull: every
// member and the "details" block of the model's report items. kSummary (the
// compact document of `--json-detail summary`, README "Results"): nodes and
// components as rows of the values named once in the top-level
// "summary_columns" (what the case file says, their ends, type and boundary,
// left out; a trailing object with what only some rows have: the
// temperature items of "details", shaft power, warnings, boiling margin) and
// check outcomes grouped by check and limit (name, unit, limit and its
// source said once per group; rows of where, value, margin, pass and, for
// the envelope's worst, the point). Every value a summary document holds is
// equal to the same value in the full one; it adds the top-level
// "json_detail": "summary" and "summary_columns".
enum class JsonDetail { kFull, kSummary };

// "full" or "summary" (the option's words); false for another word.
bool ParseJsonDetail(const std::string& word, JsonDetail* detail);

// The document in memory (small cases, tests and tools: a plant-size case
// is written by WriteResultsJson).
nlohmann::json PointJson(const Case& cs, const PointResult& p, JsonDetail detail = JsonDetail::kFull);
nlohmann::json ResultsJson(const Case& cs, const std::vector<PointResult>& points, const std::string& verdict,
                           JsonDetail detail = JsonDetail::kFull);

// What a command adds to the results document: the check outcomes of each
// point (by point index; nullptr or a missing entry: "checks" stays as
// PointJson has it), the envelope's check summary (top-level "checks": each
// worst outcome with its "point"; nullptr: none) and other top-level members
// (fixes, ...).
struct ResultsExtras {
  std::vector<const std::vector<CheckOutcome>*> point_checks;
  const std::vector<CheckSummary>* check_summary = nullptr;
  nlohmann::json top = nlohmann::json::object();
};

// One entry of the top-level "checks": the worst outcome and its "point".
nlohmann::json CheckSummaryJson(const Case& cs, const CheckSummary& s);

// Writes the results document to `os`, in the layout of nlohmann's dump(2)
// (keys in order, two-space indent) and followed by a newline: the same bytes
// as ResultsJson with the extras merged in, dumped. It is written a node and a
// component at a time, so no copy of the whole document is ever held, as a
// JSON value or as text.
void WriteResultsJson(std::ostream& os, const Case& cs, const std::vector<const PointResult*>& points,
                      const std::string& verdict, const ResultsExtras& extras, JsonDetail detail);

// One point of the top-level "points" array as WriteResultsJson writes it
// (with `checks`, as ResultsExtras::point_checks gives them): the text a
// shard of `check` keeps, and WriteResultsJsonFromText puts back.
std::string PointText(const Case& cs, const PointResult& p, const std::vector<CheckOutcome>* checks,
                      JsonDetail detail);

// WriteResultsJson with each point's text from PointText (the same detail):
// the same bytes as WriteResultsJson of the points (extras.point_checks is
// not read: the texts hold their checks).
void WriteResultsJsonFromText(std::ostream& os, const Case& cs, const std::vector<std::string>& point_texts,
                              const std::string& verdict, const ResultsExtras& extras, JsonDetail detail);

}  // namespace loopwright
