// pressure_reducing_valve — a direct-acting valve that holds its OUTLET (a
// bearing feed, a low-pressure branch) at a set gauge pressure by throttling
// the flow from a higher-pressure supply.
//
// Purpose. The spring chamber is vented to atmosphere, so the diaphragm
// senses the outlet's gauge pressure against the spring: the plug closes as
// the outlet pressure rises. It works as a proportional controller whose
// travel y falls from wide open to closed as the outlet pressure rises
// through its proportional band (the droop of a spring-loaded reducing
// valve: spring rate and diaphragm area lumped into one straight-line
// travel characteristic, [1] §9, [2]). The plug is a variable restriction of
// flow coefficient Kv(y), and the flow through it is the IEC 60534-2-1
// liquid relation at that Kv [3]. It is the back-pressure regulator's twin
// (components/back_pressure_regulator.h) sensing the other port.
//
// Equation (residual in m3/s):
//   r  = Q - Kv(y) / 3600 * s(dp) * sqrt(rho0 / (1e5 rho))
//   t  = ((p_set + P_b/2) - p_out) / P_b     fraction of the band below its top
//   y  = LinearRampC2(t, 0.1)                 travel: 1 (wide open) with the
//                                              outlet below the band, 0 (closed)
//                                              above it, exactly t in its middle
//                                              80 % (components/correlations/
//                                              smooth.h)
//   Kv(y) = Kv_min + (Kv_max - Kv_min) y      linear inherent characteristic [4]
//   s(dp) = dp / (dp^2 + eps^2)^(1/4)         smooth signed sqrt(dp) (SignedSqrt,
//                                              eps = 1e-6 p_set)
// rho0 = 1000 kg/m3 (the Kv reference, [3] Eq. 1); Kv in (m3/h)/sqrt(bar).
// p_out is the gauge pressure of node `to` (the network passes it:
// Component::SensesOutlet, components/component.h). The set point is the
// outlet pressure at mid travel; in authority (0 < y < 1) the held outlet
// stays inside p_set +- P_b/2 and falls as the demand rises (droop). With the
// supply too low to hold the band (p_in below about p_set - P_b/2 plus the
// wide-open drop) the valve is wide open and passes what kv_max passes;
// with the outlet above the band (no demand, or another feed) it is closed
// and passes its seat leak (kv_min > 0). Both saturations are smooth (C2).
//
// Not a law of dp alone. At fixed outlet pressure Q rises strictly with dp
// (odd in dp); at fixed inlet pressure the forward flow falls strictly as the
// outlet rises (Kv and the drop both fall). The flow's dependence on the
// outlet pressure beyond the drop makes the branch non-reciprocal: the
// node-pressure Newton and the co-content fallback treat it apart
// (network/point/system.cpp ReducedNewtonStep, nodal.cpp; DEVELOPERS.md).
// In reverse (outlet above inlet) the plug closes as the outlet rises while
// the reverse drop grows, so the reverse flow is not monotone in the outlet
// pressure: a real reducing valve is not meant to pass reverse flow
// (reported as a warning).
// Evaluate(dp, ...) without a port pressure (fits, the drop-only property
// tests) is the law at the reference outlet p_out = p_set: mid travel.
//
// Sign convention: from = the supply (inlet), to = the held outlet; Q > 0
// from -> to; dp = p(from) - p(to) + rho g (z(from) - z(to)).
// Inputs (SI): set_pressure p_set [Pa] > 0 (outlet gauge at mid travel; a
// design knob); proportional_band P_b [Pa] (default 0.1 p_set: common
// practice for direct-acting regulators, use the maker's droop curve), at
// most 2 p_set (wide open at zero outlet gauge); kv_max [Kv] wide open;
// kv_min [Kv] closed (seat leakage, default 1e-4 kv_max: IEC 60534-4 Class
// IV, 0.01 % of rated capacity, from memory), below kv_max.
// Reported: travel y, held pressure (the outlet gauge pressure), Kv(y), and
// authority = min(y, 1 - y), read by the regulator_authority check
// (network/case/check_table.cpp).
// Validity: turbulent flow through the plug (above 200 cSt the seat flow is
// viscous and the valve passes less at a given travel: warning); non-choked,
// non-cavitating liquid; forward flow (reverse: warning); saturated travel
// (closed or wide open) is carried smoothly, but the valve no longer
// regulates there (warning; the check fails at running points).
// References
// [1] H. E. Merritt, "Hydraulic Control Systems", Wiley, 1967, §9 (static
//     characteristic of spring-loaded pressure valves, reducing valves among
//     them: the held pressure falling in proportion to the flow; from memory).
// [2] IEC 60534-1:2005, Industrial-process control valves — Control valve
//     terminology and general considerations (travel, rated travel, inherent
//     characteristic; from memory).
// [3] IEC 60534-2-1:2011, Eq. (1): Q = Kv sqrt(dp / (rho / rho0)), Q in m3/h,
//     dp in bar, rho0 = 1000 kg/m3.
// [4] IEC 60534-2-4:2009, inherent flow characteristic, linear.
#pragma once

#include "components/component.h"
#include "components/correlations/kv_flow.h"
#include "components/correlations/smooth.h"
#include "components/registry.h"

namespace loopwright {

class PressureReducingValve : public ComponentWithSensedLaw<PressureReducingValve> {
 public:
  enum Param { kSetPressure, kBand, kKvMax, kKvMin, kNumParams };
  static constexpr double kCornerBand = 0.1;  // rounded share of the band at each end of travel
  explicit PressureReducingValve(const ParamValues& v) { params_ = v.values; }
  ResidualKind Kind(int) const override { return ResidualKind::kVolumeFlow; }
  double ReferenceOutletPressure() const override { return params_[kSetPressure]; }

  double Band() const { return std::isnan(params_[kBand]) ? 0.1 * params_[kSetPressure] : params_[kBand]; }
  double KvMin() const { return std::isnan(params_[kKvMin]) ? 1e-4 * params_[kKvMax] : params_[kKvMin]; }
  // Travel y at outlet gauge pressure p_out [Pa]: 1 wide open, 0 closed.
  template <class T>
  T Travel(const T& p_out) const {
    const double band = Band();
    return LinearRampC2(T((params_[kSetPressure] + 0.5 * band - p_out) / band), kCornerBand);
  }
  // Flow [m3/s] at drop dp [Pa], outlet gauge pressure p_out [Pa], density rho [kg/m3].
  template <class T>
  T Flow(const T& dp, const T& p_out, const T& rho) const {
    const double kv_min = KvMin();
    return KvFlow(T(kv_min + (params_[kKvMax] - kv_min) * Travel(p_out)), dp, rho, 1e-6 * params_[kSetPressure]);
  }

  template <class T>
  void Law(const T& dp, const T& p_out, const T& m, const T& rho, const T& mu, const T* x, T* r) const {
    (void)mu; (void)x;
    r[0] = m / rho - Flow(dp, p_out, rho);
  }

  LinearGuess Linearize(double rho, double mu) const override;
  void Describe(const BranchResult& b, ComponentReport* out) const override;
};

ComponentType PressureReducingValveType();

}  // namespace loopwright
