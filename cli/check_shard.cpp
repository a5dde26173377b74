#include "cli/check_shard.h"

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <fstream>
#include <sstream>

#include <fmt/format.h>

#include "cli/commands.h"
#include "cli/output.h"
#include "network/envelope/results.h"
#include "network/tolerance/shard.h"

namespace loopwright::cli {

namespace {

using nlohmann::json;

// A double as JSON: a number when finite, else "nan", "inf" or "-inf" (JSON
// has no such numbers; nlohmann would write null). Finite numbers round-trip
// exactly (nlohmann writes the shortest text that reads back the same).
json Num(double v) {
  if (std::isfinite(v)) return v;
  return std::isnan(v) ? "nan" : v > 0 ? "inf" : "-inf";
}
double FromNum(const json& j) {
  if (j.is_number()) return j.get<double>();
  const std::string s = j.get<std::string>();
  return s == "inf" ? INFINITY : s == "-inf" ? -INFINITY : NAN;
}

json OutcomeJson(const CheckOutcome& o) {
  return {{"id", static_cast<int>(o.id)}, {"name", o.name()}, {"where", o.where}, {"value", Num(o.value)},
          {"limit", Num(o.limit)}, {"margin", Num(o.margin)}, {"dim", static_cast<int>(o.dim)}, {"pass", o.pass},
          {"source", static_cast<int>(o.source)}, {"source_loop", o.source_loop}, {"source_item", o.source_item}, {"loop", o.loop}, {"comp", o.comp}};
}
CheckOutcome OutcomeFrom(const json& j) {
  CheckOutcome o;
  o.id = static_cast<CheckId>(j.at("id").get<int>());
  o.where = j.at("where").get<std::string>();
  o.value = FromNum(j.at("value"));
  o.limit = FromNum(j.at("limit"));
  o.margin = FromNum(j.at("margin"));
  o.dim = static_cast<Dimension>(j.at("dim").get<int>());
  o.pass = j.at("pass").get<bool>();
  o.source = static_cast<LimitSource>(j.at("source").get<int>());
  o.source_loop = j.at("source_loop").get<int>();
  o.source_item = j.at("source_item").get<int>();
  o.loop = j.at("loop").get<int>();
  o.comp = j.at("comp").get<int>();
  return o;
}

// FNV-1a, 64 bits (Fowler, Noll, Vo; the IETF draft "The FNV Non-
// Cryptographic Hash Algorithm", offset basis 14695981039346656037, prime
// 1099511628211): tells a changed case file from the one the shards solved;
// not a defence against a file made to collide.
bool FileDigest(const std::string& path, std::string* digest) {
  std::ifstream in(path, std::ios::binary);
  if (!in) return false;
  std::ostringstream text;
  text << in.rdbuf();
  uint64_t h = 14695981039346656037ULL;
  for (unsigned char ch : text.str()) h = (h ^ ch) * 1099511628211ULL;
  *digest = fmt::format("fnv1a64:{:016x}", h);
  return true;
}

// One point of a part: its document text and what the merge needs of it.
json PointEntry(const Case& cs, const PointResult& p, const std::vector<CheckOutcome>& checks,
                const std::vector<std::string>& model_warnings, JsonDetail detail) {
  json outcomes = json::array();
  for (const CheckOutcome& o : checks) outcomes.push_back(OutcomeJson(o));
  json e = {{"name", p.name}, {"converged", p.converged}, {"termination", static_cast<int>(p.summary.termination)},
            {"cause_kind", p.summary.cause_kind}, {"place", p.summary.place}, {"cause", p.summary.cause},
            {"checks", outcomes}, {"model_warnings", model_warnings},
            {"report", p.converged ? std::string() : p.summary.Report()},
            {"text", PointText(cs, p, p.converged ? &checks : nullptr, detail)}};
  return e;
}

// The header every part of one run shares.
json PartHeader(const Case& cs, const std::string& path, const std::string& digest, const Common& c, bool no_fix,
                double tight) {
  return {{"format", kCheckPartFormat}, {"version", LOOPWRIGHT_VERSION}, {"case_file", path}, {"case_digest", digest},
          {"points", cs.envelope.points.size()}, {"points_per_block", kSweepBlock},
          {"settings", {{"json_detail", c.json_detail}, {"no_fix", no_fix}, {"tight", tight}}}};
}

int Refuse(const std::string& why) {
  std::fprintf(stderr, "error[merge] %s\n", why.c_str());
  return 2;
}

}  // namespace

int CheckShard(const Case& cs, const std::string& path, const Common& c, bool no_fix, int threads, double tight,
               int shard, int shards) {
  std::string digest;
  if (!FileDigest(path, &digest)) {
    std::fprintf(stderr, "error[cannot-read] \"%s\" cannot be read\n", path.c_str());
    return 2;
  }
  JsonDetail detail = JsonDetail::kFull;
  ParseJsonDetail(c.json_detail, &detail);
  uint64_t b0 = 0, b1 = 0;
  ShardRange(cs.envelope.points.size(), kSweepBlock, shard, shards, &b0, &b1);
  CheckRun run;
  run.sweep = SweepBlocks(cs, c, threads, b0, b1);
  NotePoints(cs, &run);
  json points = json::array();
  for (size_t i = 0; i < run.sweep.points.size(); ++i)
    points.push_back(PointEntry(cs, run.sweep.points[i], run.sweep.checks[i], run.model_warnings[i], detail));
  json warnings = json::array();
  for (const CheckWarning& w : run.sweep.warnings) warnings.push_back({w.where, w.text, w.point});
  const size_t first = std::min<size_t>(b0 * kSweepBlock, cs.envelope.points.size());
  const json part = {{"kind", kCheckPartKind}, {"shard", shard + 1}, {"shards", shards},
                     {"header", PartHeader(cs, path, digest, c, no_fix, tight)}, {"first_point", first},
                     {"end_point", first + run.sweep.points.size()}, {"sweep_warnings", warnings}, {"points", points}};
  if (!WriteOutput(c.json_out, part.dump() + "\n")) return 4;
  std::printf("%s: shard %d/%d: %zu of %zu points solved (%zu without a result); partial result written to %s "
              "(combine the shards with `loopwright merge`)\n", path.c_str(), shard + 1, shards,
              run.sweep.points.size(), cs.envelope.points.size(), run.failed_reports.size(), c.json_out.c_str());
  if (run.sweep.points.empty())
    std::printf("note: the envelope's %zu points make %zu block(s) of %zu, the unit a shard takes (so that every "
                "point starts as in the whole run); this shard holds none, and more shards than blocks leave some "
                "empty\n", cs.envelope.points.size(), (cs.envelope.points.size() + kSweepBlock - 1) / kSweepBlock,
                kSweepBlock);
  return 0;
}

namespace {

// The parts in shard order, each holding the points its shard should:
// false with *error naming the file.
bool OrderParts(const std::vector<json>& parts, const std::vector<std::string>& names, std::vector<size_t>* order,
                std::string* error) {
  const json& h = parts[0].at("header");
  if (h.at("format") != kCheckPartFormat || h.at("version") != LOOPWRIGHT_VERSION) {
    *error = fmt::format("{}: written by loopwright {} (part format {}); this is {} (format {}): merge with the "
                         "loopwright that ran the shards", names[0], h.at("version").dump(), h.at("format").dump(),
                         LOOPWRIGHT_VERSION, kCheckPartFormat);
    return false;
  }
  const uint64_t n = h.at("points").get<uint64_t>(), block = h.at("points_per_block").get<uint64_t>();
  const int shards = parts[0].at("shards").get<int>();
  order->resize(parts.size());
  for (size_t i = 0; i < parts.size(); ++i) (*order)[static_cast<size_t>(parts[i].at("shard").get<int>() - 1)] = i;
  for (int k = 0; k < shards; ++k) {
    const json& p = parts[(*order)[static_cast<size_t>(k)]];
    uint64_t b0 = 0, b1 = 0;
    ShardRange(n, block, k, shards, &b0, &b1);
    const uint64_t first = std::min(n, b0 * block), end = std::min(n, b1 * block);
    if (p.at("first_point").get<uint64_t>() != first || p.at("end_point").get<uint64_t>() != end ||
        p.at("points").size() != end - first) {
      *error = fmt::format("{}: shard {}/{} should hold points {} ... {} of {}, it holds {} ... {}",
                           names[(*order)[static_cast<size_t>(k)]], k + 1, shards, first, end, n,
                           p.at("first_point").dump(), p.at("end_point").dump());
      return false;
    }
  }
  return true;
}

// The case the parts solved, from `case_path` (or the path they give),
// refused when its bytes differ. Null after saying why; *code the exit code.
std::unique_ptr<Case> PartsCase(const json& h, const std::string& case_path, bool quiet, int* code) {
  const std::string given = h.at("case_file").get<std::string>();
  const std::string path = case_path.empty() ? given : case_path;
  std::string digest;
  *code = 2;
  if (!FileDigest(path, &digest)) {
    Refuse(fmt::format("the case file \"{}\" cannot be read{}", path, case_path.empty() ? "; pass --case FILE" : ""));
    return nullptr;
  }
  if (digest != h.at("case_digest").get<std::string>()) {
    Refuse(fmt::format("\"{}\" is not the case file the shards solved (its digest {}, theirs {})", path, digest,
                       h.at("case_digest").get<std::string>()));
    return nullptr;
  }
  std::unique_ptr<Case> cs = Load(path, quiet, code);
  if (cs) cs->path = given;  // the document names the case as the shards were given it
  return cs;
}

// The sweep of the parts, in envelope order, and each point's text.
void RestoreRun(const std::vector<json>& parts, const std::vector<size_t>& order, CheckRun* run,
                std::vector<std::string>* texts) {
  for (size_t i : order) {
    for (const json& w : parts[i].at("sweep_warnings"))
      run->sweep.warnings.push_back({w.at(0).get<std::string>(), w.at(1).get<std::string>(), w.at(2).get<std::string>()});
    for (const json& e : parts[i].at("points")) {
      PointResult r;
      r.name = e.at("name").get<std::string>();
      r.converged = e.at("converged").get<bool>();
      r.summary.termination = static_cast<Termination>(e.at("termination").get<int>());
      r.summary.cause_kind = e.at("cause_kind").get<std::string>();
      r.summary.place = e.at("place").get<std::string>();
      r.summary.cause = e.at("cause").get<std::string>();
      std::vector<CheckOutcome> checks;
      for (const json& o : e.at("checks")) checks.push_back(OutcomeFrom(o));
      run->sweep.points.push_back(std::move(r));
      run->sweep.checks.push_back(std::move(checks));
      run->model_warnings.push_back(e.at("model_warnings").get<std::vector<std::string>>());
      texts->push_back(e.at("text").get<std::string>());
      if (run->sweep.points.back().converged) continue;
      run->failed_what.push_back(FailedWhat(run->sweep.points.back().summary.termination));
      run->failed_reports.push_back(e.at("report").get<std::string>());
    }
  }
}

}  // namespace

int MergeCheckParts(const std::vector<json>& parts, const std::vector<std::string>& names,
                    const std::string& case_path, const Common& c) {
  std::string err;
  try {
    std::vector<size_t> order;
    if (!CheckPartSet(parts, names, kCheckPartKind, "loopwright check --shard", &err) ||
        !OrderParts(parts, names, &order, &err))
      return Refuse(err);
    const json& h = parts[0].at("header");
    int code = 0;
    const std::unique_ptr<Case> cs = PartsCase(h, case_path, c.quiet, &code);
    if (!cs) return code;
    CheckRun run;
    std::vector<std::string> texts;
    RestoreRun(parts, order, &run, &texts);
    Common cc = c;
    cc.json_detail = h.at("settings").at("json_detail").get<std::string>();
    ConcludeChecks(*cs, h.at("settings").at("no_fix").get<bool>(), h.at("settings").at("tight").get<double>(), &run);
    JsonDetail detail = JsonDetail::kFull;
    ParseJsonDetail(cc.json_detail, &detail);
    auto write = [&](std::ostream& os) { WriteResultsJsonFromText(os, *cs, texts, run.verdict, CheckExtras(run), detail); };
    if (!c.json_out.empty() && !WriteFileAtomicStream(c.json_out, write, &err)) {
      std::fprintf(stderr, "error[write] %s\n", err.c_str());
      return 4;
    }
    if (!WriteOutput(c.csv_out, CheckCsv(run))) return 4;
    PrintCheck(*cs, h.at("case_file").get<std::string>(), cc, run);
    return CheckExitCode(run);
  } catch (const nlohmann::json::exception& e) {
    return Refuse(std::string("a partial result is malformed: ") + e.what());
  }
}

}  // namespace loopwright::cli
