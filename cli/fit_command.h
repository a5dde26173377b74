// `loopwright fit DATA --model M`: calibrate a component model from datasheet
// or test points (network/design/fit.h) and print the fit; optionally write the
// report as JSON and a parts-library file holding the fitted part.
#pragma once

#include <string>

namespace loopwright::cli {

// Exit codes: 0 ok; 2 invalid input (the message names file, line and
// column); 4 internal error. `json_out` / `part_out` empty: not written.
// `part_id` empty: "fit-" + the data file's stem. `quiet`: only errors and
// the one-line result.
int FitMain(const std::string& data_path, const std::string& model, const std::string& json_out,
            const std::string& part_out, const std::string& part_id, bool quiet);

}  // namespace loopwright::cli
