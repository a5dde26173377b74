#include "network/thermal.h"

#include <algorithm>
#include <cmath>

#include <ceres/jet.h>
#include <fmt/format.h>

#include "network/sparse_pattern.h"

#include "components/correlations/heat_exchanger.h"

namespace loopwright {

const std::vector<std::string>& HeatExchangerArrangements();

namespace {

constexpr double kConductionWK = 1e-6;  // G_c [W/K], see thermal.h


// A property with its temperature derivative as a Jet in the variables of T.
template <class J>
J PropJet(double value, double d_dT, const J& t) {
  J out = t * d_dT;
  out.a = value;
  return out;
}

// Specific enthalpy relative to kRefT, h(T) = integral of cp from kRefT to T,
// by 3-point Gauss-Legendre quadrature (exact for cp cubic in T; the oil
// models' cp is linear), as a Jet: value from the quadrature, derivative
// cp(T). Differences of h make the node balances telescope, so the energy of
// a loop closes to rounding whatever the shape of cp(T).
constexpr double kRefT = 298.15;

template <class J>
J Enthalpy(const Fluid& f, const J& t, double p_abs) {
  const double a = kRefT, b = t.a;
  const double mid = 0.5 * (a + b), half = 0.5 * (b - a);
  static const double x[3] = {-0.7745966692414834, 0.0, 0.7745966692414834};
  static const double w[3] = {5.0 / 9.0, 8.0 / 9.0, 5.0 / 9.0};
  double h = 0;
  for (int i = 0; i < 3; ++i) h += w[i] * f.Evaluate(mid + half * x[i], p_abs).cp;
  h *= half;
  return PropJet(h, f.Evaluate(b, p_abs).cp, t);
}

double ParseSi(const nlohmann::json& j, Dimension dim) {
  if (j.is_number()) return j.get<double>();
  ParsedQuantity q = ParseQuantity(j.get<std::string>(), dim);
  return q.si;
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
    node_fluid_[g] = cs.loops[nodes[g].loop].fluid.get();
    if (!std::isnan(ns.temperature)) fixed_T_[g] = ns.temperature;
    else unknown_[g] = n_++;
    amb_G_[g] = ns.loss_conductance;
    if (ns.drains_to >= 0) {
      drains_to_[g] = loop_offset[nodes[g].loop] + ns.drains_to;
      drains_.emplace_back(static_cast<int>(g), drains_to_[g]);
    }
  }
  // Branch index of (loop, component).
  std::vector<int> branch_offset(cs.loops.size(), 0);
  for (size_t l = 1; l < cs.loops.size(); ++l)
    branch_offset[l] = branch_offset[l - 1] + static_cast<int>(cs.loops[l - 1].components.size());
  auto branch_of = [&](const std::string& ref) {
    size_t slash = ref.find('/');
    std::string lid = ref.substr(0, slash), cid = ref.substr(slash + 1);
    for (size_t l = 0; l < cs.loops.size(); ++l)
      if (cs.loops[l].id == lid) return branch_offset[l] + cs.loops[l].ComponentIndex(cid);
    return -1;
  };
  for (const auto& cj : cs.couplings) {
    CouplingSpec c;
    c.id = cj.value("id", "");
    c.hot_branch = branch_of(cj["hot"].get<std::string>());
    c.cold_branch = branch_of(cj["cold"].get<std::string>());
    const auto& names = HeatExchangerArrangements();
    c.arrangement = static_cast<int>(std::find(names.begin(), names.end(), cj["arrangement"].get<std::string>()) - names.begin());
    c.conductance = ParseSi(cj["conductance"], Dimension::kConductance);
    couplings_.push_back(c);
  }
  // Pattern.
  std::vector<Eigen::Triplet<double>> trip;
  for (int g = 0; g < static_cast<int>(nodes.size()); ++g)
    if (unknown_[g] >= 0) trip.emplace_back(unknown_[g], unknown_[g], 0.0);
  auto add_block = [&](const std::vector<int>& gn) {
    for (int a : gn)
      for (int b : gn)
        if (unknown_[a] >= 0 && unknown_[b] >= 0) trip.emplace_back(unknown_[a], unknown_[b], 0.0);
  };
  for (const Branch& b : sys.branches()) add_block({b.from_node, b.to_node});
  for (const auto& c : couplings_) {
    const Branch& h = sys.branches()[c.hot_branch];
    const Branch& k = sys.branches()[c.cold_branch];
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
  for (const Branch& b : sys.branches()) slots_of({b.from_node, b.to_node});
  coupling_slot0_ = slots_.size();
  for (const auto& c : couplings_) {
    const Branch& h = sys.branches()[c.hot_branch];
    const Branch& k = sys.branches()[c.cold_branch];
    slots_of({h.from_node, h.to_node, k.from_node, k.to_node});
  }
  drain_slot0_ = slots_.size();
  for (auto [d, r] : drains_) slots_of({d, r});
  diag_slot_.resize(n_);
  for (int i = 0; i < n_; ++i) diag_slot_[i] = FindSlot(J_, i, i);
  r_.resize(n_);
  dT_.resize(n_);
}

void ThermalSystem::SetPoint(const OperatingPoint& op) {
  const auto& nodes = sys_.nodes();
  auto var = [&](int v, double fallback) { return v >= 0 && v < static_cast<int>(op.values.size()) ? op.values[v] : fallback; };
  for (size_t g = 0; g < nodes.size(); ++g) {
    const NodeSpec& ns = case_.loops[nodes[g].loop].nodes[nodes[g].node];
    if (unknown_[g] < 0) fixed_T_[g] = var(ns.temperature_variable, ns.temperature);
    node_heat_[g] = var(ns.heat_variable, ns.heat);
    amb_T_[g] = var(ns.ambient_variable, ns.ambient_temperature);
  }
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
  }
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
                    sys_.branch_fluid(static_cast<int>(k)).rho * kGravity * b.dz;
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
  HeatJet extra = b.model->HeatAdded(hin);
  J heat = (m / rho) * dp + PropJet(extra.a, extra.v[0], tup);
  const double mp = m * s, mm = -m * (1 - s);
  const Fluid& fl = *node_fluid_[b.from_node];
  // Enthalpy at ambient pressure everywhere (its pressure dependence for a
  // liquid, (1 - T beta)/rho dp, is carried by the Q dp term instead).
  const J ha = Enthalpy(fl, ta, case_.ambient_pa), hc = Enthalpy(fl, tc, case_.ambient_pa);
  J ec = mp * (ha - hc) + s * heat + kConductionWK * (ta - tc);
  J ea = mm * (hc - ha) + (1 - s) * heat + kConductionWK * (tc - ta);
  const int ua = unknown_[b.from_node], uc = unknown_[b.to_node];
  if (ua >= 0) (*r)[ua] += ea.a;
  if (uc >= 0) (*r)[uc] += ec.a;
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
    rep->branch_t_in[k] = tup.a;
    rep->branch_cp[k] = f.cp;
    const double am = std::abs(m);
    rep->branch_t_out[k] = am > 100 * m_scale_ ? tup.a + heat.a / (am * f.cp) : tup.a;
  }
}

void ThermalSystem::Evaluate(const Eigen::VectorXd& u, const std::vector<double>& T, Eigen::VectorXd* r, bool jac,
                             ThermalReport* rep) {
  r->setZero(n_);
  double* vals = J_.valuePtr();
  if (jac) std::fill(vals, vals + J_.nonZeros(), 0.0);
  const auto& branches = sys_.branches();
  using J2 = ceres::Jet<double, 2>;
  using J4 = ceres::Jet<double, 4>;
  for (size_t k = 0; k < branches.size(); ++k) BranchTerms<J2>(k, u, T, jac, r, vals, rep);
  const auto& nodes = sys_.nodes();
  for (size_t g = 0; g < nodes.size(); ++g) {
    const int i = unknown_[g];
    if (i < 0) continue;
    (*r)[i] += node_heat_[g] - amb_G_[g] * (T[g] - amb_T_[g]);
    if (jac) vals[diag_slot_[i]] -= amb_G_[g];
  }
  // Drains: the inflow arriving at d is delivered to reservoir r.
  if (!drains_.empty()) {
    std::vector<double> inflow(nodes.size(), 0.0);
    for (const Branch& b : branches) {
      const double m = u[b.m], s = UpwindWeight(m);
      inflow[b.to_node] += m * s;
      inflow[b.from_node] += -m * (1 - s);
    }
    for (size_t i = 0; i < drains_.size(); ++i) {
      auto [d, rr] = drains_[i];
      J2 td(T[d], 0), tr(T[rr], 1);
      J2 e = inflow[d] * (Enthalpy(*node_fluid_[d], td, case_.ambient_pa) - Enthalpy(*node_fluid_[d], tr, case_.ambient_pa));
      if (unknown_[rr] >= 0) (*r)[unknown_[rr]] += e.a;
      if (jac) {
        const int* sl = &slots_[drain_slot0_ + 4 * i];
        if (sl[2] >= 0) vals[sl[2]] += e.v[0];
        if (sl[3] >= 0) vals[sl[3]] += e.v[1];
      }
    }
  }
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
    FluidProps fh = node_fluid_[h.from_node]->Evaluate(th.a, case_.ambient_pa);
    FluidProps fk = node_fluid_[k.from_node]->Evaluate(tk.a, case_.ambient_pa);
    J4 ch = std::abs(u[h.m]) * PropJet(fh.cp, fh.dcp_dT, th);
    J4 ck = std::abs(u[k.m]) * PropJet(fk.cp, fk.dcp_dT, tk);
    const HxArrangement arr = ToHx(c.arrangement, ch.a <= ck.a);
    J4 q = HeatExchanged(arr, J4(c.conductance), ch, ck, th, tk);
    const J4 contrib[4] = {-(1 - sh) * q, -sh * q, (1 - sk) * q, sk * q};
    for (int i = 0; i < 4; ++i) {
      if (unknown_[g[i]] >= 0) (*r)[unknown_[g[i]]] += contrib[i].a;
      if (jac) {
        const int* sl = &slots_[coupling_slot0_ + 16 * ci + 4 * i];
        for (int j = 0; j < 4; ++j)
          if (sl[j] >= 0) vals[sl[j]] += contrib[i].v[j];
      }
    }
    if (rep) {
      rep->coupling_duty[ci] = q.a;
      rep->coupling_hot_in[ci] = th.a;
      rep->coupling_cold_in[ci] = tk.a;
      const double cmin = std::min(ch.a, ck.a);
      rep->coupling_effectiveness[ci] = cmin > 0 && th.a != tk.a ? q.a / (cmin * (th.a - tk.a)) : 0.0;
    }
  }
}

namespace {

void SizeReport(size_t branches, size_t couplings, ThermalReport* rep) {
  rep->branch_heat.assign(branches, 0.0);
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
  if (n_ == 0) {
    Evaluate(u, *T, &r_, false, rep);
    rep->converged = true;
    return true;
  }
  for (int it = 0; it < 30; ++it) {
    Evaluate(u, *T, &r_, true, rep);
    // Tolerance: 1e-10 of the larger of the through-flow heat capacity rate
    // times 1 K and the largest branch heat.
    double scale = 1.0;
    for (size_t k = 0; k < branches.size(); ++k)
      scale = std::max({scale, std::abs(u[branches[k].m]) * rep->branch_cp[k], std::abs(rep->branch_heat[k])});
    const double rmax = r_.lpNorm<Eigen::Infinity>();
    rep->max_residual_W = rmax;
    rep->iterations = it;
    if (!std::isfinite(rmax)) return false;
    if (rmax <= 1e-10 * scale) {
      rep->converged = true;
      break;
    }
    if (!analyzed_) {
      lu_.analyzePattern(J_);
      analyzed_ = true;
    }
    lu_.factorize(J_);
    if (lu_.info() != Eigen::Success) return false;
    dT_ = lu_.solve(r_);
    if (!dT_.allFinite()) return false;
    // Damped step: no temperature moves by more than 50 K at once.
    const double big = dT_.lpNorm<Eigen::Infinity>();
    const double alpha = big > 50.0 ? 50.0 / big : 1.0;
    for (size_t g = 0; g < nodes.size(); ++g)
      if (unknown_[g] >= 0) (*T)[g] -= alpha * dT_[unknown_[g]];
  }
  if (!rep->converged) return false;
  // Energy accounting per loop.
  const size_t nl = case_.loops.size();
  rep->loop_heat_added.assign(nl, 0.0);
  rep->loop_heat_removed.assign(nl, 0.0);
  rep->loop_closure.assign(nl, 0.0);
  std::vector<double> imbalance(nl, 0.0);
  for (size_t k = 0; k < branches.size(); ++k) {
    const double h = rep->branch_heat[k];
    (h > 0 ? rep->loop_heat_added : rep->loop_heat_removed)[branches[k].loop] += std::abs(h);
  }
  for (size_t g = 0; g < nodes.size(); ++g) {
    const int l = nodes[g].loop;
    if (node_heat_[g] > 0) rep->loop_heat_added[l] += node_heat_[g];
    else rep->loop_heat_removed[l] -= node_heat_[g];
    rep->loop_heat_removed[l] += amb_G_[g] * ((*T)[g] - amb_T_[g]);
    if (unknown_[g] >= 0) imbalance[l] += r_[unknown_[g]];
  }
  for (size_t ci = 0; ci < couplings_.size(); ++ci) {
    const double q = rep->coupling_duty[ci];
    rep->loop_heat_removed[branches[couplings_[ci].hot_branch].loop] += q;
    rep->loop_heat_added[branches[couplings_[ci].cold_branch].loop] += q;
  }
  // Net enthalpy carried out of each loop through its boundary nodes:
  // (arriving - departing mass flow) h(T_B), plus what a fixed-temperature
  // boundary absorbs, with drains moved from their source to their receiver.
  std::vector<double> carried(nl, 0.0), arriving(nodes.size(), 0.0), departing(nodes.size(), 0.0);
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
  Eigen::VectorXd r_fixed;
  std::vector<double> absorbed(nodes.size(), 0.0);
  {
    // Residuals at fixed-temperature nodes: evaluate the node balance as if
    // their temperature were unknown.
    for (size_t k = 0; k < branches.size(); ++k) {
      const Branch& b = branches[k];
      const double m = u[b.m], s = UpwindWeight(m);
      const Fluid& fl = *node_fluid_[b.from_node];
      const double ha = Enthalpy(fl, ceres::Jet<double, 1>((*T)[b.from_node]), case_.ambient_pa).a;
      const double hc = Enthalpy(fl, ceres::Jet<double, 1>((*T)[b.to_node]), case_.ambient_pa).a;
      if (unknown_[b.to_node] < 0) absorbed[b.to_node] += m * s * (ha - hc) + s * rep->branch_heat[k];
      if (unknown_[b.from_node] < 0) absorbed[b.from_node] += -m * (1 - s) * (hc - ha) + (1 - s) * rep->branch_heat[k];
    }
  }
  for (size_t g = 0; g < nodes.size(); ++g) {
    const bool boundary = nodes[g].unknown < 0;
    if (!boundary && unknown_[g] >= 0) continue;
    const double h = Enthalpy(*node_fluid_[g], ceres::Jet<double, 1>((*T)[g]), case_.ambient_pa).a;
    carried[nodes[g].loop] += (arriving[g] - departing[g]) * h + absorbed[g];
  }
  for (size_t l = 0; l < nl; ++l)
    rep->loop_closure[l] = std::abs(rep->loop_heat_added[l] - rep->loop_heat_removed[l] - carried[l] + imbalance[l] * 0.0) /
                           std::max(rep->loop_heat_added[l], 1e-300);
  return true;
}

}  // namespace loopwright
