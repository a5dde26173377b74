// floating_ring_bearing: the ring speed against the closed-form torque
// balance of Shaw & Nussdorfer (NACA Report 866, 1947; from memory), the
// energy of the two films (the shaft's power is the films' friction, the
// ring's torques balance, the films' oil carries all of it), the flow split
// against a hand calculation of the internal network, and the warnings.
//
// Every expected value below is either a hand calculation written as a
// literal (its arithmetic in the comment) or a relation evaluated here with
// the library's oil (ASTM D341) at temperatures the component reported, never
// through components/correlations/floating_ring.h.
#include <doctest/doctest.h>

#include <cmath>
#include <map>
#include <memory>
#include <string>

#include "tests/components/named_values.h"

#include "components/floating_ring_bearing.h"
#include "library/oil.h"

namespace loopwright {
namespace {

constexpr double kPi = 3.14159265358979323846;
constexpr double kRpm = 2 * kPi / 60;

std::unique_ptr<Component> Build(const std::map<std::string, double>& values) {
  const ComponentType* t = FindComponentType("floating_ring_bearing");
  REQUIRE(t);
  const ParamValues v = NamedValues(*t, values);
  std::vector<ParamError> errs;
  auto c = t->make(v, &errs);
  REQUIRE_MESSAGE(errs.empty(), (errs.empty() ? "" : errs[0].param + ": " + errs[0].message));
  return c;
}

double Item(const ComponentReport& r, const std::string& key) {
  for (const auto& it : r.items)
    if (it.key == key) return it.value;
  FAIL("no report item " << key);
  return NAN;
}

bool Warned(const ComponentReport& r, const std::string& text) {
  for (const auto& w : r.warnings)
    if (w.find(text) != std::string::npos) return true;
  return false;
}

// An isothermal report (both films at the stream's viscosity).
ComponentReport Isothermal(const Component& c, double dp, double mu, double rho = 860.0) {
  BranchResult b;
  b.dp = dp;
  b.rho = rho;
  b.mu = mu;
  b.m = rho * 1e-6;
  b.p_from = dp;
  ComponentReport r;
  c.Describe(b, &r);
  return r;
}

// Shaft 10 mm (R_i = 5 mm), ring 15 mm (R_o = 7.5 mm), both films 8 mm long,
// no grooves, c_i = 16 um, c_o = 54 um: (R_o/R_i)^3 (L_o/L_i)(c_i/c_o) =
// 3.375 x 1 x 16/54 = 1 exactly, equal torque coefficients.
std::map<std::string, double> EqualFilms(double c_outer, double e_inner, double e_outer) {
  return {{"diameter", 0.010},  {"inner_length", 0.008},        {"inner_clearance", 16e-6},
          {"ring_diameter", 0.015}, {"outer_length", 0.008},    {"outer_clearance", c_outer},
          {"hole_count", 4},    {"hole_diameter", 0.001},       {"inner_eccentricity", e_inner},
          {"outer_eccentricity", e_outer}, {"speed", 60000 * kRpm}};
}

TEST_CASE("ring speed ratio: Shaw & Nussdorfer's torque balance at one viscosity") {
  // s = 1 / (1 + (mu_o/mu_i)(R_o/R_i)^3 (L_o/L_i)(c_i/c_o) sqrt(1-eps_i^2)/sqrt(1-eps_o^2)),
  // Shaw & Nussdorfer 1947 (concentric form; from memory), Petroff torques.
  // Equal films, concentric: the ring turns at half the shaft speed.
  auto equal = Build(EqualFilms(54e-6, 0.0, 0.0));
  CHECK(Item(Isothermal(*equal, 3e5, 0.02), "ring_speed_ratio") == doctest::Approx(0.5).epsilon(1e-12));
  // The viscosity cancels at one temperature.
  CHECK(Item(Isothermal(*equal, 3e5, 0.3), "ring_speed_ratio") == doctest::Approx(0.5).epsilon(1e-12));
  // c_o = 40 um: ratio of coefficients 3.375 x 16/40 = 1.35, s = 1/2.35.
  auto wide = Build(EqualFilms(40e-6, 0.0, 0.0));
  CHECK(Item(Isothermal(*wide, 3e5, 0.02), "ring_speed_ratio") == doctest::Approx(1.0 / 2.35).epsilon(1e-12));
  // Eccentric films, eps_i = 0.6, eps_o = 0.8: the Couette torques carry
  // 1/sqrt(1 - eps^2) = 1.25 and 1/0.6, so the coefficient ratio is 0.8/0.6 = 4/3, s = 3/7.
  auto ecc = Build(EqualFilms(54e-6, 0.6, 0.8));
  CHECK(Item(Isothermal(*ecc, 3e5, 0.02), "ring_speed_ratio") == doctest::Approx(3.0 / 7.0).epsilon(1e-12));
  // And the ring speed is the ratio times the shaft's 60,000 rpm = 6283.19 rad/s.
  CHECK(Item(Isothermal(*equal, 3e5, 0.02), "ring_speed") == doctest::Approx(0.5 * 6283.185307).epsilon(1e-9));
}

// The turbo-sized bearing of the demo (cases/turbo_test_stand.json).
std::map<std::string, double> Turbo() {
  return {{"diameter", 0.011},       {"inner_length", 0.007},  {"inner_groove_width", 0.0015},
          {"inner_clearance", 25e-6}, {"ring_diameter", 0.015}, {"outer_length", 0.009},
          {"outer_groove_width", 0.003}, {"outer_clearance", 60e-6}, {"hole_count", 4},
          {"hole_diameter", 0.0012}, {"speed", 150000 * kRpm}, {"heat_soak", 25.0}};
}

TEST_CASE("flow: the outer lands in parallel with the holes and inner lands in series (hand calculation)") {
  auto c = Build(Turbo());
  // Shigley Eq. 12-22 per film, Q = pi p r c^3 (1 + 1.5 eps^2) / (3 mu l'), eps = 0.5 (default):
  //  outer: pi x 7.5e-3 x (60e-6)^3 x 1.375 / (3 x 3e-3)   = 7.775e-13 m3   (l' = (9 - 3)/2 mm)
  //  inner: pi x 5.5e-3 x (25e-6)^3 x 1.375 / (3 x 2.75e-3) = 4.499e-14 m3  (l' = (7 - 1.5)/2 mm)
  //  holes: 4 pi (1.2e-3)^4 / (128 x 1.975e-3)             = 1.0308e-10 m3 (wall (15 - 11 - 0.05)/2 mm)
  //  inner path in series: 4.499e-14 x 1.0308e-10 / (4.499e-14 + 1.0308e-10) = 4.4970e-14 m3
  // At dp = 2 bar, mu = 0.01 Pa s: Q = (7.775e-13 + 4.497e-14) x 2e5 / 0.01 = 1.6450e-5 m3/s.
  double r[1];
  c->Evaluate(2e5, 860.0 * 1.6450e-5, 860.0, 0.01, nullptr, r);
  CHECK(std::fabs(r[0]) < 1e-4 * 1.6450e-5);  // the printed 5 digits
  CHECK(c->Linearize(860.0, 0.01).g == doctest::Approx(860.0 * 1.6450e-5 / 2e5).epsilon(1e-4));
  const ComponentReport rep = Isothermal(*c, 2e5, 0.01);
  // The inner film's share 4.4977e-14 / 8.2252e-13 = 0.054682 of a reported flow of 1e-6 m3/s.
  CHECK(Item(rep, "inner_film_flow") == doctest::Approx(0.054682e-6).epsilon(1e-4).scale(0));
  CHECK(Item(rep, "outer_film_flow") == doctest::Approx(0.945318e-6).epsilon(1e-5).scale(0));
  // The inner groove's pressure: dp K_h / (K_h + K_i) = 2e5 x (1 - 4.365e-4) = 199,912.7 Pa.
  CHECK(Item(rep, "inner_feed_pressure") == doctest::Approx(199912.7).epsilon(1e-6));
}

TEST_CASE("energy of the two films: shaft power = film friction, torques balance, the oil carries it") {
  std::string err;
  auto oil = OilFluid::FromTwoPoints(32e-6, 313.15, 5.4e-6, 373.15, OilExtras{}, &err);
  REQUIRE(oil);
  auto c = Build(Turbo());
  const double t_in = 343.15, p_abs = 4e5, q = 0.55 / 60000;  // 70 degC feed, 0.55 L/min
  const FluidProps feed = oil->Evaluate(t_in, p_abs);
  BranchResult b;
  b.dp = 1.3e5, b.p_from = 3e5, b.p_to = 1.7e5, b.ambient_pa = 1e5;
  b.rho = feed.rho, b.mu = feed.mu, b.m = feed.rho * q;
  b.t_in = t_in, b.cp = feed.cp, b.thermal = true, b.fluid = oil.get();
  ComponentReport rep;
  c->Describe(b, &rep);
  const double w = 150000 * kRpm, s = Item(rep, "ring_speed_ratio");
  const double ti = Item(rep, "inner_film_temperature"), to = Item(rep, "outer_film_temperature");
  const double mu_i = oil->Evaluate(ti, p_abs).mu, mu_o = oil->Evaluate(to, p_abs).mu;
  // Petroff torques of the eccentric films (bearing_friction.h [1, 2]), wetted lengths 5.5 and 6 mm, eps 0.5:
  const double t_inner = 2 * kPi * mu_i * w * (1 - s) * std::pow(5.5e-3, 3) * 5.5e-3 / 25e-6 / std::sqrt(0.75);
  const double t_outer = 2 * kPi * mu_o * w * s * std::pow(7.5e-3, 3) * 6e-3 / 60e-6 / std::sqrt(0.75);
  CHECK(t_outer == doctest::Approx(t_inner).epsilon(1e-8));  // the ring turns freely
  const double p_i = Item(rep, "inner_film_friction_power"), p_o = Item(rep, "outer_film_friction_power");
  CHECK(p_i == doctest::Approx(t_inner * w * (1 - s)).epsilon(1e-9));
  CHECK(p_o == doctest::Approx(t_outer * w * s).epsilon(1e-8));
  CHECK(p_i + p_o == doctest::Approx(t_inner * w).epsilon(1e-8));  // the shaft's power, all of it heat
  // The films' oil carries the friction: 2 m_i cp theta_i + 2 m_o cp theta_o = P_i + P_o.
  const double m_i = Item(rep, "inner_film_flow") * feed.rho, m_o = Item(rep, "outer_film_flow") * feed.rho;
  const double carried = 2 * m_i * feed.cp * (ti - t_in) + 2 * m_o * feed.cp * (to - t_in);
  CHECK(carried == doctest::Approx(p_i + p_o).epsilon(1e-8));
  // The inner film runs hotter and slows the ring below its isoviscous speed.
  CHECK(ti > to);
  CHECK(to > t_in);
  CHECK(s < Item(Isothermal(*c, 1.3e5, feed.mu), "ring_speed_ratio"));
  // The heat into the stream is the films' friction plus the heat soak (25 W).
  HeatInputs hin;
  hin.m = b.m, hin.dp = b.dp, hin.t_in = HeatJet(t_in, 0), hin.rho = HeatJet(feed.rho), hin.cp = HeatJet(feed.cp);
  hin.mu = HeatJet(feed.mu), hin.fluid = oil.get(), hin.p_abs = p_abs;
  const HeatJet h = c->HeatAdded(hin);
  CHECK(h.a == doctest::Approx(p_i + p_o + 25.0).epsilon(1e-9));
  // Its derivative against a central difference of the heat over +-0.2 K.
  hin.t_in = HeatJet(t_in + 0.2, 0);
  const double hp = c->HeatAdded(hin).a;
  hin.t_in = HeatJet(t_in - 0.2, 0);
  const double hm = c->HeatAdded(hin).a;
  CHECK(h.v[0] == doctest::Approx((hp - hm) / 0.4).epsilon(1e-4));
  CHECK(h.v[0] < 0);  // hotter oil, thinner films, less friction
}

// The films' balance where Newton alone stalls (cold, thick oil: the
// viscosity falls tenfold over a few tens of kelvin) and where no balance
// exists within 600 K (a starved bearing): the first must close, the second
// must say so.
TEST_CASE("film balance: cold thick oil settles and closes; a starved bearing is warned") {
  std::string err;
  auto oil = OilFluid::FromTwoPoints(32e-6, 313.15, 5.4e-6, 373.15, OilExtras{}, &err);
  REQUIRE(oil);
  auto run = [&](double rpm, double t_in, double m) {
    std::map<std::string, double> v = Turbo();
    v["speed"] = rpm * kRpm;
    auto c = Build(v);
    const FluidProps feed = oil->Evaluate(t_in, 4e5);
    BranchResult b;
    b.dp = 3e5, b.p_from = 3e5, b.ambient_pa = 1e5, b.rho = feed.rho, b.mu = feed.mu, b.m = m;
    b.t_in = t_in, b.cp = feed.cp, b.thermal = true, b.fluid = oil.get();
    ComponentReport rep;
    c->Describe(b, &rep);
    return std::make_pair(rep, feed);
  };
  // -10 degC feed, 0.01 kg/s, 100,000 rpm (Newton alone stopped at the inner film's lower bound here).
  const auto [cold, feed] = run(100000, 263.15, 0.01);
  CHECK_FALSE(Warned(cold, "did not settle"));
  const double m_i = Item(cold, "inner_film_flow") * feed.rho, m_o = Item(cold, "outer_film_flow") * feed.rho;
  const double carried = 2 * m_i * feed.cp * (Item(cold, "inner_film_temperature") - 263.15) +
                         2 * m_o * feed.cp * (Item(cold, "outer_film_temperature") - 263.15);
  CHECK(carried == doctest::Approx(Item(cold, "friction_power")).epsilon(1e-8));
  // 1e-5 kg/s (0.7 mL/min) at 250,000 rpm: the films would rise by more than 600 K.
  CHECK(Warned(run(250000, 333.15, 1e-5).first, "did not settle"));
}

TEST_CASE("warnings: Taylor number, centrifugal head of the ring holes, reversed flow") {
  std::map<std::string, double> v = Turbo();
  auto c = Build(v);
  // Thin oil (1 mPa s): the outer film's Taylor number at s = 0.4646 (isoviscous) x 15708 rad/s, r 7.5 mm,
  // c 60 um: 860 x 7297 x 7.5e-3 x 60e-6 / 1e-3 x sqrt(60e-6 / 7.5e-3) = 253 > 41.3.
  const ComponentReport thin = Isothermal(*c, 1.3e5, 1e-3);
  CHECK(Item(thin, "outer_film_taylor") > 41.3);
  CHECK(Warned(thin, "outer film Taylor number"));
  // Oil at 0.01 Pa s: outer 25.3, inner 6.7 (relative speed 0.5354 x 15708 rad/s, r 5.5 mm, c 25 um): below 41.3.
  const ComponentReport oil = Isothermal(*c, 1.3e5, 0.01);
  CHECK(Item(oil, "outer_film_taylor") < 41.3);
  CHECK_FALSE(Warned(oil, "Taylor number"));
  // Centrifugal head 0.5 rho (s w)^2 (R_o^2 - R_b^2): at 1.3 bar the ring's head (about 2.6 bar at the
  // isoviscous s = 0.4646: 5.9 bar) exceeds a quarter of the inner feed: warned; at 10,000 rpm (0.026 bar), none.
  CHECK(Warned(oil, "centrifugal head"));
  v["speed"] = 10000 * kRpm;
  CHECK_FALSE(Warned(Isothermal(*Build(v), 1.3e5, 0.01), "centrifugal head"));
  BranchResult back;  // the housing above the feed: oil pushed back out of the feed
  back.dp = -1e4, back.rho = 860.0, back.mu = 0.01, back.m = -860.0 * 1e-7;
  ComponentReport rev;
  c->Describe(back, &rev);
  CHECK(Warned(rev, "flow reversed"));
  CHECK_FALSE(Warned(oil, "flow reversed"));
}

TEST_CASE("inputs the factory refuses") {
  const ComponentType* t = FindComponentType("floating_ring_bearing");
  auto refuse = [&](const std::string& name, double x, const std::string& param) {
    std::map<std::string, double> v = Turbo();
    v[name] = x;
    ParamValues pv;
    pv.values.assign(t->params.size(), kNoValue);
    pv.tables.assign(t->params.size(), {});
    for (size_t i = 0; i < t->params.size(); ++i) pv.values[i] = t->params[i].default_si;
    for (const auto& [n, val] : v) pv.values[t->ParamIndex(n)] = val;
    std::vector<ParamError> errs;
    CHECK_FALSE(t->make(pv, &errs));
    REQUIRE(!errs.empty());
    CHECK(errs[0].param == param);
  };
  refuse("ring_diameter", 0.011, "ring_diameter");        // no wall
  refuse("hole_count", 2.5, "hole_count");                // not a whole number
  refuse("inner_groove_width", 0.007, "inner_groove_width");
  refuse("inner_clearance", 0.6e-3, "inner_clearance");   // 5 % of the shaft diameter or more
}

}  // namespace
}  // namespace loopwright
