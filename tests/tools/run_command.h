// Runs a shell command for the tests that drive the command-line program.
#pragma once

#include <sys/wait.h>

#include <cstdio>
#include <string>

namespace loopwright::testing {

// Runs `cmd` through /bin/sh; returns its exit status (-1 when the command
// could not be started or did not exit normally) and its standard output in
// *out.
inline int RunCommand(const std::string& cmd, std::string* out) {
  out->clear();
  FILE* p = popen(cmd.c_str(), "r");
  if (p == nullptr) return -1;
  char buf[4096];
  size_t n;
  while ((n = fread(buf, 1, sizeof buf, p)) > 0) out->append(buf, n);
  const int status = pclose(p);
  return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
}

}  // namespace loopwright::testing
