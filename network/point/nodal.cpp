// The node-pressure Newton method with a line search on the network's
// co-content: the solver's globally convergent path (see solver.h).
//
// Every branch law of loopwright is monotone: with dp its drop in
// piezometric pressure from -> to, the flow it passes, m_b = g_b(dp_b), never
// decreases as dp_b rises (lines, orifices, bearings, coolers, valves; a pump
// too while its head falls with flow). For such a network the mass-balance
// residuals at the free nodes, with every branch on its law,
//   R_n(p) = sum_{b into n} g_b(dp_b) - sum_{b out of n} g_b(dp_b),
// are the negative gradient of the co-content
//   C(p) = sum_b integral_0^{dp_b} g_b(s) ds,
// a convex function of the node pressures p (Collins, Cooper, Helgason,
// Kennington & LeBlanc 1978; from memory). The answer is the minimiser of C.
// The iteration:
//   1. put every branch on its law at the present node pressures (a scalar
//      safeguarded Newton per branch in its flow, or a small damped Newton for
//      branches with internal unknowns);
//   2. take the Newton step of the node pressures, K dp = R with K the Schur
//      complement of the flow block (the nodal "gradient" step of Todini &
//      Pilati 1988), from NetworkSystem::ReducedNewtonStep; if K is not
//      positive definite, the gradient direction R scaled;
//      when a step falls short (a law flat in its drop bends the search
//      back), the next steps are tilted: each branch's conductance in K is
//      floored at a fraction of its secant conductance |m|/|dp| (0.1, then
//      relaxed tenfold per good step back to the exact step);
//   3. search along the step for a zero of the slope of C, phi'(a) =
//      -R(p + a d) . d, which rises with a because C is convex: accept a = 1
//      when phi'(1) <= 0, else bracket and take false position (Illinois) to
//      |phi'(a)| <= 0.1 |phi'(0)| (the strong Wolfe curvature condition).
// The co-content itself is never evaluated: its slope along the line is the
// residual, so the search needs nothing but the laws.
//
// A law that reads its outlet pressure (pressure_reducing_valve,
// Component::SensesOutlet) is not a function of its drop alone. With one end
// at a boundary it still touches one free pressure only, its flow into that
// node is a function of that pressure alone (falling as it rises, in forward
// flow), so it has a co-content term and a positive conductance
// (NetworkSystem::ReducedNewtonStep folds its outlet term in); the
// projection solves its law for the flow at fixed pressures as for any
// branch (its residual rises with m). With both ends at free nodes the
// residuals are no longer a gradient (the node-pressure matrix is not
// symmetric) and this method has no guarantee: it declines such a system
// at once (kLineSearchFailed) and the caller's plain Newton (LU steps) goes
// on from there, then Levenberg-Marquardt if that stalls.
//
// A law with a jump (the hard 64/Re | Colebrook switch) is taken as its
// filled graph, so g_b is continuous and C is convex and once differentiable;
// a branch on the switch carries the switch flow at every drop between the
// two branch values and its conductance dm/d(dp) is tiny there.
//
// References
// Collins M., Cooper L., Helgason R., Kennington J., LeBlanc L., "Solving the
//   pipe network analysis problem using optimization techniques", Management
//   Science 24(7):747-760, 1978 (from memory).
// Todini E., Pilati S., "A gradient algorithm for the analysis of pipe
//   networks", in Computer Applications in Water Supply, Vol. 1, Research
//   Studies Press, 1988, pp. 1-20.
// Nocedal J., Wright S. J., Numerical Optimization, 2nd ed., Springer 2006,
//   sections 3.1 and 3.5 (Wolfe conditions, line search by interpolation).
#include <Eigen/Dense>

#include <algorithm>
#include <cmath>
#include <limits>

#include "network/point/solver.h"

namespace loopwright {

namespace {

constexpr int kW = 3 + kMaxInternal;  // columns of EvaluateBranch's J
constexpr double kNoBound = std::numeric_limits<double>::infinity();

// Where the next flow iterate goes: Newton's point when it lies inside the
// bracket (lo, hi), else the bracket's middle, else a step that doubles away
// from m toward the side the residual's sign points to.
double NextFlow(double m, double r, double d, double lo, double hi, double* expand) {
  const double newton = d > 0 ? m - r / d : std::numeric_limits<double>::quiet_NaN();
  if (newton > lo && newton < hi) return newton;
  if (std::isfinite(lo) && std::isfinite(hi)) return 0.5 * (lo + hi);
  *expand *= 2.0;
  return r > 0 ? m - *expand : m + *expand;
}

}  // namespace

double NetworkSolver::LawRowTolerance(int row, int branch, double q) const {
  if (system_->row_kinds()[row] == NetworkSystem::RowKind::kVolumeFlow) return options_.flow_rel_tolerance * q;
  const Branch& b = system_->branches()[branch];
  const double m_tol = options_.flow_rel_tolerance * q * system_->loop_states()[b.loop].rho;
  // A law in Pa holds when its residual is within the pressure tolerance, or
  // when the flow it implies is within the flow tolerance (a steep law, such
  // as a line on the switch's filled graph, resolves its drop no better than
  // d(residual)/dm times one rounding of m).
  const double slope = b.nint == 0 ? std::abs(system_->LawFlowDerivative(branch)) : 0.0;
  return std::max(options_.pressure_tolerance_pa, slope * m_tol);
}

// Branch k on its law at the pressures in vals[0..1]: vals[2] (the flow)
// starts from the present value and gets the answer. Safeguarded Newton
// inside a bracket of the sign change (the law, signed so that it rises with
// m, is monotone in m).
bool NetworkSolver::BranchFlowOnLaw(int k, double* vals, double q) const {
  const Branch& b = system_->branches()[k];
  const bool pa = system_->row_kinds()[b.row0] == NetworkSystem::RowKind::kPressure;
  const double rho = system_->loop_states()[b.loop].rho;
  const double m_tol = 0.1 * options_.flow_rel_tolerance * q * rho;
  double lo = -kNoBound, hi = kNoBound, expand = std::max(q * rho, std::abs(vals[2]));
  double r, J[(1 + kMaxInternal) * kW];
  double sign = 0;  // makes sign * r rise with m: -sign of dr/d(dp) (a pump's law falls with m)
  for (int it = 0; it < 300; ++it) {
    system_->EvaluateBranch(k, vals, &r, J);
    if (sign == 0) {
      const double dr_ddp = b.p_from >= 0 ? J[0] : b.p_to >= 0 ? -J[1] : 0.0;
      // A sensing branch (flow-kind residual m/rho - Q) rises with m; its J[1] carries the outlet term.
      sign = b.senses ? (J[2] >= 0 ? 1.0 : -1.0) : dr_ddp > 0 ? -1.0 : dr_ddp < 0 ? 1.0 : J[2] >= 0 ? 1.0 : -1.0;
    }
    r *= sign;
    const double m = vals[2], d = sign * J[2];
    if (!std::isfinite(r) || !std::isfinite(d)) {
      if (!(std::isfinite(lo) && std::isfinite(hi))) return false;
      vals[2] = 0.5 * (lo + hi);
      continue;
    }
    // The flow it implies within a tenth of the flow tolerance (a Pa residual
    // of a tenth of the pressure tolerance can still leave a flow error far
    // above it when the law is steep and the flows are small).
    const bool met = pa ? std::abs(r) <= 1e-3 * options_.pressure_tolerance_pa || std::abs(r) <= d * m_tol
                        : std::abs(r) <= 0.1 * options_.flow_rel_tolerance * q;
    if (met) return true;
    (r > 0 ? hi : lo) = m;
    // A bracket closed to rounding holds a jump of the law: its filled graph.
    if (std::isfinite(hi - lo) &&
        hi - lo <= 8 * std::numeric_limits<double>::epsilon() * std::max(std::abs(lo), std::abs(hi)))
      return true;
    vals[2] = NextFlow(m, r, d, lo, hi, &expand);
  }
  return false;
}

// A branch with internal unknowns on its law at fixed node pressures: damped
// Newton in (m, x) on the branch's own rows, scaled as in the merit.
bool NetworkSolver::BranchBlockOnLaw(int k, double* vals, double q) const {
  const Branch& b = system_->branches()[k];
  const int n = 1 + b.nint;
  auto scaled_norm = [&](const double* r) {
    double s = 0;
    for (int i = 0; i < n; ++i) {
      const bool pa = system_->row_kinds()[b.row0 + i] == NetworkSystem::RowKind::kPressure;
      const double z = r[i] / (pa ? options_.pressure_scale_pa : q);
      s += z * z;
    }
    return s;
  };
  double r[1 + kMaxInternal], J[(1 + kMaxInternal) * kW], trial[kW], rt[1 + kMaxInternal];
  for (int it = 0; it < 60; ++it) {
    system_->EvaluateBranch(k, vals, r, J);
    bool met = true;
    for (int i = 0; i < n; ++i) {
      const bool pa = system_->row_kinds()[b.row0 + i] == NetworkSystem::RowKind::kPressure;
      met = met && std::abs(r[i]) <= 0.1 * (pa ? options_.pressure_tolerance_pa : options_.flow_rel_tolerance * q);
    }
    if (met) return true;
    Eigen::MatrixXd A(n, n);
    Eigen::VectorXd rhs(n);
    for (int i = 0; i < n; ++i) {
      rhs[i] = r[i];
      for (int c = 0; c < n; ++c) A(i, c) = J[i * kW + 2 + c];
    }
    const Eigen::VectorXd step = A.fullPivLu().solve(rhs);
    if (!step.allFinite()) return false;
    const double phi = scaled_norm(r);
    double a = 1.0;
    for (; a > 1e-12; a *= 0.5) {
      std::copy(vals, vals + kW, trial);
      for (int c = 0; c < n; ++c) trial[2 + c] -= a * step[c];
      system_->EvaluateBranch(k, trial, rt, nullptr);
      if (scaled_norm(rt) < phi) break;
    }
    if (a <= 1e-12) return false;
    std::copy(trial, trial + kW, vals);
  }
  return false;
}

bool NetworkSolver::ProjectFlows(Eigen::VectorXd* u, double q) const {
  Eigen::VectorXd& x = *u;
  const auto& branches = system_->branches();
  for (size_t k = 0; k < branches.size(); ++k) {
    const Branch& b = branches[k];
    double vals[kW] = {b.p_from >= 0 ? x[b.p_from] : 0.0, b.p_to >= 0 ? x[b.p_to] : 0.0, x[b.m], 0, 0};
    for (int i = 0; i < b.nint; ++i) vals[3 + i] = x[b.x0() + i];
    const bool ok = b.nint == 0 ? BranchFlowOnLaw(static_cast<int>(k), vals, q)
                                : BranchBlockOnLaw(static_cast<int>(k), vals, q);
    if (!ok) return false;
    x[b.m] = vals[2];
    for (int i = 0; i < b.nint; ++i) x[b.x0() + i] = vals[3 + i];
  }
  return true;
}

// phi'(a) = -R(p + a d) . d with every branch on its law at p + a d; the
// state is left in u_trial_ / r_ (the residuals at x are not read again
// until the caller evaluates them at the accepted point). False when a law
// cannot be met there.
bool NetworkSolver::CoContentSlope(const Eigen::VectorXd& x, double a, double q, double* slope) {
  u_trial_ = x;
  for (const NodeRef& nr : system_->nodes())
    if (nr.unknown >= 0) u_trial_[nr.unknown] += a * dir_[nr.unknown];
  if (!ProjectFlows(&u_trial_, q)) return false;
  system_->Residuals(u_trial_, &r_);
  if (!r_.allFinite()) return false;
  double s = 0;
  for (const NodeRef& nr : system_->nodes())
    if (nr.unknown >= 0) s -= r_[nr.row] * dir_[nr.unknown];
  *slope = s;
  return true;
}

// Step length along dir_ from x (slope s0 < 0 there); u_trial_ / r_
// hold the accepted state. Returns 0 when no step is found.
double NetworkSolver::CoContentLineSearch(const Eigen::VectorXd& x, double s0, double q, bool extrapolate) {
  constexpr double kEta = 0.1;  // strong Wolfe curvature constant
  double a = 1.0, s = 0;
  while (!CoContentSlope(x, a, q, &s))
    if ((a *= 0.25) < 1e-12) return 0.0;
  // A scaled gradient has no natural length: stretch it while C still falls.
  bool state_at_a = true;
  for (int k = 0; extrapolate && k < 30 && s < kEta * s0; ++k) {
    double s_next;
    if (!CoContentSlope(x, 4.0 * a, q, &s_next)) {
      state_at_a = false;
      break;
    }
    a *= 4.0;
    s = s_next;
  }
  if (s <= 0 || std::abs(s) <= kEta * std::abs(s0)) return state_at_a || CoContentSlope(x, a, q, &s) ? a : 0.0;
  double a_lo = 0, s_lo = s0, a_hi = a, s_hi = s;
  int side = 0;
  for (int it = 0; it < 60; ++it) {
    a = (a_lo * s_hi - a_hi * s_lo) / (s_hi - s_lo);
    if (!(a > a_lo && a < a_hi)) a = 0.5 * (a_lo + a_hi);
    if (!CoContentSlope(x, a, q, &s)) {
      a_hi = a;  // a law fails beyond: shrink
      continue;
    }
    if (std::abs(s) <= kEta * std::abs(s0)) return a;
    if (s < 0) {
      a_lo = a, s_lo = s;
      if (side == -1) s_hi *= 0.5;  // Illinois
      side = -1;
    } else {
      a_hi = a, s_hi = s;
      if (side == 1) s_lo *= 0.5;
      side = 1;
    }
  }
  return a_lo > 0 && CoContentSlope(x, a_lo, q, &s) ? a_lo : 0.0;
}

// The search direction in node pressures, into dir_ (node entries): the
// nodal Newton step, or the scaled residual when K is not positive definite.
// Returns the slope phi'(0) and whether the direction is the scaled residual.
double NetworkSolver::CoContentDirection(const Eigen::VectorXd& x, double tilt, bool* gradient) {
  double s0 = 0;
  if (tilt > 0) TiltFloors(x, tilt);
  *gradient = !system_->ReducedNewtonStep(r_, &du_, tilt > 0 ? g_floor_.data() : nullptr);
  if (!*gradient) {
    for (const NodeRef& nr : system_->nodes())
      if (nr.unknown >= 0) dir_[nr.unknown] = -du_[nr.unknown], s0 -= r_[nr.row] * dir_[nr.unknown];
    if (s0 < 0) return s0;
    *gradient = true;
  }
  const double scale = options_.pressure_scale_pa / FlowScale(x);  // Pa per m3/s
  s0 = 0;
  for (const NodeRef& nr : system_->nodes())
    if (nr.unknown >= 0)
      dir_[nr.unknown] = scale / system_->loop_states()[nr.loop].rho * r_[nr.row], s0 -= r_[nr.row] * dir_[nr.unknown];
  return s0;
}

// Floors of the branch conductances for a tilted step: tilt times each
// branch's secant conductance |m| / |dp| (zero for a branch without flow or
// drop). A law flat in its drop — a line on the switch's filled graph, whose
// flow stays at the switch flow over a range of drops — then no longer makes
// the node-pressure matrix nearly singular, and the step can carry a node
// across the flat part; the line search keeps every step a descent of C.
void NetworkSolver::TiltFloors(const Eigen::VectorXd& x, double tilt) {
  const auto& branches = system_->branches();
  g_floor_.resize(branches.size());
  for (size_t k = 0; k < branches.size(); ++k) {
    const Branch& b = branches[k];
    const double dp = system_->NodePressure(b.from_node, x) - system_->NodePressure(b.to_node, x) +
                      system_->branch_fluid(static_cast<int>(k)).rho * kGravity * system_->Dz(b);
    g_floor_[k] = std::abs(dp) > 0 ? tilt * std::abs(x[b.m]) / std::abs(dp) : 0.0;
  }
}

// The tilt for the next step: none while full steps are taken; 0.1 of the
// secant conductances once a step falls short (a flat law bends the line
// search back), doubled while steps stay short, and taken back tenfold per
// good step so that the last steps are exact Newton steps.
namespace {
double NextTilt(double tilt, double alpha) {
  if (alpha < 0.01) return tilt == 0 ? 0.1 : std::min(0.5, 2 * tilt);
  if (alpha >= 0.5) return tilt > 1e-4 ? 0.1 * tilt : 0.0;
  return tilt;
}
}  // namespace

Termination NetworkSolver::CoContentNewton(Eigen::VectorXd* u, SolverSummary* s) {
  Eigen::VectorXd& x = *u;
  if (system_->HasNonReciprocalBranch()) return Termination::kLineSearchFailed;  // no co-content (header)
  dir_.setZero(x.size());
  if (!ProjectFlows(&x, FlowScale(x))) return Termination::kLineSearchFailed;
  system_->ResidualsAndJacobian(x, &r_);
  // Stalled: the mass residuals, limited by how finely each law can be
  // inverted for its flow (a pump near shut-off, where the head hardly
  // changes with flow), stop falling; the caller's plain Newton then
  // finishes from this point, which holds the mass balance exactly.
  double best = INFINITY, tilt = 0;
  int stalled = 0;
  for (int it = 0; it < options_.max_nodal_iterations; ++it) {
    if (Converged(x, r_, s)) return Termination::kConverged;
    if (s->max_flow_residual < 0.5 * best) best = s->max_flow_residual, stalled = 0;
    else if (++stalled >= 10) return Termination::kLineSearchFailed;
    bool gradient = false;
    const double s0 = CoContentDirection(x, tilt, &gradient);
    if (!(s0 < 0)) return Termination::kLineSearchFailed;
    const double q = FlowScale(x);
    const double alpha = CoContentLineSearch(x, s0, q, gradient);
    if (alpha <= 0) return Termination::kLineSearchFailed;
    tilt = NextTilt(tilt, alpha);
    x = u_trial_;
    system_->ResidualsAndJacobian(x, &r_);
    ++s->nodal_iterations;
  }
  return Converged(x, r_, s) ? Termination::kConverged : Termination::kMaxIterations;
}

}  // namespace loopwright
