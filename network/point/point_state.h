// What varies from one operating point to the next, as data.
//
// A loaded Case is read-only and shared by every thread. Everything a point
// changes lives in a PointState, built by a pure function of (case, point,
// design overrides): the values of bound component parameters, the anchors of
// bound oils, boundary pressures, temperatures and heats, loop temperatures,
// coupling conductances, and the design knobs a sizing or fix search holds
// (parameter values, conductances, a component swapped for a library part).
// A solver (NetworkSystem, within CaseSolver) owns working copies of the
// case's models and fluids and, at every point, resets them to the case's
// values and applies the state, so no value leaks from one point into the
// next.
//
//   case  ->  PointState (MakePointState)  ->  NetworkSystem::SetState
//                                              ThermalSystem::SetState
//
// Global indices follow NetworkSystem: nodes and branches numbered loop by
// loop in the order of the case.
#pragma once

#include <vector>

#include "network/case/case.h"

namespace loopwright {

// Design choices held while points are solved (sizing, fixes, tangents):
// component parameter values, coupling conductances and parts swapped in.
// They apply after the envelope bindings; the last entry for a place wins.
struct DesignOverrides {
  struct Param {
    int loop = -1, comp = -1, param = -1;
    double value = 0;
  };
  struct Coupling {
    int index = -1;
    double conductance = 0;  // UA [W/K]
  };
  struct Part {
    int loop = -1, comp = -1;
    const PartCandidate* part = nullptr;  // owned by the case's design questions
  };
  // An oil's reference viscosity (a tolerance study): anchor 0 KV40, 1 KV100
  // of Case::fluid_bindings[binding], over the envelope's value.
  struct Oil {
    int binding = -1, anchor = 0;
    double kv = 0;  // [m2/s]
  };
  std::vector<Param> params;
  std::vector<Coupling> couplings;
  std::vector<Part> parts;
  std::vector<Oil> oils;

  void SetParam(int loop, int comp, int param, double value);
  void SetCoupling(int index, double conductance);
  void SetPart(int loop, int comp, const PartCandidate* part);
  void SetOil(int binding, int anchor, double kv);
  bool empty() const { return params.empty() && couplings.empty() && parts.empty() && oils.empty(); }
};

struct PointState {
  struct Param {
    int branch = -1, param = -1;
    double value = 0;
  };
  struct OilAnchor {
    int binding = -1;  // index in Case::fluid_bindings
    double kv40 = 0, kv100 = 0;  // [m2/s]
  };
  // Per branch: the part swapped in, or null for the case's own model;
  // empty when no part is swapped in.
  std::vector<const PartCandidate*> parts;
  // Parameter values written over the model's own, in order: envelope
  // bindings, then design overrides (a later entry wins).
  std::vector<Param> params;
  std::vector<OilAnchor> oils;
  std::vector<double> loop_temperature;    // per loop [K] (isothermal solve, nominal state)
  std::vector<double> surface_pressure;    // per global node: gauge [Pa] at a boundary's surface
  // Per global node, filled only for a case with energy balances (Case::thermal):
  std::vector<double> fixed_temperature;   // [K] (NaN where free)
  std::vector<double> node_heat;           // [W]
  std::vector<double> ambient_temperature; // [K]
  std::vector<double> coupling_conductance;  // per coupling [W/K]; NaN: the case's
};

// The state of `op` with `overrides` (pure: depends on nothing else). Fills
// *out, reusing its storage.
void MakePointState(const Case& cs, const OperatingPoint& op, const DesignOverrides& overrides, PointState* out);

// Index of the first branch of each loop (global branch = offset + component).
std::vector<int> BranchOffsets(const Case& cs);

}  // namespace loopwright
