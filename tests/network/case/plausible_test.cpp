// The plausible-range and hard-limit tables (network/case/plausible.cpp): every
// row names a real component parameter of its dimension, every dimension has
// a hard limit, and every hard limit lies at least a factor of 10 beyond the
// warning ranges of its dimension (hard limits are for magnitudes no machine
// has, DEVELOPERS.md). The ranges themselves are common practice.

#include <doctest/doctest.h>

#include <string>

#include "components/registry.h"
#include "network/case/plausible.h"

using loopwright::Dimension;
using loopwright::FindComponentType;
using loopwright::FindHardLimit;
using loopwright::FindPlausibleRange;
using loopwright::PlausibleRanges;

TEST_CASE("every dimension has a hard limit, far beyond its plausible ranges") {
  for (Dimension d : loopwright::AllDimensions()) {
    CAPTURE(loopwright::DimensionKey(d));
    const auto* l = FindHardLimit(d);
    REQUIRE(l != nullptr);
    CHECK(l->max_abs > 0);
    for (const auto& r : PlausibleRanges())
      if (r.dim == d) CHECK(r.hi * 10 <= l->max_abs);
  }
}

TEST_CASE("every row names a real parameter of its dimension, with lo <= hi") {
  for (const auto& r : PlausibleRanges()) {
    CAPTURE(r.type);
    CAPTURE(r.param);
    CHECK(r.lo <= r.hi);
    CHECK(r.lo >= 0);
    if (r.type[0] != '\0') {
      const auto* t = FindComponentType(r.type);
      REQUIRE(t != nullptr);
      const int i = t->ParamIndex(r.param);
      REQUIRE(i >= 0);
      CHECK(t->params[i].dim == r.dim);
    } else if (r.param[0] != '\0') {
      bool found = false;
      for (const auto& t : loopwright::ComponentTypes())
        for (const auto& p : t.params) found = found || (p.name == r.param && p.dim == r.dim);
      CHECK(found);
    }
  }
}

TEST_CASE("the most specific row applies: type and parameter, then parameter, then dimension") {
  CHECK(std::string(FindPlausibleRange(Dimension::kLength, "pipe", "length")->what) == "a line length");
  CHECK(std::string(FindPlausibleRange(Dimension::kLength, "journal_bearing", "length")->what) == "a bearing length");
  CHECK(std::string(FindPlausibleRange(Dimension::kLength, "orifice", "diameter")->what) == "a diameter");
  CHECK(std::string(FindPlausibleRange(Dimension::kLength, "", "")->what) == "a length");
  // A 2,500 m line and a 1.2e38 m pipe (issue examples), read as bare numbers.
  CHECK_FALSE(loopwright::PlausibilityWarning(Dimension::kLength, "pipe", "length", 2500, true).empty());
  CHECK(loopwright::PlausibilityWarning(Dimension::kLength, "pipe", "length", 2.5, true).empty());
  CHECK_FALSE(loopwright::HardLimitError(Dimension::kLength, "pipe", "length", 1.2e38).empty());
  CHECK(loopwright::HardLimitError(Dimension::kLength, "pipe", "length", 2500).empty());
  // Zero is always plausible (a closed valve, no heat).
  CHECK(loopwright::PlausibilityWarning(Dimension::kTemperature, "", "", 0.0, true).empty());
}

// The loader's quick test (FindFieldLimits, remembered per field): each
// field keeps its own row when fields alternate, as a case's components do.
// Values: a line's plausible length is 1 mm to 200 m and a bearing's 1 mm to
// 2 m (this table's rows, common practice); 10 km is the hard limit of any
// length.
TEST_CASE("the remembered limits of a field are that field's, whatever was asked before") {
  using loopwright::FindFieldLimits;
  for (int round = 0; round < 3; ++round) {
    CHECK(FindFieldLimits(Dimension::kLength, "pipe", "length").Quiet(5.0));
    CHECK_FALSE(FindFieldLimits(Dimension::kLength, "journal_bearing", "length").Quiet(5.0));
    CHECK(FindFieldLimits(Dimension::kLength, "journal_bearing", "length").Quiet(0.03));
    CHECK_FALSE(FindFieldLimits(Dimension::kLength, "pipe", "length").Quiet(2500.0));
    // No parameter: the dimension's row (any length up to 100 m), whatever
    // the type; 150 m is a plausible line length but no plausible length.
    CHECK(FindFieldLimits(Dimension::kLength, "pipe", "length").Quiet(150.0));
    CHECK_FALSE(FindFieldLimits(Dimension::kLength, "pipe", "").Quiet(150.0));
    CHECK(FindFieldLimits(Dimension::kLength, "", "").Quiet(50.0));
    CHECK_FALSE(FindFieldLimits(Dimension::kLength, "pipe", "length").Quiet(1.2e38));
    CHECK(FindFieldLimits(Dimension::kTemperature, "", "").Quiet(0.0));  // zero is always plausible
  }
}
