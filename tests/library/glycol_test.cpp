// Tests of library/glycol.h (Melinder 2010 polynomial fits for aqueous
// ethylene and propylene glycol).
#include "library/glycol.h"

#include <cmath>
#include <string>

#include <doctest/doctest.h>

#include "library/water.h"

namespace loopwright {
namespace {

double Rel(double a, double b) { return std::fabs(a - b) / std::fabs(b); }

std::shared_ptr<GlycolWaterFluid> Make(Glycol g, double x) {
  std::string err;
  auto f = GlycolWaterFluid::Create(g, x, &err);
  REQUIRE_MESSAGE(bool(f), err);
  return f;
}

struct Point {
  double x, t_c, mu, rho, cp, k;
};

// Check values printed (5 significant digits) in the test suite of NREL's
// open SecondaryCoolantProps library (tests/test_ethlylene_glycol.py and
// tests/test_propylene_glycol.py), a second, independent implementation of
// Melinder's (2010) EG and PG polynomials. This checks our copy and
// evaluation of the published fit (not the fit against measurements).
// Units: mu [Pa s], rho [kg/m3], cp [J/(kg K)], k [W/(m K)].
const Point kEgPoints[] = {
    {0.0, 5, 1.5186e-03, 9.9915e02, 4.2027e03, 5.7137e-01},
    {0.0, 20, 1.0078e-03, 9.9735e02, 4.1862e03, 5.9913e-01},
    {0.0, 40, 6.5721e-04, 9.9181e02, 4.1785e03, 6.2983e-01},
    {0.2, 5, 2.6594e-03, 1.0281e03, 3.8695e03, 4.9022e-01},
    {0.2, 20, 1.6624e-03, 1.0241e03, 3.8962e03, 5.0766e-01},
    {0.2, 40, 1.0133e-03, 1.0164e03, 3.9328e03, 5.2908e-01},
    {0.4, 5, 4.7569e-03, 1.0585e03, 3.4559e03, 4.1376e-01},
    {0.4, 20, 2.8191e-03, 1.0519e03, 3.519e03, 4.253e-01},
    {0.4, 40, 1.6351e-03, 1.0414e03, 3.5978e03, 4.405e-01},
};
const Point kPgPoints[] = {
    {0.0, 5, 1.5364e-03, 1.0003e03, 4.2048e03, 5.7124e-01},
    {0.0, 20, 1.0072e-03, 9.9852e02, 4.1866e03, 5.9913e-01},
    {0.0, 40, 6.5033e-04, 9.9253e02, 4.1783e03, 6.3007e-01},
    {0.2, 5, 3.4941e-03, 1.0191e03, 3.9459e03, 4.7647e-01},
    {0.2, 20, 2.0301e-03, 1.0148e03, 3.9768e03, 4.9221e-01},
    {0.2, 40, 1.1693e-03, 1.0064e03, 4.0190e03, 5.1228e-01},
    {0.4, 5, 8.9817e-03, 1.0401e03, 3.6580e03, 3.9089e-01},
    {0.4, 20, 4.3838e-03, 1.0323e03, 3.7067e03, 4.0026e-01},
    {0.4, 40, 2.1408e-03, 1.0201e03, 3.7708e03, 4.1321e-01},
};

void CheckPoints(Glycol g, const Point* pts, int n) {
  for (int i = 0; i < n; ++i) {
    const Point& p = pts[i];
    CAPTURE(p.x);
    CAPTURE(p.t_c);
    const FluidProps f = Make(g, p.x)->Evaluate(p.t_c + 273.15, 2e5);
    // Half a unit of the 5th printed digit is at most 5e-5 relative.
    CHECK(Rel(f.mu, p.mu) < 6e-5);
    CHECK(Rel(f.rho, p.rho) < 6e-5);
    CHECK(Rel(f.cp, p.cp) < 6e-5);
    CHECK(Rel(f.k, p.k) < 6e-5);
  }
}

TEST_CASE("Melinder fits agree with an independent implementation") {
  CheckPoints(Glycol::kEthylene, kEgPoints, 9);
  CheckPoints(Glycol::kPropylene, kPgPoints, 9);
}

TEST_CASE("Melinder freezing points agree with an independent implementation") {
  // Same source as above (printed to 0.001 degC; tolerance there 0.01 degC).
  const double eg[] = {-3.357, -7.949, -14.576, -23.813, -35.994, -51.201};
  const double pg[] = {-2.867, -7.173, -12.789, -20.568, -32.193, -50.003};
  for (int i = 0; i < 6; ++i) {
    const double x = 0.1 * (i + 1);
    CHECK(std::fabs(MelinderFreezingTemperature(Glycol::kEthylene, x) - 273.15 - eg[i]) < 0.0015);
    CHECK(std::fabs(MelinderFreezingTemperature(Glycol::kPropylene, x) - 273.15 - pg[i]) < 0.0015);
  }
  CHECK(Make(Glycol::kEthylene, 0.3)->FreezingTemperature() ==
        MelinderFreezingTemperature(Glycol::kEthylene, 0.3));
}

TEST_CASE("Zero glycol approaches pure water (IAPWS via python3-iapws)") {
  // Edge-of-fit physics check: at x = 0 Melinder's fits (centred at 31 %)
  // should approach pure water. Reference: python3-iapws IAPWS97 at 0.1 MPa
  // (rho [kg/m3], cp [J/(kg K)], mu [Pa s], k [W/(m K)]). Tolerances are the
  // measured edge deviations (rho 0.09 %, cp 0.06 %, mu 1.4 %, k 0.63 %)
  // rounded up.
  const struct {
    double t_c, rho, cp, mu, k;
  } water[] = {
      {5, 999.97, 4205.0, 1.51817e-03, 0.5678},
      {20, 998.21, 4184.8, 1.00160e-03, 0.5980},
      {40, 992.22, 4178.6, 6.52731e-04, 0.6285},
      {80, 971.80, 4195.5, 3.54058e-04, 0.6670},
  };
  for (Glycol g : {Glycol::kEthylene, Glycol::kPropylene}) {
    auto f = Make(g, 0.0);
    for (const auto& w : water) {
      CAPTURE(w.t_c);
      const FluidProps p = f->Evaluate(w.t_c + 273.15, 1e5);
      CHECK(Rel(p.rho, w.rho) < 1e-3);
      CHECK(Rel(p.cp, w.cp) < 1e-3);
      CHECK(Rel(p.mu, w.mu) < 1.5e-2);
      CHECK(Rel(p.k, w.k) < 7e-3);
    }
  }
}

TEST_CASE("Trends with concentration (physics)") {
  for (Glycol g : {Glycol::kEthylene, Glycol::kPropylene}) {
    FluidProps prev = Make(g, 0.0)->Evaluate(293.15, 1e5);
    double prev_tf = Make(g, 0.0)->FreezingTemperature();
    for (double x = 0.1; x <= 0.6 + 1e-12; x += 0.1) {
      auto f = Make(g, x);
      const FluidProps p = f->Evaluate(293.15, 1e5);
      CHECK(p.rho > prev.rho);  // glycols are denser than water
      CHECK(p.mu > prev.mu);    // and more viscous
      CHECK(p.cp < prev.cp);    // with lower specific heat
      CHECK(p.k < prev.k);      // and conductivity
      CHECK(f->FreezingTemperature() < prev_tf);
      prev = p;
      prev_tf = f->FreezingTemperature();
    }
  }
}

TEST_CASE("Temperature derivatives match central differences to 1e-6") {
  for (Glycol g : {Glycol::kEthylene, Glycol::kPropylene}) {
    for (double x : {0.1, 0.3, 0.5}) {
      auto f = Make(g, x);
      for (double t : {-5.0, 10.0, 35.0, 60.0, 90.0}) {
        const double T = t + 273.15, h = 1e-3;
        if (T < f->FreezingTemperature() + 0.1) continue;
        const FluidProps a = f->Evaluate(T, 1e5), p = f->Evaluate(T + h, 1e5),
                         m = f->Evaluate(T - h, 1e5);
        CHECK(Rel(a.dmu_dT, (p.mu - m.mu) / (2 * h)) < 1e-6);
        CHECK(Rel(a.drho_dT, (p.rho - m.rho) / (2 * h)) < 1e-6);
        CHECK(Rel(a.dk_dT, (p.k - m.k) / (2 * h)) < 1e-6);
        CHECK(std::fabs(a.dcp_dT - (p.cp - m.cp) / (2 * h)) < 1e-6 * std::fabs(a.dcp_dT) + 1e-6);
      }
    }
  }
}

TEST_CASE("Range, construction errors, boiling line") {
  auto f = Make(Glycol::kEthylene, 0.3);  // freezes at -14.6 degC
  CHECK(f->InRange(273.15, 1e5).in_range);
  const RangeReport cold = f->InRange(253.15, 1e5);
  CHECK_FALSE(cold.in_range);
  CHECK(cold.message.find("freezing") != std::string::npos);
  CHECK(cold.message.find("-14.57") != std::string::npos);
  CHECK_FALSE(f->InRange(378.15, 3e5).in_range);
  std::string err;
  CHECK_FALSE(bool(GlycolWaterFluid::Create(Glycol::kPropylene, 0.7, &err)));
  CHECK(err.find("0.7") != std::string::npos);
  CHECK_FALSE(bool(GlycolWaterFluid::Create(Glycol::kPropylene, -0.1, &err)));
  // Boiling: water's IF97 saturation temperature (conservative for glycol).
  REQUIRE(f->SaturationTemperature(2e5).has_value());
  CHECK(*f->SaturationTemperature(2e5) == Iapws97SaturationTemperature(2e5));
  // Finite outside the range; clamped there.
  for (double T : {0.0, 150.0, 500.0, 1e4, std::nan("")}) {
    const FluidProps p = f->Evaluate(T, 1e5);
    CHECK(std::isfinite(p.mu));
    CHECK(std::isfinite(p.rho));
    CHECK(p.mu > 0);
    CHECK(p.k > 0);
  }
  CHECK(f->Evaluate(200.0, 1e5).mu == f->Evaluate(f->FreezingTemperature(), 1e5).mu);
  CHECK(f->Kind() == "glycol");
}

}  // namespace
}  // namespace loopwright
