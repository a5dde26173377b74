// Film relations of a floating ring bearing: the ring's speed from the torque
// balance of its two films, the pressure-driven side flow of a fed film, the
// laminar flow of the ring's feed holes, and the film temperatures of a
// lumped heat balance with conduction through the ring.
//
// Purpose. A floating ring (floating bushing) bearing puts a free ring between
// the shaft and the housing: an inner film between shaft and ring bore and an
// outer film between ring and housing. The ring turns at the speed at which
// the inner film's drag torque equals the outer film's [1, 2]. These are the
// pieces components/floating_ring_bearing.h assembles; each is a pure
// function in SI, templated on the scalar so that ceres::Jet carries exact
// derivatives where a caller needs them.
//
// Equations.
// (1) Couette torque of a full film, eccentric [3, 4] (Petroff's torque,
//     bearing_friction.h, over sqrt(1 - eps^2)):
//       T = 2 pi mu omega_rel r^3 L / (c sqrt(1 - eps^2))        [N m]
//     omega_rel the speed of one surface relative to the other.
// (2) Ring speed ratio s = Omega_R / Omega_J [1] (from memory): the inner film
//     drives the ring at the relative speed Omega_J - Omega_R, the outer film
//     brakes it at Omega_R; T_inner = T_outer gives
//       s = 1 / (1 + (mu_o / mu_i) (R_o / R_i)^3 (L_o / L_i) (c_i / c_o)
//                   sqrt(1 - eps_i^2) / sqrt(1 - eps_o^2)).
//     With equal viscosities and concentric films this is Shaw and
//     Nussdorfer's ratio [1]; the eccentricity factors follow from (1).
//     Hence 0 < s < 1 for any positive geometry.
// (3) Energy of the films: the shaft's power T omega_J is dissipated as
//       P_inner = T (Omega_J - Omega_R),   P_outer = T Omega_R,
//     whose sum is T Omega_J exactly (the ring turns freely: no work leaves
//     through it). A test checks this closure.
// (4) Side flow of a film fed at the middle of its length (a circumferential
//     groove or a row of holes), through both lands [5, 6]:
//       Q = pi p r c^3 (1 + 1.5 eps^2) / (3 mu l')   l' = (L - w) / 2
//     the relation of journal_bearing.h (Shigley Eq. 12-22), here as a
//     coefficient K = Q mu / p [m3].
// (5) Laminar flow of n round holes of bore d and length t (Hagen-Poiseuille):
//       Q = n pi d^4 dp / (128 mu t)   coefficient G = Q mu / dp [m3].
// (6) Film temperatures (lumped heat balance, this project's simplest
//     consistent form, after the thermal models of floating ring bearings
//     in [2], from memory): each film's oil leaves hotter by 2 theta_i, theta_i
//     its mean rise above the feed; the ring conducts between the films, each
//     film coupled to the ring by conduction across its gap; shaft and housing
//     adiabatic (the hotter, conservative side). A film of thickness c heated
//     uniformly (q3 = P / (A c) per unit volume) against one wall at T_w, the
//     other wall adiabatic, has T - T_w = q3 (c y - y^2/2) / k, whose mean over
//     the gap is q3 c^2 / (3 k) = P c / (3 k A): the conductance G = 3 k A / c
//     (A the film's wetted area 2 pi r L). With a_i = 2 m_i cp and
//     Gs = G_i G_o / (G_i + G_o):
//       (a_i + Gs) theta_i - Gs theta_o = P_i
//       -Gs theta_i + (a_o + Gs) theta_o = P_o
//     so a_i theta_i + a_o theta_o = P_i + P_o: the films' oil carries all the
//     friction heat, whatever the split.
//
// Sign convention. Speeds and torques >= 0 for a shaft turning either way
// (|omega|); flows and coefficients >= 0.
//
// Inputs (SI): mu [Pa s], radii r [m], wetted lengths L [m], radial
// clearances c [m], eccentricity ratios eps in [0, 1), speeds [rad/s],
// pressures [Pa], hole bore d and length t [m], conductivity k [W/(m K)],
// mass flows [kg/s], cp [J/(kg K)], powers [W].
//
// Validity. Laminar Couette films below the Taylor number 41.3
// (bearing_friction.h); Newtonian oil; (2) neglects the ring's own windage
// and the pressure-flow part of each film's torque (small below eps ~ 0.6,
// bearing_friction.h quotes 7 % of the friction at eps = 0.6); (4) is the
// short-land pressure flow without the rotation-driven flow; (5) needs a hole
// Reynolds number below ~2000 and neglects the entry loss; (6) lumps each
// film at one temperature. Outside: eps >= 1 gives s = NaN / infinite
// torque (callers refuse such eps on input).
//
// References
// [1] C. Shaw, T. J. Nussdorfer, "An analysis of the full-floating journal
//     bearing", NACA Report 866, 1947 (the ring-speed relation; from memory).
// [2] L. San Andres, J. Kerth, "Thermal effects on the performance of
//     floating ring bearings for turbochargers", Proc. IMechE Part J,
//     218:437-450, 2004 (ring speed falls with the inner film's heating;
//     lumped film energy balances; from memory).
// [3] N. P. Petroff, 1883 (see bearing_friction.h [1]).
// [4] B. J. Hamrock, S. R. Schmid, B. O. Jacobson, "Fundamentals of Fluid
//     Film Lubrication", 2nd ed., 2004, ch. 10 (eccentric Couette friction;
//     from memory).
// [5] R. G. Budynas, J. K. Nisbett, "Shigley's Mechanical Engineering
//     Design", 9th ed., 2011, Eq. (12-22) (from memory).
// [6] A. Cameron, "Basic Lubrication Theory", 3rd ed., 1981, ch. 10.
#pragma once

#include <cmath>

#include "components/correlations/bearing_friction.h"
#include "components/correlations/journal_film.h"

namespace loopwright {

// (1) Couette torque of an eccentric full film [N m]; omega_rel >= 0.
template <class T>
inline T FilmCouetteTorque(const T& mu, double radius, double length, double clearance, double omega_rel,
                           double eccentricity) {
  return PetroffFrictionTorque(mu, radius, length, clearance, omega_rel) / std::sqrt(1.0 - eccentricity * eccentricity);
}

// The geometry of one film: radius of the turning surface it wraps [m],
// wetted length (lands only) [m], radial clearance [m], eccentricity [-].
struct FilmGeometry {
  double radius = 0, length = 0, clearance = 0, eccentricity = 0;
};

// (2) Ring speed ratio s = Omega_R / Omega_J for film viscosities mu_i, mu_o.
template <class T>
inline T RingSpeedRatio(const T& mu_inner, const T& mu_outer, const FilmGeometry& in, const FilmGeometry& out) {
  const double k = std::pow(out.radius / in.radius, 3) * (out.length / in.length) * (in.clearance / out.clearance) *
                   std::sqrt(1.0 - in.eccentricity * in.eccentricity) /
                   std::sqrt(1.0 - out.eccentricity * out.eccentricity);
  return T(1.0) / (T(1.0) + k * mu_outer / mu_inner);
}

// (4) Side-flow coefficient of a fed film: FedFilmFlowCoefficient (journal_film.h).

// (5) Laminar flow coefficient of n round holes: Q mu / dp [m3].
inline double HoleFlowCoefficient(int count, double bore, double length) {
  const double d2 = bore * bore;
  return count * kBearingPi * d2 * d2 / (128.0 * length);
}

// Conductance between a uniformly heated film's mean and its one cooled
// wall, 3 k A / c [W/K], A = 2 pi r L (see (6)); k in W/(m K).
inline double FilmConductance(double conductivity, const FilmGeometry& f) {
  return 3.0 * conductivity * 2.0 * kBearingPi * f.radius * f.length / f.clearance;
}

// (6) Mean temperature rises of the two films above the feed [K].
// a_i = 2 m_i cp [W/K] (each film's capacity rate, doubled: mean = half the
// outlet rise), g_inner, g_outer the films' conductances to the ring [W/K].
template <class T>
inline void FilmTemperatureRises(const T& p_inner, const T& p_outer, const T& a_inner, const T& a_outer,
                                 const T& g_inner, const T& g_outer, T* theta_inner, T* theta_outer) {
  const T gs = g_inner * g_outer / (g_inner + g_outer);
  const T det = a_inner * a_outer + gs * (a_inner + a_outer);
  *theta_inner = (p_inner * (a_outer + gs) + gs * p_outer) / det;
  *theta_outer = (p_outer * (a_inner + gs) + gs * p_inner) / det;
}

}  // namespace loopwright
