// gravity_drain — the drain line from a bearing cavity (housing) to the
// reservoir, running part full under gravity.
//
// Purpose. A drain is not a pressure line: it falls to the sump and runs part
// full, the oil flowing as an open channel under its own weight with the
// cavity's gas venting above it. Its capacity is the open-channel flow of a
// circular pipe at a given fill; lube-system practice sizes it to run at most
// half full (common practice; the default design target, `design_fill`). When
// the bearings deliver more than the drain can carry even running full, the
// oil backs up into the housing: it floods, and the oil is pushed past the
// seals (worst at cold start, when the oil is thick).
//
// The fill level is left out of a description made for the checks alone
// (BranchResult::for_checks_only, a tolerance study's samples): no check
// reads it and it costs a nested search.
//
// Capacity (double, Describe and the checks). Uniform open-channel flow in a
// circular pipe of bore D at depth y = fill D, slope S = H / L (fall over
// length, the sine of the pipe's angle), by the Darcy–Weisbach equation on the
// hydraulic radius [1, 2]:
//   theta = 2 acos(1 - 2 fill)      central angle of the wetted arc
//   A = D^2 (theta - sin theta) / 8,  P = D theta / 2,  R = A / P     [1] Table 2-1
//   S = f V^2 / (8 g R)  <=>  V = sqrt(8 g R S / f)                    [2]
//   f = f(Re, eps / 4R), Re = rho V 4R / mu, Churchill 1977 [3]
//   Q(fill) = A V
// Churchill's f is 64/Re in laminar flow, which for the half-full circle is
// exact: its free surface is the full pipe's plane of symmetry (no shear), so
// half full it carries half the Hagen–Poiseuille flow at the same gradient,
// Q = pi rho g S D^4 / (256 mu); for other fills 64/Re on 4R is the usual
// hydraulic-radius approximation of laminar open-channel flow ([1] §1-6,
// from memory: the coefficient of a part-full circle lies within some 10 % of
// 64). Turbulent: the hydraulic-radius Darcy–Weisbach (the open-channel form
// of Manning/Chezy with a friction factor that follows Re and roughness) [1, 2].
// The flood capacity Q_full is the flow of the pipe running full under the
// fall's head plus the cavity's pressure above the reservoir:
//   dp_full(Q_full) = rho g H + p_cav                                       (*)
//   dp_full(Q) = (f Re) mu L V / (2 D^2) + K rho V|V| / 2,  V = Q / (pi D^2/4)
// (Darcy–Weisbach, Churchill f, K the entry and exit losses). A cavity
// pressure above the reservoir's helps (p_cav > 0), below it hinders.
//
// Network law (residual in Pa). The drain passes whatever flow the bearings
// deliver up to Q_full with the cavity at the reservoir's pressure plus
// p_cav; beyond, it runs full and the cavity pressure must rise (the housing
// floods and pressurises):
//   r = SmoothMax(rho g H + p_cav + k_s Q,  dp_full(Q),  w) - dp
//   k_s = 0.01 rho g H / (A * 1 m/s)     a slope that keeps the vented branch
//                                        strictly rising (the cavity pressure
//                                        rises by 1 % of the fall's head per
//                                        m/s of full-bore velocity)
//   w = 0.01 rho g H                     rounding of the corner (SmoothMax is
//                                        exact where the two differ by w; at
//                                        the corner it is 3/16 w above)
// Both branches rise strictly with Q, so does their smooth max: the law is
// monotone (network/point/nodal.cpp needs it) and C2; it is neither zero at
// zero flow (the fall's head) nor odd.
//
// Sign convention: from = the cavity (housing) node, to = the reservoir;
// Q > 0 drains; dp = p(from) - p(to) + rho g (z(from) - z(to)). The law holds
// the fall's head rho g H itself, so give the two nodes elevations H apart
// (a warning when the nodes' elevations differ from `fall` by more than 5 %:
// the cavity's pressure then reads off by rho g times the difference).
// Inputs (SI): diameter D [m] (bore, a design knob); length L [m]; fall H [m]
// (< L); roughness [m] (default 45e-6, commercial steel: Moody/Crane TP-410,
// from memory); design_fill [-] (depth over bore, default 0.5, the half-full
// rule: common practice); cavity_pressure p_cav [Pa] (gas pressure in the
// cavity above the reservoir's; default 0; may be negative; bindable);
// minor_k K [-] of the full bore (default 1.5: sharp entrance 0.5 + exit
// 1.0, Crane TP-410, from memory).
// Validity: uniform flow (L >= 20 D, warning below: the entry reach is not
// modelled); slope S <= 0.3 (steeper drains tend to a wall film: warning);
// fill up to 0.938, where a circle carries its most (beyond, the drain is
// taken as running full); Newtonian oil, no foam or entrained air (a
// drain from a high-speed bearing carries froth: the margin covers it). A
// cavity that cannot fall to the sump (rho g H + p_cav <= 0) has no gravity
// capacity: warning (a scavenge pump).
// References
// [1] V. T. Chow, "Open-Channel Hydraulics", McGraw-Hill, 1959, Table 2-1
//     (geometric elements of a circular section), §1-6 and §5 (laminar and
//     turbulent uniform flow, the friction factor on 4R; from memory).
// [2] R. H. French, "Open-Channel Hydraulics", McGraw-Hill, 1985, Ch. 4
//     (Darcy–Weisbach for open channels, f on the hydraulic radius; from
//     memory).
// [3] S. W. Churchill, Chem. Eng. 84(24):91-92, 1977 (components/correlations/
//     friction.h).
#pragma once

#include "components/component.h"
#include "components/correlations/friction.h"
#include "components/correlations/smooth.h"
#include "components/registry.h"

namespace loopwright {

class GravityDrain : public ComponentWithLaw<GravityDrain> {
 public:
  static constexpr bool kLossMinusDrop = true;  // r = loss(m) - dp (components/component.h)
  enum Param { kDiameter, kLength, kFall, kRoughness, kDesignFill, kCavityPressure, kMinorK, kNumParams };
  static constexpr double kGravity = 9.80665;   // m/s2, standard gravity (CGPM 1901)
  static constexpr double kFillOfMostFlow = 0.938;  // depth of a circle's greatest flow ([1], from memory)
  explicit GravityDrain(const ParamValues& v) { params_ = v.values; }
  ResidualKind Kind(int) const override { return ResidualKind::kPressure; }

  double Area() const { return 0.25 * M_PI * params_[kDiameter] * params_[kDiameter]; }
  double Slope() const { return params_[kFall] / params_[kLength]; }
  // Drop of the bore running full at flow q [m3/s]: friction + minor losses.
  template <class T>
  T FullBoreDrop(const T& q, const T& rho, const T& mu) const {
    const double d = params_[kDiameter];
    const T v = q / Area();
    const T re = rho * v * d / mu;
    const T fre = FReChurchill1977(re, T(params_[kRoughness] / d));
    return fre * mu * params_[kLength] * v / (2.0 * d * d) + 0.5 * params_[kMinorK] * rho * SignedSquare(v, 1e-9);
  }
  // The head that pushes the oil while the drain vents: the fall plus the cavity's pressure.
  template <class T>
  T VentHead(const T& rho) const {
    return rho * (kGravity * params_[kFall]) + params_[kCavityPressure];
  }

  template <class T>
  void Law(const T& dp, const T& m, const T& rho, const T& mu, const T* x, T* r) const {
    (void)x;
    const T q = m / rho;
    const double fall_head = ScalarPart(rho) * kGravity * params_[kFall];
    const T vented = VentHead(rho) + rho * (0.01 * kGravity * params_[kFall]) * (q / Area());
    r[0] = SmoothMax(vented, FullBoreDrop(q, rho, mu), 0.01 * fall_head) - dp;
  }

  // Open-channel capacity [m3/s] at depth fraction `fill` (0 < fill <= 0.938).
  double OpenChannelFlow(double fill, double rho, double mu) const;
  // Flood capacity [m3/s]: the flow running full under rho g H + p_cav (*); 0 when that is <= 0.
  double FloodCapacity(double rho, double mu) const;
  // Depth fraction at which the drain carries q [m3/s] part full; NaN beyond the circle's most.
  double FillAt(double q, double rho, double mu) const;

  LinearGuess Linearize(double rho, double mu) const override;
  void Describe(const BranchResult& b, ComponentReport* out) const override;
};

ComponentType GravityDrainType();

}  // namespace loopwright
