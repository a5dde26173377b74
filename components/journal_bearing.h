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
// eccentricity eps [-] in [0, 0.95] (default 0.5; from a load calculation or
// Raimondi & Boyd's charts [3] for the running condition), flow_min and
// flow_max [m3/s] (optional limits for the envelope checks), speed [rad/s]
// and load [N] (for the friction heat of the thermal model).
//
// Validity: laminar film (Reynolds number on clearance below ~1000), full
// 360-degree groove, no cavitation in the feed region; eps <= 0.95 enforced
// on input.
//
// References
// [1] R. G. Budynas, J. K. Nisbett, "Shigley's Mechanical Engineering
//     Design", 9th ed., McGraw-Hill, 2011, §12-9, Eq. (12-22) "pressure-fed
//     bearings" (equation number from memory).
// [2] A. Cameron, "Basic Lubrication Theory", 3rd ed., Ellis Horwood, 1981,
//     ch. 10 (side flow of pressure-fed bearings).
// [3] A. A. Raimondi, J. Boyd, "A solution for the finite journal bearing and
//     its application to analysis and design", ASLE Trans. 1(1):159-209, 1958.
#pragma once

#include "components/component.h"
#include "components/correlations/bearing_friction.h"
#include "components/registry.h"

namespace loopwright {

class JournalBearing : public ComponentWithLaw<JournalBearing> {
 public:
  enum Param { kDiameter, kLength, kGroove, kClearance, kEccentricity, kFlowMin, kFlowMax, kSpeed, kLoad, kHeatSoak, kNumParams };
  explicit JournalBearing(const ParamValues& v) { params_ = v.values; }
  ResidualKind Kind(int) const override { return ResidualKind::kVolumeFlow; }

  // Q / (p_s / mu) [m3]: the flow coefficient of the lands.
  double FlowCoefficient() const {
    const double r = 0.5 * params_[kDiameter], c = params_[kClearance], e = params_[kEccentricity];
    const double land = 0.5 * (params_[kLength] - params_[kGroove]);
    return M_PI * r * c * c * c * (1.0 + 1.5 * e * e) / (3.0 * land);
  }

  template <class T>
  void Law(const T& dp, const T& m, const T& rho, const T& mu, const T* x, T* r) const {
    (void)x;
    r[0] = m / rho - FlowCoefficient() * dp / mu;
  }

  LinearGuess Linearize(double rho, double mu) const override {
    LinearGuess g;
    g.g = rho * FlowCoefficient() / mu;
    return g;
  }
  void Describe(const BranchResult& b, ComponentReport* out) const override;

  // Friction heat (thermal solve): the Couette shear of the eccentric film,
  // Petroff / sqrt(1 - eps^2), over the two lands, with mu at the feed
  // temperature (the oil is heated as it passes: using the feed viscosity
  // over-predicts the heat, the conservative side for cooler sizing); plus,
  // when the load is given, the pressure-flow torque W e sin(phi)/2 with the
  // short-bearing attitude angle tan(phi) = pi sqrt(1 - eps^2) / (4 eps)
  // (Ocvirk 1952, from memory); plus the heat soak from the housing.
  // See components/correlations/bearing_friction.h.
  template <class T>
  T FrictionPower(const T& mu) const {
    const double speed = std::isnan(params_[kSpeed]) ? 0.0 : params_[kSpeed];
    const double r = 0.5 * params_[kDiameter], c = params_[kClearance], e = params_[kEccentricity];
    const double lands = params_[kLength] - params_[kGroove];
    T p = ShortBearingFrictionPower(mu, r, lands, c, speed, e);
    if (!std::isnan(params_[kLoad]) && e > 0) {
      const double phi = std::atan2(M_PI * std::sqrt(1 - e * e), 4 * e);
      p += JournalLoadFrictionPower(T(params_[kLoad]), c, e, phi, speed);
    }
    return p;
  }
  HeatJet HeatAdded(const HeatInputs& in) const override {
    const double soak = std::isnan(params_[kHeatSoak]) ? 0.0 : params_[kHeatSoak];
    return FrictionPower(in.mu) + soak;
  }
};

ComponentType JournalBearingType();

}  // namespace loopwright
