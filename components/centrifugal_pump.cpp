#include "components/centrifugal_pump.h"

#include <Eigen/Dense>
#include <algorithm>

#include <fmt/format.h>

namespace loopwright {

CentrifugalPump::CentrifugalPump(const ParamValues& v, const double head[3], const double eff[3], double q_max,
                                 bool has_eff)
    : q_max_(q_max), has_eff_(has_eff) {
  params_ = v.values;
  std::copy(head, head + 3, h_);
  std::copy(eff, eff + 3, e_);
}

bool CentrifugalPump::FitQuadratic(const std::vector<std::vector<double>>& rows, double c[3]) {
  const int n = static_cast<int>(rows.size());
  if (n < 3) return false;
  double qs = 0;
  for (auto& r : rows) qs = std::max(qs, std::abs(r[0]));
  if (qs <= 0) return false;
  Eigen::MatrixXd A(n, 3);
  Eigen::VectorXd y(n);
  for (int i = 0; i < n; ++i) {
    double t = rows[i][0] / qs;  // scaled for conditioning
    A(i, 0) = 1;
    A(i, 1) = t;
    A(i, 2) = t * t;
    y[i] = rows[i][1];
  }
  Eigen::Vector3d x = A.colPivHouseholderQr().solve(y);
  if (!x.allFinite()) return false;
  c[0] = x[0];
  c[1] = x[1] / qs;
  c[2] = x[2] / (qs * qs);
  return true;
}

double CentrifugalPump::Head(double q) const {
  const double s = params_[kSpeed] / params_[kRatedSpeed];
  return CurveHead(h_[0], h_[1], h_[2], s, q);
}

double CentrifugalPump::Efficiency(double q) const {
  if (!has_eff_) return 0.7;
  const double s = params_[kSpeed] / params_[kRatedSpeed];
  const double t = s > 0 ? q / s : 0;
  return std::clamp(e_[0] + e_[1] * t + e_[2] * t * t, 0.05, 1.0);
}

LinearGuess CentrifugalPump::Linearize(double rho, double mu) const {
  (void)mu;
  const double s = params_[kSpeed] / params_[kRatedSpeed];
  const double h0 = h_[0] * s * s;
  const double qm = q_max_ * std::max(s, 1e-3);
  double slope = (Head(qm) - h0) / qm;  // [m per m3/s], negative
  if (!(slope < 0)) slope = -std::max(h0, 1.0) / qm;
  // -dp = rho g (h0 + slope Q)  ->  m = rho Q = rho (h0 + dp/(rho g)) / (-slope)
  LinearGuess g;
  g.g = 1.0 / (9.80665 * -slope);
  g.m0 = rho * h0 / -slope;
  return g;
}

void CentrifugalPump::Describe(const BranchResult& b, ComponentReport* out) const {
  const double q = b.m / b.rho;
  const double s = params_[kSpeed] / params_[kRatedSpeed];
  const double head = -b.dp / (b.rho * 9.80665);
  const double eta = Efficiency(q);
  out->items.push_back({"head", head, Dimension::kLength, ""});
  out->items.push_back({"pressure_rise", -b.dp, Dimension::kPressureDifference, ""});
  out->items.push_back({"flow_fraction_of_curve", s > 0 ? q / (s * q_max_) : 0.0, Dimension::kDimensionless, ""});
  out->items.push_back({"efficiency", eta, Dimension::kDimensionless, has_eff_ ? "" : "assumed 0.7"});
  out->shaft_power_W = b.rho * 9.80665 * std::max(q, 0.0) * std::max(head, 0.0) / eta;
  out->items.push_back({"shaft_power", out->shaft_power_W, Dimension::kPower, ""});
  if (q < 0) out->warnings.push_back("reverse flow through the pump: the curve is extrapolated");
  if (s > 0 && q > s * q_max_ * 1.0000001)
    out->warnings.push_back(fmt::format("flow {:.3g} L/min is beyond the datasheet curve (run-out; extrapolated)", q * 60000));
  if (b.mu > 5e-3)
    out->warnings.push_back(fmt::format("viscosity {:.3g} mPa.s: the water curve is used without viscous correction (ANSI/HI 9.6.7)", b.mu * 1e3));
}

ComponentType CentrifugalPumpType() {
  ComponentType t;
  t.name = "centrifugal_pump";
  t.summary = "rotodynamic pump: datasheet head-flow curve with the affinity laws";
  t.roles = kRolePump;
  t.params = {
      Table("curve", {{"flow", Dimension::kVolumeFlow}, {"head", Dimension::kLength}}, 3,
            "head-flow points at rated_speed: rows [flow, head]"),
      Num("speed", Dimension::kRotationalSpeed, "shaft speed").Min(0).Knob(),
      Positive("rated_speed", Dimension::kRotationalSpeed, "speed of the datasheet curve"),
      Table("efficiency", {{"flow", Dimension::kVolumeFlow}, {"efficiency", Dimension::kDimensionless}}, 3,
            "efficiency points at rated_speed: rows [flow, efficiency]", false),
  };
  t.make = [](const ParamValues& v, std::vector<ParamError>* e) -> std::unique_ptr<Component> {
    const auto& rows = v.tables[CentrifugalPump::kCurve];
    for (size_t i = 1; i < rows.size(); ++i) {
      if (!(rows[i][0] > rows[i - 1][0])) e->push_back({"curve/" + std::to_string(i), "flows must be strictly ascending"});
      if (i >= 2 && rows[i][1] > rows[i - 1][1])
        e->push_back({"curve/" + std::to_string(i), "head must not rise with flow past the second point"});
    }
    for (size_t i = 0; i < rows.size(); ++i)
      if (rows[i][0] < 0 || rows[i][1] < 0) e->push_back({"curve/" + std::to_string(i), "flow and head must not be negative"});
    double h[3] = {0, 0, 0}, eff[3] = {0.7, 0, 0};
    if (e->empty() && !CentrifugalPump::FitQuadratic(rows, h)) e->push_back({"curve", "the curve points do not define a quadratic"});
    const auto& er = v.tables[CentrifugalPump::kEfficiency];
    bool has_eff = !er.empty();
    if (has_eff) {
      for (size_t i = 0; i < er.size(); ++i)
        if (!(er[i][1] > 0 && er[i][1] <= 1)) e->push_back({"efficiency/" + std::to_string(i), "efficiency must be in (0, 1]"});
      if (e->empty() && !CentrifugalPump::FitQuadratic(er, eff)) e->push_back({"efficiency", "the efficiency points do not define a quadratic"});
    }
    if (!e->empty()) return nullptr;
    return std::make_unique<CentrifugalPump>(v, h, eff, rows.back()[0], has_eff);
  };
  return t;
}

}  // namespace loopwright
