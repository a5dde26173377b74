#include "network/system.h"

#include <Eigen/SparseCholesky>

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

namespace loopwright {

namespace {

// Position of (row, col) in the compressed-column value array.
int FindSlot(const Eigen::SparseMatrix<double>& a, int row, int col) {
  const int* outer = a.outerIndexPtr();
  const int* inner = a.innerIndexPtr();
  const int* begin = inner + outer[col];
  const int* end = inner + outer[col + 1];
  const int* it = std::lower_bound(begin, end, row);
  return (it != end && *it == row) ? static_cast<int>(it - inner) : -1;
}

}  // namespace

NetworkSystem::NetworkSystem(const Case& cs) : case_(cs) {
  // Number the nodes and their pressure unknowns.
  int unknown = 0;
  for (size_t l = 0; l < cs.loops.size(); ++l) {
    loop_node_offset_.push_back(static_cast<int>(nodes_.size()));
    for (size_t i = 0; i < cs.loops[l].nodes.size(); ++i) {
      const NodeSpec& ns = cs.loops[l].nodes[i];
      NodeRef nr;
      nr.loop = static_cast<int>(l);
      nr.node = static_cast<int>(i);
      nr.elevation = ns.elevation;
      if (ns.boundary == BoundaryKind::kNone) nr.unknown = unknown++;
      nodes_.push_back(nr);
    }
  }
  // Branches: flow and internal unknowns.
  for (size_t l = 0; l < cs.loops.size(); ++l) {
    const LoopSpec& loop = cs.loops[l];
    for (size_t c = 0; c < loop.components.size(); ++c) {
      const ComponentSpec& spec = loop.components[c];
      Branch b;
      b.loop = static_cast<int>(l);
      b.comp = static_cast<int>(c);
      b.model = spec.model.get();
      b.from_node = loop_node_offset_[l] + spec.from;
      b.to_node = loop_node_offset_[l] + spec.to;
      b.p_from = nodes_[b.from_node].unknown;
      b.p_to = nodes_[b.to_node].unknown;
      b.dz = nodes_[b.from_node].elevation - nodes_[b.to_node].elevation;
      b.m = unknown++;
      b.nint = b.model->NumInternal();
      b.x0 = b.nint > 0 ? unknown : -1;
      unknown += b.nint;
      branches_.push_back(b);
    }
  }
  n_ = unknown;
  // Rows: component laws, then mass balances.
  int row = 0;
  for (size_t k = 0; k < branches_.size(); ++k) {
    Branch& b = branches_[k];
    b.row0 = row;
    for (int r = 0; r <= b.nint; ++r) {
      row_kinds_.push_back(b.model->Kind(r) == ResidualKind::kPressure ? RowKind::kPressure : RowKind::kVolumeFlow);
      row_owner_.push_back(static_cast<int>(k));
      ++row;
    }
  }
  for (size_t g = 0; g < nodes_.size(); ++g) {
    if (nodes_[g].unknown < 0) continue;
    nodes_[g].row = row++;
    row_kinds_.push_back(RowKind::kMassBalance);
    row_owner_.push_back(-1 - static_cast<int>(g));
  }
  // Pattern.
  std::vector<Eigen::Triplet<double>> trip;
  trip.reserve(branches_.size() * 8);
  for (const Branch& b : branches_) {
    int vars[3 + kMaxInternal] = {b.p_from, b.p_to, b.m, -1, -1};
    for (int i = 0; i < b.nint; ++i) vars[3 + i] = b.x0 + i;
    for (int r = 0; r <= b.nint; ++r)
      for (int v = 0; v < 3 + kMaxInternal; ++v)
        if (vars[v] >= 0) trip.emplace_back(b.row0 + r, vars[v], 0.0);
    if (nodes_[b.from_node].row >= 0) trip.emplace_back(nodes_[b.from_node].row, b.m, 0.0);
    if (nodes_[b.to_node].row >= 0) trip.emplace_back(nodes_[b.to_node].row, b.m, 0.0);
  }
  jac_.resize(n_, n_);
  jac_.setFromTriplets(trip.begin(), trip.end());
  jac_.makeCompressed();
  for (Branch& b : branches_) {
    int vars[3 + kMaxInternal] = {b.p_from, b.p_to, b.m, -1, -1};
    for (int i = 0; i < b.nint; ++i) vars[3 + i] = b.x0 + i;
    for (int r = 0; r <= kMaxInternal; ++r)
      for (int v = 0; v < 3 + kMaxInternal; ++v)
        b.slot[r][v] = (r <= b.nint && vars[v] >= 0) ? FindSlot(jac_, b.row0 + r, vars[v]) : -1;
    // Mass-balance entries are constant: the flow leaves `from`, enters `to`.
    if (nodes_[b.from_node].row >= 0) jac_.valuePtr()[FindSlot(jac_, nodes_[b.from_node].row, b.m)] = -1.0;
    if (nodes_[b.to_node].row >= 0) jac_.valuePtr()[FindSlot(jac_, nodes_[b.to_node].row, b.m)] = 1.0;
  }
  loop_states_.resize(cs.loops.size());
  boundary_p_.assign(nodes_.size(), 0.0);
}

void NetworkSystem::SetPoint(const std::vector<LoopState>& loops, const std::vector<double>& boundary_pressure) {
  loop_states_ = loops;
  boundary_p_ = boundary_pressure;
}

void NetworkSystem::Residuals(const Eigen::VectorXd& u, Eigen::VectorXd* r) const {
  r->resize(n_);
  for (const Branch& b : branches_) {
    const LoopState& ls = loop_states_[b.loop];
    double pf = b.p_from >= 0 ? u[b.p_from] : boundary_p_[b.from_node];
    double pt = b.p_to >= 0 ? u[b.p_to] : boundary_p_[b.to_node];
    double dp = pf - pt + ls.rho * kGravity * b.dz;
    b.model->Evaluate(dp, u[b.m], ls.rho, ls.mu, b.nint ? &u[b.x0] : nullptr, r->data() + b.row0);
  }
  for (const NodeRef& nr : nodes_)
    if (nr.row >= 0) (*r)[nr.row] = 0.0;
  for (const Branch& b : branches_) {
    int rf = nodes_[b.from_node].row, rt = nodes_[b.to_node].row;
    if (rf >= 0) (*r)[rf] -= u[b.m];
    if (rt >= 0) (*r)[rt] += u[b.m];
  }
}

void NetworkSystem::ResidualsAndJacobian(const Eigen::VectorXd& u, Eigen::VectorXd* r) {
  r->resize(n_);
  double* val = jac_.valuePtr();
  LocalJet x[kMaxInternal];
  LocalJet res[1 + kMaxInternal];
  for (const Branch& b : branches_) {
    const LoopState& ls = loop_states_[b.loop];
    double pf = b.p_from >= 0 ? u[b.p_from] : boundary_p_[b.from_node];
    double pt = b.p_to >= 0 ? u[b.p_to] : boundary_p_[b.to_node];
    LocalJet dp(pf - pt + ls.rho * kGravity * b.dz, 0);
    LocalJet m(u[b.m], 1);
    LocalJet rho(ls.rho, 2);
    LocalJet mu(ls.mu, 3);
    for (int i = 0; i < b.nint; ++i) x[i] = LocalJet(u[b.x0 + i], 4 + i);
    b.model->Evaluate(dp, m, rho, mu, x, res);
    for (int k = 0; k <= b.nint; ++k) {
      (*r)[b.row0 + k] = res[k].a;
      const auto& v = res[k].v;
      if (b.slot[k][0] >= 0) val[b.slot[k][0]] = v[0];
      if (b.slot[k][1] >= 0) val[b.slot[k][1]] = -v[0];
      val[b.slot[k][2]] = v[1];
      for (int i = 0; i < b.nint; ++i) val[b.slot[k][3 + i]] = v[4 + i];
    }
  }
  for (const NodeRef& nr : nodes_)
    if (nr.row >= 0) (*r)[nr.row] = 0.0;
  for (const Branch& b : branches_) {
    int rf = nodes_[b.from_node].row, rt = nodes_[b.to_node].row;
    if (rf >= 0) (*r)[rf] -= u[b.m];
    if (rt >= 0) (*r)[rt] += u[b.m];
  }
}

void NetworkSystem::StartingGuess(Eigen::VectorXd* u) const {
  u->setZero(n_);
  // Free nodes only: K p = f from m = g*dp + m0 on every branch.
  int nfree = 0;
  for (const NodeRef& nr : nodes_) nfree = std::max(nfree, nr.unknown + 1);
  std::vector<int> free_index(nodes_.size(), -1);
  int k = 0;
  for (size_t g = 0; g < nodes_.size(); ++g)
    if (nodes_[g].unknown >= 0) free_index[g] = k++;
  std::vector<LinearGuess> lin(branches_.size());
  std::vector<Eigen::Triplet<double>> trip;
  Eigen::VectorXd f = Eigen::VectorXd::Zero(k);
  double gmax = 0;
  for (size_t i = 0; i < branches_.size(); ++i) {
    const LoopState& ls = loop_states_[branches_[i].loop];
    lin[i] = branches_[i].model->Linearize(ls.rho, ls.mu);
    if (lin[i].fixes_flow) lin[i].g = 0;
    gmax = std::max(gmax, lin[i].g);
  }
  const double greg = std::max(gmax, 1e-30) * 1e-12;
  for (size_t i = 0; i < branches_.size(); ++i) {
    const Branch& b = branches_[i];
    const LoopState& ls = loop_states_[b.loop];
    double g = lin[i].g, m0 = lin[i].m0, h = ls.rho * kGravity * b.dz;
    int a = free_index[b.from_node], c = free_index[b.to_node];
    if (a >= 0) {
      trip.emplace_back(a, a, g);
      f[a] -= g * h + m0;
      if (c >= 0) trip.emplace_back(a, c, -g);
      else f[a] += g * boundary_p_[b.to_node];
    }
    if (c >= 0) {
      trip.emplace_back(c, c, g);
      f[c] += g * h + m0;
      if (a >= 0) trip.emplace_back(c, a, -g);
      else f[c] += g * boundary_p_[b.from_node];
    }
  }
  for (int i = 0; i < k; ++i) trip.emplace_back(i, i, greg);
  Eigen::VectorXd p = Eigen::VectorXd::Zero(k);
  if (k > 0) {
    Eigen::SparseMatrix<double> K(k, k);
    K.setFromTriplets(trip.begin(), trip.end());
    Eigen::SimplicialLDLT<Eigen::SparseMatrix<double>> ldlt(K);
    if (ldlt.info() == Eigen::Success) p = ldlt.solve(f);
    for (int i = 0; i < k; ++i)
      if (!std::isfinite(p[i])) p[i] = 0;
  }
  for (size_t g = 0; g < nodes_.size(); ++g)
    if (nodes_[g].unknown >= 0) (*u)[nodes_[g].unknown] = p[free_index[g]];
  for (size_t i = 0; i < branches_.size(); ++i) {
    const Branch& b = branches_[i];
    const LoopState& ls = loop_states_[b.loop];
    double dp = NodePressure(b.from_node, *u) - NodePressure(b.to_node, *u) + ls.rho * kGravity * b.dz;
    double m = lin[i].g * dp + lin[i].m0;
    (*u)[b.m] = m;
    if (b.nint) b.model->GuessInternal(dp, m, ls.rho, ls.mu, &(*u)[b.x0]);
  }
}

void NetworkSystem::EvaluateBranch(int k, const double* vals, double* r, double* J) const {
  const Branch& b = branches_[k];
  const LoopState& ls = loop_states_[b.loop];
  double pf = b.p_from >= 0 ? vals[0] : boundary_p_[b.from_node];
  double pt = b.p_to >= 0 ? vals[1] : boundary_p_[b.to_node];
  if (!J) {
    b.model->Evaluate(pf - pt + ls.rho * kGravity * b.dz, vals[2], ls.rho, ls.mu, vals + 3, r);
    return;
  }
  LocalJet x[kMaxInternal];
  LocalJet res[1 + kMaxInternal];
  LocalJet dp(pf - pt + ls.rho * kGravity * b.dz, 0), m(vals[2], 1), rho(ls.rho, 2), mu(ls.mu, 3);
  for (int i = 0; i < b.nint; ++i) x[i] = LocalJet(vals[3 + i], 4 + i);
  b.model->Evaluate(dp, m, rho, mu, x, res);
  const int w = 3 + kMaxInternal;
  for (int q = 0; q <= b.nint; ++q) {
    r[q] = res[q].a;
    J[q * w + 0] = b.p_from >= 0 ? res[q].v[0] : 0.0;
    J[q * w + 1] = b.p_to >= 0 ? -res[q].v[0] : 0.0;
    J[q * w + 2] = res[q].v[1];
    for (int i = 0; i < kMaxInternal; ++i) J[q * w + 3 + i] = i < b.nint ? res[q].v[4 + i] : 0.0;
  }
}

double NetworkSystem::RowDensity(int row) const {
  int owner = row_owner_[row];
  int loop = owner >= 0 ? branches_[owner].loop : nodes_[-1 - owner].loop;
  return loop_states_[loop].rho;
}

std::string NetworkSystem::RowName(int row) const {
  int owner = row_owner_[row];
  if (owner >= 0) {
    const Branch& b = branches_[owner];
    const auto& loop = case_.loops[b.loop];
    int r = row - b.row0;
    return fmt::format("component {}/{} ({}){}", loop.id, loop.components[b.comp].id,
                       loop.components[b.comp].type, r == 0 ? "" : fmt::format(" internal equation {}", r));
  }
  const NodeRef& nr = nodes_[-1 - owner];
  return fmt::format("mass balance at node {}/{}", case_.loops[nr.loop].id, case_.loops[nr.loop].nodes[nr.node].id);
}

std::string NetworkSystem::UnknownName(int col) const {
  for (const NodeRef& nr : nodes_)
    if (nr.unknown == col)
      return fmt::format("pressure at node {}/{}", case_.loops[nr.loop].id, case_.loops[nr.loop].nodes[nr.node].id);
  for (const Branch& b : branches_) {
    const auto& loop = case_.loops[b.loop];
    if (b.m == col) return fmt::format("flow through {}/{}", loop.id, loop.components[b.comp].id);
    if (b.nint && col >= b.x0 && col < b.x0 + b.nint)
      return fmt::format("internal unknown {} of {}/{}", col - b.x0, loop.id, loop.components[b.comp].id);
  }
  return fmt::format("unknown {}", col);
}

}  // namespace loopwright
