// Eccentricity of a loaded plain journal bearing from its Sommerfeld number.
//
// Purpose. A hydrodynamic journal carrying a steady load W runs displaced
// from the sleeve's centre by e = eps c (c radial clearance) at the attitude
// angle phi between the load line and the line of centres. eps follows from
// one dimensionless group, the Sommerfeld number (bearing characteristic
// number) [1, 3]
//   S = (r / c)^2 mu N / P,   N = omega / (2 pi) [rev/s],   P = W / (l d)
// (P the load per unit projected area, l the bearing's length, d = 2 r), and
// from the length-to-diameter ratio l/d. Heavy load or thin oil (small S)
// gives a large eps and a thin film h0 = c (1 - eps); a light load (large S)
// a nearly concentric journal, where the friction tends to Petroff's.
//
// Two methods:
//
// (a) Short-bearing theory, Ocvirk [2, 3]: the axial pressure flow dominates
//     (l/d small), and the load relation has the closed form
//       S = (d / l)^2 (1 - eps^2)^2 / (pi eps sqrt(pi^2 (1 - eps^2) + 16 eps^2)),
//       tan(phi) = pi sqrt(1 - eps^2) / (4 eps)
//     [3] (form and equation numbers from memory; derived here from Ocvirk's
//     load components W = (mu U l^3 / (4 c^2)) eps sqrt(pi^2 (1 - eps^2) +
//     16 eps^2) / (1 - eps^2)^2 with U = omega r). S falls strictly from
//     +inf at eps = 0 to 0 at eps = 1, so eps(S) is found by bisection on
//     [0, kMaxEccentricity] (64 halvings: below 1e-18 in eps), with the
//     slope d eps / dS from the analytic d ln S / d eps. Meant for
//     l/d <= ~1/4; it over-predicts the load capacity (a smaller S at the
//     same eps, so too small an eps at a given S) as l/d or eps grows:
//     against Raimondi & Boyd's l/d = 1/4 table its S is 0.98 of the
//     table's at eps = 0.1, 0.94 at 0.6, 0.85 at 0.8 and 0.72 at 0.9
//     (journal_film_test prints the ratios). For l/d above 1 it is flagged.
//
// (b) Raimondi & Boyd's finite-bearing solution [1] (Swift-Stieber film
//     rupture, full 360-degree bearing), tabulated for l/d = 1, 1/2, 1/4 at
//     eps = 0.1, 0.2, 0.4, 0.6, 0.8, 0.9, 0.97 (kRaimondiBoyd below; the
//     values are typed from memory of the published table as Shigley
//     reprints its charts' data [4, Figs. 12-16 .. 12-19], not read from the
//     paper — treat the last digit as uncertain). Along a table, eps and
//     phi are interpolated linearly in log S (the tables' charts are drawn on
//     a log S axis). Above the table's first row (S > S(0.1), a light load)
//     eps = 0.1 S(0.1) / S, the linear small-eps limit (S eps -> const for
//     every finite bearing), with phi rising linearly to 90 deg at eps = 0
//     (the full film's limit). Below the last row (S < S(0.97)) eps is
//     extrapolated log-linearly from the last two rows up to
//     kMaxEccentricity, flagged. Between the tabulated l/d, Raimondi & Boyd's
//     interpolation formula [1, 4 Eq. (12-16)] is the cubic Lagrange
//     polynomial in x = d/l through x = 0 (l/d = inf), 1, 2, 4, each table
//     read at the same S; we hold no l/d = inf table, so we use the
//     quadratic Lagrange polynomial through x = 1, 2, 4 (the same
//     construction without its x = 0 node). l/d outside [1/4, 1] is clamped
//     to the nearer table and flagged.
//
// Sign convention. S, eps, phi >= 0; phi in radians, measured from the load
// line to the line of centres in the direction of rotation.
//
// Inputs (SI). mu [Pa s], r [m], c [m], omega [rad/s] (|omega| used),
// unit load P [Pa] (> 0; P = 0 gives S = +inf, eps = 0), l/d [-].
//
// Validity. Isoviscous, laminar, Newtonian full film with rupture;
// 0 <= eps <= kMaxEccentricity = 0.99 (beyond it the film is metal contact
// in practice). Outside the tables: the FilmSolution flags say so and the
// component turns them into warnings.
//
// Stopped rotor, and below lift-off. S -> 0 as the speed falls (S = 0 at
// rest): no film can carry the load and the journal rests on its bush
// (eps -> 1). Both methods then hold eps at kMaxEccentricity = 0.99, with
// d eps / dS = 0 and the flag kFilmResting: Ocvirk for every S at or below
// S(0.99), Raimondi & Boyd where the tables' heavy-load extrapolation
// reaches 0.99 (and at S = 0, where log S has no value). eps(S) is
// continuous into the held value, so a flow law in eps (the land flow
// below, finite for every eps <= 1) stays finite and continuous as a rotor
// runs down to rest; the held 0.99 stands for the resting journal's
// eps ~ 1 (the land-flow factor 1 + 1.5 eps^2 is 2.470 at 0.99 and 2.5 at
// 1, 1.2 % apart).
//
// References
// [1] A. A. Raimondi, J. Boyd, "A solution for the finite journal bearing and
//     its application to analysis and design: III", ASLE Trans.
//     1(1):194-209, 1958 (tables of the full journal bearing; interpolation
//     formula in l/d).
// [2] F. W. Ocvirk, "Short-bearing approximation for full journal bearings",
//     NACA TN 2808, 1952 (from memory).
// [3] B. J. Hamrock, S. R. Schmid, B. O. Jacobson, "Fundamentals of Fluid
//     Film Lubrication", 2nd ed., Marcel Dekker, 2004, ch. 10 (short-width
//     journal bearing: load components, attitude angle, Sommerfeld number;
//     from memory, equation numbers not checked).
// [4] R. G. Budynas, J. K. Nisbett, "Shigley's Mechanical Engineering
//     Design", 9th ed., McGraw-Hill, 2011, §12-8, Figs. 12-16 .. 12-22 and
//     Eq. (12-16) (Raimondi & Boyd's charts and interpolation formula; figure
//     and equation numbers from memory).
#pragma once

#include <cmath>

namespace loopwright {

inline constexpr double kMaxEccentricity = 0.99;

// One row of a Raimondi & Boyd table: eps, S, phi [deg], (r/c) f.
struct RaimondiBoydRow {
  double eps, s, phi_deg, rcf;
};
inline constexpr int kRaimondiBoydRows = 7;
struct RaimondiBoydTable {
  double l_over_d;
  RaimondiBoydRow rows[kRaimondiBoydRows];
};

// Raimondi & Boyd [1], full journal bearing, values from memory (see above).
//   eps    S         phi [deg]  (r/c) f
inline constexpr RaimondiBoydTable kRaimondiBoyd[3] = {
    {1.0,
     {{0.1, 1.33, 79.5, 26.4},
      {0.2, 0.631, 74.02, 12.8},
      {0.4, 0.264, 63.10, 5.79},
      {0.6, 0.121, 50.58, 3.22},
      {0.8, 0.0446, 36.24, 1.70},
      {0.9, 0.0188, 26.45, 1.05},
      {0.97, 0.00474, 15.47, 0.514}}},
    {0.5,
     {{0.1, 4.31, 81.62, 85.6},
      {0.2, 2.03, 74.94, 40.9},
      {0.4, 0.779, 61.45, 17.0},
      {0.6, 0.319, 48.14, 8.10},
      {0.8, 0.0923, 33.31, 3.26},
      {0.9, 0.0313, 23.66, 1.60},
      {0.97, 0.00609, 13.75, 0.610}}},
    {0.25,
     {{0.1, 16.2, 82.31, 322.0},
      {0.2, 7.57, 75.18, 153.0},
      {0.4, 2.83, 60.86, 61.1},
      {0.6, 1.07, 46.72, 26.7},
      {0.8, 0.261, 31.04, 8.80},
      {0.9, 0.0736, 21.85, 3.50},
      {0.97, 0.0101, 12.22, 0.922}}},
};

// Where a film solution lies against its method's range.
enum FilmRange : unsigned {
  kFilmInRange = 0,
  kFilmHeavierThanTable = 1u << 0,  // S below the last row (eps > 0.97) or eps clamped at kMaxEccentricity
  kFilmLengthOutside = 1u << 1,     // l/d outside the method's range (clamped for Raimondi & Boyd)
  kFilmResting = 1u << 2,           // eps held at kMaxEccentricity: the journal rests on its bush (below)
};

// eps and phi at one Sommerfeld number, with d eps / dS for the derivatives
// of a law that carries them (the component's Jets).
struct FilmSolution {
  double sommerfeld = 0;
  double eps = 0;
  double attitude_rad = 0;
  double deps_ds = 0;
  unsigned range = kFilmInRange;
};

// S = (r/c)^2 mu N / P with N = |omega| / (2 pi) [1, 4].
double SommerfeldNumber(double mu, double radius, double clearance, double omega, double unit_load);

// Short-bearing (Ocvirk) theory [2, 3].
double OcvirkSommerfeld(double eps, double l_over_d);
double OcvirkAttitude(double eps);  // [rad]
FilmSolution OcvirkFilm(double sommerfeld, double l_over_d);

// Raimondi & Boyd's tables, interpolated as described above [1, 4].
FilmSolution RaimondiBoydFilm(double sommerfeld, double l_over_d);

// The film of a bearing fed at mid-length: two lands of length l' each
// carrying half the load W, diameter d = 2 r, so P = W / (2 l' d) and the
// tables are read at l'/d (Shigley's treatment of pressure-fed bearings [1]).
// omega is the speed whose Sommerfeld number governs the wedge: the
// journal's against a fixed sleeve, the sum of the two surfaces' speeds when
// both turn (a floating ring's inner film). method 1: Ocvirk, 2: Raimondi &
// Boyd.
struct LandFilm {
  double radius = 0, clearance = 0, land = 0;  // [m]
  double UnitLoad(double load) const { return load / (4.0 * land * radius); }
  double LengthRatio() const { return 0.5 * land / radius; }
};
FilmSolution LoadedLandFilm(int method, const LandFilm& g, double mu, double omega, double load);

// Side flow of a film fed at mid-length (a circumferential groove or a row of
// holes) through both lands of length l' each, as the coefficient K = Q mu / p
// [m3]: Q = pi p r c^3 (1 + 1.5 eps^2) / (3 mu l') ([1] Eq. (12-22), number
// from memory). Used by journal_bearing.h and, per film, by
// floating_ring_bearing.h. T is double or a ceres::Jet in eps.
template <class T>
T FedFilmFlowCoefficient(double radius, double clearance, double land_length, const T& eps) {
  const double c3 = clearance * clearance * clearance;
  return M_PI * radius * c3 * (1.0 + 1.5 * eps * eps) / (3.0 * land_length);
}

}  // namespace loopwright
