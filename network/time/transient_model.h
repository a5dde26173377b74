// The right-hand side of a scenario's thermal states (network/time/simulate.h
// states the equations): the case's solver at the scenario's inputs of each
// instant, the liquid hold-up of the free nodes, the thermal masses and
// their heat paths. Used by Simulate; one per run.
#pragma once

#include <functional>
#include <string>
#include <vector>

#include <Eigen/Core>

#include "network/point/run.h"
#include "network/time/simulate.h"

namespace loopwright {

// Stefan-Boltzmann constant [W/(m2.K4)], CODATA 2018 (exact from the SI
// defining constants).
inline constexpr double kStefanBoltzmann = 5.670374419e-8;

// The hold-up V_g [m3] of every global node of `sys` (simulate.h).
std::vector<double> NodeHoldups(const Case& cs, const NetworkSystem& sys);

class TransientModel {
 public:
  TransientModel(const Case& cs, const Scenario& sc);
  // The state at t = 0: the start point's steady answer (masses at their
  // initial_temperature, else the mean of the liquid they touch) or the
  // scenario's uniform temperature. False with the cause in *error.
  bool Start(std::vector<double>* y, std::string* error);
  int size() const { return n_nodes_ + n_masses_; }
  int num_masses() const { return n_masses_; }
  // Integrating from time a on: the events that have started by a act
  // (their ramps by the time of each call); a < 0 (settling) none.
  void SetSegment(double a) { segment_start_ = a; }
  // dy/dt at (t, y); false when the hydraulics at the instant have no answer
  // (last_failure says why) or y is not physical.
  bool Derivatives(double t, const double* y, double* ydot);
  // Temperature [K] of a watched mass id or "loop/node" at state y.
  double Watched(const std::string& what, const double* y) const;
  std::vector<std::string> WatchList() const;
  // The state index of a watched mass id or free "loop/node"; -1 for a node
  // whose temperature is fixed or an unknown name.
  int WatchedState(const std::string& what) const;
  // Everything at (t, y): node temperatures and pressures, mass
  // temperatures, branch flows.
  TimeSample Sample(double t, const double* y);
  void Names(std::vector<std::string>* nodes, std::vector<std::string>* masses, std::vector<std::string>* branches) const;
  void BranchEnds(std::vector<int>* from, std::vector<int>* to) const;
  std::vector<char> FreeNodes() const;
  // Each component's warnings {"loop/component", text} at the state of the
  // last Sample.
  std::vector<std::pair<std::string, std::string>> ComponentWarnings();  // per global node: its temperature is a state
  const std::string& last_failure() const { return last_failure_; }
  long hydraulic_solves() const { return hydraulic_solves_; }
  // Heat capacity [J/K] of state i (a node's liquid at temperature t, or a mass).
  double Capacity(int i, double t) const;

 private:
  void Inputs(double t);
  void Temperatures(const double* y);
  bool Hydraulics(double t, const double* y);
  bool FlowsSettled(const Eigen::VectorXd& before) const;
  static constexpr int kFluidPasses = 6;
  double LinkConductance(const FluidLink& l) const;
  double MassHeat(int k, double t_mass) const;  // heat into mass k from its source and ambient [W]
  int GlobalNode(int loop, int node) const { return node_offset_[loop] + node; }

  const Case& cs_;
  const Scenario& sc_;
  CaseSolver solver_;
  OperatingPoint base_, op_;
  std::vector<double> base_params_;  // per change target of every event: the value before any event
  double segment_start_ = -1;
  int n_nodes_ = 0, n_masses_ = 0;
  std::vector<int> node_offset_, branch_offset_;
  std::vector<int> state_node_;        // state i < n_nodes_ -> global node
  std::vector<double> holdup_;         // per global node [m3]
  std::vector<double> T_;              // per global node [K]
  Eigen::VectorXd r_;
  bool applied_ = false;
  std::vector<double> applied_values_, applied_params_;
  double flow_scale_ = 1e-10;
  long hydraulic_solves_ = 0;
  std::string last_failure_;
};

}  // namespace loopwright
