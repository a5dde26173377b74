// One place that fills ceres::Solver::Options for the project's small
// least-squares problems: the Levenberg-Marquardt fallback of the point
// solver (network/point/solver.cpp), the one-knob roots of sizing
// (network/design/sizing.cpp) and the model fits (network/design/fit.cpp).
// Each caller states what differs (linear solver, iteration cap and the
// three convergence tolerances); the rest is common: no log lines (glog
// output is kept off the terminal, library_logging.h) and one thread
// (sweeps parallelise over points, never inside one solve).
#pragma once

#include <ceres/solver.h>

namespace loopwright {

struct CeresLimits {
  ceres::LinearSolverType linear_solver = ceres::DENSE_QR;
  int max_iterations = 50;
  double function_tolerance = 1e-6;   // Ceres' defaults
  double gradient_tolerance = 1e-10;
  double parameter_tolerance = 1e-8;
};

inline ceres::Solver::Options QuietCeresOptions(const CeresLimits& l) {
  ceres::Solver::Options o;
  o.linear_solver_type = l.linear_solver;
  o.max_num_iterations = l.max_iterations;
  o.function_tolerance = l.function_tolerance;
  o.gradient_tolerance = l.gradient_tolerance;
  o.parameter_tolerance = l.parameter_tolerance;
  o.logging_type = ceres::SILENT;
  o.num_threads = 1;
  return o;
}

}  // namespace loopwright
