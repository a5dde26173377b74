// `loopwright simulate CASE --scenario NAME`: runs a scenario through time
// (network/time/simulate.h), prints each watched quantity's peak and its
// time, and writes the time series as JSON and CSV (atomically).
#pragma once

#include <string>

#include "library/units.h"
#include "network/case/case.h"

namespace loopwright::cli {

struct SimulateArgs {
  std::string scenario;
  std::string json_out, csv_out;
  double rtol = 1e-6, atol_k = 1e-4;
  double interval = kNoValue;  // [s]
  bool quiet = false;
  // Sizing in time (network/time/event_timing.h): the earliest time of event
  // `earliest` that keeps `keep` at or below `below`, searched from 0 to
  // `up_to` (text quantities; up_to defaults to the scenario's end).
  std::string earliest, keep, below, up_to;
  UnitSystem units = UnitSystem::kSI;
};

// Exit codes: 0 the run reached its end and every check through time
// passes; 1 a check failed; 2 unknown scenario or bad option;
// 3 the run stopped (the cause names the time and place); 4 a file could
// not be written.
int SimulateMain(const Case& cs, const SimulateArgs& a);

}  // namespace loopwright::cli
