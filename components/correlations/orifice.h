// Sharp-edged orifice and oil-jet restrictor, with a low-Reynolds correction.
//
// Purpose. A sharp-edged hole of bore d (a restrictor plate in a feed line,
// the jet nozzle that sprays a bearing or gear mesh) passes
//   Q = Cd A0 / sqrt(1 - beta^4) * sqrt(2 dp / rho),   A0 = pi d^2 / 4,
// i.e. dp = rho Q|Q| (1 - beta^4) / (2 Cd^2 A0^2), beta = d/D [3]. At high
// Reynolds number Cd tends to a constant Cd_inf (0.61 by default); at low
// Reynolds number the flow becomes viscous and Cd falls as delta sqrt(Re)
// [1, 2]. The combined form
//   1/Cd^2 = 1/Cd_inf^2 + 1/(delta^2 Re_d),   Re_d = 4 rho |Q| / (pi d mu),
// joins both limits (Re_d on the mean bore velocity Q/A0) and makes dp
// explicit in Q, with a term linear and a term quadratic in Q:
//   dp = (1 - beta^4) [ rho Q|Q| / (2 Cd_inf^2 A0^2) + 2 mu Q / (pi delta^2 d^3) ].
// (Derivation: rho Q|Q| / (2 A0^2 delta^2 Re_d) = 2 mu Q / (pi delta^2 d^3).)
// The linear term gives a finite, positive slope at Q = 0, so dp(Q) is odd,
// strictly increasing and C1 through zero flow with the exact Q|Q| (C2 with
// a positive q_eps in SignedSquare).
//
// The viscous limit, delta. Sampson's exact creeping-flow solution for a
// circular hole of radius a in an infinitely thin plate [5] is
// dp = 3 mu Q / a^3 = 24 mu Q / d^3, i.e. Cd = delta sqrt(Re_d) with
// delta = (12 pi)^(-1/2) = 0.1629: the default here. A plate of finite
// thickness l resists more (approximately Sampson plus Poiseuille flow in
// the bore, Dagan, Weinbaum & Pfeffer [6]), so a smaller delta fits a thick
// plate. The value delta = 0.2 quoted for sharp orifices [1, 2] (from memory)
// would pass 1.51 x Sampson's flow in the creeping limit, more than any plate
// can; it is not used as the default. Checked against Sampson's closed form
// in tests/components/fittings_valve_fluids_test.py.
//
// Which dp. The formula gives the differential pressure across the plate
// (as between corner taps). For a jet discharging into a cavity (bearing
// housing) the whole of it is lost. For a plate inside a pipe part of it is
// recovered downstream; OrificePressureLossRatio gives the permanent loss
// fraction of ISO 5167-2 [3] (5.4; equation number from memory):
//   dw/dp = (sqrt(1 - beta^4 (1 - C^2)) - C beta^2) /
//           (sqrt(1 - beta^4 (1 - C^2)) + C beta^2),
// and OrificePermanentDp applies it to the inertial term (the viscous term
// is lost in full): what an in-line plate costs the network.
//
// Sign convention. dp = p(upstream) - p(downstream) > 0 for Q > 0; odd in Q.
//
// Inputs (SI). Q [m3/s], rho [kg/m3], mu [Pa.s], d bore [m], D pipe inside
// diameter [m] (<= 0: discharge from a large volume, beta = 0), Cd_inf [-],
// delta [-]. Output dp [Pa].
//
// Default Cd_inf = 0.61: the classical value for a sharp-edged orifice at
// high Re and small beta (common practice; [2] from memory). The ISO 5167-2
// Reader-Harris/Gallagher equation [3] gives, at beta -> 0 and Re_D -> inf,
// C = 0.5961 for D >= 71.12 mm and up to about 0.62 for small pipes through
// its small-diameter term (extrapolated below its D = 50 mm limit); use
// ReaderHarrisGallagherC to compute C for a plate that meets ISO 5167-2.
//
// Validity. Sharp, thin plate (bore length well below d; a long orifice,
// l/d above about 1, behaves as a short tube and needs its own law). The
// low-Re blend is a curve fit between two asymptotes, exact in both limits;
// in the transition (Re_d ~ 10..1000) its accuracy is that of the sources'
// plotted data, not stated here. Finite for every Q, with d > 0, beta < 1.
//
// Reader-Harris/Gallagher (1998) equation, ISO 5167-2:2003 Eq. (4) [3]:
//   C = 0.5961 + 0.0261 beta^2 - 0.216 beta^8 + 0.000521 (1e6 beta/Re_D)^0.7
//       + (0.0188 + 0.0063 A) beta^3.5 (1e6/Re_D)^0.3
//       + (0.043 + 0.080 e^(-10 L1) - 0.123 e^(-7 L1)) (1 - 0.11 A) beta^4/(1 - beta^4)
//       - 0.031 (M2' - 0.8 M2'^1.1) beta^1.3,
//   A = (19000 beta / Re_D)^0.8,  M2' = 2 L2' / (1 - beta),
//   plus 0.011 (0.75 - beta)(2.8 - D/25.4 mm) when D < 71.12 mm;
//   taps: corner L1 = L2' = 0; D and D/2 L1 = 1, L2' = 0.47;
//   flange L1 = L2' = 25.4 mm / D.
// Its validity [3]: d >= 12.5 mm, 50 mm <= D <= 1000 mm, 0.1 <= beta <= 0.75,
// Re_D >= 5000 (and >= 16000 beta^2 for beta > 0.56; flange taps
// Re_D >= 170000 beta^2 D[m]). Outside, the equation is evaluated as it
// stands (finite for Re_D > 0, beta < 1). (python3-fluids adds two low-Re
// extensions from [4] that only act below Re_D ~ 3700, outside this range.)
//
// References
// [1] W. Wuest, "Stroemung durch Schlitz- und Lochblenden bei kleinen
//     Reynolds-Zahlen", Ingenieur-Archiv 22:357-367, 1954 (laminar orifice
//     Cd = delta sqrt(Re); from memory).
// [2] H. E. Merritt, "Hydraulic Control Systems", Wiley, 1967, ch. 3
//     (orifice flow; Cd vs sqrt(Re) with delta = 0.2 for sharp orifices and
//     Cd_inf = 0.61; section and values from memory).
// [3] ISO 5167-2:2003, Measurement of fluid flow by means of pressure
//     differential devices inserted in circular cross-section conduits running
//     full - Part 2: Orifice plates; 5.3.2.1 Eq. (4) (discharge coefficient),
//     5.4 (pressure loss).
// [4] M. Reader-Harris, "Orifice Plates and Venturi Tubes", Springer, 2015.
// [5] R. A. Sampson, "On Stokes's current function", Phil. Trans. R. Soc.
//     Lond. A 182:449-518, 1891 (flow through a circular aperture in a thin
//     plate, Q = a^3 dp / (3 mu)); also J. Happel, H. Brenner, "Low Reynolds
//     Number Hydrodynamics", 1965, §4-26 (from memory).
// [6] Z. Dagan, S. Weinbaum, R. Pfeffer, "An infinite-series solution for
//     the creeping motion through an orifice of finite length", J. Fluid
//     Mech. 115:505-523, 1982 (from memory).
#pragma once

#include <cmath>

#include "components/correlations/smooth.h"

namespace loopwright {

inline constexpr double kOrificePi = 3.14159265358979323846;
inline constexpr double kOrificeDefaultCdInf = 0.61;  // common practice; [2]
// (12 pi)^(-1/2): Sampson's creeping flow through a circular hole in a thin
// plate [5] (see the header).
inline constexpr double kOrificeDefaultDelta = 0.16286750396763996;

// Bore Reynolds number Re_d = 4 rho |Q| / (pi d mu).
template <class T>
inline T OrificeReynolds(const T& q, const T& rho, const T& mu, double bore_m) {
  const T q_abs = ScalarPart(q) < 0.0 ? T(-q) : q;
  return 4.0 * rho * q_abs / (kOrificePi * bore_m * mu);
}

// Effective Cd = (1/Cd_inf^2 + 1/(delta^2 Re_d))^(-1/2); 0 at Re_d = 0.
template <class T>
inline T OrificeDischargeCoefficient(const T& re_d, double cd_inf = kOrificeDefaultCdInf,
                                     double delta = kOrificeDefaultDelta) {
  using std::sqrt;
  if (ScalarPart(re_d) <= 0.0) return T(0.0);
  return 1.0 / sqrt(1.0 / (cd_inf * cd_inf) + 1.0 / (delta * delta * re_d));
}

// (1 - beta^4) [ k_inertial rho Q|Q| / (2 Cd_inf^2 A0^2) + 2 mu Q / (pi delta^2 d^3) ]:
// the drop across the plate with k_inertial = 1, the permanent loss with the
// ISO 5167-2 ratio (OrificePermanentDp).
template <class T>
inline T OrificeLossTerms(const T& q, const T& rho, const T& mu, double bore_m, double beta, double cd_inf,
                          double delta, double q_eps, double k_inertial) {
  const double b2 = beta * beta;
  const double approach = 1.0 - b2 * b2;  // 1 - beta^4
  const double a0 = 0.25 * kOrificePi * bore_m * bore_m;
  const T inertial = rho * SignedSquare(q, q_eps) / (2.0 * cd_inf * cd_inf * a0 * a0);
  const T viscous = 2.0 * mu * q / (kOrificePi * delta * delta * bore_m * bore_m * bore_m);
  return approach * (k_inertial * inertial + viscous);
}

// dp(Q) [Pa] of a sharp-edged orifice or jet (see header).
template <class T>
inline T OrificeDp(const T& q, const T& rho, const T& mu, double bore_m, double pipe_diameter_m,
                   double cd_inf = kOrificeDefaultCdInf, double delta = kOrificeDefaultDelta,
                   double q_eps = 0.0) {
  const double beta = pipe_diameter_m > 0.0 ? bore_m / pipe_diameter_m : 0.0;
  return OrificeLossTerms(q, rho, mu, bore_m, beta, cd_inf, delta, q_eps, 1.0);
}

// Permanent pressure loss / differential pressure for a plate in a pipe,
// ISO 5167-2 5.4 [3]. beta = d/D, c = discharge coefficient.
template <class T>
inline T OrificePressureLossRatio(double beta, const T& c) {
  using std::sqrt;
  const double b2 = beta * beta;
  const T root = sqrt(1.0 - b2 * b2 * (1.0 - c * c));
  return (root - c * b2) / (root + c * b2);
}

// Permanent (unrecovered) pressure loss [Pa] of a plate in a pipe of bore D
// at flow Q: the inertial part of OrificeDp times the ISO 5167-2 5.4 ratio
// at C = Cd_inf [3], plus the whole viscous part,
//   dw = (1 - beta^4) [ ratio(beta, Cd_inf) rho Q|Q| / (2 Cd_inf^2 A0^2)
//                       + 2 mu Q / (pi delta^2 d^3) ].
// Why the split: downstream of the vena contracta the jet's kinetic energy
// is partly regained as pressure, which the ISO ratio describes for the
// turbulent flows it was measured in; in creeping (Stokes) flow the pressure
// field does no such recovery and the whole drop is lost [5]. So the law
// stays exact in both limits, as OrificeDp does. pipe_diameter_m <= 0 (a jet
// into a large cavity) gives the full OrificeDp.
template <class T>
inline T OrificePermanentDp(const T& q, const T& rho, const T& mu, double bore_m, double pipe_diameter_m,
                            double cd_inf = kOrificeDefaultCdInf, double delta = kOrificeDefaultDelta,
                            double q_eps = 0.0) {
  const double beta = pipe_diameter_m > 0.0 ? bore_m / pipe_diameter_m : 0.0;
  return OrificeLossTerms(q, rho, mu, bore_m, beta, cd_inf, delta, q_eps, OrificePressureLossRatio(beta, cd_inf));
}

enum class OrificeTaps { kCorner, kFlange, kDAndDOver2 };

// Reader-Harris/Gallagher discharge coefficient, ISO 5167-2:2003 Eq. (4) [3].
// re_pipe = rho V D / mu on the pipe velocity (> 0), D and d in m.
template <class T>
inline T ReaderHarrisGallagherC(const T& re_pipe, double pipe_diameter_m, double bore_m,
                                OrificeTaps taps) {
  using std::pow;
  const double beta = bore_m / pipe_diameter_m;
  double l1 = 0.0, l2p = 0.0;  // corner taps
  if (taps == OrificeTaps::kFlange) {
    l1 = l2p = 0.0254 / pipe_diameter_m;  // 25.4 mm / D  [3]
  } else if (taps == OrificeTaps::kDAndDOver2) {
    l1 = 1.0;    // [3]
    l2p = 0.47;  // [3]
  }
  const double b2 = beta * beta, b4 = b2 * b2, b8 = b4 * b4;
  const T a = pow(19000.0 * beta / re_pipe, 0.8);
  const double m2p = 2.0 * l2p / (1.0 - beta);
  T c = 0.5961 + 0.0261 * b2 - 0.216 * b8 + 0.000521 * pow(1e6 * beta / re_pipe, 0.7) +
        (0.0188 + 0.0063 * a) * std::pow(beta, 3.5) * pow(1e6 / re_pipe, 0.3) +
        (0.043 + 0.080 * std::exp(-10.0 * l1) - 0.123 * std::exp(-7.0 * l1)) * (1.0 - 0.11 * a) *
            b4 / (1.0 - b4) -
        0.031 * (m2p - 0.8 * std::pow(m2p, 1.1)) * std::pow(beta, 1.3);
  if (pipe_diameter_m < 0.07112) {
    c += 0.011 * (0.75 - beta) * (2.8 - pipe_diameter_m / 0.0254);  // [3] small-pipe term
  }
  return c;
}

}  // namespace loopwright
