// Solving a case at its operating points and collecting the results.
#pragma once

#include <string>
#include <vector>

#include <Eigen/Core>

#include "components/component.h"
#include "network/case/case.h"
#include "network/point/solver.h"
#include "network/point/system.h"
#include "network/point/thermal.h"

namespace loopwright {

struct NodeResult {
  int loop = 0, node = 0;
  bool boundary = false;
  double pressure_pa = 0;  // gauge
  double temperature_k = 0;
  double boiling_margin_k = kNoValue;  // saturation minus liquid temperature (fluids that boil)
  std::vector<std::string> warnings;
};

struct BranchOutcome {
  int loop = 0, comp = 0;
  BranchResult state;
  ComponentReport report;
  double flow_m3s = 0;
};

struct PointResult {
  std::string name;
  std::vector<double> values;  // envelope variable values
  SolverSummary summary;
  bool converged = false;
  std::vector<NodeResult> nodes;
  std::vector<BranchOutcome> branches;
  std::vector<std::string> warnings;  // fluid range etc.
  // Mass-balance closure over the free nodes: the largest |net mass flow| at a
  // node [kg/s], and the largest |net| relative to the largest branch flow of
  // the node's loop (not to the node's own flows, which may be noise: a node
  // behind a closed check valve carries 1e-32 kg/s), with that node's global
  // index (-1 when the loop has no flow).
  double max_mass_imbalance_kg_s = 0;
  double max_mass_imbalance_rel = 0;
  int mass_imbalance_node = -1;
  bool thermal = false;
  int coupling_iterations = 0;        // hydraulic-thermal passes of the nested scheme
  ThermalReport thermal_report;
};

// Everything reused across the points of one case: the hydraulic system and
// solver, and (for thermal cases) the thermal system.
struct CaseSolver {
  explicit CaseSolver(const Case& cs);
  const Case& cs;
  NetworkSystem sys;
  NetworkSolver solver;
  std::unique_ptr<ThermalSystem> thermal;
  Eigen::VectorXd u;           // last answer (warm start)
  std::vector<double> T;       // last node temperatures
  bool has_answer = false;
  // Solves one point, warm-started from the last answer when `warm`.
  PointResult Solve(const OperatingPoint& op, bool warm);
  // The results of `op` at a given state (u, T) without solving: what Solve
  // reports at its answer, evaluated anywhere (the tangents of
  // network/envelope/sensitivity.h differentiate reported values along the solution
  // path). T is ignored at isothermal points. `op` must be the point last
  // applied (by Solve).
  PointResult Describe(const OperatingPoint& op, const Eigen::VectorXd& u, const std::vector<double>& T);
  // Whether `op` is solved with the energy balances.
  bool IsThermal(const OperatingPoint& op) const { return thermal && !op.isothermal; }
};

// Applies an operating point to the case's components and the system:
// envelope bindings, loop temperatures, fluid properties, boundary pressures.
void ApplyPoint(const Case& cs, const OperatingPoint& op, NetworkSystem* sys);

// Solves one point. `u` is the starting guess on entry (if `warm` and of the
// right size), the answer on return.
PointResult SolvePoint(const Case& cs, const OperatingPoint& op, NetworkSystem* sys, NetworkSolver* solver,
                       Eigen::VectorXd* u, bool warm);

// "loop/node" of the node with the worst relative mass imbalance, "" if none.
std::string MassImbalanceNode(const Case& cs, const PointResult& p);

// The index of the envelope point named `name`, or -1.
int FindPoint(const Case& cs, const std::string& name);

}  // namespace loopwright
