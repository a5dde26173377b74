// Solving the network equations F(u) = 0 of a NetworkSystem.
//
// Method (first attempt): Newton-Raphson with the exact Jacobian (automatic differentiation
// of every component law), sparse LU factorisation whose symbolic analysis is
// done once per system and reused by every iteration and every operating
// point, and a backtracking line search on the scaled merit function
//   phi(u) = 1/2 * sum_i (F_i(u) / s_i)^2
// (s_i: a pressure, volumetric-flow or mass-flow scale per row kind). When
// Newton stalls (singular Jacobian, line search failure, iteration limit),
// the node-pressure Newton with a line search on the network's co-content
// (network/point/nodal.cpp) starts from the better of the start and Newton's
// last point: for a network of monotone laws (every law of loopwright while
// a pump's head falls with flow) it cannot stall, a hard switch included
// (taken as its filled graph). Only if that fails too, Ceres'
// Levenberg-Marquardt minimises the scaled residuals from the best point, and
// Newton is tried once more from LM's answer.
//
// Convergence is judged in physical units, row by row:
//   |F_i| <= max(pressure_tolerance_pa, |dF_i/dm| * m_tol) for law rows in Pa
//            (m_tol the mass-flow tolerance below: a steep law is met when
//            the flow it implies is within the flow tolerance),
//   |F_i| <= flow_rel_tolerance * flow_scale_m3s           for law rows in m3/s,
//   |F_i| <= flow_rel_tolerance * flow_scale_m3s * rho     for mass balances,
// where flow_scale_m3s is the largest branch flow of the current iterate
// (floored at flow_floor_m3s). A point that does not meet them is reported as
// not converged with the rows whose scaled residuals are largest.
#pragma once

#include <Eigen/SparseCore>
#include <Eigen/SparseLU>

#include <algorithm>
#include <memory>
#include <string>
#include <vector>

#include "network/point/system.h"

namespace loopwright {

struct SolverOptions {
  int max_iterations = 60;               // Newton iterations per attempt
  double pressure_tolerance_pa = 1e-6;   // |F_i| <= this for Pa rows
  double flow_rel_tolerance = 1e-11;     // |F_i| <= this * flow scale for flow rows
  double flow_floor_m3s = 1e-9;          // smallest flow scale [m3/s]
  double pressure_scale_pa = 1e5;        // s_i of Pa rows in the merit function
  double min_step = 1e-10;               // line search gives up below this step fraction
  double armijo = 1e-4;                  // sufficient decrease: phi(u+a*du) <= (1 - 2*armijo*a) phi(u)
  double max_pressure_pa = 1e9;          // |p| beyond this (10,000 bar) is not a physical answer
  bool plain_newton = true;              // the first attempt (false: straight to the co-content Newton)
  bool co_content = true;                // the co-content Newton when the plain Newton stalls
  bool use_fallback = true;              // Levenberg-Marquardt when both stall
  bool nodal_reduction = true;           // Newton steps by the node-pressure Schur complement
                                         // (NetworkSystem::ReducedNewtonStep), LU of J otherwise
  int max_nodal_iterations = 200;        // iterations of the co-content Newton (network/point/nodal.cpp)
};

enum class Termination {
  kConverged,
  kSingularJacobian,
  kLineSearchFailed,
  kMaxIterations,
  kNonFinite,
  kUnphysical,         // a state no liquid can be in (pressure unbounded, below the
                       // liquid's pressure floor, temperature far outside the fluid model)
  kEnergyBalance,      // the energy balance (thermal points) did not converge
  kCouplingNotSettled, // hydraulic-thermal passes did not settle
};
const char* TerminationName(Termination t);

struct RowDiagnosis {
  std::string what;    // "component oil/filter (filter)" or "mass balance at node oil/feed"
  double residual;     // in its own unit
  std::string unit;    // "Pa", "m3/s", "kg/s"; "W" for energy balances; for an
                       // unphysical state the violated quantity, "Pa" or "K"
  int branch = -1;     // global branch index of a component law row, else -1
  int node = -1;       // global node index of a mass or energy balance row, else -1
  bool violation = false;  // a violated physical bound, not an equation's residual
};

struct SolverSummary {
  Termination termination = Termination::kMaxIterations;
  bool converged() const { return termination == Termination::kConverged; }
  int newton_iterations = 0;
  int coupling_passes = 0;  // hydraulic-thermal passes of a thermal point (0: isothermal); newton_iterations sums them
  int nodal_iterations = 0;  // iterations of the co-content Newton, when the plain Newton stalled
  int lm_iterations = 0;
  int lu_steps = 0;  // Newton steps that needed the full sparse LU
  bool used_fallback = false;
  double initial_merit = 0, final_merit = 0;
  double max_pressure_residual_pa = 0;
  double max_flow_residual = 0;  // largest |F_i| / tolerance_i over flow and mass rows
  std::vector<RowDiagnosis> worst;  // largest scaled residuals, when not converged (never
                                    // empty then; see network/point/failure_causes.h)
  std::string message;
  // When not converged: the likely cause in words, a short stable id of its
  // kind ("cavitation", "dead-headed-pump", ... ; see failure_causes.h) and
  // the place ("node oil/pump_in", "component oil/bearing").
  std::string cause, cause_kind, place;
  // One paragraph: iterations, residual norms, why it stopped.
  std::string Report() const;
};

class NetworkSolver {
 public:
  explicit NetworkSolver(NetworkSystem* system, SolverOptions options = {});
  // Solves from *u (a starting guess, e.g. the previous point's answer, or
  // NetworkSystem::StartingGuess). On return *u holds the best iterate.
  // from_guess: *u is the system's StartingGuess at its present state, made
  // again if the start is needed (a one-shot solve then holds no copy of it).
  SolverSummary Solve(Eigen::VectorXd* u, bool from_guess = false);
  const SolverOptions& options() const { return options_; }
  void set_options(const SolverOptions& o) { options_ = o; }
  // Frees the iteration's work vectors and factorisations, this solver's and
  // its system's (NetworkSystem::ReleaseWork): a one-shot solve calls it
  // once the answer is in *u, before the result is collected. The next
  // Solve sizes them again.
  void ReleaseWork();

 private:
  // What one pass over the rows of a residual vector at flow scale q finds:
  // the merit's sum of squares, the convergence test (with kTest) and
  // whether every row is finite.
  struct RowPass {
    double q = 0;             // the flow scale it was taken at
    double sum_sq = 0;        // sum of (F_i / s_i)^2: the merit is half of it
    double max_p = 0;         // largest |F_i| of the Pa rows
    double max_f = 0;         // largest |F_i| / tolerance_i of the flow and mass rows
    bool met = true;          // every Pa row within its tolerance
    bool finite = true;       // every row finite
    bool Converged() const { return met && max_f <= 1.0; }
  };
  template <bool kTest>
  RowPass PassRows(const Eigen::VectorXd& r, double q) const;
  // The plain Newton from *u; with `evaluated`, r_ and the Jacobian already
  // hold the residuals at *u and *evaluated is their pass (kTest). On
  // return pass_ is the pass of r_ at *u when r_ holds *u's residuals.
  Termination Newton(Eigen::VectorXd* u, SolverSummary* s, const RowPass* evaluated = nullptr);
  // Evaluates r (with the Jacobian when kJacobian) at u and passes its rows.
  template <bool kJacobian, bool kTest>
  RowPass EvaluateAndPass(const Eigen::VectorXd& u, Eigen::VectorXd* r);
  bool Converged(const Eigen::VectorXd& u, const Eigen::VectorXd& r, SolverSummary* s) const;
  double Merit(const Eigen::VectorXd& u, const Eigen::VectorXd& r) const;
  // The same at a known flow scale q = FlowScale(u).
  bool ConvergedAt(const Eigen::VectorXd& r, double q, SolverSummary* s) const;
  double MeritAt(const Eigen::VectorXd& r, double q) const;
  double FlowScale(const Eigen::VectorXd& u) const;
  // The flow scale from the largest branch flow (NetworkSystem::Residuals).
  double FlowScaleOf(double largest_flow) const { return std::max(options_.flow_floor_m3s, largest_flow); }
  void LevenbergMarquardt(Eigen::VectorXd* u, SolverSummary* s);
  // Tolerance of row `row`, a law row of branch `branch`, at flow scale q.
  double LawRowTolerance(int row, int branch, double q) const;
  // Tolerance of any row (law or mass balance) at flow scale q.
  double RowTolerance(int row, double q) const;
  // The co-content Newton (network/point/nodal.cpp) and its parts.
  Termination CoContentNewton(Eigen::VectorXd* u, SolverSummary* s);
  double CoContentDirection(const Eigen::VectorXd& x, double tilt, bool* gradient);
  void TiltFloors(const Eigen::VectorXd& x, double tilt);
  double CoContentLineSearch(const Eigen::VectorXd& x, double s0, double q, bool extrapolate);
  bool CoContentSlope(const Eigen::VectorXd& x, double a, double q, double* slope);
  bool ProjectFlows(Eigen::VectorXd* u, double q) const;
  bool BranchFlowOnLaw(int k, double* vals, double q) const;
  bool BranchBlockOnLaw(int k, double* vals, double q) const;
  void Diagnose(const Eigen::VectorXd& u, SolverSummary* s) const;

  void EnsureWork();

  NetworkSystem* system_;
  SolverOptions options_;
  using SparseLUType = Eigen::SparseLU<Eigen::SparseMatrix<double>, Eigen::COLAMDOrdering<int>>;
  SparseLUType lu_;
  bool analyzed_ = false;
  // Puts *u back at the start (a copy, or from_guess the starting guess).
  void Restart(Eigen::VectorXd* u, const Eigen::VectorXd& start, bool from_guess);
  // Work vectors, sized once.
  Eigen::VectorXd r_, du_, u_trial_, dir_;
  std::vector<double> g_floor_;  // per branch: conductance floors of a tilted step
  RowPass pass_;                 // of r_, when the plain Newton left r_ at its iterate
};

}  // namespace loopwright
