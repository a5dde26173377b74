// Units: parsing "value unit" strings into SI and formatting SI values for
// printing. See units.h for the semantics.
//
// Conversion factors. Where NIST SP 811 (2008) Appendix B.8 marks a factor as
// exact (bold), or where it follows exactly from exact definitions (the inch,
// the avoirdupois pound, standard gravity, the IT British thermal unit, the
// degree Fahrenheit interval), the factor below is built from those exact
// definitions; the B.8 table entry (rounded to 7 digits in the table) is cited
// next to each one. [NIST] = A. Thompson, B. N. Taylor, "Guide for the Use of
// the International System of Units (SI)", NIST SP 811, 2008, Appendix B.8
// (factors for units listed alphabetically) and B.9 (by kind of quantity).

#include "library/units.h"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <string>
#include <system_error>
#include <vector>

namespace loopwright {
namespace {

// ---------------------------------------------------------------------------
// Exact base definitions.

// [NIST] B.8 "inch (in)": 2.54 E-02 m, exact.
constexpr double kInch = 0.0254;
// [NIST] B.8 "foot (ft)": 3.048 E-01 m, exact.
constexpr double kFoot = 0.3048;
// [NIST] B.8 "mil (0.001 in)": 2.54 E-05 m, exact ("thou" is the same unit).
constexpr double kMil = 2.54e-5;
// [NIST] B.8 "square inch (in2)": 6.4516 E-04 m2, exact.
constexpr double kSquareInch = 6.4516e-4;
// [NIST] B.8 "square foot (ft2)": 9.290 304 E-02 m2, exact.
constexpr double kSquareFoot = 9.290304e-2;
// [NIST] B.8 "cubic inch (in3)": 1.638 706 4 E-05 m3, exact.
constexpr double kCubicInch = 1.6387064e-5;
// [NIST] B.8 "cubic foot (ft3)": 2.831 685 E-02 m3; exact value
// 0.3048^3 = 2.8316846592e-2 m3.
constexpr double kCubicFoot = 2.8316846592e-2;
// [NIST] B.8 "gallon [U.S.] (gal)": 3.785 412 E-03 m3; exact value
// 231 in3 = 3.785411784e-3 m3.
constexpr double kUsGallon = 3.785411784e-3;
// [NIST] B.8 "liter (L)": 1.0 E-03 m3, exact.
constexpr double kLiter = 1e-3;
// [NIST] B.8 "pound (avoirdupois) (lb)": 4.535 924 E-01 kg; exact value
// 0.45359237 kg (SP 811 footnote to that entry: exact by definition).
constexpr double kPound = 0.45359237;
// [NIST] B.8 "pound-force (lbf)": 4.448 222 E+00 N; exact as lb * g_n with
// g_n = 9.80665 m/s2 (exact, CGPM 1901) = 4.4482216152605 N.
constexpr double kPoundForce = kPound * kGravity;
// [NIST] B.8 "pound-force per square inch (psi) (lbf/in2)": 6.894 757 E+03 Pa;
// exact as lbf/in2 = 6894.757293168361... Pa.
constexpr double kPsi = kPoundForce / kSquareInch;
// [NIST] B.8 "bar": 1.0 E+05 Pa, exact; "millibar": 1.0 E+02 Pa, exact.
constexpr double kBar = 1e5;
// [NIST] B.8 "inch of water (60 degF)": 2.4884 E+02 Pa (conventional, not
// exact; the value declared in units.h).
constexpr double kInchWater60F = 248.84;
// [NIST] B.8 "British thermal unit_IT (Btu_IT)": 1.055 056 E+03 J; exact by
// definition 1055.05585262 J (SP 811 footnote to that entry; with
// 1 cal_IT = 4.1868 J exactly).
constexpr double kBtuIT = 1055.05585262;
// [NIST] B.8 "horsepower (550 ft.lbf/s)": 7.456 999 E+02 W; exact as
// 550 ft * lbf / s = 745.69987158227022 W.
constexpr double kHorsepower = 550.0 * kFoot * kPoundForce;
// [NIST] B.8 "hour (h)": 3.6 E+03 s; "minute (min)": 6.0 E+01 s, exact.
constexpr double kHour = 3600.0;
constexpr double kMinute = 60.0;
// [NIST] B.9 temperature interval: 1 degF = 1 degR = (1/1.8) K = (5/9) K,
// exact; T/K = (t/degF + 459.67)/1.8 and T/K = t/degC + 273.15 (B.9).
constexpr double kFahrenheitPerKelvin = 1.8;
constexpr double kCelsiusOffset = 273.15;
constexpr double kFahrenheitOffset = 459.67;
constexpr double kPi = 3.14159265358979323846;

constexpr std::size_t kMaxTextLength = 256;

enum class Qual { kNone, kAbs, kGauge };

// One accepted spelling. si = (value + pre) * mul / div.
struct UnitDef {
  std::string name;   // spelling as listed in AcceptedUnits
  std::string key;    // normalized spelling used for matching
  double mul = 1.0;
  double div = 1.0;
  double pre = 0.0;
  Qual qual = Qual::kNone;  // pressure only: psia, bara (abs); psig, barg (gauge)
  std::string base;         // pressure only: the unit without its qualifier
};

struct DimInfo {
  Dimension dim;
  const char* key;
  const char* name;
  const char* si_display;
  const char* us_display;
  std::vector<UnitDef> units;
};

// ---------------------------------------------------------------------------
// Byte helpers (no <cctype>: those are UB for negative chars and locale-bound).

bool IsSpace(char c) {
  return c == ' ' || c == '\t' || c == '\n' || c == '\r' || c == '\v' ||
         c == '\f';
}
bool IsDigit(char c) { return c >= '0' && c <= '9'; }
char ToLower(char c) { return (c >= 'A' && c <= 'Z') ? char(c - 'A' + 'a') : c; }

std::string_view Trim(std::string_view s) {
  while (!s.empty() && IsSpace(s.front())) s.remove_prefix(1);
  while (!s.empty() && IsSpace(s.back())) s.remove_suffix(1);
  return s;
}

bool EndsWithNoCase(std::string_view s, std::string_view suffix) {
  if (s.size() < suffix.size()) return false;
  std::string_view tail = s.substr(s.size() - suffix.size());
  for (std::size_t i = 0; i < suffix.size(); ++i)
    if (ToLower(tail[i]) != ToLower(suffix[i])) return false;
  return true;
}

bool IsValidUtf8(std::string_view s) {
  std::size_t i = 0;
  const std::size_t n = s.size();
  while (i < n) {
    const auto c = static_cast<unsigned char>(s[i]);
    std::size_t len = 0;
    std::uint32_t cp = 0;
    if (c < 0x80) { ++i; continue; }
    if ((c & 0xE0) == 0xC0) { len = 2; cp = c & 0x1F; }
    else if ((c & 0xF0) == 0xE0) { len = 3; cp = c & 0x0F; }
    else if ((c & 0xF8) == 0xF0) { len = 4; cp = c & 0x07; }
    else return false;
    if (i + len > n) return false;
    for (std::size_t k = 1; k < len; ++k) {
      const auto cc = static_cast<unsigned char>(s[i + k]);
      if ((cc & 0xC0) != 0x80) return false;
      cp = (cp << 6) | (cc & 0x3F);
    }
    if ((len == 2 && cp < 0x80) || (len == 3 && cp < 0x800) ||
        (len == 4 && (cp < 0x10000 || cp > 0x10FFFF)) ||
        (cp >= 0xD800 && cp <= 0xDFFF))
      return false;
    i += len;
  }
  return true;
}

// Quoted text for messages: printable ASCII as is, valid UTF-8 as is, control
// bytes and invalid UTF-8 as \xNN; long text cut.
std::string Quote(std::string_view s) {
  constexpr std::size_t kMaxShown = 64;
  const bool cut = s.size() > kMaxShown;
  if (cut) s = s.substr(0, kMaxShown);
  const bool utf8 = IsValidUtf8(s);
  static const char* hex = "0123456789abcdef";
  std::string out = "\"";
  for (char ch : s) {
    const auto c = static_cast<unsigned char>(ch);
    if (c == '"' || c == '\\') {
      out += '\\';
      out += ch;
    } else if ((c >= 0x20 && c < 0x7F) || (c >= 0x80 && utf8)) {
      out += ch;
    } else {
      out += "\\x";
      out += hex[c >> 4];
      out += hex[c & 0xF];
    }
  }
  out += cut ? "...\"" : "\"";
  return out;
}

// Normalized spelling of a unit, applied alike to the table and to the input:
//   * degree sign (U+00B0, and U+00BA often typed for it) -> "deg";
//     micro sign U+00B5 and Greek mu U+03BC -> "u"; superscript 2/3 -> 2/3;
//     middle dot U+00B7, dot operator U+22C5 and '*' -> '.'; '^' dropped;
//     "Btu"/"btu" -> "BTU";
//   * spaces (also no-break and thin spaces) collapse; a space next to '/',
//     '.', '(' or ')' is dropped; any other space becomes '.' ("Pa s" ->
//     "Pa.s"); "deg.C" -> "degC";
//   * "X/(a.b)" -> "X/a/b" so that "J/(kg.K)" and "J/kg/K" match.
std::string Normalize(std::string_view s) {
  std::string a;
  a.reserve(s.size() + 8);
  const std::size_t n = s.size();
  for (std::size_t i = 0; i < n; ++i) {
    const auto c = static_cast<unsigned char>(s[i]);
    const auto c1 = i + 1 < n ? static_cast<unsigned char>(s[i + 1]) : 0u;
    const auto c2 = i + 2 < n ? static_cast<unsigned char>(s[i + 2]) : 0u;
    if (c == 0xC2 && (c1 == 0xB0 || c1 == 0xBA)) { a += "deg"; ++i; continue; }
    if (c == 0xC2 && c1 == 0xB5) { a += 'u'; ++i; continue; }
    if (c == 0xCE && c1 == 0xBC) { a += 'u'; ++i; continue; }
    if (c == 0xC2 && c1 == 0xB2) { a += '2'; ++i; continue; }
    if (c == 0xC2 && c1 == 0xB3) { a += '3'; ++i; continue; }
    if (c == 0xC2 && c1 == 0xB7) { a += '.'; ++i; continue; }
    if (c == 0xC2 && c1 == 0xA0) { a += ' '; ++i; continue; }
    if (c == 0xE2 && c1 == 0x8B && c2 == 0x85) { a += '.'; i += 2; continue; }
    if (c == 0xE2 && c1 == 0x80 && (c2 == 0x89 || c2 == 0xAF)) {
      a += ' ';
      i += 2;
      continue;
    }
    if (c == '*') { a += '.'; continue; }
    if (c == '^') continue;
    if (IsSpace(static_cast<char>(c))) { a += ' '; continue; }
    if ((c == 'B' || c == 'b') && c1 == 't' && c2 == 'u') {
      a += "BTU";
      i += 2;
      continue;
    }
    a += static_cast<char>(c);
  }
  // Spaces.
  std::string b;
  b.reserve(a.size());
  auto is_sep = [](char c) { return c == '/' || c == '.' || c == '(' || c == ')'; };
  for (std::size_t i = 0; i < a.size(); ++i) {
    if (a[i] != ' ') { b += a[i]; continue; }
    std::size_t j = i;
    while (j < a.size() && a[j] == ' ') ++j;
    const bool at_edge = b.empty() || j >= a.size();
    if (!at_edge && !is_sep(b.back()) && !is_sep(a[j])) b += '.';
    i = j - 1;
  }
  // "deg.C" -> "degC" (from "deg C" / "° C").
  for (std::size_t p = b.find("deg."); p != std::string::npos; p = b.find("deg.", p)) {
    if (p + 4 < b.size() && (b[p + 4] == 'C' || b[p + 4] == 'F' || b[p + 4] == 'R'))
      b.erase(p + 3, 1);
    else
      ++p;
  }
  // "/(a.b)" -> "/a/b".
  for (std::size_t p = b.find("/("); p != std::string::npos; p = b.find("/(", p)) {
    const std::size_t close = b.find(')', p + 2);
    if (close == std::string::npos) break;
    const std::string inner = b.substr(p + 2, close - p - 2);
    if (inner.empty() || inner.find_first_of("(/") != std::string::npos) {
      p += 2;
      continue;
    }
    std::string flat = inner;
    std::replace(flat.begin(), flat.end(), '.', '/');
    b.replace(p + 1, close - p, flat);
    p += 1 + flat.size();
  }
  return b;
}

// Optimal string alignment distance (restricted Damerau-Levenshtein),
// case-insensitive over ASCII letters; other bytes compare as bytes.
std::size_t OsaDistance(std::string_view a, std::string_view b) {
  const std::size_t n = a.size(), m = b.size();
  std::vector<std::size_t> prev2(m + 1), prev(m + 1), cur(m + 1);
  for (std::size_t j = 0; j <= m; ++j) prev[j] = j;
  for (std::size_t i = 1; i <= n; ++i) {
    cur[0] = i;
    const char ai = ToLower(a[i - 1]);
    for (std::size_t j = 1; j <= m; ++j) {
      const char bj = ToLower(b[j - 1]);
      const std::size_t cost = ai == bj ? 0 : 1;
      std::size_t v = std::min({prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + cost});
      if (i > 1 && j > 1 && ai == ToLower(b[j - 2]) && ToLower(a[i - 2]) == bj)
        v = std::min(v, prev2[j - 2] + 1);
      cur[j] = v;
    }
    std::swap(prev2, prev);
    std::swap(prev, cur);
  }
  return prev[m];
}

// ---------------------------------------------------------------------------
// Unit tables.

UnitDef U(const char* name, double factor) {
  UnitDef u;
  u.name = name;
  u.mul = factor;
  return u;
}
UnitDef UD(const char* name, double mul, double div, double pre = 0.0) {
  UnitDef u;
  u.name = name;
  u.mul = mul;
  u.div = div;
  u.pre = pre;
  return u;
}
UnitDef UQ(const char* name, double factor, Qual q, const char* base) {
  UnitDef u = U(name, factor);
  u.qual = q;
  u.base = base;
  return u;
}

std::vector<UnitDef> PressureUnits(bool with_qualified) {
  std::vector<UnitDef> v = {
      U("Pa", 1.0),
      U("hPa", 1e2),
      U("kPa", 1e3),
      U("MPa", 1e6),
      U("bar", kBar),             // [NIST] B.8 bar: 1.0 E+05 Pa (exact)
      U("mbar", 1e2),             // [NIST] B.8 millibar: 1.0 E+02 Pa (exact)
      U("psi", kPsi),             // [NIST] B.8 psi: 6.894 757 E+03 Pa
      U("inH2O", kInchWater60F),  // [NIST] B.8 inch of water (60 degF): 2.4884 E+02 Pa
  };
  if (with_qualified) {
    v.push_back(UQ("psia", kPsi, Qual::kAbs, "psi"));
    v.push_back(UQ("psig", kPsi, Qual::kGauge, "psi"));
    v.push_back(UQ("bara", kBar, Qual::kAbs, "bar"));
    v.push_back(UQ("barg", kBar, Qual::kGauge, "bar"));
  }
  return v;
}

std::vector<DimInfo> BuildTables() {
  std::vector<DimInfo> t;
  // [NIST] B.8/B.9 "revolution (r)": 6.283 185 E+00 rad, i.e. exactly 2 pi rad;
  // so 1 rpm = 1 r/min = 2 pi/60 rad/s = 1.047 198 E-01 rad/s (units.h).
  const double rev = 2.0 * kPi;
  const double rpm = rev / kMinute;

  t.push_back({Dimension::kDimensionless, "dimensionless", "dimensionless", "", "",
               {U("1", 1.0), U("-", 1.0), U("%", 0.01)}});

  t.push_back({Dimension::kPressure, "pressure", "pressure", "bar", "psi",
               PressureUnits(true)});
  {
    // "psid" (pounds per square inch, differential) is a difference by its
    // name: accepted here, and a wrong-dimension error in a pressure field.
    std::vector<UnitDef> diff = PressureUnits(false);
    diff.push_back(U("psid", kPsi));
    t.push_back({Dimension::kPressureDifference, "pressure_difference",
                 "pressure difference", "bar", "psi", std::move(diff)});
  }

  t.push_back({Dimension::kVolumeFlow, "volume_flow", "volumetric flow", "L/min", "gpm",
               {
                   U("m3/s", 1.0),
                   U("m3/h", 1.0 / kHour),
                   U("m3/min", 1.0 / kMinute),
                   U("L/min", kLiter / kMinute),  // [NIST] B.8 liter: 1.0 E-03 m3 (exact)
                   U("L/s", kLiter),
                   U("L/h", kLiter / kHour),
                   U("l/min", kLiter / kMinute),
                   U("l/s", kLiter),
                   U("l/h", kLiter / kHour),
                   U("mL/min", 1e-6 / kMinute),
                   U("cm3/s", 1e-6),
                   // [NIST] B.8 gallon [U.S.] per minute (gpm): 6.309 020 E-05 m3/s;
                   // exact as 3.785411784e-3/60 = 6.30901964e-5 m3/s.
                   U("gpm", kUsGallon / kMinute),
                   U("USgpm", kUsGallon / kMinute),
                   U("US gpm", kUsGallon / kMinute),
                   // Trade aliases, accepted explicitly (README, Values and units):
                   // litres per minute and US gallons per minute.
                   U("lpm", kLiter / kMinute),
                   U("LPM", kLiter / kMinute),
                   U("Lpm", kLiter / kMinute),
                   U("GPM", kUsGallon / kMinute),
                   U("gal/min", kUsGallon / kMinute),  // US gallon ([NIST] B.8 gallon [U.S.])
                   U("US gal/min", kUsGallon / kMinute),
               }});

  t.push_back({Dimension::kMassFlow, "mass_flow", "mass flow", "kg/s", "lb/min",
               {
                   U("kg/s", 1.0),
                   U("kg/min", 1.0 / kMinute),
                   U("kg/h", 1.0 / kHour),
                   U("g/s", 1e-3),
                   U("lb/s", kPound),  // [NIST] B.8 pound per second: 4.535 924 E-01 kg/s
                   U("lb/min", kPound / kMinute),  // [NIST] B.8 pound per minute: 7.559 873 E-03 kg/s
                   U("lb/h", kPound / kHour),      // [NIST] B.8 pound per hour: 1.259 979 E-04 kg/s
               }});

  t.push_back({Dimension::kLength, "length", "length", "mm", "in",
               {
                   U("m", 1.0),
                   U("cm", 1e-2),
                   U("mm", 1e-3),
                   U("um", 1e-6),
                   U("\xC2\xB5m", 1e-6),  // micro sign; Greek mu also accepted
                   U("micron", 1e-6),     // [NIST] B.8 micron: 1.0 E-06 m (exact)
                   U("in", kInch),        // [NIST] B.8 inch: 2.54 E-02 m (exact)
                   U("ft", kFoot),        // [NIST] B.8 foot: 3.048 E-01 m (exact)
                   U("thou", kMil),       // [NIST] B.8 mil: 2.54 E-05 m (exact)
                   U("mil", kMil),
               }});

  t.push_back({Dimension::kArea, "area", "area", "mm2", "in2",
               {
                   U("m2", 1.0),
                   U("cm2", 1e-4),
                   U("mm2", 1e-6),
                   U("in2", kSquareInch),  // [NIST] B.8 square inch: 6.4516 E-04 m2 (exact)
                   U("ft2", kSquareFoot),  // [NIST] B.8 square foot: 9.290 304 E-02 m2 (exact)
               }});

  t.push_back({Dimension::kVolume, "volume", "volume", "L", "US gal",
               {
                   U("m3", 1.0),
                   U("L", kLiter),  // [NIST] B.8 liter: 1.0 E-03 m3 (exact)
                   U("l", kLiter),
                   U("cm3", 1e-6),
                   U("cc", 1e-6),
                   U("mL", 1e-6),
                   U("ml", 1e-6),
                   U("in3", kCubicInch),  // [NIST] B.8 cubic inch: 1.638 706 4 E-05 m3 (exact)
                   U("ft3", kCubicFoot),  // [NIST] B.8 cubic foot: 2.831 685 E-02 m3
                   U("US gal", kUsGallon),  // [NIST] B.8 gallon [U.S.]: 3.785 412 E-03 m3
                   U("USgal", kUsGallon),
                   U("gal", kUsGallon),
               }});

  t.push_back({Dimension::kDisplacement, "displacement", "displacement per revolution",
               "cm3/rev", "in3/rev",
               {
                   U("m3/rev", 1.0),
                   U("cm3/rev", 1e-6),
                   U("cc/rev", 1e-6),
                   U("mL/rev", 1e-6),
                   U("ml/rev", 1e-6),
                   U("L/rev", kLiter),
                   U("in3/rev", kCubicInch),  // [NIST] B.8 cubic inch: 1.638 706 4 E-05 m3 (exact)
               }});

  // [NIST] B.9: T/K = t/degC + 273.15; T/K = (t/degF + 459.67)/1.8;
  // T/K = (T/degR)/1.8.
  t.push_back({Dimension::kTemperature, "temperature", "temperature", "degC", "degF",
               {
                   U("K", 1.0),
                   UD("degC", 1.0, 1.0, kCelsiusOffset),
                   UD("\xC2\xB0" "C", 1.0, 1.0, kCelsiusOffset),
                   UD("C", 1.0, 1.0, kCelsiusOffset),
                   UD("degF", 1.0, kFahrenheitPerKelvin, kFahrenheitOffset),
                   UD("\xC2\xB0" "F", 1.0, kFahrenheitPerKelvin, kFahrenheitOffset),
                   UD("F", 1.0, kFahrenheitPerKelvin, kFahrenheitOffset),
                   UD("degR", 1.0, kFahrenheitPerKelvin),
                   UD("\xC2\xB0" "R", 1.0, kFahrenheitPerKelvin),
               }});

  // [NIST] B.9: a temperature interval of 1 degC = 1 K; 1 degF = 1 degR = (1/1.8) K.
  t.push_back({Dimension::kTemperatureDifference, "temperature_difference",
               "temperature difference", "K", "delta_degF",
               {
                   U("K", 1.0),
                   U("degC", 1.0),
                   U("\xC2\xB0" "C", 1.0),
                   U("C", 1.0),
                   U("delta_degC", 1.0),
                   U("delta_K", 1.0),
                   UD("degF", 1.0, kFahrenheitPerKelvin),
                   UD("\xC2\xB0" "F", 1.0, kFahrenheitPerKelvin),
                   UD("F", 1.0, kFahrenheitPerKelvin),
                   UD("delta_degF", 1.0, kFahrenheitPerKelvin),
                   UD("degR", 1.0, kFahrenheitPerKelvin),
               }});

  t.push_back({Dimension::kKinematicViscosity, "kinematic_viscosity",
               "kinematic viscosity", "cSt", "cSt",
               {
                   U("m2/s", 1.0),
                   U("mm2/s", 1e-6),
                   U("cSt", 1e-6),  // [NIST] B.8 centistokes: 1.0 E-06 m2/s (exact)
                   U("St", 1e-4),   // [NIST] B.8 stokes: 1.0 E-04 m2/s (exact)
               }});

  t.push_back({Dimension::kDynamicViscosity, "dynamic_viscosity", "dynamic viscosity",
               "mPa.s", "cP",
               {
                   U("Pa.s", 1.0),
                   U("Pa s", 1.0),
                   U("mPa.s", 1e-3),
                   U("mPa s", 1e-3),
                   U("cP", 1e-3),  // [NIST] B.8 centipoise: 1.0 E-03 Pa.s (exact)
                   U("P", 1e-1),   // [NIST] B.8 poise: 1.0 E-01 Pa.s (exact)
               }});

  t.push_back({Dimension::kDensity, "density", "density", "kg/m3", "lb/ft3",
               {
                   U("kg/m3", 1.0),
                   U("g/cm3", 1e3),  // [NIST] B.8 gram per cubic centimeter: 1.0 E+03 kg/m3 (exact)
                   U("g/mL", 1e3),
                   U("g/cc", 1e3),
                   U("kg/L", 1e3),
                   U("kg/l", 1e3),
                   // [NIST] B.8 pound per cubic foot: 1.601 846 E+01 kg/m3
                   U("lb/ft3", kPound / kCubicFoot),
                   // [NIST] B.8 pound per gallon [U.S.]: 1.198 264 E+02 kg/m3
                   U("lb/gal", kPound / kUsGallon),
               }});

  // US power prints in hp (shaft power of pumps and bearing losses are the
  // usual US figures in hp); heat flows use the same dimension and print in
  // hp too; BTU/h and BTU/min are accepted as input.
  t.push_back({Dimension::kPower, "power", "power", "kW", "hp",
               {
                   U("W", 1.0),
                   U("kW", 1e3),
                   U("MW", 1e6),
                   U("hp", kHorsepower),  // [NIST] B.8 horsepower (550 ft.lbf/s): 7.456 999 E+02 W
                   // [NIST] B.8 British thermal unit_IT per hour: 2.930 711 E-01 W
                   U("BTU/h", kBtuIT / kHour),
                   U("Btu/h", kBtuIT / kHour),
                   U("BTU/hr", kBtuIT / kHour),
                   // [NIST] B.8 British thermal unit_IT per minute: 1.758 426 E+01 W
                   U("BTU/min", kBtuIT / kMinute),
                   U("Btu/min", kBtuIT / kMinute),
               }});

  // Btu_IT/(h.degF) = 1055.05585262 J * 1.8 / (3600 s K) = 0.52752792631 W/K,
  // from [NIST] B.8 "British thermal unit_IT per degree Fahrenheit":
  // 1.899 101 E+03 J/K, divided by the hour.
  const double btu_h_F = kBtuIT * kFahrenheitPerKelvin / kHour;
  t.push_back({Dimension::kConductance, "conductance", "thermal conductance", "W/K",
               "BTU/(h.degF)",
               {
                   U("W/K", 1.0),
                   U("kW/K", 1e3),
                   U("W/degC", 1.0),
                   U("kW/degC", 1e3),
                   U("BTU/(h.degF)", btu_h_F),
                   U("BTU/h/degF", btu_h_F),
                   U("BTU/(h.F)", btu_h_F),
                   U("BTU/h/F", btu_h_F),
               }});

  t.push_back({Dimension::kRotationalSpeed, "rotational_speed", "rotational speed", "rpm",
               "rpm",
               {
                   U("rad/s", 1.0),
                   U("rpm", rpm),
                   U("rev/min", rpm),
                   U("r/min", rpm),
                   U("krpm", 1e3 * rpm),
                   U("rev/s", rev),
                   U("r/s", rev),
               }});

  // [NIST] B.8 "British thermal unit_IT per pound degree Fahrenheit":
  // 4.1868 E+03 J/(kg.K), exact.
  const double btu_lb_F = kBtuIT * kFahrenheitPerKelvin / kPound;
  t.push_back({Dimension::kSpecificHeat, "specific_heat", "specific heat", "kJ/(kg.K)",
               "BTU/(lb.degF)",
               {
                   U("J/(kg.K)", 1.0),
                   U("J/kg/K", 1.0),
                   U("J/(kg.degC)", 1.0),
                   U("kJ/(kg.K)", 1e3),
                   U("kJ/kg/K", 1e3),
                   U("kJ/(kg.degC)", 1e3),
                   U("BTU/(lb.degF)", btu_lb_F),
                   U("BTU/lb/F", btu_lb_F),
                   U("BTU/(lb.F)", btu_lb_F),
                   U("BTU/lb/degF", btu_lb_F),
               }});

  // [NIST] B.8 "British thermal unit_IT foot per hour square foot degree
  // Fahrenheit [Btu_IT.ft/(h.ft2.degF)]": 1.730 735 E+00 W/(m.K); exact as
  // 1055.05585262 * 1.8 / (3600 * 0.3048).
  const double btu_h_ft_F = kBtuIT * kFahrenheitPerKelvin / (kHour * kFoot);
  t.push_back({Dimension::kThermalConductivity, "thermal_conductivity",
               "thermal conductivity", "W/(m.K)", "BTU/(h.ft.degF)",
               {
                   U("W/(m.K)", 1.0),
                   U("W/m/K", 1.0),
                   U("W/(m.degC)", 1.0),
                   U("BTU/(h.ft.degF)", btu_h_ft_F),
                   U("BTU/h/ft/degF", btu_h_ft_F),
                   U("BTU/(h.ft.F)", btu_h_ft_F),
               }});

  t.push_back({Dimension::kVelocity, "velocity", "velocity", "m/s", "ft/s",
               {
                   U("m/s", 1.0),
                   U("m/min", 1.0 / kMinute),
                   U("ft/s", kFoot),  // [NIST] B.8 foot per second: 3.048 E-01 m/s (exact)
                   U("ft/min", kFoot / kMinute),  // [NIST] B.8 foot per minute: 5.08 E-03 m/s (exact)
               }});

  t.push_back({Dimension::kTime, "time", "time", "s", "s",
               {
                   U("s", 1.0),
                   U("ms", 1e-3),
                   U("min", kMinute),  // [NIST] B.8 minute: 6.0 E+01 s (exact)
                   U("h", kHour),      // [NIST] B.8 hour: 3.6 E+03 s (exact)
                   U("hr", kHour),
               }});

  t.push_back({Dimension::kSlipCoefficient, "slip_coefficient", "slip coefficient", "m3",
               "in3",
               {
                   U("m3", 1.0),
                   U("cm3", 1e-6),
                   U("mm3", 1e-9),
                   U("in3", kCubicInch),  // [NIST] B.8 cubic inch: 1.638 706 4 E-05 m3 (exact)
               }});

  // 1/degF = 1.8/K ([NIST] B.9: 1 degF interval = (1/1.8) K).
  t.push_back({Dimension::kInverseTemperature, "inverse_temperature",
               "inverse temperature", "1/K", "1/degF",
               {
                   U("1/K", 1.0),
                   U("1/degC", 1.0),
                   U("1/\xC2\xB0" "C", 1.0),
                   U("1/degF", kFahrenheitPerKelvin),
                   U("1/\xC2\xB0" "F", kFahrenheitPerKelvin),
                   U("1/degR", kFahrenheitPerKelvin),
               }});

  // Kv in (m3/h)/sqrt(bar); Cv in (US gpm)/sqrt(psi). IEC 60534-1:2005,
  // clause 3 (definitions of flow coefficient): Kv = 0.865 Cv.
  t.push_back({Dimension::kFlowCoefficientKv, "flow_coefficient_kv",
               "flow coefficient (Kv)", "Kv", "Cv",
               {
                   U("Kv", 1.0),
                   U("Cv", 0.865),
               }});

  t.push_back({Dimension::kForce, "force", "force", "N", "lbf",
               {
                   U("N", 1.0),
                   U("kN", 1e3),
                   U("lbf", kPoundForce),  // [NIST] B.8 pound-force: 4.448 222 E+00 N (exact from lb and g_n)
                   U("kgf", kGravity),     // [NIST] B.8 kilogram-force: 9.806 65 E+00 N (exact)
               }});

  t.push_back({Dimension::kMass, "mass", "mass", "kg", "lb",
               {
                   U("kg", 1.0),
                   U("g", 1e-3),
                   U("lb", kPound),  // [NIST] B.8 pound (avoirdupois): 4.535 924 E-01 kg (exact)
               }});

  return t;
}

// The tables with every spelling's matching key filled in.
std::vector<DimInfo> KeyedTables() {
  std::vector<DimInfo> t = BuildTables();
  for (DimInfo& d : t)
    for (UnitDef& u : d.units) u.key = Normalize(u.name);
  return t;
}

const std::vector<DimInfo>& Tables() {
  static const std::vector<DimInfo> tables = KeyedTables();
  return tables;
}

const DimInfo* Info(Dimension dim) {
  for (const DimInfo& d : Tables())
    if (d.dim == dim) return &d;
  return nullptr;
}

const UnitDef* FindUnit(const DimInfo& d, std::string_view unit) {
  const std::string key = Normalize(unit);
  for (const UnitDef& u : d.units)
    if (u.key == key) return &u;
  return nullptr;
}

const UnitDef* FindByName(const DimInfo& d, std::string_view name) {
  for (const UnitDef& u : d.units)
    if (u.name == name) return &u;
  return nullptr;
}

// Pressure qualifier written as a trailing word: " abs", " absolute",
// " g", " gauge". Returns the unit without it.
std::string_view StripQualifier(std::string_view unit, Qual& q) {
  q = Qual::kNone;
  static const struct { const char* word; Qual q; } kWords[] = {
      {" absolute", Qual::kAbs}, {" abs", Qual::kAbs},
      {" gauge", Qual::kGauge},  {" g", Qual::kGauge}};
  for (const auto& w : kWords) {
    const std::string_view word(w.word);
    if (EndsWithNoCase(unit, word)) {
      q = w.q;
      return Trim(unit.substr(0, unit.size() - word.size()));
    }
    // A bare qualifier after the number: "101325 abs" (Pa, as a bare number);
    // not a bare "g", which reads as grams.
    if (word != " g" && unit.size() == word.size() - 1 &&
        EndsWithNoCase(unit, word.substr(1))) {
      q = w.q;
      return std::string_view();
    }
  }
  return unit;
}

std::string Article(const std::string& noun) {
  if (noun == "dimensionless") return "";
  const char c = noun.empty() ? 'x' : noun[0];
  return (c == 'a' || c == 'e' || c == 'i' || c == 'o' || c == 'u') ? "an " : "a ";
}

std::string UnitNames(const DimInfo& d) {
  std::string s;
  for (std::size_t i = 0; i < d.units.size(); ++i) {
    if (i) s += ", ";
    s += d.units[i].name;
  }
  return s;
}

std::string AcceptedList(const DimInfo& d) {
  std::string s = UnitNames(d);
  if (d.dim == Dimension::kPressure)
    s += " (gauge unless \"psia\", \"bara\" or a unit followed by \" abs\"; "
         "\" g\"/\" gauge\" also accepted)";
  s += "; a bare number is SI (";
  s += d.units.empty() ? std::string() : d.units[0].name;
  s += ")";
  return s;
}

std::string Example(const DimInfo& d) {
  if (d.dim == Dimension::kDimensionless) return "\"0.5\"";
  return std::string("\"1.5 ") + d.si_display + "\"";
}

ParsedQuantity Fail(std::string msg) {
  ParsedQuantity q;
  q.ok = false;
  q.error = std::move(msg);
  return q;
}

// Informal spellings seen in the trade that are not accepted (they are
// ambiguous or nonstandard), each with the unit to suggest instead.
struct Informal {
  const char* given;
  const char* suggest;
};
constexpr Informal kInformal[] = {
    {"l/m", "L/min"},   {"L/m", "L/min"},     {"lit/min", "L/min"}, {"ltr/min", "L/min"},
    {"lmin", "L/min"},  {"Lmin", "L/min"},    {"lps", "L/s"},       {"LPS", "L/s"},
    {"m3/hr", "m3/h"},  {"cc/min", "mL/min"}, {"lph", "L/h"},       {"LPH", "L/h"},
};

bool SameFactor(const UnitDef& a, const UnitDef& b) {
  return a.pre == b.pre && std::fabs(a.mul / a.div - b.mul / b.div) <= 1e-9 * std::fabs(b.mul / b.div);
}

// The unit of `d` to offer for an unknown `unit`: an informal spelling's
// known meaning; else the nearest spellings by edit distance, offered only
// when every one of them at the least distance has the same factor (so "l/m"
// is never answered with "L/s" or "gpm": a unit off by a large factor is
// worse than no suggestion).
std::string SuggestUnit(std::string_view unit, const DimInfo& d) {
  for (const Informal& f : kInformal)
    if (unit == f.given && FindByName(d, f.suggest) != nullptr) return f.suggest;
  const std::size_t limit = std::max<std::size_t>(2, unit.size() / 3);
  std::size_t best = limit + 1;
  std::vector<const UnitDef*> nearest;
  for (const UnitDef& u : d.units) {
    const std::size_t dist = OsaDistance(unit, u.name);
    if (dist > best) continue;
    if (dist < best) nearest.clear();
    best = dist;
    nearest.push_back(&u);
  }
  if (nearest.empty()) return std::string();
  for (const UnitDef* u : nearest)
    if (!SameFactor(*u, *nearest[0])) return std::string();
  return nearest[0]->name;
}

// For a kinematic viscosity written where a dynamic one is asked (or the
// reverse): how to convert, mu = rho nu (cP = cSt x density in g/cm3).
std::string ViscosityHint(Dimension field, const std::string& given) {
  if (field == Dimension::kDynamicViscosity && given == "kinematic viscosity")
    return " (cP = cSt x the oil's density in g/cm3 at that temperature, e.g. 46 cSt x 0.86 = 39.6 cP)";
  if (field == Dimension::kKinematicViscosity && given == "dynamic viscosity")
    return " (cSt = cP / the oil's density in g/cm3 at that temperature, e.g. 39.6 cP / 0.86 = 46 cSt)";
  return "";
}

// The error for a unit that is not accepted for `d`.
std::string UnknownUnitError(std::string_view unit, const DimInfo& d) {
  const std::string field = Article(d.name) + d.name;
  // Belongs to another dimension?
  std::vector<std::string> others;
  for (const DimInfo& o : Tables()) {
    if (o.dim == d.dim) continue;
    bool found = FindUnit(o, unit) != nullptr;
    if (!found && o.dim == Dimension::kPressure) {
      Qual q;
      const std::string_view base = StripQualifier(unit, q);
      found = q != Qual::kNone && !base.empty() && FindUnit(o, base) != nullptr;
    }
    if (found) others.push_back(o.name);
  }
  if (!others.empty()) {
    std::string what = Article(others[0]) + others[0];
    for (std::size_t i = 1; i < others.size(); ++i) what += " or " + others[i];
    return "unit " + Quote(unit) + " is " + what + ", but this field is " + field +
           "; accepted: " + AcceptedList(d) + ViscosityHint(d.dim, others[0]);
  }
  if (d.dim == Dimension::kRotationalSpeed && (unit == "Hz" || unit == "hz"))
    return "unit \"Hz\" is ambiguous for a rotational speed; write \"rev/s\" "
           "(or \"rad/s\"); accepted: " + AcceptedList(d);
  std::string msg = "unknown unit " + Quote(unit) + " for " + d.name;
  const std::string near = SuggestUnit(unit, d);
  if (!near.empty()) {
    msg += "; did you mean \"" + near + "\"?";
    if (near.size() == unit.size() && OsaDistance(near, unit) == 0)
      msg += " (units are case-sensitive)";
    msg += " accepted: ";
  } else {
    msg += "; accepted: ";
  }
  msg += AcceptedList(d);
  return msg;
}

// A dimensional value written as text must name its unit: "0.9" in a
// pressure field is refused rather than read as 0.9 Pa. Dimensionless values
// and Kv (whose unit is the coefficient itself) need none.
bool NeedsUnit(Dimension dim) {
  return dim != Dimension::kDimensionless && dim != Dimension::kFlowCoefficientKv;
}

std::string MissingUnitError(std::string_view text, const DimInfo& d) {
  const std::string_view t = Trim(text);
  std::size_t n = 0;
  while (n < t.size() && std::string_view("+-.0123456789eE").find(t[n]) != std::string_view::npos) ++n;
  const std::string number(t.substr(0, n));
  return "missing unit in " + Quote(text) + ": " + Article(d.name) + d.name +
         " written as text needs a unit, e.g. \"" + number + " " + d.si_display +
         "\"; only a JSON number without quotes (" + number + ") is read in SI (" +
         d.units[0].name + "); accepted units: " + UnitNames(d);
}

// What a value of `d` should look like, for messages.
std::string Expected(const DimInfo& d) {
  return d.dim == Dimension::kDimensionless
             ? std::string("a number (e.g. \"0.5\", \"50 %\")")
             : "a number followed by " + Article(d.name) + d.name + " unit (e.g. " + Example(d) + ")";
}

// The end of the number at the start of `s`: [+-] digits [. digits]
// [(e|E) [+-] digits]; *digits counts the mantissa's digits. An exponent
// without digits is left to the unit.
std::size_t ScanNumber(std::string_view s, std::size_t i, std::size_t* digits) {
  *digits = 0;
  while (i < s.size() && IsDigit(s[i])) { ++i; ++*digits; }
  if (i < s.size() && s[i] == '.') {
    ++i;
    while (i < s.size() && IsDigit(s[i])) { ++i; ++*digits; }
  }
  if (i < s.size() && (s[i] == 'e' || s[i] == 'E')) {
    std::size_t j = i + 1;
    if (j < s.size() && (s[j] == '+' || s[j] == '-')) ++j;
    if (j < s.size() && IsDigit(s[j])) {
      while (j < s.size() && IsDigit(s[j])) ++j;
      i = j;
    }
  }
  return i;
}

// The mantissa and exponent as from_chars takes them (no '+', no bare '.'
// at either end of the mantissa).
std::string FromCharsText(std::string_view digits) {
  std::string t(digits);
  if (!t.empty() && t[0] == '.') t.insert(0, "0");
  if (!t.empty() && t.back() == '.') t += '0';
  const std::size_t e = t.find_first_of("eE");
  if (e != std::string::npos && e > 0 && t[e - 1] == '.') t.insert(e, "0");
  return t;
}

// Reads the number at the start of `s` (non-empty) into *value and the
// offset after it into *end; the result is ok, or the failure.
ParsedQuantity ReadNumber(std::string_view s, const std::string& expected, double* value, std::size_t* end) {
  std::size_t i = 0;
  bool negative = false;
  if (s[i] == '+' || s[i] == '-') {
    negative = s[i] == '-';
    ++i;
  }
  const std::size_t mant_begin = i;
  std::string lower;
  for (std::size_t k = i; k < s.size() && k < i + 3; ++k) lower += ToLower(s[k]);
  if (lower == "nan" || lower == "inf")
    return Fail(Quote(s) + " does not start with a finite number; expected " + expected);
  if (s.size() > i + 1 && s[i] == '0' && (s[i + 1] == 'x' || s[i + 1] == 'X'))
    return Fail(Quote(s) + ": hexadecimal numbers are not accepted; expected " + expected);
  std::size_t digits = 0;
  i = ScanNumber(s, i, &digits);
  if (digits == 0) return Fail("expected " + expected + ", got " + Quote(s));
  const std::string_view number_text = s.substr(0, i);
  // from_chars takes no '+' and is locale-independent.
  const std::string digits_text = FromCharsText(s.substr(mant_begin, i - mant_begin));
  double magnitude = 0.0;
  const auto res = std::from_chars(digits_text.data(), digits_text.data() + digits_text.size(),
                                   magnitude, std::chars_format::general);
  if (res.ec == std::errc::result_out_of_range)
    return Fail("number " + Quote(number_text) + " is out of range");
  if (res.ec != std::errc() || res.ptr != digits_text.data() + digits_text.size())
    return Fail("malformed number " + Quote(number_text) + "; expected " + expected);
  if (!std::isfinite(magnitude))
    return Fail("number " + Quote(number_text) + " is out of range");
  *value = negative ? -magnitude : magnitude;
  *end = i;
  ParsedQuantity ok;
  ok.ok = true;
  return ok;
}

// The failure for a unit `u` of `d` that was not found: a malformed number
// ("1,5 bar", "1.5.2 bar") or an unknown unit.
ParsedQuantity UnitNotFound(std::string_view u, std::string_view s, const DimInfo& d, const std::string& expected) {
  if (!u.empty() && (IsDigit(u[0]) || u[0] == '.' || u[0] == ',' || u[0] == '+' ||
                     u[0] == '-' || u[0] == 'e' || u[0] == 'E') &&
      FindUnit(d, u) == nullptr) {
    bool elsewhere = false;
    for (const DimInfo& o : Tables()) elsewhere = elsewhere || FindUnit(o, u) != nullptr;
    if (!elsewhere)
      return Fail("malformed number in " + Quote(s) +
                  (u[0] == ',' ? " (use '.' as the decimal separator)" : "") +
                  "; expected " + expected);
  }
  return Fail(UnknownUnitError(u, d));
}

// The text as read so far: the whole value `s`, its number and its unit.
struct ValueText {
  std::string_view s;
  std::string_view number;
  std::string_view unit;
};

// A pressure or pressure difference: gauge/absolute qualifiers, and an
// absolute pressure turned into gauge against `ambient_pa`.
ParsedQuantity ParsePressure(const ValueText& t, double value, const DimInfo& d, const std::string& expected,
                             double ambient_pa) {
  const DimInfo& p = *Info(Dimension::kPressure);
  Qual suffix_q = Qual::kNone;
  const std::string_view base = StripQualifier(t.unit, suffix_q);
  if (base.empty()) return Fail(MissingUnitError(t.s, d));
  const UnitDef* u = FindUnit(p, base);
  if (u == nullptr && d.dim == Dimension::kPressureDifference && suffix_q == Qual::kNone)
    u = FindUnit(d, base);  // "psid"
  if (u == nullptr) return UnitNotFound(t.unit, t.s, d, expected);
  const std::string number(t.number);
  if (suffix_q != Qual::kNone && u->qual != Qual::kNone)
    return Fail("unit " + Quote(t.unit) + " states gauge/absolute twice; write \"" + number + " " + u->base +
                (u->qual == Qual::kAbs ? " abs" : " g") + "\" or \"" + number + " " + u->name + "\"");
  const Qual q = suffix_q != Qual::kNone ? suffix_q : u->qual;
  if (d.dim == Dimension::kPressureDifference && q != Qual::kNone) {
    const std::string plain = u->base.empty() ? u->name : u->base;
    return Fail(Quote(t.s) + ": a pressure difference is neither gauge nor absolute; "
                "write it without a qualifier, e.g. \"" + number + " " + plain + "\"");
  }
  const double pa = value * u->mul;
  if (!std::isfinite(pa)) return Fail("number " + Quote(t.number) + " is out of range");
  ParsedQuantity out;
  if (d.dim == Dimension::kPressure && q == Qual::kAbs) {
    if (pa < 0.0) return Fail("absolute pressure " + Quote(t.s) + " is negative");
    if (!std::isfinite(ambient_pa) || ambient_pa <= 0.0)
      return Fail("cannot convert absolute pressure " + Quote(t.s) +
                  " to gauge: the ambient pressure is not a positive number");
    out.si = pa - ambient_pa;
    out.absolute = true;
  } else {
    out.si = pa;
  }
  out.ok = true;
  return out;
}

// Any other dimension: (value + pre) * mul / div.
ParsedQuantity ParseOther(const ValueText& t, double value, const DimInfo& d, const std::string& expected) {
  double si = value;
  if (t.unit.empty() && NeedsUnit(d.dim)) return Fail(MissingUnitError(t.s, d));
  if (!t.unit.empty()) {
    const UnitDef* u = FindUnit(d, t.unit);
    if (u == nullptr) return UnitNotFound(t.unit, t.s, d, expected);
    si = (value + u->pre) * u->mul / u->div;
  }
  if (!std::isfinite(si)) return Fail("number " + Quote(t.number) + " is out of range");
  if (d.dim == Dimension::kTemperature && si < 0.0)
    return Fail("temperature " + Quote(t.s) + " is below absolute zero");
  ParsedQuantity out;
  out.ok = true;
  out.si = si;
  return out;
}

ParsedQuantity ParseImpl(std::string_view text, Dimension dim, double ambient_pa) {
  const DimInfo* info = Info(dim);
  if (info == nullptr) return Fail("internal error: unknown dimension");
  const DimInfo& d = *info;
  const std::string expected = Expected(d);
  if (text.size() > kMaxTextLength)
    return Fail("value too long (" + std::to_string(text.size()) +
                " characters, the limit is " + std::to_string(kMaxTextLength) +
                "); expected " + expected);
  const std::string_view s = Trim(text);
  if (s.empty()) return Fail("empty value; expected " + expected);
  double value = 0.0;
  std::size_t end = 0;
  const ParsedQuantity number = ReadNumber(s, expected, &value, &end);
  if (!number.ok) return number;
  const ValueText t{s, s.substr(0, end), Trim(s.substr(end))};
  if (d.dim == Dimension::kPressure || d.dim == Dimension::kPressureDifference)
    return ParsePressure(t, value, d, expected, ambient_pa);
  return ParseOther(t, value, d, expected);
}

}  // namespace

// ---------------------------------------------------------------------------
// Public interface.

ParsedQuantity ParseQuantity(std::string_view text, Dimension dim, double ambient_pa) {
  try {
    return ParseImpl(text, dim, ambient_pa);
  } catch (...) {
    ParsedQuantity q;
    q.ok = false;
    try {
      q.error = "internal error while reading a quantity";
    } catch (...) {
    }
    return q;
  }
}

std::string DimensionName(Dimension dim) {
  try {
    const DimInfo* d = Info(dim);
    return d ? d->name : "unknown dimension";
  } catch (...) {
    return std::string();
  }
}

std::string DimensionKey(Dimension dim) {
  try {
    const DimInfo* d = Info(dim);
    return d ? d->key : "unknown";
  } catch (...) {
    return std::string();
  }
}

std::vector<std::string> AcceptedUnits(Dimension dim) {
  std::vector<std::string> v;
  try {
    const DimInfo* d = Info(dim);
    if (d)
      for (const UnitDef& u : d->units) v.push_back(u.name);
  } catch (...) {
  }
  return v;
}

std::string SiUnit(Dimension dim) {
  const std::vector<std::string> units = AcceptedUnits(dim);
  return units.empty() ? std::string() : units[0];
}

std::vector<Dimension> AllDimensions() {
  std::vector<Dimension> v;
  try {
    for (const DimInfo& d : Tables()) v.push_back(d.dim);
  } catch (...) {
  }
  return v;
}

bool DimensionFromKey(std::string_view key, Dimension& out) {
  try {
    for (const DimInfo& d : Tables())
      if (key == d.key) {
        out = d.dim;
        return true;
      }
  } catch (...) {
  }
  return false;
}

std::string DisplayUnit(Dimension dim, UnitSystem system) {
  try {
    const DimInfo* d = Info(dim);
    if (!d) return std::string();
    return system == UnitSystem::kUS ? d->us_display : d->si_display;
  } catch (...) {
    return std::string();
  }
}

namespace {
const UnitDef* DisplayDef(Dimension dim, UnitSystem system) {
  const DimInfo* d = Info(dim);
  if (!d) return nullptr;
  const char* name = system == UnitSystem::kUS ? d->us_display : d->si_display;
  if (name[0] == '\0') return nullptr;  // dimensionless: identity
  return FindByName(*d, name);
}
}  // namespace

double FromSI(double si, Dimension dim, UnitSystem system) {
  try {
    const UnitDef* u = DisplayDef(dim, system);
    if (!u) return si;
    return si * u->div / u->mul - u->pre;
  } catch (...) {
    return si;
  }
}

double ToSI(double display_value, Dimension dim, UnitSystem system) {
  try {
    const UnitDef* u = DisplayDef(dim, system);
    if (!u) return display_value;
    return (display_value + u->pre) * u->mul / u->div;
  } catch (...) {
    return display_value;
  }
}

std::string NearestName(std::string_view given, const std::vector<std::string>& options) {
  try {
    const std::size_t limit = std::max<std::size_t>(2, given.size() / 3);
    std::size_t best = limit + 1;
    const std::string* best_name = nullptr;
    for (const std::string& o : options) {
      const std::size_t diff =
          o.size() > given.size() ? o.size() - given.size() : given.size() - o.size();
      if (diff > limit) continue;  // the distance is at least the length difference
      const std::size_t dist = OsaDistance(given, o);
      if (dist < best) {
        best = dist;
        best_name = &o;
      }
    }
    return best_name ? *best_name : std::string();
  } catch (...) {
    return std::string();
  }
}

std::string FormatNumber(double v) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.6g", v);
  return buf;
}

std::string FormatDegC(double T_K) { return FormatNumber(T_K - kCelsiusOffset); }

}  // namespace loopwright
