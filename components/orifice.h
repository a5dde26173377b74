// orifice — sharp-edged restrictor plate or oil-jet nozzle.
//
// Purpose. The flow a fixed restrictor passes for a pressure drop: used to
// meter oil to a bearing or to trim a branch. The law, its low-Reynolds
// correction and its references are those of
// components/correlations/orifice.h (Wuest 1954; Merritt 1967; ISO 5167-2):
//
//   r = (1 - beta^4) [ rho Q|Q| / (2 Cd_inf^2 A0^2) + 2 mu Q / (pi delta^2 d^3) ] - dp   [Pa]
//
// Sign convention: dp = p(from) - p(to) + rho g dz; Q > 0 from -> to; odd in Q.
// Inputs (SI): diameter d [m] > 0 (bore); pipe_diameter D [m] (optional; beta
// = d/D, else 0, discharge from a large volume); cd [-] (default 0.61,
// common practice), low_re_delta [-] (default 0.2, Merritt 1967 from memory);
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
  enum Param { kDiameter, kPipeDiameter, kCd, kDelta, kCount, kNumParams };
  explicit Orifice(const ParamValues& v) { params_ = v.values; }
  ResidualKind Kind(int) const override { return ResidualKind::kPressure; }

  template <class T>
  void Law(const T& dp, const T& m, const T& rho, const T& mu, const T* x, T* r) const {
    (void)x;
    const double pd = std::isnan(params_[kPipeDiameter]) ? 0.0 : params_[kPipeDiameter];
    const T q = m / (rho * params_[kCount]);
    r[0] = OrificeDp(q, rho, mu, params_[kDiameter], pd, params_[kCd], params_[kDelta], 1e-12) - dp;
  }

  LinearGuess Linearize(double rho, double mu) const override;
  void Describe(const BranchResult& b, ComponentReport* out) const override;
};

// The jet/orifice parameter specs shared with rolling_bearing.
std::vector<ParamSpec> OrificeParams();
ComponentType OrificeType();

}  // namespace loopwright
