// Darcy friction factor of fully developed flow in a straight round pipe.
//
// Purpose. The pipe law needs the Darcy (Moody) friction factor f, defined by
//   dp = f * (L / D) * rho * V^2 / 2,
// as a function of the Reynolds number Re = rho |V| D / mu and the relative
// roughness rr = eps / D. Four methods, chosen by name in a case:
//   churchill_1977     Churchill's all-regime equation [3] (the default: one
//                      smooth expression through laminar, transition and
//                      turbulent flow).
//   colebrook_1939     Colebrook-White [2], turbulent only, solved to machine
//                      precision.
//   laminar_colebrook  64/Re below Re = 2300, Colebrook above: a HARD switch
//                      (common practice transition Re; [5]). Discontinuous
//                      in value at Re = 2300 (64/2300 = 0.0278 against
//                      Colebrook ~0.05 there): for checks against hand
//                      calculations, never as a solver default
//                      (DESIGN.md section 4). The jump is taken as its
//                      filled graph (the vertical segment joining the two
//                      values at Re = 2300, so the law stays a monotone
//                      relation between flow and drop): f*Re rises linearly
//                      from 64 to Colebrook's value over the band
//                      2300 (1 - kSwitchBand) <= Re < 2300, 1e-10 wide. A line
//                      whose drop lies between the laminar and turbulent
//                      drops at Re = 2300 carries the switch flow (to 1e-10
//                      relative) and is reported "at switch".
//   fixed              a Darcy f given by the user, constant.
//
// Product form. For every method this header also gives f*Re, which stays
// finite as Re -> 0 for the laminar-capable methods (64 in the laminar
// limit). The pipe law writes the loss as
//   dp = (f*Re) * mu * L * V / (2 D^2),
// which is exactly f (L/D) rho V|V|/2 for Re = rho|V|D/mu, yet is linear in V
// at low flow, smooth through V = 0 and odd under flow reversal.
//
// Sign convention. f and f*Re are even in Re: a negative Re (reversed flow)
// is read as |Re|. The sign of dp comes from V in the pipe law.
//
// Inputs. Re [-] (>= 0; negative read as |Re|), rr = eps/D [-].
// Outputs. f [-] (Darcy, 4x the Fanning factor), f*Re [-].
//
// Validity and behaviour outside it.
//   churchill_1977: all Re > 0, 0 <= rr <= 0.05 (the range of the Moody chart
//     [4]). Within 3.1 % of Colebrook for 4000 <= Re <= 1e8, rr <= 0.01
//     (worst at Re = 4000), within 1.5 % for Re >= 1e5 (measured by
//     tests/components/correlations_test.cpp; compare [6]); equal to 64/Re
//     to machine precision for Re < 100 (the turbulent term is below 1e-40
//     relative there, so f*Re = 64 is returned exactly). Between
//     Re 2100 and 4000 no correlation is accurate: the flow is intermittent;
//     Churchill's curve is a smooth interpolation. Finite up to Re ~ 1e25.
//   colebrook_1939: meant for Re >= 4000, 0 <= rr <= 0.05. The equation has a
//     unique root for every Re > 0 and rr < 3.7, and is evaluated there, but
//     it has no laminar limit: f -> 6.3/Re^2 as Re -> 0. Re below
//     kColebrookMinReynolds (1e-6) is held at that floor (value finite,
//     derivative with respect to Re zero there). rr is clamped to [0, 1].
//   fixed: any Re; f*Re = f_fixed * Re (-> 0 at Re = 0).
//   f (not f*Re) has a pole at Re = 0 for churchill_1977 and
//     laminar_colebrook (and laminar): for Re < kPoleReynolds (1e-100,
//     where 64/Re and its derivative would overflow) those f functions return
//     +infinity with zero derivative, never NaN; colebrook_1939 returns its
//     (finite, huge) value at the Re floor. Laws must use the f*Re forms
//     where flow may vanish.
//
// Colebrook and automatic differentiation. The Colebrook-White equation is
// implicit in x = 1/sqrt(f):
//   g(x; Re, rr) = x + 2 log10(rr/3.7 + 2.51 x / Re) = 0.            [2]
// It is solved on the double value by Newton's method (g is increasing and
// concave in x, so from a start with g < 0 the iterates rise monotonically to
// the root; quadratic convergence, stop at a step below 4 ulp). Then one
// further Newton step is taken in T arithmetic from the converged double x*:
//   x_T = x* - g(x*; Re_T, rr_T) / g_x(x*).
// Its value is x* (g(x*) is at round-off level) and its derivative part is
// -(g_Re dRe + g_rr drr)/g_x, which is exactly the implicit-function
// derivative dx/d(Re, rr). So a Jet carries the exact derivative without
// differentiating through the iterations (which would give the derivative of
// the truncated iteration, and branch on derivative parts).
//
// References
// [1] L. F. Moody, "Friction factors for pipe flow", Trans. ASME 66(8):
//     671-684, 1944 (the chart; laminar f = 64/Re).
// [2] C. F. Colebrook, "Turbulent flow in pipes, with particular reference to
//     the transition region between the smooth and rough pipe laws",
//     J. Inst. Civil Eng. 11(4):133-156, 1939; in Darcy form
//     1/sqrt(f) = -2 log10(rr/3.7 + 2.51/(Re sqrt(f))).
// [3] S. W. Churchill, "Friction-factor equation spans all fluid-flow
//     regimes", Chem. Eng. 84(24):91-92, Nov. 7, 1977:
//     f = 8 [ (8/Re)^12 + (A + B)^(-3/2) ]^(1/12),
//     A = [ -2.457 ln( (7/Re)^0.9 + 0.27 rr ) ]^16,  B = (37530/Re)^16.
// [4] Moody [1], chart range rr = 1e-6 .. 0.05, Re = 600 .. 1e8.
// [5] Re = 2300 as the laminar limit in pipes: common practice (e.g. the
//     textbook value of Reynolds' experiments; from memory).
// [6] H. K. Winning, T. Coole, "Explicit friction factor accuracy and
//     computational efficiency for turbulent flow in pipes", Flow, Turbulence
//     and Combustion 90(1):1-27, 2013 (accuracy survey of explicit forms,
//     Churchill 1977 among them; as cited by python3-fluids).
// [7] P. K. Swamee, A. K. Jain, "Explicit equations for pipe-flow problems",
//     J. Hydraulics Div. ASCE 102(HY5):657-664, 1976 (the starting guess).
#pragma once

#include <cmath>
#include <limits>
#include <optional>
#include <string_view>

#include "components/correlations/smooth.h"

namespace loopwright {

enum class FrictionMethod { kChurchill1977, kColebrook, kLaminarColebrook, kFixed };

// Stable names, as written in case files.
inline const char* FrictionMethodName(FrictionMethod m) {
  switch (m) {
    case FrictionMethod::kChurchill1977:
      return "churchill_1977";
    case FrictionMethod::kColebrook:
      return "colebrook_1939";
    case FrictionMethod::kLaminarColebrook:
      return "laminar_colebrook";
    case FrictionMethod::kFixed:
      return "fixed";
  }
  return "unknown";
}

// All method names, in enum order (for "valid options are ..." messages).
inline constexpr const char* kFrictionMethodNames[] = {"churchill_1977", "colebrook_1939",
                                                       "laminar_colebrook", "fixed"};

// Parses a stable name; nullopt for anything else (the caller reports the
// valid names from kFrictionMethodNames).
inline std::optional<FrictionMethod> ParseFrictionMethod(std::string_view name) {
  if (name == "churchill_1977") return FrictionMethod::kChurchill1977;
  if (name == "colebrook_1939") return FrictionMethod::kColebrook;
  if (name == "laminar_colebrook") return FrictionMethod::kLaminarColebrook;
  if (name == "fixed") return FrictionMethod::kFixed;
  return std::nullopt;
}

// Laminar-turbulent switch of laminar_colebrook (common practice [5]).
inline constexpr double kLaminarTransitionReynolds = 2300.0;
// Relative width of the band that stands for the switch's filled graph.
inline constexpr double kSwitchBand = 1e-10;
// Floor on Re inside Colebrook (see the header note).
inline constexpr double kColebrookMinReynolds = 1e-6;
// Below this Re the f (not f*Re) functions return +inf: 64/Re and its
// derivative would overflow in double.
inline constexpr double kPoleReynolds = 1e-100;
// Below this Re Churchill's f*Re equals 64 to far below machine precision.
inline constexpr double kChurchillLaminarReynolds = 100.0;

namespace internal {

// |x| taken on the scalar part: the f*Re forms are even in Re.
template <class T>
inline T AbsReynolds(const T& re) {
  return ScalarPart(re) < 0.0 ? T(-re) : re;
}

// +infinity with zero derivative: f at Re = 0.
template <class T>
inline T PoleValue() {
  return T(std::numeric_limits<double>::infinity());
}

// Solves the Colebrook equation [2] for x = 1/sqrt(f) on doubles.
// re > 0, 0 <= rr <= 1.
inline double ColebrookInvSqrtF(double re, double rr) {
  constexpr double kLn10 = 2.302585092994045684;
  const double a = rr / 3.7;   // [2]
  const double b = 2.51 / re;  // [2]
  auto g = [&](double x) { return x + 2.0 * std::log10(a + b * x); };
  // Start: Swamee-Jain [7] f = 0.25 / log10(rr/3.7 + 5.74/Re^0.9)^2, i.e.
  // x = -2 log10(...); where that is unusable (low Re) start from Re/2.51,
  // where g > 0 always.
  double x = -2.0 * std::log10(a + 5.74 / std::pow(re, 0.9));
  if (!(x > 0.0) || !std::isfinite(x)) x = re / 2.51;
  // Move to the left of the root (g < 0): Newton from there rises
  // monotonically (g concave increasing). A Newton step from the right lands
  // left of the root, but possibly at x <= 0; then halve instead.
  for (int k = 0; k < 200 && g(x) > 0.0; ++k) {
    const double gx = 1.0 + 2.0 / kLn10 * b / (a + b * x);
    const double xn = x - g(x) / gx;
    x = xn > 0.0 ? xn : 0.5 * x;
  }
  for (int k = 0; k < 100; ++k) {
    const double gv = g(x);
    const double gx = 1.0 + 2.0 / kLn10 * b / (a + b * x);
    const double step = gv / gx;
    const double xn = x - step;
    if (!(xn > 0.0)) break;  // cannot happen from the left; guard only
    x = xn;
    if (std::fabs(step) <= 4.0 * std::numeric_limits<double>::epsilon() * x) break;
  }
  return x;
}

// x = 1/sqrt(f) from Colebrook with the exact implicit derivative in T.
template <class T>
inline T ColebrookInvSqrtFT(const T& re_in, const T& rr_in) {
  using std::log10;
  constexpr double kLn10 = 2.302585092994045684;
  T re = AbsReynolds(re_in);
  if (ScalarPart(re) < kColebrookMinReynolds) re = T(kColebrookMinReynolds);
  T rr = rr_in;
  if (ScalarPart(rr) < 0.0) rr = T(0.0);
  if (ScalarPart(rr) > 1.0) rr = T(1.0);
  const double res = ScalarPart(re), rrs = ScalarPart(rr);
  const double xs = ColebrookInvSqrtF(res, rrs);
  const double a = rrs / 3.7, b = 2.51 / res;
  const double gx = 1.0 + 2.0 / kLn10 * b / (a + b * xs);
  const T g = xs + 2.0 * log10(rr / 3.7 + 2.51 * xs / re);
  return xs - g / gx;
}

}  // namespace internal

// ---------------------------------------------------------------- laminar
// f*Re = 64 for Hagen-Poiseuille flow [1].
template <class T>
inline T FReLaminar(const T& re) {
  (void)re;
  return T(64.0);
}
// f = 64/Re [1]; +inf at Re = 0.
template <class T>
inline T DarcyLaminar(const T& re_in) {
  const T re = internal::AbsReynolds(re_in);
  if (ScalarPart(re) < kPoleReynolds) return internal::PoleValue<T>();
  return 64.0 / re;
}

// -------------------------------------------------------------- Colebrook
// f from Colebrook-White [2]; see the header for the solution method.
template <class T>
inline T DarcyColebrook(const T& re, const T& rr) {
  const T x = internal::ColebrookInvSqrtFT(re, rr);
  return 1.0 / (x * x);
}
// f*Re from Colebrook-White; Re held at kColebrookMinReynolds below it.
template <class T>
inline T FReColebrook(const T& re_in, const T& rr) {
  T re = internal::AbsReynolds(re_in);
  if (ScalarPart(re) < kColebrookMinReynolds) re = T(kColebrookMinReynolds);
  const T x = internal::ColebrookInvSqrtFT(re, rr);
  return re / (x * x);
}

// ------------------------------------------------------ laminar/Colebrook
// 64/Re below Re = 2300, Colebrook at and above: hard switch (checks only).
// The filled graph of the jump: a linear rise over the band
// [2300 (1 - kSwitchBand), 2300) (see the header comment).
template <class T>
inline T FReLaminarColebrook(const T& re_in, const T& rr) {
  const T re = internal::AbsReynolds(re_in);
  constexpr double lo = kLaminarTransitionReynolds * (1.0 - kSwitchBand);
  if (ScalarPart(re) < lo) return FReLaminar(re);
  if (ScalarPart(re) >= kLaminarTransitionReynolds) return FReColebrook(re, rr);
  const T turb = FReColebrook(T(kLaminarTransitionReynolds), rr);
  return 64.0 + (turb - 64.0) * ((re - lo) / (kLaminarTransitionReynolds - lo));
}
template <class T>
inline T DarcyLaminarColebrook(const T& re_in, const T& rr) {
  const T re = internal::AbsReynolds(re_in);
  if (ScalarPart(re) < kLaminarTransitionReynolds * (1.0 - kSwitchBand)) return DarcyLaminar(re);
  if (ScalarPart(re) >= kLaminarTransitionReynolds) return DarcyColebrook(re, rr);
  return FReLaminarColebrook(re, rr) / re;
}
// True when Re lies on the filled graph of laminar_colebrook's switch (within
// rel_tol of its band), where the line carries the switch flow.
inline bool AtLaminarColebrookSwitch(double re, double rel_tol = 1e-9) {
  return re >= kLaminarTransitionReynolds * (1.0 - kSwitchBand - rel_tol) &&
         re <= kLaminarTransitionReynolds * (1.0 + rel_tol);
}

// ------------------------------------------------------- Churchill (1977)
// f*Re = 8 [ 8^12 + Re^12 (A + B)^(-3/2) ]^(1/12)  (Churchill [3] times Re).
// The logarithm in A is written as 0.9 ln(7/Re) + ln(1 + 0.27 rr (Re/7)^0.9),
// equal to ln((7/Re)^0.9 + 0.27 rr), so that no term overflows at small Re.
// For Re < 100 the second term inside the brackets is below
// Re^36 / 37530^24 < 1e-37 of the first and f*Re = 64 is returned exactly.
template <class T>
inline T FReChurchill1977(const T& re_in, const T& rr) {
  using std::log;
  using std::log1p;
  using std::pow;
  const T re = internal::AbsReynolds(re_in);
  if (ScalarPart(re) < kChurchillLaminarReynolds) return T(64.0);
  const T ln_arg = 0.9 * log(7.0 / re) + log1p(0.27 * rr * pow(re / 7.0, 0.9));  // [3]
  const T a_root = 2.457 * ln_arg;                                               // [3]
  const T a2 = a_root * a_root;
  const T a = pow(a2, 8);             // A = (2.457 ln ...)^16       [3]
  const T b = pow(37530.0 / re, 16);  // B = (37530/Re)^16           [3]
  const T turb = pow(re, 12) * pow(a + b, -1.5);
  constexpr double k8pow12 = 68719476736.0;  // 8^12
  return 8.0 * pow(k8pow12 + turb, 1.0 / 12.0);
}
// f = 8 [ (8/Re)^12 + (A + B)^(-3/2) ]^(1/12) [3]; +inf at Re = 0.
template <class T>
inline T DarcyChurchill1977(const T& re_in, const T& rr) {
  const T re = internal::AbsReynolds(re_in);
  if (ScalarPart(re) < kPoleReynolds) return internal::PoleValue<T>();
  return FReChurchill1977(re, rr) / re;
}

// -------------------------------------------------------------- dispatch
// f*Re by method; fixed_f is used by kFixed only.
template <class T>
inline T FrictionFactorTimesRe(FrictionMethod m, const T& re, const T& rr, double fixed_f) {
  switch (m) {
    case FrictionMethod::kChurchill1977:
      return FReChurchill1977(re, rr);
    case FrictionMethod::kColebrook:
      return FReColebrook(re, rr);
    case FrictionMethod::kLaminarColebrook:
      return FReLaminarColebrook(re, rr);
    case FrictionMethod::kFixed:
      return fixed_f * internal::AbsReynolds(re);
  }
  return FReChurchill1977(re, rr);
}

// f by method; fixed_f is used by kFixed only.
template <class T>
inline T FrictionFactor(FrictionMethod m, const T& re, const T& rr, double fixed_f) {
  switch (m) {
    case FrictionMethod::kChurchill1977:
      return DarcyChurchill1977(re, rr);
    case FrictionMethod::kColebrook:
      return DarcyColebrook(re, rr);
    case FrictionMethod::kLaminarColebrook:
      return DarcyLaminarColebrook(re, rr);
    case FrictionMethod::kFixed:
      return T(fixed_f);
  }
  return DarcyChurchill1977(re, rr);
}

}  // namespace loopwright
