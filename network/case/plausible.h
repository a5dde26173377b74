// Plausible magnitudes of case values: what a field of a lubrication or
// coolant loop can physically be.
//
// Two tables, both data (network/case/plausible.cpp):
//   * hard limits per dimension: magnitudes no machine has (a 1.2e38 m pipe,
//     1e30 rpm). A value beyond them is refused at validation, naming the
//     limit and the field's plausible range; it never reaches the solver.
//   * plausible ranges per component parameter, or per dimension for any other
//     field (common practice for machine oil and coolant loops). A value
//     outside one loads with a warning naming the field and the likely slip (a
//     bare number is SI: 2500 in a line length is 2.5 km, "2500 mm" was meant).
// Zero is always plausible here (a closed valve, no heat); each component's own
// accepted range (ParamSpec min/max) still applies on top.
#pragma once

#include <cmath>
#include <string>
#include <string_view>
#include <vector>

#include "library/units.h"

namespace loopwright {

struct PlausibleRange {
  const char* type;   // component type, "" = any type
  const char* param;  // parameter name, "" = any field of the dimension
  Dimension dim;
  double lo, hi;      // SI; a nonzero magnitude outside [lo, hi] is implausible
  const char* what;   // the quantity, as the warning names it
  const char* range;  // [lo, hi] in words, as printed
};

struct HardLimit {
  Dimension dim;
  double max_abs;     // SI
  const char* range;  // in words, as printed
};

// The range that applies to a field: the (type, param) row, else the (any
// type, param) row, else the dimension's row; nullptr when none.
const PlausibleRange* FindPlausibleRange(Dimension dim, const std::string& type, const std::string& param);
const HardLimit* FindHardLimit(Dimension dim);
// The tables themselves (for tests and documentation).
const std::vector<PlausibleRange>& PlausibleRanges();
const std::vector<HardLimit>& HardLimits();

// The hard limit and plausible range of one field, found together: the
// loader's quick test of a value (HardLimitError and PlausibilityWarning
// give the messages and test exactly what Quiet tests).
struct FieldLimits {
  const HardLimit* limit = nullptr;
  const PlausibleRange* range = nullptr;
  // Neither beyond the hard limit nor outside the plausible range.
  bool Quiet(double si) const {
    const double m = std::fabs(si);
    return (!limit || m <= limit->max_abs) && (!range || m == 0.0 || (m >= range->lo && m <= range->hi));
  }
};
// FieldLimits of a field (FindHardLimit, FindPlausibleRange), remembered for
// the fields last asked about: a case reads the same dozen parameters of the
// same few types thousands of times, and the range look-up hashes its names.
FieldLimits FindFieldLimits(Dimension dim, std::string_view type, std::string_view param);

// "" when `si` is within the hard limit of `dim`, else the error text.
std::string HardLimitError(Dimension dim, const std::string& type, const std::string& param, double si);
// "" when `si` is plausible for the field, else the warning text; `bare` when
// the value was a bare JSON number (read in SI), which names the likely slip.
std::string PlausibilityWarning(Dimension dim, const std::string& type, const std::string& param, double si,
                                bool bare);

}  // namespace loopwright
