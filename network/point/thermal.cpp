#include "network/point/thermal.h"

#include <algorithm>
#include <cmath>

#include <ceres/jet.h>
#include <fmt/format.h>

#include "network/point/sparse_pattern.h"

#include "components/correlations/heat_exchanger.h"
#include "library/enthalpy.h"

namespace loopwright {

namespace {

constexpr double kConductionWK = 1e-6;  // G_c [W/K], see thermal.h
// Largest relative energy closure accepted at a converged point (thermal.h).
constexpr double kClosureTolerance = 1e-9;


// A property with its temperature derivative as a Jet in the variables of T.
template <class J>
J PropJet(double value, double d_dT, const J& t) {
  J out = t * d_dT;
  out.a = value;
  return out;
}

HxArrangement ToHx(int index, bool hot_is_cmin) {
  switch (index) {
    case 0: return HxArrangement::kCounterflow;
    case 1: return HxArrangement::kParallelFlow;
    case 2: return HxArrangement::kShellAndTube1Pass;
    case 3: return HxArrangement::kCrossflowUnmixed;
    case 4: return CrossflowMixedSide(true, hot_is_cmin);
    default: return CrossflowMixedSide(false, hot_is_cmin);
  }
}

}  // namespace

ThermalSystem::ThermalSystem(const Case& cs, const NetworkSystem& sys) : case_(cs), sys_(sys) {
  const auto& nodes = sys.nodes();
  unknown_.assign(nodes.size(), -1);
  fixed_T_.assign(nodes.size(), 0.0);
  node_heat_.assign(nodes.size(), 0.0);
  amb_T_.assign(nodes.size(), 298.15);
  amb_G_.assign(nodes.size(), 0.0);
  drains_to_.assign(nodes.size(), -1);
  node_fluid_.assign(nodes.size(), nullptr);
  std::vector<int> loop_offset(cs.loops.size(), 0);
  for (size_t g = 0; g < nodes.size(); ++g)
    if (nodes[g].node == 0) loop_offset[nodes[g].loop] = static_cast<int>(g);
  for (size_t g = 0; g < nodes.size(); ++g) {
    const NodeSpec& ns = cs.loops[nodes[g].loop].nodes[nodes[g].node];
    node_fluid_[g] = &sys.loop_fluid(nodes[g].loop);
    if (!std::isnan(ns.cond().temperature)) fixed_T_[g] = ns.cond().temperature;
    else unknown_[g] = n_++;
    amb_G_[g] = ns.cond().loss_conductance;
    if (ns.cond().drains_to >= 0) {
      drains_to_[g] = loop_offset[nodes[g].loop] + ns.cond().drains_to;
      drains_.emplace_back(static_cast<int>(g), drains_to_[g]);
    }
  }
  for (const Branch& b : sys.branches())
    is_pump_.push_back((cs.loops[b.loop].components[b.comp].type_info->roles & kRolePump) != 0);
  ReadCouplings();
  sensors_ = SensorSites(cs, sys);
  hold_.assign(nodes.size(), kNoValue);
  for (const CouplingSpec& c : couplings_) case_conductance_.push_back(c.conductance);
  BuildPattern();
  r_.resize(n_);
  dT_.resize(n_);
}

// The couplings of the case, with the branch index of each side.
void ThermalSystem::ReadCouplings() {
  // Branch index of (loop, component).
  std::vector<int> branch_offset(case_.loops.size(), 0);
  for (size_t l = 1; l < case_.loops.size(); ++l)
    branch_offset[l] = branch_offset[l - 1] + static_cast<int>(case_.loops[l - 1].components.size());
  for (const Coupling& cp : case_.couplings) {
    CouplingSpec c;
    c.id = cp.id;
    c.hot_branch = branch_offset[cp.hot_loop] + cp.hot_comp;
    c.cold_branch = branch_offset[cp.cold_loop] + cp.cold_comp;
    c.arrangement = cp.arrangement;
    c.conductance = cp.conductance;
    couplings_.push_back(c);
  }
}

// The sparsity pattern of the energy Jacobian (every branch, coupling and
// drain block) and the value slot of each entry, analysed once.
void ThermalSystem::BuildPattern() {
  const auto& nodes = sys_.nodes();
  std::vector<Eigen::Triplet<double>> trip;
  for (int g = 0; g < static_cast<int>(nodes.size()); ++g)
    if (unknown_[g] >= 0) trip.emplace_back(unknown_[g], unknown_[g], 0.0);
  auto add_block = [&](const std::vector<int>& gn) {
    for (int a : gn)
      for (int b : gn)
        if (unknown_[a] >= 0 && unknown_[b] >= 0) trip.emplace_back(unknown_[a], unknown_[b], 0.0);
  };
  for (const Branch& b : sys_.branches()) add_block({b.from_node, b.to_node});
  for (const auto& c : couplings_) {
    const Branch& h = sys_.branches()[c.hot_branch];
    const Branch& k = sys_.branches()[c.cold_branch];
    add_block({h.from_node, h.to_node, k.from_node, k.to_node});
  }
  for (auto [d, r] : drains_) add_block({d, r});
  J_.resize(n_, n_);
  J_.setFromTriplets(trip.begin(), trip.end());
  J_.makeCompressed();
  auto slots_of = [&](const std::vector<int>& gn) {
    for (int a : gn)
      for (int b : gn) slots_.push_back(unknown_[a] >= 0 && unknown_[b] >= 0 ? FindSlot(J_, unknown_[a], unknown_[b]) : -1);
  };
  for (const Branch& b : sys_.branches()) slots_of({b.from_node, b.to_node});
  coupling_slot0_ = slots_.size();
  for (const auto& c : couplings_) {
    const Branch& h = sys_.branches()[c.hot_branch];
    const Branch& k = sys_.branches()[c.cold_branch];
    slots_of({h.from_node, h.to_node, k.from_node, k.to_node});
  }
  drain_slot0_ = slots_.size();
  for (auto [d, r] : drains_) slots_of({d, r});
  diag_slot_.resize(n_);
  for (int i = 0; i < n_; ++i) diag_slot_[i] = FindSlot(J_, i, i);
}

void ThermalSystem::SetState(const PointState& st) {
  const auto& nodes = sys_.nodes();
  for (size_t g = 0; g < nodes.size(); ++g) {
    if (unknown_[g] < 0) fixed_T_[g] = st.fixed_temperature[g];
    node_heat_[g] = st.node_heat[g];
    amb_T_[g] = st.ambient_temperature[g];
    node_fluid_[g] = &sys_.loop_fluid(nodes[g].loop);
  }
  for (size_t i = 0; i < couplings_.size(); ++i)
    couplings_[i].conductance =
        std::isnan(st.coupling_conductance[i]) ? case_conductance_[i] : st.coupling_conductance[i];
}

void ThermalSystem::InitialTemperatures(const OperatingPoint& op, std::vector<double>* T) const {
  const auto& nodes = sys_.nodes();
  T->resize(nodes.size());
  for (size_t g = 0; g < nodes.size(); ++g) {
    const LoopSpec& loop = case_.loops[nodes[g].loop];
    const double tl = loop.temperature_variable >= 0 && loop.temperature_variable < static_cast<int>(op.values.size())
                          ? op.values[loop.temperature_variable]
                          : loop.temperature;
    (*T)[g] = unknown_[g] < 0 ? fixed_T_[g] : tl;
  }
}

double ThermalSystem::UpwindWeight(double m) const { return 0.5 * (1.0 + std::tanh(m / m_scale_)); }

void ThermalSystem::ApplyBranchFluids(const std::vector<double>& T, const Eigen::VectorXd& u, NetworkSystem* sys) const {
  for (size_t k = 0; k < sys->branches().size(); ++k) {
    const Branch& b = sys->branches()[k];
    const double s = UpwindWeight(u[b.m]);
    const double t = s * T[b.from_node] + (1 - s) * T[b.to_node];
    const double p = case_.ambient_pa + std::max(0.0, s * sys->NodePressure(b.from_node, u) + (1 - s) * sys->NodePressure(b.to_node, u));
    FluidProps f = node_fluid_[b.from_node]->Evaluate(t, p);
    sys->SetBranchFluid(static_cast<int>(k), f.rho, f.mu);
    sys->working_model(k)->FollowStream({t, u[b.m], p, node_fluid_[b.from_node]});
  }
  for (const SensorSite& s : sensors_) WriteSensed(s, std::isnan(hold_[s.node]) ? T[s.node] : hold_[s.node], sys);
}

std::vector<SensorSite> SensorSites(const Case& cs, const NetworkSystem& sys) {
  std::vector<SensorSite> out;
  std::vector<int> node0(cs.loops.size(), 0);
  for (size_t g = 0; g < sys.nodes().size(); ++g)
    if (sys.nodes()[g].node == 0) node0[sys.nodes()[g].loop] = static_cast<int>(g);
  for (size_t k = 0; k < sys.branches().size(); ++k) {
    const Branch& b = sys.branches()[k];
    const ComponentSpec& c = cs.loops[b.loop].components[b.comp];
    if (!(c.type_info->roles & kRoleThermostat) || c.sensed_node() < 0) continue;
    const int i = c.type_info->ParamIndex("sensed_temperature");
    if (i < 0 || !std::isnan(c.model->params()[i])) continue;  // written in the case: held there
    out.push_back({static_cast<int>(k), node0[b.loop] + c.sensed_node(), b.loop});
  }
  return out;
}

void WriteSensed(const SensorSite& site, double t, NetworkSystem* sys) {
  const int i = sys->branch_type(site.branch)->ParamIndex("sensed_temperature");
  if (i >= 0) sys->working_model(site.branch)->params()[i] = t;
}

template <class J>
void ThermalSystem::BranchTerms(size_t k, const Eigen::VectorXd& u, const std::vector<double>& T, bool jac,
                                Eigen::VectorXd* r, double* vals, ThermalReport* rep) const {
  const Branch& b = sys_.branches()[k];
  const double m = u[b.m];
  const double s = UpwindWeight(m);
  J ta(T[b.from_node], 0), tc(T[b.to_node], 1);
  J tup = s * ta + (1 - s) * tc;
  const double p_up = case_.ambient_pa + std::max(0.0, s * sys_.NodePressure(b.from_node, u) + (1 - s) * sys_.NodePressure(b.to_node, u));
  FluidProps f = node_fluid_[b.from_node]->Evaluate(tup.a, p_up);
  J rho = PropJet(f.rho, f.drho_dT, tup);
  const double dp = sys_.NodePressure(b.from_node, u) - sys_.NodePressure(b.to_node, u) +
                    sys_.branch_fluid(static_cast<int>(k)).rho * kGravity * sys_.Dz(b);
  HeatInputs hin;
  hin.m = m;
  hin.dp = dp;
  hin.t_in = HeatJet(tup.a, 0);
  hin.rho = HeatJet(f.rho, 0);
  hin.rho.v[0] = f.drho_dT;
  hin.cp = HeatJet(f.cp, 0);
  hin.cp.v[0] = f.dcp_dT;
  hin.mu = HeatJet(f.mu, 0);
  hin.mu.v[0] = f.dmu_dT;
  hin.fluid = node_fluid_[b.from_node];
  hin.p_abs = case_.ambient_pa;
  HeatJet extra = b.model->HeatAdded(hin);
  // Work heat: the dissipation of the piezometric drop and, for a pump, its
  // shaft power (component.h); left out of the balance with "work_heat": false.
  const J dissipation = (m / rho) * dp;
  const J own = PropJet(extra.a, extra.v[0], tup);
  J heat = case_.work_heat ? dissipation + own : (is_pump_[k] ? J(0.0) : own);
  if (heat_scale_ != 1.0 && heat.a > 0) heat = heat * heat_scale_;  // continuation (thermal.h)
  const double mp = m * s, mm = -m * (1 - s);
  const Fluid& fl = *node_fluid_[b.from_node];
  // Enthalpy at ambient pressure everywhere (its pressure dependence for a
  // liquid, (1 - T beta)/rho dp, is carried by the Q dp term instead).
  const J ha = SpecificEnthalpy(fl, ta, case_.ambient_pa), hc = SpecificEnthalpy(fl, tc, case_.ambient_pa);
  // Axial conduction only along a stopped branch (thermal.h).
  const double th = std::tanh(m / m_scale_), gc = kConductionWK * (1.0 - th * th);
  J ec = mp * (ha - hc) + s * heat + gc * (ta - tc);
  J ea = mm * (hc - ha) + (1 - s) * heat + gc * (tc - ta);
  Deposit(b.from_node, ea.a, r);
  Deposit(b.to_node, ec.a, r);
  if (jac) {
    const int* sl = &slots_[4 * k];
    // rows {a, c} x cols {a, c}
    if (sl[0] >= 0) vals[sl[0]] += ea.v[0];
    if (sl[1] >= 0) vals[sl[1]] += ea.v[1];
    if (sl[2] >= 0) vals[sl[2]] += ec.v[0];
    if (sl[3] >= 0) vals[sl[3]] += ec.v[1];
  }
  if (rep) {
    rep->branch_heat[k] = heat.a;
    rep->branch_work[k] = dissipation.a + (is_pump_[k] ? own.a : 0.0);
    rep->branch_t_in[k] = tup.a;
    rep->branch_cp[k] = f.cp;
  }
}

void ThermalSystem::Deposit(int g, double v, Eigen::VectorXd* r) const {
  if (unknown_[g] >= 0) (*r)[unknown_[g]] += v;
  else if (sink_) (*sink_)[g] += v;
}

void ThermalSystem::Evaluate(const Eigen::VectorXd& u, const std::vector<double>& T, Eigen::VectorXd* r, bool jac,
                             ThermalReport* rep) {
  r->setZero(n_);
  double* vals = J_.valuePtr();
  if (jac) std::fill(vals, vals + J_.nonZeros(), 0.0);
  const auto& branches = sys_.branches();
  using J2 = ceres::Jet<double, 2>;
  using J4 = ceres::Jet<double, 4>;
  if (rep) std::fill(rep->branch_exchanged.begin(), rep->branch_exchanged.end(), 0.0);
  for (size_t k = 0; k < branches.size(); ++k) BranchTerms<J2>(k, u, T, jac, r, vals, rep);
  const auto& nodes = sys_.nodes();
  for (size_t g = 0; g < nodes.size(); ++g) {
    Deposit(static_cast<int>(g), NodeHeat(g) - amb_G_[g] * (T[g] - amb_T_[g]), r);
    if (jac && unknown_[g] >= 0) vals[diag_slot_[unknown_[g]]] -= amb_G_[g];
  }
  if (!drains_.empty()) DrainTerms(u, T, jac, r, vals);
  // Couplings.
  for (size_t ci = 0; ci < couplings_.size(); ++ci) {
    const CouplingSpec& c = couplings_[ci];
    const Branch& h = branches[c.hot_branch];
    const Branch& k = branches[c.cold_branch];
    const int g[4] = {h.from_node, h.to_node, k.from_node, k.to_node};
    J4 t[4];
    for (int i = 0; i < 4; ++i) t[i] = J4(T[g[i]], i);
    const double sh = UpwindWeight(u[h.m]), sk = UpwindWeight(u[k.m]);
    J4 th = sh * t[0] + (1 - sh) * t[1];
    J4 tk = sk * t[2] + (1 - sk) * t[3];
    // Capacity rates: each stream's mean cp over its own temperature change,
    // C = |m| dh / dT (library/enthalpy.h), implicit in the duty.
    const Fluid &flh = *node_fluid_[h.from_node], &flk = *node_fluid_[k.from_node];
    const double mh = u[h.m], mk = u[k.m], pa = case_.ambient_pa;
    auto cap_h = [&](const J4& q) { return mh == 0 ? J4(0.0) : MeanCapacityRate(flh, mh, th, J4(-q / std::abs(mh)), pa); };
    auto cap_k = [&](const J4& q) { return mk == 0 ? J4(0.0) : MeanCapacityRate(flk, mk, tk, J4(q / std::abs(mk)), pa); };
    const J4 q = HeatExchangedImplicit([&](bool hot_is_cmin) { return ToHx(c.arrangement, hot_is_cmin); },
                                       J4(c.conductance), cap_h, cap_k, th, tk);
    const J4 contrib[4] = {-(1 - sh) * q, -sh * q, (1 - sk) * q, sk * q};
    for (int i = 0; i < 4; ++i) {
      Deposit(g[i], contrib[i].a, r);
      if (jac) {
        const int* sl = &slots_[coupling_slot0_ + 16 * ci + 4 * i];
        for (int j = 0; j < 4; ++j)
          if (sl[j] >= 0) vals[sl[j]] += contrib[i].v[j];
      }
    }
    if (rep) {
      rep->branch_exchanged[c.hot_branch] -= q.a;
      rep->branch_exchanged[c.cold_branch] += q.a;
      rep->coupling_duty[ci] = q.a;
      rep->coupling_hot_in[ci] = th.a;
      rep->coupling_cold_in[ci] = tk.a;
      const double cmin = std::min(cap_h(q).a, cap_k(q).a);
      rep->coupling_effectiveness[ci] = cmin > 0 && th.a != tk.a ? q.a / (cmin * (th.a - tk.a)) : 0.0;
    }
  }
}

// Drains (thermal.h): a draining boundary d delivers the net flow arriving
// at it, n = arriving - departing, to its receiver r when n > 0; when n < 0
// (a bearing drawing oil back out of its housing) the shortfall comes from r
// at r's temperature. Both sides are weighted smoothly, n+ = n (1 + tanh(n /
// m_s)) / 2 and n- = n+ - n, like the upwind weights; for an ordinary drain
// n+ is the arriving flow exactly, as before. The tie G_d (T_r - T_d) holds a
// boundary that nothing reaches at its receiver's temperature.
void ThermalSystem::DrainTerms(const Eigen::VectorXd& u, const std::vector<double>& T, bool jac, Eigen::VectorXd* r,
                               double* vals) {
  using J2 = ceres::Jet<double, 2>;
  drain_in_.assign(T.size(), 0.0);
  drain_out_.assign(T.size(), 0.0);
  for (const Branch& b : sys_.branches()) {
    const double m = u[b.m], s = UpwindWeight(m);
    drain_in_[b.to_node] += m * s;
    drain_out_[b.from_node] += m * s;
    drain_in_[b.from_node] += -m * (1 - s);
    drain_out_[b.to_node] += -m * (1 - s);
  }
  for (size_t i = 0; i < drains_.size(); ++i) {
    auto [d, rr] = drains_[i];
    const double n = drain_in_[d] - drain_out_[d];
    const double n_plus = n * UpwindWeight(n), n_minus = n_plus - n;
    const double th = std::tanh(drain_in_[d] / m_scale_), gd = kConductionWK * (1.0 - th * th);
    J2 td(T[d], 0), tr(T[rr], 1);
    const J2 dh = SpecificEnthalpy(*node_fluid_[d], td, case_.ambient_pa) - SpecificEnthalpy(*node_fluid_[d], tr, case_.ambient_pa);
    const J2 at_r = n_plus * dh + gd * (td - tr);
    const J2 at_d = -n_minus * dh + gd * (tr - td);
    Deposit(d, at_d.a, r);
    Deposit(rr, at_r.a, r);
    if (jac) {
      const int* sl = &slots_[drain_slot0_ + 4 * i];
      if (sl[0] >= 0) vals[sl[0]] += at_d.v[0];
      if (sl[1] >= 0) vals[sl[1]] += at_d.v[1];
      if (sl[2] >= 0) vals[sl[2]] += at_r.v[0];
      if (sl[3] >= 0) vals[sl[3]] += at_r.v[1];
    }
  }
}

void ThermalSystem::OutletTemperatures(const Eigen::VectorXd& u, ThermalReport* rep) const {
  // The stream leaves at h(t_in) + (H_b + coupling duty received)/|m|
  // (library/enthalpy.h): the temperature of a node this branch alone feeds.
  const auto& branches = sys_.branches();
  for (size_t k = 0; k < branches.size(); ++k) {
    const double am = std::abs(u[branches[k].m]), t_in = rep->branch_t_in[k];
    const double dh = (rep->branch_heat[k] + rep->branch_exchanged[k]) / am;
    rep->branch_t_out[k] = am > 100 * m_scale_ ? TemperatureAfter(*node_fluid_[branches[k].from_node], t_in, dh, case_.ambient_pa) : t_in;
  }
}

namespace {

void SizeReport(size_t branches, size_t couplings, ThermalReport* rep) {
  rep->branch_heat.assign(branches, 0.0);
  rep->branch_work.assign(branches, 0.0);
  rep->branch_exchanged.assign(branches, 0.0);
  rep->branch_t_in.assign(branches, 0.0);
  rep->branch_t_out.assign(branches, 0.0);
  rep->branch_cp.assign(branches, 0.0);
  rep->coupling_duty.assign(couplings, 0.0);
  rep->coupling_effectiveness.assign(couplings, 0.0);
  rep->coupling_hot_in.assign(couplings, 0.0);
  rep->coupling_cold_in.assign(couplings, 0.0);
}

}  // namespace

void ThermalSystem::Residuals(const Eigen::VectorXd& u, const std::vector<double>& T, Eigen::VectorXd* r,
                              ThermalReport* rep) {
  if (rep) SizeReport(sys_.branches().size(), couplings_.size(), rep);
  Evaluate(u, T, r, false, rep);
  if (rep) Account(u, T, rep);
}

const Eigen::SparseMatrix<double>& ThermalSystem::Jacobian(const Eigen::VectorXd& u, const std::vector<double>& T) {
  Evaluate(u, T, &r_, true, nullptr);
  return J_;
}

bool ThermalSystem::Solve(const Eigen::VectorXd& u, std::vector<double>* T, ThermalReport* rep) {
  const auto& branches = sys_.branches();
  double mmax = 0;
  for (const Branch& b : branches) mmax = std::max(mmax, std::abs(u[b.m]));
  m_scale_ = std::max(1e-12, 1e-9 * mmax);
  SizeReport(branches.size(), couplings_.size(), rep);
  const auto& nodes = sys_.nodes();
  for (size_t g = 0; g < nodes.size(); ++g)
    if (unknown_[g] < 0) (*T)[g] = fixed_T_[g];
  rep->converged = false;
  rep->failure.clear();
  if (n_ == 0) {
    Evaluate(u, *T, &r_, false, rep);
    rep->converged = true;
    return true;
  }
  bool evaluated = false;  // r_, J_ and rep already at *T (LineSearch)
  for (int it = 0; it < 60; ++it) {
    if (!evaluated) Evaluate(u, *T, &r_, true, rep);
    // Tolerance: 1e-12 of the larger of the through-flow heat capacity rate
    // times 1 K and the largest branch heat (rounding of the node balances is
    // ~1e-14 of it), so that a node temperature agrees with the outlet
    // temperature of the branch feeding it to ~1e-12 K per W/K of through-flow.
    double scale = 1.0;
    for (size_t k = 0; k < branches.size(); ++k)
      scale = std::max({scale, std::abs(u[branches[k].m]) * rep->branch_cp[k], std::abs(rep->branch_heat[k])});
    const double rmax = r_.lpNorm<Eigen::Infinity>();
    rep->max_residual_W = rmax;
    rep->iterations = it;
    if (!std::isfinite(rmax)) return false;
    if (rmax <= 1e-12 * scale) {
      rep->converged = true;
      break;
    }
    if (!NewtonStep()) return false;
    // Damped step: no temperature moves by more than 50 K at once.
    const double big = dT_.lpNorm<Eigen::Infinity>();
    evaluated = LineSearch(u, big > 50.0 ? 50.0 / big : 1.0, T, rep);
  }
  return rep->converged;
}

bool ThermalSystem::NewtonStep() {
  if (n_ <= kDenseMax) {
    Jd_.setZero(n_, n_);
    for (int c = 0; c < J_.outerSize(); ++c)
      for (Eigen::SparseMatrix<double>::InnerIterator it(J_, c); it; ++it) Jd_(it.row(), c) = it.value();
    dense_lu_.compute(Jd_);
    // A zero pivot is what the sparse LU reports as a failure.
    if ((dense_lu_.matrixLU().diagonal().array() == 0.0).any()) return false;
    dT_ = dense_lu_.solve(r_);
  } else {
    if (!analyzed_) {
      lu_.analyzePattern(J_);
      analyzed_ = true;
    }
    lu_.factorize(J_);
    if (lu_.info() != Eigen::Success) return false;
    dT_ = lu_.solve(r_);
  }
  return dT_.allFinite();
}

// Backtracking on the squared norm of the node balances [W^2]: the step
// -alpha dT is halved until the balances shrink (Armijo, 1e-4), so the
// iteration cannot cycle between two states (a damped Newton step on a
// strongly nonlinear balance, e.g. a starved bearing's rise, once
// alternated between 377.7 K and 427.7 K at one node forever). If no
// fraction down to 2^-20 decreases them, the smallest step is taken and the
// tolerance test of the next pass decides.
// The first trial (the whole step, nearly always taken) is evaluated with
// its Jacobian, which the next Newton iteration then reuses: the same
// function of the same temperatures, so nothing changes but the work.
bool ThermalSystem::LineSearch(const Eigen::VectorXd& u, double alpha, std::vector<double>* T, ThermalReport* rep) {
  const auto& nodes = sys_.nodes();
  const double f0 = r_.squaredNorm();
  for (int halving = 0; halving <= 20; ++halving, alpha *= 0.5) {
    T_trial_ = *T;
    for (size_t g = 0; g < nodes.size(); ++g)
      if (unknown_[g] >= 0) T_trial_[g] -= alpha * dT_[unknown_[g]];
    Evaluate(u, T_trial_, &r_trial_, halving == 0, rep);
    const double f1 = r_trial_.squaredNorm();
    if (std::isfinite(f1) && f1 <= (1.0 - 2e-4 * alpha) * f0) {
      T->swap(T_trial_);
      if (halving > 0) return false;
      r_.swap(r_trial_);
      return true;
    }
  }
  T->swap(T_trial_);
  return false;
}

bool ThermalSystem::Finish(const Eigen::VectorXd& u, const std::vector<double>& T, ThermalReport* rep) {
  Account(u, T, rep);
  for (size_t l = 0; l < rep->loop_closure.size(); ++l)
    if (!(rep->loop_closure[l] <= kClosureTolerance)) {
      rep->converged = false;
      rep->failure = fmt::format(
          "the energy balance of loop {} does not close: heat added {:.6g} W, removed {:.6g} W, carried out through "
          "its boundaries {:.6g} W, {:.3g} W unaccounted ({:.2g} of the loop's heat; allowed {:g})",
          case_.loops[l].id, rep->loop_heat_added[l], rep->loop_heat_removed[l], rep->loop_heat_carried[l],
          rep->loop_closure_W[l], rep->loop_closure[l], kClosureTolerance);
      return false;
    }
  return true;
}

void ThermalSystem::Account(const Eigen::VectorXd& u, const std::vector<double>& T, ThermalReport* rep) {
  OutletTemperatures(u, rep);
  const auto& branches = sys_.branches();
  const auto& nodes = sys_.nodes();
  const size_t nl = case_.loops.size();
  rep->loop_heat_added.assign(nl, 0.0);
  rep->loop_heat_removed.assign(nl, 0.0);
  rep->loop_heat_carried.assign(nl, 0.0);
  rep->loop_work_heat.assign(nl, 0.0);
  rep->loop_closure.assign(nl, 0.0);
  rep->loop_closure_W.assign(nl, 0.0);
  std::vector<double> flow_scale(nl, 0.0);
  for (size_t k = 0; k < branches.size(); ++k) {
    const int l = branches[k].loop;
    const double h = rep->branch_heat[k];
    (h > 0 ? rep->loop_heat_added : rep->loop_heat_removed)[l] += std::abs(h);
    rep->loop_work_heat[l] += rep->branch_work[k];
    flow_scale[l] = std::max(flow_scale[l], std::abs(u[branches[k].m]) * rep->branch_cp[k]);
  }
  for (size_t g = 0; g < nodes.size(); ++g) {
    const int l = nodes[g].loop;
    (node_heat_[g] > 0 ? rep->loop_heat_added : rep->loop_heat_removed)[l] += std::abs(NodeHeat(g));
    rep->loop_heat_removed[l] += amb_G_[g] * (T[g] - amb_T_[g]);
  }
  for (size_t ci = 0; ci < couplings_.size(); ++ci) {
    const double q = rep->coupling_duty[ci];
    rep->loop_heat_removed[branches[couplings_[ci].hot_branch].loop] += q;
    rep->loop_heat_added[branches[couplings_[ci].cold_branch].loop] += q;
  }
  // Net enthalpy carried out of each loop through its boundary nodes:
  // (arriving - departing mass flow) h(T_B), with drains moved from their
  // source to their receiver, plus the heat a fixed-temperature node absorbs
  // to hold its temperature (its balance as if its temperature were free).
  std::vector<double> arriving(nodes.size(), 0.0), departing(nodes.size(), 0.0), absorbed(nodes.size(), 0.0);
  for (const Branch& b : branches) {
    const double m = u[b.m], s = UpwindWeight(m);
    arriving[b.to_node] += m * s;
    departing[b.from_node] += m * s;
    arriving[b.from_node] += -m * (1 - s);
    departing[b.to_node] += -m * (1 - s);
  }
  for (auto [d, rr] : drains_) {
    const double md = arriving[d] - departing[d];
    departing[d] += md;
    arriving[rr] += md;
  }
  sink_ = &absorbed;
  Eigen::VectorXd r;
  Evaluate(u, T, &r, false, nullptr);
  sink_ = nullptr;
  for (size_t g = 0; g < nodes.size(); ++g) {
    if (nodes[g].unknown >= 0 && unknown_[g] >= 0) continue;  // interior node with a free temperature
    const double h = SpecificEnthalpy(*node_fluid_[g], T[g], case_.ambient_pa);
    rep->loop_heat_carried[nodes[g].loop] += (arriving[g] - departing[g]) * h + absorbed[g];
  }
  // Closure: what the first law leaves unaccounted, in W and relative to the
  // loop's largest heat flow (heat added, removed, or its largest through-flow
  // heat capacity rate times 1 K), so that a loop with no heat is not
  // divided by zero.
  for (size_t l = 0; l < nl; ++l) {
    rep->loop_closure_W[l] = rep->loop_heat_added[l] - rep->loop_heat_removed[l] - rep->loop_heat_carried[l];
    const double ref = std::max({rep->loop_heat_added[l], rep->loop_heat_removed[l], flow_scale[l] * 1.0, 1e-300});
    rep->loop_closure[l] = std::abs(rep->loop_closure_W[l]) / ref;
  }
}

}  // namespace loopwright
