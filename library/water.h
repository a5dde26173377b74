// Liquid water, 0–150 °C and up to 10 MPa: density and specific heat from
// IAPWS-IF97 region 1, viscosity from IAPWS 2008, thermal conductivity from
// IAPWS 2011, boiling line from IF97 region 4.
//
// Thermodynamics (IF97 [1], region 1, Eq. 7 and Table 3): dimensionless Gibbs
// free energy
//   γ(π, τ) = g/(RT) = Σ_{i=1..34} n_i (7.1 − π)^I_i (τ − 1.222)^J_i,
//   π = p/16.53 MPa, τ = 1386 K/T, R = 0.461526 kJ/(kg.K),
// with the 34 coefficients n_i, I_i, J_i of [1] Table 2. From its derivatives:
//   v = π γ_π RT/p,  h = τ γ_τ RT,  u = RT(τ γ_τ − π γ_π),  s = R(τ γ_τ − γ),
//   cp = −R τ² γ_ττ,  cv = R(−τ² γ_ττ + (γ_π − τ γ_πτ)²/γ_ππ),
//   w = sqrt(RT γ_π² / ((γ_π − τ γ_πτ)²/(τ² γ_ττ) − γ_ππ)).
// Region 1 is valid 273.15 K ≤ T ≤ 623.15 K, psat(T) ≤ p ≤ 100 MPa.
//
// Saturation (IF97 region 4): psat(T) by Eq. 30, Tsat(p) by Eq. 31, with the
// ten coefficients of [1] Table 34; valid 273.15 K … 647.096 K and
// 611.213 Pa … 22.064 MPa (inputs outside are clamped to these limits).
//
// Viscosity (IAPWS 2008 [2], Eq. 10): μ = μ* · μ̄0(T̄) · μ̄1(T̄, ρ̄) · μ̄2,
//   μ̄0 = 100 sqrt(T̄) / Σ_{i=0..3} H_i/T̄^i             (Eq. 11, Table 1)
//   μ̄1 = exp(ρ̄ Σ_i Σ_j H_ij (1/T̄ − 1)^i (ρ̄ − 1)^j)   (Eq. 12, Table 2)
//   T̄ = T/647.096 K, ρ̄ = ρ/322 kg/m3, μ* = 1e-6 Pa.s.
// The critical enhancement μ̄2 is set to 1: [2] §2.8 restricts it to a small
// region around the critical point (645.91 K < T < 650.77 K, 245.8 < ρ <
// 405.3 kg/m3; limits from memory), far from liquid water at 0–150 °C.
//
// Thermal conductivity (IAPWS 2011 [3], Eq. 10): λ = λ* (λ̄0 λ̄1 + λ̄2),
//   λ̄0 = sqrt(T̄) / Σ_{k=0..4} L_k/T̄^k                 (Eq. 16, Table 1)
//   λ̄1 = exp(ρ̄ Σ_i Σ_j L_ij (1/T̄ − 1)^i (ρ̄ − 1)^j)   (Eq. 17, Table 2)
//   λ* = 1e-3 W/(m.K).
// The critical enhancement λ̄2 is neglected. Measured against python3-iapws,
// whose λ̄2 follows [3] Eqs. 18–25: over 0–150 °C, 0.1–10 MPa liquid its λ̄2
// is exactly 0 (ΔX̄ < 0 there, clipped to 0 by [3] Eq. 21's convention), so
// neglecting it changes nothing in this range (measured difference 0).
//
// Temperature derivatives are exact (ceres::Jet forward differentiation through
// γ, ρ(T) at constant p, μ(T, ρ(T)), λ(T, ρ(T))).
//
// Range (InRange): 273.16 K ≤ T ≤ 423.15 K and psat(T) ≤ p ≤ 10 MPa (liquid).
// Outside, Evaluate() stays finite: it evaluates at T clamped to
// [253.15 K, 623.15 K] (derivatives zero when clamped) and at p clamped to
// [psat(T), 100 MPa] — below the saturation pressure the liquid is evaluated
// on its boiling line (region 1 is not defined for vapour).
//
// References
// [1] IAPWS, "Revised Release on the IAPWS Industrial Formulation 1997 for the
//     Thermodynamic Properties of Water and Steam" (IAPWS R7-97(2012)):
//     Table 2 (region 1 coefficients), Eq. 7, Table 3, Table 5 (verification
//     values), Eqs. 30–31, Table 34, Tables 35–36 (verification values).
// [2] IAPWS, "Release on the IAPWS Formulation 2008 for the Viscosity of
//     Ordinary Water Substance" (IAPWS R12-08): Eqs. 10–12, Tables 1, 2, 4.
// [3] IAPWS, "Release on the IAPWS Formulation 2011 for the Thermal
//     Conductivity of Ordinary Water Substance" (IAPWS R15-11): Eqs. 10, 16,
//     17, Tables 1, 2, 4.
#pragma once

#include <optional>
#include <string>

#include "library/fluid.h"

namespace loopwright {

// IF97 Eq. 30: saturation pressure [Pa] at T [K] (T clamped to 273.15..647.096).
double Iapws97SaturationPressure(double T_K);
// IF97 Eq. 31: saturation temperature [K] at p [Pa] (p clamped to
// 611.213 Pa..22.064 MPa).
double Iapws97SaturationTemperature(double p_Pa);

// IF97 region 1 properties, SI: v [m3/kg], h, u [J/kg], s, cp, cv [J/(kg.K)],
// w [m/s]. No range check (see the header comment for the region's limits).
struct Region1State {
  double v, h, u, s, cp, cv, w;
};
Region1State Iapws97Region1(double T_K, double p_Pa);

// IAPWS 2008 viscosity [Pa.s] at T [K], ρ [kg/m3], with μ̄2 = 1.
double WaterViscosityIapws2008(double T_K, double rho);
// IAPWS 2011 thermal conductivity [W/(m.K)] at T [K], ρ [kg/m3], λ̄2 = 0.
double WaterConductivityIapws2011(double T_K, double rho);

class WaterFluid : public Fluid {
 public:
  std::string Kind() const override { return "water"; }
  FluidProps Evaluate(double T_K, double p_abs_Pa) const override;
  double SpecificHeat(double T_K, double p_abs_Pa) const override;  // region 1 only (no transport properties)
  static double Region1Cp(double T_K, double p_abs_Pa);              // the same, never remembered
  RangeReport InRange(double T_K, double p_abs_Pa) const override;
  std::optional<double> SaturationTemperature(double p_abs_Pa) const override {
    return Iapws97SaturationTemperature(p_abs_Pa);
  }
  // IF97 Eq. 30 saturation pressure at T.
  PressureFloor LowestPressure(double T_K) const override {
    return {Iapws97SaturationPressure(T_K), "vapour pressure"};
  }

  static constexpr double kTMin = 273.16;   // K
  static constexpr double kTMax = 423.15;   // K (150 °C)
  static constexpr double kPMax = 10.0e6;   // Pa abs
};

}  // namespace loopwright
