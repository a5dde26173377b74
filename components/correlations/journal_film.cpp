#include "components/correlations/journal_film.h"

#include <algorithm>
#include <array>
#include <cmath>
#include <limits>

namespace loopwright {

namespace {
constexpr double kPi = 3.14159265358979323846;
constexpr double kDeg = kPi / 180.0;

// d ln S / d eps of the short-bearing load relation.
double OcvirkLogSlope(double e) {
  const double q = kPi * kPi * (1.0 - e * e) + 16.0 * e * e;
  return -4.0 * e / (1.0 - e * e) - 1.0 / e - 0.5 * (32.0 * e - 2.0 * kPi * kPi * e) / q;
}

// eps and phi [deg] of one table at S (log-S interpolation; light-load and
// heavy-load ends as in the header); the slope d eps / d ln S; a flag when
// beyond the last row.
struct TableRead {
  double eps, phi_deg, deps_dlns;
  bool heavy;
};

// ln S of every row of the three tables, computed once: a film is read at
// every residual of a journal bearing, and the rows' logarithms were most
// of its cost (the same std::log of the same constants, so the same bits).
using RowLogs = std::array<std::array<double, kRaimondiBoydRows>, 3>;
const RowLogs& TableLogS() {
  static const RowLogs logs = [] {
    RowLogs out{};
    for (int i = 0; i < 3; ++i)
      for (int k = 0; k < kRaimondiBoydRows; ++k) out[i][k] = std::log(kRaimondiBoyd[i].rows[k].s);
    return out;
  }();
  return logs;
}

// Table t at S, with ln_rows its rows' ln S and ln_s = ln S.
TableRead ReadTable(const RaimondiBoydTable& t, const std::array<double, kRaimondiBoydRows>& ln_rows, double s,
                    double ln_s) {
  const RaimondiBoydRow* r = t.rows;
  const int n = kRaimondiBoydRows;
  if (s >= r[0].s) {  // light load: S eps = const, phi linear to 90 deg at eps = 0
    const double e = r[0].eps * r[0].s / s;
    const double f = e / r[0].eps;
    return {e, 90.0 + (r[0].phi_deg - 90.0) * f, -e, false};
  }
  int k = 0;  // the interval [k, k+1] holding S (S falls along the table)
  while (k < n - 2 && s < r[k + 1].s) ++k;
  const double x0 = ln_rows[k], x1 = ln_rows[k + 1], x = ln_s;
  const double w = (x - x0) / (x1 - x0);
  const double slope = (r[k + 1].eps - r[k].eps) / (x1 - x0);
  double e = r[k].eps + w * (r[k + 1].eps - r[k].eps);
  const double phi = r[k].phi_deg + w * (r[k + 1].phi_deg - r[k].phi_deg);
  const bool heavy = s < r[n - 1].s;
  if (e > kMaxEccentricity) return {kMaxEccentricity, std::max(0.0, phi), 0.0, true};
  return {e, std::max(0.0, phi), slope, heavy};
}
}  // namespace

double SommerfeldNumber(double mu, double radius, double clearance, double omega, double unit_load) {
  const double rc = radius / clearance;
  const double n = std::fabs(omega) / (2.0 * kPi);
  if (!(unit_load > 0.0)) return std::numeric_limits<double>::infinity();
  return rc * rc * mu * n / unit_load;
}

double OcvirkSommerfeld(double e, double l_over_d) {
  if (!(e > 0.0)) return std::numeric_limits<double>::infinity();
  if (!(e < 1.0)) return 0.0;
  const double dl = 1.0 / l_over_d, one = 1.0 - e * e;
  return dl * dl * one * one / (kPi * e * std::sqrt(kPi * kPi * one + 16.0 * e * e));
}

double OcvirkAttitude(double e) {
  return std::atan2(kPi * std::sqrt(std::max(0.0, 1.0 - e * e)), 4.0 * e);
}

FilmSolution OcvirkFilm(double s, double l_over_d) {
  FilmSolution f;
  f.sommerfeld = s;
  if (!(s < std::numeric_limits<double>::infinity())) {
    f.attitude_rad = 0.5 * kPi;
    return f;
  }
  if (s <= OcvirkSommerfeld(kMaxEccentricity, l_over_d)) {
    f.eps = kMaxEccentricity;
    f.attitude_rad = OcvirkAttitude(f.eps);
    f.range = kFilmHeavierThanTable | kFilmResting;
    return f;
  }
  // Newton on ln S(eps) - ln s (S falls monotonically with eps), kept inside
  // the bracket S(lo) > s > S(hi) and bisecting when a step would leave it.
  double lo = 0.0, hi = kMaxEccentricity, e = 0.5;
  for (int i = 0; i < 200; ++i) {
    const double g = std::log(OcvirkSommerfeld(e, l_over_d) / s);
    (g > 0.0 ? lo : hi) = e;
    if (std::fabs(g) < 1e-14 || hi - lo < 1e-15) break;
    const double next = e - g / OcvirkLogSlope(e);
    e = next > lo && next < hi ? next : 0.5 * (lo + hi);
  }
  f.eps = e;
  f.attitude_rad = OcvirkAttitude(f.eps);
  f.deps_ds = f.eps > 0.0 ? 1.0 / (s * OcvirkLogSlope(f.eps)) : 0.0;
  if (l_over_d > 1.0) f.range |= kFilmLengthOutside;  // short-bearing theory far outside its range
  return f;
}

FilmSolution RaimondiBoydFilm(double s, double l_over_d) {
  FilmSolution f;
  f.sommerfeld = s;
  if (!(s < std::numeric_limits<double>::infinity())) {
    f.attitude_rad = 0.5 * kPi;
    return f;
  }
  if (!(s > 0.0)) {  // at rest: log S has no value; the limit of the heavy end
    f.eps = kMaxEccentricity;
    f.range = kFilmHeavierThanTable | kFilmResting;
    return f;
  }
  // Quadratic Lagrange weights in x = d/l through the tables' x = 1, 2, 4.
  double x = 1.0 / l_over_d;
  if (x < 1.0 || x > 4.0) f.range |= kFilmLengthOutside;
  x = std::clamp(x, 1.0, 4.0);
  const double w[3] = {(x - 2.0) * (x - 4.0) / 3.0, -(x - 1.0) * (x - 4.0) / 2.0, (x - 1.0) * (x - 2.0) / 6.0};
  double e = 0.0, phi = 0.0, dlns = 0.0;
  const RowLogs& ln_rows = TableLogS();
  const double ln_s = std::log(s);
  for (int i = 0; i < 3; ++i) {
    const TableRead t = ReadTable(kRaimondiBoyd[i], ln_rows[i], s, ln_s);
    e += w[i] * t.eps;
    phi += w[i] * t.phi_deg;
    dlns += w[i] * t.deps_dlns;
    if (t.heavy) f.range |= kFilmHeavierThanTable;
  }
  if (e >= kMaxEccentricity * (1.0 - 1e-12)) e = kMaxEccentricity, dlns = 0.0, f.range |= kFilmHeavierThanTable | kFilmResting;
  if (e < 0.0) e = 0.0, dlns = 0.0;
  f.eps = e;
  f.attitude_rad = std::clamp(phi, 0.0, 90.0) * kDeg;
  f.deps_ds = dlns / s;
  return f;
}

FilmSolution LoadedLandFilm(int method, const LandFilm& g, double mu, double omega, double load) {
  const double s = SommerfeldNumber(mu, g.radius, g.clearance, omega, g.UnitLoad(load));
  return method >= 2 ? RaimondiBoydFilm(s, g.LengthRatio()) : OcvirkFilm(s, g.LengthRatio());
}

}  // namespace loopwright
