// Specific enthalpy of a liquid and its inverse: the one energy balance that
// node temperatures, component outlet temperatures and exchanger capacity
// rates all use.
//
// Equation. Along the isobar p (the network uses the ambient pressure for
// every stream; the pressure part of h of a liquid, (1 - T beta)/rho dp, is
// carried by its Q dp dissipation term, network/point/thermal.h):
//   h(T) = integral from T_ref to T of cp(T') dT'    [J/kg], T_ref = 298.15 K,
// by 3-point Gauss-Legendre quadrature over [T_ref, T] (exact for cp a
// polynomial of degree <= 5 in T: the oil (Cragoe, linear) and the glycol
// mixtures (polynomials) of library/; for IAPWS-IF97 liquid water it is
// within 2.3 J/kg of IF97's own h (0.6 mK of temperature) from 0 to 150 degC
// at 1 atm, and a temperature difference from it is off by under 1e-5 of
// itself: measured with python3-iapws region 1; the balances use only
// differences of this same h, so a loop's energy still closes to rounding).
// Where the fluid says its cp is linear in T over [T_ref, T]
// (Fluid::SpecificHeatIsLinear: an oil inside its evaluation range), the
// integral is taken as (T - T_ref) cp((T_ref + T)/2), which the 3-point rule
// equals to rounding, with one evaluation instead of three.
//
// Inverse. TemperatureAfter(f, T, dh) is the temperature T' with
// h(T') = h(T) + dh, by Newton's method on h (dh/dT = cp > 0, so h is
// increasing and the root unique), to ~1e-12 K. It is what a stream leaving
// a component at enthalpy h_in + heat/|m| reads: the reported outlet
// temperature of every component and the temperature of a node fed by that
// component alone agree to the solver's tolerance.
//
// Mean capacity rate. For a stream of mass flow |m| whose enthalpy changes by
// dh: C = |m| (h(T_out) - h(T_in)) / (T_out - T_in) = |m| dh / dT, the exact
// enthalpy form of m cp (e-NTU with the stream's mean cp over its own
// temperature change). Below |dT| = 0.01 K it is |m| cp at the midpoint,
// which equals dh/dT to 1e-11 for any smooth cp (exactly for linear cp).
//
// Sign convention: dh > 0 heats the stream. Inputs SI (K, J/kg, Pa, kg/s).
// Validity: that of the fluid model (Fluid::InRange); the functions stay
// finite outside it because the fluids do.
#pragma once

#include <ceres/jet.h>

#include <cmath>
#include <type_traits>

#include "library/fluid.h"

namespace loopwright {

inline constexpr double kEnthalpyReferenceT = 298.15;  // T_ref [K]

// h(T) [J/kg] (header).
double SpecificEnthalpy(const Fluid& f, double t, double p_abs);
// T' with h(T') = h(t) + dh (header).
double TemperatureAfter(const Fluid& f, double t, double dh, double p_abs);

// h as a Jet in the variables of t: value h(t.a), derivative cp(t.a) dt.
template <int N>
ceres::Jet<double, N> SpecificEnthalpy(const Fluid& f, const ceres::Jet<double, N>& t, double p_abs) {
  ceres::Jet<double, N> out = t * f.SpecificHeat(t.a, p_abs);
  out.a = SpecificEnthalpy(f, t.a, p_abs);
  return out;
}

// T' as a Jet: cp(T') dT' = cp(t) dt + d(dh).
template <int N>
ceres::Jet<double, N> TemperatureAfter(const Fluid& f, const ceres::Jet<double, N>& t,
                                       const ceres::Jet<double, N>& dh, double p_abs) {
  const double to = TemperatureAfter(f, t.a, dh.a, p_abs);
  ceres::Jet<double, N> out = (t * f.SpecificHeat(t.a, p_abs) + dh) / f.SpecificHeat(to, p_abs);
  out.a = to;
  return out;
}

// Capacity rate [W/K] of a stream of mass flow m [kg/s] entering at t_in
// whose specific enthalpy changes by dh (header: mean capacity rate). With
// m == 0 it is 0.
template <class T>
T MeanCapacityRate(const Fluid& f, double m, const T& t_in, const T& dh, double p_abs) {
  const double am = std::abs(m);
  if (am == 0.0) return T(0.0);
  const T t_out = TemperatureAfter(f, t_in, dh, p_abs);
  const T dt = t_out - t_in;
  double dts;
  if constexpr (std::is_same_v<T, double>) dts = dt;
  else dts = dt.a;
  if (std::abs(dts) >= 0.01) return am * dh / dt;
  const T mid = 0.5 * (t_in + t_out);
  double ms;
  if constexpr (std::is_same_v<T, double>) ms = mid;
  else ms = mid.a;
  const FluidProps fp = f.Evaluate(ms, p_abs);
  T cp = (mid - ms) * fp.dcp_dT;
  cp += fp.cp;
  return am * cp;
}

}  // namespace loopwright
