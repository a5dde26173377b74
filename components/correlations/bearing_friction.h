// Viscous friction power of a plain journal bearing (Petroff; eccentric film).
//
// Purpose. The heat a hydrodynamic journal bearing puts into its oil: the
// work of shearing the film between the turning journal and the stationary
// sleeve. The thermal solve adds it to the oil passing through the bearing.
//
// Equations. Petroff [1, 2]: a concentric journal of radius r, wetted length
// L and radial clearance c turning at omega shears a film of uniform
// thickness c at velocity U = omega r, so
//   shear stress   tau = mu U / c = mu omega r / c
//   shear force    F   = tau 2 pi r L
//   torque         T_f = F r = 2 pi mu omega r^3 L / c
//   power          P_f = T_f omega = 2 pi mu omega^2 r^3 L / c.
// Shigley's form [2] Eq. (12-6) (number from memory): f = 2 pi^2 (mu N / P)
// (r / c) with N = omega / (2 pi) [rev/s], P = W / (2 r L) and T_f = f W r;
// substituting, T_f = 2 pi^2 mu N r / (P c) 2 r L P r = 4 pi^2 mu N r^3 L / c
// = 2 pi mu omega r^3 L / c, the same torque (the load W cancels).
//
// Eccentric film. With the journal displaced by e = eps c the film is
// h = c (1 + eps cos theta). The Couette (velocity-driven) shear mu U / h
// integrated round a full 2 pi film gives
//   integral_0^{2 pi} d theta / (1 + eps cos theta) = 2 pi / sqrt(1 - eps^2),
// hence ShortBearingFrictionPower = P_f / sqrt(1 - eps^2). This is the
// friction of short-bearing (Ocvirk) theory [3, 4] with the shear taken round
// the full circumference; the integral is exact for any L/D. The
// pressure-driven part of the journal's shear adds a torque W e sin(phi) / 2
// (W load, phi attitude angle; the sleeve sees the same term with the
// opposite sign) [4, 5]; JournalLoadFrictionPower gives omega W e sin(phi)/2
// so that a caller who knows phi (Raimondi & Boyd's tables [6], short-bearing
// theory) can add it: the work done on the oil is the journal's torque times
// omega. Against Raimondi & Boyd's l/d = 1 table [6] (values from memory) the
// load term is 0.2 % of the total at eps = 0.1, 7 % at 0.6, 14 % at 0.8 and
// 19 % at 0.9; Couette plus load term reproduces the tabulated friction
// variable (r/c) f within 1.3 % at eps = 0.1 .. 0.97 (0.22 % except at
// eps = 0.4; bearing_friction_test).
//
// Sign convention. Powers are >= 0 for either sense of rotation (omega^2,
// |omega|); the torque PetroffFrictionTorque has the sign of omega (it opposes
// the journal's rotation).
//
// Inputs (SI). mu dynamic viscosity of the film [Pa s] (at the film
// temperature: the caller's choice, e.g. the mean of feed and drain), radius r
// [m] (journal), length L [m] (wetted length: for a bearing with a
// circumferential groove, the sum of the land lengths — common practice, the
// deep groove adds little shear), clearance c [m] (radial), omega [rad/s],
// eccentricity eps = e / c [-] in [0, 1), load W [N], attitude phi [rad],
// density rho [kg/m3]. Outputs power [W], torque [N m].
//
// Validity. Newtonian, isoviscous, laminar full film [1, 2, 4]; Petroff for a
// lightly loaded (near-concentric, high Sommerfeld number) bearing;
// eps < ~0.9 for the eccentric form (beyond, the film is thin enough for
// surface roughness, elastic and thermal effects to matter [4]). Laminar
// Couette flow holds below the onset of Taylor vortices [7]:
//   Ta = (rho omega r c / mu) sqrt(c / r) < 41.3 = kTaylorCritical
// (narrow gap, inner cylinder turning; 41.3 = sqrt(1708) from Taylor's
// stability result as usually quoted in lubrication texts [4], from memory);
// above it the friction is larger than given here (turbulent film). Outside:
// |eps| >= 1 (metal contact) returns +infinity; the functions are even in eps
// and never divide by zero otherwise (c > 0, r > 0 required).
//
// References
// [1] N. P. Petroff, "Friction in machines and the effect of the lubricant"
//     (in Russian), Inzhenerno-Stroitel'nyi Zhurnal, St. Petersburg, 1883
//     (citation from memory).
// [2] R. G. Budynas, J. K. Nisbett, "Shigley's Mechanical Engineering
//     Design", 9th ed., McGraw-Hill, 2011, §12-4 "Petroff's Equation",
//     Eq. (12-6) (equation number from memory).
// [3] F. W. Ocvirk, "Short-bearing approximation for full journal bearings",
//     NACA TN 2808, 1952 (from memory).
// [4] B. J. Hamrock, S. R. Schmid, B. O. Jacobson, "Fundamentals of Fluid
//     Film Lubrication", 2nd ed., Marcel Dekker, 2004, ch. 10 (journal
//     bearings, short-width theory, friction; chapter and equation numbers
//     from memory, not checked).
// [5] A. Cameron, "Basic Lubrication Theory", 3rd ed., Ellis Horwood, 1981
//     (journal and sleeve friction differ by W e sin(phi); from memory).
// [6] A. A. Raimondi, J. Boyd, "A solution for the finite journal bearing and
//     its application to analysis and design", ASLE Trans. 1(1):159-209,
//     1958 (table for the full journal bearing, l/d = 1).
// [7] G. I. Taylor, "Stability of a viscous liquid contained between two
//     rotating cylinders", Phil. Trans. R. Soc. Lond. A 223:289-343, 1923.
#pragma once

#include <cmath>
#include <limits>

namespace loopwright {

inline constexpr double kBearingPi = 3.14159265358979323846;
// Critical Taylor number in the form Re sqrt(c/r) [4, 7] (from memory).
inline constexpr double kTaylorCritical = 41.3;

// Petroff friction torque T_f = 2 pi mu omega r^3 L / c [N m] [1, 2].
template <class T>
inline T PetroffFrictionTorque(const T& mu, double radius_m, double length_m, double clearance_m,
                               double omega_rad_s) {
  const double r3 = radius_m * radius_m * radius_m;
  return (2.0 * kBearingPi * omega_rad_s * r3 * length_m / clearance_m) * mu;
}

// Petroff friction power P_f = 2 pi mu omega^2 r^3 L / c [W] [1, 2].
template <class T>
inline T PetroffFrictionPower(const T& mu, double radius_m, double length_m, double clearance_m,
                              double omega_rad_s) {
  return PetroffFrictionTorque(mu, radius_m, length_m, clearance_m, omega_rad_s) * omega_rad_s;
}

// Couette friction power of an eccentric full film: P_f / sqrt(1 - eps^2) [W]
// [3, 4]. +infinity for |eps| >= 1.
template <class T>
inline T ShortBearingFrictionPower(const T& mu, double radius, double length, double clearance,
                                   double omega, double eccentricity) {
  const double one_minus_e2 = 1.0 - eccentricity * eccentricity;
  if (!(one_minus_e2 > 0.0)) return T(std::numeric_limits<double>::infinity());
  return PetroffFrictionPower(mu, radius, length, clearance, omega) / std::sqrt(one_minus_e2);
}

// Power of the pressure-flow part of the journal's friction torque,
// |omega| W e sin(phi) / 2 with e = eps c [W] [4, 5]. Add it to
// ShortBearingFrictionPower when the attitude angle phi is known.
template <class T>
inline T JournalLoadFrictionPower(const T& load_n, double clearance, double eccentricity,
                                  double attitude_rad, double omega) {
  return (0.5 * std::fabs(omega) * clearance * eccentricity * std::sin(attitude_rad)) * load_n;
}

// Taylor number of the film, Ta = (rho |omega| r c / mu) sqrt(c / r) [-] [7];
// laminar Couette flow for Ta < kTaylorCritical.
template <class T>
inline T TaylorNumber(const T& rho, const T& mu, double radius, double clearance, double omega) {
  return (std::fabs(omega) * radius * clearance * std::sqrt(clearance / radius)) * rho / mu;
}

}  // namespace loopwright
