// thermostatic_valve — one path of a three-port wax-element (thermostatic)
// valve: the oil-cooler bypass of a lube skid, the coolant thermostat of a
// jacket loop.
//
// Purpose. A wax element senses the temperature of the liquid around it and
// moves the valve's plug over its travel y as the wax melts: y = 0 (the
// element cold) below the start-to-open temperature, y = 1 (fully open to the
// hot path) at the full-open temperature, in between in proportion to the
// temperature (the wax swells through its melting range and drives the plug
// against a return spring, [1]; the straight line between the two
// temperatures is how makers state the characteristic, [2]). The plug opens one port as it closes the other, so
// the valve's three ports are written as its two paths, each a component of
// this type from the common port: a diverting valve (oil-cooler bypass) has
// both paths leave the inlet, the cooler path `opens_hot` and the bypass
// `closes_hot`; a mixing valve has both paths arrive at the outlet. Both
// paths name the same sensed node and the same temperatures, so they share
// one travel. The element senses the temperature at the component's
// `sensed_node` (a case key, default: its `from` node, the inlet of a
// diverting valve): the network writes that node's temperature into
// `sensed_temperature` (at an isothermal point, the loop's temperature)
// unless the case writes it, which holds the element there (a valve locked
// at a travel, a test rig with a fixed insert).
//
// Equation (residual in m3/s):
//   t  = (T_s - T_start) / (T_full - T_start)   fraction of the band
//   y  = LinearRampC2(t, 0.1)                   travel: 0 below T_start, 1 above
//                                               T_full, exactly t in the middle
//                                               80 % of the band, C2 corners
//                                               (components/correlations/smooth.h)
//   a  = y (path "opens_hot") or 1 - y (path "closes_hot")   opening of the path
//   Kv = Kv_leak + (Kv_path - Kv_leak) a        linear inherent characteristic [4]
//   r  = Q - Kv / 3600 * s(dp) * sqrt(rho0 / (1e5 rho))     IEC 60534-2-1 Eq. (1) [3]
//   s(dp) = dp / (dp^2 + eps^2)^(1/4)           smooth signed sqrt(dp), eps = 1 Pa
//                                               (relative error below 3e-7 for
//                                               dp > 1 kPa)
// rho0 = 1000 kg/m3 (the Kv reference); Kv in (m3/h)/sqrt(bar). Two paths from
// one port to one node pass the Kv sum in parallel: Q = (Kv_A + Kv_B)/3600
// sqrt(dp rho0/(1e5 rho)), split Kv_A/(Kv_A + Kv_B).
//
// Sign convention: from -> to is the path's flow direction in service
// (Q > 0); dp = p(from) - p(to) + rho g (z(from) - z(to)). The law is odd in
// dp (a port passes reverse flow alike) and rises strictly with dp at a
// fixed sensed temperature (Kv_leak > 0): a monotone law, as the
// node-pressure Newton needs.
// Inputs (SI): start_to_open T_start [K]; full_open T_full [K] > T_start;
// kv Kv_path [Kv] of this path fully open; kv_leak [Kv] of the path shut
// (seat leakage, default 1e-4 kv: IEC 60534-4 Class IV, from memory), below
// kv; path (opens_hot | closes_hot); sensed_temperature T_s [K] (written by
// the network, see above).
// Reported: travel y, opening a, sensed_temperature, kv, path_flow (state
// shut / throttling / open) and the path's share of the valve's flow
// ("split", added by the network when both paths of the valve are found).
// Validity: turbulent flow through the ports (above 200 cSt the flow is
// viscous and the valve passes less at a given travel: warning); non-choked,
// non-cavitating liquid. Saturated travel (the element below T_start or
// above T_full) is carried smoothly, but the valve no longer regulates
// there: fully open, a warning on the opens_hot path; at thermal points the
// thermostat_travel check fails when it is pinned fully to the hot path (a
// cooler too small) and warns when it is shut (an isothermal cold start,
// where the element is simply cold, is not warned).
// Left out: the hysteresis of the wax element (the travel on cooling lags
// the travel on heating by a few kelvin, [1]): a steady point has one travel,
// the heating curve's; and the element's time constant (steady state only).
// References
// [1] Common practice (from memory): a paraffin wax element expands by some
//     ten per cent of its volume as it melts over a range of about 10 K set
//     by the wax blend, and lags a few kelvin on cooling; no table is used.
// [2] Common practice: makers' data give start-to-open and full-open
//     temperatures (e.g. 71 and 82 degC, 11 K bands) and a straight travel
//     between them.
// [3] IEC 60534-2-1:2011, Eq. (1): Q = Kv sqrt(dp / (rho / rho0)), Q in m3/h,
//     dp in bar, rho0 = 1000 kg/m3.
// [4] IEC 60534-2-4:2009, inherent flow characteristic, linear.
#pragma once

#include "components/component.h"
#include "components/correlations/kv_flow.h"
#include "components/correlations/smooth.h"
#include "components/registry.h"

namespace loopwright {

class ThermostaticValve : public ComponentWithLaw<ThermostaticValve> {
 public:
  enum Param { kStartToOpen, kFullOpen, kKv, kKvLeak, kPath, kSensedTemperature, kNumParams };
  enum Path { kOpensHot = 0, kClosesHot = 1 };
  static constexpr double kCornerBand = 0.1;  // rounded share of the band at each end of travel
  static constexpr double kSqrtEps = 1.0;     // Pa, the smooth signed square root's scale
  explicit ThermostaticValve(const ParamValues& v) { params_ = v.values; }
  ResidualKind Kind(int) const override { return ResidualKind::kVolumeFlow; }

  double KvLeak() const { return std::isnan(params_[kKvLeak]) ? 1e-4 * params_[kKv] : params_[kKvLeak]; }
  bool OpensHot() const { return static_cast<int>(params_[kPath]) == kOpensHot; }
  // Travel y at sensed temperature ts [K]: 0 cold, 1 fully open to the hot path.
  double Travel(double ts) const {
    const double t0 = params_[kStartToOpen], t1 = params_[kFullOpen];
    return LinearRampC2((ts - t0) / (t1 - t0), kCornerBand);
  }
  // Opening of this path (0 shut, 1 fully open) at the sensed temperature.
  // Unset (NaN: a model outside a network), the element sits at start_to_open.
  double SensedTemperature() const {
    return std::isnan(params_[kSensedTemperature]) ? params_[kStartToOpen] : params_[kSensedTemperature];
  }
  double Opening() const {
    const double y = Travel(SensedTemperature());
    return OpensHot() ? y : 1.0 - y;
  }
  double PathKv() const {
    const double leak = KvLeak();
    return leak + (params_[kKv] - leak) * Opening();
  }
  // Flow [m3/s] at drop dp [Pa] and density rho [kg/m3].
  template <class T>
  T Flow(const T& dp, const T& rho) const {
    return KvFlow(PathKv(), dp, rho, kSqrtEps);
  }

  template <class T>
  void Law(const T& dp, const T& m, const T& rho, const T& mu, const T* x, T* r) const {
    (void)mu; (void)x;
    r[0] = m / rho - Flow(dp, rho);
  }

  LinearGuess Linearize(double rho, double mu) const override;
  void Describe(const BranchResult& b, ComponentReport* out) const override;
};

ComponentType ThermostaticValveType();

}  // namespace loopwright
