#include "network/time/transient_model.h"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "network/point/point_state.h"

namespace loopwright {

namespace {

// A component's own hold-up [m3]: its "volume", else a line's bore x length
// (a gravity drain's full bore: it runs part full, so an upper bound), else 0.
double ComponentHoldup(const ComponentSpec& comp) {
  if (!std::isnan(comp.volume)) return comp.volume;
  if (!comp.type_info || !comp.model) return 0;
  const int d = comp.type_info->ParamIndex("diameter"), l = comp.type_info->ParamIndex("length");
  if (d < 0 || l < 0 || !(comp.type_info->roles & kRoleLine)) return 0;
  const double dv = comp.model->params()[d], lv = comp.model->params()[l];
  return std::isfinite(dv) && std::isfinite(lv) ? M_PI / 4 * dv * dv * lv : 0;
}

// The change targets of a scenario's component parameters, in order of
// first appearance: the index of `ch` in the list.
int ParamTarget(const std::vector<ScenarioChange>& targets, const ScenarioChange& ch) {
  for (size_t i = 0; i < targets.size(); ++i)
    if (targets[i].loop == ch.loop && targets[i].comp == ch.comp && targets[i].param == ch.param) return int(i);
  return -1;
}

std::vector<ScenarioChange> ParamTargets(const Scenario& sc) {
  std::vector<ScenarioChange> t;
  for (const ScenarioEvent& e : sc.events)
    for (const ScenarioChange& ch : e.changes)
      if (ch.variable < 0 && ParamTarget(t, ch) < 0) t.push_back(ch);
  return t;
}

// A bearing's flow_min at the instant if it turns (speed > 0), else NaN.
double TurningFlowMin(const Case& cs, const Branch& b, const Component& working) {
  const ComponentSpec& comp = cs.loops[b.loop].components[b.comp];
  if (!comp.type_info || !(comp.type_info->roles & kRoleBearing)) return kNoValue;
  const int fm = comp.type_info->ParamIndex("flow_min"), sp = comp.type_info->ParamIndex("speed");
  if (fm < 0 || sp < 0) return kNoValue;
  const ParamArray& p = working.params();
  return p[sp] > 0 && std::isfinite(p[fm]) ? p[fm] : kNoValue;
}

}  // namespace

std::vector<double> NodeHoldups(const Case& cs, const NetworkSystem& sys) {
  std::vector<int> offset;
  for (size_t g = 0; g < sys.nodes().size(); ++g)
    if (sys.nodes()[g].node == 0) offset.push_back(static_cast<int>(g));
  std::vector<double> v(sys.nodes().size(), 0.0);
  for (size_t g = 0; g < v.size(); ++g) v[g] = cs.loops[sys.nodes()[g].loop].nodes[sys.nodes()[g].node].volume;
  for (const Branch& b : sys.branches()) {
    const double half = 0.5 * ComponentHoldup(cs.loops[b.loop].components[b.comp]);
    v[b.from_node] += half;
    v[b.to_node] += half;
  }
  for (double& x : v) x = std::max(x, kMinHoldup);
  return v;
}

TransientModel::TransientModel(const Case& cs, const Scenario& sc) : cs_(cs), sc_(sc), solver_(cs) {
  base_ = cs.envelope.points[std::clamp(sc.start_point, 0, int(cs.envelope.points.size()) - 1)];
  base_.isothermal = false;
  op_ = base_;
  for (size_t g = 0; g < solver_.sys.nodes().size(); ++g)
    if (solver_.sys.nodes()[g].node == 0) node_offset_.push_back(static_cast<int>(g));
  branch_offset_ = BranchOffsets(cs);
  holdup_ = NodeHoldups(cs, solver_.sys);
  n_masses_ = static_cast<int>(cs.masses.size());
  if (solver_.thermal) {
    n_nodes_ = solver_.thermal->NumUnknowns();
    state_node_.assign(n_nodes_, -1);
    for (size_t g = 0; g < solver_.sys.nodes().size(); ++g)
      if (solver_.thermal->UnknownOf(int(g)) >= 0) state_node_[solver_.thermal->UnknownOf(int(g))] = int(g);
  }
  const std::vector<ScenarioChange> targets = ParamTargets(sc);
  for (const ScenarioChange& ch : targets)
    base_params_.push_back(cs.loops[ch.loop].components[ch.comp].model->params()[ch.param]);
  // The start's own inputs (scenario "start": {"set": ...}).
  for (const ScenarioChange& ch : sc.start_changes) {
    if (ch.variable >= 0) {
      base_.values[ch.variable] = ch.value;
      continue;
    }
    solver_.SetKnob(ch.loop, ch.comp, ch.param, -1, ch.value);
    if (const int i = ParamTarget(targets, ch); i >= 0) base_params_[i] = ch.value;
  }
  op_ = base_;
}

void TransientModel::Inputs(double t) {
  op_.values = base_.values;
  const std::vector<ScenarioChange> targets = ParamTargets(sc_);
  std::vector<double> params = base_params_;
  for (const ScenarioEvent& e : sc_.events) {
    if (segment_start_ < 0 || e.at > segment_start_) break;
    const double f = e.ramp > 0 ? std::clamp((t - e.at) / e.ramp, 0.0, 1.0) : 1.0;
    for (const ScenarioChange& ch : e.changes) {
      double& cur = ch.variable >= 0 ? op_.values[ch.variable] : params[ParamTarget(targets, ch)];
      cur += f * (ch.value - cur);
    }
  }
  if (applied_ && op_.values == applied_values_ && params == applied_params_) return;
  for (size_t i = 0; i < targets.size(); ++i)
    solver_.SetKnob(targets[i].loop, targets[i].comp, targets[i].param, -1, params[i]);
  solver_.Apply(op_);
  solver_.thermal->SetFlowScale(flow_scale_);
  applied_ = true;
  applied_values_ = op_.values;
  applied_params_ = params;
  // Fixed temperatures of the instant (boundaries bound to variables).
  std::vector<double> fixed;
  solver_.thermal->InitialTemperatures(op_, &fixed);
  for (size_t g = 0; g < fixed.size(); ++g)
    if (solver_.thermal->UnknownOf(int(g)) < 0) T_[g] = fixed[g];
}

void TransientModel::Temperatures(const double* y) {
  for (int i = 0; i < n_nodes_; ++i) T_[state_node_[i]] = y[i];
}

bool TransientModel::Hydraulics(double t, const double* y) {
  for (int i = 0; i < size(); ++i)
    if (!std::isfinite(y[i]) || y[i] < 100.0 || y[i] > 2000.0) {
      last_failure_ = fmt::format("a temperature left 100 K .. 2000 K at t = {:.6g} s", t);
      return false;
    }
  Inputs(t);
  Temperatures(y);
  // The branch fluids (density, viscosity, a film's temperature) are read
  // upwind of the flows they give: passes until the flows stop moving, so
  // the answer is a function of (t, y) and not of the last call's flows.
  for (int pass = 0; pass < kFluidPasses; ++pass) {
    const Eigen::VectorXd before = solver_.u;
    solver_.thermal->ApplyBranchFluids(T_, solver_.u, &solver_.sys);
    ++hydraulic_solves_;
    SolverSummary s = solver_.solver.Solve(&solver_.u);
    if (!s.converged()) {
      solver_.sys.StartingGuess(&solver_.u);
      ++hydraulic_solves_;
      s = solver_.solver.Solve(&solver_.u);
    }
    if (!s.converged()) {
      last_failure_ = fmt::format("the hydraulics at t = {:.6g} s have no answer: {}", t, s.message);
      return false;
    }
    if (FlowsSettled(before)) break;
  }
  return true;
}

// Every branch's mass flow moved by less than 1e-9 of the run's flow scale
// plus 1e-9 of itself since `before`.
bool TransientModel::FlowsSettled(const Eigen::VectorXd& before) const {
  for (const Branch& b : solver_.sys.branches()) {
    const double m = solver_.u[b.m];
    if (std::abs(m - before[b.m]) > 1e-9 * std::abs(m) + 1e-3 * flow_scale_) return false;
  }
  return true;
}

bool TransientModel::Start(std::vector<double>* y, std::string* error) {
  if (!solver_.thermal || n_nodes_ + n_masses_ == 0) {
    *error = "simulate needs a thermal case (\"thermal\": true) with at least one free temperature";
    return false;
  }
  T_.assign(solver_.sys.nodes().size(), 0.0);
  y->assign(size(), 0.0);
  const bool uniform = !std::isnan(sc_.start_temperature);
  if (!uniform) {
    PointResult r = solver_.Solve(base_, false);
    if (!r.converged) {
      // The solver's whole account: what stopped it and its likely cause, named at its place.
      *error = fmt::format("the start point \"{}\" has no steady answer. {}", base_.name,
                           r.summary.cause.empty() ? r.summary.Report() : r.summary.cause);
      return false;
    }
    T_ = solver_.T;
    for (int i = 0; i < n_nodes_; ++i) (*y)[i] = T_[state_node_[i]];
  } else {
    solver_.Apply(base_);
    solver_.sys.StartingGuess(&solver_.u);
    for (int i = 0; i < n_nodes_; ++i) (*y)[i] = sc_.start_temperature;
  }
  for (int k = 0; k < n_masses_; ++k) {
    const ThermalMass& m = cs_.masses[k];
    double t = uniform ? sc_.start_temperature : m.ambient_temperature;
    if (!uniform && !m.fluid.empty()) {
      t = 0;
      for (const FluidLink& l : m.fluid) t += T_[GlobalNode(l.loop, l.node)] / m.fluid.size();
    }
    (*y)[n_nodes_ + k] = std::isnan(m.initial_temperature) ? t : m.initial_temperature;
  }
  double mmax = 0;
  SetSegment(0.0);
  if (uniform && !Hydraulics(0.0, y->data())) return *error = "at the start: " + last_failure_, false;
  for (const Branch& b : solver_.sys.branches()) mmax = std::max(mmax, std::abs(solver_.u[b.m]));
  flow_scale_ = std::max(1e-10, 1e-9 * mmax);
  solver_.thermal->SetFlowScale(flow_scale_);
  return true;
}

double TransientModel::LinkConductance(const FluidLink& l) const {
  if (l.flow_loop < 0) return l.conductance;
  const Branch& b = solver_.sys.branches()[branch_offset_[l.flow_loop] + l.flow_comp];
  const double t = T_[b.from_node];
  const double rho = cs_.loops[l.flow_loop].fluid->Evaluate(t, cs_.ambient_pa).rho;
  const double q = std::abs(solver_.u[b.m]) / rho;
  const double forced3 = std::pow(l.conductance, 3) * std::pow(q / l.rated_flow, 3 * l.exponent);
  return std::cbrt(forced3 + std::pow(l.natural, 3));
}

double TransientModel::MassHeat(int k, double tm) const {
  const ThermalMass& m = cs_.masses[k];
  const double heat = op_.ValueOr(m.heat_variable, m.heat);
  const double ta = op_.ValueOr(m.ambient_variable, m.ambient_temperature);
  return heat + m.ambient_conductance * (ta - tm) +
         m.emissivity * kStefanBoltzmann * m.radiating_area * (std::pow(ta, 4) - std::pow(tm, 4));
}

double TransientModel::Capacity(int i, double t) const {
  if (i >= n_nodes_) return cs_.masses[i - n_nodes_].mass * cs_.masses[i - n_nodes_].specific_heat;
  const int g = state_node_[i];
  const FluidProps f = cs_.loops[solver_.sys.nodes()[g].loop].fluid->Evaluate(t, cs_.ambient_pa);
  return f.rho * f.cp * holdup_[g];
}

bool TransientModel::Derivatives(double t, const double* y, double* ydot) {
  if (!Hydraulics(t, y)) return false;
  solver_.thermal->Residuals(solver_.u, T_, &r_, nullptr);
  std::vector<double> q(size(), 0.0);
  for (int i = 0; i < n_nodes_; ++i) q[i] = r_[i];
  for (int k = 0; k < n_masses_; ++k) {
    const ThermalMass& m = cs_.masses[k];
    const double tk = y[n_nodes_ + k];
    q[n_nodes_ + k] += MassHeat(k, tk);
    for (const FluidLink& l : m.fluid) {
      const int g = GlobalNode(l.loop, l.node);
      const double h = LinkConductance(l) * (tk - T_[g]);
      q[n_nodes_ + k] -= h;
      const int i = solver_.thermal->UnknownOf(g);
      if (i >= 0) q[i] += h;
    }
    for (const MassLink& l : m.masses) {
      const double h = l.conductance * (tk - y[n_nodes_ + l.other]);
      q[n_nodes_ + k] -= h;
      q[n_nodes_ + l.other] += h;
    }
  }
  for (int i = 0; i < size(); ++i) ydot[i] = q[i] / Capacity(i, y[i]);
  return true;
}

double TransientModel::Watched(const std::string& what, const double* y) const {
  for (int k = 0; k < n_masses_; ++k)
    if (cs_.masses[k].id == what) return y[n_nodes_ + k];
  const size_t slash = what.find('/');
  for (size_t l = 0; l < cs_.loops.size() && slash != std::string::npos; ++l) {
    if (cs_.loops[l].id != what.substr(0, slash)) continue;
    const int node = cs_.loops[l].NodeIndex(what.substr(slash + 1));
    if (node < 0) break;
    const int g = GlobalNode(int(l), node);
    const int i = solver_.thermal->UnknownOf(g);
    return i >= 0 ? y[i] : T_[g];
  }
  return kNoValue;
}

int TransientModel::WatchedState(const std::string& what) const {
  for (int k = 0; k < n_masses_; ++k)
    if (cs_.masses[k].id == what) return n_nodes_ + k;
  const size_t slash = what.find('/');
  for (size_t l = 0; l < cs_.loops.size() && slash != std::string::npos; ++l)
    if (cs_.loops[l].id == what.substr(0, slash)) {
      const int node = cs_.loops[l].NodeIndex(what.substr(slash + 1));
      return node < 0 ? -1 : solver_.thermal->UnknownOf(GlobalNode(int(l), node));
    }
  return -1;
}

std::vector<std::string> TransientModel::WatchList() const {
  if (!sc_.watch.empty()) return sc_.watch;
  std::vector<std::string> w;
  for (const ThermalMass& m : cs_.masses) w.push_back(m.id);
  return w;
}

TimeSample TransientModel::Sample(double t, const double* y) {
  TimeSample s;
  s.t = t;
  Hydraulics(t, y);  // on failure: the last answer (the integrator accepted this state)
  Temperatures(y);
  s.node_t = T_;
  for (size_t g = 0; g < T_.size(); ++g) s.node_p.push_back(solver_.sys.NodePressure(int(g), solver_.u));
  for (int k = 0; k < n_masses_; ++k) s.mass_t.push_back(y[n_nodes_ + k]);
  for (const Branch& b : solver_.sys.branches()) {
    const double m = solver_.u[b.m];
    const double rho = cs_.loops[b.loop].fluid->Evaluate(T_[m >= 0 ? b.from_node : b.to_node], cs_.ambient_pa).rho;
    s.flow.push_back(m / rho);
    s.flow_min.push_back(TurningFlowMin(cs_, b, *solver_.sys.working_model(&b - solver_.sys.branches().data())));
  }
  return s;
}

std::vector<std::pair<std::string, std::string>> TransientModel::ComponentWarnings() {
  std::vector<std::pair<std::string, std::string>> w;
  const PointResult r = solver_.Describe(op_, solver_.u, T_);
  ComponentReport report;
  for (size_t k = 0; k < r.branches.size(); ++k) {
    const BranchOutcome& b = r.branches[k];
    DescribeBranch(cs_, r, k, &report);
    for (const std::string& text : report.warnings)
      w.push_back({cs_.loops[b.loop].id + "/" + cs_.loops[b.loop].components[b.comp].id, text});
  }
  return w;
}

std::vector<char> TransientModel::FreeNodes() const {
  std::vector<char> f(solver_.sys.nodes().size());
  for (size_t g = 0; g < f.size(); ++g) f[g] = solver_.thermal->UnknownOf(int(g)) >= 0;
  return f;
}

void TransientModel::BranchEnds(std::vector<int>* from, std::vector<int>* to) const {
  for (const Branch& b : solver_.sys.branches()) from->push_back(b.from_node), to->push_back(b.to_node);
}

void TransientModel::Names(std::vector<std::string>* nodes, std::vector<std::string>* masses,
                           std::vector<std::string>* branches) const {
  for (const NodeRef& n : solver_.sys.nodes())
    nodes->push_back(cs_.loops[n.loop].id + "/" + cs_.loops[n.loop].nodes[n.node].id);
  for (const ThermalMass& m : cs_.masses) masses->push_back(m.id);
  for (const Branch& b : solver_.sys.branches())
    branches->push_back(cs_.loops[b.loop].id + "/" + cs_.loops[b.loop].components[b.comp].id);
}

}  // namespace loopwright
