// Printing and writing results: tables for people, files for scripts.
#pragma once

#include <functional>
#include <ostream>
#include <string>

#include "library/parts.h"
#include "library/units.h"
#include "network/case/case.h"
#include "network/envelope/checks.h"
#include "network/envelope/fixes.h"
#include "network/point/run.h"
#include "network/design/sizing.h"

namespace loopwright::cli {

// Writes `content` to a temporary file beside `path`, flushes it to disk and
// renames it over `path`: readers see the old file or the new one, never a
// part. On failure nothing at `path` changes and *error says why. The
// temporary is ".<name>.lw-tmp-<pid>"; one left by a run that was killed
// (its pid no longer running) is removed by the next write of the same file.
bool WriteFileAtomic(const std::string& path, const std::string& content, std::string* error);
// The same, with the content written by `write` into a buffered stream on the
// temporary (64 KiB at a time: a large document is never held whole). An
// exception from `write` removes the temporary and is passed on.
bool WriteFileAtomicStream(const std::string& path, const std::function<void(std::ostream&)>& write,
                           std::string* error);

// Printed tables longer than kFullTableRows rows are summarised: the first
// kHeadRows rows, then the kWorstRows worst of the others (lowest gauge
// pressure for nodes, lowest flow for components, smallest margin relative to
// the limit for checks), then a line counting the rows left out.
constexpr size_t kFullTableRows = 200;
constexpr size_t kHeadRows = 20;
constexpr size_t kWorstRows = 20;

// A CSV field, quoted (RFC 4180) when it holds a comma, quote or line break.
std::string CsvField(const std::string& s);

// `text` (a warning, a note) with every "number unit" it holds in the units
// printed for `us` ("3.2 bar" -> "46.41 psi"); unchanged for SI.
std::string Localize(const std::string& text, UnitSystem us);

// The answers of `size`, margins in each check's own unit.
std::string SizeAnswers(const std::vector<SizingAnswer>& answers, UnitSystem us);

std::string CaseSummary(const Case& cs, UnitSystem us);
// An oil's ASTM D2270 viscosity index, rounded as the standard reports it
// (whole number); "-" for a fluid that is not an oil.
std::string ViscosityIndexText(const Fluid& f);
std::string SolveTables(const Case& cs, const PointResult& p, UnitSystem us);
// A solved point's checks: how many pass, and the failing ones (worst first,
// at most ten) with value, limit and margin.
std::string PointCheckLines(const std::vector<CheckOutcome>& checks, UnitSystem us);
std::string PointCsv(const Case& cs, const PointResult& p);
// A library part as JSON; with kUS its dimensional parameters are printed in
// US units ("8 cm3/rev" -> "0.4882 in3/rev"); with kSI as the library file has them.
nlohmann::json PartJson(const PartEntry& p, UnitSystem us);
std::string LibraryTable(const PartsCatalog& cat);
std::string FixTable(const std::vector<FixSuggestion>& fixes, UnitSystem us);
// The component models' warnings over an envelope's points (each point's
// name and PointModelWarnings), each kind once per component with its count
// of points ("" for none).
std::string ModelWarningLines(const std::vector<std::string>& point_names,
                              const std::vector<std::vector<std::string>>& point_warnings, UnitSystem us);
// A point's component model warnings, "loop/component: text" (SI).
std::vector<std::string> PointModelWarnings(const Case& cs, const PointResult& p);
// The dimension a check's margin is in: a temperature's or a gauge
// pressure's is a difference.
Dimension MarginDimension(Dimension dim);
// A probability of a spread result ("-" when absent), and the larger of a
// check's two probabilities (first order, sampled): the order of its tables.
std::string Probability(const nlohmann::json& p);
// The dimension a results document names (DimensionName), or dimensionless.
Dimension DimensionNamed(const std::string& name);
double Likelihood(const nlohmann::json& check);
// The top n contributors of a check's first-order variance, "name 62 %, ...".
std::string Contributors(const nlohmann::json& first_order, size_t n);
// A quantity in the units printed, with significant digits ("-" for NaN).
std::string FormatValue(double si, Dimension dim, UnitSystem us, int sig = 4);
std::string CheckTable(const Case& cs, const std::vector<CheckSummary>& summary, const std::vector<CheckWarning>& warnings,
                       UnitSystem us);

// A tolerance study's result document (network/tolerance/spread.h
// MergeParts): the table of probabilities per check, most likely first, the
// top contributors and the notes; and the same as CSV, one row per check.
std::string SpreadSummary(const nlohmann::json& result, UnitSystem us);
std::string SpreadCsv(const nlohmann::json& result);

}  // namespace loopwright::cli
