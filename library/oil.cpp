#include "library/oil.h"

#include <algorithm>
#include <array>
#include <cctype>
#include <cmath>
#include <limits>
#include <string>

#include "library/memo.h"
#include "library/units.h"

namespace loopwright {
namespace {

constexpr double kLn10 = 2.302585092994045684;
constexpr double kCSt = 1e-6;                  // 1 cSt = 1e-6 m2/s (exact)
constexpr double kT15 = 288.15;                // 15 °C [K]
constexpr double kT60F = 288.705555555555556;  // 60 °F [K] (exact)
// Water at 60 °F, 0.101325 MPa, IAPWS-95 (python3-iapws: 999.0171 kg/m3).
constexpr double kRhoWater60F = 999.017;
// IT BTU conversions, exact by definition (NIST SP 811, App. B):
constexpr double kBtuPerLbFToJPerKgK = 4186.8;
// 1055.05585262 J / (3600 s · 0.3048 m · 5/9 K)
constexpr double kBtuPerHrFtFToWPerMK = 1.7307346663713914;
// Evaluation clamp (finiteness only; the validity range is in OilExtras).
constexpr double kTEvalMin = 150.0;
constexpr double kTEvalMax = 700.0;
// Cap on log10(log10(Z)) so that Z = 10^(10^w) stays finite (Z ≤ 1e100).
constexpr double kWMax = 2.0;
// ASTM D341: the simple Z = ν + 0.7 holds for ν ≥ 2.0 mm2/s.
constexpr double kNuMinCSt = 2.0;

double LogLogZ(double nu_cSt) { return std::log10(std::log10(nu_cSt + 0.7)); }

// ASTM D2270-10 Table 1: {KV100 [mm2/s], L, H}; L and H are the KV40 [mm2/s]
// of oils of VI 0 and VI 100 having that KV100.
struct LhRow {
  double y, l, h;
};
constexpr LhRow kD2270Table1[] = {
    {2.0, 7.994, 6.394},
    {2.1, 8.64, 6.894},
    {2.2, 9.309, 7.41},
    {2.3, 10.0, 7.944},
    {2.4, 10.71, 8.496},
    {2.5, 11.45, 9.063},
    {2.6, 12.21, 9.647},
    {2.7, 13.0, 10.25},
    {2.8, 13.8, 10.87},
    {2.9, 14.63, 11.5},
    {3.0, 15.49, 12.15},
    {3.1, 16.36, 12.82},
    {3.2, 17.26, 13.51},
    {3.3, 18.18, 14.21},
    {3.4, 19.12, 14.93},
    {3.5, 20.09, 15.66},
    {3.6, 21.08, 16.42},
    {3.7, 22.09, 17.19},
    {3.8, 23.13, 17.97},
    {3.9, 24.19, 18.77},
    {4.0, 25.32, 19.56},
    {4.1, 26.5, 20.37},
    {4.2, 27.75, 21.21},
    {4.3, 29.07, 22.05},
    {4.4, 30.48, 22.92},
    {4.5, 31.96, 23.81},
    {4.6, 33.52, 24.71},
    {4.7, 35.13, 25.63},
    {4.8, 36.79, 26.57},
    {4.9, 38.5, 27.53},
    {5.0, 40.23, 28.49},
    {5.1, 41.99, 29.46},
    {5.2, 43.76, 30.43},
    {5.3, 45.53, 31.4},
    {5.4, 47.31, 32.37},
    {5.5, 49.09, 33.34},
    {5.6, 50.87, 34.32},
    {5.7, 52.64, 35.29},
    {5.8, 54.42, 36.26},
    {5.9, 56.2, 37.23},
    {6.0, 57.97, 38.19},
    {6.1, 59.74, 39.17},
    {6.2, 61.52, 40.15},
    {6.3, 63.32, 41.13},
    {6.4, 65.18, 42.14},
    {6.5, 67.12, 43.18},
    {6.6, 69.16, 44.24},
    {6.7, 71.29, 45.33},
    {6.8, 73.48, 46.44},
    {6.9, 75.72, 47.51},
    {7.0, 78.0, 48.57},
    {7.1, 80.25, 49.61},
    {7.2, 82.39, 50.69},
    {7.3, 84.53, 51.78},
    {7.4, 86.66, 52.88},
    {7.5, 88.85, 53.98},
    {7.6, 91.04, 55.09},
    {7.7, 93.2, 56.2},
    {7.8, 95.43, 57.31},
    {7.9, 97.72, 58.45},
    {8.0, 100.0, 59.6},
    {8.1, 102.3, 60.74},
    {8.2, 104.6, 61.89},
    {8.3, 106.9, 63.05},
    {8.4, 109.2, 64.18},
    {8.5, 111.5, 65.32},
    {8.6, 113.9, 66.48},
    {8.7, 116.2, 67.64},
    {8.8, 118.5, 68.79},
    {8.9, 120.9, 69.94},
    {9.0, 123.3, 71.1},
    {9.1, 125.7, 72.27},
    {9.2, 128.0, 73.42},
    {9.3, 130.4, 74.57},
    {9.4, 132.8, 75.73},
    {9.5, 135.3, 76.91},
    {9.6, 137.7, 78.08},
    {9.7, 140.1, 79.27},
    {9.8, 142.7, 80.46},
    {9.9, 145.2, 81.67},
    {10.0, 147.7, 82.87},
    {10.1, 150.3, 84.08},
    {10.2, 152.9, 85.3},
    {10.3, 155.4, 86.51},
    {10.4, 158.0, 87.72},
    {10.5, 160.6, 88.95},
    {10.6, 163.2, 90.19},
    {10.7, 165.8, 91.4},
    {10.8, 168.5, 92.65},
    {10.9, 171.2, 93.92},
    {11.0, 173.9, 95.19},
    {11.1, 176.6, 96.45},
    {11.2, 179.4, 97.71},
    {11.3, 182.1, 98.97},
    {11.4, 184.9, 100.2},
    {11.5, 187.6, 101.5},
    {11.6, 190.4, 102.8},
    {11.7, 193.3, 104.1},
    {11.8, 196.2, 105.4},
    {11.9, 199.0, 106.7},
    {12.0, 201.9, 108.0},
    {12.1, 204.8, 109.4},
    {12.2, 207.8, 110.7},
    {12.3, 210.7, 112.0},
    {12.4, 213.6, 113.3},
    {12.5, 216.6, 114.7},
    {12.6, 219.6, 116.0},
    {12.7, 222.6, 117.4},
    {12.8, 225.7, 118.7},
    {12.9, 228.8, 120.1},
    {13.0, 231.9, 121.5},
    {13.1, 235.0, 122.9},
    {13.2, 238.1, 124.2},
    {13.3, 241.2, 125.6},
    {13.4, 244.3, 127.0},
    {13.5, 247.4, 128.4},
    {13.6, 250.6, 129.8},
    {13.7, 253.8, 131.2},
    {13.8, 257.0, 132.6},
    {13.9, 260.1, 134.0},
    {14.0, 263.3, 135.4},
    {14.1, 266.6, 136.8},
    {14.2, 269.8, 138.2},
    {14.3, 273.0, 139.6},
    {14.4, 276.3, 141.0},
    {14.5, 279.6, 142.4},
    {14.6, 283.0, 143.9},
    {14.7, 286.4, 145.3},
    {14.8, 289.7, 146.8},
    {14.9, 293.0, 148.2},
    {15.0, 296.5, 149.7},
    {15.1, 300.0, 151.2},
    {15.2, 303.4, 152.6},
    {15.3, 306.9, 154.1},
    {15.4, 310.3, 155.6},
    {15.5, 313.9, 157.0},
    {15.6, 317.5, 158.6},
    {15.7, 321.1, 160.1},
    {15.8, 324.6, 161.6},
    {15.9, 328.3, 163.1},
    {16.0, 331.9, 164.6},
    {16.1, 335.5, 166.1},
    {16.2, 339.2, 167.7},
    {16.3, 342.9, 169.2},
    {16.4, 346.6, 170.7},
    {16.5, 350.3, 172.3},
    {16.6, 354.1, 173.8},
    {16.7, 358.0, 175.4},
    {16.8, 361.7, 177.0},
    {16.9, 365.6, 178.6},
    {17.0, 369.4, 180.2},
    {17.1, 373.3, 181.7},
    {17.2, 377.1, 183.3},
    {17.3, 381.0, 184.9},
    {17.4, 384.9, 186.5},
    {17.5, 388.9, 188.1},
    {17.6, 392.7, 189.7},
    {17.7, 396.7, 191.3},
    {17.8, 400.7, 192.9},
    {17.9, 404.6, 194.6},
    {18.0, 408.6, 196.2},
    {18.1, 412.6, 197.8},
    {18.2, 416.7, 199.4},
    {18.3, 420.7, 201.0},
    {18.4, 424.9, 202.6},
    {18.5, 429.0, 204.3},
    {18.6, 433.2, 205.9},
    {18.7, 437.3, 207.6},
    {18.8, 441.5, 209.3},
    {18.9, 445.7, 211.0},
    {19.0, 449.9, 212.7},
    {19.1, 454.2, 214.4},
    {19.2, 458.4, 216.1},
    {19.3, 462.7, 217.7},
    {19.4, 467.0, 219.4},
    {19.5, 471.3, 221.1},
    {19.6, 475.7, 222.8},
    {19.7, 479.7, 224.5},
    {19.8, 483.9, 226.2},
    {19.9, 488.6, 227.7},
    {20.0, 493.2, 229.5},
    {20.2, 501.5, 233.0},
    {20.4, 510.8, 236.4},
    {20.6, 519.9, 240.1},
    {20.8, 528.8, 243.5},
    {21.0, 538.4, 247.1},
    {21.2, 547.5, 250.7},
    {21.4, 556.7, 254.2},
    {21.6, 566.4, 257.8},
    {21.8, 575.6, 261.5},
    {22.0, 585.2, 264.9},
    {22.2, 595.0, 268.6},
    {22.4, 604.3, 272.3},
    {22.6, 614.2, 275.8},
    {22.8, 624.1, 279.6},
    {23.0, 633.6, 283.3},
    {23.2, 643.4, 286.8},
    {23.4, 653.8, 290.5},
    {23.6, 663.3, 294.4},
    {23.8, 673.7, 297.9},
    {24.0, 683.9, 301.8},
    {24.2, 694.5, 305.6},
    {24.4, 704.2, 309.4},
    {24.6, 714.9, 313.0},
    {24.8, 725.7, 317.0},
    {25.0, 736.5, 320.9},
    {25.2, 747.2, 324.9},
    {25.4, 758.2, 328.8},
    {25.6, 769.3, 332.7},
    {25.8, 779.7, 336.7},
    {26.0, 790.4, 340.5},
    {26.2, 801.6, 344.4},
    {26.4, 812.8, 348.4},
    {26.6, 824.1, 352.3},
    {26.8, 835.5, 356.4},
    {27.0, 847.0, 360.5},
    {27.2, 857.5, 364.6},
    {27.4, 869.0, 368.3},
    {27.6, 880.6, 372.3},
    {27.8, 892.3, 376.4},
    {28.0, 904.1, 380.6},
    {28.2, 915.8, 384.6},
    {28.4, 927.6, 388.8},
    {28.6, 938.6, 393.0},
    {28.8, 951.2, 396.6},
    {29.0, 963.4, 401.1},
    {29.2, 975.4, 405.3},
    {29.4, 987.1, 409.5},
    {29.6, 998.9, 413.5},
    {29.8, 1011.0, 417.6},
    {30.0, 1023.0, 421.7},
    {30.5, 1055.0, 432.4},
    {31.0, 1086.0, 443.2},
    {31.5, 1119.0, 454.0},
    {32.0, 1151.0, 464.9},
    {32.5, 1184.0, 475.9},
    {33.0, 1217.0, 487.0},
    {33.5, 1251.0, 498.1},
    {34.0, 1286.0, 509.6},
    {34.5, 1321.0, 521.1},
    {35.0, 1356.0, 532.5},
    {35.5, 1391.0, 544.0},
    {36.0, 1427.0, 555.6},
    {36.5, 1464.0, 567.1},
    {37.0, 1501.0, 579.3},
    {37.5, 1538.0, 591.3},
    {38.0, 1575.0, 603.1},
    {38.5, 1613.0, 615.0},
    {39.0, 1651.0, 627.1},
    {39.5, 1691.0, 639.2},
    {40.0, 1730.0, 651.8},
    {40.5, 1770.0, 664.2},
    {41.0, 1810.0, 676.6},
    {41.5, 1851.0, 689.1},
    {42.0, 1892.0, 701.9},
    {42.5, 1935.0, 714.9},
    {43.0, 1978.0, 728.2},
    {43.5, 2021.0, 741.3},
    {44.0, 2064.0, 754.4},
    {44.5, 2108.0, 767.6},
    {45.0, 2152.0, 780.9},
    {45.5, 2197.0, 794.5},
    {46.0, 2243.0, 808.2},
    {46.5, 2288.0, 821.9},
    {47.0, 2333.0, 835.5},
    {47.5, 2380.0, 849.2},
    {48.0, 2426.0, 863.0},
    {48.5, 2473.0, 876.9},
    {49.0, 2521.0, 890.9},
    {49.5, 2570.0, 905.3},
    {50.0, 2618.0, 919.6},
    {50.5, 2667.0, 933.6},
    {51.0, 2717.0, 948.2},
    {51.5, 2767.0, 962.9},
    {52.0, 2817.0, 977.5},
    {52.5, 2867.0, 992.1},
    {53.0, 2918.0, 1007.0},
    {53.5, 2969.0, 1021.0},
    {54.0, 3020.0, 1036.0},
    {54.5, 3073.0, 1051.0},
    {55.0, 3126.0, 1066.0},
    {55.5, 3180.0, 1082.0},
    {56.0, 3233.0, 1097.0},
    {56.5, 3286.0, 1112.0},
    {57.0, 3340.0, 1127.0},
    {57.5, 3396.0, 1143.0},
    {58.0, 3452.0, 1159.0},
    {58.5, 3507.0, 1175.0},
    {59.0, 3563.0, 1190.0},
    {59.5, 3619.0, 1206.0},
    {60.0, 3676.0, 1222.0},
    {60.5, 3734.0, 1238.0},
    {61.0, 3792.0, 1254.0},
    {61.5, 3850.0, 1270.0},
    {62.0, 3908.0, 1286.0},
    {62.5, 3966.0, 1303.0},
    {63.0, 4026.0, 1319.0},
    {63.5, 4087.0, 1336.0},
    {64.0, 4147.0, 1352.0},
    {64.5, 4207.0, 1369.0},
    {65.0, 4268.0, 1386.0},
    {65.5, 4329.0, 1402.0},
    {66.0, 4392.0, 1419.0},
    {66.5, 4455.0, 1436.0},
    {67.0, 4517.0, 1454.0},
    {67.5, 4580.0, 1471.0},
    {68.0, 4645.0, 1488.0},
    {68.5, 4709.0, 1506.0},
    {69.0, 4773.0, 1523.0},
    {69.5, 4839.0, 1541.0},
    {70.0, 4905.0, 1558.0},
};

// ISO 3448:1992 Table 1 midpoints [mm2/s at 40 °C]. VG 2200 and 3200 are
// from memory (the reproductions read stop at VG 1500).
struct VgRow {
  int grade;
  double kv40;
};
constexpr VgRow kIsoVg[] = {
    {2, 2.2},       {3, 3.2},       {5, 4.6},       {7, 6.8},
    {10, 10.0},     {15, 15.0},     {22, 22.0},     {32, 32.0},
    {46, 46.0},     {68, 68.0},     {100, 100.0},   {150, 150.0},
    {220, 220.0},   {320, 320.0},   {460, 460.0},   {680, 680.0},
    {1000, 1000.0}, {1500, 1500.0}, {2200, 2200.0}, {3200, 3200.0},
};

// SAE J300 (Jan 2015) Table 1 KV100 classes [mm2/s]; W grades: minimum only.
// Read from reproductions of the 1999 and 2013 tables; SAE 8 (4.0–<6.1) and
// SAE 12 (5.0–<7.1), added in 2015, are from memory. SAE 20 is 6.9–<9.3 since
// the 2013 revision (5.6–<9.3 before).
struct SaeRow {
  const char* grade;
  double min, max;
};
constexpr double kInf = std::numeric_limits<double>::infinity();
constexpr SaeRow kSaeJ300[] = {
    {"0W", 3.8, kInf},  {"5W", 3.8, kInf},  {"10W", 4.1, kInf},
    {"15W", 5.6, kInf}, {"20W", 5.6, kInf}, {"25W", 9.3, kInf},
    {"8", 4.0, 6.1},    {"12", 5.0, 7.1},   {"16", 6.1, 8.2},
    {"20", 6.9, 9.3},   {"30", 9.3, 12.5},  {"40", 12.5, 16.3},
    {"50", 16.3, 21.9}, {"60", 21.9, 26.1},
};

std::string Upper(std::string s) {
  for (char& c : s) c = static_cast<char>(std::toupper(static_cast<unsigned char>(c)));
  s.erase(std::remove(s.begin(), s.end(), ' '), s.end());
  return s;
}

// L and H at KV100 = y [mm2/s]: Table 1 with linear interpolation (§5.1.1),
// the §5.1.2 formulas above 70 mm2/s. False below 2 mm2/s.
bool LookUpLH(double y, double* l, double* h) {
  constexpr size_t n = sizeof(kD2270Table1) / sizeof(kD2270Table1[0]);
  if (!(y >= kD2270Table1[0].y)) return false;
  if (y > kD2270Table1[n - 1].y) {
    *l = 0.8353 * y * y + 14.67 * y - 216.0;
    *h = 0.1684 * y * y + 11.85 * y - 97.0;
    return true;
  }
  const LhRow* hi = std::lower_bound(
      std::begin(kD2270Table1), std::end(kD2270Table1), y,
      [](const LhRow& r, double v) { return r.y < v; });
  if (hi->y == y) {
    *l = hi->l;
    *h = hi->h;
    return true;
  }
  const LhRow* lo = hi - 1;
  const double f = (y - lo->y) / (hi->y - lo->y);
  *l = lo->l + f * (hi->l - lo->l);
  *h = lo->h + f * (hi->h - lo->h);
  return true;
}

void SetError(std::string* error, const std::string& msg) {
  if (error) *error = msg;
}

bool ValidExtras(const OilExtras& e, std::string* error) {
  if (!(e.rho15_kgm3 > 0 && std::isfinite(e.rho15_kgm3))) {
    SetError(error, "oil density at 15 degC must be positive, got " + FormatNumber(e.rho15_kgm3) + " kg/m3");
    return false;
  }
  if (!(e.alpha_per_K >= 0 && e.alpha_per_K < 0.01)) {
    SetError(error, "oil expansion coefficient must lie in [0, 0.01) 1/K, got " +
                        FormatNumber(e.alpha_per_K) + " 1/K");
    return false;
  }
  if (e.cp_JkgK && !(*e.cp_JkgK > 0 && std::isfinite(*e.cp_JkgK))) {
    SetError(error, "oil specific heat must be positive, got " + FormatNumber(*e.cp_JkgK) + " J/(kg.K)");
    return false;
  }
  if (e.k_WmK && !(*e.k_WmK > 0 && std::isfinite(*e.k_WmK))) {
    SetError(error, "oil thermal conductivity must be positive, got " + FormatNumber(*e.k_WmK) + " W/(m.K)");
    return false;
  }
  if (!(e.T_min_K > 0 && e.T_max_K > e.T_min_K && std::isfinite(e.T_max_K))) {
    SetError(error, "oil temperature range must satisfy 0 < T_min < T_max, got " +
                        FormatNumber(e.T_min_K) + " K .. " + FormatNumber(e.T_max_K) + " K");
    return false;
  }
  return true;
}

}  // namespace

OilFluid::OilFluid(double a, double b, OilExtras extras)
    : a_(a), b_(b), extras_(std::move(extras)) {
  const double rho60 = extras_.rho15_kgm3 * (1.0 - extras_.alpha_per_K * (kT60F - kT15));
  s6060_ = rho60 / kRhoWater60F;
}

std::shared_ptr<OilFluid> OilFluid::FromTwoPoints(double nu1_m2s, double T1_K,
                                                  double nu2_m2s, double T2_K,
                                                  OilExtras extras,
                                                  std::string* error) {
  if (!(nu1_m2s > 0 && nu2_m2s > 0 && std::isfinite(nu1_m2s) && std::isfinite(nu2_m2s))) {
    SetError(error, "oil reference viscosities must be positive, got " + FormatNumber(nu1_m2s / kCSt) +
                        " cSt and " + FormatNumber(nu2_m2s / kCSt) + " cSt");
    return nullptr;
  }
  if (!(T1_K > 0 && T2_K > 0 && std::isfinite(T1_K) && std::isfinite(T2_K)) || T1_K == T2_K) {
    SetError(error, "oil reference temperatures must be positive and different, got " +
                        FormatNumber(T1_K) + " K and " + FormatNumber(T2_K) + " K");
    return nullptr;
  }
  if ((T2_K - T1_K) * (nu2_m2s - nu1_m2s) >= 0) {
    SetError(error, "oil viscosity must fall as temperature rises: " + FormatNumber(nu1_m2s / kCSt) +
                        " cSt at " + FormatNumber(T1_K) + " K, " + FormatNumber(nu2_m2s / kCSt) + " cSt at " +
                        FormatNumber(T2_K) + " K");
    return nullptr;
  }
  if (!ValidExtras(extras, error)) return nullptr;
  const double ll1 = LogLogZ(nu1_m2s / kCSt);
  const double ll2 = LogLogZ(nu2_m2s / kCSt);
  const double lt1 = std::log10(T1_K), lt2 = std::log10(T2_K);
  const double b = (ll1 - ll2) / (lt2 - lt1);
  const double a = ll1 + b * lt1;
  return std::shared_ptr<OilFluid>(new OilFluid(a, b, std::move(extras)));
}

bool OilFluid::SetKv40Kv100(double kv40_m2s, double kv100_m2s, std::string* error) {
  auto line = FromTwoPoints(kv40_m2s, 313.15, kv100_m2s, 373.15, extras_, error);
  if (!line) return false;
  a_ = line->a_;
  b_ = line->b_;
  return true;
}

std::shared_ptr<OilFluid> OilFluid::FromIsoVg(int grade, double kv100_m2s,
                                              OilExtras extras,
                                              std::string* error) {
  std::optional<double> kv40 = IsoVgKv40(grade);
  if (!kv40) {
    SetError(error, "ISO VG " + std::to_string(grade) +
                        " is not an ISO 3448 grade (2, 3, 5, 7, 10, 15, 22, 32, 46, 68, 100, "
                        "150, 220, 320, 460, 680, 1000, 1500, 2200, 3200)");
    return nullptr;
  }
  return FromTwoPoints(*kv40, 313.15, kv100_m2s, 373.15, std::move(extras), error);
}

std::shared_ptr<OilFluid> OilFluid::FromSaeJ300(const std::string& grade,
                                                double kv40_m2s,
                                                double kv100_m2s,
                                                OilExtras extras,
                                                std::string* error) {
  const std::string why = CheckSaeJ300Kv100(grade, kv100_m2s);
  if (!why.empty()) {
    SetError(error, why);
    return nullptr;
  }
  return FromTwoPoints(kv40_m2s, 313.15, kv100_m2s, 373.15, std::move(extras), error);
}

namespace {

// Walther's line (nu in cSt and its T derivative at T [K]) for the
// constants (a, b): log10(log10(nu + 0.7)) = a - b log10(T).
std::array<double, 2> WaltherLine(double a, double b, double T) {
  double w = a - b * std::log10(T);  // log10(log10(Z))
  double dw_dT = -b / (T * kLn10);
  if (w > kWMax) {  // finiteness guard far below the valid range
    w = kWMax;
    dw_dT = 0.0;
  }
  const double tenw = std::pow(10.0, w);  // log10(Z)
  const double z = std::pow(10.0, tenw);
  // dZ/dT = Z·ln10·d(10^w)/dT = Z·ln10·10^w·ln10·dw/dT
  return {z - 0.7, z * kLn10 * tenw * kLn10 * dw_dT};
}

}  // namespace

void OilFluid::Walther(double T, double* nu_cSt, double* dnu_dT) const {
  // Remembered per thread by the bits of (T, A, B) (library/memo.h): the
  // solves ask for the same temperatures many times (every branch leaving
  // a node, a bearing's film and its feed), and a tolerance that changes the
  // oil (SetKv40Kv100) changes A and B, so the key covers every input.
  thread_local Memo<std::array<double, 2>, 3> memo;
  const std::array<double, 2>& v = memo.Get({T, a_, b_}, [&] { return WaltherLine(a_, b_, T); });
  *nu_cSt = v[0];
  *dnu_dT = v[1];
}

double OilFluid::KinematicViscosity(double T_K) const {
  const double T = std::clamp(std::isfinite(T_K) ? T_K : kT15, kTEvalMin, kTEvalMax);
  double nu, dnu;
  Walther(T, &nu, &dnu);
  return nu * kCSt;
}

FluidProps OilFluid::Evaluate(double T_K, double /*p_abs_Pa*/) const {
  FluidProps f;
  const double Tin = std::isfinite(T_K) ? T_K : kT15;
  const double T = std::clamp(Tin, kTEvalMin, kTEvalMax);
  double nu, dnu;
  Walther(T, &nu, &dnu);
  f.rho = extras_.rho15_kgm3 * (1.0 - extras_.alpha_per_K * (T - kT15));
  f.drho_dT = -extras_.rho15_kgm3 * extras_.alpha_per_K;
  f.mu = nu * kCSt * f.rho;
  f.dmu_dT = dnu * kCSt * f.rho + nu * kCSt * f.drho_dT;
  if (extras_.cp_JkgK) {
    f.cp = *extras_.cp_JkgK;
    f.dcp_dT = 0.0;
  } else {
    f.cp = CragoeCpSI(T, s6060_);
    // d/dT of 4186.8·(0.388 + 0.00045·(1.8·t + 32))/sqrt(s)
    f.dcp_dT = kBtuPerLbFToJPerKgK * 0.00045 * 1.8 / std::sqrt(s6060_);
  }
  if (extras_.k_WmK) {
    f.k = *extras_.k_WmK;
    f.dk_dT = 0.0;
  } else {
    f.k = CragoeKSI(T, s6060_);
    f.dk_dT = kBtuPerHrFtFToWPerMK * 0.0677 * (-0.0003 * 1.8) / s6060_;
  }
  if (T != Tin) f.drho_dT = f.dmu_dT = f.dcp_dT = f.dk_dT = 0.0;
  return f;
}

double OilFluid::SpecificHeat(double T_K, double /*p_abs_Pa*/) const {
  // Evaluate's cp without the viscosity (the enthalpy integrals call it often).
  if (extras_.cp_JkgK) return *extras_.cp_JkgK;
  return CragoeCpSI(std::clamp(std::isfinite(T_K) ? T_K : kT15, kTEvalMin, kTEvalMax), s6060_);
}

bool OilFluid::SpecificHeatIsLinear(double t_a, double t_b) const {
  if (extras_.cp_JkgK) return true;
  auto inside = [](double t) { return t >= kTEvalMin && t <= kTEvalMax; };  // false for NaN
  return inside(t_a) && inside(t_b);
}

RangeReport OilFluid::InRange(double T_K, double /*p_abs_Pa*/) const {
  RangeReport r;
  // The valid range's text, built only for a report out of range (an
  // in-range call is made at every node of every answer).
  auto range = [&] { return " (valid " + FormatDegC(extras_.T_min_K) + " .. " + FormatDegC(extras_.T_max_K) + " degC)"; };
  if (!std::isfinite(T_K) || T_K < extras_.T_min_K) {
    r.in_range = false;
    r.message = "oil temperature " + FormatDegC(T_K) + " degC is below the model's lower limit " +
                FormatDegC(extras_.T_min_K) + " degC" + range();
    return r;
  }
  if (T_K > extras_.T_max_K) {
    r.in_range = false;
    r.message = "oil temperature " + FormatDegC(T_K) + " degC is above the model's upper limit " +
                FormatDegC(extras_.T_max_K) + " degC" + range();
    return r;
  }
  const double nu = KinematicViscosity(T_K) / kCSt;
  if (nu < kNuMinCSt) {
    r.in_range = false;
    r.message = "oil kinematic viscosity " + FormatNumber(nu) + " cSt at " + FormatDegC(T_K) +
                " degC is below 2 cSt, where ASTM D341's simple form Z = nu + 0.7 no "
                "longer holds";
  }
  return r;
}

std::optional<double> IsoVgKv40(int grade) {
  for (const VgRow& r : kIsoVg)
    if (r.grade == grade) return r.kv40 * kCSt;
  return std::nullopt;
}

std::optional<std::pair<double, double>> SaeJ300Kv100Range(const std::string& grade) {
  const std::string g = Upper(grade);
  for (const SaeRow& r : kSaeJ300)
    if (g == r.grade) return std::make_pair(r.min * kCSt, r.max * kCSt);
  return std::nullopt;
}

std::string CheckSaeJ300Kv100(const std::string& grade, double kv100_m2s) {
  const std::string g = Upper(grade);
  if (g.empty()) return "SAE grade is empty";
  std::string winter, summer;
  const size_t dash = g.find('-');
  if (dash != std::string::npos) {
    winter = g.substr(0, dash);
    summer = g.substr(dash + 1);
    if (winter.empty() || winter.back() != 'W' || summer.empty() || summer.back() == 'W')
      return "SAE grade '" + grade + "' is not of the form xW-yy";
  } else if (!g.empty() && g.back() == 'W') {
    winter = g;
  } else {
    summer = g;
  }
  const double kv = kv100_m2s / kCSt;
  if (!(kv > 0 && std::isfinite(kv))) return "KV100 must be positive, got " + FormatNumber(kv) + " cSt";
  for (const std::string& part : {winter, summer}) {
    if (part.empty()) continue;
    auto range = SaeJ300Kv100Range(part);
    if (!range)
      return "SAE grade '" + part +
             "' is not an SAE J300 engine-oil grade (0W, 5W, 10W, 15W, 20W, 25W, 8, 12, 16, "
             "20, 30, 40, 50, 60)";
    const double lo = range->first / kCSt, hi = range->second / kCSt;
    if (kv < lo || kv >= hi) {
      const std::string cls = std::isinf(hi) ? ("KV100 >= " + FormatNumber(lo) + " cSt")
                                             : (FormatNumber(lo) + " <= KV100 < " + FormatNumber(hi) + " cSt");
      return "KV100 " + FormatNumber(kv) + " cSt lies outside SAE J300 grade " + part + " (" + cls +
             ", SAE J300 Table 1)";
    }
  }
  return "";
}

double ViscosityIndexD2270(double kv40_m2s, double kv100_m2s) {
  const double u = kv40_m2s / kCSt, y = kv100_m2s / kCSt;
  double l = 0, h = 0;
  if (!(u > 0) || !std::isfinite(u) || !std::isfinite(y) || !LookUpLH(y, &l, &h))
    return std::numeric_limits<double>::quiet_NaN();
  if (u >= h) return (l - u) / (l - h) * 100.0;  // procedure A (VI ≤ 100), §5.1.3
  const double n = (std::log10(h) - std::log10(u)) / std::log10(y);  // procedure B, §6.1.3
  return (std::pow(10.0, n) - 1.0) / 0.00715 + 100.0;
}

double CragoeCpBtuPerLbF(double t_F, double s) { return (0.388 + 0.00045 * t_F) / std::sqrt(s); }

double CragoeKBtuPerHrFtF(double t_F, double s) {
  return 0.0677 * (1.0 - 0.0003 * (t_F - 32.0)) / s;
}

double CragoeCpSI(double T_K, double s) {
  const double t_F = (T_K - 273.15) * 1.8 + 32.0;
  return kBtuPerLbFToJPerKgK * CragoeCpBtuPerLbF(t_F, s);
}

double CragoeKSI(double T_K, double s) {
  const double t_F = (T_K - 273.15) * 1.8 + 32.0;
  return kBtuPerHrFtFToWPerMK * CragoeKBtuPerHrFtF(t_F, s);
}

}  // namespace loopwright
