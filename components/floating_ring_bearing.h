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
// Eccentricity. Given (inner_eccentricity, outer_eccentricity, default 0.5
// each, a lightly loaded turbo bearing), or from load (eccentricity_method
// ocvirk_1952 | raimondi_boyd_1958, with load W and speed): each film carries
// the whole steady load W on its own lands (P = W / (2 l' d), d the film's
// diameter) and its eccentricity follows from its Sommerfeld number
// S = (r/c)^2 mu N / P (components/correlations/journal_film.h) at its own
// viscosity and wedge speed: the inner film's surfaces both turn, so its
// wedge runs at the sum of their speeds, N = (Omega_J + Omega_R)/(2 pi); the
// outer film's at the ring's, N = Omega_R/(2 pi) (Reynolds equation's wedge
// term goes with the sum of the surface speeds; from memory). The ring speed
// depends on the eccentricities through the films' torques, so ring speed and
// eccentricities are solved together by fixed-point steps (a weak coupling,
// settled to 1e-12). At a thermal point FollowStream settles them with the
// films' temperatures (to 1e-10, 2-4 film heat balances) once per pass and
// the law holds them for the hydraulic solve (its mu-derivative then leaves
// them fixed: the passes follow them); at an isothermal point both films
// are at the stream's viscosity, settled once per point the same way. A law
// evaluated with no state held (a component on its own) solves the
// isoviscous films at its mu and carries their slope in mu (central
// differences in ln mu) in the Jet. The reports then carry, per film
// (prefix inner_ / outer_): Sommerfeld number, eccentricity, attitude angle,
// h0 = c (1 - eps), Trumpler's least h0 for the film's diameter, unit load,
// and at thermal points the film's exit temperature, feed plus twice its mean
// rise; the checks film_thickness_min, start_unit_load_max and
// film_temperature_max judge each film at <bearing>/inner_film and
// /outer_film.
//
// Sign convention: from = feed (housing oil gallery), to = drain cavity;
// Q > 0 into the bearing. Speeds may be given either sense (|omega| used).
//
// Inputs (SI): diameter D [m] (shaft), inner_length, inner_clearance (radial),
// inner_groove_width (default 0) [m]; ring_diameter D_ring (outer diameter of
// the ring) [m], outer_length, outer_clearance, outer_groove_width (default 0)
// [m]; hole_count n (whole number), hole_diameter d [m]; inner_eccentricity,
// outer_eccentricity [-] in [0, 0.95] (default 0.5); speed [rad/s] (shaft);
// flow_min, flow_max [m3/s] (checks); heat_soak [W]; load [N] and
// eccentricity_method (given | ocvirk_1952 | raimondi_boyd_1958).
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
// settle. Eccentricities above 0.95 are refused on input. From load: the
// short-bearing or table range warnings of journal_bearing, per film; the
// film's Sommerfeld number ignores the ring's whirl (steady load only).
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
#include <limits>

#include "components/component.h"
#include "components/correlations/floating_ring.h"
#include "components/correlations/journal_film.h"
#include "components/correlations/smooth.h"
#include "components/registry.h"

namespace loopwright {

// The state of the two films at one operating point.
struct RingEccentricity {
  double inner = 0.5, outer = 0.5;
};

struct RingFilms {
  RingEccentricity eps;                    // the films' eccentricity ratios
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
    kFlowMin, kFlowMax, kSpeed, kHeatSoak, kLoad, kEccentricityMethod, kNumParams
  };
  // Slots after the type's parameters, written by FollowStream (reset to
  // NaN at every point with the parameters): the films' eccentricities from
  // load at their own temperatures and ring speed, held for the point's
  // hydraulic solves (the passes, not the law, follow their change).
  enum FilmSlot { kInnerEpsState = kNumParams, kOuterEpsState, kNumSlots };
  explicit FloatingRingBearing(const ParamValues& v) {
    SetParamsWithSlots(v.values, kNumSlots);
  }
  ResidualKind Kind(int) const override { return ResidualKind::kVolumeFlow; }

  bool FromLoad() const { return params_[kEccentricityMethod] >= 0.5; }
  int Method() const { return static_cast<int>(std::lround(params_[kEccentricityMethod])); }
  // The films' eccentricity ratios at feed viscosity mu [Pa s]: given
  // (default 0.5 each); from load, the films' state of this point's thermal
  // pass, else both films at mu (an isothermal point; see the header).
  // With dlnmu, also d eps / d ln mu of each film (zero for held films).
  RingEccentricity Eccentricities(double mu, RingEccentricity* dlnmu = nullptr) const;
  // From load with both films at mu: the fixed point of the ring speed
  // ratio and the two films' eccentricities.
  RingEccentricity IsoviscousEccentricities(double mu) const;
  // The same at film viscosities mu_i, mu_o, iterated from e.
  RingEccentricity LoadedEccentricities(double mu_inner, double mu_outer, RingEccentricity e) const;
  // Each film's eccentricity from load at film viscosities mu_i, mu_o and
  // ring speed ratio s (inner wedge speed omega (1 + s), outer omega s).
  FilmSolution InnerLoadedFilm(double mu_inner, double ratio) const;
  FilmSolution OuterLoadedFilm(double mu_outer, double ratio) const;
  FilmGeometry InnerFilm(const RingEccentricity& e) const;
  FilmGeometry OuterFilm(const RingEccentricity& e) const;
  LandFilm InnerLands() const;
  LandFilm OuterLands() const;
  double RingWall() const { return 0.5 * (params_[kRingDiameter] - params_[kDiameter] - 2 * params_[kInnerClearance]); }
  // Flow coefficients Q mu / p [m3] of the outer lands, the inner lands, the holes.
  double OuterFlowCoefficient(const RingEccentricity& e) const {
    return FedFilmFlowCoefficient(OuterLands().radius, OuterLands().clearance, OuterLands().land, e.outer);
  }
  double InnerFlowCoefficient(const RingEccentricity& e) const {
    return FedFilmFlowCoefficient(InnerLands().radius, InnerLands().clearance, InnerLands().land, e.inner);
  }
  double HoleFlowCoefficientOfRing() const;
  // The inner path (holes then inner lands, in series) and the whole bearing.
  double InnerPathCoefficient(const RingEccentricity& e) const {
    const double ki = InnerFlowCoefficient(e), kh = HoleFlowCoefficientOfRing();
    return ki * kh / (ki + kh);
  }
  template <class T>
  T FlowCoefficientOf(const T& eps_inner, const T& eps_outer) const {
    const LandFilm in = InnerLands(), out = OuterLands();
    const T ki = FedFilmFlowCoefficient(in.radius, in.clearance, in.land, eps_inner);
    const double kh = HoleFlowCoefficientOfRing();
    return FedFilmFlowCoefficient(out.radius, out.clearance, out.land, eps_outer) + ki * kh / (ki + kh);
  }
  double FlowCoefficient(const RingEccentricity& e) const { return FlowCoefficientOf(e.inner, e.outer); }

  template <class T>
  void Law(const T& dp, const T& m, const T& rho, const T& mu, const T* x, T* r) const {
    (void)x;
    // The eccentricities at the stream's viscosity, with their slope in mu
    // carried by the Jet (eccentricity from load; zero when given).
    const double mu0 = ScalarPart(mu);
    RingEccentricity d;
    const RingEccentricity e = Eccentricities(mu0, &d);
    const T lnmu = (mu - mu0) / mu0;
    r[0] = m / rho - FlowCoefficientOf(e.inner + d.inner * lnmu, e.outer + d.outer * lnmu) * dp / mu;
  }
  LinearGuess Linearize(double rho, double mu) const override {
    LinearGuess g;
    g.g = rho * FlowCoefficient(Eccentricities(mu)) / mu;
    return g;
  }

  // The films at a feed temperature t_in [K] and mass flow m [kg/s] of the
  // whole bearing: film temperatures, viscosities, ring speed and powers.
  // fluid == nullptr (or m <= 0): both films at mu_feed (isoviscous).
  RingFilms Films(double t_in, double m, double mu_feed, double rho_feed, const Fluid* fluid, double p_abs) const;
  double Speed() const { return std::isnan(params_[kSpeed]) ? 0.0 : std::fabs(params_[kSpeed]); }

  HeatJet HeatAdded(const HeatInputs& in) const override;
  void Describe(const BranchResult& b, ComponentReport* out) const override;
  void FollowStream(const StreamState& s) override;
  bool FollowsStream() const override { return true; }
  // Film powers and ring speed at given film viscosities (Powers is public
  // for the film heat balance's solver).
  void Powers(double mu_inner, double mu_outer, const RingEccentricity& e, RingFilms* f) const;

 private:
  void DescribeRunning(const BranchResult& b, const RingFilms& f, double p_in, ComponentReport* out) const;
  void DescribeFilms(const BranchResult& b, const RingFilms& f, ComponentReport* out) const;
};

ComponentType FloatingRingBearingType();
std::unique_ptr<Component> MakeFloatingRingBearing(const ParamValues& v, std::vector<ParamError>* e);

}  // namespace loopwright
