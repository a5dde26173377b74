// Third-party logging stays off the terminal (network/point/library_logging.h):
// a glog warning or error written the way Ceres writes them reaches stderr
// before SilenceLibraryLogging() and nothing does after it. stderr is
// captured in a temporary file for the test.
#include <doctest/doctest.h>

#include <unistd.h>

#include <cstdio>
#include <fstream>
#include <regex>
#include <sstream>
#include <string>

#include <glog/logging.h>
// glog defines CHECK too: the assertions below are doctest's.
#undef CHECK
#define CHECK DOCTEST_CHECK

#include "network/point/library_logging.h"

namespace loopwright {
namespace {

// Runs `emit` with fd 2 sent to a temporary file; returns what it wrote.
template <class F>
std::string CaptureStderr(F emit) {
  char path[] = "/tmp/lw_stderr_XXXXXX";
  const int fd = ::mkstemp(path);
  REQUIRE(fd >= 0);
  std::fflush(stderr);
  const int saved = ::dup(2);
  ::dup2(fd, 2);
  emit();
  std::fflush(stderr);
  ::dup2(saved, 2);
  ::close(saved);
  ::close(fd);
  std::ifstream in(path);
  std::stringstream ss;
  ss << in.rdbuf();
  ::unlink(path);
  return ss.str();
}

// A glog line: severity letter, [year], month-day and time, e.g.
// "W20261202 10:49:08.123456" (glog 0.6) or "W1202 10:49:08.123456".
bool HasGlogLine(const std::string& text) {
  return std::regex_search(text, std::regex("(^|\n)[IWEF](\\d{4})?\\d{4} \\d\\d:\\d\\d:\\d\\d"));
}

TEST_CASE("glog lines reach stderr until SilenceLibraryLogging, and none after") {
  const std::string before = CaptureStderr([] { LOG(WARNING) << "lw test warning before"; });
  CHECK(HasGlogLine(before));  // the capture sees what a user would see
  SilenceLibraryLogging();
  const std::string after = CaptureStderr([] {
    LOG(WARNING) << "lw test warning after";
    LOG(ERROR) << "lw test error after";
    LOG(INFO) << "lw test info after";
  });
  CHECK_MESSAGE(after.empty(), after);
}

}  // namespace
}  // namespace loopwright
