// Repeated warnings once, with a count (network/envelope/warning_tally.h): the
// grouping key takes out numbers and the point's name, and nothing else.
#include <doctest/doctest.h>

#include "network/envelope/warning_tally.h"

namespace loopwright {
namespace {

TEST_CASE("WarningKey: numbers become #, digits inside names stay") {
  CHECK(WarningKey("drop 4.44 bar exceeds FL^2 p1") == "drop # bar exceeds FL^2 p1");
  CHECK(WarningKey("gp-08 at -1.5e+03 Pa, Re_d 2300") == "gp-08 at # Pa, Re_d #");
  CHECK(WarningKey("cold[oil_temperature=0 degC]") == "cold[oil_temperature=# degC]");
}

TEST_CASE("WarningTally: one line per kind, the first text, the count of points") {
  WarningTally t;
  t.Add("oil/filter: bypass open at cold[T=0 degC]: 12.3% unfiltered", "cold[T=0 degC]");
  t.Add("oil/relief: relief lifting at cold[T=0 degC] (4.1 L/min)", "cold[T=0 degC]");
  t.Add("oil/filter: bypass open at cold[T=2 degC]: 9.8% unfiltered", "cold[T=2 degC]");
  t.Add("oil/filter: bypass open at cold[T=4 degC]: 7.0% unfiltered", "cold[T=4 degC]");
  const auto lines = t.Lines();
  REQUIRE(lines.size() == 2);
  CHECK(lines[0] == "oil/filter: bypass open at cold[T=0 degC]: 12.3% unfiltered (\u00d73 points; the first shown)");
  CHECK(lines[1] == "oil/relief: relief lifting at cold[T=0 degC] (4.1 L/min)");
  const auto capped = t.Lines(1);
  REQUIRE(capped.size() == 2);
  CHECK(capped[1] == "... and 1 more kind(s) of warning");
}

}  // namespace
}  // namespace loopwright
