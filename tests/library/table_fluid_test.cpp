// Tests of library/table_fluid.h: Steffen (1990) monotone interpolation,
// validation, clamp-and-warn outside the table. Table data are invented.
#include "library/table_fluid.h"

#include <algorithm>
#include <cmath>
#include <string>

#include <doctest/doctest.h>

#include "tests/library/fluid_checks.h"

namespace loopwright {
namespace {

double Rel(double a, double b) { return std::fabs(a - b) / std::fabs(b); }

// Demo oil-like table: ν falls steeply with T (not log-linear), ρ linear.
TableFluidColumns DemoColumns() {
  TableFluidColumns c;
  c.T_K = {273.15, 293.15, 313.15, 343.15, 373.15, 393.15};
  c.nu_m2s = {460e-6, 140e-6, 46e-6, 17e-6, 6.8e-6, 4.5e-6};
  c.rho_kgm3 = {887.0, 875.0, 863.0, 845.0, 827.0, 815.0};
  c.cp_JkgK = {1800.0, 1870.0, 1940.0, 2040.0, 2150.0, 2210.0};
  c.k_WmK = {0.136, 0.134, 0.133, 0.131, 0.128, 0.127};
  return c;
}

std::shared_ptr<TableFluid> Demo() {
  std::string err;
  auto f = TableFluid::Create(DemoColumns(), &err);
  REQUIRE_MESSAGE(bool(f), err);
  return f;
}

TEST_CASE("Hand-worked Steffen example: no overshoot at a plateau") {
  // Steffen (1990) Eqs. 11, 13, 26-27 worked by hand for y = (0, 1, 1) at
  // x = (0, 1, 2): slopes y' = (1.5, 0, 0); on [0, 1] y = 1.5 t - 0.5 t^3,
  // so y(0.5) = 0.6875; on [1, 2] y = 1 (a natural cubic spline overshoots).
  MonotoneCubic m({0.0, 1.0, 2.0}, {0.0, 1.0, 1.0});
  double y, d;
  m.Eval(0.5, &y, &d);
  CHECK(std::fabs(y - 0.6875) < 1e-15);
  CHECK(std::fabs(d - (1.5 - 1.5 * 0.25)) < 1e-15);
  m.Eval(0.0, &y, &d);
  CHECK(std::fabs(d - 1.5) < 1e-15);
  for (double x = 1.0; x <= 2.0; x += 0.05) {
    m.Eval(x, &y, &d);
    CHECK(std::fabs(y - 1.0) < 1e-15);
  }
}

TEST_CASE("Exact at the nodes, no overshoot between them, monotone where the data are") {
  auto f = Demo();
  const TableFluidColumns c = DemoColumns();
  for (size_t i = 0; i < c.T_K.size(); ++i) {
    const FluidProps p = f->Evaluate(c.T_K[i], 1e5);
    CHECK(Rel(p.mu / p.rho, c.nu_m2s[i]) < 1e-13);
    CHECK(Rel(p.rho, c.rho_kgm3[i]) < 1e-14);
    CHECK(Rel(p.cp, c.cp_JkgK[i]) < 1e-14);
    CHECK(Rel(p.k, c.k_WmK[i]) < 1e-14);
  }
  double prev_nu = 1e300, prev_cp = 0, prev_k = 1e300;
  for (double T = c.T_K.front(); T <= c.T_K.back(); T += 0.25) {
    const FluidProps p = f->Evaluate(T, 1e5);
    const double nu = p.mu / p.rho;
    CHECK(nu <= prev_nu);
    CHECK(p.cp >= prev_cp);
    CHECK(p.k <= prev_k);
    prev_nu = nu;
    prev_cp = p.cp;
    prev_k = p.k;
    // Between two nodes the curve stays within their values.
    const size_t i = std::min<size_t>(
        std::upper_bound(c.T_K.begin(), c.T_K.end(), T) - c.T_K.begin(), c.T_K.size() - 1);
    const size_t lo = i == 0 ? 0 : i - 1;
    CHECK(nu <= std::max(c.nu_m2s[lo], c.nu_m2s[i]) * (1 + 1e-14));
    CHECK(nu >= std::min(c.nu_m2s[lo], c.nu_m2s[i]) * (1 - 1e-14));
  }
  // Non-monotone data: the interpolant stays within each interval's node values.
  MonotoneCubic m({0, 1, 2, 3, 4}, {0.0, 2.0, 1.0, 3.0, 3.0});
  const double ys[] = {0.0, 2.0, 1.0, 3.0, 3.0};
  for (double x = 0; x <= 4.0; x += 0.01) {
    double y, d;
    m.Eval(x, &y, &d);
    const int i = std::min(3, static_cast<int>(x));
    CHECK(y <= std::max(ys[i], ys[i + 1]) + 1e-14);
    CHECK(y >= std::min(ys[i], ys[i + 1]) - 1e-14);
  }
}

TEST_CASE("Log-linear viscosity and linear density are reproduced between nodes") {
  // ln(nu) linear in T and rho linear in T: the monotone cubic of linear data
  // is the line itself, so the interpolant is exact everywhere.
  TableFluidColumns c;
  c.T_K = {280.0, 300.0, 330.0, 370.0};
  for (double T : c.T_K) {
    c.nu_m2s.push_back(1e-4 * std::exp(-0.03 * (T - 280.0)));
    c.rho_kgm3.push_back(900.0 - 0.6 * (T - 280.0));
    c.cp_JkgK.push_back(1900.0);
    c.k_WmK.push_back(0.13);
  }
  auto f = TableFluid::Create(c);
  REQUIRE(bool(f));
  for (double T = 280.0; T <= 370.0; T += 1.7) {
    const FluidProps p = f->Evaluate(T, 1e5);
    const double rho = 900.0 - 0.6 * (T - 280.0);
    CHECK(Rel(p.rho, rho) < 1e-13);
    CHECK(Rel(p.mu, 1e-4 * std::exp(-0.03 * (T - 280.0)) * rho) < 1e-12);
  }
}

TEST_CASE("Dynamic-viscosity column is converted at the nodes") {
  TableFluidColumns c = DemoColumns();
  for (size_t i = 0; i < c.T_K.size(); ++i) c.mu_Pas.push_back(c.nu_m2s[i] * c.rho_kgm3[i]);
  c.nu_m2s.clear();
  auto f = TableFluid::Create(c);
  REQUIRE(bool(f));
  auto g = Demo();
  for (double T : {280.0, 300.0, 350.0}) CHECK(Rel(f->Evaluate(T, 0).mu, g->Evaluate(T, 0).mu) < 1e-13);
}

TEST_CASE("Derivatives match central differences to 1e-6") {
  auto f = Demo();
  for (double T : {280.0, 300.0, 320.0, 350.0, 380.0}) CheckDerivativesByCentralDifference(*f, T, 1e5, 1e-4, 1e-6);
}

TEST_CASE("Clamp and warn outside the table") {
  auto f = Demo();
  CHECK(f->InRange(300.0, 1e5).in_range);
  const RangeReport lo = f->InRange(263.15, 1e5);
  CHECK_FALSE(lo.in_range);
  CHECK(lo.message.find("below") != std::string::npos);
  CHECK(lo.message.find("-10") != std::string::npos);
  const RangeReport hi = f->InRange(400.0, 1e5);
  CHECK_FALSE(hi.in_range);
  CHECK(hi.message.find("above") != std::string::npos);
  const FluidProps a = f->Evaluate(200.0, 1e5), b = f->Evaluate(273.15, 1e5);
  CHECK(a.mu == b.mu);
  CHECK(a.dmu_dT == 0.0);
  const FluidProps c = f->Evaluate(1e4, 1e5), d = f->Evaluate(393.15, 1e5);
  CHECK(c.rho == d.rho);
  const FluidProps n = f->Evaluate(std::nan(""), 1e5);
  CHECK(std::isfinite(n.mu));
}

TEST_CASE("Validation errors") {
  std::string err;
  TableFluidColumns c = DemoColumns();
  c.T_K[3] = c.T_K[2];
  CHECK_FALSE(bool(TableFluid::Create(c, &err)));
  CHECK(err.find("ascending") != std::string::npos);

  c = DemoColumns();
  c.cp_JkgK[1] = -5.0;
  CHECK_FALSE(bool(TableFluid::Create(c, &err)));
  CHECK(err.find("cp") != std::string::npos);
  CHECK(err.find("row 1") != std::string::npos);

  c = DemoColumns();
  c.nu_m2s[0] = 0.0;
  CHECK_FALSE(bool(TableFluid::Create(c, &err)));

  c = DemoColumns();
  c.k_WmK.pop_back();
  CHECK_FALSE(bool(TableFluid::Create(c, &err)));
  CHECK(err.find("'k'") != std::string::npos);

  c = DemoColumns();
  c.mu_Pas = c.nu_m2s;
  CHECK_FALSE(bool(TableFluid::Create(c, &err)));
  CHECK(err.find("not both") != std::string::npos);

  c = DemoColumns();
  c.nu_m2s.clear();
  CHECK_FALSE(bool(TableFluid::Create(c, &err)));

  TableFluidColumns one;
  one.T_K = {300.0};
  one.nu_m2s = {1e-5};
  one.rho_kgm3 = {900.0};
  one.cp_JkgK = {2000.0};
  one.k_WmK = {0.13};
  CHECK_FALSE(bool(TableFluid::Create(one, &err)));
  CHECK(err.find("at least 2") != std::string::npos);

  // Two rows are enough: linear.
  one.T_K.push_back(350.0);
  one.nu_m2s.push_back(5e-6);
  one.rho_kgm3.push_back(870.0);
  one.cp_JkgK.push_back(2100.0);
  one.k_WmK.push_back(0.125);
  auto two = TableFluid::Create(one, &err);
  REQUIRE(bool(two));
  CHECK(Rel(two->Evaluate(325.0, 0).rho, 885.0) < 1e-14);
  CHECK(Rel(two->Evaluate(325.0, 0).mu / two->Evaluate(325.0, 0).rho, std::sqrt(1e-5 * 5e-6)) <
        1e-12);
  CHECK(two->Kind() == "table");
}

}  // namespace
}  // namespace loopwright
