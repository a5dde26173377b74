#include "network/tolerance/spread.h"

#include <algorithm>
#include <atomic>
#include <chrono>
#include <cmath>
#include <thread>

#include <fmt/format.h>

#include "network/envelope/checks.h"
#include "network/envelope/results.h"
#include "network/point/run.h"
#include "network/tolerance/nominal.h"
#include "network/tolerance/shard.h"

namespace loopwright {

using nlohmann::json;

namespace {

const char* MethodName(SampleMethod m) { return m == SampleMethod::kLatinHypercube ? "lhs" : "mc"; }

json ToleranceJson(const Tolerance& t) {
  return {{"name", t.name}, {"distribution", DistributionNames()[static_cast<int>(t.dist)]},
          {"unit", SiUnitName(t.dim)}, {"nominal", t.nominal}, {"mean", t.Mean()}, {"sd", t.StdDev()},
          {"a", t.a}, {"b", t.b}, {"c", t.c}};
}

// The first-order estimate of one check (module comment of spread.h).
json FirstOrder(const Case& cs, const CheckKey& k) {
  const ToleranceSet& set = cs.tolerances;
  const size_t n = set.size();
  if (!k.slope_message.empty() || k.slopes.size() != n) return {{"available", false}, {"note", k.slope_message}};
  for (double g : k.slopes)
    if (!std::isfinite(g)) return {{"available", false}, {"note", "a slope could not be computed at the governing point"}};
  double mean = k.margin, var = 0;
  std::vector<double> part(n, 0.0);
  for (size_t i = 0; i < n; ++i) {
    const Tolerance& ti = set.items[i];
    mean += k.slopes[i] * (ti.Mean() - ti.nominal);
    for (size_t j = 0; j < n; ++j)
      part[i] += k.slopes[i] * set.Correlation(i, j) * ti.StdDev() * set.items[j].StdDev() * k.slopes[j];
    var += part[i];
  }
  const double sd = std::sqrt(std::max(var, 0.0));
  const double pf = sd > 0 ? NormalCdf(-mean / sd) : (mean < 0 ? 1.0 : 0.0);
  std::vector<size_t> order(n);
  for (size_t i = 0; i < n; ++i) order[i] = i;
  std::stable_sort(order.begin(), order.end(), [&](size_t a, size_t b) { return std::abs(part[a]) > std::abs(part[b]); });
  json contributors = json::array();
  for (size_t i : order)
    contributors.push_back({{"tolerance", set.items[i].name}, {"slope", k.slopes[i]},
                            {"share", var > 0 ? part[i] / var : 0.0}});
  return {{"available", true}, {"mean", mean}, {"sd", sd}, {"probability", pf}, {"contributors", contributors}};
}

json SettingsJson(const SpreadSettings& s) {
  const char* start = s.start == SampleStart::kTangent ? "tangent" : s.start == SampleStart::kNominal ? "nominal" : "cold";
  return {{"samples", s.samples}, {"method", MethodName(s.method)}, {"seed", s.seed}, {"start", start},
          {"settle_k", s.settle_k}};
}

}  // namespace

json SpreadHeader(const Case& cs, const SpreadSettings& s, std::string* error) {
  if (cs.tolerances.empty()) {
    *error = "the case has no \"tolerances\": give at least one parameter a distribution (README, \"Tolerances\")";
    return {};
  }
  NominalEnvelope env = SolveNominal(cs, true, false, s.threads);
  if (!env.ok) {
    *error = env.error;
    return {};
  }
  json h = {{"case", cs.name}, {"settings", SettingsJson(s)}};
  json tols = json::array();
  for (const Tolerance& t : cs.tolerances.items) tols.push_back(ToleranceJson(t));
  h["tolerances"] = tols;
  h["correlation"] = cs.tolerances.correlation;
  h["cholesky"] = cs.tolerances.cholesky;
  json points = json::array();
  for (const OperatingPoint& op : cs.envelope.points) points.push_back(op.name);
  h["points"] = points;
  json checks = json::array();
  for (const CheckKey& k : env.keys)
    checks.push_back({{"name", k.name}, {"where", k.where}, {"unit", SiUnitName(k.dim)},
                      {"dimension", DimensionName(k.dim)}, {"limit", k.limit},
                      {"nominal_margin", k.margin}, {"point", k.point}, {"first_order", FirstOrder(cs, k)}});
  h["checks"] = checks;
  return h;
}

void ShardBlocks(uint64_t samples, int shard, int shards, uint64_t* first_block, uint64_t* end_block) {
  ShardRange(samples, kSpreadBlock, shard, shards, first_block, end_block);
}

void WilsonInterval(uint64_t k, uint64_t n, double z, double* lo, double* hi) {
  if (n == 0) {
    *lo = 0;
    *hi = 1;
    return;
  }
  const double nn = static_cast<double>(n), p = static_cast<double>(k) / nn, z2 = z * z;
  const double centre = (p + z2 / (2 * nn)) / (1 + z2 / nn);
  const double half = z / (1 + z2 / nn) * std::sqrt(p * (1 - p) / nn + z2 / (4 * nn * nn));
  *lo = k == 0 ? 0.0 : std::max(0.0, centre - half);
  *hi = k == n ? 1.0 : std::min(1.0, centre + half);
}

namespace {

// Per thread: a solver, the draws and work space.
struct SampleRunner {
  const Case& cs;
  const NominalEnvelope& env;
  const SampleDraws& draws;
  const SpreadSettings& s;
  CaseSolver solver;
  std::vector<double> x, dx, margin;
  std::vector<int> governing;
  std::vector<CheckWarning> warn;

  SampleRunner(const Case& c, const NominalEnvelope& e, const SampleDraws& d, const SpreadSettings& st)
      : cs(c), env(e), draws(d), s(st), solver(c) {
    solver.settle_k = s.settle_k;
    solver.passes_tolerance_k = 0.5 * s.settle_k;
    solver.sys.set_for_checks_only(true);  // a sample's answer goes to the checks only
  }

  // Why the drawn values cannot be solved ("" when they can).
  std::string Invalid() const {
    const ToleranceSet& set = cs.tolerances;
    for (size_t i = 0; i < set.size(); ++i)
      if (!set.items[i].Accepts(x[i]))
        return fmt::format("drawn {} = {:.6g} (SI) lies outside what the parameter accepts", set.items[i].name, x[i]);
    for (const DesignOverrides::Oil& o : solver.overrides.oils) {
      const FluidBinding& fb = cs.fluid_bindings[o.binding];
      for (const OperatingPoint& op : cs.envelope.points) {
        double k40 = op.ValueOr(fb.kv40_var, fb.kv40), k100 = op.ValueOr(fb.kv100_var, fb.kv100);
        for (const DesignOverrides::Oil& q : solver.overrides.oils)
          if (q.binding == o.binding) (q.anchor == 0 ? k40 : k100) = q.kv;
        if (!(k100 > 0 && k100 < k40))
          return fmt::format("drawn viscosities of \"{}\" make no oil at \"{}\" (KV100 {:.4g} cSt not below KV40 "
                             "{:.4g} cSt)", fb.fluid_id, op.name, k100 * 1e6, k40 * 1e6);
      }
    }
    return "";
  }

  void SetOverrides() {
    solver.overrides = DesignOverrides{};
    const ToleranceSet& set = cs.tolerances;
    dx.resize(set.size());
    for (size_t i = 0; i < set.size(); ++i) {
      const Tolerance& t = set.items[i];
      dx[i] = x[i] - t.nominal;
      if (t.fluid >= 0) solver.overrides.SetOil(t.fluid, t.anchor, x[i]);
      else if (t.coupling >= 0) solver.overrides.SetCoupling(t.coupling, x[i]);
      else solver.overrides.SetParam(t.loop, t.comp, t.param, x[i]);
    }
  }

  // Per point: the coupled Jacobian at the sample's deviations
  // (CoupledModel), rebuilt for every sample.
  std::vector<std::shared_ptr<CoupledJacobian>> near;

  std::shared_ptr<const CoupledJacobian> NearJacobian(size_t p) {
    const CoupledModel* m = env.points[p].coupled.get();
    if (!m) return nullptr;
    near.resize(env.points.size());
    if (!near[p]) near[p] = std::make_shared<CoupledJacobian>(m->k0);
    Eigen::MatrixXd& d = near[p]->delta;
    d.setZero(m->k0.nu + m->k0.nt, m->k0.nu + m->k0.nt);
    for (size_t i = 0; i < dx.size() && i < m->dK.size(); ++i)
      if (m->dK[i].size() > 0) d += dx[i] * m->dK[i];
    return near[p];
  }

  // The start of point p: the nominal answer moved along the tangents.
  void Predict(size_t p) {
    const NominalPoint& np = env.points[p];
    solver.u = np.u;
    solver.T = np.T;
    solver.sensed_slopes = np.sensed_slopes;
    solver.coupled = NearJacobian(p);
    if (s.start == SampleStart::kTangent)
      for (size_t i = 0; i < dx.size(); ++i) {
        if (np.du[i].size() == solver.u.size()) solver.u += dx[i] * np.du[i];
        if (np.dT[i].size() == solver.T.size())
          for (size_t g = 0; g < solver.T.size(); ++g) solver.T[g] += dx[i] * np.dT[i][g];
      }
    solver.has_answer = true;
  }

  // The least margin of every check over the points; false (with the
  // point and cause in *why) when a point has no result.
  uint64_t passes = 0, retries = 0;

  bool Solve(json* why) {
    margin.assign(env.keys.size(), INFINITY);
    governing.assign(env.keys.size(), -1);
    for (size_t p = 0; p < env.points.size(); ++p) {
      const OperatingPoint& op = cs.envelope.points[p];
      PointResult r;
      if (s.start != SampleStart::kCold) {
        Predict(p);
        r = solver.Solve(op, true);
      }
      passes += r.coupling_iterations;
      if (!r.converged) {
        if (s.start != SampleStart::kCold) ++retries;
        solver.coupled = nullptr;
        r = solver.Solve(op, false);
        passes += r.coupling_iterations;
      }
      if (!r.converged) {
        *why = {{"point", op.name}, {"cause", r.summary.Report()}};
        return false;
      }
      warn.clear();
      const std::vector<CheckOutcome> outs = EvaluateChecks(cs, op, r, &warn);
      Record(p, outs);
    }
    return true;
  }

  void Record(size_t p, const std::vector<CheckOutcome>& outs) {
    const NominalPoint& np = env.points[p];
    for (size_t k = 0; k < outs.size(); ++k) {
      int key = k < np.key_of.size() && env.keys[np.key_of[k]].name == outs[k].name() &&
                        env.keys[np.key_of[k]].where == outs[k].where
                    ? np.key_of[k]
                    : -1;
      for (size_t j = 0; key < 0 && j < env.keys.size(); ++j)
        if (env.keys[j].name == outs[k].name() && env.keys[j].where == outs[k].where) key = static_cast<int>(j);
      if (key >= 0 && outs[k].margin < margin[key]) {
        margin[key] = outs[k].margin;
        governing[key] = static_cast<int>(p);
      }
    }
  }

  std::vector<double>* margins_out = nullptr;  // RunSpreadBlocks' `margins`, from sample margins_first
  uint64_t margins_first = 0;

  void RunBlock(SpreadBlock* b) {
    b->checks.assign(env.keys.size(), CheckBlock{});
    for (CheckBlock& c : b->checks) c.governing.assign(env.points.size(), 0);
    passes = retries = 0;
    const uint64_t near0 = solver.near_points, steps0 = solver.near_steps;
    for (uint64_t s_i = b->first; s_i < b->first + b->count; ++s_i) {
      draws.Draw(s_i, &x);
      SetOverrides();
      std::string bad = Invalid();
      json why;
      if (!bad.empty()) why = {{"point", ""}, {"cause", bad}};
      if (bad.empty() && Solve(&why)) {
        if (margins_out) std::copy(margin.begin(), margin.end(), margins_out->begin() + (s_i - margins_first) * margin.size());
        for (size_t j = 0; j < env.keys.size(); ++j) {
          if (!std::isfinite(margin[j])) continue;
          CheckBlock& c = b->checks[j];
          const double d = margin[j] - env.keys[j].margin;
          ++c.solved;
          c.failures += margin[j] < 0;
          c.sum += d;
          c.sumsq += d * d;
          c.governing[governing[j]] += 1;
          KeepWorst(&c.worst, {margin[j], s_i});
        }
        continue;
      }
      ++b->unsolved;
      if (b->unsolved_samples.size() < 4) {
        why["sample"] = s_i;
        b->unsolved_samples.push_back(why);
      }
    }
    b->passes = passes;
    b->retries = retries;
    b->near_points = solver.near_points - near0;
    b->near_steps = solver.near_steps - steps0;
  }

  static void KeepWorst(std::vector<std::pair<double, uint64_t>>* w, std::pair<double, uint64_t> e) {
    w->insert(std::upper_bound(w->begin(), w->end(), e), e);
    if (w->size() > kWorstSamples) w->pop_back();
  }
};

}  // namespace

std::vector<SpreadBlock> RunSpreadBlocks(const Case& cs, const json& header, const SpreadSettings& s,
                                         const std::function<void(uint64_t, uint64_t)>& progress,
                                         std::vector<double>* margins) {
  (void)header;
  const NominalEnvelope env = SolveNominal(cs, false, s.coupled_newton && s.start != SampleStart::kCold, s.threads);
  const SampleDraws draws(cs.tolerances, s.method, s.seed, s.samples);
  uint64_t b0 = 0, b1 = 0;
  ShardBlocks(s.samples, s.shard, s.shards, &b0, &b1);
  std::vector<SpreadBlock> blocks(b1 - b0);
  uint64_t total = 0;
  for (uint64_t b = b0; b < b1; ++b) {
    SpreadBlock& blk = blocks[b - b0];
    blk.index = b;
    blk.first = b * kSpreadBlock;
    blk.count = std::min(s.samples, (b + 1) * kSpreadBlock) - blk.first;
    total += blk.count;
  }
  if (margins) margins->assign(total * env.keys.size(), NAN);
  std::atomic<size_t> next{0};
  std::atomic<uint64_t> done{0};
  auto work = [&]() {
    SampleRunner runner(cs, env, draws, s);
    runner.margins_out = margins;
    runner.margins_first = blocks.empty() ? 0 : blocks[0].first;
    for (size_t i = next++; i < blocks.size(); i = next++) {
      runner.RunBlock(&blocks[i]);
      done += blocks[i].count;
    }
  };
  const int threads = std::max(1, std::min<int>(s.threads, static_cast<int>(blocks.size())));
  std::vector<std::thread> pool;
  for (int t = 0; t < threads; ++t) pool.emplace_back(work);
  while (progress && done.load() < total) {
    progress(done.load(), total);
    std::this_thread::sleep_for(std::chrono::milliseconds(250));
  }
  for (auto& th : pool) th.join();
  if (progress) progress(total, total);
  return blocks;
}

}  // namespace loopwright
