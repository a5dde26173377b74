#include "library/table_fluid.h"

#include <algorithm>
#include <cmath>

#include "library/units.h"

namespace loopwright {
namespace {

double Sign(double v) { return (v > 0) - (v < 0); }

bool Fail(std::string* error, const std::string& msg) {
  if (error) *error = msg;
  return false;
}

bool CheckColumn(const std::vector<double>& c, const char* name, size_t n,
                 std::string* error) {
  if (c.size() != n)
    return Fail(error, std::string("table column '") + name + "' has " +
                           std::to_string(c.size()) + " rows, the temperature column has " +
                           std::to_string(n));
  for (size_t i = 0; i < n; ++i)
    if (!(c[i] > 0 && std::isfinite(c[i])))
      return Fail(error, std::string("table column '") + name + "' row " + std::to_string(i) +
                             ": value " + FormatNumber(c[i]) + " must be finite and positive");
  return true;
}

}  // namespace

MonotoneCubic::MonotoneCubic(std::vector<double> x, std::vector<double> y)
    : x_(std::move(x)), y_(std::move(y)), d_(x_.size(), 0.0) {
  const size_t n = x_.size();
  if (n < 2) return;
  std::vector<double> h(n - 1), s(n - 1);
  for (size_t i = 0; i + 1 < n; ++i) {
    h[i] = x_[i + 1] - x_[i];
    s[i] = (y_[i + 1] - y_[i]) / h[i];
  }
  if (n == 2) {
    d_[0] = d_[1] = s[0];
    return;
  }
  for (size_t i = 1; i + 1 < n; ++i) {  // Steffen (1990) Eqs. 11, 13
    const double p = (s[i - 1] * h[i] + s[i] * h[i - 1]) / (h[i - 1] + h[i]);
    d_[i] = (Sign(s[i - 1]) + Sign(s[i])) *
            std::min({std::fabs(s[i - 1]), std::fabs(s[i]), 0.5 * std::fabs(p)});
  }
  // Ends: Steffen (1990) Eqs. 26–27 (and their mirror image at the last node).
  auto end_slope = [](double s0, double s1, double h0, double h1) {
    const double p = s0 * (1.0 + h0 / (h0 + h1)) - s1 * h0 / (h0 + h1);
    if (p * s0 <= 0) return 0.0;
    if (std::fabs(p) > 2.0 * std::fabs(s0)) return 2.0 * s0;
    return p;
  };
  d_[0] = end_slope(s[0], s[1], h[0], h[1]);
  d_[n - 1] = end_slope(s[n - 2], s[n - 3], h[n - 2], h[n - 3]);
}

void MonotoneCubic::Eval(double x, double* y, double* dy_dx) const {
  const size_t n = x_.size();
  if (n == 0) {
    *y = 0;
    *dy_dx = 0;
    return;
  }
  if (!(x > x_.front())) {  // also NaN
    *y = y_.front();
    *dy_dx = (x == x_.front()) ? d_.front() : 0.0;
    return;
  }
  if (x >= x_.back()) {
    *y = y_.back();
    *dy_dx = (x == x_.back()) ? d_.back() : 0.0;
    return;
  }
  const size_t i = static_cast<size_t>(std::upper_bound(x_.begin(), x_.end(), x) - x_.begin()) - 1;
  const double h = x_[i + 1] - x_[i];
  const double s = (y_[i + 1] - y_[i]) / h;
  const double t = x - x_[i];
  const double a = (d_[i] + d_[i + 1] - 2.0 * s) / (h * h);
  const double b = (3.0 * s - 2.0 * d_[i] - d_[i + 1]) / h;
  *y = ((a * t + b) * t + d_[i]) * t + y_[i];
  *dy_dx = (3.0 * a * t + 2.0 * b) * t + d_[i];
}

std::shared_ptr<TableFluid> TableFluid::Create(const TableFluidColumns& c, std::string* error) {
  const size_t n = c.T_K.size();
  if (n < 2) {
    Fail(error, "a property table needs at least 2 rows, got " + std::to_string(n));
    return nullptr;
  }
  for (size_t i = 0; i < n; ++i) {
    if (!(c.T_K[i] > 0 && std::isfinite(c.T_K[i]))) {
      Fail(error, "table column 'T' row " + std::to_string(i) + ": temperature " +
                      FormatNumber(c.T_K[i]) + " K must be finite and positive");
      return nullptr;
    }
    if (i > 0 && !(c.T_K[i] > c.T_K[i - 1])) {
      Fail(error, "table column 'T' must be strictly ascending: row " + std::to_string(i) +
                      " (" + FormatNumber(c.T_K[i]) + " K) follows " + FormatNumber(c.T_K[i - 1]) + " K");
      return nullptr;
    }
  }
  const bool has_nu = !c.nu_m2s.empty(), has_mu = !c.mu_Pas.empty();
  if (has_nu == has_mu) {
    Fail(error, has_nu ? "a property table takes either a kinematic (nu) or a dynamic (mu) "
                         "viscosity column, not both"
                       : "a property table needs a viscosity column (nu or mu)");
    return nullptr;
  }
  if (!CheckColumn(has_nu ? c.nu_m2s : c.mu_Pas, has_nu ? "nu" : "mu", n, error) ||
      !CheckColumn(c.rho_kgm3, "rho", n, error) || !CheckColumn(c.cp_JkgK, "cp", n, error) ||
      !CheckColumn(c.k_WmK, "k", n, error))
    return nullptr;
  std::vector<double> ln_nu(n);
  for (size_t i = 0; i < n; ++i)
    ln_nu[i] = std::log(has_nu ? c.nu_m2s[i] : c.mu_Pas[i] / c.rho_kgm3[i]);
  std::shared_ptr<TableFluid> f(new TableFluid());
  f->ln_nu_ = MonotoneCubic(c.T_K, std::move(ln_nu));
  f->rho_ = MonotoneCubic(c.T_K, c.rho_kgm3);
  f->cp_ = MonotoneCubic(c.T_K, c.cp_JkgK);
  f->k_ = MonotoneCubic(c.T_K, c.k_WmK);
  f->t_min_ = c.T_K.front();
  f->t_max_ = c.T_K.back();
  return f;
}

FluidProps TableFluid::Evaluate(double T_K, double /*p_abs_Pa*/) const {
  FluidProps f;
  double ln_nu, dln_nu;
  ln_nu_.Eval(T_K, &ln_nu, &dln_nu);
  rho_.Eval(T_K, &f.rho, &f.drho_dT);
  cp_.Eval(T_K, &f.cp, &f.dcp_dT);
  k_.Eval(T_K, &f.k, &f.dk_dT);
  const double nu = std::exp(ln_nu);
  f.mu = nu * f.rho;
  f.dmu_dT = nu * dln_nu * f.rho + nu * f.drho_dT;
  return f;
}

RangeReport TableFluid::InRange(double T_K, double /*p_abs_Pa*/) const {
  RangeReport r;
  const std::string range = " (table covers " + FormatDegC(t_min_) + " .. " + FormatDegC(t_max_) +
                            " degC; properties held at the end row)";
  if (!std::isfinite(T_K) || T_K < t_min_) {
    r.in_range = false;
    r.message = "temperature " + FormatDegC(T_K) + " degC is below the property table's first row " +
                FormatDegC(t_min_) + " degC" + range;
  } else if (T_K > t_max_) {
    r.in_range = false;
    r.message = "temperature " + FormatDegC(T_K) + " degC is above the property table's last row " +
                FormatDegC(t_max_) + " degC" + range;
  }
  return r;
}

}  // namespace loopwright
