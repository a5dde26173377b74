// floating_ring_bearing — floating ring (floating bushing) journal bearing of
// a small turbocharger: a free ring between shaft and housing, an outer film
// fed from the housing, holes through the ring feeding the inner film.
//
// Purpose. How much oil the bearing takes for the feed pressure above its
// drain cavity, how fast the ring turns, and how much friction heat its two
// films put into the oil. The ring turns at the speed at which the inner
// film's drive equals the outer film's drag [1, 2]; its films run at their own
// temperatures, the inner one hotter (a thinner, faster-sheared film with a
// smaller share of the oil), which slows the ring [2].
//
// Hydraulic law (residual in m3/s), a network inside the component in closed
// form: the feed reaches the outer film's mid-length (housing groove) at
// p_s = dp; the outer film drains through its two lands; in parallel, n holes
// through the ring wall pass oil to the inner film's mid-length at p_in, and
// the inner film drains through its lands:
//   r = Q - (K_o + K_h K_i / (K_h + K_i)) dp / mu
//   K_o = pi R_o c_o^3 (1 + 1.5 eps_o^2) / (3 l_o)    outer lands      [3] Eq. 12-22
//   K_i = pi R_i c_i^3 (1 + 1.5 eps_i^2) / (3 l_i)    inner lands      [3] Eq. 12-22
//   K_h = n pi d^4 / (128 t)                          ring holes       Hagen-Poiseuille
//   p_in = dp K_h / (K_h + K_i)                       inner film's feed pressure
// R_i = D/2 (shaft), R_o = D_ring/2, l = (L - w)/2 one land, t = (D_ring -
// D - 2 c_i)/2 the ring wall. mu is the network's viscosity of the stream at
// the feed: the films, hotter than the feed, pass more than this (the flow is
// on the low side, conservative for flow_min; flow_max is judged on the low
// side too, said in the README). Linear in dp: smooth and odd through
// reversal, as journal_bearing's law (a housing above the feed pushes oil
// back: the starving condition the checks look for).
//
// Ring speed and friction heat (thermal solve; components/correlations/
// floating_ring.h): s = Omega_R/Omega_J from the torque balance of the two
// Couette films at their own viscosities [1]; P_i = T (Omega_J - Omega_R),
// P_o = T Omega_R, P_i + P_o = T Omega_J; each film's mean temperature from a
// lumped heat balance in which each film's oil carries heat and the ring
// conducts between the films (shaft and housing adiabatic); the film
// viscosities come from the fluid at those temperatures, and the three are
// solved together (2-by-2 Newton on the films' temperature rises, nested
// Illinois brackets where Newton stalls on cold, thick oil). The heat
// added to the stream is P_i + P_o + heat_soak. Isothermal points report the
// isoviscous ratio (both films at the stream's viscosity).
//
// Eccentricity hook. The films' eccentricity ratios are parameters (default
// 0.5 each, as a lightly loaded turbo bearing). FilmEccentricities() is the
// one place that reads them: a relation from the load (the Sommerfeld number
// of each film, the inner film carrying the rotor load at its relative speed,
// the outer film the same load at the ring speed) plugs in there.
//
// Sign convention: from = feed (housing oil gallery), to = drain cavity;
// Q > 0 into the bearing. Speeds may be given either sense (|omega| used).
//
// Inputs (SI): diameter D [m] (shaft), inner_length, inner_clearance (radial),
// inner_groove_width (default 0) [m]; ring_diameter D_ring (outer diameter of
// the ring) [m], outer_length, outer_clearance, outer_groove_width (default 0)
// [m]; hole_count n (whole number), hole_diameter d [m]; inner_eccentricity,
// outer_eccentricity [-] in [0, 0.95] (default 0.5); speed [rad/s] (shaft);
// flow_min, flow_max [m3/s] (checks); heat_soak [W].
//
// Validity and behaviour outside it (each a warning in the results):
// laminar Couette films, Taylor number (relative speed of each film's
// surfaces, R c / nu sqrt(c/R)) below 41.3 (above: friction under-predicted;
// for the co-rotating inner film the relative speed is the conservative,
// more unstable reading); the holes' laminar flow below Re ~ 2000; the
// centrifugal head of the oil turning with the ring in its holes,
// rho Omega_R^2 (R_o^2 - R_i^2)/2, opposes the inner film's feed and is NOT in
// the law: above a quarter of p_in the inner film's flow is over-predicted
// (a warning); the lumped film temperatures are mean values, the inner
// film's peak is hotter; the film temperature solve reports when it does not
// settle. Eccentricities above 0.95 are refused on input.
//
// References
// [1] C. Shaw, T. J. Nussdorfer, "An analysis of the full-floating journal
//     bearing", NACA Report 866, 1947 (from memory).
// [2] L. San Andres, J. Kerth, "Thermal effects on the performance of
//     floating ring bearings for turbochargers", Proc. IMechE Part J
//     218:437-450, 2004 (from memory).
// [3] R. G. Budynas, J. K. Nisbett, "Shigley's Mechanical Engineering
//     Design", 9th ed., McGraw-Hill, 2011, Eq. (12-22) (from memory).
// [4] G. I. Taylor, Phil. Trans. R. Soc. Lond. A 223:289-343, 1923 (see
//     components/correlations/bearing_friction.h).
#pragma once

#include <cmath>

#include "components/component.h"
#include "components/correlations/floating_ring.h"
#include "components/registry.h"

namespace loopwright {

// The state of the two films at one operating point.
struct RingFilms {
  double ratio = 0;                        // Omega_R / Omega_J [-]
  double mu_inner = 0, mu_outer = 0;       // film viscosities [Pa s]
  double rho_inner = 0, rho_outer = 0;     // film densities [kg/m3]
  double t_inner = 0, t_outer = 0;         // film mean temperatures [K] (thermal)
  double torque = 0;                       // film torque on the ring [N m]
  double p_inner = 0, p_outer = 0;         // friction power of each film [W]
  bool settled = true;                     // the film temperature solve converged
};

class FloatingRingBearing : public ComponentWithLaw<FloatingRingBearing> {
 public:
  enum Param {
    kDiameter, kInnerLength, kInnerClearance, kInnerGroove,
    kRingDiameter, kOuterLength, kOuterClearance, kOuterGroove,
    kHoleCount, kHoleDiameter, kInnerEccentricity, kOuterEccentricity,
    kFlowMin, kFlowMax, kSpeed, kHeatSoak, kNumParams
  };
  explicit FloatingRingBearing(const ParamValues& v) { params_ = v.values; }
  ResidualKind Kind(int) const override { return ResidualKind::kVolumeFlow; }

  // The eccentricity ratios of the inner and outer films (see the header).
  void FilmEccentricities(double* inner, double* outer) const {
    *inner = params_[kInnerEccentricity];
    *outer = params_[kOuterEccentricity];
  }
  FilmGeometry InnerFilm() const;
  FilmGeometry OuterFilm() const;
  double RingWall() const { return 0.5 * (params_[kRingDiameter] - params_[kDiameter] - 2 * params_[kInnerClearance]); }
  // Flow coefficients Q mu / p [m3] of the outer lands, the inner lands, the holes.
  double OuterFlowCoefficient() const;
  double InnerFlowCoefficient() const;
  double HoleFlowCoefficientOfRing() const;
  // The inner path (holes then inner lands, in series) and the whole bearing.
  double InnerPathCoefficient() const {
    const double ki = InnerFlowCoefficient(), kh = HoleFlowCoefficientOfRing();
    return ki * kh / (ki + kh);
  }
  double FlowCoefficient() const { return OuterFlowCoefficient() + InnerPathCoefficient(); }

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

  // The films at a feed temperature t_in [K] and mass flow m [kg/s] of the
  // whole bearing: film temperatures, viscosities, ring speed and powers.
  // fluid == nullptr (or m <= 0): both films at mu_feed (isoviscous).
  RingFilms Films(double t_in, double m, double mu_feed, double rho_feed, const Fluid* fluid, double p_abs) const;
  double Speed() const { return std::isnan(params_[kSpeed]) ? 0.0 : std::fabs(params_[kSpeed]); }

  HeatJet HeatAdded(const HeatInputs& in) const override;
  void Describe(const BranchResult& b, ComponentReport* out) const override;
  // Film powers and ring speed at given film viscosities (Powers is public
  // for the film heat balance's solver).
  void Powers(double mu_inner, double mu_outer, RingFilms* f) const;

 private:
  void DescribeRunning(const BranchResult& b, const RingFilms& f, double p_in, ComponentReport* out) const;
};

ComponentType FloatingRingBearingType();
std::unique_ptr<Component> MakeFloatingRingBearing(const ParamValues& v, std::vector<ParamError>* e);

}  // namespace loopwright
