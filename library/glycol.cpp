#include "library/glycol.h"

#include <algorithm>
#include <cmath>

#include "library/units.h"
#include "library/water.h"

namespace loopwright {
namespace {

// Powers (i, j) of (100x − x_m)^i (t − t_m)^j in the order of the 18
// coefficients of each property.
constexpr int kPi[18] = {0, 0, 0, 0, 1, 1, 1, 1, 2, 2, 2, 2, 3, 3, 3, 4, 4, 5};
constexpr int kPj[18] = {0, 1, 2, 3, 0, 1, 2, 3, 0, 1, 2, 3, 0, 1, 2, 0, 1, 0};

struct MelinderSet {
  double x_m;  // %
  double t_m;  // °C
  double tf[18], rho[18], cp[18], k[18], lnmu[18];
};

// Melinder 2010 [1] via [2] (see glycol.h): ethylene glycol.
constexpr MelinderSet kEG = {
    30.8462, 31.728,
    // t_f [°C]
    {-15.25, -1.566e-6, -2.278e-7, 2.169e-9, -0.808, -1.339e-6, 2.047e-8, -2.717e-11,
     -0.01334, 6.322e-8, 2.373e-10, -2.183e-12, -7.293e-5, 1.764e-9, -2.442e-11, 1.006e-6,
     -7.662e-11, 1.14e-9},
    // ρ [kg/m3]
    {1034.0, -0.4781, -2.692e-3, 4.725e-6, 1.311, -6.876e-3, 4.805e-5, 1.69e-8, 7.49e-5,
     7.855e-5, -3.995e-7, 4.982e-9, -1.062e-4, 1.229e-6, -1.153e-8, -9.623e-7, -7.211e-8,
     4.891e-8},
    // cp [J/(kg.K)]
    {3737.0, 2.93, -4.675e-3, -1.389e-5, -17.99, 0.1046, -4.147e-4, 1.847e-7, -0.09933,
     3.516e-4, 5.109e-6, -7.138e-8, 2.61e-3, -1.189e-6, -1.643e-7, 1.537e-5, -4.272e-7,
     -1.618e-6},
    // k [W/(m.K)]
    {0.472, 8.903e-4, -1.058e-6, -2.789e-9, -4.286e-3, -1.473e-5, 1.059e-7, -1.142e-10,
     1.747e-5, 6.814e-8, -3.612e-9, 2.365e-12, 3.017e-8, -2.412e-9, 4.004e-11, -1.322e-9,
     2.555e-11, 2.678e-11},
    // ln(μ/mPa.s)
    {0.4705, -0.0255, 1.782e-4, -7.669e-7, 0.02471, -1.171e-4, 1.052e-6, -1.634e-8, 3.328e-6,
     1.086e-6, 1.051e-8, -6.475e-10, 1.659e-6, 3.157e-9, 4.063e-10, 3.089e-8, 1.831e-10,
     -1.865e-9},
};

// Propylene glycol.
constexpr MelinderSet kPG = {
    30.7031, 32.7083,
    {-13.25, -3.82e-5, 7.865e-7, -1.733e-9, -0.6631, 6.774e-6, -6.242e-8, -7.819e-10,
     -0.01094, 5.332e-8, -4.169e-9, 3.288e-11, -2.283e-4, -1.131e-8, 1.918e-10, -3.409e-6,
     8.035e-11, 1.465e-8},
    {1018.0, -0.5406, -2.666e-3, 1.347e-5, 0.7604, -9.45e-3, 5.541e-5, -1.343e-7, -2.498e-3,
     2.7e-5, -4.018e-7, 3.376e-9, -1.55e-4, 2.829e-6, -7.175e-9, -1.131e-6, -2.221e-8,
     2.342e-8},
    {3882.0, 2.699, -1.659e-3, -1.032e-5, -13.04, 0.0507, -4.752e-5, 1.522e-6, -0.1598,
     9.534e-5, 1.167e-5, -4.87e-8, 3.539e-4, 3.102e-5, -2.95e-7, 5.0e-5, -7.135e-7,
     -4.959e-7},
    {0.4513, 7.955e-4, 3.482e-8, -5.966e-9, -4.795e-3, -1.678e-5, 8.941e-8, 1.493e-10,
     2.076e-5, 1.563e-7, -4.615e-9, 9.897e-12, -9.083e-8, -2.518e-9, 6.543e-11, -5.952e-10,
     -3.605e-11, 2.104e-11},
    {0.6837, -0.03045, 2.525e-4, -1.399e-6, 0.03328, -3.984e-4, 4.332e-6, -1.86e-8, 5.453e-5,
     -8.6e-8, -1.593e-8, -4.465e-11, -3.9e-6, 1.054e-7, -1.589e-9, -1.587e-8, 4.475e-10,
     3.564e-9},
};

const MelinderSet& Set(Glycol g) { return g == Glycol::kEthylene ? kEG : kPG; }

// f and ∂f/∂t at dx = 100x − x_m, dy = t − t_m.
void Poly(const double (&c)[18], double dx, double dy, double* f, double* df_dt) {
  double xp[6] = {1, dx, 0, 0, 0, 0};
  for (int i = 2; i < 6; ++i) xp[i] = xp[i - 1] * dx;
  const double yp[4] = {1, dy, dy * dy, dy * dy * dy};
  double s = 0, ds = 0;
  for (int n = 0; n < 18; ++n) {
    const int i = kPi[n], j = kPj[n];
    s += c[n] * xp[i] * yp[j];
    if (j > 0) ds += c[n] * xp[i] * j * yp[j - 1];
  }
  *f = s;
  *df_dt = ds;
}

const char* Name(Glycol g) { return g == Glycol::kEthylene ? "ethylene" : "propylene"; }

}  // namespace

double MelinderFreezingTemperature(Glycol glycol, double mass_fraction) {
  const MelinderSet& m = Set(glycol);
  const double x = std::clamp(mass_fraction, 0.0, GlycolWaterFluid::kMaxMassFraction);
  double tf, dummy;
  Poly(m.tf, 100.0 * x - m.x_m, 0.0, &tf, &dummy);
  return tf + 273.15;
}

GlycolWaterFluid::GlycolWaterFluid(Glycol glycol, double x)
    : glycol_(glycol), x_(x), t_freeze_K_(MelinderFreezingTemperature(glycol, x)) {}

std::shared_ptr<GlycolWaterFluid> GlycolWaterFluid::Create(Glycol glycol, double mass_fraction,
                                                           std::string* error) {
  if (!(mass_fraction >= 0.0 && mass_fraction <= kMaxMassFraction)) {
    if (error)
      *error = std::string(Name(glycol)) + " glycol mass fraction " + FormatNumber(mass_fraction) +
               " is outside the Melinder fits' range 0 .. 0.6";
    return nullptr;
  }
  return std::shared_ptr<GlycolWaterFluid>(new GlycolWaterFluid(glycol, mass_fraction));
}

FluidProps GlycolWaterFluid::Evaluate(double T_K, double /*p_abs_Pa*/) const {
  const MelinderSet& m = Set(glycol_);
  const double Tin = std::isfinite(T_K) ? T_K : 293.15;
  const double T = std::clamp(Tin, t_freeze_K_, kTMaxK);
  const double dx = 100.0 * x_ - m.x_m, dy = (T - 273.15) - m.t_m;
  FluidProps f;
  double lnmu, dlnmu;
  Poly(m.rho, dx, dy, &f.rho, &f.drho_dT);
  Poly(m.cp, dx, dy, &f.cp, &f.dcp_dT);
  Poly(m.k, dx, dy, &f.k, &f.dk_dT);
  Poly(m.lnmu, dx, dy, &lnmu, &dlnmu);
  f.mu = 1e-3 * std::exp(lnmu);
  f.dmu_dT = f.mu * dlnmu;
  if (T != Tin) f.drho_dT = f.dmu_dT = f.dcp_dT = f.dk_dT = 0.0;
  return f;
}

RangeReport GlycolWaterFluid::InRange(double T_K, double /*p_abs_Pa*/) const {
  RangeReport r;
  const std::string what =
      std::string(Name(glycol_)) + " glycol " + FormatNumber(100.0 * x_) + " % by mass";
  if (!std::isfinite(T_K) || T_K < t_freeze_K_) {
    r.in_range = false;
    r.message = what + ": temperature " + FormatDegC(T_K) + " degC is below the freezing point " +
                FormatDegC(t_freeze_K_) + " degC (Melinder 2010; valid " + FormatDegC(t_freeze_K_) +
                " .. " + FormatDegC(kTMaxK) + " degC)";
  } else if (T_K > kTMaxK) {
    r.in_range = false;
    r.message = what + ": temperature " + FormatDegC(T_K) + " degC is above the fits' limit " +
                FormatDegC(kTMaxK) + " degC (valid " + FormatDegC(t_freeze_K_) + " .. " + FormatDegC(kTMaxK) +
                " degC)";
  }
  return r;
}

std::optional<double> GlycolWaterFluid::SaturationTemperature(double p_abs_Pa) const {
  return Iapws97SaturationTemperature(p_abs_Pa);
}

PressureFloor GlycolWaterFluid::LowestPressure(double T_K) const {
  return {Iapws97SaturationPressure(T_K), "vapour pressure (of water, conservative for the mixture)"};
}

}  // namespace loopwright
