// Each pump's curve and the system curve it sees, at one operating point.
//
// Pump curve: the pump's own law at the point (its speed, the oil's density
// and viscosity where it runs, its internal relief), solved for the pressure
// rise p(to) - p(from) at given flows and for the flow at given rises (both
// 1-D roots of the law by bracketing and bisection; the two sets merged so a
// displacement pump's near-vertical curve is drawn as densely as a
// centrifugal pump's falling one).
//
// System curve: the loop's pressure-flow characteristic seen from the pump.
// The pump is replaced by a fixed_flow branch imposing Q, every other branch
// keeps its model, its parameters and the fluid state (density, viscosity,
// thermostat opening) of the solved point, and the network is solved again:
// the rise p(to) - p(from) across the imposed flow is what the loop asks of
// the pump at Q. At the operating flow it is the operating point's own rise
// (the same equations at the same state), so the two curves cross there to
// the solver's tolerance. Other pumps of the loop keep running.
//
// Sign convention: flow > 0 from the pump's inlet to its outlet [m3/s]; rise
// = p(to) - p(from) [Pa], positive when the pump raises the pressure. Inputs
// SI. A sample whose solve fails (a flow the loop cannot take, e.g. beyond a
// closed check valve) is left out and counted in `failed_samples`, never
// drawn as a value.
#pragma once

#include <string>
#include <vector>

#include "network/case/case.h"
#include "network/point/run.h"

namespace loopwright {

struct CurveSample {
  double flow_m3s = 0;
  double rise_pa = 0;
};

struct PumpSystemCurves {
  int loop = -1, comp = -1;
  std::string where;  // "loop/component"
  std::string point;
  double op_flow_m3s = 0, op_rise_pa = 0;  // the solved operating point
  std::vector<CurveSample> pump, system;    // each sorted by flow
  int failed_samples = 0;                   // system-curve flows the loop could not take
};

// The curves of every pump (components with the pump role) at point `op`,
// which is solved here first; empty when it does not converge. `samples`
// flows from 0 to 1.6 times each pump's operating flow (plus two at +-0.5 %
// of it, so an interpolation crosses where the solver does).
std::vector<PumpSystemCurves> PumpAndSystemCurves(const Case& cs, const OperatingPoint& op, int samples = 24);

}  // namespace loopwright
