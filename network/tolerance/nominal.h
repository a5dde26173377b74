// The nominal envelope of a tolerance study: every point solved at the
// case's values, its checks, and the tangents of the state to every
// tolerance (the predictor of the samples' starts and the first-order
// slopes of the checks at their governing points).
#pragma once

#include <memory>
#include <string>
#include <vector>

#include <Eigen/Core>

#include "network/case/case.h"
#include "network/envelope/checks.h"
#include "network/envelope/sensitivity.h"
#include "network/point/coupled_newton.h"

namespace loopwright {

struct CoupledModel;  // below

struct NominalPoint {
  Eigen::VectorXd u;
  std::vector<double> T;
  std::vector<CheckOutcome> checks;
  std::vector<int> key_of;  // per outcome: its index in NominalEnvelope::keys
  // Per tolerance: the tangent (empty du when it could not be computed).
  std::vector<Eigen::VectorXd> du;
  std::vector<std::vector<double>> dT;
  std::string tangent_message;  // why a tangent is missing ("" when all are there)
  // Per global node: the slope of the thermostat search's f at the root
  // (CaseSolver::sensed_slopes_found; empty without thermostats), the first
  // step of every sample's search there.
  std::vector<double> sensed_slopes;
  // A thermal point's coupled Jacobian (network/point/coupled_newton.h) and
  // its derivatives in the tolerances (CoupledModel; null at an isothermal
  // point or when not asked for).
  std::shared_ptr<const CoupledModel> coupled;
};

// The coupled Jacobian K0 of a thermal point at its nominal answer, and its
// derivative dK_i along the solution path in every tolerance i (empty where
// the tolerance has no tangent): d/dx_i K(z(x), x) by central differences of
// K at the knob moved by +-1e-4 of its value and the state along its
// tangent. A sample with deviations dx solves its coupled Newton's steps
// with K0 + sum dx_i dK_i (CoupledJacobian::delta), the Jacobian at its own
// answer to second order: its chord then contracts at about 1 % for the APU
// demo's tolerances instead of at the first-order change of K (15-20 %
// there).
struct CoupledModel {
  CoupledJacobian k0;  // K0, factorised
  std::vector<Eigen::MatrixXd> dK;  // equilibrated with the scales of k0
};

struct CheckKey {
  std::string name, where;
  Dimension dim = Dimension::kDimensionless;
  double limit = 0;
  double margin = 0;  // nominal: the least over the points
  int point = -1;     // governing point
  // d margin / d x_i at the governing point (NaN when not available).
  std::vector<double> slopes;
  std::string slope_message;
};

struct NominalEnvelope {
  bool ok = false;
  std::string error;  // the point that did not converge, and why
  std::vector<NominalPoint> points;
  std::vector<CheckKey> keys;  // (check, place) in the order first met
};

// The design-knob view of a tolerance (network/envelope/sensitivity.h).
DesignKnob ToleranceKnob(const Tolerance& t);

// Solves the nominal envelope; with `slopes`, the check slopes at each
// governing point too; with `coupled`, each thermal point's CoupledModel.
// The points' tangents and models are built on up to `threads` threads; the
// result does not depend on the count.
NominalEnvelope SolveNominal(const Case& cs, bool slopes, bool coupled = false, int threads = 1);

}  // namespace loopwright
