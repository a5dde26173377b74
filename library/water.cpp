#include "library/water.h"

#include <algorithm>
#include <cmath>
#include <cstring>

#include <ceres/jet.h>

#include "library/memo.h"
#include "library/units.h"

namespace loopwright {
namespace {

using Jet = ceres::Jet<double, 1>;

// ---- IF97 constants -------------------------------------------------------
constexpr double kR = 461.526;       // J/(kg.K), IF97 Eq. 1
constexpr double kPStar1 = 16.53e6;  // Pa, region 1 reducing pressure (Eq. 7)
constexpr double kTStar1 = 1386.0;   // K, region 1 reducing temperature
constexpr double kTc = 647.096;      // K, critical temperature (IF97 Eq. 2)
constexpr double kPc = 22.064e6;     // Pa, critical pressure
constexpr double kRhoc = 322.0;      // kg/m3, critical density ([2] Eq. 4)
constexpr double kPsatMin = 611.213;   // Pa, Eq. 31 lower limit (psat(273.15 K))
constexpr double kTEvalMin = 253.15;   // K, evaluation clamp
constexpr double kTEvalMax = 623.15;   // K, region 1 upper limit
constexpr double kPEvalMax = 100.0e6;  // Pa, region 1 upper limit

// IF97 Table 2: I_i, J_i, n_i of region 1 (i = 1..34).
constexpr int kI1[34] = {0, 0, 0, 0, 0, 0, 0, 0, 1, 1, 1, 1, 1, 1, 2, 2, 2,
                         2, 2, 3, 3, 3, 4, 4, 4, 5, 8, 8, 21, 23, 29, 30, 31, 32};
constexpr int kJ1[34] = {-2, -1, 0,  1,  2,   3,   4,   5,   -9,  -7,  -1, 0,
                         1,  3,  -3, 0,  1,   3,   17,  -4,  0,   6,   -5, -2,
                         10, -8, -11, -6, -29, -31, -38, -39, -40, -41};
constexpr double kN1[34] = {
    0.14632971213167,    -0.84548187169114,   -0.37563603672040e1,
    0.33855169168385e1,  -0.95791963387872,   0.15772038513228,
    -0.16616417199501e-1, 0.81214629983568e-3, 0.28319080123804e-3,
    -0.60706301565874e-3, -0.18990068218419e-1, -0.32529748770505e-1,
    -0.21841717175414e-1, -0.52838357969930e-4, -0.47184321073267e-3,
    -0.30001780793026e-3, 0.47661393906987e-4,  -0.44141845330846e-5,
    -0.72694996297594e-15, -0.31679644845054e-4, -0.28270797985312e-5,
    -0.85205128120103e-9, -0.22425281908000e-5, -0.65171222895601e-6,
    -0.14341729937924e-12, -0.40516996860117e-6, -0.12734301741641e-8,
    -0.17424871230634e-9, -0.68762131295531e-18, 0.14478307828521e-19,
    0.26335781662795e-22, -0.11947622640071e-22, 0.18228094581404e-23,
    -0.93537087292458e-25};

// IF97 Table 34: n_1..n_10 of the saturation-pressure equation (index 0 unused).
constexpr double kN4[11] = {0.0,
                            0.11670521452767e4,  -0.72421316703206e6,
                            -0.17073846940092e2, 0.12020824702470e5,
                            -0.32325550322333e7, 0.14915108613530e2,
                            -0.48232657361591e4, 0.40511340542057e6,
                            -0.23855557567849,   0.65017534844798e3};

// IAPWS 2008 viscosity, Table 1 (H_0..H_3) and Table 2 (nonzero H_ij).
constexpr double kH0[4] = {1.67752, 2.20462, 0.6366564, -0.241605};
struct Hij {
  int i, j;
  double h;
};
constexpr Hij kH1[21] = {
    {0, 0, 5.20094e-1},  {1, 0, 8.50895e-2},  {2, 0, -1.08374},
    {3, 0, -2.89555e-1}, {0, 1, 2.22531e-1},  {1, 1, 9.99115e-1},
    {2, 1, 1.88797},     {3, 1, 1.26613},     {5, 1, 1.20573e-1},
    {0, 2, -2.81378e-1}, {1, 2, -9.06851e-1}, {2, 2, -7.72479e-1},
    {3, 2, -4.89837e-1}, {4, 2, -2.57040e-1}, {0, 3, 1.61913e-1},
    {1, 3, 2.57399e-1},  {0, 4, -3.25372e-2}, {3, 4, 6.98452e-2},
    {4, 5, 8.72102e-3},  {3, 6, -4.35673e-3}, {5, 6, -5.93264e-4}};

// IAPWS 2011 thermal conductivity, Table 1 (L_0..L_4) and Table 2 (L_ij,
// i = 0..4 rows, j = 0..5 columns; L_34 = L_35 = 0).
constexpr double kL0[5] = {2.443221e-3, 1.323095e-2, 6.770357e-3, -3.454586e-3,
                           4.096266e-4};
constexpr double kL1[5][6] = {
    {1.60397357, -0.646013523, 0.111443906, 0.102997357, -0.0504123634, 0.00609859258},
    {2.33771842, -2.78843778, 1.53616167, -0.463045512, 0.0832827019, -0.00719201245},
    {2.19650529, -4.54580785, 3.55777244, -1.40944978, 0.275418278, -0.0205938816},
    {-1.21051378, 1.60812989, -0.621178141, 0.0716373224, 0.0, 0.0},
    {-2.7203370, 4.57586331, -3.18369245, 1.1168348, -0.19268305, 0.012913842}};

// p[k] = x^k for k = 0 .. N-1, by repeated multiplication.
template <typename S, int N>
void Powers(const S& x, S (&p)[N]) {
  p[0] = S(1.0);
  for (int k = 1; k < N; ++k) p[k] = p[k - 1] * x;
}

// γ and its derivatives of IF97 region 1 (pressure is not differentiated).
template <typename S>
struct Gamma1 {
  S g, gp, gpp, gt, gtt, gpt;
};

// b^j for j = -43 .. 17 (the region-1 exponents J and J - 2): one division,
// then multiplications.
template <typename S>
struct BPowers {
  static constexpr int kMin = -43, kMax = 17;
  S p[kMax - kMin + 1];
  explicit BPowers(const S& b) {
    p[-kMin] = S(1.0);
    for (int j = 1; j <= kMax; ++j) p[j - kMin] = p[j - 1 - kMin] * b;
    const S binv = S(1.0) / b;
    for (int j = -1; j >= kMin; --j) p[j - kMin] = p[j + 1 - kMin] * binv;
  }
  const S& operator()(int j) const { return p[j - kMin]; }
};

template <typename S>
Gamma1<S> Region1Gamma(double pi, const S& tau) {
  // Powers by table (one division, then multiplications): a^I for I = 0..32,
  // b^J for J = -43..17, instead of a power per term.
  Gamma1<S> r{S(0.0), S(0.0), S(0.0), S(0.0), S(0.0), S(0.0)};
  const double a = 7.1 - pi;
  double pa[33];
  Powers(a, pa);
  const BPowers<S> pb(tau - 1.222);
  for (int k = 0; k < 34; ++k) {
    const int I = kI1[k], J = kJ1[k];
    const double n = kN1[k];
    const double aI = pa[I];
    const S& bJ = pb(J);
    const S& bJ1 = pb(J - 1);  // b^(J-1)
    const S& bJ2 = pb(J - 2);  // b^(J-2)
    r.g += n * aI * bJ;
    r.gt += (n * aI * J) * bJ1;
    r.gtt += (n * aI * J * (J - 1)) * bJ2;
    if (I > 0) {
      const double aI1 = pa[I - 1];
      r.gp += (-n * I * aI1) * bJ;
      r.gpt += (-n * I * aI1 * J) * bJ1;
      if (I > 1) r.gpp += (n * I * (I - 1) * pa[I - 2]) * bJ;
    }
  }
  return r;
}

// Reduced temperature T/Tc and density rho/rhoc of IAPWS 2008 and 2011, and
// Tc/T.
template <typename S>
struct Reduced {
  S tr, dr, inv;
};

template <typename S>
Reduced<S> Reduce(const S& T, const S& rho) {
  const S tr = T / kTc;
  return {tr, rho / kRhoc, S(1.0) / tr};
}

template <typename S>
S Viscosity2008(const S& T, const S& rho) {
  using std::exp;
  using std::sqrt;
  const auto [tr, dr, inv] = Reduce(T, rho);
  const S mu0 = 100.0 * sqrt(tr) / (kH0[0] + kH0[1] * inv + kH0[2] * inv * inv +
                                    kH0[3] * inv * inv * inv);
  S pi[6], pj[7];
  Powers(inv - 1.0, pi);
  Powers(dr - 1.0, pj);
  S sum(0.0);
  for (const Hij& t : kH1) sum += t.h * pi[t.i] * pj[t.j];
  const S mu1 = exp(dr * sum);
  return 1e-6 * mu0 * mu1;
}

template <typename S>
S Conductivity2011(const S& T, const S& rho) {
  using std::exp;
  using std::sqrt;
  const auto [tr, dr, inv] = Reduce(T, rho);
  S den(0.0), invk(1.0);
  for (int k = 0; k < 5; ++k) {
    den += kL0[k] * invk;
    invk *= inv;
  }
  const S k0 = sqrt(tr) / den;
  S pi[5], pj[6];
  Powers(inv - 1.0, pi);
  Powers(dr - 1.0, pj);
  S sum(0.0);
  for (int i = 0; i < 5; ++i)
    for (int j = 0; j < 6; ++j)
      if (kL1[i][j] != 0.0) sum += kL1[i][j] * pi[i] * pj[j];
  const S k1 = exp(dr * sum);
  return 1e-3 * k0 * k1;
}

}  // namespace

double Iapws97SaturationPressure(double T_K) {
  const double T = std::clamp(std::isfinite(T_K) ? T_K : 273.15, 273.15, kTc);
  const double th = T + kN4[9] / (T - kN4[10]);
  const double A = th * th + kN4[1] * th + kN4[2];
  const double B = kN4[3] * th * th + kN4[4] * th + kN4[5];
  const double C = kN4[6] * th * th + kN4[7] * th + kN4[8];
  const double x = 2.0 * C / (-B + std::sqrt(B * B - 4.0 * A * C));
  return 1e6 * x * x * x * x;  // Eq. 30, MPa -> Pa
}

double Iapws97SaturationTemperature(double p_Pa) {
  const double p = std::clamp(std::isfinite(p_Pa) ? p_Pa : 1e5, kPsatMin, kPc);
  const double beta = std::pow(p * 1e-6, 0.25);
  const double E = beta * beta + kN4[3] * beta + kN4[6];
  const double F = kN4[1] * beta * beta + kN4[4] * beta + kN4[7];
  const double G = kN4[2] * beta * beta + kN4[5] * beta + kN4[8];
  const double D = 2.0 * G / (-F - std::sqrt(F * F - 4.0 * E * G));
  const double s = kN4[10] + D;
  return 0.5 * (s - std::sqrt(s * s - 4.0 * (kN4[9] + kN4[10] * D)));  // Eq. 31
}

Region1State Iapws97Region1(double T_K, double p_Pa) {
  const double pi = p_Pa / kPStar1, tau = kTStar1 / T_K;
  const Gamma1<double> g = Region1Gamma(pi, tau);
  Region1State s;
  s.v = pi * g.gp * kR * T_K / p_Pa;
  s.h = tau * g.gt * kR * T_K;
  s.u = kR * T_K * (tau * g.gt - pi * g.gp);
  s.s = kR * (tau * g.gt - g.g);
  s.cp = -kR * tau * tau * g.gtt;
  const double d = g.gp - tau * g.gpt;
  s.cv = kR * (-tau * tau * g.gtt + d * d / g.gpp);
  s.w = std::sqrt(kR * T_K * g.gp * g.gp / (d * d / (tau * tau * g.gtt) - g.gpp));
  return s;
}

double WaterViscosityIapws2008(double T_K, double rho) { return Viscosity2008(T_K, rho); }

double WaterConductivityIapws2011(double T_K, double rho) {
  return Conductivity2011(T_K, rho);
}

namespace {

// The state Evaluate uses: T clamped to the evaluation range, p to the
// liquid side (at least the saturation pressure) and below kPEvalMax.
void EvaluationState(double T_K, double p_abs_Pa, double* Tin, double* Tc, double* p) {
  *Tin = std::isfinite(T_K) ? T_K : 293.15;
  *Tc = std::clamp(*Tin, kTEvalMin, kTEvalMax);
  const double psat = Iapws97SaturationPressure(*Tc);
  const double pin = std::isfinite(p_abs_Pa) ? p_abs_Pa : 1e5;
  *p = std::clamp(pin, psat, kPEvalMax);
}

}  // namespace

namespace {

// Water's properties remembered per thread by the bits of (T, p): the
// thermal solve asks for the same states many times in a pass (every
// branch leaving a node, the enthalpy quadrature's points, the fluids handed
// to the hydraulics after a converged balance, the energy accounting) and
// the model has no parameters, so a remembered value is the value.
// Direct-mapped, 512 entries (library/memo.h).

FluidProps EvaluateWater(double T_K, double p_abs_Pa);

}  // namespace

double WaterFluid::SpecificHeat(double T_K, double p_abs_Pa) const {
  thread_local Memo<double> memo;
  return memo.Get({T_K, p_abs_Pa}, [&] { return Region1Cp(T_K, p_abs_Pa); });
}

FluidProps WaterFluid::Evaluate(double T_K, double p_abs_Pa) const {
  thread_local Memo<FluidProps> memo;
  return memo.Get({T_K, p_abs_Pa}, [&] { return EvaluateWater(T_K, p_abs_Pa); });
}

double WaterFluid::Region1Cp(double T_K, double p_abs_Pa) {
  double Tin, Tc, p;
  EvaluationState(T_K, p_abs_Pa, &Tin, &Tc, &p);
  // cp = -R tau^2 gamma_tautau ([1] Table 3), the one sum it needs: the
  // thermal solve asks for cp at every branch and pass.
  const double tau = kTStar1 / Tc, a = 7.1 - p / kPStar1, b = tau - 1.222;
  double pa[33];
  Powers(a, pa);
  const BPowers<double> pb(b);
  double gtt = 0.0;
  for (int k = 0; k < 34; ++k) gtt += kN1[k] * pa[kI1[k]] * kJ1[k] * (kJ1[k] - 1) * pb(kJ1[k] - 2);
  return -kR * tau * tau * gtt;
}

namespace {

FluidProps EvaluateWater(double T_K, double p_abs_Pa) {
  double Tin, Tc, p;
  EvaluationState(T_K, p_abs_Pa, &Tin, &Tc, &p);

  const Jet T(Tc, 0);
  const double pi = p / kPStar1;
  const Jet tau = kTStar1 / T;
  const Gamma1<Jet> g = Region1Gamma(pi, tau);
  const Jet v = pi * g.gp * kR * T / p;
  const Jet rho = 1.0 / v;
  const Jet cp = -kR * tau * tau * g.gtt;
  const Jet mu = Viscosity2008(T, rho);
  const Jet k = Conductivity2011(T, rho);

  FluidProps f;
  f.rho = rho.a;
  f.cp = cp.a;
  f.mu = mu.a;
  f.k = k.a;
  if (Tc == Tin) {
    f.drho_dT = rho.v[0];
    f.dcp_dT = cp.v[0];
    f.dmu_dT = mu.v[0];
    f.dk_dT = k.v[0];
  }
  return f;
}

}  // namespace

RangeReport WaterFluid::InRange(double T_K, double p_abs_Pa) const {
  RangeReport r;
  auto bar = [](double p) { return FormatNumber(p * 1e-5); };
  if (!std::isfinite(T_K) || T_K < kTMin || T_K > kTMax) {
    r.in_range = false;
    r.message = "water temperature " + FormatDegC(T_K) + " degC is outside the model's range " +
                FormatDegC(kTMin) + " .. " + FormatDegC(kTMax) + " degC";
    return r;
  }
  const double psat = Iapws97SaturationPressure(T_K);
  if (!std::isfinite(p_abs_Pa) || p_abs_Pa < psat) {
    r.in_range = false;
    r.message = "water pressure " + bar(p_abs_Pa) + " bar abs is below the saturation pressure " +
                bar(psat) + " bar abs at " + FormatDegC(T_K) +
                " degC: the water boils (the model covers liquid only)";
    return r;
  }
  if (p_abs_Pa > kPMax) {
    r.in_range = false;
    r.message = "water pressure " + bar(p_abs_Pa) + " bar abs is above the model's limit " +
                bar(kPMax) + " bar abs";
  }
  return r;
}

}  // namespace loopwright
