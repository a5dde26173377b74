#pragma once

#include <memory>
#include <string>

#include "network/case/case.h"

namespace loopwright::cli {
int Main(int argc, char** argv);

// Writes `text` to `file` atomically unless `file` is empty; false (after
// saying so) if it could not.
bool WriteOutput(const std::string& file, const std::string& text);
// Loads a case, printing its problems; null with *exit_code 2 when it has
// errors. With `json_out`, the problems found (none for a clean case) are
// also written there as JSON, atomically (validate --json).
std::unique_ptr<Case> Load(const std::string& path, bool quiet, int* exit_code, const std::string& json_out = "");
}
