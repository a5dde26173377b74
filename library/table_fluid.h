// A fluid given by a table of properties against temperature (a datasheet's
// or a handbook's values), interpolated monotonically.
//
// Columns: ascending temperatures T_i [K]; kinematic viscosity ν_i [m2/s] or
// dynamic viscosity μ_i [Pa.s] (exactly one of the two); density ρ_i
// [kg/m3]; specific heat cp_i [J/(kg.K)]; thermal conductivity k_i [W/(m.K)].
// All values must be finite and positive, T strictly ascending, ≥ 2 rows.
// A μ column is turned into ν_i = μ_i/ρ_i at the nodes.
//
// Interpolation: Steffen's monotone piecewise-cubic Hermite method [1] (C1,
// exact at the nodes, no overshoot: between two nodes the curve stays within
// their values, and it is monotone wherever the data are):
//   h_i = T_{i+1} − T_i,  s_i = (y_{i+1} − y_i)/h_i,
//   y'_i = (sign s_{i−1} + sign s_i)·min(|s_{i−1}|, |s_i|, |p_i|/2),
//   p_i = (s_{i−1} h_i + s_i h_{i−1})/(h_{i−1} + h_i)        ([1] Eqs. 11, 13)
// and at the ends the one-sided parabola slope limited to 2|s| ([1] Eqs. 26–27;
// a 2-row table is linear). Viscosity is interpolated as ln ν(T) (the log of
// viscosity is close to linear in T for liquids, so a few rows suffice), then
// μ = ν·ρ; ρ, cp and k are interpolated directly. Derivatives are those of the
// cubics (exact for the interpolant).
//
// Outside [T_0, T_{n−1}]: clamp-and-warn. Evaluate() returns the end row's
// values with zero derivatives; InRange() is false and says which end and by
// how much. Pressure is not used.
//
// References
// [1] M. Steffen, "A simple method for monotonic interpolation in one
//     dimension", Astronomy and Astrophysics 239, 443–450 (1990).
#pragma once

#include <memory>
#include <string>
#include <vector>

#include "library/fluid.h"

namespace loopwright {

struct TableFluidColumns {
  std::vector<double> T_K;
  std::vector<double> nu_m2s;   // give this or mu_Pas (same length as T_K)
  std::vector<double> mu_Pas;
  std::vector<double> rho_kgm3;
  std::vector<double> cp_JkgK;
  std::vector<double> k_WmK;
};

// A monotone (Steffen 1990) cubic through (x_i, y_i): node values and slopes.
class MonotoneCubic {
 public:
  MonotoneCubic() = default;
  // x strictly ascending, x.size() == y.size() >= 2 (checked by the caller).
  MonotoneCubic(std::vector<double> x, std::vector<double> y);
  // Value and derivative at x, x clamped to [x_0, x_{n−1}] (derivative 0 there).
  void Eval(double x, double* y, double* dy_dx) const;

 private:
  std::vector<double> x_, y_, d_;
};

class TableFluid : public Fluid {
 public:
  // nullptr and *error (if given) on: fewer than 2 rows, columns of unequal
  // length, both or neither of ν and μ, non-finite or non-positive values,
  // temperatures not strictly ascending. The message names column and row.
  static std::shared_ptr<TableFluid> Create(const TableFluidColumns& columns,
                                            std::string* error = nullptr);

  std::string Kind() const override { return "table"; }
  FluidProps Evaluate(double T_K, double p_abs_Pa) const override;
  RangeReport InRange(double T_K, double p_abs_Pa) const override;

  double TMin() const { return t_min_; }
  double TMax() const { return t_max_; }

 private:
  TableFluid() = default;
  MonotoneCubic ln_nu_, rho_, cp_, k_;
  double t_min_ = 0, t_max_ = 0;
};

}  // namespace loopwright
