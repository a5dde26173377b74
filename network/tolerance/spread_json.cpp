// Partial results of a tolerance study, their merge into the result
// document, and the samples' draws as CSV (network/tolerance/spread.h).
#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "network/envelope/results.h"
#include "network/tolerance/shard.h"
#include "network/tolerance/spread.h"

namespace loopwright {

using nlohmann::json;

namespace {

constexpr const char* kPartKind = kSpreadPartKind;
// Normal quantiles of the intervals: 95 % (reported) and 99.9 % (the test
// of the first-order estimate), two-sided.
constexpr double kZ95 = 1.959963984540054;
constexpr double kZ999 = 3.290526731491926;

json BlockJson(const SpreadBlock& b) {
  json checks = json::array();
  for (const CheckBlock& c : b.checks) {
    json worst = json::array();
    for (const auto& w : c.worst) worst.push_back({w.first, w.second});
    checks.push_back({{"solved", c.solved}, {"failures", c.failures}, {"sum", c.sum}, {"sumsq", c.sumsq},
                      {"worst", worst}, {"governing", c.governing}});
  }
  return {{"index", b.index}, {"first", b.first}, {"count", b.count}, {"unsolved", b.unsolved},
          {"unsolved_samples", b.unsolved_samples}, {"checks", checks}};
}

// Running totals of one check over the blocks, added in block order.
struct CheckTotal {
  uint64_t solved = 0, failures = 0;
  double sum = 0, sumsq = 0;
  std::vector<std::pair<double, uint64_t>> worst;
  std::vector<uint64_t> governing;
};

void AddBlock(const json& b, std::vector<CheckTotal>* totals) {
  const json& checks = b.at("checks");
  for (size_t j = 0; j < totals->size(); ++j) {
    const json& c = checks.at(j);
    CheckTotal& t = (*totals)[j];
    t.solved += c.at("solved").get<uint64_t>();
    t.failures += c.at("failures").get<uint64_t>();
    t.sum += c.at("sum").get<double>();
    t.sumsq += c.at("sumsq").get<double>();
    for (const json& w : c.at("worst")) t.worst.emplace_back(w.at(0).get<double>(), w.at(1).get<uint64_t>());
    std::sort(t.worst.begin(), t.worst.end());
    if (t.worst.size() > kWorstSamples) t.worst.resize(kWorstSamples);
    const json& g = c.at("governing");
    if (t.governing.empty()) t.governing.assign(g.size(), 0);
    for (size_t p = 0; p < g.size() && p < t.governing.size(); ++p) t.governing[p] += g[p].get<uint64_t>();
  }
}

// The tolerances of a header, rebuilt to redraw the worst samples' values.
ToleranceSet HeaderTolerances(const json& h) {
  ToleranceSet set;
  for (const json& t : h.at("tolerances")) {
    Tolerance x;
    x.name = t.at("name").get<std::string>();
    const std::string d = t.at("distribution").get<std::string>();
    const auto& names = DistributionNames();
    x.dist = static_cast<Distribution>(std::find(names.begin(), names.end(), d) - names.begin());
    x.a = t.at("a").get<double>();
    x.b = t.at("b").get<double>();
    x.c = t.at("c").get<double>();
    set.items.push_back(x);
  }
  set.correlation = h.at("correlation").get<std::vector<double>>();
  set.cholesky = h.at("cholesky").get<std::vector<double>>();
  return set;
}

json Sampled(const json& check, const CheckTotal& t, const json& h, const SampleDraws& draws) {
  double lo = 0, hi = 1;
  WilsonInterval(t.failures, t.solved, kZ95, &lo, &hi);
  const double n = static_cast<double>(t.solved);
  const double m = t.solved ? t.sum / n : NAN;
  const double var = t.solved > 1 ? std::max(0.0, (t.sumsq - n * m * m) / (n - 1)) : NAN;
  json worst = json::array();
  std::vector<double> x;
  for (const auto& w : t.worst) {
    draws.Draw(w.second, &x);
    json values = json::object();
    for (size_t i = 0; i < x.size(); ++i) values[h.at("tolerances")[i].at("name").get<std::string>()] = x[i];
    worst.push_back({{"sample", w.second}, {"margin", w.first}, {"values", values}});
  }
  json governing = json::object();
  for (size_t p = 0; p < t.governing.size(); ++p)
    if (t.governing[p]) governing[h.at("points")[p].get<std::string>()] = t.governing[p];
  return {{"solved", t.solved},
          {"failures", t.failures},
          {"probability", t.solved ? static_cast<double>(t.failures) / n : NAN},
          {"interval", {{"method", "Wilson score"}, {"level", 0.95}, {"low", lo}, {"high", hi}}},
          {"margin_mean", check.at("nominal_margin").get<double>() + m},
          {"margin_sd", std::sqrt(var)},
          {"governing", governing},
          {"worst", worst}};
}

// Whether the first-order probability agrees with the sampled one, and a
// note saying why not.
void Compare(const json& check, const CheckTotal& t, json* out) {
  const json& fo = check.at("first_order");
  std::string note;
  if (!fo.at("available").get<bool>() || t.solved == 0) {
    (*out)["first_order_reliable"] = nullptr;
  } else {
    double lo = 0, hi = 1;
    WilsonInterval(t.failures, t.solved, kZ999, &lo, &hi);
    const double pf = fo.at("probability").get<double>();
    const bool ok = pf >= lo && pf <= hi;
    (*out)["first_order_reliable"] = ok;
    if (!ok)
      note = fmt::format("first order unreliable: {:.3g} lies outside the sampled 99.9 % interval {:.3g} ... {:.3g} "
                         "(the margin is not linear, or not normal, over the tolerances)", pf, lo, hi);
  }
  const int gp = check.at("point").get<int>();
  const uint64_t moved = t.solved - (gp >= 0 && gp < static_cast<int>(t.governing.size()) ? t.governing[gp] : 0);
  if (t.solved && moved * 20 > t.solved)
    note += fmt::format("{}another point governs in {:.0f} % of the samples", note.empty() ? "" : "; ",
                        100.0 * static_cast<double>(moved) / static_cast<double>(t.solved));
  (*out)["note"] = note;
}

}  // namespace

json SpreadPart(const json& header, const SpreadSettings& s, const std::vector<SpreadBlock>& blocks) {
  json bl = json::array();
  for (const SpreadBlock& b : blocks) bl.push_back(BlockJson(b));
  return {{"kind", kPartKind}, {"shard", s.shard + 1}, {"shards", s.shards}, {"header", header}, {"blocks", bl}};
}

namespace {

// The blocks of `parts` in index order, each exactly once; false with *error.
bool OrderedBlocks(const std::vector<json>& parts, const std::vector<std::string>& names,
                   std::vector<const json*>* blocks, std::string* error) {
  if (!CheckPartSet(parts, names, kPartKind, "loopwright spread --shard", error)) return false;
  const json& h = parts[0].at("header");
  for (const json& p : parts)
    for (const json& b : p.at("blocks")) blocks->push_back(&b);
  std::sort(blocks->begin(), blocks->end(),
            [](const json* a, const json* b) { return a->at("index").get<uint64_t>() < b->at("index").get<uint64_t>(); });
  const uint64_t samples = h.at("settings").at("samples").get<uint64_t>();
  const uint64_t nblocks = (samples + kSpreadBlock - 1) / kSpreadBlock;
  for (uint64_t b = 0; b < blocks->size(); ++b)
    if ((*blocks)[b]->at("index").get<uint64_t>() != b || blocks->size() != nblocks) {
      *error = "the parts do not hold every block of samples exactly once";
      return false;
    }
  return true;
}

}  // namespace

bool MergeParts(const std::vector<json>& parts, json* result, std::string* error, const std::vector<std::string>& names) {
  try {
    std::vector<const json*> blocks;
    if (!OrderedBlocks(parts, names, &blocks, error)) return false;
    const json& h = parts[0].at("header");
    const json& settings = h.at("settings");
    std::vector<CheckTotal> totals(h.at("checks").size());
    uint64_t unsolved = 0;
    json unsolved_samples = json::array();
    for (const json* b : blocks) {
      AddBlock(*b, &totals);
      unsolved += b->at("unsolved").get<uint64_t>();
      for (const json& u : b->at("unsolved_samples"))
        if (unsolved_samples.size() < 20) unsolved_samples.push_back(u);
    }
    const ToleranceSet set = HeaderTolerances(h);
    const SampleDraws draws(set, settings.at("method") == "lhs" ? SampleMethod::kLatinHypercube : SampleMethod::kMonteCarlo,
                            settings.at("seed").get<uint64_t>(), settings.at("samples").get<uint64_t>());
    json checks = json::array();
    for (size_t j = 0; j < totals.size(); ++j) {
      const json& c = h.at("checks")[j];
      json out = {{"name", c.at("name")}, {"where", c.at("where")}, {"unit", c.at("unit")},
                  {"dimension", c.at("dimension")}, {"limit", c.at("limit")},
                  {"nominal", {{"margin", c.at("nominal_margin")}, {"point", h.at("points")[c.at("point").get<int>()]}}},
                  {"first_order", c.at("first_order")}, {"sampled", Sampled(c, totals[j], h, draws)}};
      Compare(c, totals[j], &out);
      checks.push_back(out);
    }
    json tols = h.at("tolerances");
    for (json& t : tols) t.erase("a"), t.erase("b"), t.erase("c");
    *result = {{"case", h.at("case")}, {"settings", settings}, {"tolerances", tols}, {"points", h.at("points")},
               {"samples_unsolved", unsolved}, {"unsolved_samples", unsolved_samples}, {"checks", checks}};
    return true;
  } catch (const json::exception& e) {
    *error = std::string("a partial result is malformed: ") + e.what();
    return false;
  }
}

std::string SamplesCsv(const Case& cs, const SpreadSettings& s) {
  const SampleDraws draws(cs.tolerances, s.method, s.seed, s.samples);
  std::string out = "sample";
  for (const Tolerance& t : cs.tolerances.items) out += fmt::format(",{} [{}]", t.name, SiUnitName(t.dim));
  out += "\n";
  uint64_t b0 = 0, b1 = 0;
  ShardBlocks(s.samples, s.shard, s.shards, &b0, &b1);
  std::vector<double> x;
  for (uint64_t i = b0 * kSpreadBlock; i < std::min(s.samples, b1 * kSpreadBlock); ++i) {
    draws.Draw(i, &x);
    out += std::to_string(i);
    for (double v : x) out += fmt::format(",{:.17g}", v);
    out += "\n";
  }
  return out;
}

}  // namespace loopwright
