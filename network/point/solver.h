// Solving the network equations F(u) = 0 of a NetworkSystem.
//
// Method: Newton-Raphson with the exact Jacobian (automatic differentiation
// of every component law), sparse LU factorisation whose symbolic analysis is
// done once per system and reused by every iteration and every operating
// point, and a backtracking line search on the scaled merit function
//   phi(u) = 1/2 * sum_i (F_i(u) / s_i)^2
// (s_i: a pressure, volumetric-flow or mass-flow scale per row kind). When
// Newton stalls (singular Jacobian, line search failure, iteration limit),
// Ceres' Levenberg-Marquardt minimises the same scaled residuals from the
// best point Newton reached, and Newton is tried once more from LM's answer.
//
// Convergence is judged in physical units, row by row:
//   |F_i| <= pressure_tolerance_pa                        for law rows in Pa,
//   |F_i| <= flow_rel_tolerance * flow_scale_m3s           for law rows in m3/s,
//   |F_i| <= flow_rel_tolerance * flow_scale_m3s * rho     for mass balances,
// where flow_scale_m3s is the largest branch flow of the current iterate
// (floored at flow_floor_m3s). A point that does not meet them is reported as
// not converged with the rows whose scaled residuals are largest.
#pragma once

#include <Eigen/SparseCore>
#include <Eigen/SparseLU>

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
  bool use_fallback = true;              // Levenberg-Marquardt when Newton stalls
  bool nodal_reduction = true;           // Newton steps by the node-pressure Schur complement
                                         // (NetworkSystem::ReducedNewtonStep), LU of J otherwise
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
  SolverSummary Solve(Eigen::VectorXd* u);

 private:
  Termination Newton(Eigen::VectorXd* u, SolverSummary* s);
  bool Converged(const Eigen::VectorXd& u, const Eigen::VectorXd& r, SolverSummary* s) const;
  double Merit(const Eigen::VectorXd& u, const Eigen::VectorXd& r) const;
  double FlowScale(const Eigen::VectorXd& u) const;
  void LevenbergMarquardt(Eigen::VectorXd* u, SolverSummary* s);
  void Diagnose(const Eigen::VectorXd& u, SolverSummary* s) const;

  NetworkSystem* system_;
  SolverOptions options_;
  Eigen::SparseLU<Eigen::SparseMatrix<double>, Eigen::COLAMDOrdering<int>> lu_;
  bool analyzed_ = false;
  // Work vectors, sized once.
  Eigen::VectorXd r_, r_trial_, du_, u_trial_;
};

}  // namespace loopwright
