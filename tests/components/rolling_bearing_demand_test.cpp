// rolling_bearing's oil demand: Palmgren's friction moment M = M0 + M1 (A.
// Palmgren, "Ball and Roller Bearing Engineering", 3rd ed., 1959; T. A.
// Harris, M. N. Kotzalas, "Rolling Bearing Analysis", 5th ed., 2007, ch. 7;
// both from memory) and the heat balance Q = M omega / (rho cp dT_a),
// against hand calculations of the published formula (arithmetic in the
// comments, values as literals).
#include <doctest/doctest.h>

#include <cmath>
#include <map>
#include <memory>
#include <string>

#include "tests/components/named_values.h"

#include "components/rolling_bearing.h"

namespace loopwright {
namespace {

constexpr double kRpm = 2 * 3.14159265358979323846 / 60;

std::unique_ptr<Component> Build(const std::map<std::string, double>& values, std::vector<ParamError>* errs) {
  const ComponentType* t = FindComponentType("rolling_bearing");
  const ParamValues v = NamedValues(*t, values);
  return t->make(v, errs);
}

const ReportItem* Find(const ComponentReport& r, const std::string& key) {
  for (const auto& it : r.items)
    if (it.key == key) return &it;
  return nullptr;
}

ComponentReport Describe(const Component& c, double nu, double rho, double cp, bool thermal = true) {
  BranchResult b;
  b.dp = 2e5, b.p_from = 2e5, b.rho = rho, b.mu = nu * rho, b.m = rho * 1e-5;
  b.cp = thermal ? cp : 0.0;
  b.t_in = 333.15;
  b.thermal = thermal;
  ComponentReport r;
  c.Describe(b, &r);
  return r;
}

// A 6208-size deep-groove ball bearing (bore 40 mm, outside 80 mm: d_m = 60 mm)
// at 3000 rpm in 20 cSt oil, f0 = 2 (Palmgren's table for deep-groove ball
// bearings in an oil bath, from memory), f1 = 0.0007, P1 = 2000 N, dT_a = 15 K.
std::map<std::string, double> Ball6208() {
  return {{"diameter", 0.001}, {"count", 2},           {"speed", 3000 * kRpm}, {"pitch_diameter", 0.060},
          {"palmgren_f0", 2.0}, {"palmgren_f1", 7e-4}, {"friction_load", 2000}, {"allowed_rise", 15.0}};
}

TEST_CASE("oil demand: Palmgren's moment above nu n = 2000, heat balance") {
  std::vector<ParamError> errs;
  auto c = Build(Ball6208(), &errs);
  REQUIRE(c);
  // nu n = 20 x 3000 = 60,000 >= 2000:
  //   M0 = 1e-7 x 2 x 60000^(2/3) x 60^3 = 1e-7 x 2 x 1532.62 x 216000 = 66.209 N mm
  //   M1 = 0.0007 x 2000 x 60 = 84.000 N mm;  M = 150.209 N mm
  //   N = 0.150209 N m x 314.159 rad/s = 47.190 W
  //   Q = 47.190 / (870 x 1900 x 15) = 1.9032e-6 m3/s (0.1142 L/min).
  const ComponentReport r = Describe(*c, 20e-6, 870.0, 1900.0);
  REQUIRE(Find(r, "oil_demand"));
  CHECK(Find(r, "friction_power_estimate")->value == doctest::Approx(47.190).epsilon(2e-5));
  CHECK(Find(r, "oil_demand")->value == doctest::Approx(1.9032e-6).epsilon(5e-5).scale(0));
  // Without the load term: M = 66.209 N mm, N = 20.800 W, Q = 8.389e-7 m3/s.
  std::map<std::string, double> v = Ball6208();
  v.erase("palmgren_f1");
  v.erase("friction_load");
  auto c0 = Build(v, &errs);
  REQUIRE(c0);
  CHECK(Find(Describe(*c0, 20e-6, 870.0, 1900.0), "oil_demand")->value ==
        doctest::Approx(8.389e-7).epsilon(2e-4).scale(0));
}

TEST_CASE("oil demand: Palmgren's moment below nu n = 2000 (the constant 160e-7 f0 d_m^3)") {
  std::vector<ParamError> errs;
  std::map<std::string, double> v = Ball6208();
  v["speed"] = 60 * kRpm;  // nu n = 20 x 60 = 1200 < 2000
  v.erase("palmgren_f1");
  v.erase("friction_load");
  auto c = Build(v, &errs);
  REQUIRE(c);
  // M0 = 160e-7 x 2 x 216000 = 6.912 N mm; N = 6.912e-3 x 6.28319 = 0.043429 W;
  // Q = 0.043429 / (870 x 1900 x 15) = 1.7515e-9 m3/s.
  const ComponentReport r = Describe(*c, 20e-6, 870.0, 1900.0);
  CHECK(Find(r, "oil_demand")->value == doctest::Approx(1.7515e-9).epsilon(1e-4).scale(0));
  CHECK(Find(r, "oil_demand")->text == "heat balance, nu n < 2000");
}

TEST_CASE("oil demand: absent without its parameters; refused when only part of them is given") {
  std::vector<ParamError> errs;
  auto plain = Build({{"diameter", 0.001}}, &errs);
  REQUIRE(plain);
  CHECK_FALSE(Find(Describe(*plain, 20e-6, 870.0, 1900.0), "oil_demand"));
  // An isothermal point with no fluid to give cp: no demand, and a warning says so.
  auto c = Build(Ball6208(), &errs);
  const ComponentReport iso = Describe(*c, 20e-6, 870.0, 1900.0, false);
  CHECK_FALSE(Find(iso, "oil_demand"));
  CHECK(iso.warnings.size() == 1);
  std::map<std::string, double> v = Ball6208();
  v.erase("palmgren_f0");
  errs.clear();
  CHECK_FALSE(Build(v, &errs));
  REQUIRE(errs.size() == 1);
  CHECK(errs[0].message.find("palmgren_f0 is missing") != std::string::npos);
  v = Ball6208();
  v.erase("friction_load");
  errs.clear();
  CHECK_FALSE(Build(v, &errs));
  REQUIRE(errs.size() == 1);
  CHECK(errs[0].message.find("friction_load is missing") != std::string::npos);
}

}  // namespace
TEST_CASE("a stopped shaft with a loss_power still heating the oil is warned about") {
  auto has = [](const ComponentReport& r) {
    for (const auto& w : r.warnings)
      if (w.find("shaft stopped") != std::string::npos) return true;
    return false;
  };
  std::vector<ParamError> errs;
  auto stopped = Ball6208();
  stopped["speed"] = 0;
  stopped["loss_power"] = 150;
  auto c = Build(stopped, &errs);
  REQUIRE(c);
  CHECK(has(Describe(*c, 20e-6, 850, 2000)));
  stopped["loss_power"] = 0;  // heat set to zero with the speed: nothing to warn about
  CHECK_FALSE(has(Describe(*Build(stopped, &errs), 20e-6, 850, 2000)));
  auto running = Ball6208();
  running["loss_power"] = 150;
  CHECK_FALSE(has(Describe(*Build(running, &errs), 20e-6, 850, 2000)));
}

}  // namespace loopwright
