// Minor (fitting) losses: constant K, Hooper 2-K, Darby 3-K.
//
// Purpose. A fitting (elbow, tee, open valve, entrance, exit) dissipates
//   dp = K * rho * V|V| / 2,
// with V the mean velocity in the pipe of inside diameter D the fitting is
// attached to. The loss coefficient K may depend on Re = rho|V|D/mu and on
// the size:
//   constant_k  K = K0                                            [3]
//   hooper_2k   K = K1/Re + Kinf (1 + 1 in / D)                   [1]
//   darby_3k    K = K1/Re + Ki (1 + Kd / D_in^0.3)                [2]
// (D in inches in both size terms: 1 in / D = 0.0254 m / D[m] for Hooper;
// D_in = D[m]/0.0254 for Darby, whose constants were fitted against the
// nominal pipe size in inches [2], so pass the nominal size there.)
//
// Product form and split. Both Re-dependent forms are K = K1/Re + K', with
// K' the size-dependent high-Re part. Since Re = rho|V|D/mu,
//   (K1/Re) * rho V|V| / 2 = K1 * mu * V / (2 D),
// so the loss splits exactly into a viscous part linear in V and an inertial
// part quadratic in V:
//   dp = K1 * mu * V / (2 D) + K' * rho * V|V| / 2.                  (*)
// (*) is finite, odd in V and smooth through V = 0 (V|V| taken through
// SignedSquare with a caller-chosen velocity scale), while K itself has a pole
// at Re = 0. This header therefore provides K*Re = K1 + K' Re (finite at
// Re = 0) and FittingDp, which evaluates (*). Component laws use these.
//
// Sign convention. dp = p(upstream) - p(downstream) > 0 for V > 0 (flow in
// the component's from -> to direction); odd under reversal (a fitting is
// taken as symmetric; direction-dependent fittings such as check valves need
// their own law).
//
// Inputs (SI). V [m/s] mean pipe velocity, rho [kg/m3], mu [Pa.s],
// D [m] (inside diameter; for darby_3k the nominal size), Re [-] >= 0.
// Outputs. K [-], K*Re [-], dp [Pa].
//
// Validity. Hooper [1]: Re from laminar to fully turbulent, sizes about
// 1/2 in to 24 in; Darby [2]: same kind of range, claimed better for large
// sizes and for laminar flow (both as stated in the sources, from memory).
// Outside those sizes the formulas stay finite for D > 0 and are
// extrapolations. K has a pole at Re = 0: K functions return +inf with zero
// derivative for Re < 1e-100 (where K1/Re would overflow), never NaN;
// K*Re and FittingDp are finite everywhere.
//
// Tables. Constants for a few common fittings, by our own snake_case names.
// The values are those of the tables of [1] and [2] as copied in
// python3-fluids fittings.py (dicts `Hooper` and `Darby`) [4]; the Python
// check tests/components/fittings_valve_fluids_test.py compares every entry
// with that copy. The constant-K entries are Crane TP-410 values [3]
// (from memory; they agree with python3-fluids entrance_sharp(method='Crane')
// = 0.5 and exit_normal() = 1.0, which the same check verifies).
//
// References
// [1] W. B. Hooper, "The 2-K method predicts head losses in pipe fittings",
//     Chem. Eng., Aug. 24, 1981, pp. 96-100 (table of K1, Kinf; the
//     equation K = K1/Re + Kinf(1 + 1/D_in)).
// [2] R. Darby, "Correlate pressure drops through fittings", Chem. Eng.
//     106(7):101, July 1999 (3-K constants table; with P. Silverberg), and
//     the 2001 follow-up, Chem. Eng. 108(4):127-130, April 2001 (as cited by
//     python3-fluids).
// [3] Crane Co., "Flow of Fluids Through Valves, Fittings, and Pipe",
//     Technical Paper No. 410 (entrance and exit K; from memory).
// [4] C. Bell et al., python3-fluids 1.0.22, fluids/fittings.py (Debian
//     package), dicts Hooper and Darby; used as the copy of [1], [2].
#pragma once

#include <cmath>
#include <limits>
#include <optional>
#include <string_view>

#include "components/correlations/smooth.h"

namespace loopwright {

enum class FittingMethod { kConstantK, kHooper2K, kDarby3K };

inline const char* FittingMethodName(FittingMethod m) {
  switch (m) {
    case FittingMethod::kConstantK:
      return "constant_k";
    case FittingMethod::kHooper2K:
      return "hooper_2k";
    case FittingMethod::kDarby3K:
      return "darby_3k";
  }
  return "unknown";
}

inline constexpr const char* kFittingMethodNames[] = {"constant_k", "hooper_2k", "darby_3k"};

inline std::optional<FittingMethod> ParseFittingMethod(std::string_view name) {
  if (name == "constant_k") return FittingMethod::kConstantK;
  if (name == "hooper_2k") return FittingMethod::kHooper2K;
  if (name == "darby_3k") return FittingMethod::kDarby3K;
  return std::nullopt;
}

// One inch in metres (exact; NIST SP 811).
inline constexpr double kInchM = 0.0254;

// ------------------------------------------------------- high-Re parts K'
// Hooper [1]: K' = Kinf (1 + 1 in / D).
inline double Hooper2KInertialK(double diameter_m, double k_inf) {
  return k_inf * (1.0 + kInchM / diameter_m);
}
// Darby [2]: K' = Ki (1 + Kd / D_in^0.3), D_in = nominal size in inches.
inline double Darby3KInertialK(double nominal_diameter_m, double k_i, double k_d) {
  return k_i * (1.0 + k_d / std::pow(nominal_diameter_m / kInchM, 0.3));
}

// ---------------------------------------------------------- K and K*Re
// K*Re = K1 + K' Re: finite and linear in Re, even in Re.
template <class T>
inline T Hooper2KTimesRe(const T& re, double diameter_m, double k1, double k_inf) {
  const T re_abs = ScalarPart(re) < 0.0 ? T(-re) : re;
  return k1 + Hooper2KInertialK(diameter_m, k_inf) * re_abs;
}
template <class T>
inline T Darby3KTimesRe(const T& re, double nominal_diameter_m, double k1, double k_i, double k_d) {
  const T re_abs = ScalarPart(re) < 0.0 ? T(-re) : re;
  return k1 + Darby3KInertialK(nominal_diameter_m, k_i, k_d) * re_abs;
}

// K = K1/Re + K'; +inf (zero derivative) at Re = 0.
template <class T>
inline T Hooper2K(const T& re, double diameter_m, double k1, double k_inf) {
  const T re_abs = ScalarPart(re) < 0.0 ? T(-re) : re;
  if (ScalarPart(re_abs) < 1e-100) return T(std::numeric_limits<double>::infinity());
  return k1 / re_abs + Hooper2KInertialK(diameter_m, k_inf);
}
template <class T>
inline T Darby3K(const T& re, double nominal_diameter_m, double k1, double k_i, double k_d) {
  const T re_abs = ScalarPart(re) < 0.0 ? T(-re) : re;
  if (ScalarPart(re_abs) < 1e-100) return T(std::numeric_limits<double>::infinity());
  return k1 / re_abs + Darby3KInertialK(nominal_diameter_m, k_i, k_d);
}

// ----------------------------------------------------------- pressure drop
// dp = K1 mu V / (2 D) + K' rho V|V| / 2   (Eq. (*) above)
// v_eps [m/s] is the SignedSquare scale of the V|V| term (0: exact V|V|,
// which is C1; the viscous term keeps the slope positive at V = 0 when
// K1 > 0). Constant K is the case K1 = 0, K' = K0.
template <class T>
inline T FittingDp(const T& v, const T& rho, const T& mu, double diameter_m, double k1,
                   double k_inertial, double v_eps) {
  return k1 * mu * v / (2.0 * diameter_m) + 0.5 * k_inertial * rho * SignedSquare(v, v_eps);
}

// ------------------------------------------------------------------ tables
struct HooperConstants {
  const char* name;
  double k1;     // [-]
  double k_inf;  // [-]
};
struct DarbyConstants {
  const char* name;
  double k1;   // [-]
  double k_i;  // [-]
  double k_d;  // [in^0.3]
};
struct ConstantKEntry {
  const char* name;
  double k;  // [-]
};

// Hooper 2-K constants: the table of [1], as copied in [4]. The comment
// gives the row of the source table.
inline constexpr HooperConstants kHooperFittings[] = {
    {"elbow_90_standard_threaded", 800.0, 0.40},   // 90 deg elbow, standard R/D=1, screwed
    {"elbow_90_standard_flanged", 800.0, 0.25},    // 90 deg elbow, standard R/D=1, flanged/welded
    {"elbow_90_long_radius", 800.0, 0.20},         // 90 deg elbow, long radius R/D=1.5, all types
    {"elbow_45_standard", 500.0, 0.20},            // 45 deg elbow, standard R/D=1, all types
    {"elbow_45_long_radius", 500.0, 0.15},         // 45 deg elbow, long radius R/D=1.5, all types
    {"elbow_180_standard_flanged", 1000.0, 0.35},  // 180 deg bend, standard R/D=1, flanged/welded
    {"tee_through_branch_threaded", 500.0, 0.70},  // tee used as elbow, standard, screwed
    {"tee_through_branch_flanged", 800.0, 0.80},   // tee used as elbow, standard, flanged/welded
    {"tee_through_run_threaded", 200.0, 0.10},     // run-through tee, screwed
    {"tee_through_run_flanged", 150.0, 0.05},      // run-through tee, flanged/welded
    {"gate_valve_open", 300.0, 0.10},              // gate valve, full line size, beta = 1
    {"ball_valve_reduced_trim", 500.0, 0.15},      // ball valve, reduced trim, beta = 0.9
    {"plug_valve_reduced_trim", 1000.0, 0.25},     // plug valve, reduced trim, beta = 0.8
    {"globe_valve_standard", 1500.0, 4.0},         // globe valve, standard
    {"globe_valve_angle", 1000.0, 2.0},            // globe valve, angle or Y-type
    {"diaphragm_valve", 1000.0, 2.0},              // diaphragm valve, dam type
    {"butterfly_valve", 800.0, 0.25},              // butterfly valve
    {"check_valve_lift", 2000.0, 10.0},            // check valve, lift
    {"check_valve_swing", 1500.0, 1.5},            // check valve, swing
    {"check_valve_tilting_disc", 1000.0, 0.5},     // check valve, tilting disc
};

// Darby 3-K constants: the table of [2], as copied in [4].
inline constexpr DarbyConstants kDarbyFittings[] = {
    {"elbow_90_standard_threaded", 800.0, 0.14, 4.0},    // 90 deg, threaded, standard r/D=1
    {"elbow_90_long_radius", 800.0, 0.071, 4.2},         // 90 deg, threaded, long radius r/D=1.5
    {"elbow_90_standard_flanged", 800.0, 0.091, 4.0},    // 90 deg, flanged/welded/bends r/D=1
    {"elbow_90_r_d_2", 800.0, 0.056, 3.9},               // 90 deg, r/D = 2
    {"elbow_90_r_d_4", 800.0, 0.066, 3.9},               // 90 deg, r/D = 4
    {"elbow_45_standard", 500.0, 0.071, 4.2},            // 45 deg, threaded standard r/D=1
    {"elbow_45_long_radius", 500.0, 0.052, 4.0},         // 45 deg, long radius r/D=1.5
    {"elbow_180_standard_flanged", 1000.0, 0.12, 4.0},   // 180 deg, flanged r/D=1
    {"elbow_180_threaded", 1000.0, 0.23, 4.0},           // 180 deg, threaded close-return r/D=1
    {"tee_through_branch_threaded", 500.0, 0.274, 4.0},  // tee through branch (as elbow), threaded
    {"tee_through_branch_flanged", 800.0, 0.28, 4.0},    // tee through branch (as elbow), flanged
    {"tee_through_run_threaded", 200.0, 0.091, 4.0},     // tee run-through, threaded
    {"tee_through_run_flanged", 150.0, 0.05, 4.0},       // tee run-through, flanged
    {"gate_valve_open", 300.0, 0.037, 3.9},              // gate valve, standard, beta = 1
    {"ball_valve_open", 300.0, 0.017, 3.5},              // ball valve, standard, beta = 1
    {"globe_valve_standard", 1500.0, 1.7, 3.6},          // globe valve, standard, beta = 1
    {"angle_valve_45", 950.0, 0.25, 4.0},                // angle valve 45 deg, full size
    {"angle_valve_90", 1000.0, 0.69, 4.0},               // angle valve 90 deg, full size
    {"plug_valve_straight", 300.0, 0.084, 3.9},          // plug valve, straight through
    {"diaphragm_valve", 1000.0, 0.69, 4.9},              // diaphragm valve, dam type
    {"check_valve_swing", 1500.0, 0.46, 4.0},            // check valve, swing
    {"check_valve_lift", 2000.0, 2.85, 3.8},             // check valve, lift
};

// Constant-K entries, Crane TP-410 [3] (from memory; see the header).
inline constexpr ConstantKEntry kConstantKFittings[] = {
    {"entrance_sharp", 0.5},  // flush sharp-edged entrance from a large vessel
    {"exit", 1.0},            // discharge into a large vessel: velocity head lost
};

// Look-ups by name; nullptr when the name is not in the table.
inline const HooperConstants* FindHooperFitting(std::string_view name) {
  for (const auto& e : kHooperFittings)
    if (name == e.name) return &e;
  return nullptr;
}
inline const DarbyConstants* FindDarbyFitting(std::string_view name) {
  for (const auto& e : kDarbyFittings)
    if (name == e.name) return &e;
  return nullptr;
}
inline const ConstantKEntry* FindConstantKFitting(std::string_view name) {
  for (const auto& e : kConstantKFittings)
    if (name == e.name) return &e;
  return nullptr;
}

}  // namespace loopwright
