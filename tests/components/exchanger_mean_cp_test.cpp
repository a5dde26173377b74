// Exchangers with the stream's mean cp (library/enthalpy.h MeanCapacityRate,
// components/correlations/heat_exchanger.h HeatExchangedImplicit) against
// closed forms and an independent solution written here.
//
// Test fluid (invented): cp linear in T, 1800 J/(kg K) at 250 K rising
// 4 J/(kg K^2) (a 2-row table fluid interpolates linearly), so
//   h(T) = a (T - Tr) + b (T^2 - Tr^2)/2,  a = 1800 - 4*250, b = 4,
// and h(T_out) = h(T_in) + dh is a quadratic with the closed-form root
//   T_out = (-a + sqrt(a^2 + 2 b (a T_in + b T_in^2 / 2 + dh))) / b.
// Independent duty: bisection on q of q - eps C_min ITD with the hot
// capacity rate q / (T_in - T_out(q)) from the closed form and eps of a
// counterflow exchanger written as printed (Incropera et al., 6th ed.,
// Eq. 11.29a, from memory).
#include <doctest/doctest.h>

#include <cmath>
#include <memory>

#include "components/correlations/heat_exchanger.h"
#include "library/enthalpy.h"
#include "library/table_fluid.h"
#include "library/water.h"

namespace loopwright {
namespace {

constexpr double kA = 1800.0 - 4.0 * 250.0, kB = 4.0, kTr = 298.15, kP = 101325.0;

std::shared_ptr<TableFluid> LinearCpFluid() {
  TableFluidColumns c;
  c.T_K = {250.0, 450.0};
  c.mu_Pas = {0.02, 0.02};
  c.rho_kgm3 = {870.0, 870.0};
  c.cp_JkgK = {1800.0, 1800.0 + 4.0 * 200.0};
  c.k_WmK = {0.13, 0.13};
  auto f = TableFluid::Create(c);
  REQUIRE(f);
  return f;
}

double HClosed(double t) { return kA * (t - kTr) + 0.5 * kB * (t * t - kTr * kTr); }
double TAfterClosed(double t, double dh) {
  const double c = kA * t + 0.5 * kB * t * t + dh;
  return (-kA + std::sqrt(kA * kA + 2.0 * kB * c)) / kB;
}

TEST_CASE("enthalpy of a linear-cp liquid and its inverse match the closed forms") {
  auto f = LinearCpFluid();
  for (double t : {280.0, 298.15, 333.0, 420.0}) {
    CHECK(SpecificEnthalpy(*f, t, kP) == doctest::Approx(HClosed(t)).epsilon(1e-13).scale(1.0));
    for (double dh : {-3e4, -1.0, 0.0, 3e3, 2e4}) {  // T_out inside the table, 250-450 K
      CAPTURE(t);
      CAPTURE(dh);
      CHECK(std::abs(TemperatureAfter(*f, t, dh, kP) - TAfterClosed(t, dh)) <= 1e-10);
    }
  }
}

double EpsCounterflowPrinted(double ntu, double cr) {
  const double e = std::exp(-ntu * (1.0 - cr));
  return (1.0 - e) / (1.0 - cr * e);
}

TEST_CASE("HeatExchangedImplicit: duty with the hot stream's mean cp against an independent bisection") {
  auto f = LinearCpFluid();
  const double m = 0.1, t_hot = 380.0, t_cold = 300.0, c_cold = 500.0, ua = 300.0;
  auto cap_hot = [&](const double& q) { return MeanCapacityRate(*f, m, t_hot, -q / m, kP); };
  auto arr = [](bool) { return HxArrangement::kCounterflow; };
  const double q = HeatExchangedImplicit(arr, ua, cap_hot, [&](const double&) { return c_cold; }, t_hot, t_cold);
  // Independent: g(q) = q - eps C_min ITD, C_hot from the closed form.
  auto g = [&](double qq) {
    const double c_h = qq / (t_hot - TAfterClosed(t_hot, -qq / m));
    const double cmin = std::min(c_h, c_cold), cmax = std::max(c_h, c_cold);
    return qq - EpsCounterflowPrinted(ua / cmin, cmin / cmax) * cmin * (t_hot - t_cold);
  };
  double lo = 1.0, hi = 0.999 * m * 1800.0 * (t_hot - t_cold);
  REQUIRE(g(lo) < 0);
  REQUIRE(g(hi) > 0);
  for (int i = 0; i < 200; ++i) (g(0.5 * (lo + hi)) > 0 ? hi : lo) = 0.5 * (lo + hi);
  const double q_ref = 0.5 * (lo + hi);
  // The inlet-cp answer, for scale: it must differ clearly.
  const double q_inlet = HeatExchanged(HxArrangement::kCounterflow, ua, m * f->Evaluate(t_hot, kP).cp, c_cold, t_hot, t_cold);
  MESSAGE("duty with mean cp " << q << " W, independent " << q_ref << " W, with cp at the inlet " << q_inlet << " W");
  CHECK(q == doctest::Approx(q_ref).epsilon(1e-12));
  CHECK(std::abs(q_inlet - q_ref) > 1e-3 * q_ref);
}

TEST_CASE("HeatExchangedImplicit: Jet derivatives equal central differences of the duty") {
  auto f = LinearCpFluid();
  using J = ceres::Jet<double, 2>;
  const double m = 0.08, c_cold = 400.0, ua = 250.0;
  auto duty = [&](auto th, auto tc) {
    using T = decltype(th);
    auto cap_hot = [&](const T& q) { return MeanCapacityRate(*f, m, th, T(-q / m), kP); };
    return HeatExchangedImplicit([](bool) { return HxArrangement::kCounterflow; }, T(ua), cap_hot,
                                 [&](const T&) { return T(c_cold); }, th, tc);
  };
  const double th = 390.0, tc = 310.0, h = 1e-4;
  const J q = duty(J(th, 0), J(tc, 1));
  const double d_th = (duty(th + h, tc) - duty(th - h, tc)) / (2 * h);
  const double d_tc = (duty(th, tc + h) - duty(th, tc - h)) / (2 * h);
  CHECK(q.a == doctest::Approx(duty(th, tc)).epsilon(1e-15));
  CHECK(q.v[0] == doctest::Approx(d_th).epsilon(1e-7));
  CHECK(q.v[1] == doctest::Approx(d_tc).epsilon(1e-7));
}

TEST_CASE("water's cp-only evaluation is its full evaluation's cp") {
  // WaterFluid::SpecificHeat (used by the enthalpy integrals) must be the
  // same IF97 region-1 cp as WaterFluid::Evaluate, clamping included.
  WaterFluid w;
  for (double t : {200.0, 275.0, 300.0, 350.0, 372.0, 400.0, 423.0, 500.0})
    for (double p : {2e3, 101325.0, 3e5, 2e6}) {
      CAPTURE(t);
      CAPTURE(p);
      CHECK(w.SpecificHeat(t, p) == doctest::Approx(w.Evaluate(t, p).cp).epsilon(1e-14));
    }
}

}  // namespace
}  // namespace loopwright
