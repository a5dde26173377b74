// Tests of `loopwright fit` (network/design/fit.h, cli/fit_command.cpp).
//
// 1. Recovery. For every model, points are generated here from known
//    parameters by the component model itself, built through the registry
//    and evaluated through its law and HeatAdded (never by the fitter's own
//    functions), with
//    seeded Gaussian relative noise; the fit must return each parameter
//    within 3 of its reported standard errors of the true value, and, from
//    noise-free points, the true value to 1e-6 relative. Over many seeds the
//    share of parameters within one standard error must be near the 68 % of
//    a normal distribution, so standard errors that are too large fail too.
// 2. Bad data are refused with a message that names the file and the line.
// 3. Data that do not cover the range where the model is used give warnings.
// 4. The command line fits every shipped datasheet (cases/datasheets/) and
//    writes a parts file that a case loads, and the loaded component
//    reproduces the fitted parameters; bad data exit 2 with the message.
//
// The data are invented test data (no real part). Noise is drawn from
// std::mt19937 through our own Box-Muller transform, so the numbers do not
// depend on the standard library's normal_distribution.
#include <doctest/doctest.h>
#include <fmt/format.h>
#include <unistd.h>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <functional>
#include <initializer_list>
#include <random>
#include <sstream>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "components/air_cooler.h"
#include "components/centrifugal_pump.h"
#include "components/correlations/heat_exchanger.h"
#include "components/correlations/valve_iec60534.h"
#include "components/displacement_pump.h"
#include "components/registry.h"
#include "components/filter.h"
#include "components/valve.h"
#include "network/case/case.h"
#include "network/design/fit.h"
#include "tests/tools/run_command.h"
#include "tests/tools/source_dir.h"

using loopwright::testing::ReadText;

namespace loopwright {
namespace {

constexpr double kTwoPi = 6.283185307179586476925286766559;
constexpr double kLpm = 1e-3 / 60.0;  // 1 L/min in m3/s
constexpr double kCst = 1e-6;         // 1 cSt in m2/s
constexpr double kBar = 1e5;          // 1 bar in Pa
constexpr double kRpm = kTwoPi / 60;  // 1 rpm in rad/s

// y (1 + rel e), e standard normal: mt19937 with a fixed seed, Box-Muller.
class RelativeNoise {
 public:
  RelativeNoise(unsigned seed, double rel) : gen_(seed), rel_(rel) {}
  double operator()(double y) { return rel_ == 0 ? y : y * (1.0 + rel_ * Normal()); }

 private:
  double Uniform() { return (static_cast<double>(gen_()) + 0.5) / 4294967296.0; }  // in (0, 1)
  double Normal() {
    if (have_spare_) {
      have_spare_ = false;
      return spare_;
    }
    const double r = std::sqrt(-2.0 * std::log(Uniform())), t = kTwoPi * Uniform();
    spare_ = r * std::sin(t);
    have_spare_ = true;
    return r * std::cos(t);
  }
  std::mt19937 gen_;
  double rel_;
  double spare_ = 0;
  bool have_spare_ = false;
};

std::string N(double v) { return fmt::format("{:.17g}", v); }

using Rows = std::vector<std::vector<double>>;

struct TrueParam {
  std::string name;
  double value;
};

struct Dataset {
  std::string file;
  std::string model;
  std::string text;
  std::vector<TrueParam> truth;
};

// ---- generators: the component laws with known parameters
//
// Every point is computed by the component model the network uses, built
// through the registry (components/registry.h) from datasheet-style
// parameters and evaluated through its law (Component::Evaluate, HeatAdded),
// not by the fitter's own functions: a fit whose model drifted from the
// component's law would fail here.

// A component of `type` with the given SI parameters (others default).
std::unique_ptr<Component> MakeComponent(const std::string& type, const std::vector<TrueParam>& numbers,
                                         const std::vector<std::pair<std::string, Rows>>& tables = {}) {
  const ComponentType* t = FindComponentType(type);
  REQUIRE(t != nullptr);
  ParamValues v;
  v.values.assign(t->params.size(), kNoValue);
  v.tables.assign(t->params.size(), {});
  for (size_t i = 0; i < t->params.size(); ++i) v.values[i] = t->params[i].default_si;
  for (const auto& n : numbers) {
    const int i = t->ParamIndex(n.name);
    REQUIRE_MESSAGE(i >= 0, type << ": no parameter " << n.name);
    v.values[i] = n.value;
  }
  for (const auto& [name, rows] : tables) {
    const int i = t->ParamIndex(name);
    REQUIRE(i >= 0);
    v.tables[i] = rows;
    v.values[i] = 1.0;
  }
  std::vector<ParamError> errors;
  auto c = t->make(v, &errors);
  REQUIRE_MESSAGE(c != nullptr, type << ": the factory refused the generator's parameters");
  return c;
}

void SetParam(Component* c, const std::string& type, const std::string& name, double value) {
  const int i = FindComponentType(type)->ParamIndex(name);
  REQUIRE(i >= 0);
  c->params()[i] = value;  // as the network applies a binding
}

// Residual 0 of the law at (dp, m); internal unknowns from GuessInternal,
// which solves the filter's element equation exactly (checked).
double Residual(const Component& c, double dp, double m, double rho, double mu) {
  double x[kMaxInternal] = {0, 0}, r[1 + kMaxInternal] = {0, 0, 0};
  c.GuessInternal(dp, m, rho, mu, x);
  c.Evaluate(dp, m, rho, mu, x, r);
  for (int k = 1; k <= c.NumInternal(); ++k) CHECK(std::fabs(r[k]) <= 1e-15 * std::fabs(m / rho) + 1e-300);
  return r[0];
}

// centrifugal_pump: H = a0 + a1 Q + a2 Q^2 at its rated speed: the pump
// built from three curve points on that quadratic (components/centrifugal_pump.h
// passes its quadratic through three points), head from its law
// r = rho g H + dp at dp = 0; flows from q_min to 60 L/min in 2.5 L/min steps.
Dataset CentrifugalData(unsigned seed, double rel, double q_min_lpm = 0.0) {
  const double a0 = 21.0, a1 = 1500.0, a2 = -1.1e7;  // m, m/(m3/s), m/(m3/s)^2
  const double rho = 998.0, n = 2900 * kRpm;
  Rows curve;
  for (double q : {0.0, 30 * kLpm, 60 * kLpm}) curve.push_back({q, a0 + a1 * q + a2 * q * q});
  auto pump = MakeComponent("centrifugal_pump", {{"speed", n}, {"rated_speed", n}}, {{"curve", curve}});
  RelativeNoise noise(seed, rel);
  Dataset d{"pump_curve.csv",
            "centrifugal_pump",
            "# invented test data\n# speed = 2900 rpm\nflow [L/min],head [m]\n",
            {{"a0", a0}, {"a1", a1}, {"a2", a2}}};
  for (double q_lpm = q_min_lpm; q_lpm <= 60.0 + 1e-9; q_lpm += 2.5) {
    const double head = Residual(*pump, 0.0, rho * q_lpm * kLpm, rho, 1e-3) / (rho * 9.80665);
    d.text += N(q_lpm) + "," + N(noise(head)) + "\n";
  }
  return d;
}

// displacement_pump: the pump with displacement and slip coefficient
// (Q = D n/(2 pi) - C_s dP/mu below its relief), delivery from its law
// r = m/rho - Q at m = 0; 2 speeds (bound through params()) x the
// viscosities x 4 pressure rises.
Dataset DisplacementData(unsigned seed, double rel, std::vector<double> nus_cst = {15, 32, 68}) {
  const double disp = 1.0e-5, slip = 3.0e-13, rho = 870.0;  // m3/rev, m3, kg/m3
  auto pump = MakeComponent("displacement_pump", {{"displacement", disp}, {"speed", 1450 * kRpm}, {"slip", slip}});
  RelativeNoise noise(seed, rel);
  Dataset d{
      "gear_pump.csv",
      "displacement_pump",
      "# invented test data\n# density = 870 kg/m3\npressure_rise [bar],flow [L/min],viscosity [cSt],speed [rpm]\n",
      {{"displacement", disp}, {"slip", slip}}};
  for (double rpm : {1450.0, 2900.0}) {
    SetParam(pump.get(), "displacement_pump", "speed", rpm * kRpm);
    for (double nu : nus_cst)
      for (double dp_bar : {2.0, 5.0, 8.0, 11.0}) {
        const double q = -Residual(*pump, -dp_bar * kBar, 0.0, rho, nu * kCst * rho);
        d.text += N(dp_bar) + "," + N(noise(q) / kLpm) + "," + N(nu) + "," + N(rpm) + "\n";
      }
  }
  return d;
}

// filter: the filter built from its datasheet (element drop ~ mu Q, housing
// drop ~ rho Q^2, bypass closed) with a = element_dp / (nu_r rho_r Q_r) =
// 3.2e9 1/m3 and b = housing_dp / (rho_r Q_r^2) = 5e7 1/m4 (components/filter.h),
// dp from its law; flows 5..50 L/min x the viscosities.
Dataset FilterData(unsigned seed, double rel, std::vector<double> nus_cst = {15, 32, 100}) {
  const double a = 3.2e9, b = 5.0e7, rho = 870.0;  // 1/m3, 1/m4, kg/m3
  const double q_r = 30 * kLpm, nu_r = 32 * kCst;
  auto filter = MakeComponent("filter", {{"rated_flow", q_r}, {"element_dp", a * nu_r * rho * q_r},
                                         {"rated_viscosity", nu_r}, {"housing_dp", b * rho * q_r * q_r},
                                         {"rated_density", rho}});
  RelativeNoise noise(seed, rel);
  Dataset d{"filter.csv",
            "filter",
            "# invented test data\n# density = 870 kg/m3\nflow [L/min],dp [bar],viscosity [cSt]\n",
            {{"a", a}, {"b", b}}};
  for (double nu : nus_cst)
    for (double q_lpm = 5.0; q_lpm <= 50.0 + 1e-9; q_lpm += 5.0) {
      const double dp = Residual(*filter, 0.0, rho * q_lpm * kLpm, rho, nu * kCst * rho);
      d.text += N(q_lpm) + "," + N(noise(dp) / kBar) + "," + N(nu) + "\n";
    }
  return d;
}

// air_cooler: the cooler built from a datasheet rating point (heat 6 kW at
// 50 K ITD, 45 L/min oil, 1.2 kg/s air; UA scaled by (m_l/m_l,r)^0.35
// (m_a/m_a,r)^0.55; components/air_cooler.h), its heat from HeatAdded with
// the air flow bound through params(), its oil-side drop from its law
// (a = 1e9 1/m3, b = 8e7 1/m4 through rated_flow, rated_dp and
// laminar_fraction). The fit's rating point is the data point with the
// largest heat (fit.h), so the true UA_r is the cooler's UA there.
Dataset AirCoolerData(unsigned seed, double rel, std::vector<double> air_flows = {0.4, 0.6, 0.8, 1.0, 1.2}) {
  const double n_l = 0.35, n_a = 0.55;
  const double q_ref = 45 * kLpm, ma_ref = 1.2;           // rating liquid and air flows
  const double rho = 870.0, cp = 1950.0, nu = 15 * kCst;  // kg/m3, J/(kg K), m2/s
  const double dp_a = 1.0e9, dp_b = 8.0e7;                // 1/m3, 1/m4
  const double visc_r = dp_a * nu * rho * q_ref, inert_r = dp_b * rho * q_ref * q_ref;
  auto cooler = MakeComponent("air_cooler", {{"rated_flow", q_ref}, {"rated_dp", visc_r + inert_r},
                                             {"laminar_fraction", visc_r / (visc_r + inert_r)},
                                             {"rated_viscosity", nu}, {"rated_density", rho},
                                             {"rated_heat", 6000.0}, {"rated_itd", 50.0},
                                             {"rated_liquid_flow", q_ref}, {"rated_air_flow", ma_ref},
                                             {"rated_specific_heat", cp}, {"ua_exponent_liquid", n_l},
                                             {"ua_exponent_air", n_a}, {"air_inlet_temperature", 300.0}});
  const auto* ac = dynamic_cast<const AirCooler*>(cooler.get());
  REQUIRE(ac != nullptr);
  RelativeNoise noise(seed, rel);
  Dataset d{"cooler.csv",
            "air_cooler",
            "# invented test data\n# liquid_density = 870 kg/m3\n# liquid_specific_heat = 1950 J/(kg.K)\n"
            "# viscosity = 15 cSt\nheat [W],liquid_flow [L/min],air_flow [kg/s],itd [K],dp [bar]\n",
            {}};
  const double itds[3] = {30.0, 40.0, 50.0};
  double best_heat = -1, ua_at_best = 0;
  int k = 0;
  for (double q_lpm : {15.0, 22.5, 30.0, 37.5, 45.0})
    for (double ma : air_flows) {
      const double q = q_lpm * kLpm, itd = itds[k++ % 3];
      SetParam(cooler.get(), "air_cooler", "air_flow", ma);
      HeatInputs in;
      in.m = rho * q;
      in.t_in = HeatJet(300.0 + itd, 0);
      in.rho = HeatJet(rho);
      in.cp = HeatJet(cp);
      in.mu = HeatJet(nu * rho);
      const double heat_true = -cooler->HeatAdded(in).a;
      const double heat = noise(heat_true);
      const double dp = noise(Residual(*cooler, 0.0, rho * q, rho, nu * rho));
      if (heat > best_heat) {
        best_heat = heat;
        ua_at_best = ac->Conductance(rho * q);
      }
      d.text += N(heat) + "," + N(q_lpm) + "," + N(ma) + "," + N(itd) + "," + N(dp / kBar) + "\n";
    }
  d.truth = {{"ua_rated", ua_at_best}, {"dp_a", dp_a}, {"dp_b", dp_b}, {"ua_exponent_liquid", n_l}};
  if (air_flows.size() > 1) d.truth.push_back({"ua_exponent_air", n_a});
  return d;
}

// valve: the valve (Kvs 4, rangeability 30, seat leakage 0) at each opening
// bound through params(); Kv from its law at the IEC reference water density,
// where Q [m3/h] = Kv sqrt(dp [bar]) (IEC 60534-2-1 Eq. (1)); no size given,
// so F_R = 1. Openings 10..100 % in 5 % steps.
Dataset ValveData(unsigned seed, double rel, const std::string& characteristic = "equal_percentage",
                  double x_min = 0.10, double x_max = 1.0) {
  const double kvs = 4.0, r = 30.0, rho0 = kIecReferenceWaterDensity;
  const bool eq = characteristic == "equal_percentage";
  auto valve = MakeComponent("valve", {{"kvs", kvs}, {"rangeability", r}, {"leakage", 0.0},
                                       {"characteristic", eq ? 1.0 : 0.0}});
  RelativeNoise noise(seed, rel);
  Dataset d{"valve.csv",
            "valve",
            "# invented test data\n# characteristic = " + characteristic + "\nopening [%],kv [Kv]\n",
            {{"kvs", kvs}}};
  if (eq) d.truth.push_back({"rangeability", r});
  const double q = 1.0 / 3600.0;  // 1 m3/h
  for (int i = 0; x_min + 0.05 * i <= x_max + 1e-9; ++i) {
    const double x = x_min + 0.05 * i;
    SetParam(valve.get(), "valve", "opening", x);
    const double dp_bar = Residual(*valve, 0.0, rho0 * q, rho0, 1e-3) / kBar;
    d.text += N(100 * x) + "," + N(noise(1.0 / std::sqrt(dp_bar))) + "\n";
  }
  return d;
}

using Generator = std::function<Dataset(unsigned seed, double rel)>;

struct ModelCase {
  std::string model;
  double rel;  // relative noise of the measured quantity
  Generator make;
};

std::vector<ModelCase> AllModels() {
  return {
      {"centrifugal_pump", 0.005, [](unsigned s, double r) { return CentrifugalData(s, r); }},
      {"displacement_pump", 0.005, [](unsigned s, double r) { return DisplacementData(s, r); }},
      {"filter", 0.01, [](unsigned s, double r) { return FilterData(s, r); }},
      {"air_cooler", 0.01, [](unsigned s, double r) { return AirCoolerData(s, r); }},
      {"valve", 0.01, [](unsigned s, double r) { return ValveData(s, r); }},
  };
}

// ---- helpers

FitResult Fit(const Dataset& d) {
  const FitModelSpec* spec = FindFitModel(d.model);
  REQUIRE(spec != nullptr);
  FitData data;
  std::string err;
  INFO(d.text);
  REQUIRE_MESSAGE(ParseFitData(d.file, d.text, *spec, &data, &err), err);
  FitResult r;
  const FitStatus st = FitModel(data, d.model, &r, &err);
  REQUIRE_MESSAGE(st == FitStatus::kOk, err);
  return r;
}

// The message of a refused data set; fails unless it is refused as invalid
// data (by the parser, or by FitModel with kInvalidData).
std::string Refused(const std::string& file, const std::string& text, const std::string& model) {
  const FitModelSpec* spec = FindFitModel(model);
  REQUIRE(spec != nullptr);
  FitData data;
  std::string err;
  if (!ParseFitData(file, text, *spec, &data, &err)) {
    CHECK_FALSE(err.empty());
    return err;
  }
  FitResult r;
  const FitStatus st = FitModel(data, model, &r, &err);
  INFO("data:\n" << text);
  CHECK(st == FitStatus::kInvalidData);
  return err;
}

// Checks that `message` contains every one of `parts`, showing it when not.
void CheckSays(const std::string& message, std::initializer_list<std::string> parts) {
  for (const std::string& part : parts)
    CHECK_MESSAGE(message.find(part) != std::string::npos, "\"" << part << "\" not in: " << message);
}

// Checks that the data are refused with a message holding every one of `parts`.
void CheckRefused(const std::string& file, const std::string& text, const std::string& model,
                  std::initializer_list<std::string> parts) {
  CheckSays(Refused(file, text, model), parts);
}

bool HasWarning(const FitResult& r, const std::string& part) {
  for (const auto& w : r.warnings)
    if (w.find(part) != std::string::npos) return true;
  return false;
}

std::string Warnings(const FitResult& r) {
  std::string s;
  for (const auto& w : r.warnings) s += "  " + w + "\n";
  return s;
}

// |fitted - true| / SE of every true parameter; checks finite positive SEs.
std::vector<double> Deviations(const Dataset& d, const FitResult& r) {
  std::vector<double> z;
  for (const auto& t : d.truth) {
    const FitParameter* p = r.Find(t.name);
    REQUIRE_MESSAGE(p != nullptr, "no parameter " << t.name);
    CAPTURE(t.name);
    CHECK_FALSE(p->fixed);
    CHECK_FALSE(p->at_bound);
    CHECK(std::isfinite(p->std_error));
    CHECK(p->std_error > 0);
    z.push_back(std::abs(p->value - t.value) / p->std_error);
  }
  return z;
}

}  // namespace

// ------------------------------------------------------------------ recovery

TEST_CASE("fit recovers known parameters within 3 standard errors from noisy points, every model") {
  for (const ModelCase& m : AllModels()) {
    double worst = 0;
    for (unsigned seed : {11u, 2024u, 77777u}) {
      const Dataset d = m.make(seed, m.rel);
      CAPTURE(m.model);
      CAPTURE(seed);
      const FitResult r = Fit(d);
      const std::vector<double> z = Deviations(d, r);
      for (size_t i = 0; i < z.size(); ++i) {
        const FitParameter* p = r.Find(d.truth[i].name);
        INFO(d.truth[i].name << ": true " << d.truth[i].value << ", fitted " << p->value << " +- " << p->std_error);
        CHECK(z[i] <= 3.0);
        worst = std::max(worst, z[i]);
      }
      // The noise level shows in the fit: RMS relative error near the noise.
      CHECK(r.rms_relative > 0.5 * m.rel);
      CHECK(r.rms_relative < 1.5 * m.rel);
    }
    MESSAGE(m.model << ": worst |fitted - true| / SE over 3 seeds = " << worst);
  }
}

TEST_CASE("fit recovers known parameters to 1e-6 from noise-free points, every model") {
  for (const ModelCase& m : AllModels()) {
    const Dataset d = m.make(1u, 0.0);
    CAPTURE(m.model);
    const FitResult r = Fit(d);
    double worst = 0;
    for (const auto& t : d.truth) {
      const FitParameter* p = r.Find(t.name);
      REQUIRE(p != nullptr);
      CAPTURE(t.name);
      const double e = std::abs(p->value - t.value) / std::abs(t.value);
      CHECK(e < 1e-6);
      worst = std::max(worst, e);
    }
    CHECK(r.rms_relative < 1e-8);
    MESSAGE(m.model << ": worst relative error from noise-free points = " << worst);
  }
  // The characteristics without a rangeability fit Kvs alone.
  const Dataset lin = ValveData(1u, 0.0, "linear");
  const FitResult r = Fit(lin);
  CHECK(r.Find("rangeability") == nullptr);
  REQUIRE(r.Find("kvs") != nullptr);
  CHECK(r.Find("kvs")->value == doctest::Approx(4.0).epsilon(1e-9));
}

// Standard errors that are too large would pass the 3-SE test above. With
// the residual variance estimated from n - p = 17 to 28 degrees of freedom,
// (fitted - true)/SE follows Student's t closely, so about 66-67 % of the
// estimates lie within one SE (68.3 % for a normal distribution) and 99.3 %
// within three. Over 500 seeds per model the share within one SE must be
// within about 4 sampling standard deviations of that.
TEST_CASE("fit standard errors are calibrated: share within 1 SE near 67 % over 500 seeds, every model") {
  for (const ModelCase& m : AllModels()) {
    size_t n = 0, within1 = 0, within3 = 0;
    double z2 = 0;
    for (unsigned seed = 1000; seed < 1500; ++seed) {
      const Dataset d = m.make(seed, m.rel);
      const FitResult r = Fit(d);
      for (double z : Deviations(d, r)) {
        ++n;
        within1 += z <= 1.0;
        within3 += z <= 3.0;
        z2 += z * z;
      }
    }
    const double f1 = static_cast<double>(within1) / n, f3 = static_cast<double>(within3) / n;
    CAPTURE(m.model);
    MESSAGE(m.model << ": " << n << " parameter estimates; within 1 SE " << 100 * f1 << " %, within 3 SE " << 100 * f3
                    << " %, mean z^2 " << z2 / n);
    CHECK(f1 > 0.58);
    CHECK(f1 < 0.76);
    CHECK(f3 > 0.98);
    CHECK(z2 / n < 1.4);  // t with 17 dof: 17/15 = 1.13
    CHECK(z2 / n > 0.8);
  }
}

TEST_CASE("fit reads the JSON form of the data as the CSV form") {
  const Dataset csv = FilterData(5u, 0.01);
  // The same rows as JSON, with a comment line.
  std::istringstream in(csv.text);
  std::string line, rows;
  while (std::getline(in, line)) {
    if (line.empty() || line[0] == '#' || line[0] == 'f') continue;
    rows += std::string(rows.empty() ? "" : ",\n") + "    [" + line + "]";
  }
  Dataset js = csv;
  js.file = "filter.json";
  js.text =
      "{\n  // invented test data\n  \"conditions\": {\"density\": \"870 kg/m3\"},\n"
      "  \"columns\": [\"flow [L/min]\", \"dp [bar]\", \"viscosity [cSt]\"],\n  \"rows\": [\n" +
      rows + "\n  ]\n}\n";
  const FitResult a = Fit(csv), b = Fit(js);
  REQUIRE(a.params.size() == b.params.size());
  for (size_t i = 0; i < a.params.size(); ++i) {
    CHECK(a.params[i].value == doctest::Approx(b.params[i].value).epsilon(1e-12));
    CHECK(a.params[i].std_error == doctest::Approx(b.params[i].std_error).epsilon(1e-9));
  }
  // Points keep the line they came from in the JSON text (rows start on line 6).
  REQUIRE(b.points.size() == 30);
  CHECK(b.points.front().line == 6);
  CHECK(b.points.back().line == 35);
}

// ------------------------------------------------------------------ bad data

TEST_CASE("fit refuses too few points") {
  CheckRefused("short.csv", "# speed = 2900 rpm\nflow [L/min],head [m]\n0,21\n30,18\n", "centrifugal_pump",
               {"short.csv", "at least 3 points", "the data give 2"});
  CheckRefused("one.csv", "opening [%],kv [Kv]\n50,1.2\n", "valve", {"one.csv", "at least 2 points"});
  CheckRefused("f.csv", "# density = 870 kg/m3\nflow [L/min],dp [bar],viscosity [cSt]\n10,0.1,32\n", "filter",
               {"at least 2 points"});
  CheckRefused("empty.csv", "# speed = 2900 rpm\nflow [L/min],head [m]\n", "centrifugal_pump",
               {"empty.csv", "no data rows"});
}

TEST_CASE("fit refuses a head that rises past the peak, naming its line") {
  const std::string text =
      "# speed = 2900 rpm\n"     // 1
      "flow [L/min],head [m]\n"  // 2
      "0,21.0\n"                 // 3
      "10,20.5\n"                // 4
      "20,19.0\n"                // 5
      "30,17.0\n"                // 6
      "40,19.5\n"                // 7: rises by 2.5 m, 12 % of the peak head
      "50,16.0\n";               // 8
  CheckRefused("rising.csv", text, "centrifugal_pump", {"rising.csv:7", "rises", "peak"});
}

TEST_CASE("fit refuses a filter drop that does not rise with flow, naming its line") {
  const std::string text =
      "# density = 870 kg/m3\n"                  // 1
      "flow [L/min],dp [bar],viscosity [cSt]\n"  // 2
      "10,0.10,32\n"                             // 3
      "20,0.22,32\n"                             // 4
      "30,0.21,32\n"                             // 5: falls
      "40,0.45,32\n"                             // 6
      "10,0.05,15\n"                             // 7
      "20,0.11,15\n";                            // 8
  CheckRefused("flat.csv", text, "filter", {"flat.csv:5", "dp does not rise with flow"});
  // Valve Kv that falls with opening.
  CheckRefused("kv.csv", "opening [%],kv [Kv]\n20,0.3\n40,0.6\n60,0.5\n80,2.0\n", "valve",
               {"kv.csv:4", "does not rise with opening"});
}

TEST_CASE("fit refuses wrong and unknown units, naming line and column") {
  // A pressure unit in a flow column.
  CheckRefused("units.csv", "# density = 870 kg/m3\nflow [bar],dp [bar],viscosity [cSt]\n10,0.1,32\n", "filter",
               {"units.csv:2, column 1", "\"bar\"", "pressure", "volumetric flow"});
  // A unit no dimension knows.
  CheckRefused("units.csv", "# density = 870 kg/m3\nflow [L/min],dp [psx],viscosity [cSt]\n10,0.1,32\n", "filter",
               {"units.csv:2, column 2", "unknown unit \"psx\""});
  // A dynamic-viscosity unit in the kinematic viscosity column.
  CheckRefused("units.csv", "flow [L/min],dp [bar],viscosity [mPa.s]\n10,0.1,32\n", "filter",
               {"units.csv:1, column 3", "is a dynamic viscosity", "kinematic viscosity"});
  // A dimensional column without a unit.
  CheckRefused("units.csv", "flow,dp [bar],viscosity [cSt]\n10,0.1,32\n", "filter",
               {"units.csv:1, column 1", "needs a unit"});
  // A unit inside a cell that contradicts its column.
  CheckRefused("units.csv", "flow [L/min],dp [bar],viscosity [cSt]\n10,0.1,32\n20 gpm,0.2,32\n", "filter",
               {"units.csv:3, column 1", "gpm"});
  // A bad condition unit.
  CheckRefused("cond.csv", "# speed = 2900 bar\nflow [L/min],head [m]\n0,21\n", "centrifugal_pump",
               {"cond.csv:1", "speed"});
}

TEST_CASE("fit refuses an unknown column and an unknown condition") {
  CheckRefused("cols.csv", "# density = 870 kg/m3\nflow [L/min],dp [bar],temperature [degC]\n10,0.1,40\n", "filter",
               {"cols.csv:2, column 3", "unknown column \"temperature\"", "accepted columns: flow, dp, viscosity"});
  CheckRefused("cond.csv", "# speed = 2900 rpm\n# sped = 2900 rpm\nflow [L/min],head [m]\n0,21\n", "centrifugal_pump",
               {"cond.csv:2", "unknown condition \"sped\""});
}

TEST_CASE("fit refuses a missing required condition or column") {
  CheckRefused("nospeed.csv", "flow [L/min],head [m]\n0,21\n20,20\n40,16\n60,10\n", "centrifugal_pump",
               {"nospeed.csv", "needs the condition speed"});
  CheckRefused("norho.csv",
               "pressure_rise [bar],flow [L/min],viscosity [cSt],speed [rpm]\n2,14,32,1450\n8,13,32,1450\n",
               "displacement_pump", {"norho.csv", "needs the condition density"});
  CheckRefused("nodensity.csv", "heat [W],liquid_flow [L/min],air_flow [kg/s],itd [K]\n5000,30,0.8,40\n", "air_cooler",
               {"needs the condition liquid_density"});
  CheckRefused("nocol.csv", "# speed = 2900 rpm\nflow [L/min]\n0\n20\n40\n", "centrifugal_pump",
               {"nocol.csv", "needs a column \"head\""});
}

TEST_CASE("fit refuses negative and non-finite values, naming their line") {
  const std::string text =
      "# density = 870 kg/m3\n"                  // 1
      "flow [L/min],dp [bar],viscosity [cSt]\n"  // 2
      "10,0.10,32\n"                             // 3
      "-20,0.22,32\n"                            // 4: negative flow
      "30,0.35,32\n";                            // 5
  CheckRefused("neg.csv", text, "filter", {"neg.csv:4", "(flow)", "positive"});
  CheckRefused("neg.csv", "# speed = 2900 rpm\nflow [L/min],head [m]\n0,21\n-10,20\n40,16\n", "centrifugal_pump",
               {"neg.csv:4", "non-negative"});
  CheckRefused("nan.csv", "# density = 870 kg/m3\nflow [L/min],dp [bar],viscosity [cSt]\n10,nan,32\n", "filter",
               {"nan.csv:3, column 2", "non-finite"});
  // An opening beyond 100 %, an efficiency above 1.
  CheckRefused("x.csv", "opening [%],kv [Kv]\n50,1\n150,3\n", "valve", {"x.csv:3", "opening must be within 0 .. 1"});
  CheckRefused("eta.csv", "# speed = 2900 rpm\nflow [L/min],head [m],efficiency [-]\n0,21,0.1\n20,20,1.3\n40,16,0.5\n",
               "centrifugal_pump", {"eta.csv:4", "efficiency must be in (0, 1]"});
}

TEST_CASE("fit refuses conditions that are not positive, set twice, or also a column, naming their line") {
  const std::string body = "flow [L/min],dp [bar],viscosity [cSt]\n10,0.10,32\n20,0.22,32\n30,0.35,32\n";
  CheckRefused("rho.csv", "# invented\n# density = -870 kg/m3\n" + body, "filter",
               {"rho.csv:2", "density must be positive"});
  CheckRefused("rho.csv", "# density = 870 kg/m3\n# density = 850 kg/m3\n" + body, "filter",
               {"rho.csv:2", "set twice"});
  CheckRefused("rho.csv", "# density = 870 kg/m3\n# viscosity = 32 cSt\n" + body, "filter",
               {"rho.csv:2", "both as a condition and as a column"});
  CheckRefused("speed.csv", "# speed = 0 rpm\nflow [L/min],head [m]\n0,21\n20,20\n40,16\n", "centrifugal_pump",
               {"speed.csv:1", "speed must be positive"});
  CheckRefused("ch.csv", "# characteristic = parabolic\nopening [%],kv [Kv]\n50,1\n100,3\n", "valve",
               {"ch.csv:1", "\"parabolic\" is not one of"});
}

TEST_CASE("fit refuses a cooler heat above what any exchanger can pass, naming its line") {
  const std::string text =
      "# liquid_density = 870 kg/m3\n"                          // 1
      "heat [W],liquid_flow [L/min],air_flow [kg/s],itd [K]\n"  // 2
      "5000,30,0.8,40\n"                                        // 3
      "60000,30,1.2,40\n"                                       // 4: C_min ITD = 34.8 kW
      "7000,45,1.2,40\n";                                       // 5
  CheckRefused("hot.csv", text, "air_cooler", {"hot.csv:4 (heat)", "effectiveness"});
}

TEST_CASE("fit refuses bad JSON data, naming the line of the bad row") {
  const std::string head =
      "{\n"                                                                      // 1
      "  \"conditions\": {\"density\": \"870 kg/m3\"},\n"                        // 2
      "  \"columns\": [\"flow [L/min]\", \"dp [bar]\", \"viscosity [cSt]\"],\n"  // 3
      "  \"rows\": [\n"                                                          // 4
      "    [10, 0.10, 32],\n"                                                    // 5
      "    [20, 0.22, 32],\n";                                                   // 6
  // A row with a value missing.
  CheckRefused("data.json", head + "    [30, 0.35],\n    [40, 0.50, 32]\n  ]\n}\n", "filter",
               {"data.json:7", "rows[2]", "3 values"});
  // A value that is not a number.
  CheckRefused("data.json", head + "    [30, 0.35, 32],\n    [40, true, 32]\n  ]\n}\n", "filter",
               {"data.json:8", "rows[3]", "expected a number"});
  // A negative flow found by the fit, still pointing at its line.
  CheckRefused("data.json", head + "    [30, 0.35, 32],\n    [-40, 0.50, 32]\n  ]\n}\n", "filter",
               {"data.json:8", "(flow)"});
  // Malformed JSON: line and column.
  CheckRefused("data.json", head + "    [30, 0.35, 32]\n    [40, 0.50, 32]\n  ]\n}\n", "filter",
               {"data.json:8:", "malformed JSON"});
  // An unknown unit in the columns, and a repeated key.
  CheckRefused("data.json", "{\n  \"columns\": [\"flow [L/min]\", \"dp [psx]\"],\n  \"rows\": []\n}\n", "filter",
               {"data.json:2", "unknown unit \"psx\""});
  CheckRefused("data.json",
               "{\n  \"columns\": [\"flow [L/min]\", \"dp [bar]\"],\n  \"rows\": [],\n  \"rows\": [[1, 2]]\n}\n",
               "filter", {"data.json", "/rows", "more than once"});
}

// ------------------------------------------------------------------ coverage warnings

TEST_CASE("fit warns where the data do not cover the range the model is used in") {
  SUBCASE("displacement pump at one viscosity: the slip's 1/mu scaling is assumed") {
    const FitResult one = Fit(DisplacementData(3u, 0.005, {32}));
    INFO(Warnings(one));
    CHECK(HasWarning(one, "1 distinct viscosity"));
    CHECK(HasWarning(one, "1/mu scaling is assumed"));
    const FitResult three = Fit(DisplacementData(3u, 0.005));
    INFO(Warnings(three));
    CHECK_FALSE(HasWarning(three, "1/mu scaling"));
  }
  SUBCASE("displacement pump at one viscosity given as a condition") {
    std::string text =
        "# density = 870 kg/m3\n# viscosity = 32 cSt\n# speed = 1450 rpm\npressure_rise [bar],flow [L/min]\n";
    for (double dp : {2.0, 5.0, 8.0, 11.0})
      text += N(dp) + "," + N((1e-5 * 1450 * kRpm / kTwoPi - 3e-13 * dp * kBar / (32 * kCst * 870)) / kLpm) + "\n";
    const FitResult r = Fit({"gp.csv", "displacement_pump", text, {}});
    INFO(Warnings(r));
    CHECK(HasWarning(r, "1 distinct viscosity"));
    CHECK(HasWarning(r, "1/mu scaling is assumed"));
    CHECK(HasWarning(r, "one speed"));
  }
  SUBCASE("centrifugal curve without low-flow points: the shut-off head is extrapolated") {
    const FitResult high = Fit(CentrifugalData(3u, 0.005, 20.0));
    INFO(Warnings(high));
    CHECK(HasWarning(high, "no points below 20 L/min"));
    CHECK(HasWarning(high, "shut-off is extrapolated"));
    const FitResult full = Fit(CentrifugalData(3u, 0.005));
    INFO(Warnings(full));
    CHECK_FALSE(HasWarning(full, "shut-off"));
  }
  SUBCASE("filter at one viscosity: the element/housing split rests on the flow dependence") {
    const FitResult one = Fit(FilterData(3u, 0.01, {32}));
    INFO(Warnings(one));
    CHECK(HasWarning(one, "1 distinct viscosity"));
    const FitResult three = Fit(FilterData(3u, 0.01));
    CHECK_FALSE(HasWarning(three, "distinct viscosit"));
  }
  SUBCASE("air cooler at one air flow: its exponent is held, not fitted") {
    const FitResult one = Fit(AirCoolerData(3u, 0.01, {0.8}));
    INFO(Warnings(one));
    CHECK(HasWarning(one, "one air flow in the data"));
    REQUIRE(one.Find("ua_exponent_air") != nullptr);
    CHECK(one.Find("ua_exponent_air")->fixed);
    CHECK(std::isnan(one.Find("ua_exponent_air")->std_error));
    const FitResult five = Fit(AirCoolerData(3u, 0.01));
    CHECK_FALSE(HasWarning(five, "air flow"));
  }
  SUBCASE("valve seen only in mid travel: Kvs and the low end are extrapolated") {
    const FitResult mid = Fit(ValveData(3u, 0.01, "equal_percentage", 0.4, 0.8));
    INFO(Warnings(mid));
    CHECK(HasWarning(mid, "Kvs (fully open) is extrapolated"));
    CHECK(HasWarning(mid, "below it is assumed"));
    const FitResult full = Fit(ValveData(3u, 0.01));
    CHECK(full.warnings.empty());
  }
}

// ------------------------------------------------------------------ command line

namespace {

using testing::RunCommand;


// A one-component loop between two pressure boundaries using `part_ref`,
// with the component's operating inputs.
std::string CaseUsing(const std::string& part_ref, const std::string& extra) {
  return "{\n  \"name\": \"fitted part (test case)\",\n  \"description\": \"invented: one fitted part between two "
         "pressure boundaries\",\n  \"fluids\": {\"oil\": {\"kind\": \"oil\", \"kv40\": \"32 cSt\", \"kv100\": \"5.4 "
         "cSt\", "
         "\"density_15C\": \"870 kg/m3\"}},\n  \"loops\": [{\"id\": \"l\", \"fluid\": \"oil\", \"temperature\": \"40 "
         "degC\",\n"
         "    \"nodes\": [{\"id\": \"a\", \"boundary\": {\"kind\": \"pressure\", \"pressure\": \"1 bar\"}},\n"
         "              {\"id\": \"b\", \"boundary\": {\"kind\": \"pressure\", \"pressure\": \"0.5 bar\"}}],\n"
         "    \"components\": [{\"id\": \"c\", \"part\": \"" +
         part_ref + "\", \"from\": \"a\", \"to\": \"b\"" + extra + "}]}]\n}\n";
}

double ReportParam(const nlohmann::json& report, const std::string& name) {
  for (const auto& p : report["parameters"])
    if (p["name"] == name) return p["value"].get<double>();
  FAIL("no parameter " << name << " in the report");
  return 0;
}

}  // namespace

TEST_CASE("`loopwright fit` fits every shipped datasheet and writes a part a case loads") {
  const char* bin = std::getenv("LOOPWRIGHT_BIN");
  const char* src = std::getenv("LOOPWRIGHT_SOURCE_DIR");
  REQUIRE_MESSAGE(bin != nullptr, "LOOPWRIGHT_BIN is not set");
  REQUIRE_MESSAGE(src != nullptr, "LOOPWRIGHT_SOURCE_DIR is not set");
  const auto dir = std::filesystem::temp_directory_path() / ("lw_fit_" + std::to_string(static_cast<long>(::getpid())));
  std::filesystem::create_directories(dir);
  struct Sheet {
    std::string file, model, extra;
  };
  const std::vector<Sheet> sheets = {
      {"centrifugal_pump_cp50.csv", "centrifugal_pump", ", \"speed\": \"2900 rpm\""},
      {"displacement_pump_gp10.csv", "displacement_pump", ", \"speed\": \"1450 rpm\""},
      {"filter_flt40.csv", "filter", ""},
      {"air_cooler_ac8.csv", "air_cooler", ", \"air_inlet_temperature\": \"30 degC\""},
      {"valve_bv10.csv", "valve", ", \"opening\": 0.5"},
  };
  size_t seen = 0;
  for (const auto& entry : std::filesystem::directory_iterator(std::string(src) + "/cases/datasheets")) {
    (void)entry;
    ++seen;
  }
  CHECK(seen == sheets.size());  // a new datasheet needs its line here
  for (const Sheet& s : sheets) {
    CAPTURE(s.file);
    const std::string data = std::string(src) + "/cases/datasheets/" + s.file;
    const auto parts = dir / (s.model + "_parts.json");
    const auto report = dir / (s.model + "_report.json");
    const auto err = dir / (s.model + ".stderr");
    std::string out;
    const int code =
        RunCommand(std::string(bin) + " fit '" + data + "' --model " + s.model + " --part '" + parts.string() +
                       "' --json '" + report.string() + "' --id fitted-" + s.model + " 2>'" + err.string() + "'",
                   &out);
    INFO("stdout:\n" << out << "\nstderr:\n" << ReadText(err));
    REQUIRE(code == 0);
    CheckSays(out, {"part entry"});
    // The parts file: one entry with id, type, source and params.
    const nlohmann::json pf = nlohmann::json::parse(ReadText(parts));
    REQUIRE(pf["parts"].is_array());
    REQUIRE(pf["parts"].size() == 1);
    const nlohmann::json& part = pf["parts"][0];
    CHECK(part["id"] == "fitted-" + s.model);
    CHECK(part["type"] == s.model);
    CHECK(part["source"].get<std::string>().find(s.file) != std::string::npos);
    CHECK(part["params"].is_object());
    CHECK_FALSE(part["params"].empty());
    const nlohmann::json rep = nlohmann::json::parse(ReadText(report));
    CHECK(rep["model"] == s.model);
    CHECK(rep["part"] == part);
    // A case in the same folder loads it (command line and in process).
    const auto case_path = dir / (s.model + "_case.json");
    std::ofstream(case_path) << CaseUsing(parts.filename().string() + "#fitted-" + s.model, s.extra);
    const int vcode = RunCommand(std::string(bin) + " validate '" + case_path.string() + "' 2>&1", &out);
    INFO("validate:\n" << out);
    CHECK(vcode == 0);
    LoadResult lr = LoadCaseFile(case_path.string(), std::string(src) + "/library");
    INFO(lr.diagnostics.Format(case_path.string()));
    REQUIRE(lr.value);
    const Component* c = lr.value->loops.at(0).components.at(0).model.get();
    // The loaded component carries the fitted parameters.
    if (s.model == "centrifugal_pump") {
      const auto* pump = dynamic_cast<const CentrifugalPump*>(c);
      REQUIRE(pump != nullptr);
      const double a0 = ReportParam(rep, "a0"), a1 = ReportParam(rep, "a1"), a2 = ReportParam(rep, "a2");
      for (double q_lpm : {0.0, 15.0, 30.0, 45.0, 60.0}) {
        const double q = q_lpm * kLpm;
        CHECK(pump->Head(q) == doctest::Approx(a0 + a1 * q + a2 * q * q).epsilon(1e-8));
      }
    } else if (s.model == "displacement_pump") {
      const auto* pump = dynamic_cast<const DisplacementPump*>(c);
      REQUIRE(pump != nullptr);
      CHECK(pump->GeometricFlow() ==
            doctest::Approx(ReportParam(rep, "displacement") * 1450 * kRpm / kTwoPi).epsilon(1e-9));
      CHECK(pump->SlipCoefficient() == doctest::Approx(ReportParam(rep, "slip")).epsilon(1e-9));
      CHECK(pump->HasRelief());
    } else if (s.model == "filter") {
      const auto* f = dynamic_cast<const Filter*>(c);
      REQUIRE(f != nullptr);
      CHECK(f->A() == doctest::Approx(ReportParam(rep, "a")).epsilon(1e-9));
      CHECK(f->B() == doctest::Approx(ReportParam(rep, "b")).epsilon(1e-9));
    } else if (s.model == "air_cooler") {
      const auto* ac = dynamic_cast<const AirCooler*>(c);
      REQUIRE(ac != nullptr);
      // At the part's rating flows (the case gives no air flow, so the rated
      // one is used) the component's UA is the fitted UA_r.
      const auto si = [&](const char* key, Dimension dim) {
        const ParsedQuantity q = ParseQuantity(part["params"][key].get<std::string>(), dim);
        REQUIRE_MESSAGE(q.ok, q.error);
        return q.si;
      };
      const double m_rated = si("rated_liquid_flow", Dimension::kVolumeFlow) * si("rated_density", Dimension::kDensity);
      CHECK(ac->AirFlow() == doctest::Approx(si("rated_air_flow", Dimension::kMassFlow)).epsilon(1e-12));
      CHECK(ac->Conductance(m_rated) == doctest::Approx(ReportParam(rep, "ua_rated")).epsilon(1e-8));
    } else if (s.model == "valve") {
      const auto* v = dynamic_cast<const Valve*>(c);
      REQUIRE(v != nullptr);
      const double kvs = ReportParam(rep, "kvs"), r = ReportParam(rep, "rangeability");
      const double leak = 1e-4;  // the valve's default seat leakage (components/valve.h)
      CHECK(v->KvEffective() ==
            doctest::Approx(kvs * (leak + (1 - leak) * RelativeKv(ValveCharacteristic::kEqualPercentage, 0.5, r)))
                .epsilon(1e-9));
    }
  }
  std::filesystem::remove_all(dir);
}

TEST_CASE("`loopwright fit` on bad data exits 2 with the message on stderr") {
  const char* bin = std::getenv("LOOPWRIGHT_BIN");
  REQUIRE_MESSAGE(bin != nullptr, "LOOPWRIGHT_BIN is not set");
  const auto dir =
      std::filesystem::temp_directory_path() / ("lw_fit_bad_" + std::to_string(static_cast<long>(::getpid())));
  std::filesystem::create_directories(dir);
  const auto data = dir / "rising.csv";
  std::ofstream(data) << "# speed = 2900 rpm\nflow [L/min],head [m]\n0,21\n10,20.5\n20,19\n30,17\n40,19.5\n50,16\n";
  const auto err = dir / "stderr";
  const auto part = dir / "part.json";
  std::string out;
  int code = RunCommand(std::string(bin) + " fit '" + data.string() + "' --model centrifugal_pump --part '" +
                            part.string() + "' 2>'" + err.string() + "'",
                        &out);
  std::string e = ReadText(err);
  INFO("stdout:\n" << out << "\nstderr:\n" << e);
  CHECK(code == 2);
  CheckSays(e, {"error:", "rising.csv:7"});
  CHECK(out.empty());
  CHECK_FALSE(std::filesystem::exists(part));  // nothing written
  // An unknown model and a missing file are refused the same way.
  code = RunCommand(std::string(bin) + " fit '" + data.string() + "' --model turbine 2>'" + err.string() + "'", &out);
  e = ReadText(err);
  CHECK(code == 2);
  CheckSays(e, {"unknown model \"turbine\""});
  code = RunCommand(
      std::string(bin) + " fit '" + (dir / "none.csv").string() + "' --model filter 2>'" + err.string() + "'", &out);
  e = ReadText(err);
  CHECK(code == 2);
  CheckSays(e, {"cannot read"});
  std::filesystem::remove_all(dir);
}

}  // namespace loopwright
