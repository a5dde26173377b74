#include "network/envelope/sensitivity.h"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>
#include <Eigen/Dense>

#include "network/envelope/checks.h"

namespace loopwright {

std::vector<DesignKnob> DesignKnobs(const Case& cs) {
  // Component knobs: the parameters their type's spec declares a knob
  // (ParamSpec::knob, in the component's own file), given and not bound.
  std::vector<DesignKnob> out;
  for (size_t l = 0; l < cs.loops.size(); ++l)
    for (size_t c = 0; c < cs.loops[l].components.size(); ++c) {
      const ComponentSpec& spec = cs.loops[l].components[c];
      const std::vector<ParamSpec>& specs = spec.type_info->params;
      for (size_t pi = 0; pi < specs.size(); ++pi) {
        const ParamSpec& ps = specs[pi];
        if (!ps.knob || std::isnan(spec.model->params()[pi])) continue;
        bool bound = false;
        for (const auto& b : spec.bindings()) bound = bound || b.param == static_cast<int>(pi);
        if (bound) continue;
        DesignKnob k;
        k.loop = static_cast<int>(l);
        k.comp = static_cast<int>(c);
        k.param = static_cast<int>(pi);
        k.name = cs.loops[l].id + "/" + spec.id + "." + ps.name;
        k.dim = ps.dim;
        k.lo = ps.KnobMin();
        k.hi = ps.KnobMax();
        if (ps.min_exclusive || !std::isfinite(k.lo)) k.lo = std::max(k.lo, 0.0) + 1e-12;
        k.held = cs.knobs.Held(k.loop, k.comp, k.param, -1);
        out.push_back(k);
      }
    }
  for (size_t i = 0; i < cs.couplings.size(); ++i) {
    DesignKnob k;
    k.coupling = static_cast<int>(i);
    k.name = cs.couplings[i].id + ".conductance";
    k.dim = Dimension::kConductance;
    k.lo = 1e-12;
    k.held = cs.knobs.Held(-1, -1, -1, k.coupling);
    out.push_back(k);
  }
  return out;
}

double KnobValue(CaseSolver* solver, const DesignKnob& k) {
  if (k.fluid >= 0) return solver->OilAnchor(k.fluid, k.anchor);
  return solver->Knob(k.loop, k.comp, k.param, k.coupling);
}

bool SetKnobValue(CaseSolver* solver, const DesignKnob& k, double value) {
  if (k.fluid >= 0) return solver->SetOilAnchor(k.fluid, k.anchor, value);
  return solver->SetKnob(k.loop, k.comp, k.param, k.coupling, value);
}

double CheckMargin(const Case& cs, const OperatingPoint& op, const PointResult& r, const std::string& name,
                   const std::string& where) {
  std::vector<CheckWarning> w;
  for (const auto& o : EvaluateChecks(cs, op, r, &w))
    if (o.name() == name && o.where == where) return o.margin;
  return NAN;
}

PointTangents::PointTangents(CaseSolver* solver, const OperatingPoint& op, TangentOptions options)
    : s_(solver), op_(op), opt_(options) {
  if (!s_->has_answer) {
    message_ = "the point has no converged answer";
    return;
  }
  thermal_ = s_->IsThermal(op);
  u0_ = s_->u;
  const int n = s_->sys.NumUnknowns();
  rp_.resize(n);
  rm_.resize(n);
  if (thermal_) {
    T0_ = s_->T;
    s_->thermal->ApplyBranchFluids(T0_, u0_, &s_->sys);
  }
  s_->sys.ResidualsAndJacobian(u0_, &rp_);
  lu_u_.compute(s_->sys.jacobian());
  if (lu_u_.info() != Eigen::Success) {
    message_ = "the hydraulic Jacobian is singular at the point";
    return;
  }
  if (thermal_ && s_->thermal->NumUnknowns() > 0) {
    lu_t_.compute(s_->thermal->Jacobian(u0_, T0_));
    if (lu_t_.info() != Eigen::Success) {
      message_ = "the energy-balance Jacobian is singular at the point";
      return;
    }
  }
  ok_ = true;
  if (thermal_)
    for (const SensorSite& site : s_->thermal->sensors())
      if (s_->thermal->UnknownOf(site.node) >= 0 && std::find(sensed_.begin(), sensed_.end(), site.node) == sensed_.end())
        sensed_.push_back(site.node);
}

void PointTangents::Hydraulic(const Eigen::VectorXd& u, const std::vector<double>& T, Eigen::VectorXd* r) {
  if (thermal_) s_->thermal->ApplyBranchFluids(T, u, &s_->sys);
  s_->sys.Residuals(u, r);
}

void PointTangents::Energy(const Eigen::VectorXd& u, const std::vector<double>& T, Eigen::VectorXd* r) {
  s_->thermal->ApplyBranchFluids(T, u, &s_->sys);
  s_->thermal->Residuals(u, T, r, nullptr);
}

void PointTangents::Restore() {
  if (thermal_) s_->thermal->ApplyBranchFluids(T0_, u0_, &s_->sys);
}

void PointTangents::Partials(const DesignKnob& knob, double th0, double h, int nt) {
  SetKnobValue(s_, knob, th0 + h);
  Hydraulic(u0_, T0_, &rp_);
  if (nt > 0) Energy(u0_, T0_, &tp_);
  SetKnobValue(s_, knob, th0 - h);
  Hydraulic(u0_, T0_, &rm_);
  if (nt > 0) Energy(u0_, T0_, &tm_);
  SetKnobValue(s_, knob, th0);
  bu_ = (rp_ - rm_) / (2 * h);
  if (nt > 0) bt_ = (tp_ - tm_) / (2 * h);
}

// The directional difference along the tangent (du, dT) takes the knob's step
// h, or a longer one where h moves the state by less than 1e-7 of its size:
// a knob that hardly acts (a drain bore, whose tangent moves the housing
// pressure by a few pascals per millimetre) would otherwise perturb the state
// by 1e-5 Pa, inside the residuals' rounding, and the sweeps would stall on
// that noise. The difference is linear in the step up to O(step^2).
static double DirectionalStep(double h, const Eigen::VectorXd& u0, const Eigen::VectorXd& du,
                              const std::vector<double>& T0, const std::vector<double>& dT) {
  constexpr double kRelative = 1e-7;
  double step = INFINITY;
  const double nu = du.lpNorm<Eigen::Infinity>();
  if (nu > 0) step = kRelative * u0.lpNorm<Eigen::Infinity>() / nu;
  double t0 = 0, nt = 0;
  for (size_t g = 0; g < dT.size(); ++g) {
    t0 = std::max(t0, std::abs(T0[g]));
    nt = std::max(nt, std::abs(dT[g]));
  }
  if (nt > 0) step = std::min(step, kRelative * t0 / nt);
  return std::isfinite(step) ? std::max(h, step) : h;
}

void PointTangents::Along(Residual f, const StateTangent& t, double h_knob, Eigen::VectorXd* plus,
                          Eigen::VectorXd* minus, Eigen::VectorXd* out) {
  const double h = DirectionalStep(h_knob, u0_, t.du, T0_, t.dT);
  up_ = u0_ + h * t.du;
  um_ = u0_ - h * t.du;
  for (size_t g = 0; g < Tp_.size(); ++g) {
    Tp_[g] = T0_[g] + h * t.dT[g];
    Tm_[g] = T0_[g] - h * t.dT[g];
  }
  (this->*f)(up_, Tp_, plus);
  (this->*f)(um_, Tm_, minus);
  *out = (*plus - *minus) / (2 * h);
}

namespace {

// When an iteration on the tangent has settled: its change is below
// `tolerance` of the tangent (temperatures with a floor of 1e-12 K per step
// h), or below `noise_floor` and no longer shrinking for three iterations
// (the rounding floor of the directional differences is reached). Call once
// per iteration; *rel gets the relative change.
struct SettleTest {
  int stalled = 0;
  double last_rel = INFINITY;
  bool Done(double change_u, double size_u, double change_t, double size_t_, double h, double tolerance,
            double noise_floor, double* rel) {
    *rel = std::max(change_u / std::max(size_u, 1e-300),
                    change_t <= 1e-12 / h ? 0.0 : change_t / std::max(size_t_, 1e-300));
    stalled = *rel >= 0.5 * last_rel ? stalled + 1 : 0;
    last_rel = std::min(last_rel, *rel);
    return *rel <= tolerance || (*rel <= noise_floor && stalled >= 3);
  }
};

}  // namespace

void PointTangents::Sweeps(StateTangent* t, double h, int nt) {
  const size_t nodes = s_->sys.nodes().size();
  SettleTest settle;
  constexpr int kStallSweeps = 30;
  double best_rel = INFINITY;
  int best_sweep = 0;
  for (int sweep = 0; sweep < opt_.max_sweeps; ++sweep) {
    t->sweeps = sweep + 1;
    // u block: A_1 z + F_theta.
    if (sweep == 0) {
      cu_ = bu_;
    } else {
      Along(&PointTangents::Hydraulic, *t, h, &rp_, &rm_, &cu_);
      cu_ += bu_;
    }
    ddu_ = lu_u_.solve(cu_);
    if (!ddu_.allFinite()) {
      t->message = "the hydraulic tangent is not finite";
      return;
    }
    t->du -= ddu_;
    // No coupling: F_u is the whole (exact) Jacobian and one solve is the tangent.
    if (!thermal_) break;
    double change_t = 0, size_t_ = 0;
    if (nt > 0) {
      Along(&PointTangents::Energy, *t, h, &tp_, &tm_, &ct_);
      ct_ += bt_;
      ddt_ = lu_t_.solve(ct_);
      if (!ddt_.allFinite()) {
        t->message = "the thermal tangent is not finite";
        return;
      }
      for (size_t g = 0; g < nodes; ++g) {
        const int i = s_->thermal->UnknownOf(static_cast<int>(g));
        if (i >= 0) t->dT[g] -= ddt_[i];
        size_t_ = std::max(size_t_, std::abs(t->dT[g]));
      }
      change_t = ddt_.lpNorm<Eigen::Infinity>();
    }
    double rel = 0;
    const bool done = settle.Done(ddu_.lpNorm<Eigen::Infinity>(), t->du.lpNorm<Eigen::Infinity>(), change_t, size_t_,
                                  h, opt_.tolerance, opt_.noise_floor, &rel);
    if (sweep > 0 && done) {
      t->settled_change = rel;
      break;
    }
    // No progress for kStallSweeps sweeps: the loop gain is near or above 1
    // and the sweeps will not settle (Held then eliminates instead).
    if (rel < best_rel) best_rel = rel, best_sweep = sweep;
    if (sweep + 1 == opt_.max_sweeps || sweep - best_sweep >= kStallSweeps) {
      t->message = fmt::format("the tangent did not settle in {} sweeps", sweep + 1);
      break;
    }
  }
  t->ok = t->message.empty();
}

StateTangent PointTangents::Tangent(const DesignKnob& knob) {
  StateTangent t;
  const double th0 = KnobValue(s_, knob);
  if (!ok_ || std::isnan(th0)) {
    t.message = ok_ ? "the knob does not act at this point" : message_;
    return t;
  }
  const double h = opt_.relative_step * (th0 != 0 ? std::abs(th0) : 1.0);
  t.step = h;
  const int nt = thermal_ ? s_->thermal->NumUnknowns() : 0;
  for (int g : sensed_) s_->thermal->HoldSensed(g, T0_[g]);
  Partials(knob, th0, h, nt);
  StateTangent z = Held(h, nt);
  z.step = h;
  if (z.ok && !sensed_.empty()) CloseThermostats(&z, nt);
  if (thermal_) s_->thermal->ReleaseSensed();
  Restore();
  return z;
}

StateTangent PointTangents::Held(double h, int nt) {
  StateTangent t;
  t.du = Eigen::VectorXd::Zero(u0_.size());
  t.dT.assign(thermal_ ? s_->sys.nodes().size() : 0, 0.0);
  Tp_ = T0_;
  Tm_ = T0_;
  if (opt_.direct_only) t.message = "the block sweeps were not asked for";
  else Sweeps(&t, h, nt);
  // Where the sweeps do not settle, the coupled system by elimination.
  if (!t.ok && thermal_ && nt > 0 && nt <= opt_.direct_unknowns) {
    const std::string sweeps_message = t.message;
    t = StateTangent();
    t.du = Eigen::VectorXd::Zero(u0_.size());
    t.dT.assign(s_->sys.nodes().size(), 0.0);
    Direct(&t, h, nt);
    if (!t.ok) t.message = sweeps_message + "; by elimination: " + t.message;
  }
  return t;
}

// Direct. The block sweeps are a Gauss-Seidel iteration on the coupled
// linear system
//   J_uu du + J_uT dT = -b_u,   J_Tu du + J_TT dT = -b_T,
// whose error shrinks by the loop gain of the flow-temperature coupling at
// each sweep; where that gain passes 1 (a hot journal bearing: its viscosity
// falls with its temperature, so its flow rises, which cools it) they never
// settle. Eliminating du instead gives the temperatures' own system
//   S dT = -(b_T - J_Tu J_uu^-1 b_u),   S = J_TT - J_Tu J_uu^-1 J_uT,
// then du = -J_uu^-1 (b_u + J_uT dT) (block elimination, e.g. Golub & Van
// Loan, Matrix Computations, sec. 3.2, from memory). S is dense, one column
// per temperature unknown: column j is the energy rows along (du, dT) =
// (-J_uu^-1 J_uT e_j, e_j), two directional differences and one solve,
// built once per point and shared by every knob. The factorised J_uu is the
// solver's analytic Jacobian, which leaves out a few weak dependences the
// residuals have (the sweeps use it the same way, as a preconditioner), so
// this elimination M^-1 is not the exact inverse: the tangent is refined,
// z <- z - M^-1 (J z + b) with J z by directional differences, until it
// settles as the sweeps do (2-4 refinements on the demo cases, each two
// directional differences more than a sweep). The refinement converges
// whatever the loop gain, since M holds the coupling.
bool PointTangents::BuildSchur(int nt, std::string* why) {
  const size_t nodes = s_->sys.nodes().size();
  t_nodes_.assign(nt, -1);
  for (size_t g = 0; g < nodes; ++g)
    if (const int i = s_->thermal->UnknownOf(static_cast<int>(g)); i >= 0) t_nodes_[i] = static_cast<int>(g);
  Eigen::MatrixXd S(nt, nt);
  StateTangent col;
  col.du = Eigen::VectorXd::Zero(u0_.size());
  for (int j = 0; j < nt; ++j) {
    col.du.setZero();
    col.dT.assign(nodes, 0.0);
    col.dT[t_nodes_[j]] = 1.0;
    Along(&PointTangents::Hydraulic, col, 0.0, &rp_, &rm_, &cu_);
    col.du = -lu_u_.solve(cu_);
    Along(&PointTangents::Energy, col, 0.0, &tp_, &tm_, &ct_);
    S.col(j) = ct_;
  }
  if (!S.allFinite()) {
    *why = "the coupled Jacobian is not finite at the point";
    return false;
  }
  schur_lu_.compute(S);
  const double rcond = schur_lu_.rcond();
  if (!(rcond > 1e-14)) {
    *why = fmt::format("the energy balance, with the flows following the temperatures, is singular at the point "
                       "(reciprocal condition {:.2g})", rcond);
    return false;
  }
  return true;
}

// M^-1 (r_u, r_T): the coupled system's block elimination with the point's
// factorised J_uu and S, its couplings by directional differences, into
// (ddu_, ddt_) (ddt_ per temperature unknown).
void PointTangents::SchurSolve(const Eigen::VectorXd& r_u, const Eigen::VectorXd& r_t, double h, int nt) {
  StateTangent& w = work_;
  w.du = lu_u_.solve(r_u);
  std::fill(w.dT.begin(), w.dT.end(), 0.0);
  Along(&PointTangents::Energy, w, h, &tp_, &tm_, &ct_);
  ddt_ = schur_lu_.solve(r_t - ct_);
  w.du.setZero();
  for (int i = 0; i < nt; ++i) w.dT[t_nodes_[i]] = ddt_[i];
  Along(&PointTangents::Hydraulic, w, h, &rp_, &rm_, &cu_);
  ddu_ = lu_u_.solve(r_u - cu_);
}

void PointTangents::Direct(StateTangent* t, double h, int nt) {
  if (!schur_built_) {
    schur_built_ = true;
    if (!BuildSchur(nt, &schur_message_)) schur_lu_ = Eigen::PartialPivLU<Eigen::MatrixXd>();
    else schur_message_.clear();
  }
  if (!schur_message_.empty()) {
    t->message = schur_message_;
    return;
  }
  work_.dT.assign(t->dT.size(), 0.0);
  SettleTest settle;
  for (int it = 0; it < opt_.max_sweeps; ++it) {
    t->sweeps = it + 1;
    if (it == 0) {
      res_u_ = bu_;
      res_t_ = bt_;
    } else {  // the residual of the linear system at t
      Along(&PointTangents::Hydraulic, *t, h, &rp_, &rm_, &res_u_);
      res_u_ += bu_;
      Along(&PointTangents::Energy, *t, h, &tp_, &tm_, &res_t_);
      res_t_ += bt_;
    }
    SchurSolve(res_u_, res_t_, h, nt);
    if (!ddu_.allFinite() || !ddt_.allFinite()) {
      t->message = "the coupled tangent is not finite";
      return;
    }
    t->du -= ddu_;
    double size_t_ = 0;
    for (int i = 0; i < nt; ++i) {
      t->dT[t_nodes_[i]] -= ddt_[i];
      size_t_ = std::max(size_t_, std::abs(t->dT[t_nodes_[i]]));
    }
    const bool done = settle.Done(ddu_.lpNorm<Eigen::Infinity>(), t->du.lpNorm<Eigen::Infinity>(),
                                  ddt_.lpNorm<Eigen::Infinity>(), size_t_, h, opt_.tolerance,
                                  opt_.direct_noise_floor, &t->settled_change);
    if (it > 0 && done) {
      t->ok = true;
      return;
    }
  }
  t->message = fmt::format("the coupled tangent did not settle in {} refinements", opt_.max_sweeps);
}

// Thermostatic valves. An element follows the temperature of its sensed
// node; the block sweeps, like the plain passes of the solve, would let it
// follow the node's tangent and diverge for a valve of high gain
// (network/point/run_thermostat.cpp). So the tangent is taken with every
// free sensed temperature held (z0, the knob's tangent; w_j, a unit change of
// node j's held temperature, computed once per point), and the held values'
// own tangent s' is what makes them equal the nodes' again:
//   z = z0 + sum_j s'_j w_j,   s'_i = dT_i(z)   =>   (I - W) s' = dT(z0),
// W_ij = dT_i(w_j), a dense system of the size of the number of sensed nodes.
void PointTangents::CloseThermostats(StateTangent* z, int nt) {
  const size_t n = sensed_.size();
  if (responses_.empty())
    for (int g : sensed_) {
      const double h = opt_.relative_step * std::abs(T0_[g]);
      s_->thermal->HoldSensed(g, T0_[g] + h);
      Hydraulic(u0_, T0_, &rp_);
      if (nt > 0) Energy(u0_, T0_, &tp_);
      s_->thermal->HoldSensed(g, T0_[g] - h);
      Hydraulic(u0_, T0_, &rm_);
      if (nt > 0) Energy(u0_, T0_, &tm_);
      s_->thermal->HoldSensed(g, T0_[g]);
      bu_ = (rp_ - rm_) / (2 * h);
      if (nt > 0) bt_ = (tp_ - tm_) / (2 * h);
      responses_.push_back(Held(h, nt));
      if (!responses_.back().ok) {
        z->ok = false;
        z->message = "the tangent of a thermostatic valve's sensed temperature did not settle: " + responses_.back().message;
        responses_.clear();
        return;
      }
    }
  Eigen::MatrixXd a = Eigen::MatrixXd::Identity(n, n);
  Eigen::VectorXd c(n);
  for (size_t i = 0; i < n; ++i) {
    c[i] = z->dT[sensed_[i]];
    for (size_t j = 0; j < n; ++j) a(i, j) -= responses_[j].dT[sensed_[i]];
  }
  const Eigen::VectorXd sp = a.partialPivLu().solve(c);
  for (size_t j = 0; j < n; ++j) {
    z->du += sp[j] * responses_[j].du;
    for (size_t g = 0; g < z->dT.size(); ++g) z->dT[g] += sp[j] * responses_[j].dT[g];
  }
}

double PointTangents::Derivative(const DesignKnob& knob, const StateTangent& t,
                                 const std::function<double(const PointResult&)>& g) {
  double d = NAN;
  Derivatives(knob, t, 1, [&](const PointResult& r, double* v) { v[0] = g(r); }, &d);
  return d;
}

void PointTangents::Derivatives(const DesignKnob& knob, const StateTangent& t, int n,
                                const std::function<void(const PointResult&, double*)>& g, double* out) {
  const double th0 = KnobValue(s_, knob), h = t.step;
  std::fill(out, out + n, NAN);
  if (!t.ok || std::isnan(th0) || n < 1 || n > 4) return;
  up_ = u0_ + h * t.du;
  um_ = u0_ - h * t.du;
  Tp_ = T0_;
  Tm_ = T0_;
  for (size_t i = 0; i < t.dT.size(); ++i) {
    Tp_[i] += h * t.dT[i];
    Tm_[i] -= h * t.dT[i];
  }
  double gp[4], gm[4];
  SetKnobValue(s_, knob, th0 + h);
  g(s_->Describe(op_, up_, Tp_), gp);
  SetKnobValue(s_, knob, th0 - h);
  g(s_->Describe(op_, um_, Tm_), gm);
  SetKnobValue(s_, knob, th0);
  Restore();
  for (int i = 0; i < n; ++i) out[i] = (gp[i] - gm[i]) / (2 * h);
}

}  // namespace loopwright
