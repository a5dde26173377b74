#include "network/point/coupled_newton.h"

#include <algorithm>
#include <cmath>

#include <Eigen/Dense>

#include "network/point/run.h"

namespace loopwright {

namespace {

// The flow scale of the smooth upwind weights, as ThermalSystem::Solve sets
// it from the flows of u.
void FollowFlowScale(CaseSolver* s, const Eigen::VectorXd& u) {
  double mmax = 0;
  for (const Branch& b : s->sys.branches()) mmax = std::max(mmax, std::abs(u[b.m]));
  s->thermal->SetFlowScale(std::max(1e-12, 1e-9 * mmax));
}

// R(u, T) of the module comment into *r (hydraulic rows, then energy rows):
// every branch's fluid and every valve element follow T (nothing held).
void CoupledResidual(CaseSolver* s, const Eigen::VectorXd& u, const std::vector<double>& T, Eigen::VectorXd* ru,
                     Eigen::VectorXd* rt, Eigen::VectorXd* r) {
  FollowFlowScale(s, u);
  s->thermal->ApplyBranchFluids(T, u, &s->sys);
  s->sys.Residuals(u, ru);
  s->thermal->Residuals(u, T, rt, nullptr);
  r->resize(ru->size() + rt->size());
  r->head(ru->size()) = *ru;
  r->tail(rt->size()) = *rt;
}

// Typical sizes of the unknowns at the answer (u, T): each value, floored
// at 1e-3 of the largest of its kind (pressures, flows, internal unknowns)
// and at 1 Pa, 1e-12 kg/s, 1e-12; temperatures their value in K.
Eigen::VectorXd TypicalSizes(const NetworkSystem& sys, const Eigen::VectorXd& u, const std::vector<double>& T,
                             const std::vector<int>& t_nodes) {
  const int nu = static_cast<int>(u.size()), nt = static_cast<int>(t_nodes.size());
  std::vector<int> kind(nu, 2);  // 0 pressure, 1 flow, 2 internal
  for (const NodeRef& nr : sys.nodes())
    if (nr.unknown >= 0) kind[nr.unknown] = 0;
  for (const Branch& b : sys.branches()) kind[b.m] = 1;
  double big[3] = {1.0, 1e-12, 1e-12};
  for (int i = 0; i < nu; ++i) big[kind[i]] = std::max(big[kind[i]], std::abs(u[i]));
  Eigen::VectorXd typ(nu + nt);
  for (int i = 0; i < nu; ++i) typ[i] = std::max(std::abs(u[i]), 1e-3 * big[kind[i]]);
  for (int i = 0; i < nt; ++i) typ[nu + i] = std::max(std::abs(T[t_nodes[i]]), 1.0);
  return typ;
}

// Row, then column equilibration of k (each scaled by the reciprocal of its
// largest magnitude); false when a row or column is all zeros.
bool Equilibrate(Eigen::MatrixXd* k, Eigen::VectorXd* row, Eigen::VectorXd* col) {
  const Eigen::Index n = k->rows();
  row->resize(n);
  col->resize(n);
  for (Eigen::Index i = 0; i < n; ++i) {
    const double m = k->row(i).cwiseAbs().maxCoeff();
    if (!(m > 0) || !std::isfinite(m)) return false;
    (*row)[i] = 1.0 / m;
    k->row(i) *= (*row)[i];
  }
  for (Eigen::Index j = 0; j < n; ++j) {
    const double m = k->col(j).cwiseAbs().maxCoeff();
    if (!(m > 0)) return false;
    (*col)[j] = 1.0 / m;
    k->col(j) *= (*col)[j];
  }
  return true;
}

}  // namespace

bool CoupledJacobianAt(CaseSolver* s, CoupledJacobian* layout, Eigen::MatrixXd* K) {
  CoupledJacobian& k = *layout;
  if (!s->thermal || s->thermal->heat_scale() != 1.0 || s->T.size() != s->sys.nodes().size() ||
      s->u.size() != s->sys.NumUnknowns()) {
    k.message = "no thermal state to linearise about";
    return false;
  }
  const Eigen::VectorXd u0 = s->u;
  const std::vector<double> T0 = s->T;
  const double m_scale0 = s->thermal->flow_scale();
  s->thermal->ReleaseSensed();
  if (k.t_nodes.empty() && k.nu == 0) {
    k.nu = s->sys.NumUnknowns();
    k.nt = s->thermal->NumUnknowns();
    for (size_t g = 0; g < s->sys.nodes().size(); ++g)
      if (s->thermal->UnknownOf(static_cast<int>(g)) >= 0) k.t_nodes.push_back(static_cast<int>(g));
    k.typical = TypicalSizes(s->sys, u0, T0, k.t_nodes);
  }
  const int n = k.nu + k.nt;
  K->resize(n, n);
  Eigen::VectorXd ru, rt, rp, rm;
  Eigen::VectorXd u = u0;
  std::vector<double> T = T0;
  for (int j = 0; j < n; ++j) {  // central differences, column by column
    const double h = 1e-6 * k.typical[j];
    double& x = j < k.nu ? u[j] : T[k.t_nodes[j - k.nu]];
    const double x0 = x;
    x = x0 + h;
    CoupledResidual(s, u, T, &ru, &rt, &rp);
    x = x0 - h;
    CoupledResidual(s, u, T, &ru, &rt, &rm);
    x = x0;
    K->col(j) = (rp - rm) / (2 * h);
  }
  // The solver's state as it was.
  s->thermal->ApplyBranchFluids(T0, u0, &s->sys);
  s->thermal->SetFlowScale(m_scale0);
  if (!K->allFinite()) {
    k.message = "the coupled Jacobian is not finite at the state";
    return false;
  }
  return true;
}

bool CoupledJacobian::Factor(Eigen::MatrixXd K) {
  ok = false;
  if (!Equilibrate(&K, &row_scale, &col_scale)) {
    message = "the coupled Jacobian has an empty row or column";
    return false;
  }
  lu_.compute(K);
  if (!(lu_.rcond() > 1e-14)) {
    message = "the coupled Jacobian is singular";
    return false;
  }
  ok = true;
  return ok;
}

void CoupledJacobian::Step(const Eigen::VectorXd& r, Eigen::VectorXd* dz) const {
  y0_ = lu_.solve(row_scale.cwiseProduct(r));
  if (delta.size() > 0) {
    y1_ = lu_.solve(delta * y0_);
    y0_ -= y1_;
    y0_ += lu_.solve(delta * y1_);
  }
  *dz = col_scale.cwiseProduct(y0_);
}

std::shared_ptr<const CoupledJacobian> BuildCoupledJacobian(CaseSolver* s) {
  auto out = std::make_shared<CoupledJacobian>();
  Eigen::MatrixXd K;
  if (!s->has_answer) out->message = "no converged answer to linearise about";
  else if (CoupledJacobianAt(s, out.get(), &K)) out->Factor(std::move(K));
  return out;
}

namespace {

// Whether the error left after a step of `size` (in the stopping sizes of
// CoupledChord) is below 1, judged by the contraction rate q = size / last
// of the last two steps: for a linearly converging iteration the error left
// is at most q / (1 - q) times the last step (e.g. Kelley 1995, section 5.4,
// from memory), here with q doubled as a margin for a rate still settling,
// and only once the rate is below 1/4.
bool SettledByRate(double size, double last) {
  if (!std::isfinite(last)) return false;
  const double q = 2.0 * size / last;
  return q < 0.25 && q / (1.0 - q) * size <= 1.0;
}

}  // namespace

bool CoupledChord(CaseSolver* s, const CoupledJacobian& k, double t_step_k, int* steps) {
  *steps = 0;
  if (!k.ok || s->u.size() != k.nu || s->T.size() != s->sys.nodes().size()) return false;
  Eigen::VectorXd& u = s->u;
  std::vector<double>& T = s->T;
  // Fixed temperatures of the point applied now.
  std::vector<double> t_init;
  s->thermal->InitialTemperatures(*s->applied, &t_init);
  for (size_t g = 0; g < T.size(); ++g)
    if (s->thermal->UnknownOf(static_cast<int>(g)) < 0) T[g] = t_init[g];
  s->thermal->ReleaseSensed();
  constexpr double kRelativeStep = 1e-11;
  constexpr int kMaxSteps = 30;
  Eigen::VectorXd ru, rt, r, step;
  double last = INFINITY;
  for (int it = 0; it < kMaxSteps; ++it) {
    CoupledResidual(s, u, T, &ru, &rt, &r);
    if (!r.allFinite()) return false;
    k.Step(r, &step);
    if (!step.allFinite()) return false;
    double size_u = 0, size_t_ = 0;
    for (int i = 0; i < k.nu; ++i) {
      const double d = -step[i];
      u[i] += d;
      size_u = std::max(size_u, std::abs(d) / k.typical[i]);
    }
    for (int i = 0; i < k.nt; ++i) {
      const double d = -step[k.nu + i];
      T[k.t_nodes[i]] += d;
      size_t_ = std::max(size_t_, std::abs(d));
    }
    *steps = it + 1;
    // The step against the stopping sizes: settled at 1, and it must shrink.
    const double size = std::max(size_u / kRelativeStep, size_t_ / t_step_k);
    if (size <= 1.0 || SettledByRate(size, last)) return true;
    if (!(size < last)) return false;
    last = size;
  }
  return false;
}

// The chord's answer accepted by one nested pass (module comment), with the
// free sensed temperatures held at the answer's as the thermostat search
// holds them; false, with the start restored, when it is not.
bool CaseSolver::SolveNear(const OperatingPoint& op, PointResult* out) {
  const Eigen::VectorXd u0 = u;
  const std::vector<double> t0 = T;
  std::vector<int> held;
  for (const SensorSite& site : sensors)
    if (thermal->UnknownOf(site.node) >= 0) held.push_back(site.node);
  // The passes' tolerance at an answer: the search's at a thermostat.
  const double keep = passes_tolerance_k;
  const double tol = held.empty() ? passes_tolerance_k : 0.5 * settle_k;
  int steps = 0;
  bool ok = CoupledChord(this, *coupled, 1e-2 * tol, &steps);
  if (ok) {
    for (int g : held) thermal->HoldSensed(g, T[g]);
    passes_tolerance_k = tol;
    collect_answers = false;
    *out = SolvePasses(op, true);
    collect_answers = true;
    passes_tolerance_k = keep;
    for (int g : held) ok = ok && std::abs(T[g] - thermal->held(g)) <= settle_k;
    ok = ok && out->converged;
    if (ok) CollectAnswer(op, out);
    thermal->ReleaseSensed();
    ok = ok && out->converged;
  }
  if (!ok) {
    u = u0, T = t0, has_answer = true;
    return false;
  }
  ++near_points;
  near_steps += steps;
  return true;
}

}  // namespace loopwright
