// fit — fitting the models; the data are read by fit_data.cpp. See fit.h.
#include "network/design/fit.h"

#include <Eigen/Dense>
#include <ceres/ceres.h>
#include <fmt/format.h>
#include <fmt/ranges.h>

#include <algorithm>
#include <cmath>
#include <functional>
#include <limits>
#include <memory>
#include <stdexcept>

#include "components/air_cooler.h"
#include "components/centrifugal_pump.h"
#include "components/correlations/heat_exchanger.h"
#include "components/correlations/valve_iec60534.h"
#include "components/registry.h"
#include "network/point/ceres_options.h"

namespace loopwright {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kTwoPi = 6.283185307179586476925286766559;

using D = Dimension;

}  // namespace

const FitParameter* FitResult::Find(const std::string& name) const {
  for (const auto& p : params)
    if (p.name == name) return &p;
  return nullptr;
}

// ---------------------------------------------------------------- fitting

namespace {

// A model evaluated by the generic bounded least-squares driver. The
// parameter block x (size K) is dimensionless (physical = scale x, then the
// linear map `to_physical`).
constexpr int kMaxParams = 3;

struct Setup {
  int k = 0;                     // parameters in the block
  double x[kMaxParams] = {1, 1, 1};
  double lower[kMaxParams] = {-HUGE_VAL, -HUGE_VAL, -HUGE_VAL};
  double upper[kMaxParams] = {HUGE_VAL, HUGE_VAL, HUGE_VAL};
  bool fixed[kMaxParams] = {false, false, false};
};

struct Outcome {
  double x[kMaxParams] = {0, 0, 0};
  double cov[kMaxParams][kMaxParams] = {};  // of x, scaled by s^2; NaN when not estimable
  bool cov_ok = false;
  double cost = 0;
  bool converged = false;
  std::string message;
};

// The covariance of x at the solution, scaled by s^2 = 2 cost / (n - free).
void Covariance(ceres::Problem* problem, int n, int free, Outcome* o, int k) {
  for (auto& row : o->cov)
    for (double& v : row) v = kNaN;
  if (n <= free) return;
  ceres::Covariance::Options copt;
  copt.algorithm_type = ceres::DENSE_SVD;
  ceres::Covariance cov(copt);
  std::vector<std::pair<const double*, const double*>> blocks = {{o->x, o->x}};
  if (!cov.Compute(blocks, problem)) return;
  double c[kMaxParams * kMaxParams];
  cov.GetCovarianceBlock(o->x, o->x, c);
  const double s2 = 2.0 * o->cost / (n - free);
  for (int i = 0; i < k; ++i)
    for (int j = 0; j < k; ++j) o->cov[i][j] = c[i * k + j] * s2;
  o->cov_ok = true;
}

// Runs LM with bounds on residual blocks `cost_functions` (each of size 1, one
// parameter block of size s.k); computes the covariance of x.
Outcome Solve(const Setup& s, std::vector<ceres::CostFunction*> cost_functions) {
  Outcome o;
  std::copy(s.x, s.x + s.k, o.x);
  ceres::Problem problem;
  for (ceres::CostFunction* f : cost_functions) problem.AddResidualBlock(f, nullptr, o.x);
  std::vector<int> constant;
  for (int i = 0; i < s.k; ++i) {
    if (s.fixed[i]) {
      constant.push_back(i);
      continue;
    }
    if (std::isfinite(s.lower[i])) problem.SetParameterLowerBound(o.x, i, s.lower[i]);
    if (std::isfinite(s.upper[i])) problem.SetParameterUpperBound(o.x, i, s.upper[i]);
  }
  if (static_cast<int>(constant.size()) == s.k) {
    double c = 0;
    problem.Evaluate(ceres::Problem::EvaluateOptions(), &c, nullptr, nullptr, nullptr);
    o.cost = c;
    o.converged = true;
    return o;
  }
  if (!constant.empty()) problem.SetManifold(o.x, new ceres::SubsetManifold(s.k, constant));
  ceres::Solver::Summary summary;
  ceres::Solve(QuietCeresOptions({ceres::DENSE_QR, 500, 1e-16, 1e-16, 1e-15}), &problem, &summary);
  o.cost = summary.final_cost;
  o.converged = summary.IsSolutionUsable();
  o.message = summary.message;
  Covariance(&problem, static_cast<int>(cost_functions.size()), s.k - static_cast<int>(constant.size()), &o, s.k);
  return o;
}

// Physical parameter i = sum_j T[i][j] x_j; its variance T cov T^T.
void MapParams(const Outcome& o, int k, const double t[kMaxParams][kMaxParams], double* value, double* se) {
  for (int i = 0; i < k; ++i) {
    value[i] = 0;
    double var = 0;
    for (int j = 0; j < k; ++j) value[i] += t[i][j] * o.x[j];
    for (int a = 0; a < k; ++a)
      for (int b = 0; b < k; ++b) var += t[i][a] * o.cov[a][b] * t[i][b];
    se[i] = o.cov_ok ? std::sqrt(std::max(var, 0.0)) : kNaN;
  }
}

// A component built through the registry (components/registry.h) whose
// parameters the fit changes through params(), as the network applies a
// binding (every model reads its parameters live:
// tests/components/component_binding_test.cpp). The fitted quantity is then
// the component's own law, not a formula restated here.
class ComponentProbe {
 public:
  ComponentProbe(const std::string& type, const std::vector<std::pair<std::string, double>>& numbers)
      : type_(FindComponentType(type)) {
    if (type_ == nullptr) throw std::logic_error("fit: no component type " + type);
    ParamValues v;
    v.values.assign(type_->params.size(), kNaN);
    v.tables.assign(type_->params.size(), {});
    for (size_t i = 0; i < type_->params.size(); ++i) v.values[i] = type_->params[i].default_si;
    for (const auto& [name, value] : numbers) v.values[Index(name)] = value;
    std::vector<ParamError> errors;
    model_ = type_->make(v, &errors);
    if (!model_) throw std::logic_error("fit: the " + type + " factory refused the fit's parameters");
  }
  int Index(const std::string& name) const { return static_cast<int>(&type_->Param(name) - type_->params.data()); }
  void Set(int index, double value) { model_->params()[index] = value; }
  // Residual 0 of the law at (dp, m), internal unknowns from GuessInternal.
  double Residual(double dp, double m, double rho, double mu) const {
    double x[kMaxInternal] = {0, 0}, r[1 + kMaxInternal] = {0, 0, 0};
    model_->GuessInternal(dp, m, rho, mu, x);
    model_->Evaluate(dp, m, rho, mu, x, r);
    return r[0];
  }

 private:
  const ComponentType* type_;
  std::unique_ptr<Component> model_;
};

// Central differences for a component law that is linear in the fitted
// parameters (a displacement_pump's delivery in displacement and slip, a
// filter's or datasheet_loss's drop in a and b): exact for any step, so a
// large one (1 % of the parameter) keeps their rounding error near 1e-14
// instead of the 1e-10 of Ceres' default 1e-6 step.
ceres::NumericDiffOptions LinearLawSteps() {
  ceres::NumericDiffOptions o;
  o.relative_step_size = 1e-2;
  return o;
}

// Residual functors. Each holds one point's data by value and its scale
// 1/|measured|.
struct PumpCurveCost {
  double q, h, inv, s0, s1, s2, qmax;
  template <class T>
  bool operator()(const T* x, T* r) const {
    const T a0 = x[0] * s0, s = x[1] * s1, a2 = x[2] * s2;
    const T a1 = s - 2.0 * qmax * a2;
    r[0] = (CentrifugalPump::CurveHead(a0, a1, a2, 1.0, q) - h) * inv;
    return true;
  }
};

// A displacement_pump without internal relief: delivery from its law at
// m = 0 (r = m/rho - Q), displacement and slip set through params().
struct DisplacementModel {
  ComponentProbe pump{"displacement_pump", {{"displacement", 1e-6}, {"speed", 1.0}, {"slip", 0.0}}};
  int displacement = pump.Index("displacement"), speed = pump.Index("speed"), slip = pump.Index("slip");
  double Flow(double disp, double cs, double n, double rise, double mu) {
    pump.Set(displacement, disp);
    pump.Set(slip, cs);
    pump.Set(speed, n);
    return -pump.Residual(-rise, 0.0, 1.0, mu);
  }
};

struct DisplacementCost {
  DisplacementModel* model;
  double n, dp, mu, q, inv, sd, sc;
  bool operator()(const double* x, double* r) const {
    r[0] = (model->Flow(x[0] * sd, x[1] * sc, n, dp, mu) - q) * inv;
    return true;
  }
};

// dp = a mu Q + b rho Q^2 of a component law (filter, datasheet_loss): the
// drop of point i at coefficients (a, b).
using QuadLossLaw = std::function<double(double a, double b, double q, double mu, double rho)>;

struct QuadLossCost {
  const QuadLossLaw* law;
  double q, mu, rho, dp, inv, sa, sb;
  bool operator()(const double* x, double* r) const {
    r[0] = ((*law)(x[0] * sa, x[1] * sb, q, mu, rho) - dp) * inv;
    return true;
  }
};

// The filter law with the bypass closed: a = A(), b = B() of a filter whose
// rated flow, viscosity and density are 1 (SI), so element_dp = a and
// housing_dp = b; the drop is residual 0 at dp = 0 with the element drop
// from GuessInternal (exact).
QuadLossLaw FilterLaw() {
  auto probe = std::make_shared<ComponentProbe>(
      "filter", std::vector<std::pair<std::string, double>>{
                    {"rated_flow", 1.0}, {"element_dp", 1.0}, {"rated_viscosity", 1.0}, {"rated_density", 1.0}});
  const int element = probe->Index("element_dp"), housing = probe->Index("housing_dp");
  return [probe, element, housing](double a, double b, double q, double mu, double rho) {
    probe->Set(element, a);
    probe->Set(housing, b);
    return probe->Residual(0.0, rho * q, rho, mu);
  };
}

// The datasheet_loss law (an air cooler's liquid side) with rated flow,
// viscosity and density 1 (SI): rated_dp = a + b, laminar_fraction =
// a / (a + b).
QuadLossLaw DatasheetLossLaw() {
  auto probe = std::make_shared<ComponentProbe>(
      "datasheet_loss", std::vector<std::pair<std::string, double>>{
                            {"rated_flow", 1.0}, {"rated_dp", 1.0}, {"rated_viscosity", 1.0}, {"rated_density", 1.0}});
  const int rated_dp = probe->Index("rated_dp"), laminar = probe->Index("laminar_fraction");
  return [probe, rated_dp, laminar](double a, double b, double q, double mu, double rho) {
    probe->Set(rated_dp, a + b);
    probe->Set(laminar, a + b != 0 ? a / (a + b) : 0.5);
    return probe->Residual(0.0, rho * q, rho, mu);
  };
}

struct CoolerCost {
  double ml, ma, itd, cp, heat, inv, sua, mlr, mar;
  template <class T>
  bool operator()(const T* x, T* r) const {
    const T ua = AirCooler::ScaledConductance(T(x[0] * sua), ml / mlr, ma / mar, x[1], x[2]);
    const T c_l = T(ml * cp), c_a = T(ma * AirCooler::kAirCp);
    const T q = HeatExchanged(HxArrangement::kCrossflowUnmixed, ua, c_l, c_a, T(itd), T(0.0));
    r[0] = (q - heat) * inv;
    return true;
  }
};

struct ValveCost {  // numeric differentiation: RelativeKv takes R as a double
  double x, kv, inv, skv, sr;
  ValveCharacteristic c;
  bool operator()(const double* p, double* r) const {
    r[0] = (p[0] * skv * RelativeKv(c, x, p[1] * sr) - kv) * inv;
    return true;
  }
};

double Inv(double y, double ymax) { return 1.0 / std::max(std::abs(y), 1e-9 * ymax); }

size_t CountDistinct(std::vector<double> v, double rel = 1e-6) {
  std::sort(v.begin(), v.end());
  size_t n = 0;
  for (size_t i = 0; i < v.size(); ++i)
    if (i == 0 || std::abs(v[i] - v[i - 1]) > rel * std::max(std::abs(v[i]), 1e-300)) ++n;
  return n;
}

void AddRange(FitResult* r, const std::string& name, const std::vector<double>& v, Dimension dim) {
  if (v.empty()) return;
  const auto [lo, hi] = std::minmax_element(v.begin(), v.end());
  // A head is a length in metres, not a bore in millimetres.
  const bool head = dim == Dimension::kLength && name == "head";
  const std::string unit = head ? "m" : DisplayUnit(dim, UnitSystem::kSI);
  const double l = head ? *lo : FromSI(*lo, dim, UnitSystem::kSI), h = head ? *hi : FromSI(*hi, dim, UnitSystem::kSI);
  r->ranges.push_back(fmt::format("{} {:.4g} .. {:.4g} {} ({} distinct)", name, l, h, unit, CountDistinct(v)));
  r->range_json[name] = {{"min_si", *lo}, {"max_si", *hi}, {"dimension", DimensionKey(dim)},
                         {"distinct", CountDistinct(v)}};
}

// Column value of row i, else the condition, else NaN.
double Get(const FitData& d, size_t i, const std::string& name) {
  const int c = d.Column(name);
  if (c >= 0) return d.rows[i][c];
  auto it = d.conditions.find(name);
  return it == d.conditions.end() ? kNaN : it->second;
}

bool Has(const FitData& d, const std::string& name) { return d.Column(name) >= 0 || d.conditions.count(name) > 0; }

bool Require(const FitData& d, const std::vector<std::string>& names, const std::string& model, std::string* error) {
  for (const auto& n : names)
    if (d.Column(n) < 0) {
      *error = fmt::format("{}: model {} needs a column \"{}\" (with its unit in brackets)", d.file, model, n);
      return false;
    }
  return true;
}

bool CheckPositive(const FitData& d, const std::vector<size_t>& rows, const std::string& name, bool allow_zero,
                   std::string* error) {
  for (size_t i : rows) {
    const double v = Get(d, i, name);
    if (!(allow_zero ? v >= 0 : v > 0)) {
      *error = fmt::format("{} ({}): {} must be {}, got {:.6g} (SI)", d.Where(i), name, name,
                           allow_zero ? "non-negative" : "positive", v);
      return false;
    }
  }
  return true;
}

bool EnoughPoints(const FitData& d, size_t n, size_t need, const std::string& model, const std::string& what,
                  std::string* error) {
  if (n >= need) return true;
  *error = fmt::format("{}: model {} has {} parameter{} ({}) and needs at least {} points; the data give {}", d.file, model,
                       need, need == 1 ? "" : "s", what, need, n);
  return false;
}

void FillStats(FitResult* r, const std::vector<double>& measured, const std::vector<double>& fitted,
               const std::vector<size_t>& rows, const FitData& d) {
  double ss_res = 0, ss_tot = 0, rel2 = 0, mean = 0;
  for (double m : measured) mean += m;
  mean /= std::max<size_t>(measured.size(), 1);
  const double ymax = std::abs(*std::max_element(measured.begin(), measured.end(),
                                                 [](double a, double b) { return std::abs(a) < std::abs(b); }));
  for (size_t i = 0; i < measured.size(); ++i) {
    FitPointResult p;
    p.row = rows[i];
    p.line = d.lines[rows[i]];
    p.measured = measured[i];
    p.fitted = fitted[i];
    p.residual_relative = (fitted[i] - measured[i]) * Inv(measured[i], ymax);
    r->points.push_back(p);
    ss_res += (fitted[i] - measured[i]) * (fitted[i] - measured[i]);
    ss_tot += (measured[i] - mean) * (measured[i] - mean);
    rel2 += p.residual_relative * p.residual_relative;
  }
  r->used = measured.size();
  r->rms_relative = std::sqrt(rel2 / std::max<size_t>(measured.size(), 1));
  r->r_squared = ss_tot > 0 ? 1.0 - ss_res / ss_tot : (ss_res == 0 ? 1.0 : 0.0);
}

FitParameter Param(const std::string& name, double v, double se, Dimension dim, const std::string& unit,
                   bool at_bound = false) {
  FitParameter p;
  p.name = name;
  p.value = v;
  p.std_error = se;
  p.dim = dim;
  p.unit = unit;
  p.at_bound = at_bound;
  return p;
}

std::string Q(double si, Dimension dim, const char* unit) {
  (void)dim;
  return fmt::format("{:.12g} {}", si, unit);
}

std::vector<size_t> AllRows(const FitData& d) {
  std::vector<size_t> rows(d.rows.size());
  for (size_t i = 0; i < rows.size(); ++i) rows[i] = i;
  return rows;
}

// ---- centrifugal pump

// No rise past the peak: beyond the highest head, no point may stand above
// the lowest head before it (at a smaller flow) by more than the scatter
// of a pump test. The tolerance is 3 % of the peak head, the head
// tolerance of ISO 9906:2012 acceptance grade 1 (from memory): a rise
// within it is not evidence of a rising curve, while a rise beyond it (a
// mixed-up column, two speeds in one file) is refused.
bool CheckNoRisePastPeak(const FitData& d, const std::vector<size_t>& rows, const std::vector<double>& q,
                         const std::vector<double>& h, std::string* error) {
  const size_t peak = std::max_element(h.begin(), h.end()) - h.begin();
  const double rise_tolerance = 0.03 * h[peak];
  size_t low = peak;  // lowest head so far past the peak
  for (size_t i = peak + 1; i < h.size(); ++i) {
    if (q[i] > q[low] && h[i] > h[low] + rise_tolerance) {
      *error = fmt::format("{} (head): head rises with flow past the peak ({:.4g} m at {:.4g} L/min, then {:.4g} m at "
                           "{:.4g} L/min, more than the 3 % test scatter of the {:.4g} m peak); a pump curve must not "
                           "rise past its peak",
                           d.Where(rows[i]), h[low], q[low] * 6e4, h[i], q[i] * 6e4, h[peak]);
      return false;
    }
    if (h[i] < h[low]) low = i;
  }
  return true;
}

// The curve's points sorted by flow, checked; false with *error.
bool CurvePoints(const FitData& d, std::vector<size_t>* rows, std::vector<double>* q, std::vector<double>* h,
                 std::string* error) {
  if (!Require(d, {"flow", "head"}, "centrifugal_pump", error)) return false;
  if (!d.conditions.count("speed")) {
    *error = fmt::format("{}: model centrifugal_pump needs the condition speed (the curve's speed), e.g. \"{}\"", d.file,
                         d.json ? "\"conditions\": {\"speed\": \"2900 rpm\"}" : "# speed = 2900 rpm");
    return false;
  }
  *rows = AllRows(d);
  if (!CheckPositive(d, *rows, "flow", true, error) || !CheckPositive(d, *rows, "head", false, error)) return false;
  if (!EnoughPoints(d, rows->size(), 3, "centrifugal_pump", "a0, a1, a2", error)) return false;
  std::sort(rows->begin(), rows->end(), [&](size_t a, size_t b) { return Get(d, a, "flow") < Get(d, b, "flow"); });
  for (size_t i : *rows) {
    q->push_back(Get(d, i, "flow"));
    h->push_back(Get(d, i, "head"));
  }
  if (CountDistinct(*q) < 3) {
    *error = fmt::format("{}: a quadratic head curve needs at least 3 distinct flows; the data give {}", d.file,
                         CountDistinct(*q));
    return false;
  }
  return CheckNoRisePastPeak(d, *rows, *q, *h, error);
}

// Bounded least squares of the quadratic in (a0, s = dH/dQ at q_max, a2),
// started from the linear least-squares solution; v and se in (a0, a1, a2).
Outcome SolveCurve(const std::vector<double>& q, const std::vector<double>& h, double v[3], double se[3]) {
  const double qmax = q.back(), hmax = *std::max_element(h.begin(), h.end());
  Setup s;
  s.k = 3;
  const double s0 = hmax, s1 = hmax / qmax, s2 = hmax / (qmax * qmax);
  // Start: linear least squares (relative weights) in (a0, s, a2).
  Eigen::MatrixXd a(q.size(), 3);
  Eigen::VectorXd b(q.size());
  for (size_t i = 0; i < q.size(); ++i) {
    const double w = 1.0 / h[i];
    a(i, 0) = w * s0;
    a(i, 1) = w * s1 * q[i];
    a(i, 2) = w * s2 * (q[i] * q[i] - 2.0 * qmax * q[i]);
    b(i) = 1.0;
  }
  const Eigen::Vector3d x0 = a.colPivHouseholderQr().solve(b);
  s.x[0] = std::max(x0(0), 1e-6);
  s.x[1] = std::min(x0(1), 0.0);
  s.x[2] = x0(2);
  s.lower[0] = 1e-9;  // a0 > 0
  s.upper[1] = 0.0;   // dH/dQ <= 0 at q_max
  std::vector<ceres::CostFunction*> f;
  for (size_t i = 0; i < q.size(); ++i)
    f.push_back(new ceres::AutoDiffCostFunction<PumpCurveCost, 1, 3>(
        new PumpCurveCost{q[i], h[i], 1.0 / h[i], s0, s1, s2, qmax}));
  const Outcome o = Solve(s, f);
  const double t[3][3] = {{s0, 0, 0}, {0, s1, -2.0 * qmax * s2}, {0, 0, s2}};
  MapParams(o, 3, t, v, se);
  return o;
}

// Part: the fitted curve sampled so that the head does not rise past the
// second row (the component's rule) and the component's own quadratic
// through the rows is the fitted one.
bool CurvePart(const double v[3], double qmax, nlohmann::json* curve, std::string* error) {
  const double qpeak = v[2] < 0 ? -v[1] / (2 * v[2]) : -1.0;
  const double q0 = 0.0;
  const double qs = (qpeak > q0 && qpeak < qmax) ? qpeak : q0;
  std::vector<double> sample = {q0};
  const int kSamples = 5;
  for (int k = 0; k < kSamples; ++k) {
    const double qk = qs + (qmax - qs) * k / (kSamples - 1);
    if (qk > sample.back() + 1e-9 * qmax) sample.push_back(qk);
  }
  *curve = nlohmann::json::array();
  for (double qk : sample) {
    const double hk = CentrifugalPump::CurveHead(v[0], v[1], v[2], 1.0, qk);
    if (!(hk > 0)) {
      *error = fmt::format("the fitted curve gives a non-positive head ({:.4g} m) at {:.4g} L/min inside the data range",
                           hk, qk * 6e4);
      return false;
    }
    curve->push_back({Q(qk * 6e4, D::kVolumeFlow, "L/min"), Q(hk, D::kLength, "m")});
  }
  return true;
}

// The efficiency column, passed to the part as it is.
bool EfficiencyPart(const FitData& d, const std::vector<size_t>& rows, FitResult* r, std::string* error) {
  const int ec = d.Column("efficiency");
  if (ec < 0) return true;
  nlohmann::json eff = nlohmann::json::array();
  for (size_t i : rows) {
    const double e = d.rows[i][ec];
    if (!(e > 0 && e <= 1)) {
      *error = fmt::format("{} (efficiency): efficiency must be in (0, 1], got {:.4g}", d.Where(i), e);
      return false;
    }
    eff.push_back({Q(d.rows[i][d.Column("flow")] * 6e4, D::kVolumeFlow, "L/min"), e});
  }
  r->part_params["efficiency"] = eff;
  r->notes.push_back("efficiency points are passed to the part as they are (the component fits its own quadratic)");
  return true;
}

FitStatus FitCentrifugal(const FitData& d, FitResult* r, std::string* error) {
  std::vector<size_t> rows;
  std::vector<double> q, h;
  if (!CurvePoints(d, &rows, &q, &h, error)) return FitStatus::kInvalidData;
  const double speed = d.conditions.at("speed"), qmax = q.back();
  double v[3], se[3];
  const Outcome o = SolveCurve(q, h, v, se);
  if (!o.converged) {
    *error = "the curve fit did not converge: " + o.message;
    return FitStatus::kInternal;
  }
  r->measured = "head";
  r->measured_unit = "m";
  r->params.push_back(Param("a0", v[0], se[0], D::kLength, "m"));
  r->params.push_back(Param("a1", v[1], se[1], D::kDimensionless, "m/(m3/s)"));
  r->params.push_back(Param("a2", v[2], se[2], D::kDimensionless, "m/(m3/s)^2"));
  if (o.x[1] >= -1e-12) r->notes.push_back("the slope constraint dH/dQ <= 0 at the largest flow is active");
  std::vector<double> fit;
  for (double qi : q) fit.push_back(CentrifugalPump::CurveHead(v[0], v[1], v[2], 1.0, qi));
  FillStats(r, h, fit, rows, d);
  AddRange(r, "flow", q, D::kVolumeFlow);
  AddRange(r, "head", h, D::kLength);
  r->ranges.push_back(fmt::format("speed {:.6g} rpm (the curve's speed; other speeds by the affinity laws)",
                                  speed * 60 / kTwoPi));
  r->range_json["speed"] = {{"min_si", speed}, {"max_si", speed}, {"dimension", "rotational_speed"}, {"distinct", 1}};
  if (q.front() > 0.2 * qmax)
    r->warnings.push_back(fmt::format("no points below {:.4g} L/min: the head toward shut-off is extrapolated",
                                      q.front() * 6e4));
  r->warnings.push_back(fmt::format("the curve is valid for 0 .. {:.4g} L/min at {:.6g} rpm; beyond it the quadratic is "
                                    "extrapolated (the component warns at run-out)",
                                    qmax * 6e4, speed * 60 / kTwoPi));
  nlohmann::json curve;
  if (!CurvePart(v, qmax, &curve, error)) return FitStatus::kInvalidData;
  r->category = "pump";
  r->type = "centrifugal_pump";
  r->part_params["rated_speed"] = Q(speed * 60 / kTwoPi, D::kRotationalSpeed, "rpm");
  r->part_params["curve"] = curve;
  if (!EfficiencyPart(d, rows, r, error)) return FitStatus::kInvalidData;
  r->description = fmt::format("centrifugal pump fitted to {} points: {:.4g} m at shut-off, {:.4g} m at {:.4g} L/min, "
                               "{:.6g} rpm",
                               q.size(), v[0], fit.back(), qmax * 6e4, speed * 60 / kTwoPi);
  return FitStatus::kOk;
}

// ---- displacement pump

// The pump's points: every row checked, those above the condition
// relief_crack set aside; n, dp, mu (dynamic) and q of the rows used.
struct PumpPoints {
  std::vector<size_t> rows, excluded;
  std::vector<double> n, dp, mu, q;
  double crack = kNaN;
};

bool PumpViscosityGiven(const FitData& d, const std::string& m, bool dyn, std::string* error) {
  if (!dyn && !Has(d, "viscosity")) {
    *error = fmt::format("{}: model {} needs a viscosity (kinematic, with the density condition) or dynamic_viscosity "
                         "column or condition",
                         d.file, m);
    return false;
  }
  if (!dyn && !d.conditions.count("density")) {
    *error = fmt::format("{}: kinematic viscosity needs the condition density (e.g. \"# density = 870 kg/m3\")", d.file);
    return false;
  }
  return true;
}

double PumpViscosity(const FitData& d, size_t i, bool dyn) {
  const double rho = d.conditions.count("density") ? d.conditions.at("density") : kNaN;
  return dyn ? Get(d, i, "dynamic_viscosity") : Get(d, i, "viscosity") * rho;
}

bool DisplacementPoints(const FitData& d, PumpPoints* p, FitResult* r, std::string* error) {
  const std::string m = "displacement_pump";
  if (!Require(d, {"pressure_rise", "flow"}, m, error)) return false;
  if (!Has(d, "speed")) {
    *error = fmt::format("{}: model {} needs a speed column or the condition speed", d.file, m);
    return false;
  }
  const bool dyn = Has(d, "dynamic_viscosity");
  if (!PumpViscosityGiven(d, m, dyn, error)) return false;
  const std::vector<size_t> all = AllRows(d);
  if (!CheckPositive(d, all, "flow", true, error) || !CheckPositive(d, all, "pressure_rise", true, error) ||
      !CheckPositive(d, all, "speed", false, error) ||
      !CheckPositive(d, all, dyn ? "dynamic_viscosity" : "viscosity", false, error))
    return false;
  p->crack = d.conditions.count("relief_crack") ? d.conditions.at("relief_crack") : kNaN;
  for (size_t i : all) {
    if (std::isfinite(p->crack) && Get(d, i, "pressure_rise") > p->crack)
      p->excluded.push_back(i);
    else
      p->rows.push_back(i);
  }
  if (!p->excluded.empty())
    r->notes.push_back(fmt::format("{} point{} above the internal relief cracking pressure {:.4g} bar excluded from the fit",
                                   p->excluded.size(), p->excluded.size() == 1 ? "" : "s", p->crack / 1e5));
  if (!EnoughPoints(d, p->rows.size(), 2, m, "displacement, slip", error)) return false;
  std::vector<double> x;
  for (size_t i : p->rows) {
    p->n.push_back(Get(d, i, "speed"));
    p->dp.push_back(Get(d, i, "pressure_rise"));
    p->mu.push_back(PumpViscosity(d, i, dyn));
    p->q.push_back(Get(d, i, "flow"));
    x.push_back(p->dp.back() / p->mu.back() / p->n.back());
  }
  if (CountDistinct(x) < 2) {
    *error = fmt::format("{}: the data do not separate displacement from slip: they need at least two distinct values of "
                         "pressure rise / (viscosity x speed)",
                         d.file);
    return false;
  }
  if (!(*std::max_element(p->q.begin(), p->q.end()) > 0)) {
    *error = d.file + ": every flow is zero";
    return false;
  }
  return true;
}

// Bounded least squares of (displacement, slip) through the pump's law,
// started from the linear least-squares solution.
Outcome SolveDisplacement(const PumpPoints& p, DisplacementModel* model, double v[3], double se[3]) {
  const double qmax = *std::max_element(p.q.begin(), p.q.end());
  double nmax = *std::max_element(p.n.begin(), p.n.end()), gmax = 0;
  for (size_t i = 0; i < p.dp.size(); ++i) gmax = std::max(gmax, p.dp[i] / p.mu[i]);
  const double sd = qmax * kTwoPi / nmax, sc = gmax > 0 ? qmax / gmax : 1.0;
  Setup s;
  s.k = 2;
  Eigen::MatrixXd a(p.q.size(), 2);
  Eigen::VectorXd b(p.q.size());
  for (size_t i = 0; i < p.q.size(); ++i) {
    const double w = Inv(p.q[i], qmax);
    a(i, 0) = w * sd * p.n[i] / kTwoPi;
    a(i, 1) = -w * sc * p.dp[i] / p.mu[i];
    b(i) = w * p.q[i];
  }
  const Eigen::Vector2d x0 = a.colPivHouseholderQr().solve(b);
  s.x[0] = std::max(x0(0), 1e-6);
  s.x[1] = std::max(x0(1), 0.0);
  s.lower[0] = 1e-12;
  s.lower[1] = 0.0;
  std::vector<ceres::CostFunction*> f;
  for (size_t i = 0; i < p.q.size(); ++i)
    f.push_back(new ceres::NumericDiffCostFunction<DisplacementCost, ceres::CENTRAL, 1, 2>(
        new DisplacementCost{model, p.n[i], p.dp[i], p.mu[i], p.q[i], Inv(p.q[i], qmax), sd, sc}, ceres::TAKE_OWNERSHIP,
        1, LinearLawSteps()));
  const Outcome o = Solve(s, f);
  const double t[3][3] = {{sd, 0, 0}, {0, sc, 0}, {0, 0, 0}};
  MapParams(o, 2, t, v, se);
  return o;
}

// The excluded points (above the relief's crack) with the fitted law's
// delivery beside them.
void AddExcluded(const FitData& d, const PumpPoints& p, const double v[2], DisplacementModel* model, FitResult* r) {
  const double qmax = *std::max_element(p.q.begin(), p.q.end());
  const bool dyn = Has(d, "dynamic_viscosity");
  for (size_t i : p.excluded) {
    FitPointResult pt;
    pt.row = i;
    pt.line = d.lines[i];
    pt.measured = Get(d, i, "flow");
    pt.fitted = model->Flow(v[0], v[1], Get(d, i, "speed"), Get(d, i, "pressure_rise"), PumpViscosity(d, i, dyn));
    pt.residual_relative = (pt.fitted - pt.measured) * Inv(pt.measured, qmax);
    pt.excluded = true;
    r->points.push_back(pt);
  }
}

FitStatus FitDisplacement(const FitData& d, FitResult* r, std::string* error) {
  PumpPoints p;
  if (!DisplacementPoints(d, &p, r, error)) return FitStatus::kInvalidData;
  DisplacementModel model;
  double v[3], se[3];
  const Outcome o = SolveDisplacement(p, &model, v, se);
  if (!o.converged) {
    *error = "the pump fit did not converge: " + o.message;
    return FitStatus::kInternal;
  }
  r->measured = "flow";
  r->measured_unit = "m3/s";
  r->params.push_back(Param("displacement", v[0], se[0], D::kDisplacement, "m3/rev"));
  r->params.push_back(Param("slip", v[1], se[1], D::kSlipCoefficient, "m3", o.x[1] <= 1e-12));
  std::vector<double> fit;
  for (size_t i = 0; i < p.q.size(); ++i) fit.push_back(model.Flow(v[0], v[1], p.n[i], p.dp[i], p.mu[i]));
  FillStats(r, p.q, fit, p.rows, d);
  AddExcluded(d, p, v, &model, r);
  AddRange(r, "pressure_rise", p.dp, D::kPressureDifference);
  AddRange(r, "dynamic_viscosity", p.mu, D::kDynamicViscosity);
  AddRange(r, "speed", p.n, D::kRotationalSpeed);
  AddRange(r, "flow", p.q, D::kVolumeFlow);
  const size_t nmu = CountDistinct(p.mu);
  if (nmu < 3)
    r->warnings.push_back(fmt::format("the data hold {} distinct viscosit{}: the slip's 1/mu scaling is assumed, not "
                                      "verified; a model used across viscosity needs at least 3",
                                      nmu, nmu == 1 ? "y" : "ies"));
  if (CountDistinct(p.n) < 2)
    r->warnings.push_back("the data hold one speed: the geometric flow's proportionality to speed is assumed");
  r->category = "pump";
  r->type = "displacement_pump";
  r->part_params["displacement"] = Q(v[0] * 1e6, D::kDisplacement, "cm3/rev");
  r->part_params["slip"] = Q(v[1], D::kSlipCoefficient, "m3");
  if (std::isfinite(p.crack)) r->part_params["relief_crack"] = Q(p.crack / 1e5, D::kPressureDifference, "bar");
  r->description = fmt::format("positive-displacement pump fitted to {} points: {:.4g} cm3/rev, slip {:.4g} m3",
                               p.q.size(), v[0] * 1e6, v[1]);
  return FitStatus::kOk;
}

// ---- dp = a mu Q + b rho Q^2 (filter, cooler liquid side)

struct QuadLossFit {
  double a = 0, b = 0, se_a = 0, se_b = 0;
  bool a_at_bound = false, b_at_bound = false;
  std::vector<double> fitted;
};

// dp must rise with flow at each viscosity, and the data must separate the
// viscous and inertial parts.
bool QuadLossDataOk(const FitData& d, const std::vector<size_t>& rows, const std::vector<double>& q,
                    const std::vector<double>& mu, const std::vector<double>& rho, const std::vector<double>& dp,
                    const std::string& flow_name, std::string* error) {
  std::vector<size_t> idx(q.size());
  for (size_t i = 0; i < idx.size(); ++i) idx[i] = i;
  std::sort(idx.begin(), idx.end(), [&](size_t x, size_t y) { return mu[x] != mu[y] ? mu[x] < mu[y] : q[x] < q[y]; });
  for (size_t k = 1; k < idx.size(); ++k) {
    const size_t i = idx[k], j = idx[k - 1];
    if (mu[i] == mu[j] && q[i] > q[j] && !(dp[i] > dp[j])) {
      *error = fmt::format("{} (dp): dp does not rise with {} ({:.4g} bar at {:.4g} L/min, then {:.4g} bar at {:.4g} "
                           "L/min, same viscosity)",
                           d.Where(rows[i]), flow_name, dp[j] / 1e5, q[j] * 6e4, dp[i] / 1e5, q[i] * 6e4);
      return false;
    }
  }
  std::vector<double> r1;
  for (size_t i = 0; i < q.size(); ++i) r1.push_back(mu[i] * q[i] / (rho[i] * q[i] * q[i]));
  if (CountDistinct(r1) < 2) {
    *error = fmt::format("{}: the data do not separate the viscous (mu Q) and inertial (rho Q^2) parts: they need at "
                         "least two distinct flows (or viscosities)",
                         d.file);
    return false;
  }
  return true;
}

// Fits dp = a mu Q + b rho Q^2, a, b >= 0, through the component law `law`.
FitStatus FitQuadLoss(const FitData& d, const std::vector<size_t>& rows, const std::vector<double>& q,
                      const std::vector<double>& mu, const std::vector<double>& rho, const std::vector<double>& dp,
                      const std::string& flow_name, const std::string& model, const QuadLossLaw& law,
                      QuadLossFit* out, std::string* error) {
  if (!EnoughPoints(d, q.size(), 2, model, "a, b", error)) return FitStatus::kInvalidData;
  if (!QuadLossDataOk(d, rows, q, mu, rho, dp, flow_name, error)) return FitStatus::kInvalidData;
  double dpmax = 0, m1 = 0, m2 = 0;
  for (size_t i = 0; i < q.size(); ++i) {
    dpmax = std::max(dpmax, dp[i]);
    m1 = std::max(m1, mu[i] * q[i]);
    m2 = std::max(m2, rho[i] * q[i] * q[i]);
  }
  const double sa = dpmax / m1, sb = dpmax / m2;
  Setup s;
  s.k = 2;
  Eigen::MatrixXd a(q.size(), 2);
  Eigen::VectorXd b(q.size());
  for (size_t i = 0; i < q.size(); ++i) {
    a(i, 0) = sa * mu[i] * q[i] / dp[i];
    a(i, 1) = sb * rho[i] * q[i] * q[i] / dp[i];
    b(i) = 1.0;
  }
  const Eigen::Vector2d x0 = a.colPivHouseholderQr().solve(b);
  s.x[0] = std::max(x0(0), 0.0);
  s.x[1] = std::max(x0(1), 0.0);
  if (s.x[0] == 0 && s.x[1] == 0) s.x[0] = s.x[1] = 0.5;
  s.lower[0] = 0.0;
  s.lower[1] = 0.0;
  std::vector<ceres::CostFunction*> f;
  for (size_t i = 0; i < q.size(); ++i)
    f.push_back(new ceres::NumericDiffCostFunction<QuadLossCost, ceres::CENTRAL, 1, 2>(
        new QuadLossCost{&law, q[i], mu[i], rho[i], dp[i], 1.0 / dp[i], sa, sb}, ceres::TAKE_OWNERSHIP, 1,
        LinearLawSteps()));
  const Outcome o = Solve(s, f);
  if (!o.converged) {
    *error = "the pressure-drop fit did not converge: " + o.message;
    return FitStatus::kInternal;
  }
  const double t[3][3] = {{sa, 0, 0}, {0, sb, 0}, {0, 0, 0}};
  double v[3], se[3];
  MapParams(o, 2, t, v, se);
  *out = {v[0], v[1], se[0], se[1], o.x[0] <= 1e-12, o.x[1] <= 1e-12, {}};
  for (size_t i = 0; i < q.size(); ++i) out->fitted.push_back(law(v[0], v[1], q[i], mu[i], rho[i]));
  return FitStatus::kOk;
}

// The filter's datasheet form at the largest flow and the largest
// viscosity of the data; kInvalidData without a viscous part.
FitStatus FilterPart(const FitData& d, const QuadLossFit& lf, double rho, const std::vector<double>& q,
                     const std::vector<double>& nu, FitResult* r, std::string* error) {
  const double qr = *std::max_element(q.begin(), q.end());
  const double nur = *std::max_element(nu.begin(), nu.end());
  const double element = lf.a * nur * rho * qr, housing = lf.b * rho * qr * qr;
  if (!(element > 0)) {
    *error = fmt::format("{}: the fit gives no viscous (element) loss (a = 0); the filter component needs a positive "
                         "element_dp — the data look like a pure orifice loss",
                         d.file);
    return FitStatus::kInvalidData;
  }
  r->category = "filter";
  r->type = "filter";
  r->part_params["rated_flow"] = Q(qr * 6e4, D::kVolumeFlow, "L/min");
  r->part_params["element_dp"] = Q(element / 1e5, D::kPressureDifference, "bar");
  r->part_params["rated_viscosity"] = Q(nur * 1e6, D::kKinematicViscosity, "cSt");
  r->part_params["housing_dp"] = Q(housing / 1e5, D::kPressureDifference, "bar");
  r->part_params["rated_density"] = Q(rho, D::kDensity, "kg/m3");
  r->notes.push_back("no bypass valve in the part: add bypass_crack (and bypass_full) from the datasheet");
  r->description = fmt::format("filter fitted to {} points: {:.4g} bar element + {:.4g} bar housing at {:.4g} L/min, "
                               "{:.4g} cSt",
                               q.size(), element / 1e5, housing / 1e5, qr * 6e4, nur * 1e6);
  return FitStatus::kOk;
}

FitStatus FitFilter(const FitData& d, FitResult* r, std::string* error) {
  const std::string m = "filter";
  if (!Require(d, {"flow", "dp"}, m, error)) return FitStatus::kInvalidData;
  if (!Has(d, "viscosity")) {
    *error = fmt::format("{}: model filter needs a viscosity column or condition (kinematic)", d.file);
    return FitStatus::kInvalidData;
  }
  double rho = 870.0;
  if (d.conditions.count("density")) {
    rho = d.conditions.at("density");
  } else {
    r->notes.push_back("density not given: 870 kg/m3 assumed (the filter component's default, mineral oil)");
  }
  const std::vector<size_t> rows = AllRows(d);
  if (!CheckPositive(d, rows, "flow", false, error) || !CheckPositive(d, rows, "dp", false, error) ||
      !CheckPositive(d, rows, "viscosity", false, error))
    return FitStatus::kInvalidData;
  std::vector<double> q, mu, rh, dp, nu;
  for (size_t i : rows) {
    q.push_back(Get(d, i, "flow"));
    nu.push_back(Get(d, i, "viscosity"));
    mu.push_back(nu.back() * rho);
    rh.push_back(rho);
    dp.push_back(Get(d, i, "dp"));
  }
  QuadLossFit lf;
  const FitStatus st = FitQuadLoss(d, rows, q, mu, rh, dp, "flow", m, FilterLaw(), &lf, error);
  if (st != FitStatus::kOk) return st;
  r->measured = "dp";
  r->measured_unit = "Pa";
  r->params.push_back(Param("a", lf.a, lf.se_a, D::kDimensionless, "1/m3", lf.a_at_bound));
  r->params.push_back(Param("b", lf.b, lf.se_b, D::kDimensionless, "1/m4", lf.b_at_bound));
  FillStats(r, dp, lf.fitted, rows, d);
  AddRange(r, "flow", q, D::kVolumeFlow);
  AddRange(r, "viscosity", nu, D::kKinematicViscosity);
  AddRange(r, "dp", dp, D::kPressureDifference);
  const size_t nnu = CountDistinct(nu);
  if (nnu < 3)
    r->warnings.push_back(fmt::format("the data hold {} distinct viscosit{}: the split between element (~ mu Q) and housing "
                                      "(~ rho Q^2) rests on the flow dependence alone; a model used from cold start to "
                                      "running needs at least 3 viscosities",
                                      nnu, nnu == 1 ? "y" : "ies"));
  return FilterPart(d, lf, rho, q, nu, r, error);
}

// ---- air cooler

struct CoolerPoints {
  double rho = 0, cp = 2000.0;
  std::vector<size_t> rows;
  std::vector<double> ml, vl, ma, itd, heat;
  size_t ir = 0;  // rating point: the point with the largest heat
};

bool ReadCoolerPoints(const FitData& d, CoolerPoints* c, FitResult* r, std::string* error) {
  if (!Require(d, {"heat", "liquid_flow", "air_flow", "itd"}, "air_cooler", error)) return false;
  if (!d.conditions.count("liquid_density")) {
    *error = fmt::format("{}: model air_cooler needs the condition liquid_density (e.g. \"# liquid_density = 870 kg/m3\")",
                         d.file);
    return false;
  }
  c->rho = d.conditions.at("liquid_density");
  if (d.conditions.count("liquid_specific_heat")) {
    c->cp = d.conditions.at("liquid_specific_heat");
  } else {
    r->notes.push_back("liquid_specific_heat not given: 2000 J/(kg K) assumed (mineral oil, common practice)");
  }
  if (!(c->rho > 0) || !(c->cp > 0)) {
    *error = fmt::format("{}: liquid_density and liquid_specific_heat must be positive", d.file);
    return false;
  }
  c->rows = AllRows(d);
  for (const char* col : {"heat", "liquid_flow", "air_flow", "itd"})
    if (!CheckPositive(d, c->rows, col, false, error)) return false;
  for (size_t i : c->rows) {
    c->vl.push_back(Get(d, i, "liquid_flow"));
    c->ml.push_back(c->vl.back() * c->rho);
    c->ma.push_back(Get(d, i, "air_flow"));
    c->itd.push_back(Get(d, i, "itd"));
    c->heat.push_back(Get(d, i, "heat"));
  }
  c->ir = std::max_element(c->heat.begin(), c->heat.end()) - c->heat.begin();
  return true;
}

// Which exponents the data can fix (one flow: held at its default), with
// the warnings that go with it; false when there are too few points.
bool CoolerExponents(const FitData& d, const CoolerPoints& c, Setup* s, FitResult* r, std::string* error) {
  const size_t nl = CountDistinct(c.ml), na = CountDistinct(c.ma);
  s->k = 3;
  s->fixed[1] = nl < 2;
  s->fixed[2] = na < 2;
  s->x[1] = 0.3;
  s->x[2] = 0.6;
  const size_t need = 3 - (s->fixed[1] ? 1 : 0) - (s->fixed[2] ? 1 : 0);
  if (!EnoughPoints(d, c.heat.size(), need, "air_cooler", "UA_r, n_l, n_a", error)) return false;
  if (s->fixed[1])
    r->warnings.push_back("one liquid flow in the data: n_l held at 0.3 (common practice), not fitted");
  if (s->fixed[2]) r->warnings.push_back("one air flow in the data: n_a held at 0.6 (common practice), not fitted");
  if (!s->fixed[1] && nl < 3)
    r->warnings.push_back(fmt::format("{} distinct liquid flows: n_l is fixed by two flows only", nl));
  if (!s->fixed[2] && na < 3) r->warnings.push_back(fmt::format("{} distinct air flows: n_a is fixed by two flows only", na));
  return true;
}

// UA at the rating point from its own heat (e-NTU inverted): the scale and
// start of UA_r; every point's heat must stay below C_min x ITD.
bool CoolerRatedUa(const FitData& d, const CoolerPoints& c, double* ua_r0, std::string* error) {
  const size_t ir = c.ir;
  const double cl = c.ml[ir] * c.cp, ca = c.ma[ir] * AirCooler::kAirCp;
  const double cmin = std::min(cl, ca), cmax = std::max(cl, ca);
  const double eps = c.heat[ir] / (cmin * c.itd[ir]);
  const double ntu = NtuFromEffectiveness(HxArrangement::kCrossflowUnmixed, eps, cmin / cmax);
  if (!std::isfinite(ntu) || !(eps < 1)) {
    *error = fmt::format("{} (heat): {:.4g} W at {:.4g} K ITD implies an effectiveness of {:.3f}, which a crossflow core "
                         "cannot reach (check heat, itd, flows, liquid_specific_heat)",
                         d.Where(c.rows[ir]), c.heat[ir], c.itd[ir], eps);
    return false;
  }
  *ua_r0 = ntu * cmin;
  for (size_t i = 0; i < c.heat.size(); ++i) {
    const double cmin_i = std::min(c.ml[i] * c.cp, c.ma[i] * AirCooler::kAirCp);
    if (!(c.heat[i] < cmin_i * c.itd[i])) {
      *error = fmt::format("{} (heat): {:.4g} W exceeds C_min x ITD = {:.4g} W, the most any exchanger can pass",
                           d.Where(c.rows[i]), c.heat[i], cmin_i * c.itd[i]);
      return false;
    }
  }
  return true;
}

// The heat the cooler passes at point i with UA_r and exponents v.
double CoolerHeat(const CoolerPoints& c, const double v[3], double ml, double ma, double itd) {
  const double ua = AirCooler::ScaledConductance(v[0], ml / c.ml[c.ir], ma / c.ma[c.ir], v[1], v[2]);
  return HeatExchanged(HxArrangement::kCrossflowUnmixed, ua, ml * c.cp, ma * AirCooler::kAirCp, itd, 0.0);
}

Outcome SolveCooler(const CoolerPoints& c, Setup s, double sua, double v[3], double se[3]) {
  s.x[0] = 1.0;
  s.lower[0] = 1e-6;
  for (int k = 1; k < 3; ++k) {
    s.lower[k] = 0.0;
    s.upper[k] = 1.5;
  }
  const double mlr = c.ml[c.ir], mar = c.ma[c.ir];
  std::vector<ceres::CostFunction*> f;
  for (size_t i = 0; i < c.heat.size(); ++i)
    f.push_back(new ceres::AutoDiffCostFunction<CoolerCost, 1, 3>(
        new CoolerCost{c.ml[i], c.ma[i], c.itd[i], c.cp, c.heat[i], 1.0 / c.heat[i], sua, mlr, mar}));
  const Outcome o = Solve(s, f);
  const double t[3][3] = {{sua, 0, 0}, {0, 1, 0}, {0, 0, 1}};
  MapParams(o, 3, t, v, se);
  if (s.fixed[1]) se[1] = kNaN;
  if (s.fixed[2]) se[2] = kNaN;
  return o;
}

// The liquid side from the dp column (datasheet_loss law), or a note that
// the part has none; the description's tail in *hyd.
FitStatus CoolerHydraulics(const FitData& d, const CoolerPoints& c, FitResult* r, std::string* hyd, std::string* error) {
  if (d.Column("dp") < 0) {
    *hyd = "; hydraulic side not in the data: the case must give rated_flow, rated_dp and rated_viscosity";
    r->notes.push_back("no dp column: the part has no hydraulic side; a case using it must add rated_flow, rated_dp and "
                       "rated_viscosity (and may add laminar_fraction) beside \"part\"");
    return FitStatus::kOk;
  }
  if (!d.conditions.count("viscosity")) {
    *error = fmt::format("{}: a dp column needs the condition viscosity (kinematic, of the liquid at the dp points)",
                         d.file);
    return FitStatus::kInvalidData;
  }
  const double nu = d.conditions.at("viscosity");
  if (!CheckPositive(d, c.rows, "dp", false, error)) return FitStatus::kInvalidData;
  std::vector<double> dp, mu(c.vl.size(), nu * c.rho), rh(c.vl.size(), c.rho);
  for (size_t i : c.rows) dp.push_back(Get(d, i, "dp"));
  QuadLossFit lf;
  const FitStatus st = FitQuadLoss(d, c.rows, c.vl, mu, rh, dp, "liquid_flow", "air_cooler", DatasheetLossLaw(), &lf, error);
  if (st != FitStatus::kOk) return st;
  const double qr = *std::max_element(c.vl.begin(), c.vl.end());
  const double lam = lf.a * nu * c.rho * qr, tur = lf.b * c.rho * qr * qr;
  auto& pp = r->part_params;
  pp["rated_flow"] = Q(qr * 6e4, D::kVolumeFlow, "L/min");
  pp["rated_dp"] = Q((lam + tur) / 1e5, D::kPressureDifference, "bar");
  pp["laminar_fraction"] = lam / (lam + tur);
  pp["rated_viscosity"] = Q(nu * 1e6, D::kKinematicViscosity, "cSt");
  r->params.push_back(Param("dp_a", lf.a, lf.se_a, D::kDimensionless, "1/m3", lf.a_at_bound));
  r->params.push_back(Param("dp_b", lf.b, lf.se_b, D::kDimensionless, "1/m4", lf.b_at_bound));
  double rel2 = 0;
  for (size_t i = 0; i < dp.size(); ++i) rel2 += std::pow((lf.fitted[i] - dp[i]) / dp[i], 2);
  r->notes.push_back(fmt::format("liquid-side dp fitted as a mu Q + b rho Q^2 (RMS relative error {:.3g} %)",
                                 100 * std::sqrt(rel2 / dp.size())));
  return FitStatus::kOk;
}

// The part's rating point, consistent with the fit: at the rating flows
// UA = UA_r, so the heat there, inverted by the component, gives UA_r back.
double CoolerPart(const CoolerPoints& c, const double v[3], FitResult* r) {
  const size_t ir = c.ir;
  const double rated_heat = CoolerHeat(c, v, c.ml[ir], c.ma[ir], c.itd[ir]);
  r->category = "cooler";
  r->type = "air_cooler";
  auto& pp = r->part_params;
  pp["rated_heat"] = Q(rated_heat, D::kPower, "W");
  pp["rated_itd"] = Q(c.itd[ir], D::kTemperatureDifference, "K");
  pp["rated_liquid_flow"] = Q(c.vl[ir] * 6e4, D::kVolumeFlow, "L/min");
  pp["rated_air_flow"] = Q(c.ma[ir], D::kMassFlow, "kg/s");
  pp["ua_exponent_liquid"] = v[1];
  pp["ua_exponent_air"] = v[2];
  pp["rated_specific_heat"] = c.cp;
  pp["rated_density"] = Q(c.rho, D::kDensity, "kg/m3");
  pp["arrangement"] = "crossflow_unmixed";
  return rated_heat;
}

FitStatus FitAirCooler(const FitData& d, FitResult* r, std::string* error) {
  CoolerPoints c;
  Setup s;
  double ua_r0 = 0;
  if (!ReadCoolerPoints(d, &c, r, error) || !CoolerExponents(d, c, &s, r, error) || !CoolerRatedUa(d, c, &ua_r0, error))
    return FitStatus::kInvalidData;
  double v[3], se[3];
  const Outcome o = SolveCooler(c, s, ua_r0, v, se);
  if (!o.converged) {
    *error = "the cooler fit did not converge: " + o.message;
    return FitStatus::kInternal;
  }
  r->measured = "heat";
  r->measured_unit = "W";
  r->params.push_back(Param("ua_rated", v[0], se[0], D::kConductance, "W/K"));
  r->params.push_back(Param("ua_exponent_liquid", v[1], se[1], D::kDimensionless, "-",
                            !s.fixed[1] && (o.x[1] <= 1e-9 || o.x[1] >= 1.5 - 1e-9)));
  r->params.push_back(Param("ua_exponent_air", v[2], se[2], D::kDimensionless, "-",
                            !s.fixed[2] && (o.x[2] <= 1e-9 || o.x[2] >= 1.5 - 1e-9)));
  r->params[1].fixed = s.fixed[1];
  r->params[2].fixed = s.fixed[2];
  std::vector<double> fit;
  for (size_t i = 0; i < c.heat.size(); ++i) fit.push_back(CoolerHeat(c, v, c.ml[i], c.ma[i], c.itd[i]));
  FillStats(r, c.heat, fit, c.rows, d);
  AddRange(r, "liquid_flow", c.vl, D::kVolumeFlow);
  AddRange(r, "air_flow", c.ma, D::kMassFlow);
  AddRange(r, "itd", c.itd, D::kTemperatureDifference);
  AddRange(r, "heat", c.heat, D::kPower);
  const double rated_heat = CoolerPart(c, v, r);
  std::string hyd;
  const FitStatus st = CoolerHydraulics(d, c, r, &hyd, error);
  if (st != FitStatus::kOk) return st;
  r->description = fmt::format("oil-to-air cooler fitted to {} points: {:.4g} kW at {:.4g} K ITD, {:.4g} L/min, {:.4g} "
                               "kg/s air{}",
                               c.heat.size(), rated_heat / 1e3, c.itd[c.ir], c.vl[c.ir] * 6e4, c.ma[c.ir], hyd);
  return FitStatus::kOk;
}

// ---- valve

// The condition characteristic (default equal_percentage); false with
// *error for an unknown name.
bool ValveCharacteristicOf(const FitData& d, ValveCharacteristic* c, std::string* cname, std::string* error) {
  *c = ValveCharacteristic::kEqualPercentage;
  *cname = "equal_percentage";
  if (!d.condition_text.count("characteristic")) return true;
  *cname = d.condition_text.at("characteristic");
  if (*cname == "linear") {
    *c = ValveCharacteristic::kLinear;
  } else if (*cname == "quick_opening") {
    *c = ValveCharacteristic::kQuickOpening;
  } else if (*cname != "equal_percentage") {
    *error = fmt::format("{}: condition characteristic \"{}\" is not one of equal_percentage, linear, quick_opening",
                         d.WhereCondition("characteristic"), *cname);
    return false;
  }
  return true;
}

// Openings and Kv sorted by opening, checked.
bool ValvePoints(const FitData& d, bool eq, std::vector<size_t>* rows, std::vector<double>* x, std::vector<double>* kv,
                 std::string* error) {
  *rows = AllRows(d);
  for (size_t i : *rows) {
    const double xi = Get(d, i, "opening");
    if (!(xi >= 0 && xi <= 1)) {
      *error = fmt::format("{} (opening): opening must be within 0 .. 1 (0 .. 100 %), got {:.4g}", d.Where(i), xi);
      return false;
    }
  }
  if (!CheckPositive(d, *rows, "kv", false, error)) return false;
  if (!EnoughPoints(d, rows->size(), eq ? 2 : 1, "valve", eq ? "kvs, rangeability" : "kvs", error)) return false;
  std::sort(rows->begin(), rows->end(), [&](size_t a, size_t b) { return Get(d, a, "opening") < Get(d, b, "opening"); });
  for (size_t i : *rows) {
    x->push_back(Get(d, i, "opening"));
    kv->push_back(Get(d, i, "kv"));
  }
  for (size_t i = 1; i < x->size(); ++i)
    if ((*x)[i] > (*x)[i - 1] && !((*kv)[i] > (*kv)[i - 1])) {
      *error = fmt::format("{} (kv): Kv does not rise with opening ({:.4g} at {:.3g}, then {:.4g} at {:.3g})",
                           d.Where((*rows)[i]), (*kv)[i - 1], (*x)[i - 1], (*kv)[i], (*x)[i]);
      return false;
    }
  if (eq && CountDistinct(*x) < 2) {
    *error = d.file + ": the rangeability needs at least two distinct openings";
    return false;
  }
  return true;
}

constexpr double kRangeabilityScale = 50.0;

Outcome SolveValve(ValveCharacteristic c, const std::vector<double>& x, const std::vector<double>& kv, double v[3],
                   double se[3]) {
  const bool eq = c == ValveCharacteristic::kEqualPercentage;
  const double kvmax = kv.back(), sr = kRangeabilityScale;
  Setup s;
  s.k = 2;
  s.x[0] = 1.0;
  s.x[1] = 1.0;
  s.lower[0] = 1e-9;
  s.lower[1] = 1.01 / sr;
  s.upper[1] = 1e4 / sr;
  s.fixed[1] = !eq;
  if (eq) {
    // Start: R from the two ends of the data (R^(x_hi - x_lo) = kv_hi/kv_lo).
    const double dx = x.back() - x.front();
    if (dx > 0.05 && x.front() >= 0.05) {
      const double rr = std::pow(kv.back() / kv.front(), 1.0 / dx);
      s.x[1] = std::clamp(rr, 1.5, 5e3) / sr;
    }
    s.x[0] = kv.back() / RelativeKv(c, x.back(), s.x[1] * sr) / kvmax;
  } else {
    s.x[0] = kv.back() / std::max(RelativeKv(c, x.back()), 1e-6) / kvmax;
  }
  std::vector<ceres::CostFunction*> f;
  for (size_t i = 0; i < x.size(); ++i)
    f.push_back(new ceres::NumericDiffCostFunction<ValveCost, ceres::RIDDERS, 1, 2>(
        new ValveCost{x[i], kv[i], 1.0 / kv[i], kvmax, sr, c}));
  const Outcome o = Solve(s, f);
  const double t[3][3] = {{kvmax, 0, 0}, {0, sr, 0}, {0, 0, 0}};
  MapParams(o, 2, t, v, se);
  return o;
}

FitStatus FitValve(const FitData& d, FitResult* r, std::string* error) {
  if (!Require(d, {"opening", "kv"}, "valve", error)) return FitStatus::kInvalidData;
  ValveCharacteristic c;
  std::string cname;
  if (!ValveCharacteristicOf(d, &c, &cname, error)) return FitStatus::kInvalidData;
  const bool eq = c == ValveCharacteristic::kEqualPercentage;
  std::vector<size_t> rows;
  std::vector<double> x, kv;
  if (!ValvePoints(d, eq, &rows, &x, &kv, error)) return FitStatus::kInvalidData;
  double v[3], se[3];
  const Outcome o = SolveValve(c, x, kv, v, se);
  if (!o.converged) {
    *error = "the valve fit did not converge: " + o.message;
    return FitStatus::kInternal;
  }
  const double sr = kRangeabilityScale;
  r->measured = "kv";
  r->measured_unit = "Kv";
  r->params.push_back(Param("kvs", v[0], se[0], D::kFlowCoefficientKv, "Kv"));
  if (eq)
    r->params.push_back(Param("rangeability", v[1], se[1], D::kDimensionless, "-",
                              o.x[1] <= 1.01 / sr + 1e-12 || o.x[1] >= 1e4 / sr - 1e-9));
  std::vector<double> fit;
  for (double xi : x) fit.push_back(v[0] * RelativeKv(c, xi, eq ? v[1] : kDefaultRangeability));
  FillStats(r, kv, fit, rows, d);
  AddRange(r, "opening", x, D::kDimensionless);
  AddRange(r, "kv", kv, D::kFlowCoefficientKv);
  if (x.back() < 0.9)
    r->warnings.push_back(fmt::format("largest opening {:.3g}: Kvs (fully open) is extrapolated from the characteristic",
                                      x.back()));
  if (x.front() > 0.3)
    r->warnings.push_back(fmt::format("smallest opening {:.3g}: the characteristic below it is assumed, not measured",
                                      x.front()));
  r->category = "valve";
  r->type = "valve";
  r->part_params["kvs"] = v[0];
  r->part_params["characteristic"] = cname;
  if (eq) r->part_params["rangeability"] = v[1];
  r->description = eq ? fmt::format("valve fitted to {} points: Kvs {:.4g}, equal percentage, R = {:.3g}", x.size(), v[0], v[1])
                      : fmt::format("valve fitted to {} points: Kvs {:.4g}, {}", x.size(), v[0], cname);
  return FitStatus::kOk;
}

}  // namespace

FitStatus FitModel(const FitData& data, const std::string& model, FitResult* out, std::string* error) {
  *out = FitResult();
  out->model = model;
  if (data.rows.empty()) {
    *error = data.file + ": no data rows";
    return FitStatus::kInvalidData;
  }
  try {
    if (model == "centrifugal_pump") return FitCentrifugal(data, out, error);
    if (model == "displacement_pump") return FitDisplacement(data, out, error);
    if (model == "filter") return FitFilter(data, out, error);
    if (model == "air_cooler") return FitAirCooler(data, out, error);
    if (model == "valve") return FitValve(data, out, error);
  } catch (const std::exception& e) {
    *error = std::string("internal error in the fit: ") + e.what();
    return FitStatus::kInternal;
  }
  std::vector<std::string> names;
  for (const auto& m : FitModels()) names.push_back(m.name);
  *error = fmt::format("unknown model \"{}\"; models: {}", model, fmt::join(names, ", "));
  return FitStatus::kInvalidData;
}

nlohmann::json FitPartEntry(const FitResult& r, const std::string& id, const std::string& data_file) {
  return {{"id", id},
          {"category", r.category},
          {"type", r.type},
          {"source", fmt::format("fitted by loopwright fit --model {} from {} ({} points, RMS relative error {:.3g} %)",
                                 r.model, data_file, r.used, 100 * r.rms_relative)},
          {"description", r.description},
          {"params", r.part_params}};
}

}  // namespace loopwright
