// Which slice of a study this process runs: `--shard K/N` (K from 1 to N),
// or, by default, the index variables of the scheduler that started it.
// Read in this order; the first that is set decides:
//   LOOPWRIGHT_SHARD_INDEX, LOOPWRIGHT_SHARD_COUNT   our own: index from 0, count
//   Slurm job array: SLURM_ARRAY_TASK_ID, SLURM_ARRAY_TASK_MIN,
//     SLURM_ARRAY_TASK_STEP (1 when unset), SLURM_ARRAY_TASK_COUNT:
//     K - 1 = (ID - MIN) / STEP, N = COUNT (a range with a step; a list of
//     ids with gaps is refused)
//   Kubernetes Indexed Job: JOB_COMPLETION_INDEX (from 0); the Job's
//     completions are not published in the pod: N from --shard-count or
//     LOOPWRIGHT_SHARD_COUNT
//   AWS Batch array job: AWS_BATCH_JOB_ARRAY_INDEX (from 0),
//     AWS_BATCH_JOB_ARRAY_SIZE
//   HTCondor parallel universe: _CONDOR_PROCNO (from 0), _CONDOR_NPROCS; in
//     the vanilla universe a submit file passes $(Process) through
//     environment = "LOOPWRIGHT_SHARD_INDEX=$(Process) LOOPWRIGHT_SHARD_COUNT=N"
//   GNU parallel: PARALLEL_SEQ (the job's sequence number, from 1); N from
//     --shard-count or LOOPWRIGHT_SHARD_COUNT
// Sources: Slurm sbatch(1) "OUTPUT ENVIRONMENT VARIABLES" and the job array
// guide; Kubernetes "Indexed Job for Parallel Processing with Static Work
// Assignment"; AWS Batch User Guide "job environment variables"; GNU
// parallel(1) (PARALLEL_SEQ); HTCondor manual, parallel universe (from
// memory for _CONDOR_PROCNO/_CONDOR_NPROCS).
#pragma once

#include <cstdint>
#include <functional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

namespace loopwright {

struct ShardChoice {
  int shard = 0, shards = 1;  // 0-based index of `shards`
  std::string source;         // "--shard", "Slurm job array (SLURM_ARRAY_TASK_ID=3)", ... ("" unsharded)
};

// Parses "K/N" (1 <= K <= N). False with *error.
bool ParseShard(const std::string& text, ShardChoice* out, std::string* error);

// The shard from `explicit_shard` ("" when not given) or the environment
// (`getenv` returns "" for an unset variable); `count` is --shard-count (0
// when not given). False with *error when the variables are inconsistent.
bool ChooseShard(const std::string& explicit_shard, int count, const std::function<std::string(const char*)>& getenv,
                 ShardChoice* out, std::string* error);

// The blocks [*first_block, *end_block) of shard `shard` (0-based) of
// `shards` when `items` are cut into blocks of `block` consecutive items: a
// contiguous range of whole blocks, B k / N rounded down to B (k + 1) / N
// (B blocks; a shard gets none when N > B). Used by `spread` (samples) and
// `check` (envelope points).
void ShardRange(uint64_t items, uint64_t block, int shard, int shards, uint64_t* first_block, uint64_t* end_block);

// What every merge checks of its partial results before combining them:
// each part is an object of member "kind" == `kind`, carries the same
// "header" (the case, settings and what else must agree) and "shards" as
// the first, and together they hold each shard 1 ... N exactly once.
// `names[i]` names parts[i] in the error (a file; "part i" when absent).
// False with *error naming the file and the reason.
bool CheckPartSet(const std::vector<nlohmann::json>& parts, const std::vector<std::string>& names,
                  const std::string& kind, const std::string& what, std::string* error);

}  // namespace loopwright
