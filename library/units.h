// Units: parsing "value unit" strings into SI, and formatting SI values for
// printing in SI or US customary units.
//
// Every dimensional value in a case file is either a bare number, taken as SI,
// or a string "value unit" ("40 psi", "8 L/min", "90 degC", "46 cSt").
// The field's declared Dimension decides how a unit is read:
//   * kPressure values are gauge by default. "psia", "bara", "kPa abs",
//     "bar abs" (any pressure unit followed by " abs" or "a" suffix forms
//     listed below) are absolute and are converted to gauge by subtracting
//     the ambient pressure passed to the parser; "psig", "barg" are gauge.
//   * kPressureDifference accepts the same units but never an absolute or
//     gauge qualifier (a difference is neither).
//   * kTemperature reads K, degC, degF (and "°C", "°F", "C", "F") as absolute
//     temperatures; kTemperatureDifference reads K, degC, degF, delta_degC,
//     delta_degF as differences: a 10 degC rise is 10 K, never 283.15 K.
// Internally loopwright is SI everywhere: Pa (gauge for node pressures), m3/s,
// kg/s, m, K, m2/s, Pa.s, kg/m3, W, W/K, rad/s, J/(kg.K), W/(m.K).
//
// Conversion factors are exact by definition where a definition exists
// (NIST SP 811, 2008 edition, Appendix B) [1]:
//   1 psi = 6894.757293168 Pa; 1 in = 0.0254 m; 1 ft = 0.3048 m;
//   1 US gal = 3.785411784e-3 m3; 1 lb = 0.45359237 kg; 1 hp = 745.69987158 W
//   (mechanical); 1 BTU(IT)/h = 0.29307107 W; 1 inH2O (60 degF) = 248.84 Pa;
//   1 bar = 1e5 Pa; 1 cSt = 1e-6 m2/s; 1 cP = 1e-3 Pa.s; 1 rpm = 2*pi/60 rad/s.
//
// References
// [1] A. Thompson, B. N. Taylor, "Guide for the Use of the International System
//     of Units (SI)", NIST Special Publication 811, 2008, Appendix B.8/B.9.
#pragma once

#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

namespace loopwright {

enum class Dimension : std::uint8_t {
  kDimensionless,
  kPressure,             // gauge Pa internally
  kPressureDifference,   // Pa
  kVolumeFlow,           // m3/s
  kMassFlow,             // kg/s
  kLength,               // m
  kArea,                 // m2
  kVolume,               // m3
  kDisplacement,         // m3 per revolution (pump displacement): cm3/rev, in3/rev, L/rev
  kTemperature,          // K
  kTemperatureDifference,// K
  kKinematicViscosity,   // m2/s
  kDynamicViscosity,     // Pa.s
  kDensity,              // kg/m3
  kPower,                // W (also heat flow)
  kConductance,          // W/K (heat-transfer conductance UA)
  kRotationalSpeed,      // rad/s
  kSpecificHeat,         // J/(kg.K)
  kThermalConductivity,  // W/(m.K)
  kVelocity,             // m/s
  kTime,                 // s
  kSlipCoefficient,      // m3 : pump slip Q_slip = C * dp / mu, C in m3 (SI)
  kInverseTemperature,   // 1/K (thermal expansion coefficient)
  kFlowCoefficientKv,    // Kv in (m3/h)/sqrt(bar); also accepts "Cv" (US gpm/sqrt(psi)); stored as Kv
  kForce,                // N (bearing loads)
  kMass,                 // kg (thermal masses)
};

enum class UnitSystem { kSI, kUS };

// Result of parsing one quantity.
struct ParsedQuantity {
  bool ok = false;
  double si = 0.0;          // value in SI (gauge Pa for kPressure)
  bool absolute = false;    // kPressure only: the text said absolute
  std::string error;        // when !ok: what was wrong, with accepted units
};

// Parses "value unit" text (leading/trailing spaces allowed; "value" is any
// finite decimal number, optionally with exponent; unit may be separated by
// spaces or not: "12mm" and "12 mm" both read). `ambient_pa` is the ambient
// (atmospheric) absolute pressure used to turn absolute pressures into gauge.
// Unknown units give an error naming the nearest accepted unit.
ParsedQuantity ParseQuantity(std::string_view text, Dimension dim,
                             double ambient_pa = 101325.0);

// Human name of a dimension ("pressure", "volumetric flow", ...).
std::string DimensionName(Dimension dim);
// Stable key of a dimension, used in the schema and parameter specs
// ("pressure", "pressure_difference", "volume_flow", ...).
std::string DimensionKey(Dimension dim);
// The accepted unit spellings for a dimension, SI unit first.
std::vector<std::string> AcceptedUnits(Dimension dim);
// The SI unit of a dimension (its first accepted spelling); empty if none.
std::string SiUnit(Dimension dim);
// Every Dimension, in declaration order.
std::vector<Dimension> AllDimensions();
// Inverse of DimensionKey: false (and `out` untouched) for an unknown key.
bool DimensionFromKey(std::string_view key, Dimension& out);

// The unit used for printing a dimension in a unit system ("bar", "psi",
// "L/min", "gpm", "degC", "degF", ...), and the conversion from SI to it.
// Temperatures print as degC / degF (affine conversion applied).
std::string DisplayUnit(Dimension dim, UnitSystem system);
double FromSI(double si, Dimension dim, UnitSystem system);
double ToSI(double display_value, Dimension dim, UnitSystem system);

// A number in a message: at most 6 significant digits (printf "%.6g").
std::string FormatNumber(double v);
// A temperature [K] in a message, in degC: FormatNumber(T_K - 273.15).
std::string FormatDegC(double T_K);

// Nearest string in `options` to `given` by Damerau-Levenshtein distance
// (case-insensitive); empty if none is within max(2, given.size()/3) edits.
std::string NearestName(std::string_view given,
                        const std::vector<std::string>& options);

// Standard gravity [m/s2], CGPM 1901 (exact by definition).
inline constexpr double kGravity = 9.80665;
// Standard atmosphere [Pa] (exact by definition, ISO 2533).
inline constexpr double kStandardAtmosphere = 101325.0;

}  // namespace loopwright
