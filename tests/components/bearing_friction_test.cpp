// Tests of components/correlations/bearing_friction.h.
//
// Check values and their sources (named again beside each check):
//  - a hand calculation of Petroff's law, every intermediate number printed
//    in the comments (shear stress, area, force, torque, power);
//  - Shigley's coefficient form f = 2 pi^2 (mu N / P)(r / c), Eq. (12-6) of
//    Budynas & Nisbett, Shigley's Mechanical Engineering Design, 9th ed.
//    (equation number from memory), with the data of its Example 12-1
//    (mu = 4 ureyn, N = 30 rev/s, W = 500 lbf, r = 0.75 in, c = 0.0015 in,
//    l = 1.5 in; printed Sommerfeld number S = 0.135; from memory), worked in
//    inch-pound units and compared after exact unit conversion;
//  - Raimondi & Boyd (ASLE Trans. 1(1), 1958), table for the full journal
//    bearing, l/d = 1 (values from memory, three printed digits): the
//    friction variable (r/c) f is the Couette term 2 pi^2 S / sqrt(1 - eps^2)
//    plus the journal's pressure-flow term eps sin(phi) / 2.
#include <ceres/jet.h>
#include <doctest/doctest.h>

#include <cmath>
#include <cstdio>
#include <limits>

#include "components/correlations/bearing_friction.h"

namespace loopwright {
namespace {

using J1 = ceres::Jet<double, 1>;

double RelErr(double a, double b) { return std::fabs(a - b) / std::fmax(std::fabs(b), 1e-300); }

constexpr double kPi = 3.14159265358979323846;

TEST_CASE("Petroff: hand calculation with every number shown") {
  // mu = 0.02 Pa s, r = 25 mm, L = 50 mm, c = 25 um, 3000 rpm = 100 pi rad/s.
  //   U   = omega r           = 314.1593 * 0.025        = 7.853982 m/s
  //   tau = mu U / c          = 0.02 * 7.853982 / 25e-6 = 6283.185 Pa
  //   A   = 2 pi r L          = 2 pi * 0.025 * 0.05     = 7.853982e-3 m2
  //   F   = tau A                                       = 49.34802 N
  //   T_f = F r                                         = 1.233701 N m
  //   P_f = T_f omega                                   = 387.5785 W
  const double mu = 0.02, r = 0.025, l = 0.05, c = 25e-6, w = 100.0 * kPi;
  CHECK(std::fabs(PetroffFrictionTorque(mu, r, l, c, w) - 1.233701) <= 0.5e-6);
  CHECK(std::fabs(PetroffFrictionPower(mu, r, l, c, w) - 387.5785) <= 0.5e-4);
  std::printf("bearing_friction: hand calc P_f %.7f W (387.5785), rel %.1e\n",
              PetroffFrictionPower(mu, r, l, c, w),
              RelErr(PetroffFrictionPower(mu, r, l, c, w), 387.5785));
  // Power is even in omega, torque odd; both linear in mu and L, ~1/c.
  CHECK(PetroffFrictionPower(mu, r, l, c, -w) == PetroffFrictionPower(mu, r, l, c, w));
  CHECK(PetroffFrictionTorque(mu, r, l, c, -w) == -PetroffFrictionTorque(mu, r, l, c, w));
  CHECK(RelErr(PetroffFrictionPower(mu, r, l, 2 * c, w), 0.5 * PetroffFrictionPower(mu, r, l, c, w)) <= 1e-15);
  // Jet in mu: dP/dmu = P/mu.
  const J1 p = PetroffFrictionPower(J1(mu, 0), r, l, c, w);
  CHECK(RelErr(p.v[0], p.a / mu) <= 1e-15);
}

TEST_CASE("Petroff equals Shigley's coefficient form, Eq. (12-6), Example 12-1 data") {
  // Inch-pound, as in Shigley (from memory): mu = 4e-6 reyn, N = 30 rev/s,
  // W = 500 lbf, r = 0.75 in, c = 0.0015 in, l = 1.5 in.
  const double mu_reyn = 4e-6, n_rps = 30.0, w_lbf = 500.0, r_in = 0.75, c_in = 0.0015,
               l_in = 1.5;
  const double p_psi = w_lbf / (2.0 * r_in * l_in);                          // 222.2 psi
  const double f = 2.0 * kPi * kPi * (mu_reyn * n_rps / p_psi) * (r_in / c_in);  // Eq. (12-6)
  const double torque_lbf_in = f * w_lbf * r_in;                                 // T = f W r
  // Exact conversions: 1 in = 0.0254 m, 1 lbf = 4.4482216152605 N,
  // 1 reyn = 1 lbf s/in^2 = 4.4482216152605 / 0.0254^2 Pa s.
  const double in = 0.0254, lbf = 4.4482216152605, reyn = lbf / (in * in);
  const double torque_si = torque_lbf_in * lbf * in;
  const double ours = PetroffFrictionTorque(mu_reyn * reyn, r_in * in, l_in * in, c_in * in,
                                            2.0 * kPi * n_rps);
  std::printf("bearing_friction: Shigley Eq. (12-6) torque %.6f N m, ours %.6f, rel %.1e\n",
              torque_si, ours, RelErr(ours, torque_si));
  CHECK(RelErr(ours, torque_si) <= 1e-13);
  // The example's printed answer (from memory): torque T = f W r = 1.99
  // lbf in (f = 0.00532). Ours, converted back to lbf in, to the printed
  // three digits.
  const double ours_lbf_in = ours / (lbf * in);
  std::printf("bearing_friction: Shigley Example 12-1 torque, ours %.4f lbf in, printed 1.99\n", ours_lbf_in);
  CHECK(std::fabs(ours_lbf_in - 1.99) <= 0.01);
}

TEST_CASE("eccentric film: factor 1/sqrt(1 - eps^2), equal to Petroff at eps = 0") {
  const double mu = 0.03, r = 0.04, l = 0.04, c = 40e-6, w = 500.0;
  const double p0 = PetroffFrictionPower(mu, r, l, c, w);
  CHECK(ShortBearingFrictionPower(mu, r, l, c, w, 0.0) == p0);
  CHECK(RelErr(ShortBearingFrictionPower(mu, r, l, c, w, 0.6), p0 / 0.8) <= 1e-15);  // sqrt(0.64)
  // The factor is the Couette integral (1/2pi) int_0^2pi dtheta/(1 + eps cos theta),
  // checked here by the trapezoid rule (spectrally accurate for periodic f).
  for (double e : {0.1, 0.5, 0.9}) {
    const int n = 4000;
    double sum = 0.0;
    for (int i = 0; i < n; ++i) sum += 1.0 / (1.0 + e * std::cos(2.0 * kPi * i / n));
    CHECK(RelErr(ShortBearingFrictionPower(mu, r, l, c, w, e) / p0, sum / n) <= 1e-13);
  }
  double prev = 0.0;
  for (double e = 0.0; e < 0.99; e += 0.05) {
    const double p = ShortBearingFrictionPower(mu, r, l, c, w, e);
    CHECK(p > prev);
    prev = p;
  }
  CHECK(ShortBearingFrictionPower(mu, r, l, c, w, 1.0) == std::numeric_limits<double>::infinity());
  const J1 j = ShortBearingFrictionPower(J1(mu, 0), r, l, c, w, 0.5);
  CHECK(RelErr(j.v[0], j.a / mu) <= 1e-15);
}

TEST_CASE("Couette plus load term reproduces Raimondi & Boyd's l/d = 1 friction variable") {
  // Raimondi & Boyd 1958, full journal bearing, l/d = 1 (from memory):
  //   eps    S        phi [deg]  (r/c) f
  struct Row {
    double eps, s, phi_deg, rcf;
  };
  const Row rows[] = {
      {0.1, 1.33, 79.5, 26.4},   {0.2, 0.631, 74.02, 12.8},   {0.4, 0.264, 63.10, 5.79},
      {0.6, 0.121, 50.58, 3.22}, {0.8, 0.0446, 36.24, 1.70}, {0.9, 0.0188, 26.45, 1.05},
      {0.97, 0.00474, 15.47, 0.514},
  };
  // Any consistent bearing: r = 25 mm, c = 25 um, L = 2r, mu = 0.02 Pa s,
  // N = 50 rev/s; the load follows from S = (r/c)^2 mu N / P, W = 2 r L P.
  const double r = 0.025, c = 25e-6, l = 2.0 * r, mu = 0.02, n = 50.0, w = 2.0 * kPi * n;
  double worst = 0.0, worst_load_share = 0.0;
  for (const Row& row : rows) {
    const double p = (r / c) * (r / c) * mu * n / row.s;
    const double load = 2.0 * r * l * p;
    const double couette = ShortBearingFrictionPower(mu, r, l, c, w, row.eps);
    const double pressure =
        JournalLoadFrictionPower(load, c, row.eps, row.phi_deg * kPi / 180.0, w);
    const double rcf = (r / c) * ((couette + pressure) / w) / (load * r);  // (r/c) T/(W r)
    const double err = RelErr(rcf, row.rcf);
    INFO("eps " << row.eps << ": ours " << rcf << " table " << row.rcf);
    CHECK(err <= 0.015);
    worst = std::fmax(worst, err);
    if (row.eps <= 0.9) worst_load_share = std::fmax(worst_load_share, pressure / (couette + pressure));
    std::printf("bearing_friction: R&B eps %.2f (r/c)f ours %.4f table %.3f rel %.4f, "
                "load term %.1f %%\n", row.eps, rcf, row.rcf, err,
                100.0 * pressure / (couette + pressure));
  }
  std::printf("bearing_friction: worst rel. error vs Raimondi & Boyd %.4f\n", worst);
  // Near eps = 0 the Couette term alone carries the table's friction: our
  // eccentric-film Couette power at the first row (eps 0.1, S 1.33) is within
  // 0.5 % of (r/c) f = 26.4.
  const double p1 = (r / c) * (r / c) * mu * n / rows[0].s;
  const double couette1 = ShortBearingFrictionPower(mu, r, l, c, w, rows[0].eps);
  CHECK(RelErr((r / c) * (couette1 / w) / (2.0 * r * l * p1 * r), 26.4) <= 0.005);
}

TEST_CASE("Taylor number: hand value and the laminar limit") {
  // rho = 860 kg/m3, mu = 0.02 Pa s, r = 25 mm, c = 25 um, omega = 100 pi:
  //   Re = rho omega r c / mu = 860 * 314.1593 * 0.025 * 25e-6 / 0.02 = 8.443031
  //   sqrt(c/r) = sqrt(1e-3) = 0.03162278;  Ta = 0.2669921
  const double ta = TaylorNumber(860.0, 0.02, 0.025, 25e-6, 100.0 * kPi);
  CHECK(std::fabs(ta - 0.2669921) <= 0.5e-7);
  CHECK(ta < kTaylorCritical);
  CHECK(TaylorNumber(860.0, 0.02, 0.025, 25e-6, -100.0 * kPi) == ta);
  // A large, fast, thin-oil bearing crosses 41.3: r = 0.2 m, c = 0.3 mm,
  // 3600 rpm, nu = 1e-5 m2/s: Re = 377 * 0.2 * 3e-4 / 1e-5 = 2262, Ta = 87.6.
  const double big = TaylorNumber(860.0, 0.0086, 0.2, 3e-4, 3600.0 * 2.0 * kPi / 60.0);
  CHECK(std::fabs(big - 87.6) <= 0.05);
  CHECK(big > kTaylorCritical);
  const J1 j = TaylorNumber(J1(860.0), J1(0.02, 0), 0.025, 25e-6, 100.0 * kPi);
  CHECK(RelErr(j.v[0], -j.a / 0.02) <= 1e-15);
}

}  // namespace
}  // namespace loopwright
