// orifice — sharp-edged restrictor plate or oil-jet nozzle.
//
// Purpose. The flow a fixed restrictor passes for a pressure drop: used to
// meter oil to a bearing or to trim a branch. The law, its low-Reynolds
// correction and its references are those of
// components/correlations/orifice.h (Wuest 1954; Merritt 1967; ISO 5167-2):
//
//   r = (1 - beta^4) [ k rho q|q| / (2 Cd_inf^2 A0^2) + 2 mu q / (pi delta^2 d^3) ] - dp   [Pa]
//   q = Q / count; k = 1 without pipe_diameter (a jet or a plate discharging
//   into a large volume: the whole drop across it is lost); with
//   pipe_diameter (a plate in a line) k is the ISO 5167-2 5.4 permanent-loss
//   ratio at C = cd,
//   k = (sqrt(1 - beta^4 (1 - C^2)) - C beta^2) / (sqrt(1 - beta^4 (1 - C^2)) + C beta^2),
//   because the nodes either side of an in-line plate lie where the pressure
//   has recovered: the network sees the permanent loss, not the tap-to-tap
//   differential (reported as `differential_pressure`). The viscous term is
//   lost in full at any beta (creeping flow recovers no pressure); see
//   OrificePermanentDp. rolling_bearing jets always lose the whole drop.
//
// Sign convention: dp = p(from) - p(to) + rho g dz; Q > 0 from -> to; odd in Q.
// Inputs (SI): diameter d [m] > 0 (bore); pipe_diameter D [m] (optional; beta
// = d/D, else 0, discharge from a large volume); cd [-] (default 0.61,
// common practice), low_re_delta [-] (default (12 pi)^(-1/2) = 0.1629, the
// creeping-flow limit of a thin plate, Sampson 1891; see
// components/correlations/orifice.h);
// count [-] identical holes in parallel (default 1).
// Validity: thin sharp plate (l/d < ~1); bore Reynolds any (viscous and
// inertial limits exact); beta < 0.8 (warning above: the approach-velocity
// term dominates and small errors in D matter).
#pragma once

#include "components/component.h"
#include "components/correlations/orifice.h"
#include "components/registry.h"

namespace loopwright {

class Orifice : public ComponentWithLaw<Orifice> {
 public:
  static constexpr bool kLossMinusDrop = true;  // r = loss(m) - dp (components/component.h)
  enum Param { kDiameter, kPipeDiameter, kCd, kDelta, kCount, kNumParams };
  explicit Orifice(const ParamValues& v) { params_ = v.values; }
  ResidualKind Kind(int) const override { return ResidualKind::kPressure; }

  template <class T>
  void Law(const T& dp, const T& m, const T& rho, const T& mu, const T* x, T* r) const {
    (void)x;
    JetLaw(params_.data(), /*in_line=*/true, dp, m, rho, mu, r);
  }

  LinearGuess Linearize(double rho, double mu) const override { return JetLinearize(params_.data(), rho, mu); }
  void Describe(const BranchResult& b, ComponentReport* out) const override;

  // The law, linearisation and report of any component whose first
  // kNumParams parameters are the orifice's (rolling_bearing's jets), read
  // from `p` at every call so envelope bindings and design changes of those
  // parameters act at once. in_line: a plate in a pipe (the network sees
  // its permanent loss); otherwise a jet into a cavity (the whole drop).
  template <class T>
  static void JetLaw(const double* p, bool in_line, const T& dp, const T& m, const T& rho, const T& mu, T* r) {
    const double pd = std::isnan(p[kPipeDiameter]) ? 0.0 : p[kPipeDiameter];
    const T q = m / (rho * p[kCount]);
    r[0] = (in_line ? OrificePermanentDp(q, rho, mu, p[kDiameter], pd, p[kCd], p[kDelta], 1e-12)
                    : OrificeDp(q, rho, mu, p[kDiameter], pd, p[kCd], p[kDelta], 1e-12)) -
           dp;
  }
  static LinearGuess JetLinearize(const double* p, double rho, double mu);
  static void JetDescribe(const double* p, const BranchResult& b, ComponentReport* out);
};

// The jet/orifice parameter specs shared with rolling_bearing.
std::vector<ParamSpec> OrificeParams();
ComponentType OrificeType();

}  // namespace loopwright
