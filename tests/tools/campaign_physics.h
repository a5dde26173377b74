// Independent formulas for the random-network campaign (tests/tools/).
//
// The verifier of tests/tools/network_verifier.h recomputes every reported
// result with these, written here from the published sources and not taken
// from the project's components/ or library/ code, so a slip in a component
// law, a fluid model or the network's bookkeeping shows up as a mismatch.
// The generator (random_network.h) uses them to size parts.
//
// Sources (each value names where it comes from):
//  - oil kinematic viscosity: ASTM D341 Eq. 1 with Z = nu + 0.7 (nu >= 2 cSt),
//    through KV40 and KV100;
//  - oil density: linear volume correction from 15 degC, rho15 (1 - a (T - 288.15 K)),
//    a = 6.4e-4 1/K (common practice for lubricating oils);
//  - oil specific heat: Cragoe, NBS Misc. Publ. 97 (1929),
//    cp = (0.388 + 0.00045 t_F) / sqrt(s) BTU/(lb.degF), s = specific gravity
//    60/60 degF, water at 60 degF 999.017 kg/m3 (IAPWS-95 by python3-iapws);
//    1 BTU/(lb.degF) = 4186.8 J/(kg.K) (NIST SP 811);
//  - Darcy friction factor: S. W. Churchill, Chem. Eng. 84(24):91-92, 1977;
//  - sharp orifice: Q = Cd A0 sqrt(2 dp / rho) with the low-Reynolds blend
//    1/Cd^2 = 1/Cd_inf^2 + 1/(delta^2 Re_d) (Wuest 1954; Merritt 1967);
//  - valve: Kv definition of IEC 60534-2-1 Eq. (1) for non-choked turbulent
//    liquid flow, Q [m3/h] = Kv sqrt(dp [bar] / (rho / rho0)), rho0 water at
//    15 degC;
//  - journal bearing side flow: Shigley (9th ed.) Eq. 12-22 with the
//    eccentricity term (1 + 1.5 eps^2);
//  - water saturation pressure: IAPWS-IF97 Eq. 30 (region 4).
#pragma once

#include <algorithm>
#include <cmath>

namespace loopwright::campaign {

inline constexpr double kG = 9.80665;            // standard gravity [m/s2] (CGPM 1901)
inline constexpr double kOilExpansion = 6.4e-4;  // [1/K] common practice
inline constexpr double kWater60F = 999.017;     // [kg/m3] IAPWS-95, python3-iapws
// Water at 15 degC and 0.101325 MPa: 999.1011 kg/m3 (IAPWS-IF97, computed
// with python3-iapws). IEC 60534-2-1 takes rho0 as water at 15 degC.
inline constexpr double kIecRho0 = 999.1011;

struct OilSpec {
  double kv40 = 32e-6, kv100 = 5.4e-6;  // [m2/s]
  double rho15 = 870.0;                 // [kg/m3]
};

// ASTM D341: log10 log10 (nu_cSt + 0.7) = A - B log10 T.
inline double OilNu(const OilSpec& o, double T) {
  auto ll = [](double nu) { return std::log10(std::log10(nu * 1e6 + 0.7)); };
  const double t1 = std::log10(313.15), t2 = std::log10(373.15);
  const double b = (ll(o.kv40) - ll(o.kv100)) / (t2 - t1);
  const double a = ll(o.kv40) + b * t1;
  const double z = std::pow(10.0, std::pow(10.0, a - b * std::log10(T)));
  return (z - 0.7) * 1e-6;
}
inline double OilRho(const OilSpec& o, double T) { return o.rho15 * (1.0 - kOilExpansion * (T - 288.15)); }
inline double OilMu(const OilSpec& o, double T) { return OilNu(o, T) * OilRho(o, T); }
inline double OilSpecificGravity(const OilSpec& o) { return OilRho(o, (60.0 - 32.0) / 1.8 + 273.15) / kWater60F; }
// Enthalpy above 0 degC [J/kg]: the integral of Cragoe's cp, linear in t_F.
inline double OilEnthalpy(const OilSpec& o, double T) {
  const double s = OilSpecificGravity(o);
  auto h_F = [](double tf) { return 0.388 * tf + 0.000225 * tf * tf; };  // BTU/lb, integral in degF
  const double tf = (T - 273.15) * 1.8 + 32.0;
  // 1 BTU/lb = 4186.8 / 1.8 J/kg (IT BTU, NIST SP 811).
  return (h_F(tf) - h_F(32.0)) * (4186.8 / 1.8) / std::sqrt(s);
}

// Churchill 1977, Darcy f at Reynolds number re > 0 and relative roughness rr.
inline double ChurchillF(double re, double rr) {
  const double a = std::pow(2.457 * std::log(1.0 / (std::pow(7.0 / re, 0.9) + 0.27 * rr)), 16);
  const double b = std::pow(37530.0 / re, 16);
  return 8.0 * std::pow(std::pow(8.0 / re, 12) + 1.0 / std::pow(a + b, 1.5), 1.0 / 12.0);
}

// Pressure drop of a straight line with a constant minor-loss K [Pa], flow q [m3/s].
inline double LineDp(double q, double L, double D, double eps, double k, double rho, double mu) {
  const double area = M_PI * D * D / 4.0, v = q / area;
  const double re = rho * std::abs(v) * D / mu;
  if (re < 1e-6) return 32.0 * mu * L * v / (D * D);  // Hagen-Poiseuille limit
  return (ChurchillF(re, eps / D) * L / D + k) * rho * v * std::abs(v) / 2.0;
}

// Sharp orifice (or one of `count` jets), discharge into a large volume [Pa].
// The default low-Reynolds delta of a thin plate: Sampson's creeping flow
// through a circular hole, dp = 24 mu Q / d^3, i.e. delta = (12 pi)^(-1/2)
// (R. A. Sampson, Phil. Trans. R. Soc. A 182, 1891; closed form).
inline const double kSampsonDelta = 1.0 / std::sqrt(12.0 * M_PI);

inline double OrificeDp(double q_total, double d, double cd, double delta, double count, double rho, double mu) {
  const double q = q_total / count, a0 = M_PI * d * d / 4.0;
  const double re = 4.0 * rho * std::abs(q) / (M_PI * d * mu);
  if (re < 1e-12) return 2.0 * mu * q / (M_PI * delta * delta * d * d * d);
  const double inv_cd2 = 1.0 / (cd * cd) + 1.0 / (delta * delta * re);
  return rho * q * std::abs(q) * inv_cd2 / (2.0 * a0 * a0);
}

// Valve by its Kv [(m3/h)/sqrt(bar)], no viscous correction [Pa].
inline double KvDp(double q, double kv, double rho) {
  const double qh = q * 3600.0 / kv;
  return 1e5 * (rho / kIecRho0) * qh * std::abs(qh);
}

// Journal bearing side flow [m3/s] at feed pressure p_s above the drain.
inline double JournalFlow(double p_s, double D, double L, double groove, double c, double ecc, double mu) {
  const double land = (L - groove) / 2.0;
  return M_PI * p_s * (D / 2.0) * c * c * c * (1.0 + 1.5 * ecc * ecc) / (3.0 * mu * land);
}

// w ln(1 + e^(x/w)), the smooth ramp of a relief or bypass opening.
inline double SoftRamp(double x, double w) {
  return x > 0 ? x + w * std::log1p(std::exp(-x / w)) : w * std::log1p(std::exp(x / w));
}

// IAPWS-IF97 Eq. 30: saturation pressure of water [Pa] at T [K] (273.15..647.096 K).
inline double WaterSaturationPressure(double T) {
  const double n[] = {0,
                      0.11670521452767e4,  -0.72421316703206e6, -0.17073846940092e2, 0.12020824702470e5,
                      -0.32325550322333e7, 0.14915108613530e2,  -0.48232657361591e4, 0.40511340542057e6,
                      -0.23855557567849,   0.65017534844798e3};
  const double th = T + n[9] / (T - n[10]);
  const double a = th * th + n[1] * th + n[2];
  const double b = n[3] * th * th + n[4] * th + n[5];
  const double c = n[6] * th * th + n[7] * th + n[8];
  return std::pow(2.0 * c / (-b + std::sqrt(b * b - 4.0 * a * c)), 4) * 1e6;
}

}  // namespace loopwright::campaign
