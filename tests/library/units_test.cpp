// Tests for library/units: parsing, conversion factors, printing conversions,
// error messages, robustness.
//
// Factors are checked against NIST SP 811 (2008), Appendix B.8 [NIST]; where
// B.8 gives a rounded table value of an exactly defined factor, the exact
// value (from the exact definitions of the inch, pound, g_n, Btu_IT) is used
// at 1e-12 and the 7-digit table value is checked at its own precision.

#include <doctest/doctest.h>

#include <cmath>
#include <random>
#include <string>
#include <vector>

#include "library/units.h"

using loopwright::AcceptedUnits;
using loopwright::AllDimensions;
using loopwright::Dimension;
using loopwright::DimensionFromKey;
using loopwright::DimensionKey;
using loopwright::DimensionName;
using loopwright::DisplayUnit;
using loopwright::FromSI;
using loopwright::NearestName;
using loopwright::ParsedQuantity;
using loopwright::ParseQuantity;
using loopwright::ToSI;
using loopwright::UnitSystem;

namespace {

constexpr double kTight = 1e-12;
constexpr double kPi = 3.14159265358979323846;

// SI value of `text`, requiring a successful parse.
double SI(const std::string& text, Dimension dim, double ambient = 101325.0) {
  const ParsedQuantity q = ParseQuantity(text, dim, ambient);
  INFO("text: ", text, "  error: ", q.error);
  REQUIRE(q.ok);
  return q.si;
}

// Factor of one unit: SI value of "1 unit".
double F(const std::string& unit, Dimension dim) { return SI("1 " + unit, dim); }

std::string Err(const std::string& text, Dimension dim) {
  const ParsedQuantity q = ParseQuantity(text, dim);
  INFO("text: ", text);
  CHECK_FALSE(q.ok);
  CHECK_FALSE(q.error.empty());
  return q.error;
}

bool Contains(const std::string& s, const std::string& part) {
  return s.find(part) != std::string::npos;
}

}  // namespace

TEST_CASE("number syntax; text without a unit is refused for a dimensional quantity") {
  CHECK(SI("  -3.5e2 Pa ", Dimension::kPressureDifference) == -350.0);
  CHECK(SI("+.5", Dimension::kDimensionless) == 0.5);
  CHECK(SI("5.", Dimension::kDimensionless) == 5.0);
  CHECK(SI("1E-3 s", Dimension::kTime) == 1e-3);
  CHECK(SI("2e5 Pa", Dimension::kPressure) == 2e5);  // gauge Pa
  // "0.9" in a pressure field was read as 0.9 Pa; a bare JSON number stays
  // SI (the case loader reads it without this parser), text must name its unit.
  for (const auto& [text, dim] : std::vector<std::pair<const char*, Dimension>>{
           {"0.9", Dimension::kPressure}, {"12", Dimension::kLength}, {"  -3.5e2  ", Dimension::kPressureDifference},
           {"1E-3", Dimension::kTime}, {"300", Dimension::kTemperature}, {"8", Dimension::kVolumeFlow},
           {"101325 abs", Dimension::kPressure}}) {
    const std::string e = Err(text, dim);
    CHECK(Contains(e, "missing unit in"));
    CHECK(Contains(e, "accepted units: " + AcceptedUnits(dim)[0]));
  }
  {
    const std::string e = Err("0.9", Dimension::kPressure);
    CHECK(Contains(e, "missing unit in \"0.9\": a pressure written as text needs a unit, e.g. \"0.9 bar\"; "
                      "only a JSON number without quotes (0.9) is read in SI (Pa)"));
  }
  // Dimensionless numbers and Kv (the coefficient is its own unit) need none.
  CHECK(SI("0.25", Dimension::kDimensionless) == 0.25);
  CHECK(SI("4.2", Dimension::kFlowCoefficientKv) == 4.2);
  // "12mm" reads like "12 mm"; several spaces are fine.
  CHECK(SI("12mm", Dimension::kLength) == doctest::Approx(0.012).epsilon(kTight));
  CHECK(SI("12   mm", Dimension::kLength) == doctest::Approx(0.012).epsilon(kTight));
  CHECK(SI("\t1e3mm\n", Dimension::kLength) == doctest::Approx(1.0).epsilon(kTight));
  CHECK(SI("1.5e-3m", Dimension::kLength) == doctest::Approx(1.5e-3).epsilon(kTight));
}

TEST_CASE("bad numbers give ok=false") {
  for (const char* t : {"nan bar", "NaN", "inf Pa", "-inf", "Infinity bar", "1e999 Pa",
                        "", "   ", "12..3 mm", "abc", "0x1A Pa", "- 5 bar", ".", "e5",
                        "1,5 bar", "5 bar xyz", "1 000 Pa", "--1", "1e", "1e+ Pa"}) {
    const ParsedQuantity q = ParseQuantity(t, Dimension::kPressure);
    INFO("text: \"", t, "\"  error: ", q.error);
    CHECK_FALSE(q.ok);
    CHECK_FALSE(q.error.empty());
  }
  CHECK(Contains(Err("1e999 Pa", Dimension::kPressure), "out of range"));
  CHECK(Contains(Err("nan bar", Dimension::kPressure), "finite"));
  CHECK(Contains(Err("3 kpa", Dimension::kPressure), "case-sensitive"));
  CHECK(Contains(Err("12..3 mm", Dimension::kLength), "malformed number"));
  CHECK(Contains(Err("0x10", Dimension::kLength), "hexadecimal"));
  CHECK(Contains(Err("", Dimension::kLength), "empty"));
  CHECK(Contains(Err("1,5 bar", Dimension::kPressure), "decimal separator"));
  // The message says what was expected and what was given.
  const std::string e = Err("abc", Dimension::kPressure);
  CHECK(Contains(e, "pressure"));
  CHECK(Contains(e, "\"abc\""));
  // Length limit.
  CHECK(Contains(Err("1" + std::string(300, ' '), Dimension::kLength), "too long"));
  CHECK(Contains(Err(std::string(257, '1'), Dimension::kLength), "too long"));
}

TEST_CASE("pressure units ([NIST] B.8)") {
  const Dimension P = Dimension::kPressure;
  CHECK(F("Pa", P) == 1.0);
  CHECK(F("hPa", P) == doctest::Approx(100.0).epsilon(kTight));
  CHECK(F("kPa", P) == doctest::Approx(1e3).epsilon(kTight));
  CHECK(F("MPa", P) == doctest::Approx(1e6).epsilon(kTight));
  CHECK(F("bar", P) == doctest::Approx(1e5).epsilon(kTight));   // B.8 bar 1.0 E+05 (exact)
  CHECK(F("mbar", P) == doctest::Approx(1e2).epsilon(kTight));  // B.8 millibar 1.0 E+02 (exact)
  // B.8 psi 6.894 757 E+03 Pa; exact lbf/in2 = 6894.757293168361 Pa.
  CHECK(F("psi", P) == doctest::Approx(6894.757293168361).epsilon(kTight));
  CHECK(F("psi", P) == doctest::Approx(6.894757e3).epsilon(1e-7));
  // B.8 inch of water (60 degF) 2.4884 E+02 Pa.
  CHECK(F("inH2O", P) == doctest::Approx(248.84).epsilon(kTight));
  // Same units for a difference.
  const Dimension D = Dimension::kPressureDifference;
  for (const char* u : {"Pa", "hPa", "kPa", "MPa", "bar", "mbar", "psi", "inH2O"})
    CHECK(F(u, D) == doctest::Approx(F(u, P)).epsilon(kTight));
}

TEST_CASE("gauge and absolute pressure") {
  const Dimension P = Dimension::kPressure;
  const double psi = 6894.757293168361;
  // Gauge by default and with explicit gauge qualifiers.
  CHECK(SI("2 bar", P) == doctest::Approx(2e5).epsilon(kTight));
  CHECK(SI("2 barg", P) == doctest::Approx(2e5).epsilon(kTight));
  CHECK(SI("40 psig", P) == doctest::Approx(40 * psi).epsilon(kTight));
  CHECK(SI("40 psi g", P) == doctest::Approx(40 * psi).epsilon(kTight));
  CHECK(SI("300 kPa gauge", P) == doctest::Approx(3e5).epsilon(kTight));
  CHECK_FALSE(ParseQuantity("2 bar", P).absolute);
  CHECK_FALSE(ParseQuantity("2 barg", P).absolute);
  // Absolute -> gauge by subtracting the ambient.
  {
    const ParsedQuantity q = ParseQuantity("14.696 psia", P, 101325.0);
    REQUIRE(q.ok);
    CHECK(q.absolute);
    // 14.696 psia is one standard atmosphere to the printed digits: |gauge| <
    // half a unit of the last printed digit (0.0005 psi).
    CHECK(std::fabs(q.si) < 0.0005 * psi);
    CHECK(q.si == doctest::Approx(14.696 * psi - 101325.0).epsilon(kTight));
  }
  CHECK(SI("50 psia", P, 101325.0) == doctest::Approx(50 * psi - 101325.0).epsilon(kTight));
  CHECK(SI("3 bara", P, 1e5) == doctest::Approx(2e5).epsilon(kTight));
  CHECK(SI("101 kPa abs", P, 101325.0) == doctest::Approx(-325.0).epsilon(kTight));
  CHECK(SI("1.2 bar abs", P, 101325.0) == doctest::Approx(18675.0).epsilon(kTight));
  CHECK(SI("1.2 bar absolute", P, 1e5) == doctest::Approx(2e4).epsilon(kTight));
  CHECK(SI("1.2 bar ABS", P, 1e5) == doctest::Approx(2e4).epsilon(kTight));
  CHECK(SI("101325 Pa abs", P, 101325.0) == doctest::Approx(0.0));
  CHECK(ParseQuantity("1.2 bar abs", P).absolute);
  // Another ambient (altitude) changes the gauge value.
  CHECK(SI("1 bara", P, 0.9e5) == doctest::Approx(1e4).epsilon(kTight));
  // Negative absolute pressure, double qualifiers.
  CHECK(Contains(Err("-1 bara", P), "negative"));
  CHECK_FALSE(ParseQuantity("2 psia abs", P).ok);
  CHECK_FALSE(ParseQuantity("2 psig abs", P).ok);
  CHECK_FALSE(ParseQuantity("1 bara", P, std::nan("")).ok);
}

TEST_CASE("a pressure difference is neither gauge nor absolute") {
  const Dimension D = Dimension::kPressureDifference;
  for (const char* t : {"1 bar abs", "1 bara", "2 psia", "2 psig", "1 barg",
                        "3 kPa gauge", "3 kPa g", "4 psi absolute"}) {
    const std::string e = Err(t, D);
    INFO(e);
    CHECK(Contains(e, "neither gauge nor absolute"));
  }
  CHECK(Contains(Err("2 psia", D), "\"2 psi\""));
  CHECK(SI("0.5 bar", D) == doctest::Approx(5e4).epsilon(kTight));
  CHECK_FALSE(ParseQuantity("0.5 bar", D).absolute);
}

TEST_CASE("volumetric and mass flow ([NIST] B.8)") {
  const Dimension Q = Dimension::kVolumeFlow;
  CHECK(F("m3/s", Q) == 1.0);
  CHECK(F("m3/h", Q) == doctest::Approx(1.0 / 3600).epsilon(kTight));
  CHECK(F("L/min", Q) == doctest::Approx(1e-3 / 60).epsilon(kTight));  // B.8 liter 1.0 E-03 m3
  CHECK(F("L/s", Q) == doctest::Approx(1e-3).epsilon(kTight));
  CHECK(F("L/h", Q) == doctest::Approx(1e-3 / 3600).epsilon(kTight));
  // B.8 gallon [U.S.] per minute 6.309 020 E-05 m3/s; exact 6.30901964e-5.
  CHECK(F("gpm", Q) == doctest::Approx(6.30901964e-5).epsilon(kTight));
  CHECK(F("USgpm", Q) == doctest::Approx(6.30901964e-5).epsilon(kTight));
  CHECK(F("US gpm", Q) == doctest::Approx(6.30901964e-5).epsilon(kTight));
  CHECK(F("gpm", Q) == doctest::Approx(6.309020e-5).epsilon(1e-6));
  CHECK(SI("8 L / min", Q) == doctest::Approx(8e-3 / 60).epsilon(kTight));

  const Dimension M = Dimension::kMassFlow;
  CHECK(F("kg/s", M) == 1.0);
  CHECK(F("kg/h", M) == doctest::Approx(1.0 / 3600).epsilon(kTight));
  CHECK(F("kg/min", M) == doctest::Approx(1.0 / 60).epsilon(kTight));
  CHECK(F("g/s", M) == doctest::Approx(1e-3).epsilon(kTight));
  // B.8 pound per hour 1.259 979 E-04; per minute 7.559 873 E-03; per second
  // 4.535 924 E-01 kg/s; exact from 1 lb = 0.45359237 kg.
  CHECK(F("lb/h", M) == doctest::Approx(0.45359237 / 3600).epsilon(kTight));
  CHECK(F("lb/min", M) == doctest::Approx(0.45359237 / 60).epsilon(kTight));
  CHECK(F("lb/s", M) == doctest::Approx(0.45359237).epsilon(kTight));
  CHECK(F("lb/h", M) == doctest::Approx(1.259979e-4).epsilon(1e-6));
  CHECK(F("lb/min", M) == doctest::Approx(7.559873e-3).epsilon(1e-6));
}

TEST_CASE("length, area, volume, displacement ([NIST] B.8)") {
  const Dimension L = Dimension::kLength;
  CHECK(F("m", L) == 1.0);
  CHECK(F("cm", L) == doctest::Approx(1e-2).epsilon(kTight));
  CHECK(F("mm", L) == doctest::Approx(1e-3).epsilon(kTight));
  CHECK(F("um", L) == doctest::Approx(1e-6).epsilon(kTight));
  CHECK(F("\xC2\xB5m", L) == doctest::Approx(1e-6).epsilon(kTight));  // micro sign
  CHECK(F("\xCE\xBCm", L) == doctest::Approx(1e-6).epsilon(kTight));  // Greek mu
  CHECK(F("in", L) == doctest::Approx(0.0254).epsilon(kTight));      // B.8 inch 2.54 E-02 (exact)
  CHECK(F("ft", L) == doctest::Approx(0.3048).epsilon(kTight));      // B.8 foot 3.048 E-01 (exact)
  CHECK(F("thou", L) == doctest::Approx(2.54e-5).epsilon(kTight));   // B.8 mil 2.54 E-05 (exact)
  CHECK(F("mil", L) == doctest::Approx(2.54e-5).epsilon(kTight));

  const Dimension A = Dimension::kArea;
  CHECK(F("m2", A) == 1.0);
  CHECK(F("m\xC2\xB2", A) == 1.0);  // m squared sign
  CHECK(F("m^2", A) == 1.0);
  CHECK(F("cm2", A) == doctest::Approx(1e-4).epsilon(kTight));
  CHECK(F("mm2", A) == doctest::Approx(1e-6).epsilon(kTight));
  CHECK(F("in2", A) == doctest::Approx(6.4516e-4).epsilon(kTight));     // B.8 (exact)
  CHECK(F("ft2", A) == doctest::Approx(9.290304e-2).epsilon(kTight));   // B.8 (exact)

  const Dimension V = Dimension::kVolume;
  CHECK(F("m3", V) == 1.0);
  CHECK(F("L", V) == doctest::Approx(1e-3).epsilon(kTight));
  CHECK(F("cm3", V) == doctest::Approx(1e-6).epsilon(kTight));
  CHECK(F("mL", V) == doctest::Approx(1e-6).epsilon(kTight));
  CHECK(F("in3", V) == doctest::Approx(1.6387064e-5).epsilon(kTight));  // B.8 (exact)
  // B.8 gallon [U.S.] 3.785 412 E-03 m3; exact 231 in3 = 3.785411784e-3 m3.
  CHECK(F("US gal", V) == doctest::Approx(3.785411784e-3).epsilon(kTight));
  CHECK(F("gal", V) == doctest::Approx(3.785411784e-3).epsilon(kTight));
  CHECK(F("US gal", V) == doctest::Approx(3.785412e-3).epsilon(1e-6));

  const Dimension X = Dimension::kDisplacement;
  CHECK(F("m3/rev", X) == 1.0);
  CHECK(F("cm3/rev", X) == doctest::Approx(1e-6).epsilon(kTight));
  CHECK(F("cc/rev", X) == doctest::Approx(1e-6).epsilon(kTight));
  CHECK(F("mL/rev", X) == doctest::Approx(1e-6).epsilon(kTight));
  CHECK(F("L/rev", X) == doctest::Approx(1e-3).epsilon(kTight));
  CHECK(F("in3/rev", X) == doctest::Approx(1.6387064e-5).epsilon(kTight));
}

TEST_CASE("temperature versus temperature difference ([NIST] B.9)") {
  const Dimension T = Dimension::kTemperature;
  const Dimension DT = Dimension::kTemperatureDifference;
  CHECK(SI("10 degC", T) == doctest::Approx(283.15).epsilon(kTight));
  CHECK(SI("10 degC", DT) == doctest::Approx(10.0).epsilon(kTight));
  CHECK(SI("18 degF", DT) == doctest::Approx(10.0).epsilon(kTight));
  CHECK(SI("18 delta_degF", DT) == doctest::Approx(10.0).epsilon(kTight));
  CHECK(SI("10 delta_degC", DT) == doctest::Approx(10.0).epsilon(kTight));
  CHECK(SI("18 \xC2\xB0" "F", DT) == doctest::Approx(10.0).epsilon(kTight));
  CHECK(SI("10 \xC2\xB0" "C", DT) == doctest::Approx(10.0).epsilon(kTight));
  CHECK(SI("10 K", DT) == 10.0);
  CHECK(SI("32 degF", T) == doctest::Approx(273.15).epsilon(kTight));
  CHECK(SI("212 \xC2\xB0" "F", T) == doctest::Approx(373.15).epsilon(kTight));
  CHECK(SI("-40 F", T) == doctest::Approx(233.15).epsilon(kTight));
  CHECK(SI("-40 C", T) == doctest::Approx(233.15).epsilon(kTight));
  CHECK(SI("90 \xC2\xB0" "C", T) == doctest::Approx(363.15).epsilon(kTight));
  CHECK(SI("90 deg C", T) == doctest::Approx(363.15).epsilon(kTight));
  CHECK(SI("300 K", T) == 300.0);
  CHECK(SI("491.67 degR", T) == doctest::Approx(273.15).epsilon(kTight));
  CHECK(SI("-459.67 degF", T) == doctest::Approx(0.0));
  CHECK(Contains(Err("-300 degC", T), "absolute zero"));
  // delta units are differences only.
  const std::string e = Err("10 delta_degC", T);
  CHECK(Contains(e, "temperature difference"));
  CHECK(Contains(e, "this field is a temperature"));
}

TEST_CASE("viscosity, density ([NIST] B.8)") {
  const Dimension NU = Dimension::kKinematicViscosity;
  CHECK(F("m2/s", NU) == 1.0);
  CHECK(F("mm2/s", NU) == doctest::Approx(1e-6).epsilon(kTight));
  CHECK(F("cSt", NU) == doctest::Approx(1e-6).epsilon(kTight));  // B.8 centistokes 1.0 E-06
  CHECK(F("St", NU) == doctest::Approx(1e-4).epsilon(kTight));   // B.8 stokes 1.0 E-04

  const Dimension MU = Dimension::kDynamicViscosity;
  CHECK(F("Pa.s", MU) == 1.0);
  CHECK(F("Pa s", MU) == 1.0);
  CHECK(F("Pa\xC2\xB7s", MU) == 1.0);  // middle dot
  CHECK(F("Pa*s", MU) == 1.0);
  CHECK(F("mPa.s", MU) == doctest::Approx(1e-3).epsilon(kTight));
  CHECK(F("cP", MU) == doctest::Approx(1e-3).epsilon(kTight));  // B.8 centipoise 1.0 E-03
  CHECK(F("P", MU) == doctest::Approx(0.1).epsilon(kTight));    // B.8 poise 1.0 E-01

  const Dimension RHO = Dimension::kDensity;
  CHECK(F("kg/m3", RHO) == 1.0);
  CHECK(F("kg/m\xC2\xB3", RHO) == 1.0);
  CHECK(F("g/cm3", RHO) == doctest::Approx(1e3).epsilon(kTight));
  CHECK(F("kg/L", RHO) == doctest::Approx(1e3).epsilon(kTight));
  // B.8 pound per cubic foot 1.601 846 E+01; pound per gallon [U.S.] 1.198 264 E+02.
  CHECK(F("lb/ft3", RHO) == doctest::Approx(16.0184633739601396).epsilon(kTight));
  CHECK(F("lb/gal", RHO) == doctest::Approx(119.826427316896629).epsilon(kTight));
  CHECK(F("lb/ft3", RHO) == doctest::Approx(1.601846e1).epsilon(1e-6));
  CHECK(F("lb/gal", RHO) == doctest::Approx(1.198264e2).epsilon(1e-6));
}

TEST_CASE("power, conductance, specific heat, conductivity ([NIST] B.8)") {
  const Dimension W = Dimension::kPower;
  CHECK(F("W", W) == 1.0);
  CHECK(F("kW", W) == doctest::Approx(1e3).epsilon(kTight));
  CHECK(F("MW", W) == doctest::Approx(1e6).epsilon(kTight));
  // B.8 horsepower (550 ft.lbf/s) 7.456 999 E+02 W; exact 745.69987158227022.
  CHECK(F("hp", W) == doctest::Approx(745.69987158227022).epsilon(kTight));
  // B.8 Btu_IT/h 2.930 711 E-01 W; Btu_IT/min 1.758 426 E+01 W (Btu_IT = 1055.05585262 J).
  CHECK(F("BTU/h", W) == doctest::Approx(0.29307107017222222).epsilon(kTight));
  CHECK(F("Btu/h", W) == doctest::Approx(0.29307107017222222).epsilon(kTight));
  CHECK(F("BTU/min", W) == doctest::Approx(17.584264210333333).epsilon(kTight));
  CHECK(F("BTU/h", W) == doctest::Approx(2.930711e-1).epsilon(1e-6));

  const Dimension UA = Dimension::kConductance;
  CHECK(F("W/K", UA) == 1.0);
  CHECK(F("kW/K", UA) == doctest::Approx(1e3).epsilon(kTight));
  // B.8 Btu_IT/degF 1.899 101 E+03 J/K, per hour: 0.52752792631 W/K.
  for (const char* u : {"BTU/(h.degF)", "BTU/h/degF", "BTU/(h.F)", "Btu/(h\xC2\xB7\xC2\xB0" "F)"})
    CHECK(F(u, UA) == doctest::Approx(0.52752792631).epsilon(kTight));

  const Dimension CP = Dimension::kSpecificHeat;
  for (const char* u : {"J/(kg.K)", "J/kg/K", "J/(kg K)", "J/(kg\xC2\xB7K)"})
    CHECK(F(u, CP) == 1.0);
  CHECK(F("kJ/(kg.K)", CP) == doctest::Approx(1e3).epsilon(kTight));
  CHECK(F("kJ/kg/K", CP) == doctest::Approx(1e3).epsilon(kTight));
  // B.8 Btu_IT/(lb.degF) 4.1868 E+03 J/(kg.K), exact.
  CHECK(F("BTU/(lb.degF)", CP) == doctest::Approx(4186.8).epsilon(kTight));
  CHECK(F("BTU/lb/F", CP) == doctest::Approx(4186.8).epsilon(kTight));

  const Dimension K = Dimension::kThermalConductivity;
  CHECK(F("W/(m.K)", K) == 1.0);
  CHECK(F("W/m/K", K) == 1.0);
  // B.8 Btu_IT.ft/(h.ft2.degF) 1.730 735 E+00 W/(m.K).
  CHECK(F("BTU/(h.ft.degF)", K) == doctest::Approx(1.7307346663713911).epsilon(kTight));
  CHECK(F("BTU/(h.ft.degF)", K) == doctest::Approx(1.730735).epsilon(1e-6));
}

TEST_CASE("speed, velocity, time, slip, inverse temperature, Kv, dimensionless") {
  const Dimension N = Dimension::kRotationalSpeed;
  CHECK(F("rad/s", N) == 1.0);
  // B.8 revolution (r) 6.283 185 E+00 rad (2 pi rad): 1 rpm = 2 pi/60 rad/s.
  CHECK(F("rpm", N) == doctest::Approx(2 * kPi / 60).epsilon(kTight));
  CHECK(F("rev/min", N) == doctest::Approx(2 * kPi / 60).epsilon(kTight));
  CHECK(F("rev/s", N) == doctest::Approx(2 * kPi).epsilon(kTight));
  CHECK(F("krpm", N) == doctest::Approx(2000 * kPi / 60).epsilon(kTight));
  CHECK(F("rpm", N) == doctest::Approx(1.047198e-1).epsilon(1e-6));
  CHECK(Contains(Err("50 Hz", N), "rev/s"));

  const Dimension U = Dimension::kVelocity;
  CHECK(F("m/s", U) == 1.0);
  CHECK(F("ft/s", U) == doctest::Approx(0.3048).epsilon(kTight));     // B.8 (exact)
  CHECK(F("ft/min", U) == doctest::Approx(5.08e-3).epsilon(kTight));  // B.8 (exact)

  const Dimension TI = Dimension::kTime;
  CHECK(F("s", TI) == 1.0);
  CHECK(F("ms", TI) == doctest::Approx(1e-3).epsilon(kTight));
  CHECK(F("min", TI) == 60.0);
  CHECK(F("h", TI) == 3600.0);

  const Dimension C = Dimension::kSlipCoefficient;
  CHECK(F("m3", C) == 1.0);
  CHECK(F("cm3", C) == doctest::Approx(1e-6).epsilon(kTight));
  CHECK(F("mm3", C) == doctest::Approx(1e-9).epsilon(kTight));

  const Dimension B = Dimension::kInverseTemperature;
  CHECK(F("1/K", B) == 1.0);
  CHECK(F("1/degC", B) == 1.0);
  CHECK(F("1/degF", B) == doctest::Approx(1.8).epsilon(kTight));
  CHECK(SI("7e-4 1/K", B) == doctest::Approx(7e-4).epsilon(kTight));

  const Dimension KV = Dimension::kFlowCoefficientKv;
  CHECK(F("Kv", KV) == 1.0);
  CHECK(F("Cv", KV) == doctest::Approx(0.865).epsilon(kTight));  // IEC 60534-1: Kv = 0.865 Cv
  CHECK(SI("4.2", KV) == 4.2);

  const Dimension ONE = Dimension::kDimensionless;
  CHECK(SI("0.7", ONE) == 0.7);
  CHECK(SI("0.7 -", ONE) == 0.7);
  CHECK(SI("0.7 1", ONE) == 0.7);
  CHECK(SI("70 %", ONE) == doctest::Approx(0.7).epsilon(kTight));
  CHECK(SI("70%", ONE) == doctest::Approx(0.7).epsilon(kTight));
}

TEST_CASE("display units and round trips in both systems") {
  struct Expect { Dimension dim; const char* si; const char* us; };
  const Expect expected[] = {
      {Dimension::kPressure, "bar", "psi"},
      {Dimension::kPressureDifference, "bar", "psi"},
      {Dimension::kVolumeFlow, "L/min", "gpm"},
      {Dimension::kMassFlow, "kg/s", "lb/min"},
      {Dimension::kLength, "mm", "in"},
      {Dimension::kTemperature, "degC", "degF"},
      {Dimension::kTemperatureDifference, "K", "delta_degF"},
      {Dimension::kKinematicViscosity, "cSt", "cSt"},
      {Dimension::kDynamicViscosity, "mPa.s", "cP"},
      {Dimension::kDensity, "kg/m3", "lb/ft3"},
      {Dimension::kPower, "kW", "hp"},
      {Dimension::kConductance, "W/K", "BTU/(h.degF)"},
      {Dimension::kRotationalSpeed, "rpm", "rpm"},
      {Dimension::kVelocity, "m/s", "ft/s"},
      {Dimension::kArea, "mm2", "in2"},
      {Dimension::kVolume, "L", "US gal"},
      {Dimension::kDisplacement, "cm3/rev", "in3/rev"},
  };
  for (const Expect& e : expected) {
    CHECK(DisplayUnit(e.dim, UnitSystem::kSI) == e.si);
    CHECK(DisplayUnit(e.dim, UnitSystem::kUS) == e.us);
  }
  // Spot values.
  CHECK(FromSI(2e5, Dimension::kPressure, UnitSystem::kSI) == doctest::Approx(2.0));
  CHECK(FromSI(6894.757293168361, Dimension::kPressure, UnitSystem::kUS) ==
        doctest::Approx(1.0).epsilon(kTight));
  CHECK(FromSI(363.15, Dimension::kTemperature, UnitSystem::kSI) == doctest::Approx(90.0));
  CHECK(FromSI(273.15, Dimension::kTemperature, UnitSystem::kUS) == doctest::Approx(32.0));
  CHECK(FromSI(10.0, Dimension::kTemperatureDifference, UnitSystem::kUS) ==
        doctest::Approx(18.0));
  CHECK(FromSI(1e-3 / 60, Dimension::kVolumeFlow, UnitSystem::kSI) == doctest::Approx(1.0));
  CHECK(FromSI(46e-6, Dimension::kKinematicViscosity, UnitSystem::kUS) == doctest::Approx(46.0));
  CHECK(ToSI(1500, Dimension::kRotationalSpeed, UnitSystem::kSI) ==
        doctest::Approx(1500 * 2 * kPi / 60));
  CHECK(ToSI(3.0, Dimension::kFlowCoefficientKv, UnitSystem::kUS) == doctest::Approx(2.595));
  // NIST SP 811 (2008) B.8: pound-force = 4.448 222 E+00 N; kilogram-force 9.806 65 E+00 N (exact).
  CHECK(ParseQuantity("1 lbf", Dimension::kForce).si == doctest::Approx(4.448222).epsilon(1e-7));
  CHECK(ParseQuantity("2 kgf", Dimension::kForce).si == doctest::Approx(2 * 9.80665).epsilon(1e-15));
  CHECK(ParseQuantity("3 kN", Dimension::kForce).si == doctest::Approx(3000.0));
  // NIST SP 811 (2008) B.8: pound (avoirdupois) = 4.535 924 E-01 kg (0.45359237 exact).
  CHECK(ParseQuantity("2 lb", Dimension::kMass).si == doctest::Approx(0.90718474).epsilon(1e-15));
  CHECK(ParseQuantity("250 g", Dimension::kMass).si == doctest::Approx(0.25).epsilon(1e-15));

  const double values[] = {-3.5, 0.0, 1.0, 42.25, 1e5, 0.0123};
  const std::vector<Dimension> dims = AllDimensions();
  CHECK(dims.size() == 26);
  for (Dimension d : dims) {
    for (UnitSystem sys : {UnitSystem::kSI, UnitSystem::kUS}) {
      const std::string unit = DisplayUnit(d, sys);
      INFO("dimension ", DimensionKey(d), " unit \"", unit, "\"");
      for (double v : values) {
        // SI -> display -> SI and display -> SI -> display.
        CHECK(ToSI(FromSI(v, d, sys), d, sys) == doctest::Approx(v).epsilon(1e-12).scale(1.0));
        CHECK(FromSI(ToSI(v, d, sys), d, sys) == doctest::Approx(v).epsilon(1e-12).scale(1.0));
        // The display unit parses back to the same SI value.
        if (d == Dimension::kTemperature && ToSI(v, d, sys) < 0) continue;
        const std::string text = std::to_string(v) + (unit.empty() ? "" : " " + unit);
        const ParsedQuantity q = ParseQuantity(text, d);
        INFO("text ", text, " error ", q.error);
        REQUIRE(q.ok);
        CHECK(q.si == doctest::Approx(ToSI(std::stod(std::to_string(v)), d, sys))
                          .epsilon(1e-12).scale(1.0));
      }
    }
  }
}

TEST_CASE("dimension names, keys, accepted units") {
  for (Dimension d : AllDimensions()) {
    const std::string key = DimensionKey(d);
    CHECK_FALSE(key.empty());
    CHECK_FALSE(DimensionName(d).empty());
    Dimension back = Dimension::kDimensionless;
    CHECK(DimensionFromKey(key, back));
    CHECK(back == d);
    const std::vector<std::string> units = AcceptedUnits(d);
    REQUIRE_FALSE(units.empty());
    // Every accepted spelling parses, and the first is the SI unit.
    for (const std::string& u : units) {
      const ParsedQuantity q = ParseQuantity("1 " + u, d);
      INFO(DimensionKey(d), " ", u, " ", q.error);
      CHECK(q.ok);
    }
    if (d != Dimension::kTemperature && d != Dimension::kPressure)
      CHECK(SI("1 " + units[0], d) == 1.0);
  }
  CHECK(DimensionKey(Dimension::kPressure) == "pressure");
  CHECK(DimensionKey(Dimension::kPressureDifference) == "pressure_difference");
  CHECK(DimensionKey(Dimension::kVolumeFlow) == "volume_flow");
  CHECK(DimensionName(Dimension::kVolumeFlow) == "volumetric flow");
  CHECK(AcceptedUnits(Dimension::kPressure).front() == "Pa");
  Dimension unused = Dimension::kLength;
  CHECK_FALSE(DimensionFromKey("no_such_dimension", unused));
  CHECK(unused == Dimension::kLength);
}

TEST_CASE("wrong dimension errors mention both dimensions") {
  {
    const std::string e = Err("8 L/min", Dimension::kPressure);
    CHECK(Contains(e, "\"L/min\" is a volumetric flow"));
    CHECK(Contains(e, "this field is a pressure"));
    CHECK(Contains(e, "psi"));  // lists accepted units
  }
  {
    const std::string e = Err("40 psi", Dimension::kVolumeFlow);
    CHECK(Contains(e, "pressure"));
    CHECK(Contains(e, "volumetric flow"));
  }
  {
    const std::string e = Err("1.2 bar abs", Dimension::kLength);
    CHECK(Contains(e, "pressure"));
    CHECK(Contains(e, "length"));
  }
  {
    const std::string e = Err("46 cSt", Dimension::kDynamicViscosity);
    CHECK(Contains(e, "kinematic viscosity"));
    CHECK(Contains(e, "dynamic viscosity"));
  }
  {
    const std::string e = Err("10 cm3", Dimension::kDisplacement);
    CHECK(Contains(e, "volume"));
    CHECK(Contains(e, "displacement per revolution"));
  }
  CHECK(Contains(Err("5 %", Dimension::kLength), "dimensionless"));
}

TEST_CASE("unknown unit suggestions") {
  {
    const std::string e = Err("40 psl", Dimension::kPressure);
    CHECK(Contains(e, "unknown unit \"psl\" for pressure"));
    CHECK(Contains(e, "did you mean \"psi\"?"));
    CHECK(Contains(e, "accepted: Pa, hPa, kPa, MPa, bar, mbar, psi, inH2O"));
  }
  CHECK(Contains(Err("8 L/mn", Dimension::kVolumeFlow), "did you mean \"L/min\"?"));
  CHECK(Contains(Err("46 cst", Dimension::kKinematicViscosity), "did you mean \"cSt\"?"));
  CHECK(Contains(Err("3 lb/hr", Dimension::kMassFlow), "did you mean \"lb/h\"?"));
  CHECK_FALSE(Contains(Err("3 qwertyuiop", Dimension::kMassFlow), "did you mean"));
  // Non-printable and non-UTF-8 bytes are escaped in messages.
  const std::string e = Err(std::string("3 \x01\xff"), Dimension::kLength);
  CHECK(Contains(e, "\\x01\\xff"));
}

TEST_CASE("trade aliases for flow and pressure difference ([NIST] B.8)") {
  const Dimension Q = Dimension::kVolumeFlow;
  // [NIST] B.8 liter: 1.0 E-03 m3 (exact); minute: 6.0 E+01 s (exact).
  for (const char* u : {"lpm", "LPM", "Lpm", "l/min", "L/min"}) {
    CAPTURE(u);
    CHECK(F(u, Q) == doctest::Approx(1e-3 / 60.0).epsilon(kTight));
  }
  // [NIST] B.8 "gallon [U.S.] per minute (gpm)": 6.309 020 E-05 m3/s; the US
  // gallon is 231 in3 = 3.785411784 L exactly (B.8, gallon [U.S.]).
  for (const char* u : {"gal/min", "GPM", "gpm", "US gal/min"}) {
    CAPTURE(u);
    CHECK(F(u, Q) == doctest::Approx(3.785411784e-3 / 60.0).epsilon(kTight));
    CHECK(F(u, Q) == doctest::Approx(6.309020e-5).epsilon(1e-6));
  }
  CHECK(SI("10 gal/min", Q) == doctest::Approx(37.85411784e-3 / 60.0).epsilon(kTight));
  CHECK(F("gal", Dimension::kVolume) == doctest::Approx(3.785411784e-3).epsilon(kTight));
  // psid: [NIST] B.8 psi 6.894 757 E+03 Pa, for a difference only.
  CHECK(F("psid", Dimension::kPressureDifference) == doctest::Approx(6894.757293168361).epsilon(kTight));
  CHECK(F("psid", Dimension::kPressureDifference) == doctest::Approx(6.894757e3).epsilon(1e-7));
  {
    const std::string e = Err("5 psid", Dimension::kPressure);
    CHECK(Contains(e, "unit \"psid\" is a pressure difference, but this field is a pressure"));
  }
  CHECK(Contains(Err("5 psid a", Dimension::kPressureDifference), "unknown unit"));
}

TEST_CASE("did you mean: only units of the field, never one off by a large factor") {
  const Dimension Q = Dimension::kVolumeFlow;
  for (const char* given : {"8 l/m", "8 L/m", "8 ltr/min"}) {
    const std::string e = Err(given, Q);
    CAPTURE(e);
    CHECK(Contains(e, "did you mean \"L/min\"?"));
    CHECK_FALSE(Contains(e, "did you mean \"gpm\""));
    CHECK_FALSE(Contains(e, "did you mean \"L/s\""));
  }
  // Equally near spellings with different factors (L/h and L/s for "L/x"):
  // no guess at all rather than a wrong one.
  CHECK_FALSE(Contains(Err("8 L/x", Q), "did you mean"));
  // A unit of another dimension is named as such, not offered.
  CHECK(Contains(Err("8 kg/min", Q), "is a mass flow, but this field is a volumetric flow"));
  CHECK(Contains(Err("3 kpa", Dimension::kPressure), "did you mean \"kPa\"? (units are case-sensitive)"));
  // The other viscosity: the conversion mu = rho nu is named both ways
  // (46 cSt x 0.86 g/cm3 = 39.56 cP, by hand), and no other unit error
  // carries it.
  CHECK(Contains(Err("46 cSt", Dimension::kDynamicViscosity), "cP = cSt x the oil's density in g/cm3"));
  CHECK(Contains(Err("40 cP", Dimension::kKinematicViscosity), "cSt = cP / the oil's density in g/cm3"));
  CHECK_FALSE(Contains(Err("8 kg/min", Q), "density"));
}

TEST_CASE("NearestName") {
  const std::vector<std::string> opts = {"Pa", "kPa", "bar", "psi", "L/min", "L/s"};
  CHECK(NearestName("psl", opts) == "psi");
  CHECK(NearestName("PSI", opts) == "psi");     // case-insensitive
  CHECK(NearestName("L/mni", opts) == "L/min"); // transposition
  CHECK(NearestName("kap", opts) == "kPa");
  CHECK(NearestName("zzzzzzzz", opts).empty());
  CHECK(NearestName("abc", {}).empty());
  // Threshold max(2, size/3): 9 letters allow 3 edits.
  CHECK(NearestName("abcdefxyz", {"abcdefghi"}) == "abcdefghi");
  // 10 letters allow 3 edits; 4 substitutions are too many.
  CHECK(NearestName("abcdefwxyz", {"abcdefghij"}).empty());
  // Ties go to the first option.
  CHECK(NearestName("rab", {"Pa", "bar"}) == "Pa");
}

TEST_CASE("fuzz: random byte strings never throw") {
  std::mt19937 rng(12345);
  std::uniform_int_distribution<int> byte(0, 255);
  std::uniform_int_distribution<int> len(0, 300);
  const std::vector<Dimension> dims = AllDimensions();
  const std::vector<std::string> seeds = {
      "12.5 bar abs", "8 L/min", "90 degC", "1e-3 m3", "14.696 psia", "46 cSt",
      "BTU/(h.ft.degF)", "\xC2\xB0" "F", "1/degF", "3 Cv"};
  const std::string alphabet = "0123456789.+-eE /()abcdegiklmnpstuvwxyzABCDFGKLMPRSTV%\xC2\xB0\xB5";
  int ok_count = 0;
  for (int iter = 0; iter < 4000; ++iter) {
    std::string s;
    const int kind = iter % 4;
    if (kind == 0) {  // random bytes
      const int n = len(rng);
      for (int k = 0; k < n; ++k) s += static_cast<char>(byte(rng));
    } else if (kind == 1) {  // random characters from a unit-ish alphabet
      const int n = len(rng) % 24;
      for (int k = 0; k < n; ++k) s += alphabet[static_cast<std::size_t>(byte(rng)) % alphabet.size()];
    } else {  // mutated valid strings
      s = seeds[static_cast<std::size_t>(byte(rng)) % seeds.size()];
      const int edits = 1 + byte(rng) % 3;
      for (int k = 0; k < edits && !s.empty(); ++k) {
        const std::size_t pos = static_cast<std::size_t>(byte(rng)) % s.size();
        switch (byte(rng) % 3) {
          case 0: s[pos] = static_cast<char>(byte(rng)); break;
          case 1: s.erase(pos, 1); break;
          default: s.insert(pos, 1, static_cast<char>(byte(rng))); break;
        }
      }
    }
    const Dimension d = dims[static_cast<std::size_t>(iter) % dims.size()];
    ParsedQuantity q;
    CHECK_NOTHROW(q = ParseQuantity(s, d));
    if (q.ok) {
      ++ok_count;
      CHECK(std::isfinite(q.si));
    } else {
      CHECK_FALSE(q.error.empty());
    }
    CHECK_NOTHROW(NearestName(s, AcceptedUnits(d)));
  }
  CHECK(ok_count > 0);
  // Long strings.
  CHECK_NOTHROW(ParseQuantity(std::string(100000, '7'), Dimension::kLength));
  CHECK_NOTHROW(NearestName(std::string(5000, 'x'), {"psi", std::string(4000, 'x')}));
  // An out-of-range enum value.
  CHECK_FALSE(ParseQuantity("1", static_cast<Dimension>(999)).ok);
  CHECK(FromSI(2.0, static_cast<Dimension>(999), UnitSystem::kSI) == 2.0);
}
