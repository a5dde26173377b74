// The nominal envelope of a tolerance study: every point solved at the
// case's values, its checks, and the tangents of the state to every
// tolerance (the predictor of the samples' starts and the first-order
// slopes of the checks at their governing points).
#pragma once

#include <string>
#include <vector>

#include <Eigen/Core>

#include "network/case/case.h"
#include "network/envelope/checks.h"
#include "network/envelope/sensitivity.h"

namespace loopwright {

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
// governing point too.
NominalEnvelope SolveNominal(const Case& cs, bool slopes);

}  // namespace loopwright
