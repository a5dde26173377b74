// valve — manual, bypass or control valve rated by its flow coefficient.
//
// Purpose. The pressure drop of a valve at a given opening, for viscous oil as
// well as water: Kv from the inherent characteristic at the opening, and the
// IEC 60534-2-1 Reynolds-number factor F_R that lowers the flow of viscous
// (laminar/transitional) liquids [1]. The relations, their smooth form and
// the constants are in components/correlations/valve_iec60534.h.
//
// Equation (residual in Pa):
//   r = (rho/rho0) (Q / (N1 F_R(Q) Kv_eff))^2 sign(Q) - dp
//   Kv_eff = Kvs (leakage + (1 - leakage) phi(opening))
// phi: linear, equal_percentage (rangeability R) or quick_opening [2].
//
// Closed valve. A real seat leaks; `leakage` (fraction of Kvs, default 1e-4,
// the IEC 60534-4 / ANSI/FCI 70-2 Class IV allowance of 0.01 % of rated
// capacity, from memory) keeps the law finite at opening 0. Set it to the
// seat class of the valve.
//
// Sign convention: dp = p(from) - p(to) + rho g dz; Q > 0 from -> to; odd in Q.
// Inputs (SI): kvs [(m3/h)/sqrt(bar)] (or "Cv" values), opening [0..1]
// (bindable to an envelope variable), characteristic, rangeability (default
// 50), size d [m] (valve inlet size; enables F_R; without it F_R = 1),
// pipe_diameter D [m] (default d), fl (default 0.9), fd (default 1.0,
// single-port globe — use the maker's figure), leakage.
// Validity: single-phase, non-choked, non-cavitating liquid (a warning when
// dp exceeds FL^2 (p1,abs - pv) with the vapour pressure taken as 0 — a
// lower bound on the choke limit for oils).
// References
// [1] IEC 60534-2-1:2011, Industrial-process control valves — Flow capacity —
//     Sizing equations for fluid flow under installed conditions.
// [2] IEC 60534-2-4:2009, Inherent flow characteristics and rangeability.
#pragma once

#include "components/component.h"
#include "components/correlations/valve_iec60534.h"
#include "components/registry.h"

namespace loopwright {

class Valve : public ComponentWithLaw<Valve> {
 public:
  static constexpr bool kLossMinusDrop = true;  // r = loss(m) - dp (components/component.h)
  enum Param { kKvs, kOpening, kCharacteristic, kRangeability, kSize, kPipeDiameter, kFl, kFd, kLeakage, kNumParams };
  explicit Valve(const ParamValues& v) { params_ = v.values; }
  ResidualKind Kind(int) const override { return ResidualKind::kPressure; }

  double KvEffective() const {
    const auto c = static_cast<ValveCharacteristic>(static_cast<int>(params_[kCharacteristic]));
    const double phi = RelativeKv(c, params_[kOpening], params_[kRangeability]);
    return params_[kKvs] * (params_[kLeakage] + (1.0 - params_[kLeakage]) * phi);
  }
  IecValveGeometry Geometry() const {
    IecValveGeometry g;
    g.valve_diameter_m = std::isnan(params_[kSize]) ? 0.0 : params_[kSize];
    g.pipe_diameter_m = std::isnan(params_[kPipeDiameter]) ? g.valve_diameter_m : params_[kPipeDiameter];
    g.fl = params_[kFl];
    g.fd = params_[kFd];
    return g;
  }

  template <class T>
  void Law(const T& dp, const T& m, const T& rho, const T& mu, const T* x, T* r) const {
    (void)x;
    const T q = m / rho;
    const double kv = KvEffective();
    r[0] = IecValveDp(q, T(kv), rho, mu, Geometry(), 1e-12 * params_[kKvs] / 3600.0) - dp;
  }

  LinearGuess Linearize(double rho, double mu) const override;
  void Describe(const BranchResult& b, ComponentReport* out) const override;
};

ComponentType ValveType();

}  // namespace loopwright
