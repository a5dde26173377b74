// Two-stream heat exchangers by the effectiveness-NTU method.
//
// Purpose. The heat a recuperative exchanger (oil cooler, coolant radiator,
// oil-to-water plate or shell-and-tube cooler) passes from its hot stream to
// its cold stream, given its conductance UA, the heat capacity rates of the
// two streams and their inlet temperatures [1, 2]:
//   q = eps(NTU, Cr) C_min (T_hot,in - T_cold,in),
//   C = m cp [W/K] of each stream, C_min = min(C_hot, C_cold),
//   C_max = max(...), NTU = UA / C_min, Cr = C_min / C_max in [0, 1].
// eps is the fraction of the largest possible duty C_min (T_hot,in -
// T_cold,in) that the exchanger achieves; it depends on the flow arrangement.
//
// Equations. Incropera et al. [1] Table 11.3 (equation numbers of the 6th
// edition, from memory):
//   parallel flow (11.28a):  eps = [1 - exp(-NTU (1 + Cr))] / (1 + Cr)
//   counterflow (11.29a):    eps = [1 - exp(-NTU (1 - Cr))] /
//                                  [1 - Cr exp(-NTU (1 - Cr))],   Cr < 1
//                            eps = NTU / (1 + NTU),              Cr = 1
//   shell-and-tube, one shell pass, 2, 4, ... tube passes (11.30a):
//     eps = 2 {1 + Cr + s [1 + exp(-NTU s)] / [1 - exp(-NTU s)]}^-1,
//     s = sqrt(1 + Cr^2)
//   crossflow, single pass, both fluids unmixed (11.32), a series-free
//   approximation of the exact solution:
//     eps = 1 - exp[(1/Cr) NTU^0.22 (exp(-Cr NTU^0.78) - 1)]
//   crossflow, C_max mixed, C_min unmixed (11.33a):
//     eps = (1/Cr) (1 - exp{-Cr [1 - exp(-NTU)]})
//   crossflow, C_min mixed, C_max unmixed (11.34a):
//     eps = 1 - exp(-(1/Cr) [1 - exp(-Cr NTU)])
//   every arrangement, Cr = 0 (11.35a): eps = 1 - exp(-NTU).
// Kays & London [2] ch. 2 give the same relations and charts.
//
// Stable forms used here. With phi(z) = (1 - e^-z)/z (phi(0) = 1, a Taylor
// series for |z| < 0.5, -expm1(-z)/z beyond), every relation above is
// rewritten exactly so that no 1/Cr, 1/(1 - Cr) or 0/0 appears:
//   parallel:          eps = -expm1(-NTU (1 + Cr)) / (1 + Cr)
//   counterflow:       z = NTU (1 - Cr), p = NTU phi(z),
//                      eps = p / (p + e^-z)
//                      (numerator and denominator of 11.29a divided by
//                      1 - Cr; at Cr = 1 it is NTU/(1 + NTU) exactly, and it
//                      is analytic through Cr = 1: no switch, no blend)
//   shell-and-tube:    t = tanh(NTU s / 2), eps = 2 t / ((1 + Cr) t + s)
//                      ([1 + e^-x]/[1 - e^-x] = coth(x/2); finite at NTU = 0)
//   crossflow unmixed: eps = -expm1(-NTU phi(Cr NTU^0.78))
//                      ((1/Cr) NTU^0.22 (e^-y - 1) = -NTU phi(y), y = Cr NTU^0.78)
//   C_max mixed:       u = -expm1(-NTU), eps = u phi(Cr u)
//   C_min mixed:       eps = -expm1(-NTU phi(Cr NTU))
// (x phi(k x) is evaluated as (1 - e^-kx)/k once |k x| >= 0.5, so that eps
// stays monotone in NTU to the last bit.)
// Each tends to 1 - e^-NTU as Cr -> 0 with no special case, and each is 0 at
// NTU = 0 with slope d eps/d NTU = 1 (for every arrangement, eps = NTU -
// (1 + Cr) NTU^2/2 + ... for the exact solutions).
//
// C_max mixed and C_min mixed agree at Cr = 1: both become
// 1 - exp[-(1 - e^-NTU)]. Both are exact solutions of the one-fluid-mixed
// crossflow problem, so q is a smooth function of the two physical C's through
// C_hot = C_cold when the mixed fluid stays the same fluid (use
// HeatExchangedCrossflowOneMixed, or map with CrossflowMixedSide on every
// evaluation). The parallel, counter and shell-and-tube relations are
// symmetric in the two streams and smooth there too. The both-unmixed
// approximation 11.32 is not symmetric: q is continuous at C_hot = C_cold but
// its slope in C_hot or C_cold jumps there (by 7 % of q / C at NTU = 1.4;
// tests/components/heat_exchanger_test.cpp measures it).
//
// Accuracy of 11.32 (computed here, not from [1]): against the exact series
// solution of the both-unmixed crossflow problem [3] it is low by up to 3.8 %
// of eps (worst near NTU = 0.27 and NTU = 30 at Cr = 0.8-1; below 1.7 % for
// 1 <= NTU <= 5), absolute error <= 0.036 for NTU <= 50; exact at Cr = 0.
// Near NTU = 0 it behaves as NTU - Cr NTU^1.78 / 2, so its second derivative
// in NTU is unbounded at NTU = 0 (value and first derivative are finite:
// eps(0) = 0, slope 1).
//
// Sign convention. q > 0 is heat leaving the hot stream and entering the cold
// stream; "hot" and "cold" only label the streams: if t_hot_in < t_cold_in
// then q < 0 (the labelled-hot stream is heated).
//
// Inputs (SI). ntu [-] >= 0, cr [-] in [0, 1]; ua [W/K] >= 0; c_hot, c_cold
// [W/K] >= 0 (C = mass flow [kg/s] x cp [J/(kg K)], of the flow magnitude);
// t_hot_in, t_cold_in [K] (or any common temperature unit: only their
// difference enters). Output q [W].
//
// Validity: steady state, constant cp and U through the core, no heat loss to
// the surroundings, no axial conduction [1]. The shell-and-tube relation is
// exact for two tube passes per shell pass and used for 4, 6, ... [1].
// Outside 0 <= Cr <= 1, NTU >= 0 the forms are evaluated as they stand
// (finite for moderate arguments; the crossflow-unmixed form uses
// NTU^0.78 = 0 for NTU <= 0 and so gives -expm1(-NTU) there); HeatExchanged
// never passes such values.
//
// Behaviour of HeatExchanged at the ends:
//   C_min = 0 (a stopped stream): returns C_min (T_hot,in - T_cold,in), i.e.
//     q = 0 with slope dq/dC_min = T_hot,in - T_cold,in, the one-sided limit
//     of the exact q (eps -> 1 as NTU -> inf and Cr -> 0). For C_min -> 0+,
//     q = C_min eps dT with eps <= 1, so q -> 0 continuously.
//   NTU > kHxNtuCap (1e15; C_min tiny against UA): eps is evaluated at
//     NTU = kHxNtuCap (its dependence on NTU is dropped). The value then
//     differs from the uncapped one by at most 1/kHxNtuCap relative
//     (counterflow at Cr = 1, where eps = 1 - 1/(1 + NTU)); for the other
//     arrangements eps has reached its limit to double precision. This keeps
//     the Jet derivative of UA/C_min from overflowing.
//   UA = 0: q = 0 with dq/dUA = T_hot,in - T_cold,in (eps = NTU for small NTU).
// Jet derivatives are finite for UA and C >= 1e-250 W/K or exactly 0, and
// those of Effectiveness for NTU <= 1e150 (its values for any finite NTU).
//
// NtuFromEffectiveness (rating and fitting, doubles only) inverts eps(NTU) for
// any arrangement by safeguarded Newton iteration (derivative from a Jet),
// starting from the Cr = 0 value -ln(1 - eps), which is a lower bound because
// eps falls with Cr at fixed NTU. Returns 0 for eps <= 0 and +infinity when
// eps is at or above what the arrangement can reach as NTU -> inf (e.g.
// 1/(1 + Cr) for parallel flow).
//
// References
// [1] F. P. Incropera, D. P. DeWitt, T. L. Bergman, A. S. Lavine,
//     "Fundamentals of Heat and Mass Transfer", 6th ed., Wiley, 2007,
//     §11.4, Table 11.3 (Eqs. 11.28a-11.35a) and Table 11.4 (inverse
//     relations, Eqs. 11.28b-11.35b); equation numbers from memory.
// [2] W. M. Kays, A. L. London, "Compact Heat Exchangers", 3rd ed.,
//     McGraw-Hill, 1984, ch. 2 (eps-NTU relations and tables).
// [3] J. L. Mason, "Heat transfer in crossflow", Proc. 2nd U.S. National
//     Congress of Applied Mechanics, ASME, 1954, pp. 801-803 (exact series
//     eps = (1/(Cr NTU)) sum_n [1 - e^-NTU sum_{m<=n} NTU^m/m!]
//     [1 - e^-(Cr NTU) sum_{m<=n} (Cr NTU)^m/m!]; citation from memory; the
//     series is checked against a direct numerical solution of the crossflow
//     equations in tests/components/heat_exchanger_scipy_test.py).
#pragma once

#include <ceres/jet.h>

#include <cmath>
#include <algorithm>
#include <limits>
#include <type_traits>

#include "components/correlations/smooth.h"

namespace loopwright {

enum class HxArrangement {
  kCounterflow,
  kParallelFlow,
  kShellAndTube1Pass,   // one shell pass, 2, 4, ... tube passes
  kCrossflowUnmixed,    // single pass, both fluids unmixed (11.32)
  kCrossflowCmaxMixed,  // C_max mixed, C_min unmixed (11.33a)
  kCrossflowCminMixed,  // C_min mixed, C_max unmixed (11.34a)
};

// NTU above which HeatExchanged evaluates eps at this NTU (see header).
inline constexpr double kHxNtuCap = 1e15;

namespace hx_internal {

// phi(z) = (1 - exp(-z)) / z, phi(0) = 1. For |z| < 0.5 the Taylor series
// sum_{k=0}^{17} (-z)^k / (k+1)! (truncation below 1e-22); beyond,
// -expm1(-z)/z (full relative precision; its Jet derivative
// [z e^-z - (1 - e^-z)]/z^2 loses no digits for |z| >= 0.5).
template <class T>
inline T Phi(const T& z) {
  using std::expm1;
  const double zs = ScalarPart(z);
  if (zs > -0.5 && zs < 0.5) {
    // Horner in (-z): coefficients 1/(k+1)!, k = 17 .. 0.
    constexpr double kInvFact[18] = {
        1.0,                   // 1/1!
        0.5,                   // 1/2!
        1.0 / 6.0,             // 1/3!
        1.0 / 24.0,            // 1/4!
        1.0 / 120.0,           // 1/5!
        1.0 / 720.0,           // 1/6!
        1.0 / 5040.0,          // 1/7!
        1.0 / 40320.0,         // 1/8!
        1.0 / 362880.0,        // 1/9!
        1.0 / 3628800.0,       // 1/10!
        1.0 / 39916800.0,      // 1/11!
        1.0 / 479001600.0,     // 1/12!
        1.0 / 6227020800.0,    // 1/13!
        1.0 / 87178291200.0,   // 1/14!
        1.0 / 1307674368000.0, // 1/15!
        1.0 / 20922789888000.0,    // 1/16!
        1.0 / 355687428096000.0,   // 1/17!
        1.0 / 6402373705728000.0,  // 1/18!
    };
    const T mz = -z;
    T acc = T(kInvFact[17]);
    for (int k = 16; k >= 0; --k) acc = kInvFact[k] + mz * acc;
    return acc;
  }
  return -expm1(-z) / z;
}

// x phi(k x) = (1 - exp(-k x)) / k: by the series for |k x| < 0.5, else as
// -expm1(-k x) / k (which does not round differently as x grows once
// exp(-k x) is negligible, so eps stays monotone to the last bit).
template <class T>
inline T XPhi(const T& x, const T& k) {
  using std::expm1;
  const T kx = k * x;
  const double s = ScalarPart(kx);
  if (s > -0.5 && s < 0.5) return x * Phi(kx);
  return -expm1(-kx) / k;
}

}  // namespace hx_internal

// eps(NTU, Cr) for arrangement a ([1] Table 11.3 in the stable forms of the
// header). ntu >= 0, 0 <= cr <= 1.
template <class T>
inline T Effectiveness(HxArrangement a, const T& ntu, const T& cr) {
  using std::exp;
  using std::expm1;
  using std::pow;
  using std::sqrt;
  using std::tanh;
  using hx_internal::Phi;
  switch (a) {
    case HxArrangement::kCounterflow: {
      const T one_minus_cr = 1.0 - cr;
      const T p = hx_internal::XPhi(ntu, one_minus_cr);  // NTU phi(NTU (1 - Cr))
      return p / (p + exp(-ntu * one_minus_cr));
    }
    case HxArrangement::kParallelFlow: {
      const T s = 1.0 + cr;
      return -expm1(-ntu * s) / s;
    }
    case HxArrangement::kShellAndTube1Pass: {
      const T s = sqrt(1.0 + cr * cr);
      const T t = tanh(0.5 * ntu * s);
      return 2.0 * t / ((1.0 + cr) * t + s);
    }
    case HxArrangement::kCrossflowUnmixed: {
      // NTU^0.78 has an infinite Jet slope at 0; its contribution to eps is
      // multiplied by NTU and vanishes there, so use 0 for NTU <= 0.
      const T y = ScalarPart(ntu) > 0.0 ? T(cr * pow(ntu, 0.78)) : T(cr * 0.0);
      return -expm1(-ntu * Phi(y));
    }
    case HxArrangement::kCrossflowCmaxMixed: {
      const T u = -expm1(-ntu);
      return hx_internal::XPhi(u, cr);  // u phi(Cr u)
    }
    case HxArrangement::kCrossflowCminMixed:
      return -expm1(-hx_internal::XPhi(ntu, cr));  // NTU phi(Cr NTU)
  }
  return T(std::numeric_limits<double>::quiet_NaN());  // unreachable
}

// Which one-fluid-mixed crossflow relation applies, given whether the hot
// stream is the mixed one and whether it has the smaller capacity rate: the
// mixed stream is C_min when hot_mixed == hot_is_cmin.
inline HxArrangement CrossflowMixedSide(bool hot_mixed, bool hot_is_cmin) {
  return hot_mixed == hot_is_cmin ? HxArrangement::kCrossflowCminMixed
                                  : HxArrangement::kCrossflowCmaxMixed;
}

// q = eps C_min (t_hot_in - t_cold_in) [W] (header: signs, ends). The hot
// stream is taken as C_min when ScalarPart(c_hot) <= ScalarPart(c_cold). For
// kCrossflowCmaxMixed / kCrossflowCminMixed the arrangement is taken as given
// relative to C_min/C_max; for a fixed physical mixed stream use
// HeatExchangedCrossflowOneMixed.
template <class T>
inline T HeatExchanged(HxArrangement a, const T& ua, const T& c_hot, const T& c_cold,
                       const T& t_hot_in, const T& t_cold_in) {
  const bool hot_is_cmin = ScalarPart(c_hot) <= ScalarPart(c_cold);
  const T& c_min = hot_is_cmin ? c_hot : c_cold;
  const T& c_max = hot_is_cmin ? c_cold : c_hot;
  const T dt = t_hot_in - t_cold_in;
  const double c_min_s = ScalarPart(c_min);
  if (c_min_s <= 0.0) return c_min * dt;  // stopped stream: eps -> 1 limit
  const T cr = c_min / c_max;
  if (ScalarPart(ua) > kHxNtuCap * c_min_s) {
    return c_min * dt * Effectiveness(a, T(kHxNtuCap), cr);
  }
  return c_min * dt * Effectiveness(a, T(ua / c_min), cr);
}

// Crossflow with one fluid mixed, named by stream: hot_mixed = true when the
// hot stream is the mixed one (e.g. an oil cooler whose oil is baffled across
// the core), false when the cold stream is. Chooses 11.33a or 11.34a from the
// scalar C's on each call, with the same tie rule as HeatExchanged; the two
// agree at C_hot = C_cold.
template <class T>
inline T HeatExchangedCrossflowOneMixed(bool hot_mixed, const T& ua, const T& c_hot,
                                        const T& c_cold, const T& t_hot_in,
                                        const T& t_cold_in) {
  const bool hot_is_cmin = ScalarPart(c_hot) <= ScalarPart(c_cold);
  return HeatExchanged(CrossflowMixedSide(hot_mixed, hot_is_cmin), ua, c_hot, c_cold, t_hot_in,
                       t_cold_in);
}

// Duty when each stream's capacity rate depends on the duty itself: a
// liquid whose cp varies with temperature has the exact capacity rate
// C = m (h_in - h_out) / (T_in - T_out) (library/enthalpy.h,
// MeanCapacityRate), and T_out follows from the duty. Solves
//   q = HeatExchanged(arrangement(hot_is_cmin), ua, cap_hot(q), cap_cold(q), t_hot_in, t_cold_in)
// by a secant-accelerated fixed-point iteration from q0 = the duty at cap(0)
// (the capacity rates at the inlet temperatures). The map's slope is
// dq'/dq = (dq'/dC) (dC/dq), about ITD cp'/(2 cp) (1e-3 per K of inlet
// difference for mineral oil); the secant step q + (F(q) - q)/(1 - slope)
// with the slope from the last two iterates converges superlinearly (3-5
// evaluations of F). When T is a Jet the derivative parts follow the same
// update and converge to the implicit-function derivative
// (dF/dtheta) / (1 - dF/dq): the iteration stops when F(q) - q is at most
// 1e-14 of q in value and 1e-12 of the largest derivative part (at most 60
// passes). cap_hot and cap_cold take the duty q (hot -> cold, W) as T
// and return C [W/K] >= 0; arrangement maps hot_is_cmin to the relation.
template <class T, class ArrangementOf, class CapHot, class CapCold>
inline T HeatExchangedImplicit(ArrangementOf arrangement, const T& ua, CapHot cap_hot, CapCold cap_cold,
                               const T& t_hot_in, const T& t_cold_in) {
  auto step = [&](const T& q) {
    const T ch = cap_hot(q), cc = cap_cold(q);
    return HeatExchanged(arrangement(ScalarPart(ch) <= ScalarPart(cc)), ua, ch, cc, t_hot_in, t_cold_in);
  };
  // Secant-accelerated fixed point: q <- q + kappa (F(q) - q), kappa =
  // 1/(1 - slope) estimated from the last two iterates (a scalar, clamped to
  // [0.5, 2]; 1 on the first pass). The derivative parts follow the same
  // update and so converge to (dF/dtheta)/(1 - dF/dq).
  T q = step(T(0.0));
  T f = step(q);
  double kappa = 1.0, q_prev = 0.0, r_prev = 0.0;
  for (int it = 0; it < 60; ++it) {
    const T r = f - q;
    bool settled = std::abs(ScalarPart(r)) <= 1e-14 * std::abs(ScalarPart(q));
    if constexpr (!std::is_same_v<T, double>)
      settled = settled && r.v.cwiseAbs().maxCoeff() <= 1e-12 * f.v.cwiseAbs().maxCoeff();
    if (settled) return f;
    const double rs = ScalarPart(r), qs = ScalarPart(q);
    if (it > 0 && rs != r_prev) kappa = std::clamp(-(qs - q_prev) / (rs - r_prev), 0.5, 2.0);
    q_prev = qs;
    r_prev = rs;
    q = q + kappa * r;
    f = step(q);
  }
  return f;
}

// NTU that gives effectiveness eps at capacity ratio cr (doubles; header).
// 0 for eps <= 0; +infinity if eps >= eps(kHxNtuCap, cr).
inline double NtuFromEffectiveness(HxArrangement a, double eps, double cr) {
  using J = ceres::Jet<double, 1>;
  if (!(eps > 0.0)) return 0.0;
  const double eps_limit = Effectiveness(a, kHxNtuCap, cr);
  if (!(eps < eps_limit)) return std::numeric_limits<double>::infinity();
  // Bracket [lo, hi] with eps(lo) <= eps < eps(hi).
  double lo = 0.0;
  double hi = eps < 1.0 ? -std::log1p(-eps) : 1.0;  // Cr = 0 root: a lower bound
  while (Effectiveness(a, hi, cr) <= eps && hi < kHxNtuCap) {
    lo = hi;
    hi *= 2.0;
  }
  if (hi > kHxNtuCap) hi = kHxNtuCap;
  double n = lo > 0.0 ? lo : 0.5 * hi;
  for (int it = 0; it < 200; ++it) {
    const J e = Effectiveness(a, J(n, 0), J(cr));
    const double f = e.a - eps;
    if (f == 0.0) return n;
    if (f < 0.0) {
      lo = n;
    } else {
      hi = n;
    }
    double next = e.v[0] > 0.0 ? n - f / e.v[0] : 0.5 * (lo + hi);
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);  // bisect
    if (std::fabs(next - n) <= 4.0 * std::numeric_limits<double>::epsilon() * n) return next;
    n = next;
  }
  return n;
}

}  // namespace loopwright
