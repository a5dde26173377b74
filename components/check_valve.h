// check_valve — non-return valve: opens above a small cracking pressure,
// then passes flow like a valve of flow coefficient Kv; seals in reverse.
//
// Equation (residual in m3/s):
//   r = Q - y(dp) (Kv/3600) sqrt((dp/1e5) (rho_0/rho))   for dp > p_c, else r = Q
//   y = SmoothStep01(dp; p_c, p_c + p_o), rho_0 = 999.1 kg/m3 (IEC 60534-2-1
//   reference water density; Kv in (m3/h)/sqrt(bar)) [1].
// Sign convention: Q > 0 from -> to, the free direction; no reverse flow.
// Inputs (SI): kv [(m3/h)/sqrt(bar)] fully open (a Cv value may be written
// "12 Cv"); crack p_c [Pa] (default 0.2 bar, common practice for spring
// check valves); open_dp p_o [Pa] (default 0.2 bar): the drop over crack at
// which it is fully open.
// Validity: turbulent seat flow (viscous flow through a check valve passes
// less; a warning above 200 cSt); leak-tight seat assumed in reverse.
// References
// [1] IEC 60534-2-1:2011, Industrial-process control valves — Flow capacity —
//     Sizing equations for fluid flow under installed conditions, Eq. (1).
#pragma once

#include "components/component.h"
#include "components/correlations/smooth.h"
#include "components/registry.h"

namespace loopwright {

class CheckValve : public ComponentWithLaw<CheckValve> {
 public:
  enum Param { kKv, kCrack, kOpenDp, kNumParams };
  explicit CheckValve(const ParamValues& v) { params_ = v.values; }
  ResidualKind Kind(int) const override { return ResidualKind::kVolumeFlow; }

  template <class T>
  T Flow(const T& dp, const T& rho) const {
    using std::sqrt;
    const double pc = params_[kCrack];
    if (ScalarPart(dp) <= pc || ScalarPart(dp) <= 0.0) return T(0.0);
    return SmoothStep01(dp, pc, pc + params_[kOpenDp]) * (params_[kKv] / 3600.0) * sqrt(dp / 1e5 * (999.1026 / rho));
  }
  template <class T>
  void Law(const T& dp, const T& m, const T& rho, const T& mu, const T* x, T* r) const {
    (void)mu; (void)x;
    r[0] = m / rho - Flow(dp, rho);
  }
  LinearGuess Linearize(double rho, double mu) const override {
    (void)mu;
    LinearGuess g;  // secant through 1 bar
    g.g = rho * (params_[kKv] / 3600.0) * std::sqrt(999.1026 / rho) / 1e5;
    return g;
  }
  void Describe(const BranchResult& b, ComponentReport* out) const override {
    const double q = b.m / b.rho;
    out->items.push_back({"flow", q, Dimension::kVolumeFlow, q > 0 ? "open" : "closed"});
    if (q > 0 && b.mu / b.rho > 200e-6)
      out->warnings.push_back("viscosity above 200 cSt: viscous seat flow passes less than modelled");
  }
};

inline ComponentType CheckValveType() {
  ComponentType t;
  t.name = "check_valve";
  t.summary = "non-return valve: cracking pressure, Kv when open, sealed in reverse";
  t.roles = kRoleValve;
  t.params = {
      Positive("kv", Dimension::kFlowCoefficientKv, "flow coefficient fully open"),
      Num("crack", Dimension::kPressureDifference, "cracking pressure", false, 0.2e5).Min(0),
      Positive("open_dp", Dimension::kPressureDifference, "drop over crack at full opening", false, 0.2e5),
  };
  t.make = [](const ParamValues& v, std::vector<ParamError>* e) -> std::unique_ptr<Component> {
    (void)e;
    return std::make_unique<CheckValve>(v);
  };
  return t;
}

}  // namespace loopwright
