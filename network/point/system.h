// The network equations of a case: unknowns, residuals and their sparse
// Jacobian, with the structure built once and reused for every solve.
//
// Unknowns, in this order:
//   p_n   gauge pressure at every node without a boundary            [Pa]
//   m_c   mass flow through every component, positive from -> to     [kg/s]
//   x_ci  internal unknowns of components (e.g. a filter element's dp) [SI]
// Residuals, in this order:
//   law_c    each component's law (1 + NumInternal rows)   [Pa or m3/s]
//   mass_n   mass balance at every node without a boundary:
//            sum(m into n) - sum(m out of n) = 0           [kg/s]
// Boundary nodes (reservoirs, tanks, fixed pressures) hold their pressure,
//   p = p_surface + rho*g*level,
// and absorb whatever net flow arrives.
//
// The fluid state of a loop is isothermal at the loop temperature of the
// operating point (properties evaluated once per point).
//
// The system works on the case's component models and fluids (the case is
// read-only and may be shared by other threads) and on its own copy of a
// model only where a point writes one of its parameters (copied on the first
// working_model call; a model that is not Shareable is copied at once);
// SetState resets the copies to the case's values and applies a point's
// state (network/point/point_state.h). A plant-size header whose points
// write no parameter holds no copy: its Newton sweeps read the models where
// the loader put them.
//
// Speed: evaluation keeps each law row's local derivatives (RowBlock) and
// writes them in place with no allocation; the node-pressure Newton step
// (ReducedNewtonStep) needs nothing else. The full sparse Jacobian (the LU
// fallback, the tangents) is built from those blocks only when asked for
// (jacobian()): its pattern and every law row's value slots on the first
// call, its values on every call. A plant-size header that the node-pressure
// step solves never holds it.
#pragma once

#include <Eigen/SparseCholesky>
#include <Eigen/SparseCore>

#include <array>
#include <string>
#include <vector>

#include "components/component.h"
#include "network/case/case.h"
#include "network/point/point_state.h"
#include "network/point/tree_ordering.h"

namespace loopwright {

// Fluid state of one branch: density and viscosity at its temperature.
struct BranchFluid {
  double rho = 0, mu = 0;
};

struct LoopState {
  double temperature = 0;  // [K]
  double rho = 0, mu = 0;  // at the loop temperature and ambient pressure
};

// One component as placed in the system (48 bytes: a plant-size header
// holds three per bearing). Its height difference z(from) - z(to) is
// NetworkSystem::Dz.
struct Branch {
  const Component* model = nullptr;
  int loop = 0;
  int comp = 0;               // index within the loop
  int from_node = -1, to_node = -1;  // global node indices
  int p_from = -1, p_to = -1;        // unknown indices (< 0: boundary node, NodeRef::unknown)
  int m = -1;                        // unknown index of the mass flow
  int row0 = -1;                     // first residual row
  signed char nint = 0;              // internal unknowns (at most kMaxInternal)
  bool senses = false;               // the law reads p(to) besides dp (Component::SensesOutlet)
  bool follows = false;              // the source model follows its stream (Component::FollowsStream)
  // First internal unknown (-1: none): they follow the flow's.
  int x0() const { return nint > 0 ? m + 1 : -1; }
};

struct NodeRef {
  int loop = 0;
  int node = 0;               // index within the loop
  int unknown = -1;           // a boundary node: -1 - its index among the boundary nodes
  int row = -1;               // mass-balance row, -1 for boundary nodes
  double elevation = 0;
};

class NetworkSystem {
 public:
  // Builds the structure for all loops of `cs` and clones its models. The
  // Case must outlive this.
  explicit NetworkSystem(const Case& cs);

  int NumUnknowns() const { return n_; }
  const std::vector<Branch>& branches() const { return branches_; }
  const std::vector<NodeRef>& nodes() const { return nodes_; }
  const Case& case_spec() const { return case_; }

  // Resets the working models and fluids to the case's values and applies
  // the point's state: parts swapped in, parameter values, oil anchors, loop
  // states (rho, mu at the loop temperature), boundary pressures.
  void SetState(const PointState& st);
  // The working model of branch k (the state's values are in its params()),
  // copied from its source on the first call; the model a branch evaluates
  // is branches()[k].model (the source until then).
  Component* working_model(int k);
  // Component::FollowStream on branch k's model: on its working copy when it
  // has one; else on a new copy, kept only where the stream changed a
  // parameter (a model that does not follow its stream, such as a bearing
  // of fixed eccentricity or any line, stays shared).
  void FollowStream(int k, const StreamState& s);
  // What branch k's working model was cloned from: the case's model or a
  // part candidate's (both owned by the case), and its type.
  const Component* model_source(int k) const { return source_.empty() ? Spec(k).model.get() : source_[k]; }
  const ComponentType* branch_type(int k) const { return type_.empty() ? Spec(k).type_info : type_[k]; }
  // The fluid of loop l at the present point (a bound oil's anchors applied).
  const Fluid& loop_fluid(int l) const { return *loop_fluid_[l]; }
  const FluidPtr& loop_fluid_ptr(int l) const { return loop_fluid_[l]; }
  // Descriptions of this system's answers are for the checks alone
  // (BranchResult::for_checks_only): set by a tolerance study's samples.
  void set_for_checks_only(bool v) { for_checks_only_ = v; }
  bool for_checks_only() const { return for_checks_only_; }

  const std::vector<LoopState>& loop_states() const { return loop_states_; }
  // Per-branch fluid state; SetState sets every branch to its loop's state,
  // the thermal solve then sets each branch at its own temperature. Held
  // per branch only once a branch is set apart from its loop (an isothermal
  // system reads its loops' states).
  void SetBranchFluid(int k, double rho, double mu);
  const BranchFluid& branch_fluid(int k) const {
    return branch_fluid_.empty() ? loop_fluid_state_[branches_[k].loop] : branch_fluid_[k];
  }
  const BranchFluid& loop_fluid_state(int l) const { return loop_fluid_state_[l]; }
  bool has_branch_fluids() const { return !branch_fluid_.empty(); }
  // The global index of loop l's first node.
  int loop_node_offset(int l) const { return loop_node_offset_[l]; }

  // z(from) - z(to) of branch b [m].
  double Dz(const Branch& b) const { return nodes_[b.from_node].elevation - nodes_[b.to_node].elevation; }

  // Gauge pressure of node g given the unknowns.
  double NodePressure(int g, const Eigen::VectorXd& u) const {
    return nodes_[g].unknown >= 0 ? u[nodes_[g].unknown] : BoundaryPressure(nodes_[g].unknown);
  }

  // Residuals F(u). With largest_flow, also the largest volume flow of any
  // branch, max |m| / rho(loop) (0 when none is finite), taken in the same
  // sweep: the solver's flow scale needs no pass of its own.
  void Residuals(const Eigen::VectorXd& u, Eigen::VectorXd* r, double* largest_flow = nullptr) const;
  // Residuals and the local derivatives of every law row (what jacobian()
  // and ReducedNewtonStep read).
  void ResidualsAndJacobian(const Eigen::VectorXd& u, Eigen::VectorXd* r, double* largest_flow = nullptr);
  // The Jacobian at the state of the last ResidualsAndJacobian, in a fixed
  // pattern (built on the first call; the same values, bit for bit, as the
  // law rows' derivatives).
  const Eigen::SparseMatrix<double>& jacobian() const;

  // Residual scale of each row (Pa, m3/s or kg/s units), for the merit
  // function and the convergence test.
  enum class RowKind : unsigned char { kPressure, kVolumeFlow, kMassBalance };
  const std::vector<RowKind>& row_kinds() const { return row_kinds_; }

  // The Newton step du solving J du = r (r, J from the last
  // ResidualsAndJacobian) by eliminating every branch's flow and internal
  // unknowns locally and solving the node-pressure system that remains:
  //   K dp = rhs,  K = sum over branches of G_b (e_from - e_to)(e_from - e_to)^T
  // with G_b = -d(m_b)/d(dp_b) >= 0 from the branch's own linearised law:
  // the exact Schur complement of the flow block (the nodal "gradient"
  // formulation of pipe networks, Todini & Pilati 1988). K is symmetric and,
  // when every free node reaches a boundary through branches with G_b > 0,
  // positive definite; its symbolic Cholesky factorisation is done once.
  // Returns false (the caller falls back to sparse LU of J) when a branch's
  // flow block is singular or K is not positive definite.
  // With g_floor (per branch, kg/(s.Pa)), each G_b is raised to at least its
  // floor: a tilted step for the co-content Newton (network/point/nodal.cpp),
  // no longer the exact Newton step.
  bool ReducedNewtonStep(const Eigen::VectorXd& r, Eigen::VectorXd* du, const double* g_floor = nullptr);
  // d(law residual)/d(mass flow) of branch k's first law row at the state of
  // the last ResidualsAndJacobian.
  double LawFlowDerivative(int k) const { return blocks_[branches_[k].row0].a_m; }

  // Frees what only the Newton iteration uses (the law rows' derivatives,
  // the node-pressure matrix and its factorisation, the full Jacobian, the
  // step's work vectors): a one-shot solve calls it before its result is
  // collected. Rebuilt by the next call that needs them (EnsureWork).
  void ReleaseWork();

  // A branch whose law reads its outlet pressure (a pressure-reducing
  // valve) with both ends at free nodes: its flow depends on p(to) beyond the
  // drop, so the node-pressure matrix is not symmetric and the network's
  // residuals are not the gradient of a co-content (network/point/nodal.cpp).
  // With one end at a boundary the branch touches one free pressure and
  // stays reciprocal.
  bool HasNonReciprocalBranch() const;

  // Linearised (laminar) starting guess.
  void StartingGuess(Eigen::VectorXd* u);

  // One branch alone, for the least-squares fallback: vals = {p_from, p_to,
  // m, x0, x1} (boundary pressures are taken from the point, whatever vals
  // holds there); r gets 1 + nint residuals; J (if not null) the row-major
  // (1 + nint) x (3 + kMaxInternal) derivatives.
  void EvaluateBranch(int k, const double* vals, double* r, double* J) const;
  // Density of the loop a row belongs to [kg/m3] (by RowOwner: a
  // diagnosis's; the iteration reads loop_states()[loop].rho of a branch or
  // node it has at hand).
  double RowDensity(int row) const;

  // Name of the equation or unknown at an index, for diagnoses.
  std::string RowName(int row) const;
  std::string UnknownName(int col) const;
  // Branch index of a law row (>= 0), or -1 - (global node) of a mass row.
  // Its table is made by the first call (a failure's diagnosis): a solve
  // that converges never holds it.
  int RowOwner(int row) const;

 private:
  bool for_checks_only_ = false;
  struct RowBlock;
  void NumberNodes();
  void AddBranches(int* unknown);
  void NumberRows();
  void BuildJacobianPattern() const;
  void BuildReducedPattern();
  Eigen::SparseMatrix<double> LowerPattern() const;
  // Law residuals of every branch (with their local derivatives into
  // `blocks` when kJacobian), then the mass balances.
  // Returns the largest volume flow of any branch (see Residuals).
  template <bool kJacobian>
  double EvaluateAll(const Eigen::VectorXd& u, Eigen::VectorXd* r, RowBlock* blocks,
                     std::array<double, kMaxInternal>* blocks_x, double* a_sense) const;
  // Solves the branch's local block A_y [w_r w_p] = [r_b a_dp] (Gaussian
  // elimination with partial pivoting); false when singular or not finite.
  bool SolveLocalBlock(size_t k, const Eigen::VectorXd& r, double* w_r, double* w_p) const;
  // Branch k's step pairs (w_r, w_p) per law row from r and the law rows'
  // derivatives (its local block, and a sensing law's outlet term); false
  // when they cannot be formed. A function of r and the derivatives alone:
  // the back-substitution forms them again, with the same bits, instead of
  // holding them (two doubles per law row) from the assembly.
  bool BranchStep(size_t k, const Eigen::VectorXd& r, double* w_r, double* w_p) const;
  // The step's outlet term of a branch whose law reads p(to); false when it
  // cannot be folded into a symmetric conductance (see system.cpp).
  bool SensedOutletStep(const Branch& b, double* w_p) const;
  void UseModel(size_t k, const Component* source, const ComponentType* type);
  void ApplyFluids(const PointState& st);
  // Sets the fluid state of every loop (rho, mu at its temperature) and
  // every branch's to its loop's (SetState).
  void SetLoopStates(const std::vector<LoopState>& loops);
  // The pressure at the boundary end of a branch (p: its p_from or p_to < 0).
  double BoundaryPressure(int p) const { return boundary_p_[-1 - p]; }
  // The case's component of branch k.
  const ComponentSpec& Spec(int k) const { return case_.loops[branches_[k].loop].components[branches_[k].comp]; }
  // Branch k's working copy (null: none, the branch evaluates its source),
  // and a new one set (models_ is empty until the first copy).
  Component* Copy(size_t k) const { return models_.empty() ? nullptr : models_[k].get(); }
  void SetCopy(size_t k, std::unique_ptr<Component> copy);
  // Sizes what ReleaseWork freed (and the construction's first sizing).
  void EnsureWork();
  // A branch's fluid state in the sweeps: `per_branch` is branch_fluid_'s
  // data, or null when the branches take their loop's.
  const BranchFluid& FluidOf(const BranchFluid* per_branch, size_t k, const Branch& b) const {
    return per_branch ? per_branch[k] : loop_fluid_state_[b.loop];
  }

  const Case& case_;
  // Working copies, per branch (null: none yet; empty: none at all).
  std::vector<std::unique_ptr<Component>> models_;
  // What each branch's model is (the case's component or a part swapped
  // in) and its type: empty while every branch has the case's own.
  std::vector<const Component*> source_;
  std::vector<const ComponentType*> type_;
  std::vector<FluidPtr> loop_fluid_;                // per loop
  std::vector<std::pair<double, double>> oil_anchor_;  // per fluid binding: anchors of its working oil
  std::vector<FluidPtr> oil_;                       // per fluid binding: the working oil
  int n_ = 0;
  std::vector<Branch> branches_;
  std::vector<NodeRef> nodes_;
  std::vector<int> loop_node_offset_;
  std::vector<LoopState> loop_states_;
  std::vector<double> boundary_p_;  // per boundary node (NodeRef::unknown = -1 - its index)
  std::vector<BranchFluid> branch_fluid_;     // per branch, once one is set apart (SetBranchFluid)
  std::vector<BranchFluid> loop_fluid_state_;  // per loop: rho, mu of loop_states_
  std::vector<RowKind> row_kinds_;
  mutable std::vector<int> row_owner_;  // RowOwner's table, made on its first call
  // The full Jacobian, built by jacobian() on demand: its pattern, and per
  // law row the value slots of {p_from, p_to, m, x0, x1} (-1: absent).
  mutable Eigen::SparseMatrix<double> jac_;
  mutable std::vector<std::array<int, 3 + kMaxInternal>> jac_slot_;
  mutable bool jac_built_ = false;
  // Local derivatives saved by ResidualsAndJacobian, one per law row (a
  // branch's rows are row0 .. row0 + nint, so a branch without internal
  // unknowns keeps one, 16 bytes): a_dp = dr/d(dp), a_m = dr/dm; and
  // a_x[i] = dr/dx_i in blocks_x_, held only when a branch has internal
  // unknowns. The starting guess keeps each branch's linearisation (g, m0)
  // in its first row's block until the first ResidualsAndJacobian.
  struct RowBlock {
    double a_dp;
    double a_m;
  };
  std::vector<RowBlock> blocks_;
  std::vector<std::array<double, kMaxInternal>> blocks_x_;
  bool has_internal_ = false;  // a branch with internal unknowns (blocks_x_ is used)
  bool has_sensing_ = false;   // a branch whose law reads p(to) (a_sense_ is used)
  // dr/d p_out of each law row of a sensing branch (Component::SensesOutlet;
  // zero elsewhere), from the last ResidualsAndJacobian; held only when a
  // branch senses.
  std::vector<double> a_sense_;
  // Reduced node-pressure system K, held as Eigen's SimplicialLDLT
  // factorises it: permuted by the fill-reducing ordering (found once at
  // construction: a large forest's reverse breadth-first order, else AMD;
  // network/point/tree_ordering.h), P K P^T, upper triangle, in the entry order of
  // Eigen's own permutation. Assembled there directly, K is factorised with
  // no copy per step, and with the same bits as factorize(K) (the same
  // matrix, entry for entry).
  class PermutedLDLT
      : public Eigen::SimplicialLDLT<Eigen::SparseMatrix<double>, Eigen::Lower, TreeOrAmdOrdering> {
   public:
    void FactorizePermuted(const Eigen::SparseMatrix<double>& kp) { this->template factorize_preordered<true>(kp); }
    // D of L D L^T, by reference (vectorD() returns a copy).
    const Eigen::VectorXd& Diagonal() const { return this->m_diag; }
    // solve(b) in bx (b on entry, x on return) through the work vector *w:
    // Eigen's own steps (SimplicialCholeskyBase::_solve_impl, the same
    // operations, the same bits), with the last permutation written from *w
    // instead of in place, which would allocate a mask on every solve.
    void SolveInPlace(Eigen::Ref<Eigen::VectorXd> bx, Eigen::VectorXd* w) const {
      const bool permuted = this->permutationP().size() > 0;
      if (permuted) w->noalias() = this->permutationP() * bx;
      else *w = bx;
      if (this->matrixL().nestedExpression().nonZeros() > 0) this->matrixL().solveInPlace(*w);
      const auto& d = Diagonal();  // D^-1 w, coefficient by coefficient as Eigen's diagonal product
      for (Eigen::Index i = 0; i < d.size(); ++i) (*w)[i] = (1.0 / d[i]) * (*w)[i];
      if (this->matrixU().nestedExpression().nonZeros() > 0) this->matrixU().solveInPlace(*w);
      if (permuted) bx.noalias() = this->permutationPinv() * *w;
      else bx = *w;
    }
    // analyzePattern(k) (k: lower triangle) that keeps the permuted matrix
    // P K P^T (upper triangle, k's values carried along) in *kp: the one
    // permutation the analysis makes anyway, not a second one.
    void AnalyzeInto(const Eigen::SparseMatrix<double>& k, Eigen::SparseMatrix<double>* kp) {
      const Eigen::SparseMatrix<double>* permuted = nullptr;
      this->ordering(k, permuted, *kp);
      this->analyzePattern_preordered(*permuted, true);
    }
  };
  int nfree_ = 0;
  Eigen::SparseMatrix<double> kp_;  // P K P^T, upper triangle
  std::vector<int> kslot_;          // per branch its (a,b) slot of kp_, -1 absent (the diagonals: kdiag_)
  std::vector<int> kdiag_;          // per free node, its diagonal slot of kp_
  PermutedLDLT ldlt_;
  // Zeroes kp_ and returns its values; K = sum over branches of
  // g_b (e_from - e_to)(e_from - e_to)^T is then added branch by branch.
  double* ZeroK();
  // Adds branch k's conductance g to K's values kv (its slots in kp_).
  void AddConductance(const Branch& b, size_t k, double g, double* kv) const {
    if (b.p_from >= 0) kv[kdiag_[b.p_from]] += g;
    if (b.p_to >= 0) kv[kdiag_[b.p_to]] += g;
    if (kslot_[k] >= 0) kv[kslot_[k]] -= g;
  }
  // The node-pressure solve's work vector (its right side and answer are
  // held in the caller's vector: the step's or the guess's first nfree_
  // entries, the node pressures).
  Eigen::VectorXd solve_work_;
};

}  // namespace loopwright
