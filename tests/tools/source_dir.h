// The source tree the tests read their cases from (LOOPWRIGHT_SOURCE_DIR,
// set by CTest for every test).
#pragma once

#include <doctest/doctest.h>

#include <cstdlib>
#include <string>

namespace loopwright::testing {

inline std::string SourceDir() {
  const char* s = std::getenv("LOOPWRIGHT_SOURCE_DIR");
  REQUIRE_MESSAGE(s != nullptr, "LOOPWRIGHT_SOURCE_DIR is not set");
  return s;
}

}  // namespace loopwright::testing
