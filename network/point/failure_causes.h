// Why a point has no result: physically impossible converged states, and the
// likely cause of a point that did not converge, in words, with its place.
//
// Every point that is not a result carries, in its SolverSummary,
//   worst       the equations with the largest residuals (never empty), or for
//               a rejected state the violated quantities;
//   cause       the likely cause in words (which node or component, what value,
//               why it has no answer, what to look at);
//   cause_kind  a short stable id of the cause (the table below);
//   place       "node loop/id" or "component loop/id".
//
// Physically impossible states (termination kUnphysical), checked at every
// point that converged numerically:
//   cavitation               a node's absolute pressure (gauge + the case's
//                            ambient) is below the liquid's pressure floor
//                            (Fluid::LowestPressure: the vapour pressure of
//                            water and glycol mixtures by IAPWS-IF97 Eq. 30,
//                            the 5 kPa abs air-release floor of oils), or
//                            below zero. The cause names the node, its
//                            pressure, and the component that pulls it down:
//                            the neighbour that draws flow out of the node to
//                            a higher pressure (a pump's suction), and the
//                            neighbour through which the node is fed with the
//                            largest drop into it.
//   fluid-temperature-range  at a thermal point, a node temperature (or a
//                            component's outlet stream temperature) outside
//                            the fluid model's valid range by more than
//                            kFluidRangeSlackK (beyond it the properties are
//                            extrapolated far past any data: 882 degC oil is
//                            not an answer). Within the slack the point stays
//                            a result and carries a warning naming the node.
//                            The cause names the component heating the node.
//   bearing-starved          as fluid-temperature-range, when the node's heat
//                            comes from a bearing that passes almost no flow,
//                            or the stream out of range leaves a bearing.
//   dead-headed-pump         a pressure beyond SolverOptions::max_pressure_pa
//                            next to a pump: its flow has nowhere to go.
//   pressure-unbounded       as above, with no pump next to the node.
//   pressure-undetermined    a free node whose every path to a boundary
//                            passes a component imposing its flow (two fixed
//                            flows in series that agree): its pressure is
//                            whatever the start was.
// Not converged, from the worst rows and the state at the last iterate:
//   fixed-flows-disagree     a worst mass balance at a node whose every
//                            neighbour imposes its flow (LinearGuess::fixes_flow).
//   non-finite-law           a component law gives NaN/inf at the iterate.
//   laminar-turbulent-switch the worst row is the law of a component whose
//                            Reynolds number lies on the switch (2000..4000),
//                            where the friction law changes slope.
//   singular-network         the Jacobian is singular: part of the network has
//                            no defined pressure or flow.
//   bearing-starved          energy balance: the worst node is heated by a
//                            bearing whose flow fell to near zero, or whose
//                            heat would raise its own stream by more than
//                            150 K.
//   bearing-flow-reversed    energy balance: a bearing runs backwards, out of
//                            the housing it drains to (housing above feed).
//   energy-no-outlet         energy balance: heat arrives at a node (or a loop)
//                            that no flow leaves and nothing cools.
//   heat-sink-too-small      a node far too hot whose own heater explains
//                            little (rise under 50 K): the loop's sinks
//                            (listed) are too small for the heat it takes in.
//   heat-exceeds-flow        a non-bearing component whose heat would raise
//                            its own stream by more than 150 K.
//   coupling-not-settled     the hydraulic-thermal passes kept moving.
//   thermostat-not-settled   a thermostatic valve's sensed temperature found no root
//                            (network/point/run_thermostat.cpp; place: the valve).
//   thermal-runaway          energy balance or passes failed at the full heat
//                            input, while a continuation in the heat input
//                            (run.cpp) found steady states within the fluid's
//                            range up to a fraction of it: the temperatures
//                            run away above that fraction (the hot oil's lower
//                            viscosity cuts the flow that carries the heat to
//                            the sinks, e.g. through the pump's slip). Place:
//                            the hottest node at the last pass. A cause
//                            already naming a reversed bearing, a node with no
//                            heat outlet, or a starved bearing at that node is
//                            kept, with the fraction added.
//   residual-not-resolved    none of the above: the worst row's equation, the
//                            component's flow and drop at the last iterate.
#pragma once

#include <string>
#include <vector>

#include <Eigen/Core>

#include "network/case/case.h"
#include "network/point/solver.h"

namespace loopwright {

struct PointResult;
class NetworkSystem;
class ThermalSystem;

// How far outside a fluid model's temperature range a converged node may be
// and still be a result (with a warning) [K]. Common practice: the property
// fits of oils and coolants extrapolate smoothly for a few tens of kelvin;
// beyond, the properties are not a fit of anything measured.
inline constexpr double kFluidRangeSlackK = 20.0;

// Checks a converged point (nodes and branches collected) for a physically
// impossible state. If it finds one, marks the point not converged
// (kUnphysical) with worst rows, cause, kind and place, and returns true.
// Mildly out-of-range temperatures add a warning naming the node instead.
bool RejectUnphysical(const Case& cs, PointResult* res);

// Fills s->cause, s->cause_kind and s->place of a point that did not
// converge, from s->termination, s->worst (its branch/node indices refer to
// `at`) and `at`: the point described at the last iterate (nodes and
// branches of every global index, temperatures when thermal).
void ExplainFailure(const Case& cs, const PointResult& at, SolverSummary* s);

// A thermal point that failed at its full heat but whose heat sources scaled
// by lam_ok have a steady state `at_ok` (a result, within the fluid's range),
// and none was found from lam_bad on; node g (global index) is the hottest at
// the failed point's last pass, at temperature t_fail [K]. Rewrites the cause
// (thermal-runaway, see above) or adds the fraction to a specific one.
void ExplainRunaway(const Case& cs, const PointResult& at_ok, double lam_ok, double lam_bad, int g, double t_fail,
                    SolverSummary* s);

// A thermal point whose hydraulics converged but whose energy balance or
// coupling passes did not: when the hydraulic state at the last pass is
// already physically impossible (below the pressure floor, or a pressure
// nothing determines), that is the cause, not the energy balance that then
// fails on it. Returns true and rewrites *s (kUnphysical) if so.
bool ExplainByHydraulicState(const Case& cs, const PointResult& at, SolverSummary* s);

// The energy-balance rows with the largest |residual| [W] at (u, T), largest
// first (at most 5, never empty when the system has temperature unknowns).
std::vector<RowDiagnosis> EnergyRows(const Case& cs, const NetworkSystem& sys, ThermalSystem* thermal,
                                     const Eigen::VectorXd& u, const std::vector<double>& T);

// The nodes whose temperature moved most between the last two passes [K].
std::vector<RowDiagnosis> TemperatureChangeRows(const Case& cs, const NetworkSystem& sys,
                                                const std::vector<double>& T, const std::vector<double>& t_prev);

}  // namespace loopwright
