// Sensitivities of a converged operating point to a design parameter
// ("knob"): how the pressures, flows and temperatures, and so every reported
// value and check margin, move when a bypass opening, relief setting,
// restrictor diameter, pump displacement or speed, cooler conductance or line
// diameter changes — without re-solving.
//
// Method: the implicit function theorem on the coupled steady state. A
// converged point satisfies
//   F(u, T; theta) = 0   hydraulic laws and mass balances (network/point/system.h),
//                        fluid properties of each branch at its upstream
//                        temperature,
//   E(u, T; theta) = 0   node energy balances (network/point/thermal.h),
// so the tangent z = (du/dtheta, dT/dtheta) solves the linear system
//   [F_u  F_T] [du]     [F_theta]
//   [E_u  E_T] [dT] = - [E_theta].
// It is solved by block Gauss-Seidel sweeps, the linearisation of the nested
// hydraulic/thermal scheme the point was solved with (so it converges where
// that scheme did): du <- du - F_u^-1 (F_theta + A_1 z), then
// dT <- dT - E_T^-1 (E_theta + A_2 z), until the tangent changes by less
// than `tolerance` (relative) or stops shrinking below `noise_floor` (the
// rounding floor of the differences, near 1e-8 relative); at an isothermal
// point F_u is the whole Jacobian and one solve is the tangent.
// F_u and E_T are the exact Jacobians (forward-mode automatic differentiation
// of the component laws and energy balances), factorised once per point and
// reused for every knob. The products A z and the partials F_theta, E_theta
// are directional derivatives of the explicit residual functions, by central
// differences with a relative step of 1e-6 in theta (the functions are smooth
// and explicit, so their error is near 1e-10 relative; no solve is involved).
// A reported quantity g(u, T, theta) — a check margin, a flow — then has
//   dg/dtheta = d/dh g(u + h du, T + h dT, theta + h) at h = 0,
// evaluated the same way. Unlike differences of re-solved points, the result
// does not carry the solver's convergence tolerance.
//
// Reference: the direct (forward) sensitivity method for steady nonlinear
// systems, e.g. Nocedal & Wright, "Numerical Optimization", 2nd ed.,
// Springer 2006, section 8.2 and the implicit function theorem (A.2), from
// memory.
#pragma once

#include <functional>
#include <memory>
#include <string>
#include <vector>

#include <Eigen/Core>
#include <Eigen/LU>
#include <Eigen/SparseLU>

#include "network/case/case.h"
#include "network/point/run.h"

namespace loopwright {

// A design parameter a designer changes before buying parts and that is not
// bound to an envelope variable: a component parameter, or the conductance
// of a liquid-to-liquid coupling.
struct DesignKnob {
  int loop = -1, comp = -1, param = -1;  // component parameter
  int coupling = -1;                     // or coupling index
  int fluid = -1, anchor = 0;            // or an oil's KV40 (0) / KV100 (1): Case::fluid_bindings index
  std::string name;                      // "loop/component.param" or "coupling/id.conductance"
  Dimension dim = Dimension::kDimensionless;
  double lo = 0, hi = INFINITY;          // accepted range (SI)
  // Why the case holds it ("" when the fix search and sizing may move it):
  // fixed in the case, or not among its knobs.allow (network/case/knobs.h).
  // Sensitivities are computed for held knobs too.
  std::string held;
};

// Every knob of a case: valve opening and kvs, relief valve crack, orifice and
// rolling-bearing jet diameter, displacement pump displacement and speed,
// centrifugal pump speed, air cooler conductance, line diameters, journal
// bearing clearance, coupling conductance; held ones included (with `held`
// saying why).
std::vector<DesignKnob> DesignKnobs(const Case& cs);
// The knob's value as `solver` uses it (its working copy of the model, or
// its thermal system's coupling), NaN when the knob does not act there (a
// coupling at an isothermal case). SetKnobValue holds a value in the
// solver's design overrides (never in the case) and writes it into the
// working set at once; false when the knob does not act.
double KnobValue(CaseSolver* solver, const DesignKnob& k);
bool SetKnobValue(CaseSolver* solver, const DesignKnob& k, double value);

struct TangentOptions {
  double relative_step = 1e-6;  // of theta, for the directional differences
  int max_sweeps = 200;         // block Gauss-Seidel sweeps (thermal points)
  int direct_unknowns = 400;    // up to this many temperature unknowns: the direct (Schur) tangent
  double tolerance = 1e-9;      // settled when max|dz| <= tolerance * max|z| (per block)
  double noise_floor = 1e-6;    // or when below this and no longer shrinking (rounding floor)
  // The direct tangent's refinements shrink its error tenfold or more each; a
  // stall below this is the directional differences' rounding (2e-6 to 6e-6
  // of the tangent on a hot journal bearing, 48,000 rpm at 160 degC).
  double direct_noise_floor = 1e-5;
  // Skip the block sweeps and take the direct tangent at once (a test of the
  // direct path on a point where the sweeps would settle).
  bool direct_only = false;
};

struct StateTangent {
  bool ok = false;
  int sweeps = 0;
  std::string message;   // why not ok
  Eigen::VectorXd du;    // d u / d theta (system.h unknown order)
  std::vector<double> dT;  // d T / d theta per global node
  double step = 0;       // h used for the directional differences
  double settled_change = 0;  // relative change of the last sweep
};

// Tangents of the point `op` that `solver` has just solved (its u and T hold
// the answer). The Jacobians are factorised on construction; the solver's
// state and every knob are restored after each call.
class PointTangents {
 public:
  PointTangents(CaseSolver* solver, const OperatingPoint& op, TangentOptions options = {});
  bool ok() const { return ok_; }
  const std::string& message() const { return message_; }

  StateTangent Tangent(const DesignKnob& knob);
  // dg/dtheta of a reported quantity along a tangent of `knob`.
  double Derivative(const DesignKnob& knob, const StateTangent& t,
                    const std::function<double(const PointResult&)>& g);
  // d g_i/d theta of n <= 4 reported quantities along one tangent of `knob`
  // into out[0..n): g writes the n values of a described point, and the
  // point is described twice in all, not twice per quantity (each value is
  // the one Derivative gives for it, to the bit).
  void Derivatives(const DesignKnob& knob, const StateTangent& t, int n,
                   const std::function<void(const PointResult&, double*)>& g, double* out);

 private:
  void Hydraulic(const Eigen::VectorXd& u, const std::vector<double>& T, Eigen::VectorXd* r);
  void Energy(const Eigen::VectorXd& u, const std::vector<double>& T, Eigen::VectorXd* r);
  void Restore();
  // The partials of the residuals in theta (central differences at th0 +- h).
  void Partials(const DesignKnob& knob, double th0, double h, int nt);
  // (f(z0 + h z) - f(z0 - h z)) / 2h along the tangent t, into *out.
  using Residual = void (PointTangents::*)(const Eigen::VectorXd&, const std::vector<double>&, Eigen::VectorXd*);
  void Along(Residual f, const StateTangent& t, double h, Eigen::VectorXd* plus, Eigen::VectorXd* minus,
             Eigen::VectorXd* out);
  // Block Gauss-Seidel sweeps from t (zero) until the tangent settles.
  void Sweeps(StateTangent* t, double h, int nt);
  // The tangent with every free sensed temperature of a thermostatic valve
  // held (the partials bu_, bt_ set), from zero.
  StateTangent Held(double h, int nt);
  // Thermal points with at most TangentOptions::direct_unknowns temperature unknowns: the
  // coupled tangent by the Schur complement in the temperatures (built once
  // per point) refined against the directional differences (sensitivity.cpp, "Direct").
  void Direct(StateTangent* t, double h, int nt);
  bool BuildSchur(int nt, std::string* why);
  // M^-1 r by block elimination with the factorised J_uu and S, into ddu_, ddt_.
  void SchurSolve(const Eigen::VectorXd& r_u, const Eigen::VectorXd& r_t, double h, int nt);
  // With thermostatic valves: the held tangent z0 completed by the valves'
  // responses (sensitivity.cpp, "Thermostatic valves").
  void CloseThermostats(StateTangent* t, int nt);

  CaseSolver* s_;
  const OperatingPoint& op_;
  TangentOptions opt_;
  bool thermal_ = false;
  bool ok_ = false;
  std::string message_;
  Eigen::VectorXd u0_;
  std::vector<double> T0_;
  Eigen::SparseLU<Eigen::SparseMatrix<double>, Eigen::COLAMDOrdering<int>> lu_u_, lu_t_;
  // Work vectors (sized once).
  Eigen::VectorXd rp_, rm_, up_, um_, tp_, tm_, bu_, bt_, cu_, ct_, ddu_, ddt_;
  std::vector<double> Tp_, Tm_;
  // Thermostatic valves: the free sensed nodes (global) and, once computed,
  // the held tangent of a unit change of each node's held temperature.
  std::vector<int> sensed_;
  std::vector<StateTangent> responses_;
  // The Schur complement S = J_TT - J_Tu J_uu^-1 J_uT, factorised (Direct);
  // the global node of each temperature unknown.
  bool schur_built_ = false;
  std::string schur_message_;
  Eigen::PartialPivLU<Eigen::MatrixXd> schur_lu_;
  std::vector<int> t_nodes_;
  StateTangent work_;  // SchurSolve's direction
  Eigen::VectorXd res_u_, res_t_;  // Direct's residuals
};

// The margin of check `name` at `where` in a point's results (NaN if absent).
double CheckMargin(const Case& cs, const OperatingPoint& op, const PointResult& r, const std::string& name,
                   const std::string& where);

}  // namespace loopwright
