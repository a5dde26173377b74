// Liquid flow through a valve with a flow coefficient Kv, IEC 60534-2-1.
//
// Purpose. A valve (hand valve, control valve, orifice-like trim) is rated by
// its flow coefficient Kv [(m3/h)/sqrt(bar)]: the flow of water at 15 degC
// in m3/h through the valve at a pressure drop of 1 bar. For a non-choked,
// non-cavitating liquid the IEC sizing relation [1] reads, in the standard's
// units (Q in m3/h, dp in kPa, C = Kv):
//   C = Q / (N1 * F_R) * sqrt( (rho/rho0) / dp )                    [1] (1), (13)
// with F_R = 1 in turbulent flow and F_R < 1 (Reynolds number factor) in
// viscous and transitional flow. This header turns that into the law the
// network needs: given the flow Q (an unknown), the effective Kv and the
// fluid, return dp(Q):
//   dp = (rho/rho0) * (Q / (N1 F_R Kv))^2 * sign(Q)                 (**)
// F_R depends on Q through the valve Reynolds number, not on dp, so (**) is
// explicit. In the laminar limit F_R^2 is proportional to |Q| and (**)
// becomes linear in Q (the |Q| cancels analytically; the code uses that form
// there), so dp(Q) is odd, smooth through Q = 0 and has a finite positive
// slope at zero flow.
//
// Valve Reynolds number and F_R [1], with C = Kv, d the valve size and D the
// pipe inside diameter in mm, nu in m2/s, Q in m3/h:
//   Rev = N4 Fd Q / (nu sqrt(C FL)) * (FL^2 C^2 / (N2 D^4) + 1)^(1/4)
//   full-size trim:  n = n1 = N2 / (C/d^2)^2,  C/d^2 <= 0.04 (clamped)
//   reduced trim:    n = n2 = 1 + N32 (C/d^2)^(2/3)
//   F_R,transition = 1 + (0.33 FL^0.5 / n^0.25) log10(Rev / 10000)
//   F_R,laminar    = 0.026/FL * sqrt(n Rev)
//   F_R = F_R,laminar for Rev < 10, else min(F_R,transition, F_R,laminar);
//   F_R <= 1.
// IecReynoldsFactorStandard evaluates exactly this (hard min and switch, for
// checks). Note that the standard's F_R jumps at Rev = 10 when
// F_R,transition < F_R,laminar there (as it is for most valves).
// IecReynoldsFactor is the smooth version the solver uses:
//   - the mins are taken on ln F_R with SmoothMin of width 0.02 (exactly the
//     standard's min wherever the candidates differ by more than 2 %; at a
//     crossing 0.375 % below it);
//   - for Rev <= 10 it is the laminar branch (as the standard), for
//     Rev >= 20 the smooth min of all three; between, a C2 blend in ln Rev
//     (SmoothStep01) replaces the standard's jump at Rev = 10.
// The trim kind (full or reduced) is stated by the caller. (python3-fluids'
// size_control_valve_l chooses the reduced-trim equations when
// C/d^2 > 0.016 N18; we do not guess it.)
//
// Reference density. rho0 is water at 15 degC [1]; we use 999.1026 kg/m3,
// the IAPWS-95 density at 288.15 K and 101.325 kPa [3] (computed with
// python3-iapws; python3-fluids uses 999.10329, a difference of 3e-7 in Kv).
//
// Sign convention. dp = p(from) - p(to) > 0 for Q > 0; dp is odd in Q (a valve
// is taken as symmetric: check valves and relief valves add their own logic).
//
// Inputs (SI). Q [m3/s], Kv [(m3/h)/sqrt(bar)], rho [kg/m3], mu [Pa.s],
// geometry: d (valve size) [m], D (pipe inside diameter) [m], FL [-] (liquid
// pressure recovery factor, 0 < FL <= 1), Fd [-] (valve style modifier,
// 0.1..1). Output dp [Pa].
//
// Validity [1]: Newtonian single-phase liquids, non-choked and non-cavitating
// (dp below FL^2 (p1 - FF pv); not checked here: the network checks it).
// C/d^2 <= 0.04 mm^-2 for full-size trim (C/d^2 is clamped to 0.04 in n1).
// Behaviour outside: Kv <= kIecMinKv is held at kIecMinKv (a closed valve
// becomes a very stiff, finite resistance: write closed valves with a leakage
// floor on Kv, e.g. a seat-leakage fraction; common practice); d <= 0 means
// "no geometry": F_R = 1 (turbulent relation only, as python3-fluids does
// without diameters) and Q|Q| is smoothed with the caller's q_eps.
//
// Inherent characteristic (RelativeKv). Kv = Kvs * phi(x), x in [0, 1] the
// relative travel [2]:
//   linear             phi = x
//   equal_percentage   phi = R^(x - 1) (rangeability R, default 50) for
//                      x >= xb; below xb a quadratic a x + b x^2 that meets
//                      it with equal value and slope (C1), so phi(0) = 0
//                      exactly (a real valve's characteristic below its
//                      minimum controllable Kvs/R is not equal percentage
//                      anyway [2]). xb defaults to 0.05 and is limited to
//                      1/ln R to keep phi increasing.
//   quick_opening      phi = sqrt(x) for x >= xb, the same kind of C1
//                      quadratic start below (slope 1.5/sqrt(xb) at 0 instead
//                      of infinity).
// x outside [0, 1] is clamped (phi flat outside; a kink at the ends).
//
// Cv <-> Kv. Kv = 0.865 Cv as printed in the standards [1]; we use the exact
// ratio of the unit definitions, Kv/Cv = (1 US gal/min in m3/h) /
// sqrt(1 psi in bar) = 0.227124707 / 0.262578826 = 0.8649777 (US gallon,
// psi exact per NIST SP 811 [4]).
//
// Numerical constants, IEC 60534-2-1:2011 Table 1 [1] for C = Kv (as
// copied in python3-fluids control_valve.py [5]): N1 = 1e-1 (m3/h, kPa),
// N2 = 1.6e-3 (mm), N4 = 7.07e-2 (m3/h, m2/s), N18 = 8.65e-1 (mm),
// N32 = 1.4e2 (mm). The equation numbers above are from memory.
//
// References
// [1] IEC 60534-2-1:2011, Industrial-process control valves - Part 2-1: Flow
//     capacity - Sizing equations for fluid flow under installed conditions
//     (also ANSI/ISA-75.01.01-2007); clause 6 (incompressible fluids),
//     Table 1 (numerical constants), Annex (Reynolds number factor).
// [2] IEC 60534-2-4:2009, Part 2-4: Flow capacity - Inherent flow
//     characteristics and rangeability (from memory).
// [3] W. Wagner, A. Pruss, "The IAPWS formulation 1995 for the thermodynamic
//     properties of ordinary water substance", J. Phys. Chem. Ref. Data
//     31(2):387-535, 2002.
// [4] A. Thompson, B. N. Taylor, NIST Special Publication 811, 2008,
//     Appendix B.
// [5] C. Bell et al., python3-fluids 1.0.22, fluids/control_valve.py.
#pragma once

#include <cmath>
#include <optional>
#include <string_view>

#include "components/correlations/smooth.h"

namespace loopwright {

// ---------------------------------------------------------------- constants
inline constexpr double kIecN1 = 1e-1;      // Q m3/h, dp kPa          [1] Table 1
inline constexpr double kIecN2 = 1.6e-3;    // d mm                    [1] Table 1
inline constexpr double kIecN4 = 7.07e-2;   // Q m3/h, nu m2/s         [1] Table 1
inline constexpr double kIecN18 = 8.65e-1;  // d mm                  [1] Table 1
inline constexpr double kIecN32 = 1.4e2;    // d mm                    [1] Table 1
// Density of water at 15 degC [kg/m3]: IAPWS-95 at 288.15 K, 101.325 kPa [3].
inline constexpr double kIecReferenceWaterDensity = 999.1026;
// Full-size-trim limit of C/d^2 [mm^-2] used in n1 [1].
inline constexpr double kIecMaxCOverD2 = 0.04;
// Smallest Kv used (see "Behaviour outside") [(m3/h)/sqrt(bar)].
inline constexpr double kIecMinKv = 1e-12;
// Width of the smooth min on ln F_R (2 %).
inline constexpr double kIecLogFrWidth = 0.02;
// Rev band over which the smooth F_R blends laminar-only into the min.
inline constexpr double kIecBlendReLow = 10.0;
inline constexpr double kIecBlendReHigh = 20.0;

// Kv/Cv from the unit definitions (see header): (3.785411784e-3 m3 * 60 / h)
// / sqrt(6894.757293168 Pa / 1e5 Pa).
inline constexpr double kKvPerCv = 0.8649776554423244;

inline double CvToKv(double cv) { return cv * kKvPerCv; }
inline double KvToCv(double kv) { return kv / kKvPerCv; }

// Valve geometry and style factors for the Reynolds number factor.
struct IecValveGeometry {
  double valve_diameter_m = 0.0;  // d; <= 0: no viscous correction (F_R = 1)
  double pipe_diameter_m = 0.0;   // D; <= 0: taken equal to d
  double fl = 0.9;                // FL, liquid pressure recovery factor [-]
  double fd = 1.0;                // Fd, valve style modifier [-]
  bool full_trim = true;          // full-size trim (n1) or reduced trim (n2)
};

namespace internal {

template <class T>
inline T IecClampKv(const T& kv) {
  return ScalarPart(kv) < kIecMinKv ? T(kIecMinKv) : kv;
}

// n1 (full trim) or n2 (reduced trim) [1]; kv in (m3/h)/sqrt(bar), d in mm.
template <class T>
inline T IecTrimN(const T& kv, double d_mm, bool full_trim) {
  using std::cbrt;
  T c_over_d2 = kv / (d_mm * d_mm);
  if (full_trim) {
    if (ScalarPart(c_over_d2) > kIecMaxCOverD2) c_over_d2 = T(kIecMaxCOverD2);
    return kIecN2 / (c_over_d2 * c_over_d2);  // n1 = N2 / (C/d^2)^2
  }
  const T c3 = cbrt(c_over_d2);
  return 1.0 + kIecN32 * c3 * c3;  // n2 = 1 + N32 (C/d^2)^(2/3)
}

// Rev / |Q| [h/m3]: the valve Reynolds number per unit flow [1].
template <class T>
inline T IecRevPerFlow(const T& kv, const T& nu, const IecValveGeometry& g) {
  using std::sqrt;
  const double d_pipe_mm =
      1000.0 * (g.pipe_diameter_m > 0.0 ? g.pipe_diameter_m : g.valve_diameter_m);
  const double d4 = d_pipe_mm * d_pipe_mm * d_pipe_mm * d_pipe_mm;
  const T inner = g.fl * g.fl * kv * kv / (kIecN2 * d4) + 1.0;
  return kIecN4 * g.fd / (nu * sqrt(kv * g.fl)) * sqrt(sqrt(inner));
}

// ln F_R by the smooth rule (see header); rev > 0.
template <class T>
inline T IecLogFrSmooth(const T& rev, const T& n, double fl) {
  using std::log;
  using std::log10;
  using std::sqrt;
  const T l_lam = log(0.026 / fl) + 0.5 * log(n * rev);
  const T l_lam_capped = SmoothMin(l_lam, T(0.0), kIecLogFrWidth);
  const double rs = ScalarPart(rev);
  if (rs <= kIecBlendReLow) return l_lam_capped;
  T fr_tr = 1.0 + 0.33 * std::sqrt(fl) / sqrt(sqrt(n)) * log10(rev / 10000.0);
  fr_tr = SmoothMax(fr_tr, T(2e-3), 1e-3);  // guard: > 0 for FL <= 1 anyway
  const T l_min =
      SmoothMin(SmoothMin(l_lam, T(log(fr_tr)), kIecLogFrWidth), T(0.0), kIecLogFrWidth);
  if (rs >= kIecBlendReHigh) return l_min;
  const T s = SmoothStep01(T(log(rev)), std::log(kIecBlendReLow), std::log(kIecBlendReHigh));
  return (1.0 - s) * l_lam_capped + s * l_min;
}

// F_R exactly as written in the standard (hard min, switch at Rev = 10).
template <class T>
inline T IecFrStandard(const T& rev, const T& n, double fl) {
  using std::log10;
  using std::sqrt;
  T fr = 0.026 / fl * sqrt(n * rev);
  if (ScalarPart(rev) >= 10.0) {
    const T fr_tr = 1.0 + 0.33 * std::sqrt(fl) / sqrt(sqrt(n)) * log10(rev / 10000.0);
    if (ScalarPart(fr_tr) < ScalarPart(fr)) fr = fr_tr;
  }
  if (ScalarPart(fr) > 1.0) fr = T(1.0);
  return fr;
}

template <bool kSmooth, class T>
inline T IecValveDpImpl(const T& q, const T& kv_in, const T& rho, const T& mu,
                        const IecValveGeometry& g, double q_eps) {
  using std::sqrt;
  const T kv = IecClampKv(kv_in);
  const T q_h = 3600.0 * q;  // m3/s -> m3/h
  const T rel_density = rho / kIecReferenceWaterDensity;
  const T n1kv = kIecN1 * kv;
  T dp_kpa;
  if (g.valve_diameter_m <= 0.0) {
    dp_kpa = rel_density * SignedSquare(q_h, 3600.0 * q_eps) / (n1kv * n1kv);
  } else {
    const double d_mm = 1000.0 * g.valve_diameter_m;
    const T n = IecTrimN(kv, d_mm, g.full_trim);
    const T a = IecRevPerFlow(kv, T(mu / rho), g);  // Rev = a |Q_h|
    const double qs = ScalarPart(q_h);
    const double rev_s = ScalarPart(a) * std::fabs(qs);
    const double fr_lam_s = 0.026 / g.fl * std::sqrt(ScalarPart(n) * rev_s);  // laminar F_R, scalar
    const bool laminar_exact = rev_s < kIecBlendReLow &&
                               (kSmooth ? std::log(fr_lam_s) <= -kIecLogFrWidth : fr_lam_s < 1.0);
    if (laminar_exact) {
      // F_R^2 = (0.026/FL)^2 n a |Q_h|: dp = rel_density Q_h / (N1 Kv)^2 / ((0.026/FL)^2 n a)
      const double c = 0.026 / g.fl;
      dp_kpa = rel_density * q_h / (n1kv * n1kv * (c * c) * n * a);
    } else {
      const T q_abs = qs < 0.0 ? T(-q_h) : q_h;
      const T rev = a * q_abs;
      T fr;
      if constexpr (kSmooth) {
        using std::exp;
        fr = exp(IecLogFrSmooth(rev, n, g.fl));
      } else {
        fr = IecFrStandard(rev, n, g.fl);
      }
      const T den = n1kv * fr;
      dp_kpa = rel_density * q_h * q_abs / (den * den);
    }
  }
  return 1000.0 * dp_kpa;  // kPa -> Pa
}

}  // namespace internal

// Valve Reynolds number Rev [-] at flow q [m3/s] (|q| used), kv, kinematic
// viscosity nu [m2/s] [1]. Requires g.valve_diameter_m > 0.
template <class T>
inline T IecValveReynolds(const T& q, const T& kv, const T& nu, const IecValveGeometry& g) {
  const T q_h = 3600.0 * q;
  const T q_abs = ScalarPart(q_h) < 0.0 ? T(-q_h) : q_h;
  return internal::IecRevPerFlow(internal::IecClampKv(kv), nu, g) * q_abs;
}

// F_R exactly as the standard writes it (hard switch; for checks). rev > 0.
template <class T>
inline T IecReynoldsFactorStandard(const T& rev, const T& kv, const IecValveGeometry& g) {
  const T n =
      internal::IecTrimN(internal::IecClampKv(kv), 1000.0 * g.valve_diameter_m, g.full_trim);
  return internal::IecFrStandard(rev, n, g.fl);
}

// Smooth F_R used by the solver (see header for its deviation). rev > 0.
template <class T>
inline T IecReynoldsFactor(const T& rev, const T& kv, const IecValveGeometry& g) {
  using std::exp;
  const T n =
      internal::IecTrimN(internal::IecClampKv(kv), 1000.0 * g.valve_diameter_m, g.full_trim);
  return exp(internal::IecLogFrSmooth(rev, n, g.fl));
}

// dp(Q) [Pa] by (**) with the smooth F_R: odd, smooth, linear at low flow.
// q [m3/s], kv [(m3/h)/sqrt(bar)], rho [kg/m3], mu [Pa.s]. q_eps [m3/s] is
// used only when g.valve_diameter_m <= 0 (no viscous term): SignedSquare scale.
template <class T>
inline T IecValveDp(const T& q, const T& kv, const T& rho, const T& mu, const IecValveGeometry& g,
                    double q_eps = 0.0) {
  return internal::IecValveDpImpl<true>(q, kv, rho, mu, g, q_eps);
}

// dp(Q) [Pa] with the standard's F_R (hard switch): for checks only.
template <class T>
inline T IecValveDpStandard(const T& q, const T& kv, const T& rho, const T& mu,
                            const IecValveGeometry& g, double q_eps = 0.0) {
  return internal::IecValveDpImpl<false>(q, kv, rho, mu, g, q_eps);
}

// ------------------------------------------------- inherent characteristic
enum class ValveCharacteristic { kLinear, kEqualPercentage, kQuickOpening };

inline const char* ValveCharacteristicName(ValveCharacteristic c) {
  switch (c) {
    case ValveCharacteristic::kLinear:
      return "linear";
    case ValveCharacteristic::kEqualPercentage:
      return "equal_percentage";
    case ValveCharacteristic::kQuickOpening:
      return "quick_opening";
  }
  return "unknown";
}

inline constexpr const char* kValveCharacteristicNames[] = {"linear", "equal_percentage",
                                                            "quick_opening"};

inline std::optional<ValveCharacteristic> ParseValveCharacteristic(std::string_view name) {
  if (name == "linear") return ValveCharacteristic::kLinear;
  if (name == "equal_percentage") return ValveCharacteristic::kEqualPercentage;
  if (name == "quick_opening") return ValveCharacteristic::kQuickOpening;
  return std::nullopt;
}

inline constexpr double kDefaultRangeability = 50.0;
inline constexpr double kDefaultCharacteristicBlend = 0.05;

namespace internal {
// a x + b x^2 with value v and slope s at xb (C1 start of a characteristic).
template <class T>
inline T QuadraticStart(const T& x, double xb, double v, double s) {
  const double a = (2.0 * v - s * xb) / xb;
  const double b = (s * xb - v) / (xb * xb);
  return x * (a + b * x);
}
}  // namespace internal

// Relative flow coefficient phi = Kv/Kvs at relative travel x (see header).
// rangeability R > 1 (values <= 1 are taken as 1.0001); x_blend in (0, 1).
template <class T>
inline T RelativeKv(ValveCharacteristic c, const T& x_in,
                    double rangeability = kDefaultRangeability,
                    double x_blend = kDefaultCharacteristicBlend) {
  using std::exp;
  using std::sqrt;
  const double xs = ScalarPart(x_in);
  if (xs <= 0.0) return T(0.0);
  if (xs >= 1.0) return T(1.0);
  const T& x = x_in;
  switch (c) {
    case ValveCharacteristic::kLinear:
      return x;
    case ValveCharacteristic::kEqualPercentage: {
      const double ln_r = std::log(rangeability > 1.0001 ? rangeability : 1.0001);
      const double xb = std::fmin(x_blend, 1.0 / ln_r);
      if (xs >= xb) return exp((x - 1.0) * ln_r);  // R^(x-1)  [2]
      const double v = std::exp((xb - 1.0) * ln_r);
      return internal::QuadraticStart(x, xb, v, v * ln_r);
    }
    case ValveCharacteristic::kQuickOpening: {
      const double xb = x_blend;
      if (xs >= xb) return sqrt(x);
      const double v = std::sqrt(xb);
      return internal::QuadraticStart(x, xb, v, 0.5 / v);
    }
  }
  return x;
}

}  // namespace loopwright
