#include "network/tolerance/nominal.h"

#include <algorithm>
#include <atomic>
#include <cmath>
#include <map>
#include <thread>

#include <fmt/format.h>

#include "network/point/run.h"

namespace loopwright {

DesignKnob ToleranceKnob(const Tolerance& t) {
  DesignKnob k;
  k.loop = t.loop;
  k.comp = t.comp;
  k.param = t.param;
  k.coupling = t.coupling;
  k.fluid = t.fluid;
  k.anchor = t.anchor;
  k.name = t.name;
  k.dim = t.dim;
  return k;
}

namespace {

// The (check, place) keys of every point, the governing point of each.
void CollectKeys(NominalEnvelope* env) {
  std::map<std::pair<std::string, std::string>, int> index;
  for (size_t p = 0; p < env->points.size(); ++p) {
    NominalPoint& np = env->points[p];
    np.key_of.clear();
    for (const CheckOutcome& o : np.checks) {
      auto [it, added] = index.emplace(std::make_pair(o.name(), o.where), static_cast<int>(env->keys.size()));
      if (added) {
        CheckKey k;
        k.name = o.name();
        k.where = o.where;
        k.dim = o.dim;
        k.limit = o.limit;
        k.margin = o.margin;
        k.point = static_cast<int>(p);
        env->keys.push_back(k);
      } else if (o.margin < env->keys[it->second].margin) {
        env->keys[it->second].margin = o.margin;
        env->keys[it->second].limit = o.limit;
        env->keys[it->second].point = static_cast<int>(p);
      }
      np.key_of.push_back(it->second);
    }
  }
}

// Tangents of point p (solved in `solver`) to every tolerance, and the
// slopes of the checks it governs.
void PointSlopes(const Case& cs, size_t p, CaseSolver* solver, bool slopes, NominalEnvelope* env) {
  const OperatingPoint& op = cs.envelope.points[p];
  NominalPoint& np = env->points[p];
  const size_t n = cs.tolerances.size();
  np.du.assign(n, Eigen::VectorXd());
  np.dT.assign(n, {});
  for (CheckKey& k : env->keys)
    if (k.point == static_cast<int>(p)) k.slopes.assign(n, NAN);
  PointTangents pt(solver, op);
  if (!pt.ok()) {
    np.tangent_message = pt.message();
    for (CheckKey& k : env->keys)
      if (k.point == static_cast<int>(p)) k.slope_message = "no tangent at the governing point: " + pt.message();
    return;
  }
  for (size_t i = 0; i < n; ++i) {
    const DesignKnob knob = ToleranceKnob(cs.tolerances.items[i]);
    StateTangent t = pt.Tangent(knob);
    if (!t.ok) {
      np.tangent_message = fmt::format("{}: {}", knob.name, t.message);
      for (CheckKey& k : env->keys)
        if (k.point == static_cast<int>(p) && k.slope_message.empty())
          k.slope_message = fmt::format("no tangent in {} at the governing point: {}", knob.name, t.message);
      continue;
    }
    np.du[i] = t.du;
    np.dT[i] = t.dT;
    if (!slopes) continue;
    for (CheckKey& k : env->keys)
      if (k.point == static_cast<int>(p))
        k.slopes[i] = pt.Derivative(knob, t, [&](const PointResult& r) { return CheckMargin(cs, op, r, k.name, k.where); });
  }
}

// The CoupledModel of thermal point p (solved in `solver`, its tangents in
// env); none when K0 cannot be built.
void PointCoupled(const Case& cs, size_t p, CaseSolver* solver, NominalEnvelope* env) {
  NominalPoint& np = env->points[p];
  auto m = std::make_shared<CoupledModel>();
  Eigen::MatrixXd K0;
  if (!CoupledJacobianAt(solver, &m->k0, &K0) || !m->k0.Factor(K0)) return;
  const Eigen::VectorXd u0 = solver->u;
  const std::vector<double> T0 = solver->T;
  const size_t n = cs.tolerances.size();
  m->dK.assign(n, Eigen::MatrixXd());
  Eigen::MatrixXd k[2];
  for (size_t i = 0; i < n; ++i) {
    const DesignKnob knob = ToleranceKnob(cs.tolerances.items[i]);
    const double th0 = KnobValue(solver, knob);
    if (np.du[i].size() != u0.size() || np.dT[i].size() != T0.size() || std::isnan(th0)) continue;
    const double h = 1e-4 * (th0 != 0 ? std::abs(th0) : 1.0);
    bool ok = true;
    for (int side = 0; side < 2; ++side) {
      const double sh = side == 0 ? h : -h;
      SetKnobValue(solver, knob, th0 + sh);
      solver->u = u0 + sh * np.du[i];
      for (size_t g = 0; g < T0.size(); ++g) solver->T[g] = T0[g] + sh * np.dT[i][g];
      ok = CoupledJacobianAt(solver, &m->k0, &k[side]) && ok;
    }
    SetKnobValue(solver, knob, th0);
    solver->u = u0;
    solver->T = T0;
    if (ok) m->dK[i] = m->k0.row_scale.asDiagonal() * ((k[0] - k[1]) / (2 * h)) * m->k0.col_scale.asDiagonal();
  }
  solver->thermal->ApplyBranchFluids(T0, u0, &solver->sys);
  np.coupled = m;
}

}  // namespace

NominalEnvelope SolveNominal(const Case& cs, bool slopes, bool coupled, int threads) {
  NominalEnvelope env;
  const size_t np = cs.envelope.points.size();
  env.points.resize(np);
  CaseSolver solver(cs);
  std::vector<CheckWarning> warn;
  for (size_t p = 0; p < np; ++p) {
    const OperatingPoint& op = cs.envelope.points[p];
    PointResult r = solver.Solve(op, false);
    if (!r.converged) {
      env.error = fmt::format("the nominal point \"{}\" has no result ({}): a tolerance study needs the whole nominal "
                              "envelope; run `check` for its cause", op.name, r.summary.Report());
      return env;
    }
    env.points[p].checks = EvaluateChecks(cs, op, r, &warn);
    env.points[p].u = solver.u;
    env.points[p].T = solver.T;
    env.points[p].sensed_slopes = solver.sensed_slopes_found;
  }
  CollectKeys(&env);
  // Each point's tangents and coupled model in a fresh solver (the same cold
  // solve again, for its tangents), so a point's numbers do not depend on
  // which thread took it nor on the points before it; points run on up to
  // `threads` threads (they write only their own NominalPoint and the keys
  // they govern).
  std::atomic<size_t> next{0};
  auto work = [&] {
    for (size_t p = next++; p < np; p = next++) {
      CaseSolver own(cs);
      own.Solve(cs.envelope.points[p], false);
      PointSlopes(cs, p, &own, slopes, &env);
      if (coupled && own.IsThermal(cs.envelope.points[p])) PointCoupled(cs, p, &own, &env);
    }
  };
  std::vector<std::thread> pool;
  for (int t = 1; t < std::min<int>(threads, static_cast<int>(np)); ++t) pool.emplace_back(work);
  work();
  for (std::thread& t : pool) t.join();
  env.ok = true;
  return env;
}

}  // namespace loopwright
