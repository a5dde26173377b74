// Through time: a scenario of a case integrated from its start to its end.
//
// State: the temperature of every node whose temperature is free (its
// liquid hold-up) and of every thermal mass (network/case/transient_spec.h).
//
//   C_n dT_n/dt = E_n(T, u(T, t)) + sum_links G_nk (T_k - T_n)      (liquid at node n)
//   M_k c_k dT_k/dt = heat_k(t) + sum_links G (T_other - T_k)
//                   + G_amb (T_amb - T_k) + eps sigma A (T_amb^4 - T_k^4)   (mass k)
//
// E_n is the steady energy balance of network/point/thermal.h (upwind
// enthalpy transport, branch heats, couplings, reservoir losses) in W, so a
// state where every dT/dt is zero is the steady solver's answer.
// C_n = rho(T_n) cp(T_n) V_n [J/K], V_n the node's hold-up: its own
// "volume" plus half of every component joined to it (a component's
// "volume", else a line's bore x length), at least kMinHoldup.
// u(T, t) is the hydraulic solution at the instant (quasi-steady: the
// hydraulic network solver of network/point/solver.h, warm-started from the
// last answer, at the branch fluid states of T and the scenario's inputs at
// t). A stopped pump gives zero flow; a node with no through-flow keeps its
// temperature through its hold-up and heat paths.
//
// Integrator: CVODE (SUNDIALS 6, Hindmarsh et al. 2005, ACM TOMS 31(3)),
// variable-order BDF with Newton iterations on a dense direct linear solver,
// local error control with relative tolerance rtol and absolute tolerance
// atol_k on every temperature. The Jacobian given to CVODE is that of the
// balances at frozen flows (the hydraulics' dependence on T is left out:
// CVODE's modified Newton needs only an approximation; the error test is on
// the full right-hand side). Event times and ramp ends are stopping times:
// the integrator stops there and restarts (CVodeReInit), so a step change
// of an input is never stepped across. Outputs at a fixed interval are
// interpolated from CVODE's own polynomial (CVodeGetDky), so the integration
// does not depend on the output interval.
#pragma once

#include <functional>
#include <string>
#include <vector>

#include "network/case/case.h"

namespace loopwright {

inline constexpr double kMinHoldup = 1e-6;  // [m3] (1 mL) a node with no stated hold-up

struct SimulateOptions {
  double rtol = 1e-6;        // CVODE relative tolerance (local error per step, each temperature)
  double atol_k = 1e-4;      // CVODE absolute tolerance [K]
  double output_interval = kNoValue;  // [s]; NaN: the scenario's, else end / 200
  long max_steps = 200000;   // internal steps over the whole run
  // A steady start with thermal masses: the masses and liquid are settled
  // at the start point's inputs until no temperature changes faster than
  // settle_rate_k_s, at most settle_time_s and settle_max_steps internal
  // steps (a loop whose thermostat rests on the corner of its travel
  // settles only to the rate its kink allows; the rate reached is reported).
  double settle_rate_k_s = 1e-6;
  double settle_time_s = 1e8;
  long settle_max_steps = 2000;
  std::function<void(double fraction)> progress;  // 0..1 of the scenario time
};

// One instant of the output.
struct TimeSample {
  double t = 0;                     // [s]
  std::vector<double> node_t;       // [K] per global node (NetworkSystem order)
  std::vector<double> node_p;       // gauge [Pa] per global node
  std::vector<double> mass_t;       // [K] per thermal mass
  std::vector<double> flow;         // [m3/s] per global branch, positive from -> to
  // Per global branch: a turning bearing's least flow at the instant [m3/s];
  // NaN for other branches, a bearing without flow_min, or one standing still.
  std::vector<double> flow_min;
};

struct PeakValue {
  std::string what;   // mass id or "loop/node"
  double value = 0;   // [K]
  double time = 0;    // [s]
  double start = 0;   // value at t = 0 [K]
};

// A component's warning through the run (the film carrying no load, a law
// outside its range), read at the output instants: the first wording, and
// the first and last instant it was given (the same wording up to its
// numbers).
struct RunWarning {
  std::string where, text;
  double from = 0, to = 0;  // [s]
};

struct SimulationResult {
  bool ok = false;
  std::string failure;             // why not (names the time and the place)
  std::vector<std::string> node_names, mass_names, branch_names;  // "loop/node", mass id, "loop/component"
  std::vector<int> branch_from, branch_to;  // global nodes of each branch
  std::vector<char> node_free;              // per global node: its temperature is a state (not fixed)
  std::vector<TimeSample> samples;
  std::vector<PeakValue> peaks;    // each watched quantity (every mass when the scenario watches nothing)
  std::vector<RunWarning> warnings;
  // Work of the integrator.
  long steps = 0, rhs_evals = 0, jac_evals = 0, hydraulic_solves = 0, error_test_fails = 0;
  double settle_time = 0;          // [s] of settling before t = 0 (steady start with masses)
  double settle_rate = 0;          // [K/s] the fastest temperature change left at t = 0 after settling
};

// Runs scenario `sc` of `cs` (a thermal case). Never throws for a run that
// fails: ok = false with the failure named.
SimulationResult Simulate(const Case& cs, const Scenario& sc, const SimulateOptions& opt);

// The scenario named `id`, or null.
const Scenario* FindScenario(const Case& cs, const std::string& id);

}  // namespace loopwright
