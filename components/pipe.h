// pipe, tube, hose — a straight line of circular bore with fittings.
//
// Purpose. The pressure lost by a liquid flowing through a line: wall friction
// by the Darcy–Weisbach equation, plus minor (fitting) losses as a constant K,
// by the 2-K method of Hooper [4] or the 3-K method of Darby [5], whose K
// grows at low Reynolds number (which matters for viscous oil in small lines).
// The three types share this law and differ only in the default wall
// roughness (pipe: commercial steel, tube: drawn tubing, hose: smooth rubber
// or PTFE liner).
//
// Equation (residual in Pa, zero when the law holds):
//   r = dp_f(Q) + dp_K(Q) - dp
//   V = Q/A, Q = m/rho, A = pi D^2/4, Re = rho |V| D / mu
//   dp_f = (f Re)(Re) * mu * L * V / (2 D^2)          (= f L/D rho V|V|/2)
//   dp_K = (K_c + sum n_i K_inf,i (1 + 1 in/D_in)) rho V|V|/2      [4]
//          + sum n_i K1_i mu V / (2 D)         (K1/Re terms, [4], [5])
//          + sum n_j K_i,j (1 + K_d,j / D_in^0.3) rho V|V|/2       [5]
// The product f*Re is finite and smooth as Re -> 0 (laminar f Re = 64), so
// the law is smooth through zero flow and odd under flow reversal; V|V| is the
// C2 SignedSquare of smooth.h with a scale of 1e-9 m/s.
//
// Sign convention: dp = p(from) - p(to) + rho g (z(from) - z(to)), the drop in
// piezometric pressure along the flow direction from -> to; Q > 0 from -> to.
//
// Inputs (SI):
//   length L [m] > 0; diameter D [m] > 0 (inside bore);
//   roughness eps [m] >= 0 (defaults: pipe 45e-6, commercial steel; tube
//     1.5e-6, drawn tubing — Moody [2] / Crane TP-410 [3] table of absolute
//     roughness (from memory); hose 5e-6, smooth rubber/PTFE liner, common
//     practice — confirm with the hose maker);
//   friction: churchill_1977 (default), colebrook_1939, laminar_colebrook,
//     fixed (then darcy_f [-] is used);
//   minor_k [-]: sum of constant K values referred to this bore;
//   fittings: names of standard fittings (e.g. "elbow_90_long_radius") whose
//     constants come from the tables of [4] and [5] in
//     components/correlations/fittings.h, by fitting_method hooper_2k
//     (default) or darby_3k;
//   hooper_fittings: rows [count, K1, K_inf] (2-K, [4]);
//   darby_fittings: rows [count, K1, K_i, K_d] (3-K, [5]).
//
// Default friction method: churchill_1977, because it is one smooth function
// across laminar, transition and turbulent flow [1]. A hard laminar/turbulent
// switch at one Reynolds number makes the network equations jump; the solver
// converges there all the same (the switch is taken as its filled graph and
// the node-pressure Newton of network/point/nodal.cpp is globalised by a line
// search on the network's co-content), but the answer depends on a
// convention. colebrook_1939 and laminar_colebrook are kept for checks
// against hand calculations.
//
// Validity: fully developed incompressible flow, L/D >= 10 (shorter lines:
// warning, entrance effects not modelled); Churchill: all Re; Colebrook:
// Re >= 2300 (warning below, where it is not a laminar law);
// laminar_colebrook: 2300 < Re < 4000 is transitional (warning — the value
// there is a convention, not a prediction); a line on the switch itself (the
// filled graph of the jump at Re = 2300, components/correlations/friction.h)
// is reported with regime "at_switch" and a warning; relative roughness <= 0.05.
// Outside these the law still evaluates (finite, smooth) and Describe()
// warns.
//
// References
// [1] S. W. Churchill, "Friction-factor equation spans all fluid-flow
//     regimes", Chem. Eng. 84(24):91-92, 1977.
// [2] L. F. Moody, "Friction factors for pipe flow", Trans. ASME 66:671-684,
//     1944 (roughness values, Fig. 1).
// [3] Crane Co., "Flow of Fluids through Valves, Fittings and Pipe",
//     Technical Paper 410, 2009 edition (roughness table, K values).
// [4] W. B. Hooper, "The 2-K method predicts head losses in pipe fittings",
//     Chem. Eng., Aug. 24, 1981, pp. 96-100.
// [5] R. Darby, "Correlate pressure drops through fittings", Chem. Eng.,
//     July 1999 / 2001, pp. 101-104 (3-K constants).
// [6] C. F. Colebrook, "Turbulent flow in pipes, with particular reference
//     to the transition region between the smooth and rough pipe laws",
//     J. Inst. Civil Eng. 11:133-156, 1939.
#pragma once

#include <cmath>
#include <vector>

#include "components/component.h"
#include "components/correlations/fittings.h"
#include "components/correlations/friction.h"
#include "components/correlations/smooth.h"
#include "components/registry.h"

namespace loopwright {

class Pipe : public ComponentWithLaw<Pipe> {
 public:
  static constexpr bool kLossMinusDrop = true;  // r = loss(m) - dp (components/component.h)
  enum Param { kLength, kDiameter, kRoughness, kFriction, kDarcyF, kMinorK, kFittings, kFittingMethod, kHooper, kDarby, kNumParams };

  Pipe(const ParamValues& v);

  ResidualKind Kind(int) const override { return ResidualKind::kPressure; }

  template <class T>
  void Law(const T& dp, const T& m, const T& rho, const T& mu, const T* x, T* r) const {
    (void)x;
    const double L = params_[kLength], D = params_[kDiameter];
    const double area = 0.25 * M_PI * D * D;
    const T v = m / (rho * area);
    const T re = rho * SmoothAbs(v, kVelocityEps) * D / mu;
    const T fre = FrictionFactorTimesRe(method_, re, T(params_[kRoughness] / D), params_[kDarcyF]);
    const T vv = SignedSquare(v, kVelocityEps);
    T loss = fre * mu * L * v / (2.0 * D * D);
    loss += InertialK(D) * rho * vv * 0.5 + k1_sum_ * mu * v / (2.0 * D);
    r[0] = loss - dp;
  }

  LinearGuess Linearize(double rho, double mu) const override;
  void Describe(const BranchResult& b, ComponentReport* out) const override;

  static constexpr double kVelocityEps = 1e-9;  // [m/s] smoothing scale of |V|

 private:
  FrictionMethod method_ = FrictionMethod::kChurchill1977;
  // All K multiplying rho V|V|/2 at bore d [m]: the sums of
  // Hooper2KInertialK and Darby3KInertialK at d.
  double InertialK(double d) const {
    const double minor_k = std::isnan(params_[kMinorK]) ? 0.0 : params_[kMinorK];
    return minor_k + k_constant_ + (k_hooper_ != 0 ? k_hooper_ * kInchM / d : 0.0) +
           (k_darby_ != 0 ? k_darby_ / std::pow(d / kInchM, 0.3) : 0.0);
  }
  // From the fittings tables (not bindable), fixed at construction:
  double k_constant_ = 0;  // K independent of the bore (Hooper K_inf, Darby K_i, named constant-K fittings)
  double k_hooper_ = 0;    // sum of count K_inf: times (1 in / D)
  double k_darby_ = 0;     // sum of count K_i K_d: times D_in^-0.3
  double k1_sum_ = 0;      // all K1 (the K1/Re terms)
};

// Registry entries for pipe, tube and hose.
ComponentType PipeType(const std::string& name, double default_roughness, const std::string& summary);

}  // namespace loopwright
