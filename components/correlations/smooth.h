// Smooth primitives for component laws.
//
// Purpose. The network's Newton solve needs laws that are continuous and
// (preferably) twice differentiable in the unknowns, including at zero flow
// and across flow reversal. This header gives the few building blocks every
// law uses in place of |x|, x|x|, sqrt|x|, max, min and clamped ramps. Each
// takes a stated scale (eps, w) in the units of its argument; the caller
// chooses it far below any design value (DESIGN.md section 4), so the
// smoothing only acts in a band around the non-smooth point and the error
// outside that band is stated below for each function.
//
// Scalar type. Every function is a template on the scalar T, used with
// T = double and T = ceres::Jet<double, N> (forward-mode automatic
// differentiation). None allocates or throws. Branches are taken only on the
// scalar part (ScalarPart), never on derivative parts, and every branch joins
// its neighbour with equal value and equal first and second derivative, so a
// Jet carries the derivative of the smooth function itself.
//
// Inputs are in whatever SI unit the caller's quantity has (m3/s, Pa, ...);
// scale arguments eps and w share the unit of x. Scales are plain doubles:
// they are constants of a law, not unknowns.
//
// Summary of errors against the exact function (x in units of the scale):
//   SmoothAbs(x, eps)            = |x| exactly for |x| >= eps; 3/8 eps at 0
//                                  (C2 quartic patch inside).
//   SmoothAbsHyperbolic(x, eps)  = sqrt(x^2 + eps^2); error eps at 0,
//                                  < eps^2 / (2|x|) beyond (never exact; C-inf).
//   SignedSquare(x, eps)         = x*SmoothAbs(x, eps): exactly x|x| for
//                                  |x| >= eps; odd, C2; slope 3/8 eps at 0.
//   SignedSqrt(x, eps)           = x / (x^2 + eps^2)^(1/4): odd, C-inf; slope
//                                  1/sqrt(eps) at 0; relative error vs
//                                  sign(x) sqrt|x| below eps^2/(4 x^2).
//   Softplus(x, w)               = w ln(1 + exp(x/w)): error vs max(x, 0) is
//                                  w ln 2 at 0 and w exp(-|x|/w) beyond.
//   SmoothStep01(x, x0, x1)      = 0 for x <= x0, 1 for x >= x1, quintic C2
//                                  ramp between (exact, no tail).
//   LinearRampC2(t, w)           = clamp(t, 0, 1) exactly for t outside the
//                                  corner bands (0, w) and (1 - w, 1); within
//                                  them off by at most 16/81 w; C2.
//   SmoothMax/SmoothMin(a, b, w) = max/min exactly when |a - b| >= w; at
//                                  a = b the error is 3/16 w (above the max,
//                                  below the min).
//
// References
// [1] K. Perlin, "Improving noise", ACM Trans. Graphics 21(3):681-682, 2002
//     (the quintic 6t^5 - 15t^4 + 10t^3 smoothstep with zero first and second
//     derivatives at both ends).
// [2] The quartic patch of SmoothAbs is derived here: p(t) = (3 + 6t^2 - t^4)/8
//     is the even polynomial of degree 4 with p(1) = 1, p'(1) = 1, p''(1) = 0,
//     so eps*p(x/eps) joins |x| at |x| = eps with equal value, slope and
//     curvature; p'' = 3(1 - t^2)/2 >= 0 keeps it convex.
#pragma once

#include <ceres/jet.h>

#include <cmath>
#include <limits>

namespace loopwright {

// The value part of a scalar: the double itself, or the Jet's value `a`.
// Use it to choose a branch; never to compute a result that should carry
// derivatives.
template <class T>
inline double ScalarPart(const T& x) {
  return static_cast<double>(x);
}
template <int N>
inline double ScalarPart(const ceres::Jet<double, N>& x) {
  return x.a;
}

// |x| with a C2 quartic patch of half-width eps around 0; exactly |x| for
// |x| >= eps. eps <= 0 gives the exact |x| (kink at 0; a Jet at x = 0 then
// takes the slope +1).
template <class T>
inline T SmoothAbs(const T& x, double eps) {
  const double xs = ScalarPart(x);
  if (eps <= 0.0 || xs >= eps) return xs >= 0.0 ? x : T(-x);
  if (xs <= -eps) return T(-x);
  const T t = x / eps;
  const T t2 = t * t;
  return eps * (3.0 + t2 * (6.0 - t2)) / 8.0;
}

// sqrt(x^2 + eps^2): C-infinity, error eps at x = 0, never exactly |x|.
template <class T>
inline T SmoothAbsHyperbolic(const T& x, double eps) {
  using std::sqrt;
  return sqrt(x * x + eps * eps);
}

// x*|x| made C2 and odd: exactly x|x| for |x| >= eps. For rho*Q|Q| terms.
// eps <= 0 gives the exact x|x| (C1, slope 0 at x = 0).
template <class T>
inline T SignedSquare(const T& x, double eps) {
  return x * SmoothAbs(x, eps);
}

// Smooth odd square root: x / (x^2 + eps^2)^(1/4). Tends to sign(x) sqrt|x|
// for |x| >> eps; slope at 0 is 1/sqrt(eps) (finite). eps must be > 0; a
// non-positive eps is replaced by 1e-150 (still finite, slope 1e75 at 0).
template <class T>
inline T SignedSqrt(const T& x, double eps) {
  using std::sqrt;
  const double e = eps > 0.0 ? eps : 1e-150;
  return x / sqrt(sqrt(x * x + e * e));
}

// Softplus w*ln(1 + exp(x/w)), a smooth max(x, 0). Evaluated in the form
// that cannot overflow: for x > 0 as x + w*ln(1 + exp(-x/w)). w must be > 0.
template <class T>
inline T Softplus(const T& x, double w) {
  using std::exp;
  using std::log1p;
  if (ScalarPart(x) > 0.0) return x + w * log1p(exp(-x / w));
  return w * log1p(exp(x / w));
}

// Smooth clamp of t to [0, 1] with the quintic smoothstep [1]:
// 0 for t <= 0, 1 for t >= 1, 6t^5 - 15t^4 + 10t^3 between (C2).
template <class T>
inline T SmoothClamp01(const T& t) {
  const double ts = ScalarPart(t);
  if (ts <= 0.0) return T(0.0);
  if (ts >= 1.0) return T(1.0);
  return t * t * t * (10.0 + t * (-15.0 + 6.0 * t));
}

// C2 ramp from 0 (x <= x0) to 1 (x >= x1). Requires x1 > x0.
template <class T>
inline T SmoothStep01(const T& x, double x0, double x1) {
  return SmoothClamp01(T((x - x0) / (x1 - x0)));
}

// The clamped straight line min(max(t, 0), 1) with C2 corners: 0 for
// t <= 0, 1 for t >= 1, exactly t for w <= t <= 1 - w, and in the corner
// bands w p(t/w) and 1 - w p((1 - t)/w), p(x) = 6x^3 - 8x^4 + 3x^5 (the
// quintic with p(0) = p'(0) = p''(0) = 0, p(1) = 1, p'(1) = 1, p''(1) = 0;
// p' = x^2 (18 - 32x + 15x^2) > 0, so the ramp rises strictly on (0, 1)).
// It departs from the straight line by at most 16/81 w = 0.1975 w (below
// it at the lower corner, above at the upper; max of x - p(x) at x = 1/3).
// Requires 0 < w <= 0.5.
template <class T>
inline T LinearRampC2(const T& t, double w) {
  const double ts = ScalarPart(t);
  if (ts <= 0.0) return T(0.0);
  if (ts >= 1.0) return T(1.0);
  auto p = [](const T& x) { return x * x * x * (6.0 + x * (-8.0 + 3.0 * x)); };
  if (ts < w) return w * p(T(t / w));
  if (ts > 1.0 - w) return 1.0 - w * p(T((1.0 - t) / w));
  return t;
}

// max(a, b), exact when |a - b| >= w; at a = b it returns max + 3/16 w.
template <class T>
inline T SmoothMax(const T& a, const T& b, double w) {
  return 0.5 * (a + b + SmoothAbs(T(a - b), w));
}

// min(a, b), exact when |a - b| >= w; at a = b it returns min - 3/16 w.
template <class T>
inline T SmoothMin(const T& a, const T& b, double w) {
  return 0.5 * (a + b - SmoothAbs(T(a - b), w));
}

}  // namespace loopwright
