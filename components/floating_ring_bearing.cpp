#include "components/floating_ring_bearing.h"

#include <fmt/format.h>

#include <algorithm>

#include "components/bearing_film_report.h"
#include "library/root_bracket.h"

namespace loopwright {

namespace {
constexpr double kLnStep = 1e-4;  // central-difference step in ln mu of the eccentricity slopes
}  // namespace

RingEccentricity FloatingRingBearing::Eccentricities(double mu, RingEccentricity* dlnmu) const {
  if (dlnmu) *dlnmu = {0.0, 0.0};
  if (!FromLoad()) {
    auto given = [](double v) { return std::isnan(v) ? 0.5 : v; };
    return {given(params_[kInnerEccentricity]), given(params_[kOuterEccentricity])};
  }
  if (!std::isnan(params_[kInnerEpsState])) return {params_[kInnerEpsState], params_[kOuterEpsState]};
  const RingEccentricity e = IsoviscousEccentricities(mu);
  if (dlnmu) {
    const RingEccentricity hi = IsoviscousEccentricities(mu * std::exp(kLnStep));
    const RingEccentricity lo = IsoviscousEccentricities(mu * std::exp(-kLnStep));
    *dlnmu = {(hi.inner - lo.inner) / (2 * kLnStep), (hi.outer - lo.outer) / (2 * kLnStep)};
  }
  return e;
}

// Fixed-point iteration at fixed film viscosities: the ratio moves the
// films' wedge speeds, the eccentricities move the ratio only through
// sqrt(1 - eps^2) factors (a weak coupling: a few steps to 1e-12).
RingEccentricity FloatingRingBearing::LoadedEccentricities(double mu_inner, double mu_outer, RingEccentricity e) const {
  for (int it = 0; it < 100; ++it) {
    const double s = RingSpeedRatio(mu_inner, mu_outer, InnerFilm(e), OuterFilm(e));
    const RingEccentricity n{InnerLoadedFilm(mu_inner, s).eps, OuterLoadedFilm(mu_outer, s).eps};
    const bool done = std::fabs(n.inner - e.inner) < 1e-12 && std::fabs(n.outer - e.outer) < 1e-12;
    e = n;
    if (done) break;
  }
  return e;
}

RingEccentricity FloatingRingBearing::IsoviscousEccentricities(double mu) const {
  return LoadedEccentricities(mu, mu, {0.0, 0.0});
}

LandFilm FloatingRingBearing::InnerLands() const {
  return {0.5 * params_[kDiameter], params_[kInnerClearance], 0.5 * (params_[kInnerLength] - params_[kInnerGroove])};
}

LandFilm FloatingRingBearing::OuterLands() const {
  return {0.5 * params_[kRingDiameter], params_[kOuterClearance], 0.5 * (params_[kOuterLength] - params_[kOuterGroove])};
}

FilmSolution FloatingRingBearing::InnerLoadedFilm(double mu_inner, double ratio) const {
  return LoadedLandFilm(Method(), InnerLands(), mu_inner, Speed() * (1.0 + ratio), params_[kLoad]);
}

FilmSolution FloatingRingBearing::OuterLoadedFilm(double mu_outer, double ratio) const {
  return LoadedLandFilm(Method(), OuterLands(), mu_outer, Speed() * ratio, params_[kLoad]);
}

FilmGeometry FloatingRingBearing::InnerFilm(const RingEccentricity& e) const {
  return {0.5 * params_[kDiameter], params_[kInnerLength] - params_[kInnerGroove], params_[kInnerClearance], e.inner};
}

FilmGeometry FloatingRingBearing::OuterFilm(const RingEccentricity& e) const {
  return {0.5 * params_[kRingDiameter], params_[kOuterLength] - params_[kOuterGroove], params_[kOuterClearance], e.outer};
}

double FloatingRingBearing::HoleFlowCoefficientOfRing() const {
  return HoleFlowCoefficient(static_cast<int>(std::lround(params_[kHoleCount])), params_[kHoleDiameter], RingWall());
}

void FloatingRingBearing::Powers(double mu_inner, double mu_outer, const RingEccentricity& e, RingFilms* f) const {
  const FilmGeometry in = InnerFilm(e), out = OuterFilm(e);
  f->eps = e;
  const double w = Speed();
  f->mu_inner = mu_inner;
  f->mu_outer = mu_outer;
  f->ratio = RingSpeedRatio(mu_inner, mu_outer, in, out);
  f->torque = FilmCouetteTorque(mu_inner, in.radius, in.length, in.clearance, w * (1 - f->ratio), in.eccentricity);
  f->p_inner = f->torque * w * (1 - f->ratio);
  f->p_outer = f->torque * w * f->ratio;
}

namespace {

// The lumped film heat balance as a function of the films' mean rises theta
// [K]: returns theta - Theta(P(mu(t_in + theta))) (zero at the answer).
struct FilmBalance {
  const FloatingRingBearing* bearing;
  const Fluid* fluid;
  RingEccentricity eps;
  double t_in, p_abs, a_inner, a_outer, g_inner, g_outer;
  RingFilms Evaluate(const double theta[2], double r[2]) const {
    const FluidProps fi = fluid->Evaluate(t_in + theta[0], p_abs), fo = fluid->Evaluate(t_in + theta[1], p_abs);
    RingFilms f;
    bearing->Powers(fi.mu, fo.mu, eps, &f);
    f.rho_inner = fi.rho, f.rho_outer = fo.rho;
    f.t_inner = t_in + theta[0], f.t_outer = t_in + theta[1];
    double ti = 0, to = 0;
    FilmTemperatureRises(f.p_inner, f.p_outer, a_inner, a_outer, g_inner, g_outer, &ti, &to);
    r[0] = theta[0] - ti;
    r[1] = theta[1] - to;
    return f;
  }
};

constexpr double kMaxRise = 600.0;  // [K] bound of the film rises searched

// Newton on the two rises with a forward-difference Jacobian and step
// halving on the residual's size; rises kept within [0, kMaxRise] K (the
// fluid clamps its properties at its range ends, so every evaluation is
// finite).
RingFilms NewtonFilmBalance(const FilmBalance& fb) {
  double th[2] = {0, 0}, r[2];
  RingFilms f = fb.Evaluate(th, r);
  auto norm = [](const double* v) { return std::max(std::fabs(v[0]), std::fabs(v[1])); };
  for (int it = 0; it < 60 && norm(r) > 1e-11; ++it) {
    double j[2][2], rp[2];
    for (int k = 0; k < 2; ++k) {
      double tp[2] = {th[0], th[1]};
      const double h = 1e-6 * std::max(1.0, th[k]);
      tp[k] += h;
      fb.Evaluate(tp, rp);
      j[0][k] = (rp[0] - r[0]) / h;
      j[1][k] = (rp[1] - r[1]) / h;
    }
    const double det = j[0][0] * j[1][1] - j[0][1] * j[1][0];
    if (!(std::fabs(det) > 0)) break;
    const double step[2] = {-(j[1][1] * r[0] - j[0][1] * r[1]) / det, -(j[0][0] * r[1] - j[1][0] * r[0]) / det};
    // At most 20 K per step: the rises feed back through the viscosity.
    const double big = std::max(std::fabs(step[0]), std::fabs(step[1]));
    double lambda = big > 20.0 ? 20.0 / big : 1.0, trial[2], rt[2];
    RingFilms ft;
    for (int ls = 0; ls < 30; ++ls, lambda *= 0.5) {
      for (int k = 0; k < 2; ++k) trial[k] = std::clamp(th[k] + lambda * step[k], 0.0, kMaxRise);
      ft = fb.Evaluate(trial, rt);
      if (norm(rt) < norm(r)) break;
    }
    th[0] = trial[0], th[1] = trial[1], r[0] = rt[0], r[1] = rt[1], f = ft;
  }
  f.settled = norm(r) <= 1e-8;
  return f;
}

// The fallback when Newton does not settle (cold, thick oil, whose viscosity
// falls tenfold over a few tens of kelvin): nested brackets. For a given
// inner rise the outer film's residual is -Theta_o <= 0 at 0 and rises to
// kMaxRise - Theta_o at kMaxRise, so it has a root between; the inner film's
// residual along that curve likewise. Slow (a few hundred balances) and sure.
RingFilms BracketFilmBalance(const FilmBalance& fb) {
  double r[2];
  auto outer_rise = [&](double ti) {
    auto g = [&](double to) {
      const double th[2] = {ti, to};
      fb.Evaluate(th, r);
      return r[1];
    };
    const double g0 = g(0.0), g1 = g(kMaxRise);
    return g1 < 0 ? kMaxRise : IllinoisRoot(g, 0.0, kMaxRise, g0, g1, 1e-12, 1e-12);
  };
  auto inner = [&](double ti) {
    const double to = outer_rise(ti), th[2] = {ti, to};
    fb.Evaluate(th, r);
    return r[0];
  };
  const double h0 = inner(0.0), h1 = inner(kMaxRise);
  const double ti = h1 < 0 ? kMaxRise : IllinoisRoot(inner, 0.0, kMaxRise, h0, h1, 1e-12, 1e-12);
  const double th[2] = {ti, outer_rise(ti)};
  RingFilms f = fb.Evaluate(th, r);
  f.settled = std::max(std::fabs(r[0]), std::fabs(r[1])) <= 1e-8;
  return f;
}

RingFilms SolveFilmBalance(const FilmBalance& fb) {
  const RingFilms f = NewtonFilmBalance(fb);
  return f.settled ? f : BracketFilmBalance(fb);
}

}  // namespace

RingFilms FloatingRingBearing::Films(double t_in, double m, double mu_feed, double rho_feed, const Fluid* fluid,
                                     double p_abs) const {
  RingFilms f;
  const RingEccentricity e = Eccentricities(mu_feed);
  if (!fluid || !(m > 0) || Speed() == 0) {
    Powers(mu_feed, mu_feed, e, &f);
    f.rho_inner = f.rho_outer = rho_feed;
    f.t_inner = f.t_outer = t_in;
    return f;
  }
  const FluidProps feed = fluid->Evaluate(t_in, p_abs);
  const FilmGeometry in = InnerFilm(e), out = OuterFilm(e);
  const double k = FlowCoefficient(e), share_inner = InnerPathCoefficient(e) / k, share_outer = OuterFlowCoefficient(e) / k;
  FilmBalance fb{this, fluid, e, t_in, p_abs, 2 * share_inner * m * feed.cp, 2 * share_outer * m * feed.cp,
                 FilmConductance(feed.k, in), FilmConductance(feed.k, out)};
  return SolveFilmBalance(fb);
}

HeatJet FloatingRingBearing::HeatAdded(const HeatInputs& in) const {
  const double soak = std::isnan(params_[kHeatSoak]) ? 0.0 : params_[kHeatSoak];
  const double t = in.t_in.a;
  auto heat = [&](double tt, double mu) {
    const RingFilms f = Films(tt, in.m, mu, in.rho.a, in.fluid, in.p_abs);
    return f.p_inner + f.p_outer;
  };
  const double h0 = heat(t, in.mu.a);
  HeatJet out(h0 + soak);
  if (in.fluid && in.m > 0) {
    // d/dT_in of the solved films by central differences (the solve is
    // converged to 1e-11 K, far below the step's effect).
    const double dt = 1e-3;
    out.v[0] = (heat(t + dt, in.mu.a) - heat(t - dt, in.mu.a)) / (2 * dt);
  } else {
    out.v[0] = in.mu.a > 0 ? h0 * in.mu.v[0] / in.mu.a : 0.0;  // isoviscous: P ~ mu
  }
  return out;
}

void FloatingRingBearing::Describe(const BranchResult& b, ComponentReport* out) const {
  const RingEccentricity e = Eccentricities(b.mu);
  const double q = b.m / b.rho, k = FlowCoefficient(e);
  const double ki = InnerFlowCoefficient(e), kh = HoleFlowCoefficientOfRing();
  const double q_inner = q * InnerPathCoefficient(e) / k, p_in = b.dp * kh / (kh + ki);
  out->items.push_back({"feed_pressure_above_drain", b.dp, Dimension::kPressureDifference, ""});
  out->items.push_back({"feed_flow", q, Dimension::kVolumeFlow, q < 0 ? "reversed" : ""});
  out->items.push_back({"outer_film_flow", q * OuterFlowCoefficient(e) / k, Dimension::kVolumeFlow, ""});
  out->items.push_back({"inner_film_flow", q_inner, Dimension::kVolumeFlow, ""});
  out->items.push_back({"inner_feed_pressure", p_in, Dimension::kPressureDifference, ""});
  if (q < 0) out->warnings.push_back("flow reversed: the drain cavity is above the feed pressure (bearing starving)");
  const double d_hole = params_[kHoleDiameter], n_hole = std::lround(params_[kHoleCount]);
  const double re_hole = b.rho * std::fabs(q_inner) / (n_hole * 0.25 * kBearingPi * d_hole * d_hole) * d_hole / b.mu;
  if (re_hole > 2000)
    out->warnings.push_back(fmt::format("ring hole Reynolds number {:.0f} above 2000: the holes' laminar law is outside its range", re_hole));
  const RingFilms f = b.thermal ? Films(b.t_in, b.m, b.mu, b.rho, b.fluid, b.ambient_pa + std::max(0.0, b.p_from))
                                : Films(0.0, 0.0, b.mu, b.rho, nullptr, 0.0);
  out->items.push_back({"ring_speed_ratio", f.ratio, Dimension::kDimensionless, b.thermal ? "" : "isoviscous"});
  if (!f.settled)
    out->warnings.push_back("film temperatures did not settle within 600 K of the feed (a film starved of oil, or the "
                            "solve failed): ring speed and friction heat are not reliable");
  if (Speed() > 0) DescribeRunning(b, f, p_in, out);
  if (FromLoad()) DescribeFilms(b, f, out);
  if (b.thermal && q > 0 && b.cp > 0)
    out->items.push_back({"oil_temperature_rise", b.t_out - b.t_in, Dimension::kTemperatureDifference, ""});
}

// The items of a turning shaft: ring speed, friction, Taylor numbers, film
// temperatures and the holes' centrifugal head.
void FloatingRingBearing::DescribeRunning(const BranchResult& b, const RingFilms& f, double p_in,
                                          ComponentReport* out) const {
  const FilmGeometry in = InnerFilm(f.eps), outer = OuterFilm(f.eps);
  const double w = Speed(), w_ring = f.ratio * w;
  out->items.push_back({"ring_speed", w_ring, Dimension::kRotationalSpeed, ""});
  out->items.push_back({"inner_film_friction_power", f.p_inner, Dimension::kPower, ""});
  out->items.push_back({"outer_film_friction_power", f.p_outer, Dimension::kPower, ""});
  out->items.push_back({"friction_power", f.p_inner + f.p_outer, Dimension::kPower, ""});
  if (b.thermal) {
    out->items.push_back({"inner_film_temperature", f.t_inner, Dimension::kTemperature, ""});
    out->items.push_back({"outer_film_temperature", f.t_outer, Dimension::kTemperature, ""});
  }
  const double ta_in = TaylorNumber(f.rho_inner, f.mu_inner, in.radius, in.clearance, w - w_ring);
  const double ta_out = TaylorNumber(f.rho_outer, f.mu_outer, outer.radius, outer.clearance, w_ring);
  out->items.push_back({"inner_film_taylor", ta_in, Dimension::kDimensionless, ta_in < kTaylorCritical ? "laminar" : "vortices"});
  out->items.push_back({"outer_film_taylor", ta_out, Dimension::kDimensionless, ta_out < kTaylorCritical ? "laminar" : "vortices"});
  for (auto [name, ta] : {std::pair{"inner", ta_in}, std::pair{"outer", ta_out}})
    if (ta > kTaylorCritical)
      out->warnings.push_back(fmt::format("{} film Taylor number {:.0f} above {:.1f}: the film is not laminar Couette flow; friction is under-predicted", name, ta, kTaylorCritical));
  const double r_bore = in.radius + in.clearance;
  const double head = 0.5 * b.rho * w_ring * w_ring * (outer.radius * outer.radius - r_bore * r_bore);
  out->items.push_back({"hole_centrifugal_pressure", head, Dimension::kPressureDifference, ""});
  if (p_in > 0 && head > 0.25 * p_in)
    out->warnings.push_back(fmt::format("the ring holes' centrifugal head ({:.2f} bar) is {:.0f}% of the inner film's feed pressure: "
                                        "the law leaves it out, so the inner film's flow is over-predicted", head / 1e5, 100 * head / p_in));
}

// Each film's eccentricity from load at its own viscosity and the ring
// speed: Sommerfeld number, h0 against Trumpler's, unit load; at thermal
// points the film's exit temperature, feed plus twice its mean rise.
void FloatingRingBearing::DescribeFilms(const BranchResult& b, const RingFilms& f, ComponentReport* out) const {
  ReportLoadedFilm({"inner_", "inner film: ", Method(), InnerLands(), InnerLoadedFilm(f.mu_inner, f.ratio), params_[kLoad]}, out);
  ReportLoadedFilm({"outer_", "outer film: ", Method(), OuterLands(), OuterLoadedFilm(f.mu_outer, f.ratio), params_[kLoad]}, out);
  if (!b.thermal) return;
  out->items.push_back({"inner_film_temperature_max", b.t_in + 2.0 * (f.t_inner - b.t_in), Dimension::kTemperature, ""});
  out->items.push_back({"outer_film_temperature_max", b.t_in + 2.0 * (f.t_outer - b.t_in), Dimension::kTemperature, ""});
}

// Eccentricity from load at a thermal point: the films' temperatures, the
// ring speed and the two eccentricities together, by fixed-point steps from
// the isoviscous answer at the feed; each step one film heat balance, then
// ring speed and eccentricities settled at its viscosities (the film
// temperatures answer only weakly to the eccentricities: 2-4 steps).
void FloatingRingBearing::FollowStream(const StreamState& st) {
  const double nan = std::numeric_limits<double>::quiet_NaN();
  for (int k = kInnerEpsState; k < kNumSlots; ++k) params_[k] = nan;
  if (!FromLoad() || !st.fluid) return;
  const FluidProps feed = st.fluid->Evaluate(st.t_in, st.p_abs);
  if (!(feed.mu > 0.0)) return;
  RingEccentricity e = IsoviscousEccentricities(feed.mu);
  params_[kInnerEpsState] = e.inner, params_[kOuterEpsState] = e.outer;
  if (!(st.m > 0.0) || Speed() == 0) return;  // no flow known (an isothermal point): both films at the feed
  for (int it = 0; it < 50; ++it) {
    params_[kInnerEpsState] = e.inner, params_[kOuterEpsState] = e.outer;
    const RingFilms f = Films(st.t_in, st.m, feed.mu, feed.rho, st.fluid, st.p_abs);
    const RingEccentricity n = LoadedEccentricities(f.mu_inner, f.mu_outer, e);
    const bool done = std::fabs(n.inner - e.inner) < 1e-10 && std::fabs(n.outer - e.outer) < 1e-10;
    e = n;
    if (done) break;
  }
  params_[kInnerEpsState] = e.inner, params_[kOuterEpsState] = e.outer;
}

ComponentType FloatingRingBearingType() {
  ComponentType t;
  t.name = "floating_ring_bearing";
  t.summary = "floating ring journal bearing: outer film and ring holes feeding the inner film; ring speed from the films' torque balance";
  t.roles = kRoleBearing;
  t.params = {
      Positive("diameter", Dimension::kLength, "shaft (journal) diameter"),
      Positive("inner_length", Dimension::kLength, "length of the inner film (ring bore), groove included"),
      Positive("inner_clearance", Dimension::kLength, "radial clearance between shaft and ring bore"),
      Num("inner_groove_width", Dimension::kLength, "width of the feed groove in the ring bore", false, 0.0).Min(0),
      Positive("ring_diameter", Dimension::kLength, "outer diameter of the ring"),
      Positive("outer_length", Dimension::kLength, "length of the outer film (ring outside), groove included"),
      Positive("outer_clearance", Dimension::kLength, "radial clearance between ring and housing bore"),
      Num("outer_groove_width", Dimension::kLength, "width of the feed groove of the outer film", false, 0.0).Min(0),
      Positive("hole_count", Dimension::kDimensionless, "radial feed holes through the ring (whole number)"),
      Positive("hole_diameter", Dimension::kLength, "bore of each feed hole"),
      Num("inner_eccentricity", Dimension::kDimensionless,
          "eccentricity ratio of the inner film (default 0.5 with eccentricity_method given)", false).Range(0, 0.95),
      Num("outer_eccentricity", Dimension::kDimensionless,
          "eccentricity ratio of the outer film (default 0.5 with eccentricity_method given)", false).Range(0, 0.95),
      Positive("flow_min", Dimension::kVolumeFlow, "least acceptable feed flow (checks)", false),
      Positive("flow_max", Dimension::kVolumeFlow, "largest acceptable feed flow (checks: drain and seals)", false),
      Num("speed", Dimension::kRotationalSpeed, "shaft speed (ring speed, friction heat, Taylor numbers)", false).Min(0),
      Num("heat_soak", Dimension::kPower, "heat conducted into the oil from the housing (thermal solve)", false, 0.0).Min(0),
      Num("load", Dimension::kForce, "steady radial load carried by the bearing (eccentricity from load)", false).Min(0),
      Choice("eccentricity_method", {"given", "ocvirk_1952", "raimondi_boyd_1958"},
             "where the films' eccentricities come from: given; or from load and speed at each point, each film at its "
             "own viscosity and wedge speed, by short-bearing theory (Ocvirk 1952) or Raimondi & Boyd's tables (1958)"),
  };
  t.make = MakeFloatingRingBearing;
  return t;
}

std::unique_ptr<Component> MakeFloatingRingBearing(const ParamValues& v, std::vector<ParamError>* e) {
  using F = FloatingRingBearing;
  const auto& x = v.values;
  if (!(x[F::kInnerGroove] < x[F::kInnerLength])) e->push_back({"inner_groove_width", "the groove must be narrower than the inner film"});
  if (!(x[F::kOuterGroove] < x[F::kOuterLength])) e->push_back({"outer_groove_width", "the groove must be narrower than the outer film"});
  if (!(x[F::kInnerClearance] < 0.05 * x[F::kDiameter]))
    e->push_back({"inner_clearance", "radial clearance above 5% of the shaft diameter is not a journal bearing (c is radial, in m or \"um\")"});
  if (!(x[F::kRingDiameter] > x[F::kDiameter] + 2 * x[F::kInnerClearance]))
    e->push_back({"ring_diameter", "the ring's outer diameter must exceed its bore (shaft diameter + 2 inner clearances)"});
  else if (!(x[F::kOuterClearance] < 0.05 * x[F::kRingDiameter]))
    e->push_back({"outer_clearance", "radial clearance above 5% of the ring diameter is not a journal bearing (c is radial, in m or \"um\")"});
  if (!(x[F::kHoleCount] >= 1) || std::fabs(x[F::kHoleCount] - std::round(x[F::kHoleCount])) > 1e-9)
    e->push_back({"hole_count", "the number of feed holes must be a whole number, 1 or more"});
  if (!(x[F::kHoleDiameter] < x[F::kInnerLength])) e->push_back({"hole_diameter", "a feed hole must be narrower than the inner film's length"});
  if (!std::isnan(x[F::kFlowMin]) && !std::isnan(x[F::kFlowMax]) && !(x[F::kFlowMin] < x[F::kFlowMax]))
    e->push_back({"flow_max", "flow_max must be above flow_min"});
  if (x[F::kEccentricityMethod] >= 0.5) {
    if (std::isnan(x[F::kLoad]) || std::isnan(x[F::kSpeed]))
      e->push_back({"eccentricity_method", "eccentricity from load needs the bearing's \"load\" and \"speed\""});
    for (int k : {F::kInnerEccentricity, F::kOuterEccentricity})
      if (!std::isnan(x[k]))
        e->push_back({k == F::kInnerEccentricity ? "inner_eccentricity" : "outer_eccentricity",
                      "give either the films' eccentricities or an eccentricity_method from load, not both"});
  }
  if (!e->empty()) return nullptr;
  return std::make_unique<F>(v);
}

}  // namespace loopwright
