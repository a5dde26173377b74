#include "network/point/solver.h"

#include <new>

#include <ceres/ceres.h>

#include "network/point/ceres_options.h"

#include <algorithm>
#include <cmath>
#include <numeric>

#include <fmt/format.h>

namespace loopwright {

const char* TerminationName(Termination t) {
  switch (t) {
    case Termination::kConverged: return "converged";
    case Termination::kSingularJacobian: return "singular Jacobian";
    case Termination::kLineSearchFailed: return "line search failed";
    case Termination::kMaxIterations: return "iteration limit reached";
    case Termination::kNonFinite: return "non-finite residual";
    case Termination::kUnphysical: return "physically impossible state";
    case Termination::kEnergyBalance: return "energy balance did not converge";
    case Termination::kCouplingNotSettled: return "hydraulic-thermal passes did not settle";
  }
  return "unknown";
}

std::string SolverSummary::Report() const {
  std::string s = fmt::format(
      "{} after {} Newton iteration(s){}{}{}; scaled merit {:.3e} -> {:.3e}; "
      "largest pressure residual {:.3e} Pa; largest flow residual {:.3g} x tolerance.",
      converged() ? "Converged"
      : termination == Termination::kUnphysical
          ? "Not a result (physically impossible state): the equations were solved"
          : fmt::format("Not converged ({})", TerminationName(termination)),
      newton_iterations,
      nodal_iterations > 0 ? fmt::format(", {} co-content Newton iteration(s)", nodal_iterations) : "",
      used_fallback ? fmt::format(" and {} Levenberg-Marquardt iteration(s)", lm_iterations) : "",
      coupling_passes > 0 ? fmt::format(" over {} hydraulic-thermal pass(es) (merit and residuals of the last)", coupling_passes)
                          : "",
      initial_merit, final_merit, max_pressure_residual_pa, max_flow_residual);
  if (!message.empty()) s += " " + message;
  if (!converged() && !worst.empty()) {
    s += worst[0].violation ? " Violation:" : " Largest residuals:";
    for (const auto& w : worst) s += fmt::format(" {} = {:.3e} {};", w.what, w.residual, w.unit);
  }
  if (!converged() && !cause.empty()) s += "\nLikely cause: " + cause;
  return s;
}

NetworkSolver::NetworkSolver(NetworkSystem* system, SolverOptions options)
    : system_(system), options_(options) {
  EnsureWork();
}

void NetworkSolver::EnsureWork() {
  const int n = system_->NumUnknowns();
  if (r_.size() == n) return;
  r_.resize(n);
  du_.resize(n);
  u_trial_.resize(n);
}

void NetworkSolver::ReleaseWork() {
  r_ = du_ = u_trial_ = dir_ = Eigen::VectorXd();
  std::vector<double>().swap(g_floor_);
  if (analyzed_) {
    lu_.~SparseLUType();
    new (&lu_) SparseLUType();
    analyzed_ = false;
  }
  system_->ReleaseWork();
}

double NetworkSolver::FlowScale(const Eigen::VectorXd& u) const {
  double q = options_.flow_floor_m3s;
  const auto& ls = system_->loop_states();
  for (const Branch& b : system_->branches()) q = std::max(q, std::abs(u[b.m]) / ls[b.loop].rho);
  return q;
}

double NetworkSolver::Merit(const Eigen::VectorXd& u, const Eigen::VectorXd& r) const { return MeritAt(r, FlowScale(u)); }

// The rows in their order: the law rows of every branch, in branch order,
// then the mass balances, in node order (NetworkSystem::NumberRows); the
// sums run in that order, so a row loop by index gives the same bits. One
// pass gives the merit, the convergence test and the finiteness test: each
// was a pass of its own per Newton trial.
template <bool kTest>
NetworkSolver::RowPass NetworkSolver::PassRows(const Eigen::VectorXd& r, double q) const {
  const auto& kinds = system_->row_kinds();
  const auto& ls = system_->loop_states();
  const auto& branches = system_->branches();
  RowPass p;
  p.q = q;
  const double flow_tol = options_.flow_rel_tolerance * q;  // LawRowTolerance of a row in m3/s
  double sum = 0, probe = 0;  // probe: 0 while every row is finite (x - x), NaN after
  for (size_t k = 0; k < branches.size(); ++k) {
    const Branch& b = branches[k];
    for (int i = b.row0; i <= b.row0 + b.nint; ++i) {
      const bool pa = kinds[i] == NetworkSystem::RowKind::kPressure;
      const double z = r[i] / (pa ? options_.pressure_scale_pa : q);
      sum += z * z;
      probe += r[i] - r[i];
      if constexpr (kTest) {
        const double a = std::abs(r[i]);
        if (pa) {
          p.max_p = std::max(p.max_p, a);
          // Within the pressure tolerance a row is met whatever its steep-law allowance.
          p.met = p.met && (a <= options_.pressure_tolerance_pa || a <= LawRowTolerance(i, static_cast<int>(k), q));
        } else {
          p.max_f = std::max(p.max_f, a / flow_tol);
        }
      }
    }
  }
  for (const NodeRef& nr : system_->nodes()) {
    if (nr.row < 0) continue;
    const double z = r[nr.row] / (q * ls[nr.loop].rho);
    sum += z * z;
    probe += r[nr.row] - r[nr.row];
    if constexpr (kTest)
      p.max_f = std::max(p.max_f, std::abs(r[nr.row]) / (options_.flow_rel_tolerance * q * ls[nr.loop].rho));
  }
  p.sum_sq = sum;
  p.finite = probe == 0;
  return p;
}

double NetworkSolver::MeritAt(const Eigen::VectorXd& r, double q) const { return 0.5 * PassRows<false>(r, q).sum_sq; }

double NetworkSolver::RowTolerance(int i, double q) const {
  const int owner = system_->RowOwner(i);
  if (owner >= 0) return LawRowTolerance(i, owner, q);
  return options_.flow_rel_tolerance * q * system_->RowDensity(i);
}

bool NetworkSolver::Converged(const Eigen::VectorXd& u, const Eigen::VectorXd& r, SolverSummary* s) const {
  return ConvergedAt(r, FlowScale(u), s);
}

bool NetworkSolver::ConvergedAt(const Eigen::VectorXd& r, double q, SolverSummary* s) const {
  const RowPass p = PassRows<true>(r, q);
  s->max_pressure_residual_pa = p.max_p;
  s->max_flow_residual = p.max_f;
  return p.Converged();
}

template <bool kJacobian, bool kTest>
NetworkSolver::RowPass NetworkSolver::EvaluateAndPass(const Eigen::VectorXd& u, Eigen::VectorXd* r) {
  double flows = 0;
  if constexpr (kJacobian) system_->ResidualsAndJacobian(u, r, &flows);
  else system_->Residuals(u, r, &flows);
  return PassRows<kTest>(*r, FlowScaleOf(flows));
}

Termination NetworkSolver::Newton(Eigen::VectorXd* u, SolverSummary* s, const RowPass* evaluated) {
  Eigen::VectorXd& x = *u;
  // The pass of r_ at x: its flow scale, merit and convergence test.
  pass_ = evaluated ? *evaluated : EvaluateAndPass<true, true>(x, &r_);
  if (!pass_.finite) return Termination::kNonFinite;
  for (int it = 0; it < options_.max_iterations; ++it) {
    s->max_pressure_residual_pa = pass_.max_p;
    s->max_flow_residual = pass_.max_f;
    if (pass_.Converged()) return Termination::kConverged;
    if (!(options_.nodal_reduction && system_->ReducedNewtonStep(r_, &du_))) {
      const auto& J = system_->jacobian();
      if (!analyzed_) {
        lu_.analyzePattern(J);
        analyzed_ = true;
      }
      lu_.factorize(J);
      if (lu_.info() != Eigen::Success) return Termination::kSingularJacobian;
      du_ = lu_.solve(r_);
      if (!du_.allFinite()) return Termination::kSingularJacobian;
      ++s->lu_steps;
    }
    // Backtracking line search on phi along -du. The full step's trial
    // also evaluates the Jacobian there (and the convergence test in the
    // same pass as the merit): most steps take it, and then the next
    // iteration needs no second evaluation at the same point. The step is
    // formed, so the trials' residuals go into r_ (x's are no longer read;
    // pass_ keeps their merit).
    const double phi = 0.5 * pass_.sum_sq;
    double alpha = 1.0;
    RowPass trial;
    bool accepted = false;
    while (alpha >= options_.min_step) {
      u_trial_ = x - alpha * du_;
      trial = alpha == 1.0 ? EvaluateAndPass<true, true>(u_trial_, &r_) : EvaluateAndPass<false, false>(u_trial_, &r_);
      const double phi_trial = 0.5 * trial.sum_sq;
      if (trial.finite && (phi_trial <= (1.0 - 2.0 * options_.armijo * alpha) * phi || phi_trial == 0.0)) {
        accepted = true;
        break;
      }
      alpha *= alpha > 0.1 ? 0.5 : 0.25;
    }
    ++s->newton_iterations;
    if (!accepted) {
      // At the noise floor a full step may not decrease phi although the
      // point is converged; take the step when it leaves the tolerances met.
      u_trial_ = x - du_;
      const RowPass full = EvaluateAndPass<true, true>(u_trial_, &r_);
      if (full.finite && full.Converged()) {
        x = u_trial_;
        pass_ = EvaluateAndPass<true, true>(x, &r_);
        s->max_pressure_residual_pa = pass_.max_p;
        s->max_flow_residual = pass_.max_f;
        return Termination::kConverged;
      }
      return Termination::kLineSearchFailed;
    }
    x.swap(u_trial_);  // u_trial_'s old values are not read again
    if (alpha == 1.0) {
      pass_ = trial;  // r_ and the Jacobian are already at x
    } else {
      // jets: residuals not always equal to the trial's to the bit
      system_->ResidualsAndJacobian(x, &r_);
      pass_ = PassRows<true>(r_, trial.q);
    }
  }
  s->max_pressure_residual_pa = pass_.max_p;
  s->max_flow_residual = pass_.max_f;
  return pass_.Converged() ? Termination::kConverged : Termination::kMaxIterations;
}

namespace {

// One component's law as a Ceres residual block, scaled.
class BranchCost : public ceres::CostFunction {
 public:
  BranchCost(const NetworkSystem* sys, int k, std::vector<int> local, std::vector<double> scale)
      : sys_(sys), k_(k), local_(std::move(local)), scale_(std::move(scale)) {
    const Branch& b = sys_->branches()[k_];
    set_num_residuals(1 + b.nint);
    for (size_t i = 0; i < local_.size(); ++i) mutable_parameter_block_sizes()->push_back(1);
  }
  bool Evaluate(double const* const* params, double* residuals, double** jacobians) const override {
    const Branch& b = sys_->branches()[k_];
    // local_ maps parameter blocks to local variable slots {0 p_from, 1 p_to, 2 m, 3.. x}.
    double vals[3 + kMaxInternal] = {0, 0, 0, 0, 0};
    for (size_t i = 0; i < local_.size(); ++i) vals[local_[i]] = params[i][0];
    double J[(1 + kMaxInternal) * (3 + kMaxInternal)];
    sys_->EvaluateBranch(k_, vals, residuals, jacobians ? J : nullptr);
    for (int q = 0; q <= b.nint; ++q) residuals[q] /= scale_[q];
    if (jacobians) {
      for (size_t i = 0; i < local_.size(); ++i) {
        if (!jacobians[i]) continue;
        for (int q = 0; q <= b.nint; ++q) jacobians[i][q] = J[q * (3 + kMaxInternal) + local_[i]] / scale_[q];
      }
    }
    for (int q = 0; q <= b.nint; ++q)
      if (!std::isfinite(residuals[q])) return false;
    return true;
  }

 private:
  const NetworkSystem* sys_;
  int k_;
  std::vector<int> local_;
  std::vector<double> scale_;
};

// Mass balance at a node: sum of signed flows, scaled.
class MassCost : public ceres::CostFunction {
 public:
  MassCost(std::vector<double> signs, double scale) : signs_(std::move(signs)), scale_(scale) {
    set_num_residuals(1);
    for (size_t i = 0; i < signs_.size(); ++i) mutable_parameter_block_sizes()->push_back(1);
  }
  bool Evaluate(double const* const* params, double* residuals, double** jacobians) const override {
    double r = 0;
    for (size_t i = 0; i < signs_.size(); ++i) r += signs_[i] * params[i][0];
    residuals[0] = r / scale_;
    if (jacobians)
      for (size_t i = 0; i < signs_.size(); ++i)
        if (jacobians[i]) jacobians[i][0] = signs_[i] / scale_;
    return true;
  }

 private:
  std::vector<double> signs_;
  double scale_;
};

}  // namespace

void NetworkSolver::LevenbergMarquardt(Eigen::VectorXd* u, SolverSummary* s) {
  Eigen::VectorXd& x = *u;
  const double q = FlowScale(x);
  ceres::Problem::Options popts;
  popts.cost_function_ownership = ceres::TAKE_OWNERSHIP;
  ceres::Problem problem(popts);
  const auto& branches = system_->branches();
  const auto& kinds = system_->row_kinds();
  for (size_t k = 0; k < branches.size(); ++k) {
    const Branch& b = branches[k];
    std::vector<int> local;
    std::vector<double*> blocks;
    int vars[3 + kMaxInternal] = {b.p_from, b.p_to, b.m, -1, -1};
    for (int i = 0; i < b.nint; ++i) vars[3 + i] = b.x0() + i;
    for (int v = 0; v < 3 + kMaxInternal; ++v)
      if (vars[v] >= 0) {
        local.push_back(v);
        blocks.push_back(&x[vars[v]]);
      }
    std::vector<double> scale;
    for (int r = 0; r <= b.nint; ++r)
      scale.push_back(kinds[b.row0 + r] == NetworkSystem::RowKind::kPressure ? options_.pressure_scale_pa : q);
    problem.AddResidualBlock(new BranchCost(system_, static_cast<int>(k), local, scale), nullptr, blocks);
  }
  {
    // Incident flows of every free node, gathered in one pass.
    std::vector<std::vector<double>> signs(system_->nodes().size());
    std::vector<std::vector<double*>> blocks(system_->nodes().size());
    for (const Branch& b : branches) {
      if (system_->nodes()[b.from_node].row >= 0) {
        signs[b.from_node].push_back(-1.0);
        blocks[b.from_node].push_back(&x[b.m]);
      }
      if (system_->nodes()[b.to_node].row >= 0) {
        signs[b.to_node].push_back(1.0);
        blocks[b.to_node].push_back(&x[b.m]);
      }
    }
    for (size_t g = 0; g < system_->nodes().size(); ++g) {
      const NodeRef& nr = system_->nodes()[g];
      if (nr.row < 0 || blocks[g].empty()) continue;
      problem.AddResidualBlock(new MassCost(signs[g], q * system_->RowDensity(nr.row)), nullptr, blocks[g]);
    }
  }
  ceres::Solver::Summary sum;
  ceres::Solve(QuietCeresOptions({ceres::SPARSE_NORMAL_CHOLESKY, 200, 1e-16, 1e-20, 1e-14}), &problem, &sum);
  s->lm_iterations += static_cast<int>(sum.iterations.size());
  s->used_fallback = true;
}

void NetworkSolver::Diagnose(const Eigen::VectorXd& u, SolverSummary* s) const {
  Eigen::VectorXd r(u.size());
  system_->ResidualsAndJacobian(u, &r);  // the Jacobian for the steep-law tolerance
  const double q = FlowScale(u);
  const auto& kinds = system_->row_kinds();
  std::vector<std::pair<double, int>> scaled;
  for (int i = 0; i < r.size(); ++i) {
    const double tol = RowTolerance(i, q);
    scaled.emplace_back(std::isfinite(r[i]) && tol > 0 ? std::abs(r[i]) / tol : 1e300, i);
  }
  std::sort(scaled.rbegin(), scaled.rend());
  // The rows beyond their tolerance, largest first; when every row meets it
  // (a converged state rejected for another reason) the largest ones anyway,
  // so the list is never empty.
  size_t n = 0;
  while (n < scaled.size() && scaled[n].first > 1.0) ++n;
  n = std::min<size_t>(5, n > 0 ? n : std::min<size_t>(3, scaled.size()));
  s->worst.clear();
  for (size_t k = 0; k < n; ++k) {
    int i = scaled[k].second;
    const char* unit = kinds[i] == NetworkSystem::RowKind::kPressure ? "Pa"
                       : kinds[i] == NetworkSystem::RowKind::kVolumeFlow ? "m3/s"
                                                                         : "kg/s";
    const int owner = system_->RowOwner(i);
    s->worst.push_back({system_->RowName(i), r[i], unit, owner >= 0 ? owner : -1, owner < 0 ? -1 - owner : -1});
  }
}

void NetworkSolver::Restart(Eigen::VectorXd* u, const Eigen::VectorXd& start, bool from_guess) {
  if (from_guess) system_->StartingGuess(u);  // a function of the system's state, which Solve leaves as it was
  else *u = start;
}

SolverSummary NetworkSolver::Solve(Eigen::VectorXd* u, bool from_guess) {
  SolverSummary s;
  EnsureWork();
  const RowPass at_start = EvaluateAndPass<true, true>(*u, &r_);  // where the plain Newton starts
  s.initial_merit = at_start.finite ? 0.5 * at_start.sum_sq : INFINITY;
  // The start, for the co-content Newton should the plain Newton end worse:
  // a copy, or (from_guess) the starting guess made again when needed.
  const bool keep_start = !from_guess && options_.plain_newton && options_.co_content;
  const Eigen::VectorXd start = keep_start ? *u : Eigen::VectorXd();
  s.termination = options_.plain_newton ? Newton(u, &s, &at_start) : Termination::kMaxIterations;
  // A plain Newton that converged left r_ at *u.
  const bool settled_by_newton = s.termination == Termination::kConverged;
  if (s.termination != Termination::kConverged && options_.co_content) {
    // The co-content Newton from the better of the start and Newton's end.
    system_->Residuals(*u, &r_);
    const double end_merit = r_.allFinite() ? Merit(*u, r_) : INFINITY;
    if (!(end_merit <= s.initial_merit)) Restart(u, start, from_guess);
    const Eigen::VectorXd before = *u;
    s.termination = CoContentNewton(u, &s);
    if (s.termination != Termination::kConverged && !u->allFinite()) *u = before;
    // The plain Newton finishes from there (its mass balances are exact).
    if (s.termination != Termination::kConverged) s.termination = Newton(u, &s);
  }
  if (s.termination != Termination::kConverged && options_.use_fallback) {
    LevenbergMarquardt(u, &s);
    s.termination = Newton(u, &s);
  }
  // A plain Newton that converged left pass_ as r_'s pass at *u.
  const RowPass at_end = settled_by_newton ? pass_ : EvaluateAndPass<false, false>(*u, &r_);
  s.final_merit = at_end.finite ? 0.5 * at_end.sum_sq : INFINITY;
  if (s.termination == Termination::kConverged) {
    for (const NodeRef& nr : system_->nodes())
      if (nr.unknown >= 0 && !(std::abs((*u)[nr.unknown]) <= options_.max_pressure_pa)) {
        s.termination = Termination::kUnphysical;
        s.message = fmt::format("{} = {:.4g} Pa exceeds {:.0e} Pa: the network has no physical answer "
                                "(for example a positive-displacement pump dead-headed with no relief path).",
                                system_->UnknownName(nr.unknown), (*u)[nr.unknown], options_.max_pressure_pa);
        break;
      }
  }
  if (!s.converged()) {
    Diagnose(*u, &s);
    // A first cause from the rows alone; CaseSolver (network/point/run.cpp) refines
    // it from the state (network/point/failure_causes.h).
    s.cause_kind = "residual-not-resolved";
    s.cause = s.worst.empty() ? std::string(TerminationName(s.termination))
                              : fmt::format("{}; the largest residual is {}", TerminationName(s.termination), s.worst[0].what);
  }
  return s;
}

}  // namespace loopwright
