// Tests of components/correlations/heat_exchanger.h (eps-NTU).
//
// Check values and their sources (named again beside each check):
//  - the relations of Incropera et al., 6th ed., Table 11.3, written here
//    literally as printed (equation numbers from memory) and evaluated in long
//    double away from their removable singularities; the header's stable
//    rewrites must agree with them;
//  - the Cr = 0 (Eq. 11.35a) and counterflow Cr = 1 rows of Table 11.3;
//  - the inverse relations of Incropera Table 11.4 (Eqs. 11.28b-11.35b, from
//    memory) for NtuFromEffectiveness;
//  - the log-mean temperature difference, q = UA dT_lm (Incropera §11.3,
//    Eqs. 11.14-11.17, from memory), an independent integration of the
//    parallel and counterflow exchanger equations;
//  - Incropera Example 11.1 (6th ed., counterflow oil cooler; data and
//    printed results from memory) and Example 11.3 (finned-tube crossflow,
//    both fluids unmixed; from memory);
//  - the exact series solution of the both-unmixed crossflow problem
//    (Mason 1954, header ref. [3]), implemented in this file, and the
//    Kays & London table value eps(NTU = 1, Cr = 1) = 0.476 (Kays & London,
//    Compact Heat Exchangers, 3rd ed., ch. 2 table for crossflow, both
//    fluids unmixed; from memory, three printed digits).
// Tolerances: 1e-13 relative against the literal textbook formulas (rounding
// of the two evaluation orders), half a unit of the last printed digit for
// printed values, and the stated accuracy of 11.32 where that approximation
// is compared with the exact solution.
#include <ceres/jet.h>
#include <doctest/doctest.h>

#include <array>
#include <cmath>
#include <cstdio>
#include <functional>
#include <limits>
#include <string>
#include <vector>

#include "components/correlations/heat_exchanger.h"

namespace loopwright {
namespace {

using J1 = ceres::Jet<double, 1>;
using J2 = ceres::Jet<double, 2>;
using A = HxArrangement;

constexpr std::array<A, 6> kAll = {A::kCounterflow,       A::kParallelFlow,
                                   A::kShellAndTube1Pass, A::kCrossflowUnmixed,
                                   A::kCrossflowCmaxMixed, A::kCrossflowCminMixed};

std::string Name(A a) {
  switch (a) {
    case A::kCounterflow: return "counterflow";
    case A::kParallelFlow: return "parallel";
    case A::kShellAndTube1Pass: return "shell-and-tube";
    case A::kCrossflowUnmixed: return "crossflow unmixed";
    case A::kCrossflowCmaxMixed: return "crossflow Cmax mixed";
    case A::kCrossflowCminMixed: return "crossflow Cmin mixed";
  }
  return "?";
}

double RelErr(double a, double b) { return std::fabs(a - b) / std::fmax(std::fabs(b), 1e-300); }

// Incropera Table 11.3, as printed (0 < Cr, Cr != 1 for counterflow).
long double Literal(A a, long double n, long double c) {
  using std::exp;
  using std::pow;
  using std::sqrt;
  switch (a) {
    case A::kParallelFlow:  // Eq. 11.28a
      return (1.0L - exp(-n * (1.0L + c))) / (1.0L + c);
    case A::kCounterflow:  // Eq. 11.29a
      return (1.0L - exp(-n * (1.0L - c))) / (1.0L - c * exp(-n * (1.0L - c)));
    case A::kShellAndTube1Pass: {  // Eq. 11.30a
      const long double s = sqrt(1.0L + c * c);
      return 2.0L / (1.0L + c + s * (1.0L + exp(-n * s)) / (1.0L - exp(-n * s)));
    }
    case A::kCrossflowUnmixed:  // Eq. 11.32
      return 1.0L - exp((1.0L / c) * pow(n, 0.22L) * (exp(-c * pow(n, 0.78L)) - 1.0L));
    case A::kCrossflowCmaxMixed:  // Eq. 11.33a
      return (1.0L / c) * (1.0L - exp(-c * (1.0L - exp(-n))));
    case A::kCrossflowCminMixed:  // Eq. 11.34a
      return 1.0L - exp(-(1.0L / c) * (1.0L - exp(-c * n)));
  }
  return 0.0L;
}

// Exact eps of single-pass crossflow, both fluids unmixed (Mason 1954):
//   eps = 1/(Cr N) sum_{k>=0} [1 - e^-N sum_{m<=k} N^m/m!]
//                             [1 - e^-CrN sum_{m<=k} (CrN)^m/m!].
double CrossflowUnmixedExact(double n, double c) {
  if (c == 0.0) return -std::expm1(-n);
  const double cn = c * n;
  double tail_a = 1.0, tail_b = 1.0;                // 1 - partial Poisson sums
  double pmf_a = std::exp(-n), pmf_b = std::exp(-cn);  // Poisson pmf at k
  double sum = 0.0;
  for (int k = 0; k < 5000; ++k) {
    tail_a -= pmf_a;
    tail_b -= pmf_b;
    const double term = std::fmax(tail_a, 0.0) * std::fmax(tail_b, 0.0);
    sum += term;
    if (k > n + 10 && term < 1e-20 * sum) break;
    pmf_a *= n / (k + 1);
    pmf_b *= cn / (k + 1);
  }
  return sum / cn;
}

std::vector<double> LogGrid(double lo, double hi, int n) {
  std::vector<double> g;
  for (int i = 0; i < n; ++i) g.push_back(lo * std::pow(hi / lo, double(i) / (n - 1)));
  return g;
}

// ----------------------------------------------------------- closed forms

TEST_CASE("stable forms equal the printed relations of Incropera Table 11.3") {
  // Incropera 6th ed. Table 11.3, Eqs. 11.28a-11.34a (from memory).
  double worst = 0.0;
  for (A a : kAll) {
    for (double n : {0.01, 0.05, 0.3, 0.9, 1.0, 2.0, 5.0, 10.0, 30.0}) {
      for (double c : {0.05, 0.1, 0.25, 0.5, 0.75, 0.9, 0.97}) {
        const double lit = static_cast<double>(Literal(a, n, c));
        const double ours = Effectiveness(a, n, c);
        INFO(Name(a) << " NTU " << n << " Cr " << c << ": ours " << ours << " literal " << lit);
        CHECK(RelErr(ours, lit) <= 1e-13);
        worst = std::fmax(worst, RelErr(ours, lit));
      }
    }
  }
  // The non-counterflow relations at Cr = 1 exactly (no singularity there).
  for (A a : kAll) {
    if (a == A::kCounterflow) continue;
    for (double n : {0.1, 1.0, 4.0}) {
      CHECK(RelErr(Effectiveness(a, n, 1.0), static_cast<double>(Literal(a, n, 1.0L))) <= 1e-13);
    }
  }
  std::printf("heat_exchanger: worst rel. error vs Table 11.3 literal forms %.2e\n", worst);
}

TEST_CASE("Cr -> 0: eps = 1 - exp(-NTU) for every arrangement (Incropera Eq. 11.35a)") {
  for (A a : kAll) {
    for (double n : {0.0, 1e-8, 1e-3, 0.5, 1.0, 3.0, 20.0}) {
      const double limit = -std::expm1(-n);
      INFO(Name(a) << " NTU " << n);
      CHECK(RelErr(Effectiveness(a, n, 0.0), limit) <= 1e-15);
      // continuity: Cr = 1e-9 differs from the limit by O(Cr)
      CHECK(std::fabs(Effectiveness(a, n, 1e-9) - limit) <= 1e-8 * (1.0 + n * n));
      CHECK(std::isfinite(Effectiveness(a, n, 1e-300)));
    }
  }
}

TEST_CASE("counterflow at and through Cr = 1: NTU/(1+NTU) (Incropera Table 11.3)") {
  for (double n : {0.0, 1e-6, 0.1, 1.0, 2.0, 7.5, 100.0, 1e6}) {
    INFO("NTU " << n);
    CHECK(RelErr(Effectiveness(A::kCounterflow, n, 1.0), n / (1.0 + n)) <= 2e-16 + (n == 0 ? 1 : 0));
    // Either side of Cr = 1 the literal Eq. 11.29a (long double) joins
    // smoothly: at 1 - Cr = 1e-4 the literal form still has ~12 digits.
    if (n > 0.0 && n <= 100.0) {
      for (double d : {1e-4, -1e-4}) {
        const double lit = static_cast<double>(Literal(A::kCounterflow, n, 1.0L - d));
        CHECK(RelErr(Effectiveness(A::kCounterflow, n, 1.0 - d), lit) <= 1e-9);
      }
    }
  }
  CHECK(Effectiveness(A::kCounterflow, 1.0, 1.0) == doctest::Approx(0.5).epsilon(1e-15));
}

TEST_CASE("NTU = 0 gives 0 with slope 1; large NTU finite with the right limits") {
  for (A a : kAll) {
    for (double c : {0.0, 0.3, 1.0}) {
      INFO(Name(a) << " Cr " << c);
      CHECK(Effectiveness(a, 0.0, c) == 0.0);
      const J1 e = Effectiveness(a, J1(0.0, 0), J1(c));
      CHECK(e.a == 0.0);
      CHECK(e.v[0] == doctest::Approx(1.0).epsilon(1e-15));
      // Jets finite up to NTU = 1e150 (header); values finite to 1e300.
      for (double n : {1e3, 1e6, 1e12, kHxNtuCap, 1e150}) {
        const J2 j = Effectiveness(a, J2(n, 0), J2(c, 1));
        CHECK(std::isfinite(j.a));
        CHECK(std::isfinite(j.v[0]));
        CHECK(std::isfinite(j.v[1]));
      }
      CHECK(std::isfinite(Effectiveness(a, 1e300, c)));
    }
  }
  const double n = 1e12;
  for (double c : {0.0, 0.3, 0.8, 1.0}) {
    INFO("Cr " << c);
    const double s = std::sqrt(1.0 + c * c);
    CHECK(Effectiveness(A::kCounterflow, n, c) == doctest::Approx(c == 1.0 ? n / (1 + n) : 1.0));
    CHECK(RelErr(Effectiveness(A::kParallelFlow, n, c), 1.0 / (1.0 + c)) <= 1e-15);
    CHECK(RelErr(Effectiveness(A::kShellAndTube1Pass, n, c), 2.0 / (1.0 + c + s)) <= 1e-15);
    CHECK(RelErr(Effectiveness(A::kCrossflowUnmixed, n, c), 1.0) <= 1e-15);
    CHECK(RelErr(Effectiveness(A::kCrossflowCmaxMixed, n, c),
                 c == 0.0 ? 1.0 : -std::expm1(-c) / c) <= 1e-15);
    CHECK(RelErr(Effectiveness(A::kCrossflowCminMixed, n, c),
                 c == 0.0 ? 1.0 : -std::expm1(-1.0 / c)) <= 1e-15);
  }
}

TEST_CASE("Cmax-mixed and Cmin-mixed relations agree at Cr = 1") {
  // Both reduce to 1 - exp[-(1 - e^-NTU)] (Incropera Eqs. 11.33a, 11.34a).
  for (double n : {0.0, 0.2, 1.0, 3.0, 50.0}) {
    const double expect = -std::expm1(-(-std::expm1(-n)));
    CHECK(RelErr(Effectiveness(A::kCrossflowCmaxMixed, n, 1.0), expect) <= 1e-15 + (n == 0));
    CHECK(RelErr(Effectiveness(A::kCrossflowCminMixed, n, 1.0), expect) <= 1e-15 + (n == 0));
  }
}

// ------------------------------------------------ tabulated and worked values

TEST_CASE("crossflow both unmixed: exact series vs Kays & London; Eq. 11.32 within its accuracy") {
  // Kays & London, ch. 2 table, crossflow both unmixed (from memory, 3 digits):
  // eps(NTU = 1, Cr = 1) = 0.476.
  CHECK(std::fabs(CrossflowUnmixedExact(1.0, 1.0) - 0.476) <= 0.0005);
  // The series has the universal small-NTU expansion NTU - (1 + Cr) NTU^2/2.
  CHECK(CrossflowUnmixedExact(1e-4, 0.5) == doctest::Approx(1e-4 - 1.5e-8 / 2).epsilon(1e-9));
  // Eq. 11.32 against the exact series: the header states <= 3.8 % low,
  // <= 1.7 % for 1 <= NTU <= 5, absolute <= 0.036 for NTU <= 50.
  double worst = 0.0, worst_mid = 0.0, worst_abs = 0.0;
  for (double n : LogGrid(1e-3, 50.0, 120)) {
    for (double c = 0.0; c <= 1.0 + 1e-12; c += 0.05) {
      const double exact = CrossflowUnmixedExact(n, c);
      const double approx = Effectiveness(A::kCrossflowUnmixed, n, c);
      const double r = RelErr(approx, exact);
      worst = std::fmax(worst, r);
      if (n >= 1.0 && n <= 5.0) worst_mid = std::fmax(worst_mid, r);
      worst_abs = std::fmax(worst_abs, std::fabs(approx - exact));
    }
  }
  std::printf("heat_exchanger: Eq. 11.32 vs exact crossflow series: worst rel %.4f "
              "(1<=NTU<=5: %.4f), worst abs %.4f\n", worst, worst_mid, worst_abs);
  CHECK(worst <= 0.038);
  CHECK(worst_mid <= 0.017);
  CHECK(worst_abs <= 0.036);
}

TEST_CASE("Incropera Example 11.1: counterflow oil cooler, forward from the printed data (from memory)") {
  // Given: oil 0.1 kg/s, cp 2131 J/(kg K), enters 100 C; water 0.2 kg/s,
  // cp 4178, enters 30 C. Printed results: q = 8524 W, oil out 60 C, water
  // out 40.2 C, dT_lm = 43.2 C. The exchanger's UA is what the printed
  // q and dT_lm give, UA = q / dT_lm, known to the rounding of 43.2 (+-0.05).
  // Forward: our counterflow e-NTU duty from the inlets and UA alone (no
  // outlet temperature is an input) must put the printed results inside the
  // band that the rounding of dT_lm leaves. A parallel-flow or wrong-C_min
  // model misses by > 4 %.
  const double c_oil = 0.1 * 2131.0, c_w = 0.2 * 4178.0;
  double q_lo = 0, q_hi = 0;
  for (int side = 0; side < 2; ++side) {
    const double ua = 8524.0 / (side == 0 ? 43.25 : 43.15);
    const double q = HeatExchanged(A::kCounterflow, ua, c_oil, c_w, 373.15, 303.15);
    (side == 0 ? q_lo : q_hi) = q;
  }
  std::printf("heat_exchanger: Example 11.1 forward: q in [%.1f, %.1f] W (printed 8524), oil out [%.3f, %.3f] C (60), "
              "water out [%.3f, %.3f] C (40.2)\n", q_lo, q_hi, 100.0 - q_hi / c_oil, 100.0 - q_lo / c_oil,
              30.0 + q_lo / c_w, 30.0 + q_hi / c_w);
  REQUIRE(q_lo < q_hi);
  CHECK(q_lo <= 8524.0 + 0.5);
  CHECK(q_hi >= 8524.0 - 0.5);
  CHECK(100.0 - q_hi / c_oil <= 60.0 + 0.005);  // "60" printed as given: half a unit of 0.01
  CHECK(100.0 - q_lo / c_oil >= 60.0 - 0.005);
  CHECK(30.0 + q_lo / c_w <= 40.2 + 0.05);
  CHECK(30.0 + q_hi / c_w >= 40.2 - 0.05);
  // The band is narrow: it cannot hold a parallel-flow answer.
  CHECK(HeatExchanged(A::kParallelFlow, 8524.0 / 43.2, c_oil, c_w, 373.15, 303.15) < 0.96 * 8524.0);
}

TEST_CASE("Incropera Example 11.3: crossflow, both unmixed, forward from the chart NTU (from memory)") {
  // Given: water 1 kg/s, cp 4197, 35 -> 125 C, heated by gas entering at
  // 300 C. Printed: C_h = 1889 W/K (C_min), q = 3.78e5 W, gas out 100 C, and
  // NTU ~ 2.1 read from the chart of the exact solution (two digits: 2.05 to
  // 2.15). Forward: our duty at UA = NTU C_h from the inlets must reach the
  // printed q within the chart band widened by the documented accuracy of
  // Eq. 11.32 (<= 0.036 in eps, header; checked against the exact series in
  // this file). A coarse check (the chart is read to two digits): it tells
  // crossflow from parallel flow (eps 0.66, 13 % low) but not from
  // counterflow (eps 0.80, inside the band); the accuracy of Eq. 11.32 itself
  // is checked against the exact series above.
  const double c_h = 1889.0, c_c = 4197.0, itd = 300.0 - 35.0;
  const double q_lo = HeatExchanged(A::kCrossflowUnmixed, 2.05 * c_h, c_h, c_c, 573.15, 308.15);
  const double q_hi = HeatExchanged(A::kCrossflowUnmixed, 2.15 * c_h, c_h, c_c, 573.15, 308.15);
  const double slack = 0.036 * c_h * itd;
  std::printf("heat_exchanger: Example 11.3 forward: q in [%.4g, %.4g] W +- %.3g (printed 3.78e5), gas out %.1f C (100)\n",
              q_lo, q_hi, slack, 300.0 - 0.5 * (q_lo + q_hi) / c_h);
  CHECK(q_lo - slack <= 3.785e5);
  CHECK(q_hi + slack >= 3.775e5);
  CHECK(HeatExchanged(A::kParallelFlow, 2.15 * c_h, c_h, c_c, 573.15, 308.15) + slack < 3.775e5);
}

TEST_CASE("parallel and counterflow duty equal UA times the log-mean temperature difference") {
  // Incropera §11.3 Eqs. 11.14-11.17 (from memory): q = UA dT_lm,
  // dT_lm = (dT1 - dT2)/ln(dT1/dT2); counterflow dT1 = Th,i - Tc,o,
  // dT2 = Th,o - Tc,i; parallel dT1 = Th,i - Tc,i, dT2 = Th,o - Tc,o.
  double worst = 0.0;
  for (A a : {A::kCounterflow, A::kParallelFlow}) {
    for (double ua : {10.0, 150.0, 400.0}) {  // NTU <= 4: dT_lm well conditioned
      for (double ch : {100.0, 500.0, 1000.0}) {
        for (double cc : {150.0, 500.0, 4000.0}) {
          const double thi = 360.0, tci = 300.0;
          const double q = HeatExchanged(a, ua, ch, cc, thi, tci);
          const double tho = thi - q / ch, tco = tci + q / cc;
          double d1, d2;
          if (a == A::kCounterflow) {
            d1 = thi - tco;
            d2 = tho - tci;
          } else {
            d1 = thi - tci;
            d2 = tho - tco;
          }
          const double lm = std::fabs(d1 - d2) < 1e-9 * d1 ? d1 : (d1 - d2) / std::log(d1 / d2);
          INFO(Name(a) << " UA " << ua << " Ch " << ch << " Cc " << cc);
          CHECK(RelErr(q, ua * lm) <= 1e-9);
          worst = std::fmax(worst, RelErr(q, ua * lm));
        }
      }
    }
  }
  std::printf("heat_exchanger: worst rel. error vs LMTD %.2e\n", worst);
}

// --------------------------------------------------------------- properties

TEST_CASE("every arrangement: 0 <= eps <= 1, increasing in NTU, decreasing in Cr") {
  const auto ntus = LogGrid(1e-4, 200.0, 60);
  for (A a : kAll) {
    for (int ic = 0; ic <= 20; ++ic) {
      const double c = ic / 20.0;
      double prev = -1.0;
      for (double n : ntus) {
        const double e = Effectiveness(a, n, c);
        INFO(Name(a) << " NTU " << n << " Cr " << c);
        CHECK(e >= 0.0);
        CHECK(e <= 1.0);
        CHECK(e >= prev);
        // strictly increasing until eps has reached its NTU -> inf limit
        if (e < Effectiveness(a, kHxNtuCap, c) - 1e-12) CHECK(e > prev);
        prev = e;
        if (ic > 0) CHECK(e < Effectiveness(a, n, (ic - 1) / 20.0) + 1e-15);
        // the counterflow bound: no arrangement beats counterflow
        CHECK(e <= Effectiveness(A::kCounterflow, n, c) * (1.0 + 1e-14));
      }
    }
  }
}

TEST_CASE("counterflow >= shell-and-tube >= parallel at the same NTU and Cr") {
  for (double n : LogGrid(1e-3, 100.0, 40)) {
    for (double c : {0.0, 0.1, 0.4, 0.7, 1.0}) {
      const double cf = Effectiveness(A::kCounterflow, n, c);
      const double st = Effectiveness(A::kShellAndTube1Pass, n, c);
      const double pf = Effectiveness(A::kParallelFlow, n, c);
      INFO("NTU " << n << " Cr " << c);
      CHECK(cf >= st * (1.0 - 1e-15));
      CHECK(st >= pf * (1.0 - 1e-15));
      if (c > 0.0 && n > 0.1) CHECK(cf > st);
    }
  }
}

// -------------------------------------------------------------- derivatives

// d eps / d NTU and d eps / d Cr by Jet vs difference quotient (central, or
// second-order one-sided when x - h would leave the domain x >= 0).
void CheckPartials(A a, double n, double c) {
  const J2 j = Effectiveness(a, J2(n, 0), J2(c, 1));
  auto f = [a](double nn, double cc) { return Effectiveness(a, nn, cc); };
  const double hn = std::fmax(1e-6 * n, 1e-9), hc = 1e-6;
  const double dn = n - hn < 0.0
                        ? (-3.0 * f(n, c) + 4.0 * f(n + hn, c) - f(n + 2 * hn, c)) / (2 * hn)
                        : (f(n + hn, c) - f(n - hn, c)) / (2 * hn);
  const double dc = c - hc < 0.0
                        ? (-3.0 * f(n, c) + 4.0 * f(n, c + hc) - f(n, c + 2 * hc)) / (2 * hc)
                        : (f(n, c + hc) - f(n, c - hc)) / (2 * hc);
  INFO(Name(a) << " NTU " << n << " Cr " << c << ": jet " << j.v[0] << ", " << j.v[1]
               << " differences " << dn << ", " << dc);
  CHECK(std::isfinite(j.v[0]));
  CHECK(std::isfinite(j.v[1]));
  CHECK(RelErr(j.a, f(n, c)) <= 4e-16);  // the Jet's value is the double value
  CHECK(std::fabs(j.v[0] - dn) <= 2e-6 * std::fabs(dn) + 1e-9);
  CHECK(std::fabs(j.v[1] - dc) <= 2e-6 * std::fabs(dc) + 1e-9);
}

TEST_CASE("Jet derivatives match differences, including Cr = 0, Cr = 1 and NTU near 0") {
  for (A a : kAll) {
    for (double n : {1e-6, 1e-3, 0.05, 0.5, 1.0, 3.0, 20.0}) {
      for (double c : {0.0, 1e-7, 0.2, 0.5, 0.999999, 1.0}) CheckPartials(a, n, c);
    }
  }
  // At NTU = 0 exactly the NTU-slope is 1 and the Cr-slope 0 (eps = 0 for all Cr).
  for (A a : kAll) {
    const J2 j = Effectiveness(a, J2(0.0, 0), J2(0.5, 1));
    CHECK(j.v[0] == doctest::Approx(1.0));
    CHECK(j.v[1] == 0.0);
  }
  // The Phi series / expm1 switch at |z| = 0.5 joins in value and slope.
  for (double z : {0.5, -0.5}) {
    const J1 in = hx_internal::Phi(J1(std::nextafter(z, 0.0), 0));
    const J1 out = hx_internal::Phi(J1(z, 0));  // |z| = 0.5 takes the expm1 form
    CHECK(RelErr(in.a, out.a) <= 4e-16);
    CHECK(RelErr(in.v[0], out.v[0]) <= 1e-15);
  }
}

// ------------------------------------------------------------- HeatExchanged

TEST_CASE("HeatExchanged: q = eps C_min dT, energy balance, sign, bound") {
  for (A a : kAll) {
    const double ua = 800.0, ch = 400.0, cc = 1000.0;
    const double q = HeatExchanged(a, ua, ch, cc, 350.0, 290.0);
    CHECK(RelErr(q, Effectiveness(a, ua / ch, ch / cc) * ch * 60.0) <= 1e-15);
    CHECK(q > 0.0);
    CHECK(q <= ch * 60.0);
    // cold stream hotter than "hot": heat flows the other way, same magnitude
    CHECK(RelErr(HeatExchanged(a, ua, ch, cc, 290.0, 350.0), -q) <= 1e-15);
    // C_min on the cold side
    const double q2 = HeatExchanged(a, ua, cc, ch, 350.0, 290.0);
    CHECK(RelErr(q2, Effectiveness(a, ua / ch, ch / cc) * ch * 60.0) <= 1e-15);
    CHECK(HeatExchanged(a, 0.0, ch, cc, 350.0, 290.0) == 0.0);
    CHECK(HeatExchanged(a, ua, ch, cc, 300.0, 300.0) == 0.0);
  }
}

TEST_CASE("HeatExchanged: a stopped stream gives q -> 0 smoothly") {
  for (A a : kAll) {
    const double ua = 500.0, cc = 800.0, dt = 40.0;
    // q(C) -> 0 and dq/dC -> dT as C -> 0+, and the C = 0 branch has q = 0,
    // slope dT.
    const J2 at0 = HeatExchanged(a, J2(ua), J2(0.0, 0), J2(cc), J2(340.0, 1), J2(300.0));
    CHECK(at0.a == 0.0);
    CHECK(at0.v[0] == dt);
    CHECK(at0.v[1] == 0.0);
    // eps -> 1 as Cr = C/cc -> 0 with error O(Cr) (parallel: 1/(1 + Cr)).
    for (double c : {1e-3, 1e-6, 1e-9}) {
      const J2 j = HeatExchanged(a, J2(ua), J2(c, 0), J2(cc), J2(340.0, 1), J2(300.0));
      INFO(Name(a) << " C " << c);
      CHECK(j.a <= c * dt);
      CHECK(j.a == doctest::Approx(c * dt).epsilon(c / cc + 1e-14));
      CHECK(j.v[0] == doctest::Approx(dt).epsilon(2.0 * c / cc + 1e-12));
      CHECK(j.v[1] == doctest::Approx(j.a / dt).epsilon(1e-14));
    }
    // Both streams stopping together (Cr = 1): still finite and -> 0.
    for (double c : {1e-3, 1e-9, 1e-200}) {
      const J2 j = HeatExchanged(a, J2(ua), J2(c, 0), J2(c, 1), J2(340.0), J2(300.0));
      CHECK(std::isfinite(j.a));
      CHECK(std::isfinite(j.v[0]));
      CHECK(std::isfinite(j.v[1]));
      CHECK(std::fabs(j.a) <= c * dt);
    }
  }
}

TEST_CASE("HeatExchanged: the NTU cap joins the uncapped value") {
  for (A a : kAll) {
    for (double cr_target : {0.3, 1.0}) {
      const double ua = 1.0;
      const double below = HeatExchanged(a, ua, ua / (kHxNtuCap * 0.999), ua / (kHxNtuCap * 0.999) / cr_target, 1.0, 0.0);
      const double above = HeatExchanged(a, ua, ua / (kHxNtuCap * 1.001), ua / (kHxNtuCap * 1.001) / cr_target, 1.0, 0.0);
      const double c_b = ua / (kHxNtuCap * 0.999), c_a = ua / (kHxNtuCap * 1.001);
      INFO(Name(a) << " Cr " << cr_target);
      CHECK(std::fabs(below / c_b - above / c_a) <= 2.0 / kHxNtuCap);  // eps continuous
    }
  }
}

TEST_CASE("HeatExchanged is continuous where C_hot = C_cold; one-mixed is smooth there") {
  const double ua = 700.0, c0 = 500.0;
  for (A a : kAll) {
    const double lo = HeatExchanged(a, ua, c0 * (1 - 1e-10), c0, 360.0, 300.0);
    const double hi = HeatExchanged(a, ua, c0 * (1 + 1e-10), c0, 360.0, 300.0);
    INFO(Name(a));
    CHECK(RelErr(lo, hi) <= 1e-9);
  }
  // Fixed physical mixed stream: value and slope in C_hot continuous across
  // C_hot = C_cold (11.33a and 11.34a are the exact one-mixed solutions).
  for (bool hot_mixed : {true, false}) {
    const J2 lo = HeatExchangedCrossflowOneMixed(hot_mixed, J2(ua), J2(c0 * (1 - 1e-9), 0),
                                                 J2(c0, 1), J2(360.0), J2(300.0));
    const J2 hi = HeatExchangedCrossflowOneMixed(hot_mixed, J2(ua), J2(c0 * (1 + 1e-9), 0),
                                                 J2(c0, 1), J2(360.0), J2(300.0));
    INFO("hot_mixed " << hot_mixed << " slopes " << lo.v[0] << " " << hi.v[0]);
    CHECK(RelErr(lo.a, hi.a) <= 1e-8);
    CHECK(RelErr(lo.v[0], hi.v[0]) <= 1e-6);
    CHECK(RelErr(lo.v[1], hi.v[1]) <= 1e-6);
  }
  // Symmetric relations: slope continuous too.
  for (A a : {A::kCounterflow, A::kParallelFlow, A::kShellAndTube1Pass}) {
    const J2 lo = HeatExchanged(a, J2(ua), J2(c0 * (1 - 1e-9), 0), J2(c0, 1), J2(360.0), J2(300.0));
    const J2 hi = HeatExchanged(a, J2(ua), J2(c0 * (1 + 1e-9), 0), J2(c0, 1), J2(360.0), J2(300.0));
    INFO(Name(a));
    CHECK(RelErr(lo.v[0], hi.v[0]) <= 1e-6);
  }
  // 11.32 (approximation, not symmetric): the slope jumps; measure it.
  const J2 lo = HeatExchanged(A::kCrossflowUnmixed, J2(ua), J2(c0 * (1 - 1e-9), 0), J2(c0, 1),
                              J2(360.0), J2(300.0));
  const J2 hi = HeatExchanged(A::kCrossflowUnmixed, J2(ua), J2(c0 * (1 + 1e-9), 0), J2(c0, 1),
                              J2(360.0), J2(300.0));
  const double jump = std::fabs(lo.v[0] - hi.v[0]) / (lo.a / c0);
  std::printf("heat_exchanger: Eq. 11.32 slope jump dq/dC_hot at C_hot = C_cold: %.4f q/C\n", jump);
  CHECK(jump < 0.1);  // header: "a few per cent of q/C"
}

TEST_CASE("CrossflowMixedSide maps the physical mixed stream to Cmin/Cmax") {
  CHECK(CrossflowMixedSide(true, true) == A::kCrossflowCminMixed);
  CHECK(CrossflowMixedSide(true, false) == A::kCrossflowCmaxMixed);
  CHECK(CrossflowMixedSide(false, true) == A::kCrossflowCmaxMixed);
  CHECK(CrossflowMixedSide(false, false) == A::kCrossflowCminMixed);
  // Oil (hot, mixed) is C_max: Cmax-mixed relation.
  const double q = HeatExchangedCrossflowOneMixed(true, 900.0, 2000.0, 1000.0, 360.0, 300.0);
  CHECK(RelErr(q, Effectiveness(A::kCrossflowCmaxMixed, 0.9, 0.5) * 1000.0 * 60.0) <= 1e-15);
}

// ---------------------------------------------------- NtuFromEffectiveness

// Incropera Table 11.4 (from memory).
double InverseLiteral(A a, double e, double c) {
  switch (a) {
    case A::kParallelFlow:  // Eq. 11.28b
      return -std::log(1.0 - e * (1.0 + c)) / (1.0 + c);
    case A::kCounterflow:  // Eq. 11.29b
      return c == 1.0 ? e / (1.0 - e) : std::log((e - 1.0) / (e * c - 1.0)) / (c - 1.0);
    case A::kShellAndTube1Pass: {  // Eq. 11.30b
      const double s = std::sqrt(1.0 + c * c);
      const double big_e = (2.0 / e - (1.0 + c)) / s;
      return -std::log((big_e - 1.0) / (big_e + 1.0)) / s;
    }
    case A::kCrossflowCmaxMixed:  // Eq. 11.33b
      return -std::log(1.0 + std::log(1.0 - e * c) / c);
    case A::kCrossflowCminMixed:  // Eq. 11.34b
      return -std::log(c * std::log(1.0 - e) + 1.0) / c;
    case A::kCrossflowUnmixed:
      break;  // no closed inverse
  }
  return std::numeric_limits<double>::quiet_NaN();
}

TEST_CASE("NtuFromEffectiveness inverts eps; matches Incropera Table 11.4") {
  double worst = 0.0;
  for (A a : kAll) {
    for (double c : {0.1, 0.5, 0.8, 1.0}) {
      const double lim = Effectiveness(a, kHxNtuCap, c);
      for (double frac : {0.01, 0.2, 0.5, 0.8, 0.95, 0.999}) {
        const double e = frac * lim;
        const double n = NtuFromEffectiveness(a, e, c);
        INFO(Name(a) << " Cr " << c << " eps " << e << " NTU " << n);
        CHECK(std::isfinite(n));
        CHECK(RelErr(Effectiveness(a, n, c), e) <= 1e-13);
        if (a != A::kCrossflowUnmixed) {
          const double lit = InverseLiteral(a, e, c);
          CHECK(RelErr(n, lit) <= 1e-9);
          worst = std::fmax(worst, RelErr(n, lit));
        }
      }
    }
  }
  std::printf("heat_exchanger: worst rel. error of NTU vs Table 11.4 inverses %.2e\n", worst);
  CHECK(NtuFromEffectiveness(A::kCounterflow, 0.0, 0.5) == 0.0);
  CHECK(NtuFromEffectiveness(A::kParallelFlow, 0.7, 0.5) == std::numeric_limits<double>::infinity());
  CHECK(NtuFromEffectiveness(A::kCounterflow, 1.0, 1.0) == std::numeric_limits<double>::infinity());
  CHECK(RelErr(NtuFromEffectiveness(A::kCounterflow, 0.5, 0.0), std::log(2.0)) <= 1e-14);
}

}  // namespace
}  // namespace loopwright
