// Tests of library/water.h against the verification tables printed in the
// IAPWS releases (IF97 Tables 5, 35, 36; viscosity 2008 Table 4; thermal
// conductivity 2011 Table 4). Tolerance: half a unit in the last printed digit.
#include "library/water.h"

#include <cmath>
#include <string>

#include <doctest/doctest.h>

#include "tests/library/fluid_checks.h"

namespace loopwright {
namespace {

// |value - printed| within half a unit of the 9th significant digit.
bool Digits(double value, double printed, int digits = 9) {
  const double ulp = std::pow(10.0, std::floor(std::log10(std::fabs(printed))) - (digits - 1));
  return std::fabs(value - printed) <= 0.5 * ulp * 1.0001;
}

double Rel(double a, double b) { return std::fabs(a - b) / std::fabs(b); }

TEST_CASE("IF97 region 1 verification values, Table 5") {
  // IAPWS R7-97(2012) Table 5: T [K], p [MPa], v [m3/kg], h [kJ/kg],
  // u [kJ/kg], s [kJ/(kg K)], cp [kJ/(kg K)], w [m/s], 9 significant digits.
  const struct {
    double T, p, v, h, u, s, cp, w;
  } rows[] = {
      {300, 3, 0.100215168e-2, 0.115331273e3, 0.112324818e3, 0.392294792, 0.417301218e1,
       0.150773921e4},
      {300, 80, 0.971180894e-3, 0.184142828e3, 0.106448356e3, 0.368563852, 0.401008987e1,
       0.163469054e4},
      {500, 3, 0.120241800e-2, 0.975542239e3, 0.971934985e3, 0.258041912e1, 0.465580682e1,
       0.124071337e4},
  };
  for (const auto& r : rows) {
    CAPTURE(r.T);
    CAPTURE(r.p);
    const Region1State s = Iapws97Region1(r.T, r.p * 1e6);
    CHECK(Digits(s.v, r.v));
    CHECK(Digits(s.h * 1e-3, r.h));
    CHECK(Digits(s.u * 1e-3, r.u));
    CHECK(Digits(s.s * 1e-3, r.s));
    CHECK(Digits(s.cp * 1e-3, r.cp));
    CHECK(Digits(s.w, r.w));
  }
}

TEST_CASE("IF97 region 4 verification values, Tables 35 and 36") {
  // Table 35: psat [MPa] at 300, 500, 600 K.
  CHECK(Digits(Iapws97SaturationPressure(300.0) * 1e-6, 0.353658941e-2));
  CHECK(Digits(Iapws97SaturationPressure(500.0) * 1e-6, 0.263889776e1));
  CHECK(Digits(Iapws97SaturationPressure(600.0) * 1e-6, 0.123443146e2));
  // Table 36: Tsat [K] at 0.1, 1, 10 MPa.
  CHECK(Digits(Iapws97SaturationTemperature(0.1e6), 0.372755919e3));
  CHECK(Digits(Iapws97SaturationTemperature(1.0e6), 0.453035632e3));
  CHECK(Digits(Iapws97SaturationTemperature(10.0e6), 0.584149488e3));
  // Eqs. 30 and 31 are each other's inverse (IF97 states consistency).
  for (double T : {280.0, 320.0, 373.15, 420.0, 550.0}) {
    CHECK(Rel(Iapws97SaturationTemperature(Iapws97SaturationPressure(T)), T) < 1e-9);
  }
  WaterFluid w;
  REQUIRE(w.SaturationTemperature(101325.0).has_value());
  // python3-iapws _TSat_P(0.101325 MPa) = 373.1243 K.
  CHECK(std::fabs(*w.SaturationTemperature(101325.0) - 373.1243) < 0.00005);
  // Out-of-range inputs are clamped, results stay finite.
  CHECK(std::isfinite(Iapws97SaturationTemperature(1.0)));
  CHECK(std::isfinite(Iapws97SaturationTemperature(1e9)));
  CHECK(std::isfinite(Iapws97SaturationPressure(100.0)));
  CHECK(std::isfinite(Iapws97SaturationPressure(2000.0)));
}

TEST_CASE("IAPWS 2008 viscosity check values, Table 4 (mu2 = 1)") {
  // IAPWS R12-08 Table 4: T [K], rho [kg/m3], mu [uPa s] (6 decimals).
  const struct {
    double T, rho, mu;
  } rows[] = {
      {298.15, 998, 889.735100},   {298.15, 1200, 1437.649467}, {373.15, 1000, 307.883622},
      {433.15, 1, 14.538324},      {433.15, 1000, 217.685358},  {873.15, 1, 32.619287},
      {873.15, 100, 35.802262},    {873.15, 600, 77.430195},    {1173.15, 1, 44.217245},
      {1173.15, 100, 47.640433},   {1173.15, 400, 64.154608},
  };
  for (const auto& r : rows) {
    CAPTURE(r.T);
    CAPTURE(r.rho);
    CHECK(std::fabs(WaterViscosityIapws2008(r.T, r.rho) * 1e6 - r.mu) <= 0.5e-6 * 1.0001);
  }
}

TEST_CASE("IAPWS 2011 thermal conductivity check values, Table 4 (lambda2 = 0)") {
  // IAPWS R15-11 Table 4 (values without the critical enhancement):
  // T [K], rho [kg/m3], lambda [mW/(m K)].
  CHECK(Digits(WaterConductivityIapws2011(298.15, 0.0) * 1e3, 18.4341883));
  CHECK(Digits(WaterConductivityIapws2011(298.15, 998.0) * 1e3, 607.712868));
  CHECK(Digits(WaterConductivityIapws2011(298.15, 1200.0) * 1e3, 799.038144));
  CHECK(Digits(WaterConductivityIapws2011(873.15, 0.0) * 1e3, 79.1034659));
}

TEST_CASE("WaterFluid properties are the formulations composed") {
  WaterFluid w;
  const double T = 330.0, p = 5e5;
  const FluidProps f = w.Evaluate(T, p);
  const Region1State s = Iapws97Region1(T, p);
  CHECK(Rel(f.rho, 1.0 / s.v) < 1e-14);
  CHECK(Rel(f.cp, s.cp) < 1e-14);
  CHECK(Rel(f.mu, WaterViscosityIapws2008(T, 1.0 / s.v)) < 1e-13);
  CHECK(Rel(f.k, WaterConductivityIapws2011(T, 1.0 / s.v)) < 1e-13);
  CHECK(w.Kind() == "water");
}

TEST_CASE("WaterFluid temperature derivatives match central differences to 1e-6") {
  WaterFluid w;
  for (double T : {275.0, 300.0, 330.0, 360.0, 400.0, 420.0}) {
    const double p = 10e5, h = 1e-3;
    CAPTURE(T);
    const FluidProps f = w.Evaluate(T, p), fp = w.Evaluate(T + h, p), fm = w.Evaluate(T - h, p);
    CHECK(Rel(f.dmu_dT, (fp.mu - fm.mu) / (2 * h)) < 1e-6);
    CHECK(Rel(f.dk_dT, (fp.k - fm.k) / (2 * h)) < 1e-6);
    CHECK(Rel(f.dcp_dT, (fp.cp - fm.cp) / (2 * h)) < 1e-5);  // dcp/dT is small near 35 degC
    // drho/dT crosses zero at 4 degC; compare absolutely there.
    CHECK(std::fabs(f.drho_dT - (fp.rho - fm.rho) / (2 * h)) <
          1e-6 * std::fabs(f.drho_dT) + 1e-7);
  }
}

TEST_CASE("WaterFluid range and behaviour outside it") {
  WaterFluid w;
  CHECK(w.InRange(300.0, 2e5).in_range);
  CHECK(w.InRange(420.0, 10e5).in_range);
  const RangeReport boil = w.InRange(380.0, 1e5);  // 106.85 degC at 1 bar abs
  CHECK_FALSE(boil.in_range);
  CHECK(boil.message.find("saturation") != std::string::npos);
  CHECK_FALSE(w.InRange(300.0, 11e6).in_range);
  CHECK_FALSE(w.InRange(430.0, 20e5).in_range);
  CHECK_FALSE(w.InRange(272.0, 1e5).in_range);
  // Below psat the liquid is evaluated at psat (finite, liquid-like values).
  const FluidProps f = w.Evaluate(380.0, 1e5);
  CHECK(f.rho > 900.0);
  for (double T : {0.0, 200.0, 700.0, 1e5, std::nan("")}) {
    for (double p : {-1e5, 0.0, 1e5, 1e9, std::nan("")}) CheckFiniteProps(w.Evaluate(T, p));
  }
}

}  // namespace
}  // namespace loopwright
