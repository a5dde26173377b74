// Mineral and synthetic lubricating oil: viscosity–temperature by ASTM D341
// (Walther), density by linear thermal expansion from 15 °C, specific heat and
// thermal conductivity by Cragoe (NBS Misc. Publ. 97); viscosity grades
// (ISO 3448, SAE J300) and the viscosity index (ASTM D2270).
//
// Viscosity (ASTM D341 [1], Eq. 1 with the simple Z of the "crude oil form"):
//   log10(log10(Z)) = A − B·log10(T),   Z = ν + 0.7,   ν in cSt (mm2/s), T in K
// A and B are fixed by two reference viscosities (ν1, T1), (ν2, T2):
//   B = [log10 log10 Z1 − log10 log10 Z2] / [log10 T2 − log10 T1],
//   A = log10 log10 Z1 + B·log10 T1,
// so both anchors are reproduced exactly (to round-off).
// The simple Z = ν + 0.7 holds for ν ≥ 2.0 mm2/s [1]; below that D341 adds
// exponential terms (Z = ν + 0.7 + exp(−1.47 − 1.84ν − 0.51ν²), ...), which this
// model does not use: InRange() reports ν < 2 cSt as out of range.
//
// Density [2] (volume correction from 15 °C, linear):
//   ρ(T) = ρ15·(1 − α·(T − 288.15 K)),  α = 6.4e-4 1/K by default.
// α = 6.4e-4 1/K is common practice for lubricating-oil gravities (about
// 0.00035 per °F); it is of the order of the expansion coefficients tabulated
// in NBS Misc. Publ. 97 for such oils (from memory; the table was not read).
// It is settable through OilExtras.
//
// Specific heat and thermal conductivity (Cragoe [2], published in BTU units,
// constants as given in the brief and recalled (from memory); the scanned
// publication was not read):
//   cp = (0.388 + 0.00045·t_F) / sqrt(s)                 BTU/(lb·°F)
//   k  = 0.0677·(1 − 0.0003·(t_F − 32)) / s              BTU/(h·ft·°F)
// with t_F in °F and s the specific gravity 60/60 °F. In SI (t in °C), using
// 1 BTU/(lb·°F) = 4186.8 J/(kg·K) and 1 BTU/(h·ft·°F) = 1.730734666 W/(m·K)
// (IT BTU, exact by definition, NIST SP 811 [3]):
//   cp = (1.6848 + 0.0033913·t) / sqrt(s)   kJ/(kg·K)
//   k  = 0.11717·(1 − 0.00054·t) / s        W/(m·K)
// (Note 0.0677 × 1.7307 = 0.11717, not 0.1167.) s = ρ(60 °F)/ρ_water(60 °F),
// ρ_water(60 °F) =
// 999.017 kg/m3 (IAPWS-95 at 0.101325 MPa, computed with python3-iapws).
// Either property may be replaced by a constant from the oil's datasheet.
//
// Derivatives d/dT of ρ, μ = ν·ρ, cp and k are analytic.
//
// Range: by default −40 °C ≤ T ≤ 200 °C and ν(T) ≥ 2 cSt. Evaluate() stays
// finite everywhere: it evaluates at T clamped to [150 K, 700 K] (derivatives
// zero outside) and caps log10 log10 Z at 2 (ν ≤ 1e100 cSt). Pressure is not
// used (liquid at loop pressures; see fluid.h).
//
// ISO 3448 [4]: viscosity grade VG n has its KV40 midpoint in Table 1; the
// grade's limits are ±10 % of the midpoint. SAE J300 [5]: engine-oil grades by
// KV100 class (non-W grades: min ≤ KV100 < max; W grades: KV100 ≥ min).
//
// Viscosity index, ASTM D2270 [6]: for KV100 = Y in 2..70 mm2/s, L and H from
// Table 1 (linear interpolation between rows, §5.1.1); above 70 mm2/s
//   L = 0.8353·Y² + 14.67·Y − 216,  H = 0.1684·Y² + 11.85·Y − 97   (§5.1.2).
// Procedure A (VI ≤ 100): VI = (L − U)/(L − H)·100; procedure B (VI > 100):
//   N = (log10 H − log10 U)/log10 Y,  VI = (10^N − 1)/0.00715 + 100,
// U = KV40. VI is not defined for Y < 2 mm2/s (returns NaN).
// Table 1 (311 rows, 2.0 to 70.0 mm2/s) is copied from a public open
// implementation of D2270 and spot-checked against a second one (same row
// count, rows compared by eye); its last row agrees with the §5.1.2 formulas at
// 70 mm2/s (4903.9 vs 4905, 1557.7 vs 1558), and the worked examples §5.1.4
// and §6.1.4 are reproduced in the tests.
//
// References
// [1] ASTM D341, "Standard Practice for Viscosity-Temperature Charts for
//     Liquid Petroleum Products" (Eq. 1, Eq. 2; simple Z for ν ≥ 2.0 mm2/s).
// [2] C. S. Cragoe, "Thermal Properties of Petroleum Products", National
//     Bureau of Standards Miscellaneous Publication No. 97, 1929 (sections III
//     thermal expansion, VI thermal conductivity, VII specific heat).
// [3] A. Thompson, B. N. Taylor, NIST Special Publication 811, 2008, App. B.
// [4] ISO 3448:1992, "Industrial liquid lubricants — ISO viscosity
//     classification", Table 1 (same 20 grades as ASTM D2422 Table 1).
// [5] SAE J300, "Engine Oil Viscosity Classification", Jan 2015, Table 1
//     (read from reproductions of the table; SAE 8 and 12 rows from memory).
// [6] ASTM D2270-10, "Standard Practice for Calculating Viscosity Index from
//     Kinematic Viscosity at 40 and 100 °C", Table 1, §5 and §6.
#pragma once

#include <memory>
#include <optional>
#include <string>
#include <utility>

#include "library/fluid.h"

namespace loopwright {

// Optional data that complete an oil beyond its two viscosity anchors.
struct OilExtras {
  // Density at 15 °C [kg/m3]. Default 870: common practice for a mineral
  // turbine/compressor oil; take it from the datasheet.
  double rho15_kgm3 = 870.0;
  // Volumetric expansion coefficient α [1/K] (see header comment).
  double alpha_per_K = 6.4e-4;
  // Constant overrides of Cragoe's relations [J/(kg.K)], [W/(m.K)].
  std::optional<double> cp_JkgK;
  std::optional<double> k_WmK;
  // Validity range of the temperature [K] (default −40 °C … 200 °C).
  double T_min_K = 233.15;
  double T_max_K = 473.15;
};

double ViscosityIndexD2270(double kv40_m2s, double kv100_m2s);

class OilFluid : public Fluid {
 public:
  // Walther/D341 line through (nu1 [m2/s] at T1 [K]) and (nu2 at T2).
  // Returns nullptr (and *error, if given) when a viscosity is not positive,
  // a temperature is not positive, T1 == T2, the viscosity does not fall with
  // temperature, or the extras are not physical (ρ15 ≤ 0, α < 0, cp/k ≤ 0,
  // T_min ≥ T_max).
  static std::shared_ptr<OilFluid> FromTwoPoints(double nu1_m2s, double T1_K,
                                                 double nu2_m2s, double T2_K,
                                                 OilExtras extras,
                                                 std::string* error = nullptr);

  // ISO VG grade + the user's KV100 [m2/s]: anchors KV40 = the grade midpoint.
  static std::shared_ptr<OilFluid> FromIsoVg(int grade, double kv100_m2s,
                                             OilExtras extras,
                                             std::string* error = nullptr);
  // SAE J300 grade ("30", "15W", "10W-40") + the user's KV40 and KV100
  // [m2/s]; KV100 must lie inside the grade's class (else nullptr, *error).
  static std::shared_ptr<OilFluid> FromSaeJ300(const std::string& grade,
                                               double kv40_m2s,
                                               double kv100_m2s,
                                               OilExtras extras,
                                               std::string* error = nullptr);

  std::string Kind() const override { return "oil"; }
  FluidProps Evaluate(double T_K, double p_abs_Pa) const override;
  double SpecificHeat(double T_K, double p_abs_Pa) const override;  // Evaluate(T, p).cp, without the viscosity
  // Cragoe's cp is linear in T inside the evaluation clamp; a given cp is constant.
  bool SpecificHeatIsLinear(double t_a, double t_b) const override;
  RangeReport InRange(double T_K, double p_abs_Pa) const override;

  // Re-anchors the Walther line through KV40 and KV100 [m2/s] (an oil
  // grade bound to envelope variables). False, with *error, when they do not
  // make an oil (not positive, or KV100 not below KV40); the oil is then
  // unchanged.
  bool SetKv40Kv100(double kv40_m2s, double kv100_m2s, std::string* error = nullptr);

  // Walther constants (ν in cSt, T in K, decimal logarithms).
  double A() const { return a_; }
  double B() const { return b_; }
  // Kinematic viscosity [m2/s] at T [K] (clamped as in Evaluate).
  double KinematicViscosity(double T_K) const;
  // Viscosity index by ASTM D2270 from this oil's KV40 and KV100 (NaN when
  // KV100 < 2 mm2/s, where D2270 does not define it).
  double ViscosityIndex() const { return ViscosityIndexD2270(KinematicViscosity(313.15), KinematicViscosity(373.15)); }
  const OilExtras& extras() const { return extras_; }

 private:
  OilFluid(double a, double b, OilExtras extras);
  // ν [cSt] and dν/dT [cSt/K] at the (already clamped) temperature.
  void Walther(double T_K, double* nu_cSt, double* dnu_dT) const;

  double a_;
  double b_;
  OilExtras extras_;
  double s6060_;  // specific gravity 60/60 °F
};

// ISO 3448 KV40 midpoint [m2/s] of grade VG `grade`; nullopt if not a grade.
std::optional<double> IsoVgKv40(int grade);

// SAE J300 KV100 class [min, max) [m2/s] of an engine-oil grade ("0W".."25W":
// max = +infinity; "8".."60"); nullopt if not a grade.
std::optional<std::pair<double, double>> SaeJ300Kv100Range(
    const std::string& grade);

// Checks a KV100 [m2/s] against an SAE J300 grade, also a multigrade "xW-yy"
// (both its W minimum and its yy class). Empty string if it fits, else the
// reason with the class limits in cSt.
std::string CheckSaeJ300Kv100(const std::string& grade, double kv100_m2s);

// Viscosity index by ASTM D2270 (procedures A and B); kinematic viscosities
// at 40 °C and 100 °C in m2/s. NaN if kv100 < 2 mm2/s or an input ≤ 0.
double ViscosityIndexD2270(double kv40_m2s, double kv100_m2s);

// Cragoe's relations in their published units, for tests and for users who
// want them outside an OilFluid: t_F in °F, s = specific gravity 60/60 °F.
double CragoeCpBtuPerLbF(double t_F, double s);
double CragoeKBtuPerHrFtF(double t_F, double s);
// The same in SI: T in K, results in J/(kg.K) and W/(m.K).
double CragoeCpSI(double T_K, double s);
double CragoeKSI(double T_K, double s);

}  // namespace loopwright
