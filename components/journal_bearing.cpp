#include "components/journal_bearing.h"

#include <fmt/format.h>

#include "components/bearing_film_report.h"
#include "library/root_bracket.h"

namespace loopwright {


FilmSolution JournalBearing::FilmAt(double mu_film) const {
  return LoadedLandFilm(static_cast<int>(std::lround(params_[kEccentricityMethod])), Lands(), mu_film, Speed(), params_[kLoad]);
}

// The effective film temperature T_f = T_in + kFilmRiseFraction dT(mu(T_f)),
// dT = (friction + heat soak) / (m cp at T_in): a root of the increasing
// g(t) = t - T_in - kFilmRiseFraction dT(mu(t)) (the rise falls as the film
// thins), bracketed by T_in and T_in + kFilmRiseFraction dT(T_in) (at most
// 500 K above the inlet), found to 1e-12 K by false position (Illinois).
// A bisection stopped at a 1e-9 K bracket made T_f a staircase of the
// stream: the tangents' directional differences (a step of ~3e-5 K) read
// its steps as a slope 5e-5 wrong, and on a loop of two such bearings the
// tangent did not settle. No forward flow (a starving or reversed bearing):
// the film at the inlet.
void JournalBearing::FollowStream(const StreamState& st) {
  params_[kFilmViscosityRatio] = params_[kFilmTemperature] = std::numeric_limits<double>::quiet_NaN();
  if (!FromLoad() || !st.fluid || !(st.m > 0.0)) return;
  const FluidProps in = st.fluid->Evaluate(st.t_in, st.p_abs);
  if (!(in.mu > 0.0) || !(in.cp > 0.0)) return;
  const double soak = std::isnan(params_[kHeatSoak]) ? 0.0 : params_[kHeatSoak];
  auto g = [&](double t) {
    const double mu_f = st.fluid->Evaluate(t, st.p_abs).mu;
    const FilmSolution f = FilmAt(mu_f);
    return t - st.t_in - kFilmRiseFraction * (FrictionAt(mu_f, f.eps, f.attitude_rad) + soak) / (st.m * in.cp);
  };
  const double g_in = g(st.t_in);
  const double hi = st.t_in + std::min(-g_in, 500.0);
  const double g_hi = g(hi);
  const double tf = !(g_in < 0.0) ? st.t_in : !(g_hi > 0.0) ? hi : IllinoisRoot(g, st.t_in, hi, g_in, g_hi, 1e-12, 1e-12);
  params_[kFilmTemperature] = tf;
  params_[kFilmViscosityRatio] = st.fluid->Evaluate(tf, st.p_abs).mu / in.mu;
}

// Sommerfeld number, eccentricity, attitude, film thickness, unit load and
// the film temperatures of a bearing whose eccentricity follows from load;
// range warnings.
void JournalBearing::DescribeFilm(const BranchResult& b, ComponentReport* out) const {
  ReportLoadedFilm({"", "", static_cast<int>(std::lround(params_[kEccentricityMethod])), Lands(), FilmAt(b.mu * FilmRatio()),
                    params_[kLoad]}, out);
  const double tf = params_[kFilmTemperature];
  if (b.thermal && !std::isnan(tf)) {
    out->items.push_back({"film_temperature", tf, Dimension::kTemperature, ""});
    out->items.push_back({"film_temperature_max", b.t_in + (tf - b.t_in) / kFilmRiseFraction, Dimension::kTemperature, ""});
  }
}

void JournalBearing::Describe(const BranchResult& b, ComponentReport* out) const {
  const double q = b.m / b.rho;
  const double c = params_[kClearance];
  out->items.push_back({"feed_pressure_above_drain", b.dp, Dimension::kPressureDifference, ""});
  out->items.push_back({"feed_flow", q, Dimension::kVolumeFlow, q < 0 ? "reversed" : ""});
  // Couette Reynolds number on the clearance, rho U c / mu.
  if (!std::isnan(params_[kSpeed])) {
    const double u = params_[kSpeed] * 0.5 * params_[kDiameter];
    const double re = b.rho * u * c / b.mu;
    out->items.push_back({"film_reynolds", re, Dimension::kDimensionless, re < 1000 ? "laminar" : "turbulent film"});
    if (re > 1000) out->warnings.push_back(fmt::format("film Reynolds number {:.0f} above ~1000: the laminar side-flow law is outside its range", re));
  }
  if (FromLoad()) DescribeFilm(b, out);
  if (q < 0) out->warnings.push_back("flow reversed: the drain cavity is above the feed pressure (bearing starving)");
  if (b.thermal) {
    const double pf = FrictionPower(b.mu);
    out->items.push_back({"friction_power", pf, Dimension::kPower, ""});
    if (!std::isnan(params_[kSpeed])) {
      const double ta = TaylorNumber(b.rho, b.mu, 0.5 * params_[kDiameter], c, params_[kSpeed]);
      if (ta > kTaylorCritical)
        out->warnings.push_back(fmt::format("Taylor number {:.0f} above {:.1f}: the film is not laminar Couette flow; friction is under-predicted", ta, kTaylorCritical));
    }
    // From the enthalpy balance (BranchResult::t_out), as the drain node's.
    if (q > 0 && b.cp > 0)
      out->items.push_back({"oil_temperature_rise", b.t_out - b.t_in, Dimension::kTemperatureDifference, ""});
  }
}

ComponentType JournalBearingType() {
  ComponentType t;
  t.name = "journal_bearing";
  t.summary = "pressure-fed plain journal bearing, circumferential groove: side flow ~ c^3 p_s / mu; eccentricity given or "
              "from load (Sommerfeld number: Ocvirk, Raimondi & Boyd)";
  t.roles = kRoleBearing;
  t.params = {
      Positive("diameter", Dimension::kLength, "journal diameter"),
      Positive("length", Dimension::kLength, "overall bearing length (both lands and the groove)"),
      Num("groove_width", Dimension::kLength, "width of the circumferential feed groove", false, 0.0).Min(0),
      Positive("radial_clearance", Dimension::kLength, "radial clearance c").Knob(),
      Num("eccentricity", Dimension::kDimensionless,
          "eccentricity ratio at the running condition (default 0.5 with eccentricity_method given; leave it out for "
          "eccentricity from load)", false).Range(0, 0.95),
      Positive("flow_min", Dimension::kVolumeFlow, "least acceptable feed flow (checks)", false),
      Positive("flow_max", Dimension::kVolumeFlow, "largest acceptable feed flow (checks: drain and seals)", false),
      Num("speed", Dimension::kRotationalSpeed, "shaft speed (friction heat, film Reynolds number, eccentricity from load)",
          false).Min(0),
      Num("load", Dimension::kForce, "steady radial load (friction heat, eccentricity from load)", false).Min(0),
      Num("heat_soak", Dimension::kPower, "heat conducted into the oil from the housing (thermal solve)", false, 0.0).Min(0),
      Choice("eccentricity_method", {"given", "ocvirk_1952", "raimondi_boyd_1958"},
             "where the running eccentricity comes from: the eccentricity given; or from load and speed at each point by "
             "short-bearing theory (Ocvirk 1952) or Raimondi & Boyd's finite-bearing tables (1958)"),
  };
  t.make = [](const ParamValues& v, std::vector<ParamError>* e) -> std::unique_ptr<Component> {
    using J = JournalBearing;
    if (!(v.values[J::kGroove] < v.values[J::kLength])) e->push_back({"groove_width", "the groove must be narrower than the bearing length"});
    if (!(v.values[J::kClearance] < 0.05 * v.values[J::kDiameter]))
      e->push_back({"radial_clearance", "radial clearance above 5% of the diameter is not a journal bearing (check the units: c is radial, in m or \"um\")"});
    if (!std::isnan(v.values[J::kFlowMin]) && !std::isnan(v.values[J::kFlowMax]) && !(v.values[J::kFlowMin] < v.values[J::kFlowMax]))
      e->push_back({"flow_max", "flow_max must be above flow_min"});
    if (v.values[J::kEccentricityMethod] >= 0.5) {
      if (std::isnan(v.values[J::kLoad]) || std::isnan(v.values[J::kSpeed]))
        e->push_back({"eccentricity_method", "eccentricity from load needs the bearing's \"load\" and \"speed\""});
      if (!std::isnan(v.values[J::kEccentricity]))
        e->push_back({"eccentricity", "give either an eccentricity or an eccentricity_method from load, not both"});
    }
    if (!e->empty()) return nullptr;
    return std::make_unique<J>(v);
  };
  return t;
}

}  // namespace loopwright
