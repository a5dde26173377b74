#include "components/datasheet_loss.h"

#include <Eigen/Dense>

#include <fmt/format.h>

namespace loopwright {

bool DatasheetLoss::Fit(const std::vector<std::vector<double>>& rows, double mu_r, double rho_r, double* a, double* b) {
  // Minimise sum ((a mu Q + b rho Q^2 - dp)/dp)^2 over a, b >= 0 (2-variable
  // NNLS: the unconstrained solution, else the better single-term fit).
  const int n = static_cast<int>(rows.size());
  Eigen::MatrixXd A(n, 2);
  Eigen::VectorXd y(n);
  for (int i = 0; i < n; ++i) {
    const double q = rows[i][0], dp = rows[i][1];
    if (!(q > 0 && dp > 0)) return false;
    A(i, 0) = mu_r * q / dp;
    A(i, 1) = rho_r * q * q / dp;
    y[i] = 1.0;
  }
  Eigen::Vector2d x = A.colPivHouseholderQr().solve(y);
  if (x.allFinite() && x[0] >= 0 && x[1] >= 0) {
    *a = x[0];
    *b = x[1];
    return true;
  }
  double best = INFINITY;
  for (int k = 0; k < 2; ++k) {
    double c = A.col(k).dot(y) / A.col(k).squaredNorm();
    if (!(c >= 0)) continue;
    double res = (A.col(k) * c - y).squaredNorm();
    if (res < best) {
      best = res;
      *a = k == 0 ? c : 0.0;
      *b = k == 1 ? c : 0.0;
    }
  }
  return std::isfinite(best);
}

double DatasheetLoss::A(const double* p) const {
  const double mu_r = p[kRatedViscosity] * p[kRatedDensity];
  if (curve_.from_points) return curve_.a_mu_r / mu_r;
  return p[kLaminarFraction] * p[kRatedDp] / (mu_r * p[kRatedFlow]);
}

double DatasheetLoss::B(const double* p) const {
  if (curve_.from_points) return curve_.b_rho_r / p[kRatedDensity];
  return (1 - p[kLaminarFraction]) * p[kRatedDp] / (p[kRatedDensity] * p[kRatedFlow] * p[kRatedFlow]);
}

LinearGuess DatasheetLoss::LinearizeWith(const double* p, double rho, double mu) const {
  // Secant through the largest datasheet flow.
  const double q = QMax(p);
  const double dp = A(p) * mu * q + B(p) * rho * q * q;
  LinearGuess g;
  g.g = dp > 0 ? rho * q / dp : 0.0;
  return g;
}

void DatasheetLoss::DescribeWith(const double* p, const BranchResult& b, ComponentReport* out) const {
  const double q = b.m / b.rho, q_max = QMax(p);
  out->items.push_back({"viscous_dp", A(p) * b.mu * q, Dimension::kPressureDifference, ""});
  out->items.push_back({"inertial_dp", B(p) * b.rho * q * std::abs(q), Dimension::kPressureDifference, ""});
  if (std::abs(q) > 1.2 * q_max)
    out->warnings.push_back(fmt::format("flow {:.3g} L/min is beyond 1.2 x the datasheet's largest flow ({:.3g} L/min)",
                                        q * 6e4, q_max * 6e4));
}

std::vector<ParamSpec> DatasheetLossParams() {
  std::vector<ParamSpec> p = {
      Table("points", {{"flow", Dimension::kVolumeFlow}, {"dp", Dimension::kPressureDifference}}, 1,
            "datasheet points [flow, dp] at rated_viscosity and rated_density", false),
      Positive("rated_flow", Dimension::kVolumeFlow, "flow of the rated pressure drop", false),
      Positive("rated_dp", Dimension::kPressureDifference, "pressure drop at rated flow", false),
      Num("laminar_fraction", Dimension::kDimensionless, "viscous share of rated_dp (0..1)", false, 0.5).Range(0, 1),
      Positive("rated_viscosity", Dimension::kKinematicViscosity, "kinematic viscosity of the datasheet"),
      Positive("rated_density", Dimension::kDensity, "density of the datasheet", false, 870.0),
  };
  return p;
}

std::unique_ptr<DatasheetLoss> MakeDatasheetLoss(const ParamValues& v, std::vector<ParamError>* e) {
  using D = DatasheetLoss;
  const bool pts = !v.tables[D::kPoints].empty();
  const bool rated = !std::isnan(v.values[D::kRatedFlow]) || !std::isnan(v.values[D::kRatedDp]);
  const double rho = v.values[D::kRatedDensity], mu = v.values[D::kRatedViscosity] * rho;
  D::Curve curve;
  if (pts == rated) {
    e->push_back({"", "give either points or rated_flow with rated_dp"});
  } else if (pts) {
    const auto& rows = v.tables[D::kPoints];
    for (size_t i = 0; i < rows.size(); ++i) {
      if (!(rows[i][0] > 0 && rows[i][1] > 0)) e->push_back({"points/" + std::to_string(i), "flow and dp must be positive"});
      if (i > 0 && !(rows[i][0] > rows[i - 1][0])) e->push_back({"points/" + std::to_string(i), "flows must be strictly ascending"});
      if (i > 0 && !(rows[i][1] > rows[i - 1][1])) e->push_back({"points/" + std::to_string(i), "dp must rise with flow"});
      curve.q_max = std::max(curve.q_max, rows[i][0]);
    }
    double a = 0, b = 0;
    if (e->empty() && !D::Fit(rows, mu, rho, &a, &b)) e->push_back({"points", "the points cannot be fitted by a mu Q + b rho Q^2"});
    curve.from_points = true;
    curve.a_mu_r = a * mu;
    curve.b_rho_r = b * rho;
  } else if (std::isnan(v.values[D::kRatedFlow]) || std::isnan(v.values[D::kRatedDp])) {
    e->push_back({"", "rated_flow and rated_dp go together"});
  }
  if (!e->empty()) return nullptr;
  return std::make_unique<D>(v, curve);
}

ComponentType DatasheetLossType() {
  ComponentType t;
  t.name = "datasheet_loss";
  t.summary = "passage known by its datasheet drop: dp = a mu Q + b rho Q|Q|";
  t.roles = kRoleLine;
  t.params = DatasheetLossParams();
  t.make = [](const ParamValues& v, std::vector<ParamError>* e) -> std::unique_ptr<Component> {
    return MakeDatasheetLoss(v, e);
  };
  return t;
}

}  // namespace loopwright
