// journal_bearing — pressure-fed plain journal bearing with a circumferential
// feed groove: the oil flow its clearance passes out of the lands.
//
// Purpose. How much oil a pressure-fed journal bearing takes for the feed
// pressure above its drain cavity: the pressure-driven side flow out of the
// two lands either side of a central circumferential groove, which grows with
// the cube of the radial clearance and with eccentricity, and falls with
// viscosity [1, 2].
//
// Equation (residual in m3/s):
//   r = Q - pi p_s r_j c^3 (1 + 1.5 eps^2) / (3 mu l')          [1] Eq. 12-22
//   p_s = dp (feed pressure above the drain cavity node `to`) [Pa]
//   r_j = D/2 journal radius [m], c radial clearance [m],
//   l' = (L - w)/2 length of one land [m], eps eccentricity ratio [-]
// (total through both lands; the term 1.5 eps^2 is the mean of the cubic
// film thickness around the circumference: h = c (1 + eps cos theta),
// <h^3> = c^3 (1 + 1.5 eps^2) [2]). The law is linear in p_s, so it is
// smooth and odd through reversal (a housing above feed pressure pushes oil
// back into the feed: the starving condition the checks look for).
//
// Hydrodynamic (rotation-driven) flow is not included: for a fully grooved
// bearing it stays in the groove's circumference; the pressure flow governs
// the feed [1].
//
// Sign convention: from = feed (groove supply), to = drain cavity / housing;
// Q > 0 into the bearing.
//
// Inputs (SI): diameter D [m], length L [m] (overall, both lands), groove
// width w [m] (default 0 — a narrow groove), radial_clearance c [m],
// eccentricity eps [-] in [0, 0.95] (default 0.5 when eccentricity_method is
// `given`), eccentricity_method (`given` | `ocvirk_1952` |
// `raimondi_boyd_1958`, below), flow_min and flow_max [m3/s] (optional
// limits for the envelope checks), speed [rad/s] and load [N] (friction heat;
// both required for eccentricity from load), heat_soak [W].
//
// Eccentricity from load (eccentricity_method `ocvirk_1952` or
// `raimondi_boyd_1958`; `eccentricity` must then be left out). Each land is a
// bearing of length l' = (L - w)/2 carrying W/2 [1] (§12-9, from memory), so
// the unit load is P = W / ((L - w) D) and the ratio l'/D enters the film
// solution. At each point
//   S = (r/c)^2 mu_f N / P,  N = speed / (2 pi)                  [1, 3]
// and eps, attitude angle phi follow from S and l'/D by short-bearing
// (Ocvirk) theory [4] in closed form or by Raimondi & Boyd's tables [3]
// (components/correlations/journal_film.h). Then
//   h0 = c (1 - eps)        minimum film thickness
//   side flow               the law above with this eps
//   friction heat           Couette shear of the eccentric film plus the
//                           pressure-flow term W e sin(phi)/2, with mu_f
//                           (bearing_friction.h; Petroff as W -> 0, where
//                           eps -> 0 and phi -> 90 deg)
// mu_f is the viscosity at the effective film temperature
//   T_f = T_in + 0.5 dT,   dT = (friction heat(mu_f) + heat_soak) / (m cp)
// (inlet plus half the oil's rise through the film: the mean film
// temperature of Shigley's treatment of pressure-fed bearings [1] §12-9,
// Raimondi & Boyd's T_av = T_1 + dT/2, from memory), solved by bisection for
// the bearing's own flow when the thermal solve hands the component its
// stream (FollowStream, once per hydraulic-thermal pass: a point-level
// quantity, held constant within a Newton solve; see DEVELOPERS.md). At an
// isothermal point the film is at the stream's temperature (mu_f = mu). The
// hottest film is taken as T_in + dT (the land exit) [1].
// Reported (from load): sommerfeld_number, eccentricity, attitude_angle_deg,
// min_film_thickness h0, film_thickness_trumpler (Trumpler's least h0,
// 0.0002 in + 0.00004 d [1] ch. 12, from memory), unit_load, and at thermal
// points film_temperature (T_f) and film_temperature_max.
//
// Validity: laminar film (Reynolds number on clearance below ~1000), full
// 360-degree groove, no cavitation in the feed region; a given eps <= 0.95
// enforced on input. From load: eps <= 0.99; S beyond the last tabulated
// row, l'/D outside the tables (1/4 .. 1) or above 1 for short-bearing
// theory, and eps > 0.9 (film thin enough for roughness, elastic and thermal
// effects) are warnings in the results.
//
// References
// [1] R. G. Budynas, J. K. Nisbett, "Shigley's Mechanical Engineering
//     Design", 9th ed., McGraw-Hill, 2011, §12-9, Eq. (12-22) "pressure-fed
//     bearings" (equation number from memory); Trumpler's design criteria in
//     ch. 12 (from memory).
// [2] A. Cameron, "Basic Lubrication Theory", 3rd ed., Ellis Horwood, 1981,
//     ch. 10 (side flow of pressure-fed bearings).
// [3] A. A. Raimondi, J. Boyd, "A solution for the finite journal bearing and
//     its application to analysis and design", ASLE Trans. 1(1):159-209, 1958.
// [4] F. W. Ocvirk, "Short-bearing approximation for full journal bearings",
//     NACA TN 2808, 1952 (from memory).
#pragma once

#include <cmath>
#include <limits>

#include "components/component.h"
#include "components/correlations/bearing_friction.h"
#include "components/correlations/journal_film.h"
#include "components/correlations/smooth.h"
#include "components/registry.h"

namespace loopwright {

class JournalBearing : public ComponentWithLaw<JournalBearing> {
 public:
  enum Param { kDiameter, kLength, kGroove, kClearance, kEccentricity, kFlowMin, kFlowMax, kSpeed, kLoad, kHeatSoak,
               kEccentricityMethod, kNumParams };
  // Slots after the type's parameters, written by FollowStream (reset to NaN
  // at every point with the parameters): the film's viscosity over the
  // stream's, and the film temperature [K].
  enum FilmSlot { kFilmViscosityRatio = kNumParams, kFilmTemperature, kNumSlots };
  enum Method { kGiven = 0, kOcvirk = 1, kRaimondiBoyd = 2 };
  // Inlet plus this fraction of the film's rise: the effective film temperature.
  static constexpr double kFilmRiseFraction = 0.5;

  explicit JournalBearing(const ParamValues& v) {
    SetParamsWithSlots(v.values, kNumSlots);
  }
  ResidualKind Kind(int) const override { return ResidualKind::kVolumeFlow; }

  bool FromLoad() const { return params_[kEccentricityMethod] >= 0.5; }
  double Speed() const { return std::isnan(params_[kSpeed]) ? 0.0 : params_[kSpeed]; }
  // The two lands either side of the groove (unit load W / ((L - w) D), l'/D).
  LandFilm Lands() const {
    return {0.5 * params_[kDiameter], params_[kClearance], 0.5 * (params_[kLength] - params_[kGroove])};
  }
  // The film's viscosity over the stream's (1 until FollowStream writes it).
  double FilmRatio() const {
    return std::isnan(params_[kFilmViscosityRatio]) ? 1.0 : params_[kFilmViscosityRatio];
  }
  // Eccentricity and attitude at film viscosity mu_f [Pa s] (from load).
  FilmSolution FilmAt(double mu_film) const;

  // The running eccentricity at stream viscosity mu: the given value, or from
  // load with d eps / d mu carried by a Jet (S is proportional to mu_f).
  template <class T>
  T Eccentricity(const T& mu) const {
    if (!FromLoad()) return T(std::isnan(params_[kEccentricity]) ? 0.5 : params_[kEccentricity]);
    const double mu0 = ScalarPart(mu);
    const FilmSolution f = FilmAt(mu0 * FilmRatio());
    const double slope = f.deps_ds != 0.0 && std::isfinite(f.sommerfeld) ? f.deps_ds * f.sommerfeld / mu0 : 0.0;
    return T(f.eps) + (mu - mu0) * slope;  // no load: S = inf, eps = 0, flat
  }

  // Q / (p_s / mu) [m3]: the flow coefficient of the lands at eccentricity e.
  template <class T>
  T FlowCoefficient(const T& e) const {
    const double land = 0.5 * (params_[kLength] - params_[kGroove]);
    return FedFilmFlowCoefficient(0.5 * params_[kDiameter], params_[kClearance], land, e);
  }

  template <class T>
  void Law(const T& dp, const T& m, const T& rho, const T& mu, const T* x, T* r) const {
    (void)x;
    r[0] = m / rho - FlowCoefficient(Eccentricity(mu)) * dp / mu;
  }

  LinearGuess Linearize(double rho, double mu) const override {
    LinearGuess g;
    g.g = rho * FlowCoefficient(Eccentricity(mu)) / mu;
    return g;
  }
  void Describe(const BranchResult& b, ComponentReport* out) const override;
  void FollowStream(const StreamState& s) override;
  // Only a film whose eccentricity follows from load has a state to follow;
  // with eccentricity given, FollowStream leaves the film slots at NaN, as
  // every point starts them (a header's bearings: no copy, no call).
  bool FollowsStream() const override { return FromLoad(); }

  // Friction heat of the film at viscosity mu, eccentricity e and attitude
  // phi: the Couette shear of the eccentric film, Petroff / sqrt(1 - eps^2),
  // over the two lands, plus, when the load is given, the pressure-flow
  // torque W e sin(phi)/2. See components/correlations/bearing_friction.h.
  template <class T>
  T FrictionAt(const T& mu, double e, double phi) const {
    const double r = 0.5 * params_[kDiameter], c = params_[kClearance];
    const double lands = params_[kLength] - params_[kGroove];
    T p = ShortBearingFrictionPower(mu, r, lands, c, Speed(), e);
    if (!std::isnan(params_[kLoad]) && e > 0) p += JournalLoadFrictionPower(T(params_[kLoad]), c, e, phi, Speed());
    return p;
  }
  // Friction heat (thermal solve) at stream viscosity mu. Given eccentricity:
  // mu at the feed temperature (the oil is heated as it passes: the feed
  // viscosity over-predicts the heat, the conservative side for cooler
  // sizing) and the short-bearing attitude angle (Ocvirk 1952). From load:
  // mu_f = mu times the film ratio, eps and phi from the film solution (the
  // Jet carries d mu / dT at fixed eps).
  template <class T>
  T FrictionPower(const T& mu) const {
    if (!FromLoad()) {
      const double e = std::isnan(params_[kEccentricity]) ? 0.5 : params_[kEccentricity];
      return FrictionAt(mu, e, OcvirkAttitude(e));
    }
    const double ratio = FilmRatio();
    const FilmSolution f = FilmAt(ScalarPart(mu) * ratio);
    return FrictionAt(T(mu * ratio), f.eps, f.attitude_rad);
  }
  HeatJet HeatAdded(const HeatInputs& in) const override {
    const double soak = std::isnan(params_[kHeatSoak]) ? 0.0 : params_[kHeatSoak];
    return FrictionPower(in.mu) + soak;
  }

 private:
  void DescribeFilm(const BranchResult& b, ComponentReport* out) const;
};

ComponentType JournalBearingType();

}  // namespace loopwright
