// `loopwright spread CASE`: the tolerance study (network/tolerance/spread.h),
// whole or one shard of it; `loopwright merge PARTS...`: the shards' partial
// results combined into exactly the whole study's result.
#pragma once

#include <string>
#include <vector>

#include "network/tolerance/shard.h"
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
  std::string merge_case;          // merge --case: the case file of check parts (default: the path they give)
};

// The shard this process runs (`spread`, `check`): --shard K/N, or the
// scheduler's variables (network/tolerance/shard.h), or none (no_shard, or
// none set: out->source ""). Says on stderr where K/N came from. False after
// saying why: bad variables, or a shard without --json FILE or with --csv
// (a shard writes only its partial result).
bool PickShard(const std::string& shard, int shard_count, bool no_shard, const std::string& json_out,
               const std::string& csv_out, ShardChoice* out);

// merge reads the kind of its parts (spread or check: cli/check_shard.h)
// and refuses a mix. Exit codes: 0 done; 2 invalid input or parts that do not belong together;
// 3 the nominal envelope has a point without a result; 4 internal error.
int SpreadMain(const SpreadArgs& a, const std::string& json_out, const std::string& csv_out, bool us_units, bool quiet);
int MergeMain(const SpreadArgs& a, const std::string& json_out, const std::string& csv_out, bool us_units, bool quiet);

}  // namespace loopwright::cli
