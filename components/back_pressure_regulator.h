// back_pressure_regulator — a pressure-control valve that holds its inlet
// (the pump's delivery header) at a set pressure by spilling the excess flow
// to a return: the lube skid's pressure control valve.
//
// Purpose. Unlike a relief valve (which must stay shut in service and is
// judged by relief_closed), a regulator is meant to be open: it works as a
// proportional controller whose plug travel y rises from closed to wide open
// as the pressure it senses rises through its proportional band (the droop of
// a direct-acting, spring-loaded regulator: spring rate and diaphragm area
// lumped into one straight-line travel characteristic, [1] §9, [2]). The plug
// is a variable restriction of flow coefficient Kv(y), and the flow through it
// is the IEC 60534-2-1 liquid relation at that Kv [3].
//
// Equation (residual in m3/s):
//   r  = Q - Kv(y) / 3600 * s(dp) * sqrt(rho0 / (1e5 rho))
//   t  = (dp - (p_set - P_b/2)) / P_b        fraction of the proportional band
//   y  = LinearRampC2(t, 0.1)                 travel: 0 (closed) below the band,
//                                              1 (wide open) above, exactly t in
//                                              its middle 80 % (components/
//                                              correlations/smooth.h)
//   Kv(y) = Kv_min + (Kv_max - Kv_min) y      linear inherent characteristic [4]
//   s(dp) = dp / (dp^2 + eps^2)^(1/4)         smooth signed sqrt(dp) (SignedSqrt,
//                                              eps = 1e-6 p_set: relative error
//                                              below 2.5e-13 for dp > 1e-3 p_set)
// rho0 = 1000 kg/m3 (the Kv reference, [3] Eq. 1); Kv in (m3/h)/sqrt(bar).
// The set point is therefore the drop across the valve at mid travel, and in
// authority (0 < y < 1) the held drop stays inside p_set +- P_b/2: the
// regulator's droop. Spilling to a vented sump at the valve's level, the drop
// is the inlet's gauge pressure.
//
// Monotone and smooth. The corners of the travel are rounded (C2), the
// closed valve keeps its leakage Kv_min (> 0), and Kv(y) and s(dp) both rise
// with dp, so Q rises strictly with dp at fixed set point, through both
// saturations and in reverse (the leak): the law is the monotone kind the
// node-pressure Newton and its co-content fallback need
// (network/point/nodal.cpp). It is not odd (the plug opens for a positive
// drop only).
//
// Sign convention: from = the header it holds (inlet), to = the return; Q > 0
// spills from -> to; dp = p(from) - p(to) + rho g (z(from) - z(to)).
// Inputs (SI): set_pressure p_set [Pa] > 0 (a design knob); proportional_band
// P_b [Pa] (default 0.1 p_set: common practice for direct-acting
// regulators, use the maker's droop curve), at most 2 p_set; kv_max [Kv] wide
// open; kv_min [Kv] closed (seat leakage, default 1e-4 kv_max: IEC 60534-4
// Class IV, 0.01 % of rated capacity, from memory), below kv_max.
// Reported: travel y, held pressure (dp), Kv(y), and authority = min(y, 1 - y),
// read by the regulator_authority check (network/case/check_table.cpp).
// Validity: turbulent flow through the plug (above 200 cSt the seat flow is
// viscous and the valve passes less at a given travel: warning); non-choked,
// non-cavitating liquid; saturated travel (closed or wide open) is a state
// the law carries smoothly, but the valve no longer regulates there
// (reported; the check fails at running points).
// References
// [1] H. E. Merritt, "Hydraulic Control Systems", Wiley, 1967, §9 (static
//     characteristic of spring-loaded pressure valves: set point, override,
//     the pressure rising in proportion to the flow; from memory).
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

class BackPressureRegulator : public ComponentWithLaw<BackPressureRegulator> {
 public:
  enum Param { kSetPressure, kBand, kKvMax, kKvMin, kNumParams };
  static constexpr double kCornerBand = 0.1;  // rounded share of the band at each end of travel
  explicit BackPressureRegulator(const ParamValues& v) { params_ = v.values; }
  ResidualKind Kind(int) const override { return ResidualKind::kVolumeFlow; }

  double Band() const { return std::isnan(params_[kBand]) ? 0.1 * params_[kSetPressure] : params_[kBand]; }
  double KvMin() const { return std::isnan(params_[kKvMin]) ? 1e-4 * params_[kKvMax] : params_[kKvMin]; }
  // Travel y at drop dp [Pa]: 0 closed, 1 wide open.
  template <class T>
  T Travel(const T& dp) const {
    const double band = Band();
    return LinearRampC2(T((dp - (params_[kSetPressure] - 0.5 * band)) / band), kCornerBand);
  }
  // Flow [m3/s] at drop dp [Pa] and density rho [kg/m3].
  template <class T>
  T Flow(const T& dp, const T& rho) const {
    const double kv_min = KvMin();
    return KvFlow(T(kv_min + (params_[kKvMax] - kv_min) * Travel(dp)), dp, rho, 1e-6 * params_[kSetPressure]);
  }

  template <class T>
  void Law(const T& dp, const T& m, const T& rho, const T& mu, const T* x, T* r) const {
    (void)mu; (void)x;
    r[0] = m / rho - Flow(dp, rho);
  }

  LinearGuess Linearize(double rho, double mu) const override;
  void Describe(const BranchResult& b, ComponentReport* out) const override;
};

ComponentType BackPressureRegulatorType();

}  // namespace loopwright
