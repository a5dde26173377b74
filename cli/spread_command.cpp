#include "cli/spread_command.h"

#include <unistd.h>

#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <sstream>
#include <thread>

#include <fmt/format.h>

#include "cli/check_shard.h"
#include "cli/commands.h"
#include "cli/output.h"
#include "network/envelope/results.h"
#include "network/tolerance/shard.h"
#include "network/tolerance/spread.h"

namespace loopwright::cli {

namespace {

using nlohmann::json;

// The result document as written: tool, version, cautions and the merge.
json Document(const json& merged) {
  json doc = merged;
  doc["tool"] = "loopwright";
  doc["version"] = LOOPWRIGHT_VERSION;
  doc["kind"] = "spread";
  doc["cautions"] = SafetyCautions();
  return doc;
}

// Prints and writes a merged result; the exit code.
int Finish(const json& merged, const std::string& json_out, const std::string& csv_out, bool us, bool quiet) {
  const json doc = Document(merged);
  if (!WriteOutput(json_out, doc.dump(2) + "\n") || !WriteOutput(csv_out, SpreadCsv(doc))) return 4;
  const UnitSystem units = us ? UnitSystem::kUS : UnitSystem::kSI;
  if (!quiet) std::printf("%s\n%s\n", SpreadSummary(doc, units).c_str(), SafetyCautions());
  uint64_t failing = 0;
  for (const auto& c : doc["checks"]) failing += c["sampled"]["failures"].get<uint64_t>() > 0;
  std::printf("%s: tolerance study done: %zu checks, %llu with failing samples\n", doc["case"].get<std::string>().c_str(),
              doc["checks"].size(), static_cast<unsigned long long>(failing));
  return 0;
}

bool Settings(const SpreadArgs& a, const std::string& json_out, const std::string& csv_out, SpreadSettings* s,
              bool* partial) {
  if (a.samples < 1 || a.samples > 100000000ULL) {
    std::fprintf(stderr, "error[bad-option] --samples: expected 1 ... 100000000, got %llu\n", a.samples);
    return false;
  }
  s->samples = a.samples;
  s->seed = a.seed;
  s->settle_k = a.settle_k;
  s->method = a.method == "mc" ? SampleMethod::kMonteCarlo : SampleMethod::kLatinHypercube;
  s->threads = a.threads > 0 ? a.threads : static_cast<int>(std::max(1u, std::thread::hardware_concurrency()));
  ShardChoice shard;
  if (!PickShard(a.shard, a.shard_count, a.no_shard, json_out, csv_out, &shard)) return false;
  s->shard = shard.shard;
  s->shards = shard.shards;
  *partial = !shard.source.empty();
  return true;
}

std::function<void(uint64_t, uint64_t)> Progress(bool quiet) {
  if (quiet || !::isatty(2)) return {};
  const auto t0 = std::chrono::steady_clock::now();
  return [t0](uint64_t done, uint64_t total) {
    if (std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count() < 1.0) return;
    std::fprintf(stderr, "\rsolving samples %llu/%llu", static_cast<unsigned long long>(done),
                 static_cast<unsigned long long>(total));
    if (done == total) std::fputs("\n", stderr);
  };
}

// Every sample's least margin of every check (SI; empty: no result).
std::string MarginsCsv(const json& header, uint64_t first, const std::vector<double>& margins) {
  const size_t n = header["checks"].size();
  std::string out = "sample";
  for (const auto& c : header["checks"])
    out += "," + CsvField(c["name"].get<std::string>() + " @ " + c["where"].get<std::string>());
  out += "\n";
  for (size_t i = 0; n > 0 && i < margins.size() / n; ++i) {
    out += std::to_string(first + i);
    for (size_t j = 0; j < n; ++j) {
      const double m = margins[i * n + j];
      out += std::isfinite(m) ? fmt::format(",{}", m) : std::string(",");
    }
    out += "\n";
  }
  return out;
}

}  // namespace

int SpreadMain(const SpreadArgs& a, const std::string& json_out, const std::string& csv_out, bool us, bool quiet) {
  int code = 0;
  auto cs = Load(a.case_path, quiet, &code);
  if (!cs) return code;
  SpreadSettings s;
  bool partial = false;
  if (!Settings(a, json_out, csv_out, &s, &partial)) return 2;
  if (!a.samples_csv.empty() && !WriteOutput(a.samples_csv, SamplesCsv(*cs, s))) return 4;
  std::string err;
  const json header = SpreadHeader(*cs, s, &err);
  if (header.is_null()) {
    std::fprintf(stderr, "error[spread] %s\n", err.c_str());
    return cs->tolerances.empty() ? 2 : 3;
  }
  std::vector<double> margins;
  const std::vector<SpreadBlock> blocks =
      RunSpreadBlocks(*cs, header, s, Progress(quiet), a.margins_csv.empty() ? nullptr : &margins);
  if (!a.margins_csv.empty() &&
      !WriteOutput(a.margins_csv, MarginsCsv(header, blocks.empty() ? 0 : blocks[0].first, margins)))
    return 4;
  // Through the text of a partial result, as merge reads it: the same
  // numbers whether the study ran whole or in shards.
  const json part = json::parse(SpreadPart(header, s, blocks).dump());
  if (partial) {
    if (!WriteOutput(json_out, part.dump() + "\n")) return 4;
    uint64_t n = 0;
    for (const SpreadBlock& b : blocks) n += b.count;
    std::printf("%s: shard %d/%d: %llu sample(s) solved; partial result written to %s (combine with `loopwright "
                "merge`)\n", a.case_path.c_str(), s.shard + 1, s.shards, static_cast<unsigned long long>(n),
                json_out.c_str());
    if (n == 0)
      std::fprintf(stderr, "note: shard %d/%d holds no samples: shards take whole blocks of %llu samples (%llu block(s) "
                   "here); more shards than blocks leave some empty (harmless: merge still gives the whole result)\n",
                   s.shard + 1, s.shards, static_cast<unsigned long long>(kSpreadBlock),
                   static_cast<unsigned long long>((s.samples + kSpreadBlock - 1) / kSpreadBlock));
    return 0;
  }
  json merged;
  if (!MergeParts({part}, &merged, &err)) {
    std::fprintf(stderr, "internal error: %s\n", err.c_str());
    return 4;
  }
  return Finish(merged, json_out, csv_out, us, quiet);
}

bool PickShard(const std::string& shard, int shard_count, bool no_shard, const std::string& json_out,
               const std::string& csv_out, ShardChoice* out) {
  *out = ShardChoice{};
  if (no_shard) return true;
  auto env = [](const char* name) {
    const char* v = std::getenv(name);
    return std::string(v ? v : "");
  };
  std::string err;
  if (!ChooseShard(shard, shard_count, env, out, &err)) {
    std::fprintf(stderr, "error[bad-shard] %s\n", err.c_str());
    return false;
  }
  if (out->source.empty()) return true;
  std::fprintf(stderr, "shard %d/%d from %s\n", out->shard + 1, out->shards, out->source.c_str());
  if (json_out.empty() || !csv_out.empty()) {
    std::fprintf(stderr, "error[bad-option] a shard (%d/%d) writes its partial result with --json FILE and no --csv; "
                         "`loopwright merge` makes the whole result and its CSV (--no-shard: run it whole)\n",
                 out->shard + 1, out->shards);
    return false;
  }
  return true;
}

namespace {

// The partial results named on the command line; false after saying why.
bool ReadParts(const std::vector<std::string>& paths, std::vector<json>* parts) {
  for (const std::string& path : paths) {
    std::ifstream in(path);
    if (!in) {
      std::fprintf(stderr, "error[cannot-read] \"%s\" cannot be read\n", path.c_str());
      return false;
    }
    std::stringstream text;
    text << in.rdbuf();
    try {
      parts->push_back(json::parse(text.str()));
    } catch (const json::exception& e) {
      std::fprintf(stderr, "error[bad-json] %s: %s\n", path.c_str(), e.what());
      return false;
    }
  }
  return true;
}

// The command whose partial result `part` is ("" for none).
std::string PartOf(const json& part) {
  const std::string kind = part.is_object() ? part.value("kind", "") : "";
  return kind == kSpreadPartKind ? "spread" : kind == kCheckPartKind ? "check" : "";
}

}  // namespace

int MergeMain(const SpreadArgs& a, const std::string& json_out, const std::string& csv_out, bool us, bool quiet) {
  std::vector<json> parts;
  if (!ReadParts(a.parts, &parts)) return 2;
  const std::string kind = PartOf(parts[0]);
  for (size_t i = 0; i < parts.size(); ++i) {
    const std::string of = PartOf(parts[i]);
    if (of.empty() || of != kind) {
      std::fprintf(stderr, "error[merge] %s: %s\n", a.parts[i].c_str(),
                   of.empty() ? "not a partial result of `loopwright spread --shard` or `loopwright check --shard`"
                              : fmt::format("a partial result of `loopwright {} --shard`, but {} is one of `loopwright "
                                            "{} --shard`: merge the parts of one run", of, a.parts[0], kind).c_str());
      return 2;
    }
  }
  if (kind == "check") {
    Common c;
    c.json_out = json_out;
    c.csv_out = csv_out;
    c.units = us ? "us" : "si";
    c.quiet = quiet;
    return MergeCheckParts(parts, a.parts, a.merge_case, c);
  }
  json merged;
  std::string err;
  if (!MergeParts(parts, &merged, &err, a.parts)) {
    std::fprintf(stderr, "error[merge] %s\n", err.c_str());
    return 2;
  }
  return Finish(merged, json_out, csv_out, us, quiet);
}

}  // namespace loopwright::cli
