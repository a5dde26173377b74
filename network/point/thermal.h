// Temperatures: the energy balance of every node, solved with the flows of a
// converged hydraulic solve, and coupled back to the hydraulics through the
// fluid properties (a nested scheme; see SolveCoupledPoint in run.cpp).
//
// Unknowns: the temperature of every node that does not hold a fixed
// temperature [K]. Residual at node n, in W (steady state, heat into the
// node's liquid positive):
//
//   E_n = sum over branches b with n downstream of b:
//           m_b+ (h(T_up,b) - h(T_n)) + w_b H_b          (upwind mixing)
//       + G_c sum over branches touching n (T_other - T_n)   (axial conduction)
//       + Qdot_n - UA_amb,n (T_n - T_amb)                  (node heat, reservoir loss)
//       + n+_d (h(T_d) - h(T_n))  for every boundary d draining into n,
//         n_d = arriving - departing flow at d, n+ = n s(n), n- = n+ - n;
//         and at d itself n-_d (h(T_n) - h(T_d)): a housing that sends out
//         more than it receives (a bearing drawing oil back out of it) takes
//         the rest from its receiver n
//       + G_d (T_d - T_n) for every such d, and G_d (T_n - T_d) at d itself,
//         G_d = 1e-6 (1 - tanh^2(arriving_d / m_s)) W/K: a draining boundary
//         that nothing flows into holds its receiver's oil; zero while
//         anything arrives at d
//   with h(T) = integral of cp dT (library/enthalpy.h, at ambient pressure).
//       + the couplings' heat for the branches of n
//
//   m_b+ = m s(m), with s(m) = (1 + tanh(m / m_s))/2 the smooth upwind
//   weight; for the reverse direction m_b- = -m (1 - s). T_up,b = s T_from +
//   (1 - s) T_to. w_b = s or 1 - s puts the branch's heat where its stream
//   arrives. H_b = Q_b dp_b + HeatAdded_b: the dissipation of the branch's
//   piezometric drop (the steady-flow energy equation for an incompressible
//   liquid: m (cp dT + dp/rho) = heat + shaft work) plus the component's own
//   heat (shaft power, bearing friction, heat soak, minus cooler duty).
//   G_c = 1e-6 (1 - tanh^2(m / m_s)) W/K keeps a node with no through-flow
//   at its neighbours' temperature; it vanishes along a branch that carries
//   a flow (|m| > 30 m_s), so it never shifts a flowing stream's temperature.
//   With "work_heat": false (case.h) H_b = HeatAdded_b, and 0 for a pump:
//   no Q dp and no pump losses, as a hand energy balance; the work heat is
//   still computed and reported per branch and loop.
//
// Outlet temperature of a branch: h(T_out) = h(T_up) + (H_b + the coupling
// duty its stream receives) / |m|, inverted
// by library/enthalpy.h; where the branch alone feeds a node with no heat of
// its own, it is that node's temperature (to the Newton tolerance, 1e-12 of
// the loop's largest m cp x 1 K or heat, divided by the node's m cp).
//
// Energy closure (Account): per loop, heat added - heat removed - enthalpy
// carried out through boundary nodes, computed from the heats and boundary
// flows rather than from the node residuals. It equals the sum of the
// residuals when the bookkeeping is right, so it is small only at a solved
// point; a converged point (Finish, after the last pass) whose closure
// exceeds 1e-9 of the loop's heat is refused with the loop and numbers
// named (ThermalReport::failure).
//
// Properties (cp, rho, mu) are those of the branch's fluid at T_up,b; their
// temperature derivatives enter the Jacobian exactly.
// Couplings (liquid-to-liquid heat exchangers between loops) move
// q = eps C_min (T_hot,in - T_cold,in) by the e-NTU method from the hot
// branch's stream to the cold one's, with each stream's capacity rate
// C = |m| (h_in - h_out)/(T_in - T_out), its mean cp over its own change of
// temperature by q (library/enthalpy.h). C depends on q, so q is the fixed
// point of q = eps(C(q)) C_min(q) ITD, iterated inside each evaluation with
// its Jet derivatives (HeatExchangedImplicit in
// components/correlations/heat_exchanger.h); the air cooler does the same.
#pragma once

#include <Eigen/Dense>
#include <Eigen/SparseCore>
#include <Eigen/SparseLU>

#include <string>
#include <vector>

#include "network/case/case.h"
#include "network/point/system.h"

namespace loopwright {

struct CouplingSpec {
  int hot_branch = -1, cold_branch = -1;  // global branch indices
  int arrangement = 0;                    // index in HeatExchangerArrangements()
  double conductance = 0;                 // UA [W/K]
  std::string id;
};

struct ThermalReport {
  bool converged = false;
  int iterations = 0;
  double max_residual_W = 0;
  std::string failure;                // why a converged Newton was refused (energy closure)
  std::vector<double> branch_heat;    // H_b [W]: the heat the balance adds to the stream
  std::vector<double> branch_work;    // work heat of the branch [W]: Q dp, plus a pump's shaft power
                                      // (counted whether or not "work_heat" puts it in H_b)
  std::vector<double> branch_t_in;    // inlet temperature [K]
  std::vector<double> branch_t_out;   // outlet stream temperature [K]:
                                      // h(t_out) = h(t_in) + (H_b + branch_exchanged)/|m|
  std::vector<double> branch_cp;      // [J/(kg.K)]
  std::vector<double> branch_exchanged;  // coupling duty the branch's stream receives [W] (< 0 hot side)
  std::vector<double> coupling_duty;  // [W], hot -> cold
  std::vector<double> coupling_effectiveness;
  std::vector<double> coupling_hot_in, coupling_cold_in;  // stream inlet temperatures [K]
  // Per loop: heat added (all positive heat terms), heat removed, enthalpy
  // carried out through boundary nodes (with the heat fixed-temperature
  // nodes absorb), the work heat (sum of branch_work), and the closure
  // added - removed - carried in W and relative to the largest of added,
  // removed and the loop's largest through-flow m cp times 1 K.
  std::vector<double> loop_heat_added, loop_heat_removed, loop_heat_carried, loop_work_heat;
  std::vector<double> loop_closure, loop_closure_W;
};

// A thermostatic valve path whose element follows a node's temperature
// (components/thermostatic_valve.h; its case leaves sensed_temperature out):
// its global branch, the global node it senses, and its loop.
struct SensorSite {
  int branch = -1, node = -1, loop = -1;
};
std::vector<SensorSite> SensorSites(const Case& cs, const NetworkSystem& sys);
// Writes temperature t [K] into the sensed_temperature of the site's working
// model (nothing when a part of another type is swapped in there).
void WriteSensed(const SensorSite& site, double t, NetworkSystem* sys);

class ThermalSystem {
 public:
  ThermalSystem(const Case& cs, const NetworkSystem& sys);

  // Fixed temperatures, node heats, ambient temperatures, coupling
  // conductances and node fluids of a point (call after
  // NetworkSystem::SetState with the same state).
  void SetState(const PointState& st);
  // Initial temperatures: fixed ones, else the loop temperature of the point.
  void InitialTemperatures(const OperatingPoint& op, std::vector<double>* T) const;
  // Sets each branch's fluid state (rho, mu) at its upstream temperature,
  // hands each model its stream (Component::FollowStream: a journal
  // bearing's film temperature for its eccentricity from load),
  // and each thermostatic valve's sensed temperature: its sensed node's T, or
  // the node's hold (HoldSensed) while the coupled solve holds it.
  void ApplyBranchFluids(const std::vector<double>& T, const Eigen::VectorXd& u, NetworkSystem* sys) const;
  // The thermostatic valves (SensorSites) and the hold of their sensed nodes:
  // t [K] for every element sensing global node g, NaN to follow T again.
  const std::vector<SensorSite>& sensors() const { return sensors_; }
  void HoldSensed(int g, double t) { hold_[g] = t; }
  double held(int g) const { return hold_[g]; }
  void ReleaseSensed() { std::fill(hold_.begin(), hold_.end(), kNoValue); }
  // Newton on the energy balances with the flows of u fixed. T in/out per
  // global node.
  bool Solve(const Eigen::VectorXd& u, std::vector<double>* T, ThermalReport* report);
  // After the last pass of a point: outlet temperatures and the per-loop
  // energy accounting of `report` at (u, T); false, with report->failure
  // naming the loop and the numbers, when a loop's closure exceeds 1e-9.
  bool Finish(const Eigen::VectorXd& u, const std::vector<double>& T, ThermalReport* report);

  // For tangents of a converged point (network/envelope/sensitivity.h), with the flow
  // scale of the last Solve kept: the residuals E(u, T) [W] per unknown
  // temperature (and, if `report` is set, its branch and coupling values),
  // and the Jacobian dE/dT at (u, T).
  void Residuals(const Eigen::VectorXd& u, const std::vector<double>& T, Eigen::VectorXd* r, ThermalReport* report);
  const Eigen::SparseMatrix<double>& Jacobian(const Eigen::VectorXd& u, const std::vector<double>& T);
  // Unknown index of global node g, -1 when its temperature is fixed.
  int UnknownOf(int g) const { return unknown_[g]; }
  // Conductance UA [W/K] of coupling i as used now (a design knob, see
  // sensitivity.h; SetState resets it to the case's or the state's value).
  double* coupling_conductance(size_t i) { return &couplings_[i].conductance; }
  const std::vector<CouplingSpec>& couplings() const { return couplings_; }

  int NumUnknowns() const { return n_; }

  // Continuation in the heat input (run.cpp): every heat source (a branch's
  // positive heat H_b, a node's positive heat) is multiplied by `scale` in
  // [0, 1]; sinks (coolers, losses, couplings) are not. 1 outside a
  // continuation.
  void SetHeatScale(double scale) { heat_scale_ = scale; }
  // The flow scale m_s of the smooth upwind weight [kg/s] (Solve sets it
  // from the flows; a transient holds one for the whole run, network/time/).
  void SetFlowScale(double m_scale) { m_scale_ = m_scale; }
  double flow_scale() const { return m_scale_; }
  double heat_scale() const { return heat_scale_; }

 private:
  template <class J>
  void BranchTerms(size_t k, const Eigen::VectorXd& u, const std::vector<double>& T, bool jac,
                   Eigen::VectorXd* r, double* vals, ThermalReport* rep) const;
  void ReadCouplings();
  void BuildPattern();
  // Takes the step -alpha dT_ from *T, halved until the balances shrink.
  // True when the step taken was the full one, whose trial evaluation also
  // filled J_: r_ and J_ are then those of *T, and Solve need not evaluate
  // the same temperatures again.
  bool LineSearch(const Eigen::VectorXd& u, double alpha, std::vector<double>* T, ThermalReport* rep);
  void Evaluate(const Eigen::VectorXd& u, const std::vector<double>& T, Eigen::VectorXd* r, bool jac,
                ThermalReport* rep);
  double UpwindWeight(double m) const;
  // The drains' terms of Evaluate (thermal.cpp).
  void DrainTerms(const Eigen::VectorXd& u, const std::vector<double>& T, bool jac, Eigen::VectorXd* r, double* vals);
  // Adds v to the balance of global node g: its residual when its
  // temperature is free, else (during Account) what the node absorbs.
  void Deposit(int g, double v, Eigen::VectorXd* r) const;
  // branch_t_out of rep from its inlet temperatures, heats and duties.
  void OutletTemperatures(const Eigen::VectorXd& u, ThermalReport* rep) const;
  // Per-loop energy accounting of rep at (u, T) (ThermalReport), with the
  // outlet temperatures.
  void Account(const Eigen::VectorXd& u, const std::vector<double>& T, ThermalReport* rep);

  const Case& case_;
  const NetworkSystem& sys_;
  int n_ = 0;
  std::vector<int> unknown_;   // per global node, -1 fixed
  std::vector<double> fixed_T_, node_heat_, amb_T_, amb_G_;
  std::vector<int> drains_to_;  // per global node, global node or -1
  std::vector<const Fluid*> node_fluid_;
  std::vector<CouplingSpec> couplings_;
  std::vector<double> case_conductance_;       // per coupling, as the case gives it
  std::vector<char> is_pump_;                  // per branch: HeatAdded is shaft power (work)
  std::vector<double>* sink_ = nullptr;        // per global node, during Account
  double m_scale_ = 1e-12;
  double heat_scale_ = 1.0;
  // Node g's own heat [W] with the heat scale applied to a source.
  double NodeHeat(size_t g) const { return node_heat_[g] > 0 ? heat_scale_ * node_heat_[g] : node_heat_[g]; }
  Eigen::SparseMatrix<double> J_;
  std::vector<int> slots_;  // per branch: 2x2 (from,to)x(from,to); per coupling 4x4; per drain 2x2
  size_t coupling_slot0_ = 0, drain_slot0_ = 0;
  std::vector<std::pair<int, int>> drains_;  // (d, r) global nodes
  std::vector<int> diag_slot_;
  Eigen::SparseLU<Eigen::SparseMatrix<double>, Eigen::COLAMDOrdering<int>> lu_;
  bool analyzed_ = false;
  // Small systems (n_ <= kDenseMax) are factorised dense: partial pivoting
  // on a copy of J_ costs a few thousand operations where the sparse LU's
  // bookkeeping (its workspace zeroed per factorisation) costs ~40,000.
  static constexpr int kDenseMax = 48;
  Eigen::MatrixXd Jd_;
  Eigen::PartialPivLU<Eigen::MatrixXd> dense_lu_;
  // dT_ = J_^-1 r_ by the dense or the sparse LU; false if J_ is singular.
  bool NewtonStep();
  Eigen::VectorXd r_, dT_, r_trial_;
  std::vector<double> T_trial_;  // line-search trial temperatures
  std::vector<double> drain_in_, drain_out_;  // per global node: arriving, departing flow (DrainTerms)
  std::vector<SensorSite> sensors_;
  std::vector<double> hold_;  // per global node: the held sensed temperature [K], NaN when following T
};

}  // namespace loopwright
