// Each component model, built through the registry as a case builds it,
// against a source outside the project: textbook equations evaluated by hand
// in the test, worked examples, chart readings and handbook laws. The
// correlations underneath (friction factor, fittings, IEC 60534 relation,
// orifice) are compared with python3-fluids in tests/components/*_fluids_test.py;
// here the component wrappers are tested: how parameters, openings,
// characteristics, leakage, slip, relief and bypass are turned into the law.
//
// Every check value names its source; "(from memory)" marks a recalled value
// or equation number; tolerances follow the printed digits of the source, or
// are near machine precision where the source is an exact equation.
// Parameter values are invented (demo-sized parts).
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <functional>
#include <map>
#include <memory>
#include <string>
#include <vector>

#include "components/component.h"
#include "components/registry.h"
#include "components/relief_valve.h"

namespace loopwright {
namespace {

constexpr double kG = 9.80665;           // standard gravity [m/s2] (CGPM 1901)
constexpr double kLpm = 1.0 / 60000.0;   // 1 L/min [m3/s]
constexpr double kRpm = 2.0 * M_PI / 60.0;
constexpr double kRho0 = 999.1026;       // water at 15 degC, IAPWS-95 [kg/m3] (see valve_iec60534.h)

double Rel(double a, double b) { return std::fabs(a - b) / std::fabs(b); }

using Rows = std::vector<std::vector<double>>;

struct Spec {
  std::map<std::string, double> numbers;
  std::map<std::string, std::string> choices = {};
  std::map<std::string, Rows> tables = {};
  std::map<std::string, std::vector<std::string>> names = {};
};

std::unique_ptr<Component> Make(const std::string& type, const Spec& s) {
  const ComponentType* t = FindComponentType(type);
  REQUIRE(t != nullptr);
  ParamValues v;
  v.tables.assign(t->params.size(), {});
  for (const auto& p : t->params) v.values.push_back(p.default_si);
  for (const auto& [n, x] : s.numbers) {
    const int i = t->ParamIndex(n);
    REQUIRE_MESSAGE(i >= 0, n);
    v.values[i] = x;
  }
  for (const auto& [n, c] : s.choices) {
    const int i = t->ParamIndex(n);
    REQUIRE_MESSAGE(i >= 0, n);
    const auto& ch = t->params[i].choices;
    const auto it = std::find(ch.begin(), ch.end(), c);
    REQUIRE(it != ch.end());
    v.values[i] = static_cast<double>(it - ch.begin());
  }
  for (const auto& [n, rows] : s.tables) {
    const int i = t->ParamIndex(n);
    REQUIRE_MESSAGE(i >= 0, n);
    v.tables[i] = rows;
    v.values[i] = 1.0;
  }
  for (const auto& [n, list] : s.names) {
    const int i = t->ParamIndex(n);
    REQUIRE_MESSAGE(i >= 0, n);
    const auto& ch = t->params[i].choices;
    for (const auto& name : list) {
      const auto it = std::find(ch.begin(), ch.end(), name);
      REQUIRE(it != ch.end());
      v.tables[i].push_back({static_cast<double>(it - ch.begin())});
    }
    v.values[i] = 1.0;
  }
  std::vector<ParamError> errors;
  auto c = t->make(v, &errors);
  REQUIRE_MESSAGE(c != nullptr, (errors.empty() ? std::string() : errors[0].message));
  return c;
}

double R0(const Component& c, double dp, double m, double rho, double mu, double x = 0.0) {
  double r[1 + kMaxInternal];
  double xs[kMaxInternal] = {x, 0.0};
  c.Evaluate(dp, m, rho, mu, xs, r);
  return r[0];
}

// A pressure-kind law r = loss(m) - dp: the loss at mass flow m.
double LossAt(const Component& c, double q, double rho, double mu) {
  REQUIRE(c.Kind(0) == ResidualKind::kPressure);
  REQUIRE(c.NumInternal() == 0);
  return R0(c, 0.0, rho * q, rho, mu);  // r = loss - dp (component.h), so r at dp = 0 is the loss
}

// A flow-kind law r = m/rho - Q(dp): the volumetric flow at dp.
double FlowAt(const Component& c, double dp, double rho, double mu) {
  REQUIRE(c.Kind(0) == ResidualKind::kVolumeFlow);
  REQUIRE(c.NumInternal() == 0);
  return -R0(c, dp, 0.0, rho, mu);
}

// A pump's head H [m] at volumetric flow q: its law is r = rho g H(q) + dp.
double PumpHead(const Component& c, double q, double rho, double mu) {
  const double h = R0(c, 0.0, rho * q, rho, mu) / (rho * kG);
  CHECK(std::fabs(R0(c, -rho * kG * h, rho * q, rho, mu)) <= 1e-12 * rho * kG * std::fabs(h));
  return h;
}

// Bisection for f(z) = 0 on a bracket [lo, hi] with a sign change.
double Bisect(const std::function<double(double)>& f, double lo, double hi) {
  double flo = f(lo);
  REQUIRE((flo < 0) != (f(hi) < 0));
  for (int i = 0; i < 3000; ++i) {
    const double mid = 0.5 * (lo + hi);
    if (!(mid > lo && mid < hi)) break;
    const double fm = f(mid);
    if (fm == 0) return mid;
    if ((fm < 0) == (flo < 0)) {
      lo = mid;
      flo = fm;
    } else {
      hi = mid;
    }
  }
  return 0.5 * (lo + hi);
}

// Colebrook (1939), in Darcy form 1/sqrt(f) = -2 log10(rr/3.7 + 2.51/(Re sqrt f)),
// solved here by bisection on x = 1/sqrt(f) (independent of the project's
// Newton solution in components/correlations/friction.h).
double ColebrookByBisection(double re, double rr) {
  auto g = [&](double x) { return x + 2.0 * std::log10(rr / 3.7 + 2.51 * x / re); };
  const double x = Bisect(g, 1.0, 100.0);
  return 1.0 / (x * x);
}

// ------------------------------------------------------------------- pipe

TEST_CASE("pipe, laminar: Hagen-Poiseuille dp = 128 mu L Q / (pi D^4), exact") {
  // Hagen-Poiseuille law for fully developed laminar flow in a round tube
  // (e.g. White, Fluid Mechanics, Eq. for Poiseuille flow; Moody 1944:
  // f = 64/Re). Churchill (1977) equals 64/Re to far below 1e-12 for
  // Re <= 1000, and laminar_colebrook is 64/Re below Re = 2300.
  const double L = 1.5, D = 0.006, rho = 870, mu = 0.04;
  double worst = 0;
  for (const char* method : {"churchill_1977", "laminar_colebrook"}) {
    auto pipe = Make("pipe", {{{"length", L}, {"diameter", D}}, {{"friction", method}}});
    for (double re : {1e-6, 1.0, 10.0, 153.8, 500.0, 1000.0}) {
      const double q = re * M_PI * D * mu / (4.0 * rho);
      const double hp = 128.0 * mu * L * q / (M_PI * std::pow(D, 4));
      const double dp = LossAt(*pipe, q, rho, mu);
      INFO(method << " Re " << re << ": dp " << dp << " vs Hagen-Poiseuille " << hp);
      CHECK(Rel(dp, hp) <= 1e-12);
      CHECK(Rel(LossAt(*pipe, -q, rho, mu), -hp) <= 1e-12);
      worst = std::max(worst, Rel(dp, hp));
    }
  }
  MESSAGE("Hagen-Poiseuille: worst relative error " << worst);
}

TEST_CASE("pipe, turbulent: Darcy-Weisbach with Colebrook at a Moody-chart point and a worked example") {
  const double rho = 900.0;
  // (1) Moody chart (Moody 1944, Fig. 1), Re = 1e5, eps/D = 1e-4: f = 0.0185
  //     read off the chart to about +-0.0005 (reading from memory). The
  //     component's f (backed out of its dp by Darcy-Weisbach,
  //     f = dp 2 D / (L rho V^2)) is also checked against the Colebrook
  //     equation solved independently here, to 1e-12.
  {
    const double D = 0.05, L = 10.0, mu = 1e-3, re = 1e5, rr = 1e-4;
    auto pipe = Make("pipe", {{{"length", L}, {"diameter", D}, {"roughness", rr * D}}, {{"friction", "colebrook_1939"}}});
    const double v = re * mu / (rho * D);
    const double q = v * M_PI * D * D / 4.0;
    const double f = LossAt(*pipe, q, rho, mu) * 2.0 * D / (L * rho * v * v);
    const double f_cb = ColebrookByBisection(re, rr);
    INFO("f = " << f << ", Colebrook by bisection " << f_cb);
    CHECK(Rel(f, f_cb) <= 1e-12);
    CHECK(std::fabs(f - 0.0185) <= 0.0005);
    MESSAGE("Moody point Re 1e5, eps/D 1e-4: f = " << f << " (chart 0.0185); rel. error vs Colebrook "
                                                   << Rel(f, f_cb));
    // Churchill (1977) against Colebrook in turbulent flow: within 1-2 %
    // (accuracy survey of Winning & Coole 2013, as cited by python3-fluids;
    // a rule of thumb, common practice).
    auto ch = Make("pipe", {{{"length", L}, {"diameter", D}, {"roughness", rr * D}}});
    const double f_ch = LossAt(*ch, q, rho, mu) * 2.0 * D / (L * rho * v * v);
    CHECK(Rel(f_ch, f_cb) <= 0.02);
  }
  // (2) Worked example (F. M. White, "Fluid Mechanics", 5th ed., McGraw-Hill,
  //     2003, ch. 6, the oil-in-cast-iron-pipe head-loss example; example
  //     number and values from memory): oil rho = 900 kg/m3, nu = 1e-5 m2/s,
  //     Q = 0.2 m3/s through L = 500 m of D = 200 mm cast iron, eps =
  //     0.26 mm: Re = 128,000, eps/D = 0.0013, f = 0.0227, h_f = 117 m.
  {
    const double D = 0.2, L = 500.0, q = 0.2, nu = 1e-5, eps = 0.26e-3;
    auto pipe = Make("pipe", {{{"length", L}, {"diameter", D}, {"roughness", eps}}, {{"friction", "colebrook_1939"}}});
    const double dp = LossAt(*pipe, q, rho, nu * rho);
    const double v = q / (M_PI * D * D / 4.0);
    const double f = dp * 2.0 * D / (L * rho * v * v);
    const double hf = dp / (rho * kG);
    INFO("f = " << f << ", h_f = " << hf << " m");
    CHECK(std::fabs(f - 0.0227) <= 0.00005);
    CHECK(std::fabs(hf - 117.0) <= 0.5);
    CHECK(Rel(f, ColebrookByBisection(v * D / nu, eps / D)) <= 1e-12);
    MESSAGE("White oil-pipe example: f = " << f << " (0.0227), h_f = " << hf << " m (117 m)");
  }
}

TEST_CASE("pipe: fittings add K rho V^2/2 with K from Hooper's 2-K and Darby's 3-K equations") {
  // Hooper (1981): K = K1/Re + Kinf (1 + 1/D_in); Darby (2001):
  // K = K1/Re + Ki (1 + Kd/D_in^0.3); the long-radius 90 deg elbow constants
  // are those of their tables (Hooper: K1 = 800, Kinf = 0.20; Darby: K1 = 800,
  // Ki = 0.071, Kd = 4.2), as copied in python3-fluids (fittings.Hooper,
  // fittings.Darby). A constant K (Crane TP-410, sharp entrance K = 0.5, from
  // memory) adds 0.5 rho V^2/2. Laminar pipe friction is Hagen-Poiseuille.
  const double L = 1.0, D = 0.01, rho = 870, mu = 0.02, q = 10 * kLpm;
  const double a = M_PI * D * D / 4, v = q / a, re = rho * v * D / mu, din = D / 0.0254;
  const double hp = 128.0 * mu * L * q / (M_PI * std::pow(D, 4));
  const double head = rho * v * v / 2;
  const double k_hooper = 800.0 / re + 0.20 * (1.0 + 1.0 / din);
  const double k_darby = 800.0 / re + 0.071 * (1.0 + 4.2 / std::pow(din, 0.3));
  REQUIRE(re < 1000);  // laminar friction exactly 64/Re
  auto hooper = Make("tube", {{{"length", L}, {"diameter", D}}, {}, {}, {{"fittings", {"elbow_90_long_radius", "entrance_sharp"}}}});
  auto darby = Make("tube", {{{"length", L}, {"diameter", D}}, {{"fitting_method", "darby_3k"}}, {},
                             {{"fittings", {"elbow_90_long_radius"}}}});
  auto rows = Make("tube", {{{"length", L}, {"diameter", D}, {"minor_k", 0.5}}, {}, {{"hooper_fittings", {{2, 800, 0.20}}}}});
  const double e1 = Rel(LossAt(*hooper, q, rho, mu), hp + (k_hooper + 0.5) * head);
  const double e2 = Rel(LossAt(*darby, q, rho, mu), hp + k_darby * head);
  const double e3 = Rel(LossAt(*rows, q, rho, mu), hp + (2 * k_hooper + 0.5) * head);
  CHECK(e1 <= 1e-12);
  CHECK(e2 <= 1e-12);
  CHECK(e3 <= 1e-12);
  MESSAGE("fittings: worst relative error " << std::max({e1, e2, e3}));
}

// ---------------------------------------------------------- journal bearing

TEST_CASE("journal_bearing: side flow equals Shigley's pressure-fed formula, evaluated by hand") {
  // R. G. Budynas, J. K. Nisbett, "Shigley's Mechanical Engineering Design",
  // 9th ed., 2011, Sec. 12-9, Eq. (12-22) (equation number from memory):
  //   Q_s = pi p_s r c^3 (1 + 1.5 eps^2) / (3 mu l')
  // Worked by hand (invented bearing): D = 30 mm (r = 0.015 m), L = 20 mm,
  // groove 4 mm (l' = 8 mm), c = 50 um, eps = 0.6, p_s = 2 bar, mu = 0.02 Pa.s:
  //   c^3 = 1.25e-13 m3; pi p_s r c^3 = pi x 3.75e-10 = 1.178097e-9;
  //   x (1 + 1.5 x 0.36) = x 1.54 -> 1.814270e-9;
  //   3 mu l' = 3 x 0.02 x 0.008 = 4.8e-4;  Q_s = 3.779729e-6 m3/s
  //   (0.2268 L/min). Seven digits printed: tolerance 5e-7 relative.
  auto jb = Make("journal_bearing", {{{"diameter", 0.030}, {"length", 0.020}, {"groove_width", 0.004},
                                      {"radial_clearance", 50e-6}, {"eccentricity", 0.6}}});
  const double rho = 860, mu = 0.02;
  const double q = FlowAt(*jb, 2e5, rho, mu);
  CHECK(Rel(q, 3.779729e-6) <= 5e-7);
  // Scalings of the same formula: c^3, (1 + 1.5 eps^2), 1/mu, p_s; and the
  // reverse flow when the housing is above the feed (odd in p_s).
  auto jb2 = Make("journal_bearing", {{{"diameter", 0.030}, {"length", 0.020}, {"groove_width", 0.004},
                                       {"radial_clearance", 100e-6}, {"eccentricity", 0.0}}});
  CHECK(Rel(FlowAt(*jb2, 2e5, rho, mu), q * 8.0 / 1.54) <= 1e-14);
  CHECK(Rel(FlowAt(*jb, 2e5, rho, 2 * mu), q / 2) <= 1e-14);
  CHECK(Rel(FlowAt(*jb, -1e5, rho, mu), -q / 2) <= 1e-14);
  MESSAGE("Shigley Eq. (12-22) worked set: Q_s = " << q << " m3/s vs 3.779729e-6, rel. error "
                                                   << Rel(q, 3.779729e-6));
}

// ------------------------------------------------------- displacement pump

TEST_CASE("displacement_pump: Q = D n - C_s dP / mu; the internal relief lifts above its crack") {
  // Merritt, "Hydraulic Control Systems", 1967, ch. 7 (from memory): delivery
  // = displacement x speed - laminar leakage C_s dP / mu; volumetric
  // efficiency eta_v at a rated point fixes C_s = (1 - eta_v) D n mu_r / dP_r.
  // Hydraulic (ideal) shaft power D n dP / eta_m (torque D dP / 2 pi).
  const double disp = 8e-6, n = 1450 * kRpm, rho = 870;
  const double qg = disp * n / (2 * M_PI);  // 1.9333e-4 m3/s = 11.6 L/min
  auto pump = Make("displacement_pump", {{{"displacement", disp}, {"speed", n}, {"volumetric_efficiency", 0.93},
                                          {"rated_pressure_rise", 7e5}, {"rated_viscosity", 0.028},
                                          {"rated_speed", n}, {"relief_crack", 10e5}, {"relief_full", 12e5}}});
  // Rated point: Q = eta_v D n.
  CHECK(Rel(FlowAt(*pump, -7e5, rho, 0.028), 0.93 * qg) <= 1e-13);
  // Another point by Q = D n - C_s dP/mu: dP = 3 bar, mu = 0.014:
  // slip = 0.07 qg (3/7)(0.028/0.014) = 0.06 qg.
  CHECK(Rel(FlowAt(*pump, -3e5, rho, 0.014), 0.94 * qg) <= 1e-13);
  // Zero rise: the geometric flow (relief closed: its smooth tail is
  // w ln(1 + e^-(p_c/w)), w = 0.02 (p_f - p_c), far below 1e-15 qg).
  CHECK(Rel(FlowAt(*pump, 0.0, rho, 0.028), qg) <= 1e-13);
  // Relief: below crack by 25 w (= 1 bar) the relief passes < 1e-10 qg;
  // midway between crack and full it passes half its rated flow (default =
  // geometric flow); at full it passes its rated flow (linear override
  // characteristic, Merritt ch. 7, from memory).
  auto no_relief = Make("displacement_pump", {{{"displacement", disp}, {"speed", n}, {"volumetric_efficiency", 0.93},
                                               {"rated_pressure_rise", 7e5}, {"rated_viscosity", 0.028},
                                               {"rated_speed", n}}});
  auto relief_flow = [&](double rise) {
    return FlowAt(*no_relief, -rise, rho, 0.028) - FlowAt(*pump, -rise, rho, 0.028);
  };
  CHECK(std::fabs(relief_flow(9e5)) <= 1e-10 * qg);
  CHECK(Rel(relief_flow(11e5), 0.5 * qg) <= 1e-9);
  CHECK(Rel(relief_flow(12e5), qg) <= 1e-12);
  CHECK(Rel(relief_flow(13e5), 1.5 * qg) <= 1e-12);
  // Shaft power reported by Describe: D n dP / eta_m with eta_m = 0.85
  // (the default).
  BranchResult b;
  b.dp = -5e5;
  b.rho = rho;
  b.mu = 0.028;
  b.m = rho * FlowAt(*pump, b.dp, rho, b.mu);
  ComponentReport rep;
  pump->Describe(b, &rep);
  CHECK(Rel(rep.shaft_power_W, qg * 5e5 / 0.85) <= 1e-13);
  CHECK(rep.warnings.empty());  // 0.028 / 870 = 32 cSt: laminar slip
  // The same pump at 3.45 cSt (mu 0.003 Pa s, rho 870; a VG32 turbine oil near 145
  // degC, ASTM D341 from its 40/100 degC points): below the 5 cSt where the
  // header says the laminar law stops holding, one warning naming it; the
  // volumetric efficiency there, 1 - 0.07 (5/7)(0.028/0.003) = 0.5333, is
  // the Merritt law's value worked by hand above.
  b.mu = 0.003;
  b.m = rho * FlowAt(*pump, b.dp, rho, b.mu);
  ComponentReport thin;
  pump->Describe(b, &thin);
  REQUIRE(thin.warnings.size() == 1);
  CHECK(thin.warnings[0].find("3.45 cSt, below 5 cSt") != std::string::npos);
  CHECK(thin.warnings[0].find("volumetric efficiency 0.533") != std::string::npos);
  // Slip given directly: C_s = 1e-13 m3, dP = 4 bar, mu = 0.02: slip = 2e-6 m3/s.
  auto slip = Make("displacement_pump", {{{"displacement", disp}, {"speed", n}, {"slip", 1e-13}}});
  CHECK(Rel(FlowAt(*slip, -4e5, rho, 0.02), qg - 2e-6) <= 1e-13);
}

TEST_CASE("displacement_pump: the laminar slip does not change with a bound speed") {
  // Merritt 1967 ch. 7 (from memory): leakage C_s dP / mu through the gear
  // clearances is a laminar pressure flow, independent of shaft speed. With
  // eta_v = 0.93 rated at 1450 rpm, 7 bar, 28 mPa s the slip is
  // 0.07 x D x 1450 rpm at that dP and mu, at any running speed; binding the
  // speed to twice the rated (as an envelope variable does, through
  // params()) doubles the geometric flow and leaves the slip alone, so the
  // volumetric efficiency rises to 1 - 0.07/2 = 0.965.
  const double disp = 8e-6, n_r = 1450 * kRpm, rho = 870, mu = 0.028;
  const double qg_r = disp * n_r / (2 * M_PI);
  auto pump = Make("displacement_pump", {{{"displacement", disp}, {"speed", n_r}, {"volumetric_efficiency", 0.93},
                                          {"rated_pressure_rise", 7e5}, {"rated_viscosity", mu},
                                          {"rated_speed", n_r}}});
  const int speed = FindComponentType("displacement_pump")->ParamIndex("speed");
  for (double k : {0.5, 1.0, 2.0, 3.0}) {
    pump->params()[speed] = k * n_r;
    const double slip = k * qg_r - FlowAt(*pump, -7e5, rho, mu);
    INFO("speed " << k << " x rated");
    CHECK(Rel(slip, 0.07 * qg_r) <= 1e-12);
    CHECK(Rel(FlowAt(*pump, -7e5, rho, mu) / (k * qg_r), 1.0 - 0.07 / k) <= 1e-12);
  }
  // Without its rated speed a volumetric efficiency is refused: it would be
  // read at whatever speed the point runs.
  const ComponentType* t = FindComponentType("displacement_pump");
  ParamValues v;
  v.values.assign(t->params.size(), kNoValue);
  v.tables.assign(t->params.size(), {});
  for (size_t i = 0; i < t->params.size(); ++i) v.values[i] = t->params[i].default_si;
  v.values[t->ParamIndex("displacement")] = disp;
  v.values[t->ParamIndex("speed")] = n_r;
  v.values[t->ParamIndex("volumetric_efficiency")] = 0.93;
  v.values[t->ParamIndex("rated_pressure_rise")] = 7e5;
  v.values[t->ParamIndex("rated_viscosity")] = mu;
  std::vector<ParamError> errors;
  CHECK(t->make(v, &errors) == nullptr);
  REQUIRE(errors.size() == 1);
  CHECK(errors[0].param == "volumetric_efficiency");
  CHECK(errors[0].message.find("rated_speed") != std::string::npos);
}

// ------------------------------------------------------------------ filter

// Filter at volumetric flow q: element drop x (solved), total dp, and the
// Describe() report.
struct FilterState {
  double x, dp;
  ComponentReport rep;
};
FilterState SolveFilter(const Component& f, double q, double rho, double mu) {
  const double m = rho * q;
  auto r1 = [&](double x) {
    double r[2];
    double xs[2] = {x, 0};
    f.Evaluate(0.0, m, rho, mu, xs, r);
    return r[1];
  };
  FilterState s;
  s.x = Bisect(r1, -1e9, 1e9);
  s.dp = R0(f, 0.0, m, rho, mu, s.x);  // r0 = housing + x - dp
  BranchResult b;
  b.dp = s.dp;
  b.m = m;
  b.rho = rho;
  b.mu = mu;
  b.x[0] = s.x;
  f.Describe(b, &s.rep);
  return s;
}
double Item(const ComponentReport& r, const std::string& key) {
  for (const auto& it : r.items)
    if (it.key == key) return it.value;
  FAIL("no report item " << key);
  return 0;
}

TEST_CASE("filter: element drop ~ mu Q, housing drop ~ rho Q^2, clogging, bypass closed below crack") {
  // Darcy (1856): flow through a porous medium proportional to the pressure
  // gradient over mu; ISO 3968:2017: element and housing drops are measured
  // separately, the element drop proportional to viscosity and the housing
  // drop to density x flow^2 (an orifice-like loss).
  const double qr = 20 * kLpm, rho_r = 870, nu_r = 32e-6;
  Spec s{{{"rated_flow", qr}, {"element_dp", 0.25e5}, {"rated_viscosity", nu_r}, {"housing_dp", 0.05e5},
          {"bypass_crack", 1.7e5}, {"bypass_full", 2.2e5}}};
  auto f = Make("filter", s);
  // The datasheet point is reproduced.
  FilterState a = SolveFilter(*f, qr, rho_r, nu_r * rho_r);
  CHECK(Rel(Item(a.rep, "element_dp"), 0.25e5) <= 1e-12);
  CHECK(Rel(Item(a.rep, "housing_dp"), 0.05e5) <= 1e-10);
  CHECK(std::fabs(Item(a.rep, "bypass_fraction")) <= 1e-12);
  // Element ~ mu (at the same flow), housing unchanged by mu.
  FilterState b = SolveFilter(*f, qr, rho_r, 3 * nu_r * rho_r);
  CHECK(Rel(Item(b.rep, "element_dp"), 3 * 0.25e5) <= 1e-12);
  CHECK(Rel(Item(b.rep, "housing_dp"), 0.05e5) <= 1e-10);
  // Housing ~ rho Q^2; element ~ Q at fixed mu.
  const double mu = nu_r * rho_r;
  FilterState c = SolveFilter(*f, 0.5 * qr, 1000.0, mu);
  CHECK(Rel(Item(c.rep, "housing_dp"), 0.05e5 * (1000.0 / rho_r) * 0.25) <= 1e-10);
  CHECK(Rel(Item(c.rep, "element_dp"), 0.5 * 0.25e5) <= 1e-12);
  // Clogging c multiplies the element drop (clean 1, dirty c).
  Spec sc = s;
  sc.numbers["clogging"] = 4.0;
  auto fc = Make("filter", sc);
  FilterState d = SolveFilter(*fc, qr, rho_r, mu);
  CHECK(Rel(Item(d.rep, "element_dp"), 4 * 0.25e5) <= 1e-12);
  CHECK(std::fabs(Item(d.rep, "bypass_fraction")) <= 1e-12);  // 1.0 bar < 1.7 bar crack
  // Above crack the bypass opens: clogging 10 puts the clean-equivalent
  // drop at 2.5 bar > 1.7 bar; the element drop settles between crack and
  // full open, the bypass passes the rest (flow balance exact).
  sc.numbers["clogging"] = 10.0;
  auto fo = Make("filter", sc);
  FilterState o = SolveFilter(*fo, qr, rho_r, mu);
  const double x = Item(o.rep, "element_dp");
  CHECK(x > 1.7e5);
  CHECK(x < 2.2e5);
  CHECK(Item(o.rep, "bypass_fraction") > 0.05);
  CHECK(Rel(Item(o.rep, "media_flow") + Item(o.rep, "bypass_flow"), qr) <= 1e-12);
  CHECK(Rel(Item(o.rep, "media_flow"), x / (10 * 0.25e5) * qr) <= 1e-12);  // Darcy: Q_e = x / (a mu c)
  // The bypass flow at full open equals its rated flow (default rated_flow):
  // at 3 bar element drop (beyond full) it passes (3 - 1.7)/(2.2 - 1.7) Q_r.
  double r[2], xs[2] = {3e5, 0};
  fo->Evaluate(0.0, 0.0, rho_r, mu, xs, r);
  const double qb = -r[1] - 3e5 / (10 * 0.25e5) * qr;  // r1 = q - Q_e - Q_b with q = 0
  CHECK(Rel(qb, (3e5 - 1.7e5) / (2.2e5 - 1.7e5) * qr) <= 1e-12);
}

// ---------------------------------------------------------- datasheet_loss

TEST_CASE("datasheet_loss reproduces its rated points; viscous part ~ mu, inertial part ~ rho") {
  // Idelchik, "Handbook of Hydraulic Resistance", 1994, ch. 1: a passage's
  // loss as a laminar part (~ mu Q) plus a quadratic part (~ rho Q^2).
  // Points invented from a = 1e9 1/m3, b = 1e11 1/m4 at nu = 32 cSt,
  // rho = 870, so the fit must recover them.
  const double nu = 32e-6, rho = 870, mu = nu * rho, a = 1e9, b = 1e11;
  Rows pts;
  for (double q : {1e-4, 2e-4, 4e-4, 6e-4}) pts.push_back({q, a * mu * q + b * rho * q * q});
  auto d = Make("datasheet_loss", {{{"rated_viscosity", nu}}, {}, {{"points", pts}}});
  double worst = 0;
  for (const auto& p : pts) worst = std::max(worst, Rel(LossAt(*d, p[0], rho, mu), p[1]));
  CHECK(worst <= 1e-10);
  // At twice the viscosity only the viscous part doubles; at 1000 kg/m3 the
  // inertial part scales by 1000/870.
  CHECK(Rel(LossAt(*d, 3e-4, rho, 2 * mu), 2 * a * mu * 3e-4 + b * rho * 9e-8) <= 1e-10);
  CHECK(Rel(LossAt(*d, 3e-4, 1000.0, mu), a * mu * 3e-4 + b * 1000.0 * 9e-8) <= 1e-10);
  // Purely quadratic points (a turbulent coupling): a = 0 is recovered.
  Rows quad;
  for (double q : {1e-4, 3e-4, 5e-4}) quad.push_back({q, b * rho * q * q});
  auto dq = Make("datasheet_loss", {{{"rated_viscosity", nu}}, {}, {{"points", quad}}});
  for (const auto& p : quad) CHECK(Rel(LossAt(*dq, p[0], rho, mu), p[1]) <= 1e-10);
  // Rated form: rated_dp at rated_flow and rated viscosity; laminar_fraction
  // f = 0.3 of it scales with mu.
  auto dr = Make("datasheet_loss", {{{"rated_flow", 40 * kLpm}, {"rated_dp", 0.45e5}, {"laminar_fraction", 0.3},
                                     {"rated_viscosity", nu}, {"rated_density", rho}}});
  CHECK(Rel(LossAt(*dr, 40 * kLpm, rho, mu), 0.45e5) <= 1e-13);
  CHECK(Rel(LossAt(*dr, 40 * kLpm, rho, 2 * mu), 0.45e5 * 1.3) <= 1e-13);
  // air_cooler's oil side follows the same datasheet relation, checked in
  // closed form away from the rated point: at 25 L/min and 1.7 x the rated
  // viscosity, dp = 0.45 bar (0.3 x (25/40) x 1.7 + 0.7 x (25/40)^2).
  auto ac = Make("air_cooler", {{{"rated_flow", 40 * kLpm}, {"rated_dp", 0.45e5}, {"laminar_fraction", 0.3},
                                 {"rated_viscosity", nu}, {"rated_density", rho}, {"conductance", 200.0},
                                 {"air_flow", 0.5}}});
  const double closed = 0.45e5 * (0.3 * (25.0 / 40.0) * 1.7 + 0.7 * (25.0 / 40.0) * (25.0 / 40.0));
  CHECK(Rel(LossAt(*ac, 25 * kLpm, rho, 1.7 * mu), closed) <= 1e-13);
  CHECK(Rel(LossAt(*dr, 25 * kLpm, rho, 1.7 * mu), closed) <= 1e-13);
  MESSAGE("datasheet points: worst relative error " << worst);
}

// -------------------------------------------------------- centrifugal pump

TEST_CASE("centrifugal_pump: datasheet curve reproduced; affinity laws Q ~ n, H ~ n^2, P ~ n^3") {
  // Karassik et al., "Pump Handbook", 4th ed., 2008, Sec. 2.1 (from memory):
  // for the same impeller at similar points Q2/Q1 = n2/n1, H2/H1 = (n2/n1)^2,
  // P2/P1 = (n2/n1)^3. Curve invented (three points: the fitted quadratic
  // passes through them).
  const double nr = 2900 * kRpm, rho = 998, mu = 1e-3;
  const Rows curve = {{0, 20}, {30 * kLpm, 17}, {60 * kLpm, 8}};
  const Rows eff = {{10 * kLpm, 0.3}, {35 * kLpm, 0.55}, {60 * kLpm, 0.45}};
  auto at = [&](double n) { return Make("centrifugal_pump", {{{"speed", n}, {"rated_speed", nr}}, {}, {{"curve", curve}, {"efficiency", eff}}}); };
  auto p1 = at(nr);
  double worst = 0;
  for (const auto& row : curve) {
    const double h = PumpHead(*p1, row[0], rho, mu);
    CHECK(std::fabs(h - row[1]) <= 1e-12 * 20);
    worst = std::max(worst, std::fabs(h - row[1]) / 20);
  }
  for (double s : {0.5, 0.8, 1.2}) {
    auto p2 = at(s * nr);
    for (double q : {5 * kLpm, 25 * kLpm, 50 * kLpm}) {
      const double h1 = PumpHead(*p1, q, rho, mu);
      const double h2 = PumpHead(*p2, s * q, rho, mu);
      CHECK(Rel(h2, s * s * h1) <= 1e-12);
      worst = std::max(worst, Rel(h2, s * s * h1));
      ComponentReport r1, r2;
      BranchResult b1, b2;
      b1.rho = b2.rho = rho;
      b1.mu = b2.mu = mu;
      b1.m = rho * q;
      b1.dp = -rho * kG * h1;
      b2.m = rho * s * q;
      b2.dp = -rho * kG * h2;
      p1->Describe(b1, &r1);
      p2->Describe(b2, &r2);
      CHECK(Rel(r2.shaft_power_W, s * s * s * r1.shaft_power_W) <= 1e-12);
    }
  }
  MESSAGE("centrifugal pump curve and affinity laws: worst relative error " << worst);
}

// ------------------------------------------------------------------- valve

TEST_CASE("valve: IEC 60534 Kv relation Q = Kv sqrt(dp / (rho/rho0)) at full opening; opening, "
          "characteristic and leakage") {
  // IEC 60534-2-1:2011 Eq. (1) (non-choked turbulent liquid), in its own
  // units Q [m3/h] = Kv sqrt(dp [bar] / (rho/rho0)), rho0 = water at 15 degC
  // (Kv definition: water flow in m3/h at 1 bar). Without a valve size the
  // Reynolds-number factor is 1 (as python3-fluids without diameters).
  const double kvs = 2.5;
  auto open = Make("valve", {{{"kvs", kvs}, {"opening", 1.0}}});
  // Definition: water at rho0, Q = Kv m3/h -> dp = 1 bar.
  CHECK(Rel(LossAt(*open, kvs / 3600.0, kRho0, 1.1e-3), 1e5) <= 1e-13);
  // Oil: Q = 1.8 m3/h, rho 870: dp = (870/rho0)(1.8/2.5)^2 bar.
  const double dp_oil = (870.0 / kRho0) * std::pow(1.8 / kvs, 2) * 1e5;
  CHECK(Rel(LossAt(*open, 1.8 / 3600.0, 870.0, 0.03), dp_oil) <= 1e-13);
  CHECK(Rel(LossAt(*open, -1.8 / 3600.0, 870.0, 0.03), -dp_oil) <= 1e-13);
  // With a size, water at a high valve Reynolds number: F_R = 1, the same dp.
  auto sized = Make("valve", {{{"kvs", kvs}, {"opening", 1.0}, {"size", 0.015}}});
  CHECK(Rel(LossAt(*sized, kvs / 3600.0, kRho0, 1.1e-3), 1e5) <= 1e-12);
  // ...and viscous oil lowers F_R below 1: a larger drop for the same flow.
  CHECK(LossAt(*sized, 0.05 / 3600.0, 870.0, 0.3) > 1.01 * (870.0 / kRho0) * std::pow(0.05 / kvs, 2) * 1e5);
  // Inherent characteristics (IEC 60534-2-4:2009, from memory): Kv/Kvs =
  // x (linear), R^(x-1) (equal percentage, R = 50), sqrt(x) (quick opening),
  // each on top of the seat leakage: Kv = Kvs (leak + (1 - leak) phi).
  const double leak = 1e-4;
  auto kv_at = [&](const char* ch, double x) {
    auto v = Make("valve", {{{"kvs", kvs}, {"opening", x}}, {{"characteristic", ch}}});
    // Kv from the drop of water at 1 m3/h: dp[bar] = (1/Kv)^2.
    return 1.0 / std::sqrt(LossAt(*v, 1.0 / 3600.0, kRho0, 1.1e-3) / 1e5);
  };
  CHECK(Rel(kv_at("linear", 0.5), kvs * (leak + (1 - leak) * 0.5)) <= 1e-13);
  CHECK(Rel(kv_at("equal_percentage", 0.5), kvs * (leak + (1 - leak) * std::pow(50.0, -0.5))) <= 1e-13);
  CHECK(Rel(kv_at("equal_percentage", 0.8), kvs * (leak + (1 - leak) * std::pow(50.0, -0.2))) <= 1e-13);
  CHECK(Rel(kv_at("quick_opening", 0.25), kvs * (leak + (1 - leak) * 0.5)) <= 1e-13);
  // Closed: the seat leakage, default 0.01 % of rated capacity (IEC 60534-4 /
  // ANSI/FCI 70-2 Class IV, from memory): Kv = 1e-4 Kvs.
  CHECK(Rel(kv_at("linear", 0.0), kvs * leak) <= 1e-13);
  auto tight = Make("valve", {{{"kvs", kvs}, {"opening", 0.0}, {"leakage", 1e-6}}});
  CHECK(Rel(1.0 / std::sqrt(LossAt(*tight, 1.0 / 3600.0, kRho0, 1.1e-3) / 1e5), kvs * 1e-6) <= 1e-12);
}

// ---------------------------------------------------- relief, check valves

TEST_CASE("relief_valve: lift linear from crack to full open, orifice flow at every lift, rho^-1/2") {
  // Merritt 1967, Sec. 9 (from memory): a spring-loaded poppet lifts in
  // proportion to the pressure over cracking (spring force balance) from
  // crack to full lift; the open seat is an orifice, Q = Cd A(lift)
  // sqrt(2 dp / rho) (IEC 60534-2-1 Eq. (1) in Kv form at a fixed opening),
  // with A proportional to lift. Closed form, for rated flow Q_r at the
  // full-open pressure p_f and rated density rho_r:
  //   Q = Q_r t sqrt(dp / p_f) sqrt(rho_r / rho),  t = (dp - p_c)/(p_f - p_c),
  // exact for 0.1 <= t <= 0.9; the corners are rounded over 10 % of the band
  // each, by at most 16/81 x 0.1 of full lift.
  const double pc = 5.5e5, pf = 6.5e5, qr = 30 * kLpm, rho_r = 870;
  auto rv = Make("relief_valve", {{{"crack", pc}, {"full_open", pf}, {"rated_flow", qr}}});
  auto closed = [&](double dp, double rho) {
    const double t = std::min(1.0, std::max(0.0, (dp - pc) / (pf - pc)));
    return qr * t * std::sqrt(dp / pf * rho_r / rho);
  };
  CHECK(FlowAt(*rv, pc, rho_r, 0.03) == 0.0);
  CHECK(FlowAt(*rv, -2e5, rho_r, 0.03) == 0.0);
  CHECK(Rel(FlowAt(*rv, pf, rho_r, 0.03), qr) <= 1e-14);
  // A quarter of the band: 0.25 Q_r sqrt(5.75/6.5) = 7.05 L/min (the S-curve
  // it replaces gave 2.9 L/min there).
  const double quarter = pc + 0.25 * (pf - pc);
  CHECK(Rel(FlowAt(*rv, quarter, rho_r, 0.03), 0.25 * qr * std::sqrt(quarter / pf)) <= 1e-14);
  MESSAGE("relief valve at a quarter of its band: " << FlowAt(*rv, quarter, rho_r, 0.03) / kLpm << " L/min of " << 30);
  double worst_corner = 0;
  for (int i = 1; i < 200; ++i) {
    const double dp = pc + (pf - pc) * i / 200.0, t = (dp - pc) / (pf - pc);
    const double q = FlowAt(*rv, dp, rho_r, 0.03), ref = closed(dp, rho_r);
    if (t >= 0.1 && t <= 0.9) {
      INFO("t = " << t);
      CHECK(Rel(q, ref) <= 1e-13);
    } else {
      // Corner rounding: lift within 16/81 x 0.1 of the straight line.
      const double lift_err = std::fabs(q - ref) / (qr * std::sqrt(dp / pf));
      worst_corner = std::max(worst_corner, lift_err);
      CHECK(lift_err <= 16.0 / 81.0 * 0.1 + 1e-12);
    }
  }
  MESSAGE("relief valve: largest lift departure in the rounded corners " << worst_corner << " of full lift");
  // Beyond full open: the fixed orifice of full lift, Q ~ sqrt(dp / rho).
  CHECK(Rel(FlowAt(*rv, 9e5, rho_r, 0.03), qr * std::sqrt(9.0 / 6.5)) <= 1e-14);
  // Density: water (998 kg/m3) through the oil-rated valve passes
  // sqrt(870/998) of the flow at any lift, as an orifice does.
  for (double dp : {quarter, 6.2e5, 9e5})
    CHECK(Rel(FlowAt(*rv, dp, 998.0, 1e-3), FlowAt(*rv, dp, rho_r, 0.03) * std::sqrt(870.0 / 998.0)) <= 1e-14);
  // Rated with water: rated_flow at full open for rho = rated_density.
  auto rw = Make("relief_valve", {{{"crack", pc}, {"full_open", pf}, {"rated_flow", qr}, {"rated_density", 998.0}}});
  CHECK(Rel(FlowAt(*rw, pf, 998.0, 1e-3), qr) <= 1e-14);
  // The lift rises strictly through the band (a monotone characteristic).
  double prev = 0;
  for (int i = 1; i <= 400; ++i) {
    const double q = FlowAt(*rv, pc + (pf - pc) * i / 400.0, rho_r, 0.03);
    CHECK(q > prev);
    prev = q;
  }
  // A crack moved through params() past the written full_open (a sizing
  // knob) gives a 1 % band above it and a warning; the valve stays closed
  // below the new crack.
  rv->params()[ReliefValve::kCrack] = 7e5;
  CHECK(FlowAt(*rv, 6.99e5, rho_r, 0.03) == 0.0);
  CHECK(Rel(FlowAt(*rv, 7.07e5, rho_r, 0.03), qr) <= 1e-14);  // full lift at 1.01 x crack
  BranchResult b;
  b.dp = 7.1e5;
  b.rho = rho_r;
  b.mu = 0.03;
  b.m = rho_r * FlowAt(*rv, b.dp, rho_r, 0.03);
  ComponentReport rep;
  rv->Describe(b, &rep);
  bool warned = false;
  for (const auto& w : rep.warnings) warned = warned || w.find("within 1 %") != std::string::npos;
  CHECK(warned);
}

TEST_CASE("check_valve: sealed in reverse; fully open it follows the Kv relation") {
  // IEC 60534-2-1 Eq. (1) as above: Q [m3/h] = Kv sqrt(dp [bar] rho0/rho).
  auto cv = Make("check_valve", {{{"kv", 3.0}, {"crack", 0.3e5}, {"open_dp", 0.3e5}}});
  CHECK(FlowAt(*cv, -1e5, 870, 0.03) == 0.0);
  CHECK(FlowAt(*cv, 0.3e5, 870, 0.03) == 0.0);
  const double q = FlowAt(*cv, 1.5e5, 870, 0.03);
  CHECK(Rel(q * 3600.0, 3.0 * std::sqrt(1.5 * kRho0 / 870.0)) <= 1e-13);
}

// ---------------------------------------------- orifice and rolling bearing

TEST_CASE("orifice: the classical orifice equation at high Re, Sampson's creeping flow at low Re, holes in parallel") {
  // ISO 5167-2:2003 basis (orifice equation, from memory):
  //   Q = Cd A0 sqrt(2 dp / rho) / sqrt(1 - beta^4);
  // its permanent pressure loss (5.4) is the fraction
  //   (sqrt(1 - beta^4 (1 - C^2)) - C beta^2) / (sqrt(1 - beta^4 (1 - C^2)) + C beta^2)
  // of that differential: what an in-line plate (pipe_diameter given) costs
  // the network. A jet into a cavity (no pipe_diameter, rolling_bearing jets)
  // loses the whole differential. The low-Re limit is Sampson's (1891)
  // creeping flow through a hole in a thin plate, dp = 24 mu Q / d^3
  // (Happel & Brenner 1965, from memory); the combined law departs from the
  // high-Re equation by the factor 1 + Cd_inf^2 / (delta^2 Re) in its
  // inertial part, delta^2 = 1 / (12 pi).
  const double d = 0.002, D = 0.008, rho = 870, cd = 0.61, delta2 = 1.0 / (12.0 * M_PI);
  auto orf = Make("orifice", {{{"diameter", d}, {"pipe_diameter", D}}});
  auto jet = Make("orifice", {{{"diameter", d}}});
  const double a0 = M_PI * d * d / 4, beta2 = (d / D) * (d / D), beta4 = beta2 * beta2;
  const double root = std::sqrt(1 - beta4 * (1 - cd * cd));
  const double iso_ratio = (root - cd * beta2) / (root + cd * beta2);  // ISO 5167-2 5.4
  for (double re : {1e4, 1e5}) {
    const double mu = 0.001;
    const double q = re * M_PI * d * mu / (4 * rho);
    const double dp_classic = rho * q * q * (1 - beta4) / (2 * cd * cd * a0 * a0);
    const double dp_jet = rho * q * q / (2 * cd * cd * a0 * a0);
    const double dp = LossAt(*orf, q, rho, mu);
    // Viscous share over the permanent inertial loss: cd^2 / (delta^2 Re ratio).
    const double bound = cd * cd / (delta2 * re * iso_ratio);
    CHECK(dp > iso_ratio * dp_classic);
    CHECK(Rel(dp, iso_ratio * dp_classic) <= 1.000001 * bound);
    CHECK(LossAt(*jet, q, rho, mu) > dp_jet);
    CHECK(Rel(LossAt(*jet, q, rho, mu), dp_jet) <= 1.000001 * cd * cd / (delta2 * re));
    MESSAGE("in-line plate beta 0.25 at Re_d " << re << ": permanent loss " << dp / dp_classic
                                              << " of the differential (ISO 5167-2 5.4: " << iso_ratio << ")");
  }
  // Viscous limit: dp / Q -> (1 - beta^4) 24 mu / d^3 (Sampson), whole drop
  // lost; the departure is the factor 1 + ratio delta^2 Re / Cd_inf^2.
  for (double q : {1e-9, 1e-12}) {
    const double mu = 0.05;
    const double re = 4 * rho * q / (M_PI * d * mu);
    const double sampson = (1 - beta4) * 24 * mu / (d * d * d);
    const double bound = iso_ratio * delta2 * re / (cd * cd);
    CHECK(Rel(LossAt(*orf, q, rho, mu) / q, sampson) <= 1.000001 * bound);
  }
  // count = 3 identical holes carry Q/3 each; rolling_bearing jets, even with
  // a feed bore D behind them, lose the whole differential at Q/3 each.
  auto three = Make("orifice", {{{"diameter", d}, {"pipe_diameter", D}, {"count", 3.0}}});
  auto jets = Make("rolling_bearing", {{{"diameter", d}, {"pipe_diameter", D}, {"count", 3.0}}});
  const double q = 5 * kLpm, q1 = q / 3, mu = 0.02;
  CHECK(Rel(LossAt(*three, q, rho, mu), LossAt(*orf, q1, rho, mu)) <= 1e-14);
  const double full = (1 - beta4) * (rho * q1 * q1 / (2 * cd * cd * a0 * a0) + 24 * mu * q1 / (d * d * d));
  CHECK(Rel(LossAt(*jets, q, rho, mu), full) <= 1e-13);
}

TEST_CASE("fixed_flow imposes its volumetric or mass flow") {
  auto fv = Make("fixed_flow", {{{"flow", 3e-4}}});
  auto fm = Make("fixed_flow", {{{"mass_flow", -0.2}}});
  CHECK(Rel(FlowAt(*fv, 1e5, 870, 0.03), 3e-4) <= 1e-15);
  CHECK(Rel(FlowAt(*fv, -7e5, 870, 0.03), 3e-4) <= 1e-15);
  CHECK(std::fabs(R0(*fm, 2e5, -0.2, 870, 0.03)) == 0.0);
}

}  // namespace
}  // namespace loopwright
