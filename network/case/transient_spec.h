// The through-time concepts of a case, read by network/case/case_transient.cpp
// and used only by `simulate` (network/time/): lumped thermal masses with their
// heat paths, and scenarios of timed events. The steady commands (solve,
// check, size) do not see them.
#pragma once

#include <string>
#include <vector>

#include "components/registry.h"

namespace loopwright {

// A heat path from a thermal mass to the liquid at a node. Conductance G [W/K]
// with heat G (T_mass - T_node) into the liquid. With `flow_of` the forced
// part follows the flow of that component:
//   G_forced = conductance (|Q| / rated_flow)^exponent
//   G = (G_forced^3 + natural^3)^(1/3)
// the Churchill-Usagi blend of forced and natural convection with n = 3
// (Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed., sec.
// 9.9, mixed convection), so G falls to the natural-convection floor when the
// flow stops. exponent 0.8 is the Dittus-Boelter Re exponent of turbulent
// flow (Incropera Eq. 8.60); 1/3 suits developing laminar flow (Sieder-Tate,
// Incropera Eq. 8.57).
struct FluidLink {
  std::string node_ref;        // "loop/node" as written
  int loop = -1, node = -1;    // the node (indices in the loop)
  double conductance = 0;      // [W/K] (at rated_flow when flow_of is set)
  std::string flow_ref;        // "loop/component" or empty
  int flow_loop = -1, flow_comp = -1;
  double rated_flow = 0;       // [m3/s]
  double exponent = 0.8;
  double natural = 0;          // [W/K] at zero flow
};

// A conductance between two thermal masses (written once, on either).
struct MassLink {
  std::string mass_ref;
  int other = -1;              // index in Case::masses
  double conductance = 0;      // [W/K]
};

// A lumped solid: heat capacity m c, uniform temperature.
//   m c dT/dt = heat(t) + sum_links G (T_other - T)
//             + G_amb (T_amb - T) + eps sigma A (T_amb^4 - T^4)
// (grey body in large surroundings, Incropera Eq. 1.7).
struct ThermalMass {
  std::string id, pointer;
  double mass = 0;             // [kg]
  double specific_heat = 0;    // [J/(kg.K)]
  double initial_temperature = kNoValue;  // [K]; NaN: from the scenario's start
  double heat = 0;             // [W] into the mass
  int heat_variable = -1;
  double ambient_conductance = 0;  // [W/K]
  double radiating_area = 0;       // [m2]
  double emissivity = 0;
  double ambient_temperature = 293.15;  // [K]
  int ambient_variable = -1;
  std::vector<FluidLink> fluid;
  std::vector<MassLink> masses;
  double coking_limit = kNoValue;  // [K] its own coking_temperature_max ("checks"); NaN: the case's
};

// One change an event makes: an envelope variable, or a component parameter.
struct ScenarioChange {
  std::string target;          // as written
  int variable = -1;           // envelope variable, or
  int loop = -1, comp = -1, param = -1;  // a component parameter
  double value = 0;            // SI
};

// At time `at` the changes start; over `ramp` seconds they go linearly from
// the values before to the new ones (0: a step).
struct ScenarioEvent {
  double at = 0, ramp = 0;     // [s]
  std::string name, pointer;
  std::vector<ScenarioChange> changes;
};

struct Scenario {
  std::string id, pointer;
  std::string description;
  int start_point = 0;             // envelope point giving the inputs at t = 0
  double start_temperature = kNoValue;  // uniform start [K]; NaN: the steady answer of start_point
  std::vector<ScenarioChange> start_changes;  // inputs of the start that differ from start_point's
  double end = 0;                  // [s]
  double output_interval = kNoValue;  // [s]; NaN: end / 200
  std::vector<ScenarioEvent> events;  // sorted by `at`
  std::vector<std::string> watch;     // "mass", "loop/node" or "loop/component" (flow)
};

}  // namespace loopwright
