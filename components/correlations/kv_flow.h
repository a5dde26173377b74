// Flow through a valve opening of flow coefficient Kv (IEC 60534-2-1).
//
// Equation (turbulent, non-choked liquid flow, IEC 60534-2-1:2011 Eq. 1 [1]):
//   Q = Kv / 3600 · s(Δp) · sqrt(ρ0 / (1e5 · ρ))      [m3/s]
//   Kv in m3/h at 1 bar, Δp in Pa, ρ in kg/m3, ρ0 = 1000 kg/m3,
//   s(Δp) = SignedSqrt(Δp, eps): the signed square root made smooth over
//   |Δp| < eps (correlations/smooth.h), so the law is odd and C∞ through zero.
// Sign: Q > 0 from the higher to the lower pressure (Δp = p_from − p_to > 0).
// Validity: turbulent liquid flow; the viscous correction F_R of the same
// standard is not in this form (each valve warns where its port runs viscous).
//
// [1] IEC 60534-2-1:2011, Industrial-process control valves — Flow capacity —
//     Sizing equations for fluid flow under installed conditions, Eq. (1).
#pragma once

#include <cmath>

#include "components/correlations/smooth.h"

namespace loopwright {

template <class T, class K>
T KvFlow(const K& kv, const T& dp, const T& rho, double eps_pa) {
  using std::sqrt;
  return kv / 3600.0 * SignedSqrt(dp, eps_pa) * sqrt(1000.0 / (1e5 * rho));
}

}  // namespace loopwright
