// A thermal point solved as one system from a start close to its answer:
// the flows, pressures and temperatures together, by Newton's iteration with
// a coupled Jacobian held fixed from a nearby answer (a chord iteration).
//
// What for: a tolerance study's sample starts each point at the nominal
// answer moved along the exact tangents (network/tolerance/spread.h), an
// error of second order in the drawn deviations. The nested passes
// (CaseSolver::SolvePasses) then still need about twelve passes a point,
// each a hydraulic Newton and an energy Newton, because they converge at the
// rate of the flow-temperature coupling's loop gain, and a thermostatic
// valve's sensed temperature needs an outer search around them
// (run_thermostat.cpp). Newton's iteration on the coupled system
//   R(z) = [F(u, T); E(u, T)] = 0,   z = (u, T_free),
// F the hydraulic residuals with every branch's fluid at its upstream
// temperature and every valve element at its sensed node's temperature, E the
// node energy balances (network/point/thermal.h), has no such loop gain: its
// error shrinks by the change of the Jacobian between the two answers.
//
// Method: the chord (simplified Newton) iteration
//   z <- z - K^-1 R(z),   K = dR/dz at a nearby answer (the nominal one),
// (e.g. Kelley, "Iterative Methods for Linear and Nonlinear Equations",
// SIAM 1995, section 5.4, from memory): it converges linearly, at a rate of
// about the relative change of the Jacobian between that answer and the
// sample's, from any start within that neighbourhood. A tolerance study
// moves K with the sample's deviations (CoupledJacobian::delta, from its
// derivatives in the tolerances: network/tolerance/nominal.h CoupledModel),
// which brings the rate from 15-20 % to about 1 % on the APU demo. K is
// dense (a point of a few dozen hydraulic unknowns and temperatures), every
// column by central differences of R (relative step 1e-6 of the unknown's
// typical size; the functions are explicit and smooth, no solve inside;
// the solver's analytic hydraulic Jacobian would leave out the branch
// fluids' dependence on the flows), rows and columns equilibrated before
// its LU with partial pivoting. Nothing about K enters the answer: only R
// does, and the iteration stops when its step is below the passes'
// tolerance by a factor of 100 (CaseSolver::SolveNear).
//
// The answer is then handed to one nested pass (SolvePasses, with every
// sensed temperature held at the answer's, as the thermostat search holds
// them): the same acceptance tests as every thermal answer — the hydraulic
// solver's row tolerances, the energy Newton's 1e-12, the passes' own
// temperature change, the energy closure of Finish, the physical-state test
// of CollectAnswer — and a sensed node within settle_k of its hold. When the
// chord stalls or grows, or the pass does not accept its answer, the
// point is solved as before from the same start, so a point that converges
// with the passes alone converges here.
#pragma once

#include <memory>
#include <string>
#include <vector>

#include <Eigen/Core>
#include <Eigen/LU>

namespace loopwright {

struct CaseSolver;
struct OperatingPoint;

// K of the module comment, factorised, for one applied thermal point.
struct CoupledJacobian {
  bool ok = false;
  std::string message;  // why not ok
  // The layout: hydraulic unknowns, free temperatures, the global node of
  // each temperature unknown, and the typical magnitude of every unknown
  // (its value at the state K was first built at, floored per kind): the
  // steps are judged relative to it.
  int nu = 0, nt = 0;
  std::vector<int> t_nodes;
  Eigen::VectorXd typical;
  // Equilibration K' = diag(row) K diag(col), and K' factorised.
  Eigen::VectorXd row_scale, col_scale;
  // A correction D' of K' (equilibrated as K'; empty: none): the steps then
  // solve with K' + D', to second order in D' (Step).
  Eigen::MatrixXd delta;
  // Equilibrates and factorises K (in the layout above); false, with
  // `message`, when it is singular.
  bool Factor(Eigen::MatrixXd K);
  // dz = (K' + D')^-1 applied to r in the unscaled variables: with
  // y0 = K'^-1 r', y1 = K'^-1 D' y0, y2 = K'^-1 D' y1, dz' = y0 - y1 + y2
  // (the Neumann series of (I + K'^-1 D')^-1 to second order: its error is
  // third order in the correction, a few per mille for the tolerances of
  // the APU demo, against the first-order 15-20 % of K' alone).
  void Step(const Eigen::VectorXd& r, Eigen::VectorXd* dz) const;

 private:
  Eigen::PartialPivLU<Eigen::MatrixXd> lu_;
  mutable Eigen::VectorXd y0_, y1_;  // Step's work: one object per thread
};

// dR/dz at the solver's state (u, T) and working set (the point last
// applied, any knobs set since) into *K, by central differences; the layout
// of *layout is filled first when empty (nu == 0). The state is restored.
// False, with layout->message, at a non-thermal state or non-finite values.
bool CoupledJacobianAt(CaseSolver* solver, CoupledJacobian* layout, Eigen::MatrixXd* K);

// K at the answer `solver` holds (its u, T) for the point it last applied,
// which must be thermal and solved (has_answer), with no heat continuation.
std::shared_ptr<const CoupledJacobian> BuildCoupledJacobian(CaseSolver* solver);

// Chord iterations (with `k`'s correction, if any) from the solver's (u, T)
// with the point's values now applied; true when the step settled (max |dT| <= t_step_k and every other
// unknown's step <= 1e-11 of its typical size), or when the error left after
// it, bounded from the contraction rate of the last two steps, is below those
// sizes (coupled_newton.cpp SettledByRate), with (u, T) the answer and
// *steps the iterations taken; false when it grew, stalled, left finite
// numbers or took 30 iterations (u, T are then unspecified).
bool CoupledChord(CaseSolver* solver, const CoupledJacobian& k, double t_step_k, int* steps);

}  // namespace loopwright
