#include "network/tolerance/shard.h"

#include <algorithm>
#include <cstdlib>

#include <fmt/format.h>

namespace loopwright {

namespace {

// A whole number >= lo, or false.
bool Whole(const std::string& s, long lo, long* v) {
  if (s.empty()) return false;
  char* end = nullptr;
  const long x = std::strtol(s.c_str(), &end, 10);
  if (*end != '\0' || x < lo) return false;
  *v = x;
  return true;
}

bool Finish(long index, long count, const std::string& source, ShardChoice* out, std::string* error) {
  if (count < 1 || index < 0 || index >= count) {
    *error = fmt::format("{}: index {} is not within 0 ... {} (shard count {})", source, index, count - 1, count);
    return false;
  }
  out->shard = static_cast<int>(index);
  out->shards = static_cast<int>(count);
  out->source = source;
  return true;
}

// The count where the scheduler publishes none: --shard-count, then
// LOOPWRIGHT_SHARD_COUNT.
bool CountFrom(int count, const std::function<std::string(const char*)>& env, const std::string& source, long* n,
               std::string* error) {
  if (count > 0) {
    *n = count;
    return true;
  }
  if (Whole(env("LOOPWRIGHT_SHARD_COUNT"), 1, n)) return true;
  *error = fmt::format("{} gives the index but not the number of shards: pass --shard-count N (or set "
                       "LOOPWRIGHT_SHARD_COUNT)", source);
  return false;
}

bool FromSlurm(const std::function<std::string(const char*)>& env, ShardChoice* out, std::string* error) {
  long id = 0, min = 0, step = 1, count = 0, max = 0;
  const std::string src = "Slurm job array (SLURM_ARRAY_TASK_ID=" + env("SLURM_ARRAY_TASK_ID") + ")";
  if (!Whole(env("SLURM_ARRAY_TASK_ID"), 0, &id) || !Whole(env("SLURM_ARRAY_TASK_MIN"), 0, &min) ||
      !Whole(env("SLURM_ARRAY_TASK_COUNT"), 1, &count) || !Whole(env("SLURM_ARRAY_TASK_MAX"), 0, &max)) {
    *error = src + ": SLURM_ARRAY_TASK_MIN, _MAX and _COUNT must be whole numbers";
    return false;
  }
  if (!env("SLURM_ARRAY_TASK_STEP").empty() && !Whole(env("SLURM_ARRAY_TASK_STEP"), 1, &step)) {
    *error = src + ": SLURM_ARRAY_TASK_STEP must be a whole number >= 1";
    return false;
  }
  if ((max - min) % step != 0 || (max - min) / step + 1 != count || (id - min) % step != 0) {
    *error = fmt::format("{}: the array's ids are not one range {}-{}:{} of {} tasks; submit --array=0-{} (or pass "
                         "--shard K/N)", src, min, max, step, count, count - 1);
    return false;
  }
  return Finish((id - min) / step, count, src, out, error);
}

}  // namespace

bool ParseShard(const std::string& text, ShardChoice* out, std::string* error) {
  const size_t slash = text.find('/');
  long k = 0, n = 0;
  if (slash == std::string::npos || !Whole(text.substr(0, slash), 1, &k) || !Whole(text.substr(slash + 1), 1, &n) ||
      k > n) {
    *error = fmt::format("--shard: expected K/N with 1 <= K <= N (\"3/8\": the third of eight slices), got \"{}\"", text);
    return false;
  }
  return Finish(k - 1, n, "--shard " + text, out, error);
}

bool ChooseShard(const std::string& explicit_shard, int count, const std::function<std::string(const char*)>& env,
                 ShardChoice* out, std::string* error) {
  if (!explicit_shard.empty()) return ParseShard(explicit_shard, out, error);
  long index = 0, n = 0;
  auto index_of = [&](const char* var, long base, const std::string& what) {
    if (!Whole(env(var), base, &index)) {
      *error = fmt::format("{}: {}=\"{}\" is not a whole number >= {}", what, var, env(var), base);
      return false;
    }
    index -= base;
    return true;
  };
  if (!env("LOOPWRIGHT_SHARD_INDEX").empty()) {
    const std::string src = "LOOPWRIGHT_SHARD_INDEX=" + env("LOOPWRIGHT_SHARD_INDEX");
    return index_of("LOOPWRIGHT_SHARD_INDEX", 0, src) && CountFrom(count, env, src, &n, error) &&
           Finish(index, n, src, out, error);
  }
  if (!env("SLURM_ARRAY_TASK_ID").empty()) return FromSlurm(env, out, error);
  if (!env("JOB_COMPLETION_INDEX").empty()) {
    const std::string src = "Kubernetes Indexed Job (JOB_COMPLETION_INDEX=" + env("JOB_COMPLETION_INDEX") + ")";
    return index_of("JOB_COMPLETION_INDEX", 0, src) && CountFrom(count, env, src, &n, error) &&
           Finish(index, n, src, out, error);
  }
  if (!env("AWS_BATCH_JOB_ARRAY_INDEX").empty()) {
    const std::string src = "AWS Batch array job (AWS_BATCH_JOB_ARRAY_INDEX=" + env("AWS_BATCH_JOB_ARRAY_INDEX") + ")";
    if (!index_of("AWS_BATCH_JOB_ARRAY_INDEX", 0, src)) return false;
    if (!Whole(env("AWS_BATCH_JOB_ARRAY_SIZE"), 1, &n) && !CountFrom(count, env, src, &n, error)) return false;
    return Finish(index, n, src, out, error);
  }
  if (!env("_CONDOR_PROCNO").empty()) {
    const std::string src = "HTCondor (_CONDOR_PROCNO=" + env("_CONDOR_PROCNO") + ")";
    if (!index_of("_CONDOR_PROCNO", 0, src)) return false;
    if (!Whole(env("_CONDOR_NPROCS"), 1, &n) && !CountFrom(count, env, src, &n, error)) return false;
    return Finish(index, n, src, out, error);
  }
  if (!env("PARALLEL_SEQ").empty()) {
    const std::string src = "GNU parallel (PARALLEL_SEQ=" + env("PARALLEL_SEQ") + ")";
    return index_of("PARALLEL_SEQ", 1, src) && CountFrom(count, env, src, &n, error) && Finish(index, n, src, out, error);
  }
  *out = ShardChoice{};
  return true;
}

void ShardRange(uint64_t items, uint64_t block, int shard, int shards, uint64_t* first_block, uint64_t* end_block) {
  const uint64_t blocks = (items + block - 1) / block;
  *first_block = blocks * static_cast<uint64_t>(shard) / static_cast<uint64_t>(shards);
  *end_block = blocks * static_cast<uint64_t>(shard + 1) / static_cast<uint64_t>(shards);
}

bool CheckPartSet(const std::vector<nlohmann::json>& parts, const std::vector<std::string>& names,
                  const std::string& kind, const std::string& what, std::string* error) {
  auto name = [&](size_t i) { return i < names.size() ? names[i] : fmt::format("part {}", i + 1); };
  if (parts.empty()) {
    *error = "no partial results given";
    return false;
  }
  std::vector<int> seen;
  for (size_t i = 0; i < parts.size(); ++i) {
    const nlohmann::json& p = parts[i];
    if (!p.is_object() || p.value("kind", "") != kind || !p.contains("header") || !p["shards"].is_number_integer() ||
        !p["shard"].is_number_integer()) {
      *error = fmt::format("{}: not a partial result of `{}`", name(i), what);
      return false;
    }
    const int k = p["shard"].get<int>(), n = p["shards"].get<int>();
    if (i == 0) seen.assign(static_cast<size_t>(std::max(n, 0)), 0);
    if (p["header"] != parts[0]["header"] || n != parts[0]["shards"].get<int>()) {
      *error = fmt::format("{}: shard {} belongs to another study (case, settings or shard count differ from {})",
                           name(i), k, name(0));
      return false;
    }
    if (k < 1 || k > n || seen[static_cast<size_t>(k - 1)]++) {
      *error = fmt::format("{}: shard {}/{} is given twice or is out of range", name(i), k, n);
      return false;
    }
  }
  for (size_t k = 0; k < seen.size(); ++k)
    if (!seen[k]) {
      *error = fmt::format("shard {}/{} is missing", k + 1, seen.size());
      return false;
    }
  return true;
}

}  // namespace loopwright
