// Aqueous solutions of ethylene glycol (EG) and propylene glycol (PG), by mass
// fraction of glycol: density, dynamic viscosity, specific heat and thermal
// conductivity, and freezing point, from Melinder's polynomial fits [1].
//
// Model (Melinder [1], the book's general fit for aqueous solutions):
//   f(x, t) = Σ_{i=0..5} Σ_{j=0..n_i} c_ij (100·x − x_m)^i (t − t_m)^j,
//   n_i = 3, 3, 3, 2, 1, 0 (18 coefficients per property),
// with x the glycol mass fraction [-], t the temperature [°C], x_m [%] and t_m
// [°C] the fit's centre. f is ρ [kg/m3], cp [J/(kg.K)], k [W/(m.K)],
// ln(μ / 1 mPa.s), and the freezing point t_f [°C] (evaluated at t = t_m).
//   EG: x_m = 30.8462 %, t_m = 31.728 °C;  PG: x_m = 30.7031 %, t_m = 32.7083 °C.
// Coefficients: Melinder 2010 [1], as copied in the open property
// library CoolProp's incompressible-fluid sources [2] (MelinderFluids.py,
// EGSolution / PGSolution), cross-checked term by term against a second
// independent copy; a third public copy seen differs in
// three EG viscosity terms (signs of c_21, c_22; c_30 = 1.695e-6 vs 1.659e-6)
// and was rejected because it misses pure water's viscosity by 22 % at
// 100 °C, where [2]'s set gives −1.8 % (IAPWS 2008 via python3-iapws).
// Temperature derivatives are analytic (∂f/∂t of the polynomial).
//
// Range: 0 ≤ x ≤ 0.6 (enforced by Create) and t_f(x) ≤ t ≤ 100 °C, the range
// of the fits in [1]/[2]. InRange() reports a temperature below the freezing
// point or above 100 °C. Evaluate() stays finite: it evaluates at T clamped to
// [t_f(x), 100 °C] (derivatives zero when clamped). Pressure is not used.
//
// Boiling: SaturationTemperature() returns pure water's IF97 saturation
// temperature at p (water.h). Glycol lowers the solution's vapour pressure, so
// its real boiling point is higher (e.g. about 107 °C for 50 % EG at 1 atm,
// common practice, from memory): water's Tsat underestimates it, which makes a
// boiling-margin check with it conservative.
//
// References
// [1] Å. Melinder, "Properties of Secondary Working Fluids (Secondary
//     Refrigerants or Coolants, Heat Transfer Fluids) for Indirect Systems",
//     IIR/IIF, Paris, 2010 (polynomial fits for EG and PG aqueous solutions).
// [2] CoolProp, dev/incompressible_liquids/CPIncomp/MelinderFluids.py
//     (coefficient matrices "MEG" and "MPG", reference "Melinder2010").
#pragma once

#include <memory>
#include <optional>
#include <string>

#include "library/fluid.h"

namespace loopwright {

enum class Glycol { kEthylene, kPropylene };

// Melinder freezing point [K] of the solution at glycol mass fraction x.
double MelinderFreezingTemperature(Glycol glycol, double mass_fraction);

class GlycolWaterFluid : public Fluid {
 public:
  // nullptr (and *error) if the mass fraction is outside [0, 0.6].
  static std::shared_ptr<GlycolWaterFluid> Create(Glycol glycol, double mass_fraction,
                                                  std::string* error = nullptr);

  std::string Kind() const override { return "glycol"; }
  FluidProps Evaluate(double T_K, double p_abs_Pa) const override;
  RangeReport InRange(double T_K, double p_abs_Pa) const override;
  // Pure water's IF97 Tsat(p): conservative for the mixture (see above).
  std::optional<double> SaturationTemperature(double p_abs_Pa) const override;
  // Pure water's IF97 vapour pressure at T: glycol lowers the solution's
  // vapour pressure, so this floor is conservative (it flags a low pressure
  // somewhat early), as the boiling margin above is.
  PressureFloor LowestPressure(double T_K) const override;

  Glycol glycol() const { return glycol_; }
  double mass_fraction() const { return x_; }
  double FreezingTemperature() const { return t_freeze_K_; }

  static constexpr double kMaxMassFraction = 0.6;
  static constexpr double kTMaxK = 373.15;  // 100 °C

 private:
  GlycolWaterFluid(Glycol glycol, double x);
  Glycol glycol_;
  double x_;
  double t_freeze_K_;
};

}  // namespace loopwright
