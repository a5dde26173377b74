#include "network/point/system.h"

#include <Eigen/SparseCholesky>

#include <algorithm>
#include <cmath>
#include <cstring>
#include <new>

#include <fmt/format.h>

#include "network/point/sparse_pattern.h"

namespace loopwright {

NetworkSystem::NetworkSystem(const Case& cs) : case_(cs) {
  NumberNodes();
  int unknown = 0;
  for (const NodeRef& nr : nodes_) unknown = std::max(unknown, nr.unknown + 1);
  AddBranches(&unknown);
  n_ = unknown;
  NumberRows();
  loop_states_.resize(cs.loops.size());
  loop_fluid_state_.resize(cs.loops.size());
  int bounded = 0;
  for (const NodeRef& nr : nodes_) bounded += nr.unknown < 0;
  boundary_p_.assign(bounded, 0.0);
  for (const Branch& b : branches_) has_internal_ = has_internal_ || b.nint > 0;
  EnsureWork();
  for (const LoopSpec& loop : cs.loops) loop_fluid_.push_back(loop.fluid);
  oil_anchor_.assign(cs.fluid_bindings.size(), {kNoValue, kNoValue});
  oil_.resize(cs.fluid_bindings.size());
}

// Numbers the nodes and their pressure unknowns.
void NetworkSystem::NumberNodes() {
  int unknown = 0, bounded = 0;
  size_t total = 0;
  for (const LoopSpec& loop : case_.loops) total += loop.nodes.size();
  nodes_.reserve(total);
  for (size_t l = 0; l < case_.loops.size(); ++l) {
    loop_node_offset_.push_back(static_cast<int>(nodes_.size()));
    for (size_t i = 0; i < case_.loops[l].nodes.size(); ++i) {
      const NodeSpec& ns = case_.loops[l].nodes[i];
      NodeRef nr;
      nr.loop = static_cast<int>(l);
      nr.node = static_cast<int>(i);
      nr.elevation = ns.elevation;
      nr.unknown = ns.boundary == BoundaryKind::kNone ? unknown++ : -1 - bounded++;
      nodes_.push_back(nr);
    }
  }
}

// Branches: working copies of the models, flow and internal unknowns.
void NetworkSystem::AddBranches(int* unknown) {
  size_t total = 0;
  for (const LoopSpec& loop : case_.loops) total += loop.components.size();
  row_kinds_.reserve(total + *unknown);  // law rows and mass balances
  branches_.reserve(total);
  for (size_t l = 0; l < case_.loops.size(); ++l) {
    const LoopSpec& loop = case_.loops[l];
    for (size_t c = 0; c < loop.components.size(); ++c) {
      const ComponentSpec& spec = loop.components[c];
      if (!spec.model->Shareable()) {
        if (models_.empty()) models_.resize(total);
        models_[branches_.size()] = spec.model->Clone();
      }
      Branch b;
      b.loop = static_cast<int>(l);
      b.comp = static_cast<int>(c);
      b.model = Copy(branches_.size()) ? Copy(branches_.size()) : spec.model.get();
      b.from_node = loop_node_offset_[l] + spec.from;
      b.to_node = loop_node_offset_[l] + spec.to;
      b.p_from = nodes_[b.from_node].unknown;
      b.p_to = nodes_[b.to_node].unknown;
      b.m = (*unknown)++;
      b.nint = b.model->NumInternal();
      b.senses = b.model->SensesOutlet();
      has_sensing_ = has_sensing_ || b.senses;
      b.follows = b.model->FollowsStream();
      *unknown += b.nint;
      // Its law rows, numbered while the model is at hand (the mass
      // balances follow every law row: NumberRows).
      b.row0 = static_cast<int>(row_kinds_.size());
      for (int r = 0; r <= b.nint; ++r) {
        row_kinds_.push_back(b.model->Kind(r) == ResidualKind::kPressure ? RowKind::kPressure : RowKind::kVolumeFlow);
      }
      branches_.push_back(b);
    }
  }
}

// Rows: component laws (numbered by AddBranches), then mass balances.
void NetworkSystem::NumberRows() {
  int row = static_cast<int>(row_kinds_.size());
  row_kinds_.reserve(n_);
  for (size_t g = 0; g < nodes_.size(); ++g) {
    if (nodes_[g].unknown < 0) continue;
    nodes_[g].row = row++;
    row_kinds_.push_back(RowKind::kMassBalance);
  }
}

int NetworkSystem::RowOwner(int row) const {
  if (row_owner_.empty()) {
    row_owner_.resize(row_kinds_.size());
    for (size_t k = 0; k < branches_.size(); ++k)
      for (int i = 0; i <= branches_[k].nint; ++i) row_owner_[branches_[k].row0 + i] = static_cast<int>(k);
    for (size_t g = 0; g < nodes_.size(); ++g)
      if (nodes_[g].row >= 0) row_owner_[nodes_[g].row] = -1 - static_cast<int>(g);
  }
  return row_owner_[row];
}

// The Jacobian's pattern and every law row's value slots in it.
void NetworkSystem::BuildJacobianPattern() const {
  std::vector<Eigen::Triplet<double>> trip;
  trip.reserve(branches_.size() * 8);
  for (const Branch& b : branches_) {
    int vars[3 + kMaxInternal] = {b.p_from, b.p_to, b.m, -1, -1};
    for (int i = 0; i < b.nint; ++i) vars[3 + i] = b.x0() + i;
    for (int r = 0; r <= b.nint; ++r)
      for (int v = 0; v < 3 + kMaxInternal; ++v)
        if (vars[v] >= 0) trip.emplace_back(b.row0 + r, vars[v], 0.0);
    if (nodes_[b.from_node].row >= 0) trip.emplace_back(nodes_[b.from_node].row, b.m, 0.0);
    if (nodes_[b.to_node].row >= 0) trip.emplace_back(nodes_[b.to_node].row, b.m, 0.0);
  }
  jac_.resize(n_, n_);
  jac_.setFromTriplets(trip.begin(), trip.end());
  jac_.makeCompressed();
  jac_slot_.resize(blocks_.size());
  for (const Branch& b : branches_) {
    int vars[3 + kMaxInternal] = {b.p_from, b.p_to, b.m, -1, -1};
    for (int i = 0; i < b.nint; ++i) vars[3 + i] = b.x0() + i;
    for (int r = 0; r <= b.nint; ++r)
      for (int v = 0; v < 3 + kMaxInternal; ++v) jac_slot_[b.row0 + r][v] = FindSlot(jac_, b.row0 + r, vars[v]);
    // Mass-balance entries are constant: the flow leaves `from`, enters `to`.
    if (nodes_[b.from_node].row >= 0) jac_.valuePtr()[FindSlot(jac_, nodes_[b.from_node].row, b.m)] = -1.0;
    if (nodes_[b.to_node].row >= 0) jac_.valuePtr()[FindSlot(jac_, nodes_[b.to_node].row, b.m)] = 1.0;
  }
  jac_built_ = true;
}

const Eigen::SparseMatrix<double>& NetworkSystem::jacobian() const {
  if (!jac_built_) BuildJacobianPattern();  // blocks_ are sized: ResidualsAndJacobian ran
  double* val = jac_.valuePtr();
  for (const Branch& b : branches_)
    for (int k = 0; k <= b.nint; ++k) {
      const RowBlock& lb = blocks_[b.row0 + k];
      const auto& slot = jac_slot_[b.row0 + k];
      if (slot[0] >= 0) val[slot[0]] = lb.a_dp;
      if (slot[1] >= 0) val[slot[1]] = (has_sensing_ ? a_sense_[b.row0 + k] : 0.0) - lb.a_dp;
      val[slot[2]] = lb.a_m;
      for (int i = 0; i < b.nint; ++i) val[slot[3 + i]] = blocks_x_[b.row0 + k][i];
    }
  return jac_;
}

// K's pattern over the free nodes, lower triangle, compressed: each
// column's diagonal, then the larger end of every branch joining two free
// nodes whose smaller end it is, in row order, a pair joined twice (parallel
// branches) once: the matrix setFromTriplets makes of those entries, built by
// counting instead of sorting triplets.
Eigen::SparseMatrix<double> NetworkSystem::LowerPattern() const {
  std::vector<int> outer(nfree_ + 1, 0);
  for (int i = 0; i < nfree_; ++i) outer[i + 1] = 1;
  for (const Branch& b : branches_)
    if (b.p_from >= 0 && b.p_to >= 0) ++outer[std::min(b.p_from, b.p_to) + 1];
  for (int i = 0; i < nfree_; ++i) outer[i + 1] += outer[i];
  std::vector<int> inner(outer[nfree_]), next(outer.begin(), outer.end() - 1);
  for (int i = 0; i < nfree_; ++i) inner[next[i]++] = i;
  for (const Branch& b : branches_)
    if (b.p_from >= 0 && b.p_to >= 0) inner[next[std::min(b.p_from, b.p_to)]++] = std::max(b.p_from, b.p_to);
  Eigen::SparseMatrix<double> k(nfree_, nfree_);
  k.resizeNonZeros(outer[nfree_]);
  int* kouter = k.outerIndexPtr();
  int* kinner = k.innerIndexPtr();
  int nnz = 0;
  for (int c = 0; c < nfree_; ++c) {
    kouter[c] = nnz;
    std::sort(inner.begin() + outer[c] + 1, inner.begin() + outer[c + 1]);
    for (int p = outer[c]; p < outer[c + 1]; ++p)
      if (p == outer[c] || inner[p] != inner[p - 1]) kinner[nnz++] = inner[p];
  }
  kouter[nfree_] = nnz;
  k.resizeNonZeros(nnz);
  return k;
}

// Reduced system pattern over the free nodes (pressure unknowns
// 0..nfree-1), its ordering, and where each entry lands in P K P^T.
void NetworkSystem::BuildReducedPattern() {
  nfree_ = 0;
  for (const NodeRef& nr : nodes_) nfree_ = std::max(nfree_, nr.unknown + 1);
  solve_work_.resize(nfree_);
  kslot_.assign(branches_.size(), -1);
  if (nfree_ == 0) return;
  Eigen::SparseMatrix<double> k = LowerPattern();
  // Each entry marked with its own index + 1: the analysis permutes K into
  // kp_ as factorize() does, so the marks say where each entry lands.
  for (int j = 0; j < k.nonZeros(); ++j) k.valuePtr()[j] = j + 1.0;
  ldlt_.AnalyzeInto(k, &kp_);
  std::vector<int> moved(k.nonZeros(), -1);
  for (int j = 0; j < kp_.nonZeros(); ++j) moved[static_cast<int>(kp_.valuePtr()[j]) - 1] = j;
  auto slot = [&](int r, int c) { return moved[FindSlot(k, std::max(r, c), std::min(r, c))]; };
  for (size_t i = 0; i < branches_.size(); ++i) {
    const Branch& b = branches_[i];
    if (b.p_from >= 0 && b.p_to >= 0) kslot_[i] = slot(b.p_from, b.p_to);
  }
  kdiag_.resize(nfree_);
  for (int i = 0; i < nfree_; ++i) kdiag_[i] = moved[k.outerIndexPtr()[i]];  // a column's diagonal comes first
}

void NetworkSystem::EnsureWork() {
  if (!blocks_.empty() || branches_.empty()) return;
  blocks_.resize(branches_.back().row0 + 1 + branches_.back().nint);
  if (has_internal_) blocks_x_.resize(blocks_.size());
  if (has_sensing_) a_sense_.assign(blocks_.size(), 0.0);
  BuildReducedPattern();
}

void NetworkSystem::ReleaseWork() {
  // Swapped with empty ones: clear() keeps the capacity.
  std::vector<RowBlock>().swap(blocks_);
  std::vector<std::array<double, kMaxInternal>>().swap(blocks_x_);
  std::vector<double>().swap(a_sense_);
  std::vector<int>().swap(kslot_);
  std::vector<int>().swap(kdiag_);
  solve_work_ = Eigen::VectorXd();
  kp_ = Eigen::SparseMatrix<double>();
  ldlt_.~PermutedLDLT();
  new (&ldlt_) PermutedLDLT();
  jac_ = Eigen::SparseMatrix<double>();
  std::vector<std::array<int, 3 + kMaxInternal>>().swap(jac_slot_);
  jac_built_ = false;
}

void NetworkSystem::SetCopy(size_t k, std::unique_ptr<Component> copy) {
  if (models_.empty() && !copy) {
    branches_[k].model = model_source(static_cast<int>(k));
    return;
  }
  if (models_.empty()) models_.resize(branches_.size());
  models_[k] = std::move(copy);
  branches_[k].model = models_[k] ? models_[k].get() : model_source(static_cast<int>(k));
}

void NetworkSystem::SetBranchFluid(int k, double rho, double mu) {
  if (branch_fluid_.empty()) {
    branch_fluid_.resize(branches_.size());
    for (size_t i = 0; i < branches_.size(); ++i) branch_fluid_[i] = loop_fluid_state_[branches_[i].loop];
  }
  branch_fluid_[k] = {rho, mu};
}

// K = sum over branches of g_b (e_from - e_to)(e_from - e_to)^T, in kp_:
// zeroed here, each branch's g_b added by AddConductance in the caller's
// own pass over the branches.
double* NetworkSystem::ZeroK() {
  double* kv = kp_.valuePtr();
  std::fill(kv, kv + kp_.nonZeros(), 0.0);
  return kv;
}

namespace {

// The step pairs of a branch without internal unknowns, whose local block
// is one scalar a = dr/dm.
inline void ScalarPairs(double r, double a_dp, double a, double* w_r, double* w_p) {
  w_r[0] = r / a;
  w_p[0] = a_dp / a;
}

// The same, false when the block is singular or a pair not finite.
inline bool SolveScalarBlock(double r, double a_dp, double a, double* w_r, double* w_p) {
  if (!(std::abs(a) > 0)) return false;
  ScalarPairs(r, a_dp, a, w_r, w_p);
  return std::isfinite(w_r[0]) && std::isfinite(w_p[0]);
}

}  // namespace

bool NetworkSystem::SolveLocalBlock(size_t k, const Eigen::VectorXd& r, double* w_r, double* w_p) const {
  const Branch& b = branches_[k];
  const RowBlock* lb = &blocks_[b.row0];
  const int n = 1 + b.nint;
  if (n == 1) return SolveScalarBlock(r[b.row0], lb[0].a_dp, lb[0].a_m, w_r, w_p);
  double A[3][3];
  for (int i = 0; i < n; ++i) {
    A[i][0] = lb[i].a_m;
    for (int j = 1; j < n; ++j) A[i][j] = blocks_x_[b.row0 + i][j - 1];
    w_r[i] = r[b.row0 + i];
    w_p[i] = lb[i].a_dp;
  }
  for (int c = 0; c < n; ++c) {
    int piv = c;
    for (int i = c + 1; i < n; ++i)
      if (std::abs(A[i][c]) > std::abs(A[piv][c])) piv = i;
    if (!(std::abs(A[piv][c]) > 0)) return false;
    if (piv != c) {
      for (int j = 0; j < n; ++j) std::swap(A[c][j], A[piv][j]);
      std::swap(w_r[c], w_r[piv]);
      std::swap(w_p[c], w_p[piv]);
    }
    for (int i = c + 1; i < n; ++i) {
      const double f = A[i][c] / A[c][c];
      for (int j = c; j < n; ++j) A[i][j] -= f * A[c][j];
      w_r[i] -= f * w_r[c];
      w_p[i] -= f * w_p[c];
    }
  }
  for (int c = n - 1; c >= 0; --c) {
    for (int j = c + 1; j < n; ++j) {
      w_r[c] -= A[c][j] * w_r[j];
      w_p[c] -= A[c][j] * w_p[j];
    }
    w_r[c] /= A[c][c];
    w_p[c] /= A[c][c];
  }
  return std::isfinite(w_r[0]) && std::isfinite(w_p[0]);
}

bool NetworkSystem::BranchStep(size_t k, const Eigen::VectorXd& r, double* w_r, double* w_p) const {
  const Branch& b = branches_[k];
  const RowBlock& lb = blocks_[b.row0];
  if (!(b.nint == 0 ? SolveScalarBlock(r[b.row0], lb.a_dp, lb.a_m, w_r, w_p) : SolveLocalBlock(k, r, w_r, w_p)))
    return false;
  return !(b.senses && b.p_to >= 0) || SensedOutletStep(b, w_p);
}

bool NetworkSystem::ReducedNewtonStep(const Eigen::VectorXd& r, Eigen::VectorXd* du, const double* g_floor) {
  if (nfree_ == 0) return false;
  EnsureWork();
  // The step's node part (rhs) gathers -(R_n + sum c ...), the right side
  // of K dp = -rhs, in place (negation is exact: the same bits as negating
  // the sum after), and gets dp; K is assembled in the same pass over the
  // branches, in branch order.
  if (du->size() != n_) du->resize(n_);
  Eigen::Ref<Eigen::VectorXd> rhs = du->head(nfree_);
  for (const NodeRef& nr : nodes_)
    if (nr.unknown >= 0) rhs[nr.unknown] = -r[nr.row];
  double* kv = ZeroK();
  for (size_t k = 0; k < branches_.size(); ++k) {
    const Branch& b = branches_[k];
    double w_r[1 + kMaxInternal], w_p[1 + kMaxInternal];
    if (!BranchStep(k, r, w_r, w_p)) return false;
    // du_y = w_r - w_p * ddp ;  du_m = c - g ddp with c = w_r[0], g = w_p[0].
    // Mass row at `to` gains +du_m, at `from` -du_m; G = -g.
    const double G = g_floor ? std::max(-w_p[0], g_floor[k]) : -w_p[0], c = w_r[0];
    AddConductance(b, k, G, kv);
    // Mass rows: sum_in (c + G ddp) - sum_out (c + G ddp) = R_n, i.e. for
    // node a (out): -G (dpa - dpb) = R_a + c; node b (in): G (dpa - dpb) = R_b - c.
    if (b.p_from >= 0) rhs[b.p_from] -= c;
    if (b.p_to >= 0) rhs[b.p_to] += c;
  }
  // K dp = -rhs, rhs holding -rhs.
  ldlt_.FactorizePermuted(kp_);
  if (ldlt_.info() != Eigen::Success) return false;
  const Eigen::VectorXd& D = ldlt_.Diagonal();
  for (int i = 0; i < D.size(); ++i)
    if (!(D[i] > 0)) return false;
  ldlt_.SolveInPlace(rhs, &solve_work_);
  if (!rhs.allFinite()) return false;
  const double* dpn = du->data();  // dp, the node part
  for (size_t k = 0; k < branches_.size(); ++k) {
    const Branch& b = branches_[k];
    const double ddp = (b.p_from >= 0 ? dpn[b.p_from] : 0.0) - (b.p_to >= 0 ? dpn[b.p_to] : 0.0);
    // (w_r, w_p) formed again (and found finite in the assembly above).
    double w_r[1 + kMaxInternal], w_p[1 + kMaxInternal];
    const RowBlock& lb = blocks_[b.row0];
    if (b.nint == 0 && !b.senses) ScalarPairs(r[b.row0], lb.a_dp, lb.a_m, w_r, w_p);
    else if (!BranchStep(k, r, w_r, w_p)) return false;  // not reached: it held in the assembly
    (*du)[b.m] = w_r[0] - w_p[0] * ddp;
    for (int i = 0; i < b.nint; ++i) (*du)[b.x0() + i] = w_r[1 + i] - w_p[1 + i] * ddp;
  }
  return true;
}

// A branch whose law reads p(to) (its outlet's gauge pressure): its flow
// step is du_m = w_r - w_p ddp - w_s dp_to with w_s = a_s / a_m. With `from`
// at a boundary, ddp = -dp_to and the branch stays a one-node conductance:
// w_p becomes w_p - w_s, and G = -(w_p - w_s) = rho (dQ/d(dp) - dQ/dp_out) > 0
// in forward flow (the valve closes as its outlet rises). With both ends
// free the step is not symmetric: false (the caller takes LU of J). A
// sensing branch with internal unknowns: false as well.
bool NetworkSystem::SensedOutletStep(const Branch& b, double* w_p) const {
  if (b.p_from >= 0 || b.nint > 0) return false;
  const double a = blocks_[b.row0].a_m;
  w_p[0] -= a_sense_[b.row0] / a;
  return std::isfinite(w_p[0]);
}

bool NetworkSystem::HasNonReciprocalBranch() const {
  for (const Branch& b : branches_)
    if (b.senses && b.p_from >= 0 && b.p_to >= 0) return true;
  return false;
}

Component* NetworkSystem::working_model(int k) {
  if (!Copy(k)) SetCopy(k, model_source(k)->Clone());
  return Copy(k);
}

void NetworkSystem::FollowStream(int k, const StreamState& s) {
  // The source's flag, kept by AddBranches and UseModel (a sweep over a
  // plant-size header reads no model); a working copy answers for itself.
  Component* own = Copy(k);
  if (own ? !own->FollowsStream() : !branches_[k].follows) return;
  if (own) {
    own->FollowStream(s);
    return;
  }
  const Component* source = model_source(k);
  std::unique_ptr<Component> copy = source->Clone();
  copy->FollowStream(s);
  const ParamArray& b = source->params();
  if (static_cast<const Component&>(*copy).params().SameBits(b.data(), b.size())) return;  // equal to the bit
  SetCopy(k, std::move(copy));
}

void NetworkSystem::UseModel(size_t k, const Component* source, const ComponentType* type) {
  const int ki = static_cast<int>(k);
  if (model_source(ki) != source) {
    if (source_.empty()) {  // the first part swapped in: every branch's source held from now on
      source_.resize(branches_.size());
      type_.resize(branches_.size());
      for (size_t i = 0; i < branches_.size(); ++i) {
        source_[i] = Spec(static_cast<int>(i)).model.get();
        type_[i] = Spec(static_cast<int>(i)).type_info;
      }
    }
    source_[k] = source;
    type_[k] = type;
    SetCopy(k, source->Shareable() ? nullptr : source->Clone());
    branches_[k].senses = branches_[k].model->SensesOutlet();
    branches_[k].follows = source->FollowsStream();
    if (branches_[k].senses && !has_sensing_) {
      has_sensing_ = true;
      if (!blocks_.empty()) a_sense_.assign(blocks_.size(), 0.0);
    }
  } else if (Component* own = Copy(k)) {
    own->params() = source->params();
  }
}

// Loop fluids: the case's, or for a bound oil one anchored at the state's
// KV40/KV100 (made anew when they change, never changed in place, so a
// point's result may keep it).
void NetworkSystem::ApplyFluids(const PointState& st) {
  for (size_t l = 0; l < case_.loops.size(); ++l) loop_fluid_[l] = case_.loops[l].fluid;
  for (const PointState::OilAnchor& a : st.oils) {
    const FluidBinding& fb = case_.fluid_bindings[a.binding];
    if (oil_anchor_[a.binding] != std::make_pair(a.kv40, a.kv100)) {
      auto oil = std::make_shared<OilFluid>(*fb.oil);
      oil->SetKv40Kv100(a.kv40, a.kv100);  // validated for every point at load
      oil_[a.binding] = std::move(oil);
      oil_anchor_[a.binding] = {a.kv40, a.kv100};
    }
    for (size_t l = 0; l < case_.loops.size(); ++l)
      if (case_.loops[l].fluid_id == fb.fluid_id) loop_fluid_[l] = oil_[a.binding];
  }
}

void NetworkSystem::SetState(const PointState& st) {
  for (size_t k = 0; k < branches_.size(); ++k) {
    const ComponentSpec& spec = case_.loops[branches_[k].loop].components[branches_[k].comp];
    const PartCandidate* part = st.parts.empty() ? nullptr : st.parts[k];
    UseModel(k, part ? part->model.get() : spec.model.get(), part ? part->type_info : spec.type_info);
  }
  for (const PointState::Param& p : st.params) working_model(p.branch)->params()[p.param] = p.value;
  ApplyFluids(st);
  std::vector<LoopState> states(case_.loops.size());
  for (size_t l = 0; l < case_.loops.size(); ++l) {
    states[l].temperature = st.loop_temperature[l];
    const FluidProps f = loop_fluid_[l]->Evaluate(st.loop_temperature[l], case_.ambient_pa);
    states[l].rho = f.rho;
    states[l].mu = f.mu;
  }
  SetLoopStates(states);
  for (size_t g = 0; g < nodes_.size(); ++g) {
    const NodeRef& nr = nodes_[g];
    if (nr.unknown >= 0) continue;
    const NodeSpec& ns = case_.loops[nr.loop].nodes[nr.node];
    boundary_p_[-1 - nr.unknown] = st.surface_pressure[g] + states[nr.loop].rho * kGravity * ns.cond().level;
  }
}

void NetworkSystem::SetLoopStates(const std::vector<LoopState>& loops) {
  loop_states_ = loops;
  for (size_t l = 0; l < loops.size(); ++l) loop_fluid_state_[l] = {loops[l].rho, loops[l].mu};
  for (size_t k = 0; k < branch_fluid_.size(); ++k) branch_fluid_[k] = loop_fluid_state_[branches_[k].loop];
}

template <bool kJacobian>
double NetworkSystem::EvaluateAll(const Eigen::VectorXd& u, Eigen::VectorXd* r, RowBlock* blocks,
                                  std::array<double, kMaxInternal>* blocks_x, double* a_sense) const {
  r->resize(n_);
  // The largest volume flow: the largest |m| of each loop's run of branches
  // (AddBranches keeps a loop's branches together) over its density, the
  // same as the largest |m| / rho (division rounds monotonically).
  double largest_flow = 0, run_max = 0;
  int run_loop = branches_.empty() ? 0 : branches_.front().loop;
  const BranchFluid* per_branch = branch_fluid_.empty() ? nullptr : branch_fluid_.data();
  // The mass balances are summed in the same pass as the laws: each row
  // still gains its branches' flows in branch order (the same bits as a
  // second pass), and a plant-size sweep reads the branch records once.
  for (const NodeRef& nr : nodes_)
    if (nr.row >= 0) (*r)[nr.row] = 0.0;
  for (const Branch& b : branches_) {
    const int rf = nodes_[b.from_node].row, rt = nodes_[b.to_node].row;
    if (rf >= 0) (*r)[rf] -= u[b.m];
    if (rt >= 0) (*r)[rt] += u[b.m];
    if (b.loop != run_loop) {
      largest_flow = std::max(largest_flow, run_max / loop_states_[run_loop].rho);
      run_loop = b.loop;
      run_max = 0;
    }
    run_max = std::max(run_max, std::abs(u[b.m]));
    const BranchFluid& ls = FluidOf(per_branch, &b - branches_.data(), b);
    const double pf = b.p_from >= 0 ? u[b.p_from] : BoundaryPressure(b.p_from);
    const double pt = b.p_to >= 0 ? u[b.p_to] : BoundaryPressure(b.p_to);
    const double dp = pf - pt + ls.rho * kGravity * Dz(b);
    const double* xu = b.nint ? &u[b.x0()] : nullptr;
    if constexpr (!kJacobian) {
      if (b.senses) b.model->EvaluateSensed(dp, pt, u[b.m], ls.rho, ls.mu, xu, r->data() + b.row0);
      else b.model->Evaluate(dp, u[b.m], ls.rho, ls.mu, xu, r->data() + b.row0);
    } else if (b.nint == 0 && !b.senses) {
      // One row: the residual and its two slopes on the model's own small jet.
      RowBlock& lb = blocks[b.row0];
      (*r)[b.row0] = b.model->EvaluateWithSlopes(dp, u[b.m], ls.rho, ls.mu, &lb.a_dp, &lb.a_m);
      if (a_sense) a_sense[b.row0] = 0.0;
    } else {
      FlowJet x[kMaxInternal];
      FlowJet res[1 + kMaxInternal];
      for (int i = 0; i < b.nint; ++i) x[i] = FlowJet(u[b.x0() + i], 2 + i);
      // A sensing law's p_out derivative is the slot after the internal unknowns.
      if (b.senses) b.model->EvaluateSensed(FlowJet(dp, 0), FlowJet(pt, 2 + b.nint), FlowJet(u[b.m], 1), ls.rho, ls.mu, x, res);
      else b.model->Evaluate(FlowJet(dp, 0), FlowJet(u[b.m], 1), ls.rho, ls.mu, x, res);
      for (int k = 0; k <= b.nint; ++k) {
        (*r)[b.row0 + k] = res[k].a;
        const auto& v = res[k].v;
        RowBlock& lb = blocks[b.row0 + k];
        lb.a_dp = v[0];
        lb.a_m = v[1];
        for (int i = 0; i < b.nint; ++i) blocks_x[b.row0 + k][i] = v[2 + i];
        const double a_s = b.senses ? v[2 + b.nint] : 0.0;  // dr/dp_to beyond the drop
        if (a_sense) a_sense[b.row0 + k] = a_s;
      }
    }
  }
  return branches_.empty() ? 0.0 : std::max(largest_flow, run_max / loop_states_[run_loop].rho);
}

void NetworkSystem::Residuals(const Eigen::VectorXd& u, Eigen::VectorXd* r, double* largest_flow) const {
  const double q = EvaluateAll<false>(u, r, nullptr, nullptr, nullptr);
  if (largest_flow) *largest_flow = q;
}

void NetworkSystem::ResidualsAndJacobian(const Eigen::VectorXd& u, Eigen::VectorXd* r, double* largest_flow) {
  EnsureWork();
  const double q = EvaluateAll<true>(u, r, blocks_.data(), blocks_x_.data(), has_sensing_ ? a_sense_.data() : nullptr);
  if (largest_flow) *largest_flow = q;
}

void NetworkSystem::StartingGuess(Eigen::VectorXd* u) {
  // Every branch linearised, m = g dp + m0; mass balance at the free nodes
  // gives the Laplacian system K p = f on the pattern of the reduced Newton
  // system (so its symbolic factorisation is shared). One pass over the
  // branches takes each law's linearisation, its right-hand side and its
  // conductance in K.
  EnsureWork();
  // The node pressures' right side is gathered in u's node part, and solved there.
  u->setZero(n_);
  Eigen::Ref<Eigen::VectorXd> rhs = u->head(nfree_);
  double gmax = 0;
  const BranchFluid* per_branch = branch_fluid_.empty() ? nullptr : branch_fluid_.data();
  double* kv = nfree_ > 0 ? ZeroK() : nullptr;
  for (size_t i = 0; i < branches_.size(); ++i) {
    const Branch& b = branches_[i];
    const BranchFluid& ls = FluidOf(per_branch, i, b);
    LinearGuess lin = b.model->Linearize(ls.rho, ls.mu);
    if (lin.fixes_flow || !(lin.g >= 0) || !std::isfinite(lin.g)) lin.g = 0;
    const double g = lin.g, m0 = lin.m0;
    blocks_[b.row0] = {g, m0};  // unused until the first ResidualsAndJacobian
    gmax = std::max(gmax, g);
    const double h = ls.rho * kGravity * Dz(b);
    // m = g (p_a - p_b + h) + m0 leaves a, enters b.
    if (b.p_from >= 0) {
      rhs[b.p_from] -= g * h + m0;
      if (b.p_to < 0) rhs[b.p_from] += g * BoundaryPressure(b.p_to);
    }
    if (b.p_to >= 0) {
      rhs[b.p_to] += g * h + m0;
      if (b.p_from < 0) rhs[b.p_to] += g * BoundaryPressure(b.p_from);
    }
    if (kv) AddConductance(b, i, g, kv);
  }
  if (nfree_ > 0) {
    // A tiny diagonal keeps nodes reached only by flow-fixing branches solvable.
    const double greg = std::max(gmax, 1e-30) * 1e-12;
    for (int i = 0; i < nfree_; ++i) kv[kdiag_[i]] += greg;
    ldlt_.FactorizePermuted(kp_);
    if (ldlt_.info() == Eigen::Success) ldlt_.SolveInPlace(rhs, &solve_work_);
    else rhs.setZero();
    for (int i = 0; i < nfree_; ++i) (*u)[i] = std::isfinite((*u)[i]) ? (*u)[i] : 0.0;
  }
  for (size_t i = 0; i < branches_.size(); ++i) {
    const Branch& b = branches_[i];
    const BranchFluid& ls = FluidOf(per_branch, i, b);
    double dp = NodePressure(b.from_node, *u) - NodePressure(b.to_node, *u) + ls.rho * kGravity * Dz(b);
    double m = blocks_[b.row0].a_dp * dp + blocks_[b.row0].a_m;
    (*u)[b.m] = m;
    if (b.nint) b.model->GuessInternal(dp, m, ls.rho, ls.mu, &(*u)[b.x0()]);
  }
}

void NetworkSystem::EvaluateBranch(int k, const double* vals, double* r, double* J) const {
  const Branch& b = branches_[k];
  const BranchFluid& ls = branch_fluid(k);
  double pf = b.p_from >= 0 ? vals[0] : BoundaryPressure(b.p_from);
  double pt = b.p_to >= 0 ? vals[1] : BoundaryPressure(b.p_to);
  if (!J) {
    const double dp = pf - pt + ls.rho * kGravity * Dz(b);
    if (b.senses) b.model->EvaluateSensed(dp, pt, vals[2], ls.rho, ls.mu, vals + 3, r);
    else b.model->Evaluate(dp, vals[2], ls.rho, ls.mu, vals + 3, r);
    return;
  }
  FlowJet x[kMaxInternal];
  FlowJet res[1 + kMaxInternal];
  FlowJet dp(pf - pt + ls.rho * kGravity * Dz(b), 0), m(vals[2], 1);
  for (int i = 0; i < b.nint; ++i) x[i] = FlowJet(vals[3 + i], 2 + i);
  if (b.senses) b.model->EvaluateSensed(dp, FlowJet(pt, 2 + b.nint), m, ls.rho, ls.mu, x, res);
  else b.model->Evaluate(dp, m, ls.rho, ls.mu, x, res);
  const int w = 3 + kMaxInternal;
  for (int q = 0; q <= b.nint; ++q) {
    r[q] = res[q].a;
    const double a_s = b.senses ? res[q].v[2 + b.nint] : 0.0;  // dr/dp_to beyond the drop
    J[q * w + 0] = b.p_from >= 0 ? res[q].v[0] : 0.0;
    J[q * w + 1] = b.p_to >= 0 ? a_s - res[q].v[0] : 0.0;
    J[q * w + 2] = res[q].v[1];
    for (int i = 0; i < kMaxInternal; ++i) J[q * w + 3 + i] = i < b.nint ? res[q].v[2 + i] : 0.0;
  }
}

double NetworkSystem::RowDensity(int row) const {
  int owner = RowOwner(row);
  int loop = owner >= 0 ? branches_[owner].loop : nodes_[-1 - owner].loop;
  return loop_states_[loop].rho;
}

std::string NetworkSystem::RowName(int row) const {
  int owner = RowOwner(row);
  if (owner >= 0) {
    const Branch& b = branches_[owner];
    const auto& loop = case_.loops[b.loop];
    int r = row - b.row0;
    return fmt::format("component {}/{} ({}){}", loop.id, loop.components[b.comp].id,
                       loop.components[b.comp].type(), r == 0 ? "" : fmt::format(" internal equation {}", r));
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
    if (b.nint && col >= b.x0() && col < b.x0() + b.nint)
      return fmt::format("internal unknown {} of {}/{}", col - b.x0(), loop.id, loop.components[b.comp].id);
  }
  return fmt::format("unknown {}", col);
}

}  // namespace loopwright
