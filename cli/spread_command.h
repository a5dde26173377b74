// `loopwright spread CASE`: the tolerance study (network/tolerance/spread.h),
// whole or one shard of it; `loopwright merge PARTS...`: the shards' partial
// results combined into exactly the whole study's result.
#pragma once

#include <string>
#include <vector>

#include "network/tolerance/spread.h"

namespace loopwright::cli {

struct SpreadArgs {
  std::string case_path;
  unsigned long long samples = 1000, seed = 1;
  std::string method = "lhs";
  int threads = 0;
  std::string shard;    // "K/N" or "" (then the scheduler's variables)
  int shard_count = 0;  // N where the scheduler gives only the index
  bool no_shard = false;  // ignore the schedulers' variables: the whole study
  std::string samples_csv;
  std::string margins_csv;  // every sample's margin of every check
  double settle_k = SpreadSettings{}.settle_k;  // --settle [K]
  std::vector<std::string> parts;  // merge
};

// Exit codes: 0 done; 2 invalid input or parts that do not belong together;
// 3 the nominal envelope has a point without a result; 4 internal error.
int SpreadMain(const SpreadArgs& a, const std::string& json_out, const std::string& csv_out, bool us_units, bool quiet);
int MergeMain(const SpreadArgs& a, const std::string& json_out, const std::string& csv_out, bool us_units, bool quiet);

}  // namespace loopwright::cli
