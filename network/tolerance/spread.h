// A tolerance study ("spread"): how likely each envelope check is to fail
// when the case's parameters scatter within their tolerances
// (network/case/tolerances.h), by two estimates.
//
// 1. First order (first-order second-moment, FOSM): at each check's
//    governing point of the nominal envelope, the exact sensitivities
//    g_i = d margin / d x_i (network/envelope/sensitivity.h) give
//      mean  = m0 + sum_i g_i (E[x_i] - x0_i)
//      var   = sum_ij g_i g_j rho_ij sd_i sd_j
//      P(fail) = Phi(-mean / sd)   (the margin taken as normal)
//    and the share of tolerance i in the variance, g_i sum_j rho_ij sd_i sd_j g_j / var
//    (the shares add up to 1; a negative one lowers the variance through a
//    correlation). JCGM 100:2008 (GUM) 5.1-5.2, the law of propagation of
//    uncertainty, from memory.
// 2. Sampling (JCGM 101:2008, Monte Carlo; or a Latin hypercube): every
//    sample is solved at every envelope point, started from the nominal
//    answer moved along the tangent, u0 = u_nom + sum_i du/dx_i (x_i - x0_i)
//    (retried cold when that fails), and each check's margin is its least
//    over the points. Per check: the failures over the solved samples, the
//    probability with its 95 % Wilson score interval (Wilson, JASA 22
//    (1927) 209; Agresti & Coull, Am. Stat. 52 (1998) 119), the mean and
//    standard deviation of the margin, the worst samples and how often each
//    point governed. The first-order estimate is flagged unreliable when
//    its probability lies outside the sampled 99.9 % Wilson interval.
//
// Determinism: each sample's values come from its global index
// (network/tolerance/draws.h) and its solve starts from the nominal answer,
// never from another sample, so a sample's result does not depend on the
// thread that solved it. Samples are gathered in blocks of kSpreadBlock
// consecutive indices; a block's sums run in index order, and the totals
// add the blocks in index order. A shard K/N runs a contiguous range of
// whole blocks, so N partial results merged give the unsharded sums, bit
// for bit.
#pragma once

#include <cstdint>
#include <functional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "network/case/case.h"
#include "network/tolerance/draws.h"

namespace loopwright {

inline constexpr uint64_t kSpreadBlock = 256;
inline constexpr size_t kWorstSamples = 5;

// How each sample's points start: the nominal answer moved along the
// tangents (the default), the nominal answer itself, or a cold start from
// the case alone (the reference of the benchmark: plain re-solves).
enum class SampleStart { kTangent, kNominal, kCold };

struct SpreadSettings {
  uint64_t samples = 1000;
  SampleMethod method = SampleMethod::kLatinHypercube;
  uint64_t seed = 1;
  int threads = 1;
  int shard = 0, shards = 1;  // 0-based shard of `shards`
  SampleStart start = SampleStart::kTangent;
  // The thermostat search's acceptance at every sampled point [K]
  // (CaseSolver::settle_k; the nominal envelope keeps 2e-9 K): a sample's
  // margins are only compared with zero and summed, and 1e-6 K of sensed
  // temperature moves them by far less than their resolution (README,
  // "Tolerances": the same seeds at 2e-9 K give the same failures).
  double settle_k = 1e-6;
  // Warm-started thermal points first by the coupled Newton from the
  // nominal point's coupled Jacobian (network/point/coupled_newton.h); off:
  // the nested passes only (the benchmark's comparison). Not written: both
  // give the same answers to the passes' tolerance.
  bool coupled_newton = true;
};

// What every shard computes the same way: the nominal envelope, the first-
// order estimate, the tolerances. A JSON document (round-trips exactly).
// Per check: name, where, unit, limit, nominal margin and point, first order.
nlohmann::json SpreadHeader(const Case& cs, const SpreadSettings& s, std::string* error);

// The sums of one block of samples (indices [first, first + count)).
struct CheckBlock {
  uint64_t solved = 0, failures = 0;
  double sum = 0, sumsq = 0;  // of (margin - nominal margin), in index order
  std::vector<std::pair<double, uint64_t>> worst;  // (margin, sample), ascending, at most kWorstSamples
  std::vector<uint64_t> governing;                 // per envelope point: samples it governed
};
struct SpreadBlock {
  uint64_t index = 0, first = 0, count = 0;
  uint64_t unsolved = 0;
  uint64_t passes = 0, retries = 0;  // hydraulic-thermal passes, cold retries (for the benchmark; not written)
  uint64_t near_points = 0, near_steps = 0;  // points the coupled Newton answered, its steps (likewise)
  std::vector<nlohmann::json> unsolved_samples;  // the first few: sample, point, cause
  std::vector<CheckBlock> checks;                // in the header's order
};

// Solves this shard's blocks of samples (threads take whole blocks).
// `progress`, if set, gets the number of samples done (calling thread).
// With `margins`, every sample's least margin of every check too (sample
// major: this shard's samples in index order, header's checks; NaN for a
// sample without a result): the report's histograms and --margins-csv.
std::vector<SpreadBlock> RunSpreadBlocks(const Case& cs, const nlohmann::json& header, const SpreadSettings& s,
                                         const std::function<void(uint64_t, uint64_t)>& progress = {},
                                         std::vector<double>* margins = nullptr);

// The partial-result document of a shard, and the merge of several (each
// block exactly once) into the final result. MergeParts returns false with
// *error when the parts do not belong together or do not cover the study.
nlohmann::json SpreadPart(const nlohmann::json& header, const SpreadSettings& s, const std::vector<SpreadBlock>& blocks);
// `names` (the files, in the order of `parts`) name a part in *error.
bool MergeParts(const std::vector<nlohmann::json>& parts, nlohmann::json* result, std::string* error,
                const std::vector<std::string>& names = {});
// The kind of a spread partial result (its member "kind").
inline constexpr const char* kSpreadPartKind = "loopwright-spread-part";

// The first shard of `shards` that holds block b, and the blocks of a shard.
void ShardBlocks(uint64_t samples, int shard, int shards, uint64_t* first_block, uint64_t* end_block);

// The Wilson score interval of k successes in n trials at normal quantile z.
void WilsonInterval(uint64_t k, uint64_t n, double z, double* lo, double* hi);

// The draws of every sample (for --samples-csv): index, then the values.
std::string SamplesCsv(const Case& cs, const SpreadSettings& s);

}  // namespace loopwright
