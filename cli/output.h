// Printing and writing results: tables for people, files for scripts.
#pragma once

#include <string>

#include "library/parts.h"
#include "library/units.h"
#include "network/case.h"
#include "network/checks.h"
#include "network/fixes.h"
#include "network/run.h"

namespace loopwright::cli {

// Writes `content` to a temporary file beside `path`, flushes it to disk and
// renames it over `path`: readers see the old file or the new one, never a
// part. On failure nothing at `path` changes and *error says why.
bool WriteFileAtomic(const std::string& path, const std::string& content, std::string* error);

// A CSV field, quoted (RFC 4180) when it holds a comma, quote or line break.
std::string CsvField(const std::string& s);

std::string CaseSummary(const Case& cs, UnitSystem us);
// An oil's ASTM D2270 viscosity index, rounded as the standard reports it
// (whole number); "-" for a fluid that is not an oil.
std::string ViscosityIndexText(const Fluid& f);
std::string SolveTables(const Case& cs, const PointResult& p, UnitSystem us);
std::string PointCsv(const Case& cs, const PointResult& p);
std::string LibraryTable(const PartsCatalog& cat);
std::string FixTable(const std::vector<FixSuggestion>& fixes, UnitSystem us);
std::string CheckTable(const Case& cs, const std::vector<CheckSummary>& summary, const std::vector<CheckWarning>& warnings,
                       UnitSystem us);

}  // namespace loopwright::cli
