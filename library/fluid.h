// Fluid property models: the interface every fluid implements.
//
// A fluid gives density, dynamic viscosity, specific heat and thermal
// conductivity as functions of temperature (and, for water, pressure), with
// their temperature derivatives so that the network's Newton solve gets exact
// Jacobians when temperatures are unknowns. Pressure derivatives are not
// provided: for liquids at loop pressures they are below 1e-4 relative per bar
// and are neglected in the Jacobian (not in the values).
//
// Range: every model states its valid temperature range. Evaluate() stays
// finite and smooth outside it (the Newton iterates may wander there), but the
// network checks InRange() at every converged point and carries a warning into
// the results: a property is never silently extrapolated.
#pragma once

#include <memory>
#include <optional>
#include <string>

namespace loopwright {

// Properties at one state, SI, with derivatives with respect to temperature.
struct FluidProps {
  double rho = 0, drho_dT = 0;   // density [kg/m3], [kg/(m3.K)]
  double mu = 0, dmu_dT = 0;     // dynamic viscosity [Pa.s], [Pa.s/K]
  double cp = 0, dcp_dT = 0;     // specific heat [J/(kg.K)], [J/(kg.K2)]
  double k = 0, dk_dT = 0;       // thermal conductivity [W/(m.K)], [W/(m.K2)]
};

// The lowest absolute pressure at which the liquid stays whole: below it the
// liquid boils (vapour pressure) or releases its dissolved air so fast that
// the flow is a foam, and no single-phase answer exists.
struct PressureFloor {
  double p_abs_Pa = 0;  // [Pa abs]
  const char* what = "";  // "vapour pressure", "air-release floor"
};

// Air-release / gaseous-cavitation floor of liquids without a vapour-pressure
// model (mineral and synthetic oils, table fluids): 5 kPa abs. Common
// practice: lubricating and hydraulic oils hold about 8-10 % dissolved air by
// volume at 1 atm and release it progressively below atmospheric pressure;
// the pressure at which the column breaks (gaseous cavitation) is quoted in
// the range of about 1-10 kPa abs, and the vapour pressure of the oil's light
// fractions is lower still. 5 kPa abs is the middle of that band. A pump
// inlet fails `pump_inlet_pressure_min` (0.7 bar abs by default) long before
// this floor; the floor marks where no answer of the model means anything.
inline constexpr double kAirReleaseFloorPa = 5.0e3;

struct RangeReport {
  bool in_range = true;
  std::string message;  // when !in_range: which limit, the value, the range
};

class Fluid {
 public:
  virtual ~Fluid() = default;
  // Short kind ("oil", "water", "glycol", "table").
  virtual std::string Kind() const = 0;
  // Properties at temperature T [K] and absolute pressure p [Pa].
  virtual FluidProps Evaluate(double T_K, double p_abs_Pa) const = 0;
  // Specific heat alone [J/(kg.K)], equal to Evaluate(T, p).cp: what the
  // enthalpy integrals (library/enthalpy.h) call many times; a model whose
  // other properties are costly overrides it.
  virtual double SpecificHeat(double T_K, double p_abs_Pa) const { return Evaluate(T_K, p_abs_Pa).cp; }
  // Whether cp is linear (or constant) in T between t_a and t_b [K] at any
  // pressure: the enthalpy integral (library/enthalpy.cpp) over such a span
  // is (t_b - t_a) cp(midpoint), exactly, with one evaluation.
  virtual bool SpecificHeatIsLinear(double t_a, double t_b) const {
    (void)t_a;
    (void)t_b;
    return false;
  }
  // Whether (T, p) lies inside the model's validity range.
  virtual RangeReport InRange(double T_K, double p_abs_Pa) const = 0;
  // Boiling (saturation) temperature at absolute pressure p [K], for fluids
  // that can boil in the loop (water, glycol mixtures); nullopt for oils.
  virtual std::optional<double> SaturationTemperature(double p_abs_Pa) const {
    (void)p_abs_Pa;
    return std::nullopt;
  }
  // The pressure floor at temperature T [K] (see PressureFloor): by default
  // the air-release floor kAirReleaseFloorPa; liquids that boil in the loop
  // (water, glycol mixtures) give their vapour pressure.
  virtual PressureFloor LowestPressure(double T_K) const {
    (void)T_K;
    return {kAirReleaseFloorPa, "air-release floor"};
  }
  // Kinematic viscosity [m2/s], convenience.
  double Nu(double T_K, double p_abs_Pa) const {
    FluidProps f = Evaluate(T_K, p_abs_Pa);
    return f.mu / f.rho;
  }
};

using FluidPtr = std::shared_ptr<const Fluid>;

}  // namespace loopwright
