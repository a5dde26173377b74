// Solving a case at its operating points and collecting the results.
#pragma once

#include <string>
#include <vector>

#include <Eigen/Core>

#include "components/component.h"
#include "network/case/case.h"
#include "network/point/point_state.h"
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
};

// What the solve found at one branch: its unknowns and the model in effect
// (72 bytes: a plant-size header holds three per bearing). The rest of its
// state (end pressures, piezometric drop, fluid, temperatures, heat) follows
// from the point's node results and loop states: BranchState rebuilds it
// with the same bits the solve had. Its report (items, valve, warnings,
// heats) is not held either: BranchReport makes it when read (DEVELOPERS.md,
// "Reports made when read", "The result in fewer bytes").
struct BranchOutcome {
  int loop = 0, comp = 0;
  double m = 0;         // mass flow from `from` to `to` [kg/s]
  double flow_m3s = 0;  // m / rho
  double x[kMaxInternal] = {0, 0};  // the model's internal unknowns
  // The model in effect at the point: its type, what it was built from (the
  // case's model or a part swapped in, both owned by the case) and its
  // parameter values there (bindings, design knobs and the state a model
  // that follows its stream writes into its parameter slots), kept only
  // where they differ from the case's component. type_info is set by every
  // solve; null for a result made by hand, whose report is empty.
  const ComponentType* type_info = nullptr;
  const Component* base_model = nullptr;
  ParamArray params;
};

// One loop at a point: the global index of its first node (PointResult::
// nodes), its temperature (every stream's at an isothermal point), the
// fluid's density and viscosity there (every branch's unless the point set
// branches' own, PointResult::branch_fluids) and the fluid.
struct LoopAtPoint {
  int first_node = 0;
  double temperature_k = 0;
  double rho = 0, mu = 0;
  const Fluid* fluid = nullptr;
};

// A branch's stream at a thermal point: inlet temperature [K], specific heat
// there [J/(kg.K)], heat added [W], outlet temperature [K] (BranchResult).
struct BranchHeat {
  double t_in = 0, cp = 0, heat = 0, t_out = 0;
};

// The parameter values and type of a branch at its point (the case's
// component where the outcome does not carry them), and a model with them.
const ParamArray& BranchParams(const Case& cs, const BranchOutcome& b);
const ComponentType& BranchType(const Case& cs, const BranchOutcome& b);
std::unique_ptr<Component> BranchModel(const Case& cs, const BranchOutcome& b);

struct PointResult {
  std::string name;
  std::vector<double> values;  // envelope variable values
  SolverSummary summary;
  bool converged = false;
  std::vector<NodeResult> nodes;
  std::vector<BranchOutcome> branches;
  // What BranchState reads besides the nodes: per loop; per branch only
  // where a thermal point set them (else empty); whether the point's
  // descriptions serve the checks only (BranchResult::for_checks_only).
  std::vector<LoopAtPoint> loop_states;
  std::vector<BranchFluid> branch_fluids;
  std::vector<BranchHeat> branch_heats;
  bool for_checks_only = false;
  std::vector<std::string> warnings;  // fluid range etc.
  // Mass-balance closure over the free nodes: the largest |net mass flow| at a
  // node [kg/s], and the largest |net| relative to the largest branch flow of
  // the node's loop (not to the node's own flows, which may be noise: a node
  // behind a closed check valve carries 1e-32 kg/s), floored at the solver's
  // flow floor (SolverOptions::flow_floor_m3s), with that node's global
  // index (-1 when the loop has no free node).
  double max_mass_imbalance_kg_s = 0;
  double max_mass_imbalance_rel = 0;
  int mass_imbalance_node = -1;
  bool thermal = false;
  int coupling_iterations = 0;        // hydraulic-thermal passes of the nested scheme
  ThermalReport thermal_report;
  // Per loop, the fluid at this point when the case binds an oil grade to
  // envelope variables (else empty: the case's fluids).
  std::vector<FluidPtr> fluids;
};

// The fluid of loop `loop` at the point of `p`.
const Fluid& PointFluid(const Case& cs, const PointResult& p, int loop);

// The state the solve found at branch k of `p` (b: an element of
// p.branches), as its model's Describe reads it: the end pressures are the
// nodes' (gauge), dp the piezometric drop p_from - p_to + rho g (z_from -
// z_to), the fluid state the loop's or the branch's own, temperatures the
// branch's at a thermal point (thermal set) or the loop's. The same bits as
// the solve's own BranchResult. A result made by hand (no loop states) gives
// the flow and unknowns only.
BranchResult BranchState(const Case& cs, const PointResult& p, size_t k);
BranchResult BranchState(const Case& cs, const PointResult& p, const BranchOutcome& b);

// The report of branch k of `p`: its model in effect (BranchModel) describes
// the state the solve found; at a thermal point the stream's heat and its
// inlet and outlet temperatures; for one path of a three-port thermostatic
// valve its share of the valve's flow ("split"). Made when read, the same as
// a solve would have made it (BranchOutcome holds everything it reads). A
// reader of several items of a branch calls it once; one that reads many
// branches passes a report to reuse (DescribeBranch: cleared first).
ComponentReport BranchReport(const Case& cs, const PointResult& p, size_t k);
void DescribeBranch(const Case& cs, const PointResult& p, size_t k, ComponentReport* out);
// The same for an outcome held in p.branches.
ComponentReport BranchReport(const Case& cs, const PointResult& p, const BranchOutcome& b);

struct SensedNode;  // a thermostat's sensed node (run_thermostat.cpp)
struct CoupledJacobian;  // network/point/coupled_newton.h

// Everything reused across the points of one case, per thread: the
// hydraulic system (with its working copies of the models and fluids) and
// solver, and (for thermal cases) the thermal system. Many solvers may share
// one const Case.
struct CaseSolver {
  explicit CaseSolver(const Case& cs);
  const Case& cs;
  NetworkSystem sys;
  NetworkSolver solver;
  std::unique_ptr<ThermalSystem> thermal;
  Eigen::VectorXd u;           // last answer (warm start)
  std::vector<double> T;       // last node temperatures
  bool has_answer = false;
  // Design choices held for every point this solver solves (sizing, fixes).
  DesignOverrides overrides;
  PointState state;            // of the point last applied
  // Solves one point, warm-started from the last answer when `warm`. The
  // answer depends only on (case, op, overrides) and, when warm, the start.
  PointResult Solve(const OperatingPoint& op, bool warm);
  // One point only (the `solve` command, SolveOnce): an isothermal point's
  // Newton work (NetworkSolver::ReleaseWork) is freed before its result is
  // collected, so the two are not held together. A later Solve sizes it
  // again (slower, not wrong).
  bool one_shot = false;
  // Applies `op` with the overrides: the state, the working models and
  // fluids, the thermal system's point values.
  void Apply(const OperatingPoint& op);
  // A design knob as the solver uses it now: component parameter (loop,
  // comp, param) or, with coupling >= 0, a coupling's conductance; NaN when
  // it does not act (a coupling without the energy balance). SetKnob holds
  // the value in `overrides` and writes it into the working set at once (so
  // tangents see it without a solve); false when it does not act.
  double Knob(int loop, int comp, int param, int coupling);
  bool SetKnob(int loop, int comp, int param, int coupling, double value);
  // An oil's reference viscosity (anchor 0 KV40, 1 KV100 of
  // Case::fluid_bindings[binding]) as the last applied point uses it, and
  // held in `overrides` (the point is applied again: false before any).
  double OilAnchor(int binding, int anchor) const;
  bool SetOilAnchor(int binding, int anchor, double kv);
  const OperatingPoint* applied = nullptr;  // the point last applied
  // The results of `op` at a given state (u, T) without solving: what Solve
  // reports at its answer, evaluated anywhere (the tangents of
  // network/envelope/sensitivity.h differentiate reported values along the solution
  // path). T is ignored at isothermal points. `op` must be the point last
  // applied (by Solve).
  PointResult Describe(const OperatingPoint& op, const Eigen::VectorXd& u, const std::vector<double>& T);
  // A thermal point (Solve), at the thermal system's heat scale: the nested
  // passes, or with thermostatic valves that sense a free temperature the
  // passes inside a safeguarded root search on each sensed temperature
  // (run_thermostat.cpp).
  PointResult SolveCoupled(const OperatingPoint& op, bool warm);
  // The nested hydraulic-thermal passes: hydraulics at the current
  // temperatures, then the energy balances at the resulting flows, until the
  // temperatures stop moving (the valves' held sensed temperatures fixed).
  PointResult SolvePasses(const OperatingPoint& op, bool warm);
  // Whether SolvePasses describes a converged answer (nodes, components,
  // the physical-state test). The thermostat search turns it off for its
  // trials and describes only the answer it keeps (CollectAnswer): most of
  // a trial's cost was the description (a gravity drain's fill level).
  bool collect_answers = true;
  void CollectAnswer(const OperatingPoint& op, PointResult* res);
  // The thermostatic valves of the case (thermal.h SensorSite).
  std::vector<SensorSite> sensors;
  // The passes settle when no temperature moves by more than this [K]
  // (1e-9; the thermostat search loosens it for its early trials).
  double passes_tolerance_k = 1e-9;
  // The thermostat search accepts |T_s - x| <= settle_k [K] at every sensed
  // node and settles its answer's passes to settle_k / 2 (2e-9 K: the
  // passes' own tolerance; a tolerance study's samples loosen it,
  // network/tolerance/spread.h).
  double settle_k = 2e-9;
  // Per global node, a guess of d(T_s - x)/dx at a sensed node's root (NaN
  // or empty: none), used on warm solves for the first steps of the search
  // (x - f / slope instead of x + f); and what the last search found there
  // (the secant of its last trials), to hand to a later solve of the point.
  std::vector<double> sensed_slopes, sensed_slopes_found;
  PointResult SearchSensed(const OperatingPoint& op, bool warm, const std::vector<SensedNode>& nodes);
  // A failed thermal point solved again by continuation in its heat input
  // (run.cpp): its answer if the continuation reaches the full heat, else
  // `failed` with a thermal-runaway cause when a fraction of the heat has a
  // steady state.
  PointResult SolveByContinuation(const OperatingPoint& op, PointResult failed);
  bool RunawayCandidate(const PointResult& r) const;
  // A thermal point's coupled Jacobian at a nearby answer (a tolerance
  // study's nominal point, network/point/coupled_newton.h): when set, a warm
  // solve first runs the coupled chord iteration from the start and hands
  // its answer to one nested pass (SolveNear); only if that does not accept
  // it are the passes run as before, from the same start. The caller sets it
  // for the point it solves next (null: the passes only).
  std::shared_ptr<const CoupledJacobian> coupled;
  bool SolveNear(const OperatingPoint& op, PointResult* out);
  // Points SolveNear answered, and their chord steps (for the benchmark).
  uint64_t near_points = 0, near_steps = 0;
  void Relax(const std::vector<double>& t_prev, std::vector<double>* step, double* omega);
  // Whether `op` is solved with the energy balances.
  bool IsThermal(const OperatingPoint& op) const { return thermal && !op.isothermal; }
};

// The cause_kind of a thermal point whose thermostatic valve's sensed
// temperature did not settle (run_thermostat.cpp).
inline constexpr const char* kThermostatNotSettled = "thermostat-not-settled";

// Applies an operating point (no design overrides) to the system's working
// models and fluids: envelope bindings, loop temperatures, fluid properties,
// boundary pressures.
void ApplyPoint(const Case& cs, const OperatingPoint& op, NetworkSystem* sys);

// Solves one point of `cs` with a solver of its own (one_shot), cold.
PointResult SolveOnce(const Case& cs, const OperatingPoint& op);

// Solves one point. `u` is the starting guess on entry (if `warm` and of the
// right size), the answer on return.
PointResult SolvePoint(const Case& cs, const OperatingPoint& op, NetworkSystem* sys, NetworkSolver* solver,
                       Eigen::VectorXd* u, bool warm);

// "loop/node" of the node with the worst relative mass imbalance, "" if none.
std::string MassImbalanceNode(const Case& cs, const PointResult& p);

// The index of the envelope point named `name`, or -1.
int FindPoint(const Case& cs, const std::string& name);

}  // namespace loopwright
