// The source tree the tests read their cases from (LOOPWRIGHT_SOURCE_DIR,
// set by CTest for every test), and reading a file whole.
#pragma once

#include <doctest/doctest.h>

#include <cstdlib>
#include <fstream>
#include <sstream>
#include <string>

namespace loopwright::testing {

inline std::string SourceDir() {
  const char* s = std::getenv("LOOPWRIGHT_SOURCE_DIR");
  REQUIRE_MESSAGE(s != nullptr, "LOOPWRIGHT_SOURCE_DIR is not set");
  return s;
}

// The whole content of a file ("" when it cannot be read).
inline std::string ReadText(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  std::stringstream ss;
  ss << in.rdbuf();
  return ss.str();
}

}  // namespace loopwright::testing
