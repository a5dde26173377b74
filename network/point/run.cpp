#include "network/point/run.h"

#include <cmath>
#include <cstring>
#include <typeinfo>

#include <fmt/format.h>

#include "components/pipe.h"
#include "library/process_memory.h"
#include "network/point/failure_causes.h"

namespace loopwright {

int FindPoint(const Case& cs, const std::string& name) {
  for (size_t i = 0; i < cs.envelope.points.size(); ++i)
    if (cs.envelope.points[i].name == name) return static_cast<int>(i);
  return -1;
}

std::string MassImbalanceNode(const Case& cs, const PointResult& p) {
  if (p.mass_imbalance_node < 0 || p.mass_imbalance_node >= static_cast<int>(p.nodes.size())) return "";
  const NodeResult& n = p.nodes[p.mass_imbalance_node];
  return cs.loops[n.loop].id + "/" + cs.loops[n.loop].nodes[n.node].id;
}

const ParamArray& BranchParams(const Case& cs, const BranchOutcome& b) {
  return b.base_model ? b.params : cs.loops[b.loop].components[b.comp].model->params();
}

const ComponentType& BranchType(const Case& cs, const BranchOutcome& b) {
  return b.type_info ? *b.type_info : *cs.loops[b.loop].components[b.comp].type_info;
}

std::unique_ptr<Component> BranchModel(const Case& cs, const BranchOutcome& b) {
  const Component* base = b.base_model ? b.base_model : cs.loops[b.loop].components[b.comp].model.get();
  std::unique_ptr<Component> m = base->Clone();
  if (b.base_model) m->params() = b.params;
  return m;
}

BranchResult BranchState(const Case& cs, const PointResult& p, size_t k) {
  const BranchOutcome& b = p.branches[k];
  BranchResult s;
  s.m = b.m;
  std::copy(std::begin(b.x), std::end(b.x), s.x);
  s.ambient_pa = cs.ambient_pa;
  if (p.loop_states.empty()) return s;  // made by hand
  const LoopAtPoint& l = p.loop_states[b.loop];
  const ComponentSpec& c = cs.loops[b.loop].components[b.comp];
  const std::vector<NodeSpec>& nodes = cs.loops[b.loop].nodes;
  const BranchFluid f = p.branch_fluids.empty() ? BranchFluid{l.rho, l.mu} : p.branch_fluids[k];
  s.p_from = p.nodes[l.first_node + c.from].pressure_pa;
  s.p_to = p.nodes[l.first_node + c.to].pressure_pa;
  s.dp = s.p_from - s.p_to + f.rho * kGravity * (nodes[c.from].elevation - nodes[c.to].elevation);
  s.rho = f.rho;
  s.mu = f.mu;
  s.fluid = l.fluid;
  s.for_checks_only = p.for_checks_only;
  if (!p.branch_heats.empty()) {
    const BranchHeat& h = p.branch_heats[k];
    s.thermal = true;
    s.t_in = h.t_in, s.cp = h.cp, s.heat = h.heat, s.t_out = h.t_out;
  } else {  // isothermal: the loop's one temperature (thermal stays false, cp 0)
    s.t_in = s.t_out = l.temperature_k;
  }
  return s;
}

BranchResult BranchState(const Case& cs, const PointResult& p, const BranchOutcome& b) {
  return BranchState(cs, p, static_cast<size_t>(&b - p.branches.data()));
}

const Fluid& PointFluid(const Case& cs, const PointResult& p, int loop) {
  return p.fluids.empty() ? *cs.loops[loop].fluid : *p.fluids[loop];
}

namespace {

// One path of a three-port thermostatic valve (one port and the sensed node
// in common with the other path): its share of the valve's flow, as "split".
void ValveSplit(const Case& cs, const PointResult& p, const BranchOutcome& a, ComponentReport* out) {
  if (!(BranchType(cs, a).roles & kRoleThermostat)) return;
  const ComponentSpec& ca = cs.loops[a.loop].components[a.comp];
  for (const BranchOutcome& b : p.branches) {
    if (&b == &a || !(BranchType(cs, b).roles & kRoleThermostat)) continue;
    const ComponentSpec& cb = cs.loops[b.loop].components[b.comp];
    if (a.loop != b.loop || ca.sensed_node() != cb.sensed_node() || (ca.from != cb.from && ca.to != cb.to)) continue;
    const double total = std::abs(a.m) + std::abs(b.m);
    out->items.push_back({"split", total > 0 ? std::abs(a.m) / total : 0.0, Dimension::kDimensionless, ""});
    return;
  }
}

}  // namespace

void DescribeBranch(const Case& cs, const PointResult& p, size_t k, ComponentReport* out) {
  out->items.clear();
  out->warnings.clear();
  out->valve = ValveState{};
  out->shaft_power_W = out->heat_W = 0;
  const BranchOutcome& b = p.branches[k];
  if (!b.type_info) return;  // made by hand: nothing was described
  const Component& own = *cs.loops[b.loop].components[b.comp].model;
  // The case's own model describes in place (Describe is const); a model
  // with a cache (not Shareable: shared by the solver threads) or with
  // parameters of the point's own is copied.
  const BranchResult st = BranchState(cs, p, k);
  if (!b.base_model && own.Shareable()) own.Describe(st, out);
  else BranchModel(cs, b)->Describe(st, out);
  if (st.thermal) {
    out->heat_W = st.heat;
    out->items.push_back({"inlet_temperature", st.t_in, Dimension::kTemperature, ""});
    out->items.push_back({"outlet_temperature", st.t_out, Dimension::kTemperature, ""});
  }
  ValveSplit(cs, p, b, out);
}

ComponentReport BranchReport(const Case& cs, const PointResult& p, size_t k) {
  ComponentReport r;
  DescribeBranch(cs, p, k, &r);
  return r;
}

ComponentReport BranchReport(const Case& cs, const PointResult& p, const BranchOutcome& b) {
  return BranchReport(cs, p, static_cast<size_t>(&b - p.branches.data()));
}

// Thermostatic valves at the loop's temperature of the point, and every
// model's stream at it with no flow known yet (Component::FollowStream: a
// bearing's films at the loop's viscosity). What an isothermal point keeps;
// a thermal one's passes set both again from the node temperatures.
void FollowLoopTemperatures(const Case& cs, const std::vector<SensorSite>& sites, NetworkSystem* sys) {
  for (const SensorSite& s : sites) WriteSensed(s, sys->loop_states()[s.loop].temperature, sys);
  for (size_t k = 0; k < sys->branches().size(); ++k) {
    const int loop = sys->branches()[k].loop;
    sys->FollowStream(static_cast<int>(k), {sys->loop_states()[loop].temperature, std::nan(""), cs.ambient_pa,
                                            &sys->loop_fluid(loop)});
  }
}

void ApplyPoint(const Case& cs, const OperatingPoint& op, NetworkSystem* sys) {
  PointState st;
  MakePointState(cs, op, {}, &st);
  sys->SetState(st);
  FollowLoopTemperatures(cs, SensorSites(cs, *sys), sys);
}

namespace {

// Whether branch k's line sits on a hard friction switch (pipe regime
// "at_switch"), as its working model describes its state `st`. Only a pipe
// with the laminar_colebrook law reports that regime (components/pipe.cpp),
// so no other branch is described here.
bool AtFrictionSwitch(const NetworkSystem& sys, size_t k, const BranchResult& st) {
  const Branch& b = sys.branches()[k];
  const Component& m = *b.model;
  if (!(sys.branch_type(static_cast<int>(k))->roles & kRoleLine) || typeid(m) != typeid(Pipe) ||
      m.params()[Pipe::kFriction] != static_cast<double>(FrictionMethod::kLaminarColebrook))
    return false;
  thread_local ComponentReport scratch;
  scratch.items.clear();
  scratch.warnings.clear();
  m.Describe(st, &scratch);
  for (const ReportItem& it : scratch.items)
    if (it.text == "at_switch") return true;
  return false;
}

// A free node all of whose lines sit on a hard friction switch (pipe regime
// "at_switch"): their flows are fixed at the switch flow but their drops may
// lie anywhere between the laminar and the turbulent value, so the node's
// pressure is one of a range, not a result of the laws.
void UndeterminedPressureWarnings(const Case& cs, const NetworkSystem& sys, PointResult* res) {
  std::vector<int> joined(sys.nodes().size(), 0), at_switch(sys.nodes().size(), 0);
  for (size_t k = 0; k < res->branches.size(); ++k) {
    const Branch& b = sys.branches()[k];
    const bool sw = AtFrictionSwitch(sys, k, BranchState(cs, *res, k));
    for (int g : {b.from_node, b.to_node}) ++joined[g], at_switch[g] += sw;
  }
  for (size_t g = 0; g < sys.nodes().size(); ++g) {
    const NodeRef& nr = sys.nodes()[g];
    if (nr.unknown < 0 || joined[g] == 0 || at_switch[g] < joined[g]) continue;
    res->warnings.push_back(fmt::format(
        "node {}/{}: every line joined there sits on the laminar/turbulent switch of laminar_colebrook, whose drop may "
        "lie anywhere between the laminar and the turbulent value; the pressure shown is one of a range, not "
        "determined by the laws (churchill_1977 gives one answer)",
        cs.loops[nr.loop].id, cs.loops[nr.loop].nodes[nr.node].id));
  }
}


void Collect(const Case& cs, const OperatingPoint& op, NetworkSystem* sys, const Eigen::VectorXd* u_ptr,
             const std::vector<double>* T, const ThermalReport* tr, PointResult* out);

// A converged point in a physically impossible state is not a result: its
// nodes and components are dropped, its summary carries the cause.
void NotAResult(const Case& cs, PointResult* res) {
  if (!RejectUnphysical(cs, res)) return;
  res->nodes.clear();
  res->branches.clear();
}

}  // namespace

namespace {

// Solves the point already applied to *sys (see SolvePoint); with
// `release`, the iteration's work is freed before the result is collected.
PointResult SolveApplied(const Case& cs, const OperatingPoint& op, NetworkSystem* sys, NetworkSolver* solver,
                         Eigen::VectorXd* u, bool warm, bool release = false) {
  PointResult res;
  res.name = op.name;
  res.values = op.values;
  const bool cold = !warm || u->size() != sys->NumUnknowns();
  if (cold) sys->StartingGuess(u);
  res.summary = solver->Solve(u, cold);
  if (release) {
    // The freed work's pages go back to the system: the result, collected
    // next, is one block larger than any of them and would otherwise be
    // placed beside them with the freed memory kept (library/process_memory.h).
    solver->ReleaseWork();
    GiveBackFreedMemory();
  }
  res.converged = res.summary.converged();
  if (!res.converged) {
    PointResult at;
    Collect(cs, op, sys, u, nullptr, nullptr, &at);
    ExplainFailure(cs, at, &res.summary);
    return res;
  }
  Collect(cs, op, sys, u, nullptr, nullptr, &res);
  NotAResult(cs, &res);
  return res;
}

}  // namespace

PointResult SolvePoint(const Case& cs, const OperatingPoint& op, NetworkSystem* sys, NetworkSolver* solver,
                       Eigen::VectorXd* u, bool warm) {
  ApplyPoint(cs, op, sys);
  return SolveApplied(cs, op, sys, solver, u, warm);
}

CaseSolver::CaseSolver(const Case& c) : cs(c), sys(c), solver(&sys) {
  if (cs.thermal) thermal = std::make_unique<ThermalSystem>(cs, sys);
  sensors = thermal ? thermal->sensors() : SensorSites(cs, sys);
}

void CaseSolver::Apply(const OperatingPoint& op) {
  applied = &op;
  MakePointState(cs, op, overrides, &state);
  sys.SetState(state);
  FollowLoopTemperatures(cs, sensors, &sys);
  if (thermal) thermal->SetState(state);
}

double CaseSolver::Knob(int loop, int comp, int param, int coupling) {
  if (coupling >= 0) return thermal ? *thermal->coupling_conductance(coupling) : NAN;
  return sys.working_model(BranchOffsets(cs)[loop] + comp)->params()[param];
}

bool CaseSolver::SetKnob(int loop, int comp, int param, int coupling, double value) {
  if (coupling >= 0) {
    if (!thermal) return false;
    overrides.SetCoupling(coupling, value);
    *thermal->coupling_conductance(coupling) = value;
    return true;
  }
  overrides.SetParam(loop, comp, param, value);
  sys.working_model(BranchOffsets(cs)[loop] + comp)->params()[param] = value;
  return true;
}

double CaseSolver::OilAnchor(int binding, int anchor) const {
  for (const PointState::OilAnchor& a : state.oils)
    if (a.binding == binding) return anchor == 0 ? a.kv40 : a.kv100;
  return NAN;
}

bool CaseSolver::SetOilAnchor(int binding, int anchor, double kv) {
  if (!applied) return false;
  overrides.SetOil(binding, anchor, kv);
  // Only the fluids change: the working models keep their values (knobs
  // set since, the thermostats' sensed temperatures).
  const size_t nb = sys.branches().size();
  std::vector<ParamArray> params(nb);
  for (size_t k = 0; k < nb; ++k) params[k] = sys.working_model(static_cast<int>(k))->params();
  MakePointState(cs, *applied, overrides, &state);
  sys.SetState(state);
  if (thermal) thermal->SetState(state);
  for (size_t k = 0; k < nb; ++k) sys.working_model(static_cast<int>(k))->params() = params[k];
  return true;
}

PointResult SolveOnce(const Case& cs, const OperatingPoint& op) {
  PointResult res;
  {
    CaseSolver solver(cs);
    solver.one_shot = true;
    res = solver.Solve(op, false);
  }
  GiveBackFreedMemory();  // the solver's pages, before the checks and the write take theirs
  return res;
}

PointResult CaseSolver::Solve(const OperatingPoint& op, bool warm) {
  Apply(op);
  if (!thermal || op.isothermal) {
    PointResult r = SolveApplied(cs, op, &sys, &solver, &u, warm && has_answer, one_shot);
    has_answer = r.converged;
    return r;
  }
  if (coupled && warm && has_answer && thermal->heat_scale() == 1.0) {
    PointResult near;
    if (SolveNear(op, &near)) return near;
  }
  PointResult r = SolveCoupled(op, warm);
  if (r.converged || !RunawayCandidate(r)) return r;
  return SolveByContinuation(op, std::move(r));
}

// A thermal point that failed in its energy balance or coupling passes (or in
// a hydraulic solve after the first pass, at temperatures the passes
// produced), not in a physically impossible hydraulic state.
bool CaseSolver::RunawayCandidate(const PointResult& r) const {
  const Termination t = r.summary.termination;
  if (r.summary.cause_kind == kThermostatNotSettled) return false;  // named already; more heat cannot help
  if (t == Termination::kEnergyBalance || t == Termination::kCouplingNotSettled) return true;
  return t != Termination::kUnphysical && r.coupling_iterations > 1;
}

PointResult CaseSolver::SolvePasses(const OperatingPoint& op, bool warm) {
  // Nested scheme: hydraulics at the current temperatures, then the energy
  // balances at the resulting flows, until the temperatures stop moving.
  PointResult res;
  res.name = op.name;
  res.values = op.values;
  res.thermal = true;
  if (!(warm && has_answer) || T.size() != sys.nodes().size()) thermal->InitialTemperatures(op, &T);
  if (!(warm && has_answer)) sys.StartingGuess(&u);
  ThermalReport tr;
  double dt_max = INFINITY;
  std::vector<double> t_prev;
  int pass = 0;
  bool hydraulic_failed = false;
  int newton_total = 0, nodal_total = 0, lm_total = 0;
  std::vector<double> step;  // temperature change of the last pass
  double omega = 1.0;        // relaxation of the passes (Relax)
  for (; pass < 200; ++pass) {
    thermal->ApplyBranchFluids(T, u, &sys);
    res.summary = solver.Solve(&u);
    newton_total += res.summary.newton_iterations;
    nodal_total += res.summary.nodal_iterations;
    lm_total += res.summary.lm_iterations;
    if ((hydraulic_failed = !res.summary.converged())) break;
    t_prev = T;
    if (!thermal->Solve(u, &T, &tr)) {
      res.summary.termination = Termination::kEnergyBalance;
      res.summary.message = fmt::format("the energy balance did not converge (largest residual {:.3g} W)", tr.max_residual_W);
      res.summary.worst = EnergyRows(cs, sys, thermal.get(), u, T);
      break;
    }
    dt_max = 0;
    for (size_t g = 0; g < T.size(); ++g) dt_max = std::max(dt_max, std::abs(T[g] - t_prev[g]));
    if (dt_max <= passes_tolerance_k) break;
    Relax(t_prev, &step, &omega);
  }
  res.coupling_iterations = std::min(pass + 1, 200);
  res.summary.newton_iterations = newton_total;
  res.summary.nodal_iterations = nodal_total;
  res.summary.lm_iterations = lm_total;
  res.summary.used_fallback = lm_total > 0;
  res.summary.coupling_passes = res.coupling_iterations;
  if (res.summary.converged() && dt_max > passes_tolerance_k) {
    res.summary.termination = Termination::kCouplingNotSettled;
    res.summary.message = fmt::format("the hydraulic-thermal passes did not settle (last temperature change {:.3g} K)", dt_max);
    res.summary.worst = TemperatureChangeRows(cs, sys, T, t_prev);
  }
  if (res.summary.converged() && tr.converged && !thermal->Finish(u, T, &tr)) {
    // The Newton iteration met its tolerance but the per-loop energy closure
    // did not: an energy-balance failure with its node rows (not a
    // non-finite residual: every number here is finite).
    res.summary.termination = Termination::kEnergyBalance;
    res.summary.message = tr.failure;
    res.summary.worst = EnergyRows(cs, sys, thermal.get(), u, T);
  }
  res.converged = res.summary.converged() && tr.converged;
  has_answer = res.converged;
  if (!res.converged) {
    // Describe the last iterate (hydraulic failures at the temperatures of
    // the pass; thermal ones with their heats) and name the likely cause.
    PointResult at;
    if (hydraulic_failed) Collect(cs, op, &sys, &u, &T, nullptr, &at);
    else at = Describe(op, u, T);
    if (hydraulic_failed || !ExplainByHydraulicState(cs, at, &res.summary)) ExplainFailure(cs, at, &res.summary);
    return res;
  }
  res.thermal_report = tr;
  if (collect_answers) CollectAnswer(op, &res);
  return res;
}

void CaseSolver::CollectAnswer(const OperatingPoint& op, PointResult* res) {
  Collect(cs, op, &sys, &u, &T, &res->thermal_report, res);
  NotAResult(cs, res);
}

// Relaxation of the passes, set from the passes themselves (dynamic
// relaxation after Irons and Tuck, 1969, from memory): with d_n = T - t_prev
// the unrelaxed change of pass n and omega the factor that moved the last
// iterate, the observed ratio rho = d_n.d_(n-1) / |d_(n-1)|^2 estimates
// rho = 1 - omega (1 - g), g the passes' own gain; the factor that would
// cancel it is omega / (1 - rho), kept within [1/8, 1]. A 2-cycle (rho near
// -1: a bearing's flow flipping between forward and backward as its drain's
// temperature follows) halves omega; a pass that contracts on its own (rho
// small) brings omega back to 1, so a damped start does not slow every later
// pass to the damping's rate. A converged answer is the same fixed point: the
// test of the passes is on the unrelaxed change.
void CaseSolver::Relax(const std::vector<double>& t_prev, std::vector<double>* step, double* omega) {
  double dot = 0, nn = 0;
  const bool have = step->size() == T.size();
  if (!have) step->assign(T.size(), 0.0);
  for (size_t g = 0; g < T.size(); ++g) {
    const double d = T[g] - t_prev[g];
    dot += (*step)[g] * d;
    nn += (*step)[g] * (*step)[g];
    (*step)[g] = d;
  }
  if (have && nn > 0) {
    const double rho = dot / nn;
    if (rho < 1.0) *omega = std::clamp(*omega / (1.0 - rho), 0.125, 1.0);
  }
  if (*omega == 1.0) return;
  for (size_t g = 0; g < T.size(); ++g) T[g] = t_prev[g] + *omega * (*step)[g];
}

namespace {

// The node of the highest temperature in T (a non-finite one first), -1 if none.
int HottestNode(const std::vector<double>& T) {
  int g_max = -1;
  for (size_t g = 0; g < T.size(); ++g)
    if (g_max < 0 || !std::isfinite(T[g]) || T[g] > T[g_max]) {
      g_max = static_cast<int>(g);
      if (!std::isfinite(T[g])) break;
    }
  return g_max;
}

}  // namespace

// Continuation in the heat input (DEVELOPERS.md, "Thermal runaway"): the
// point's heat sources scaled by lambda = 1/8, 2/8, ..., 1, each solve warm
// from the last (1/64 and 1/16 first). Reaching lambda = 1 gives the point's answer (or its
// physically impossible state); stopping earlier, the largest lambda with a
// steady state in the fluid's range is bisected to 1/64 and the failure is
// explained as a thermal runaway with that fraction and the hottest node.
PointResult CaseSolver::SolveByContinuation(const OperatingPoint& op, PointResult failed) {
  const std::vector<double> t_fail = T;
  double lam_ok = 0, lam_bad = 1;
  PointResult at_ok;
  Eigen::VectorXd u_ok;
  std::vector<double> t_ok;
  has_answer = false;
  auto attempt = [&](double lam) {
    thermal->SetHeatScale(lam);
    if (lam_ok > 0) u = u_ok, T = t_ok, has_answer = true;
    PointResult r = SolveCoupled(op, lam_ok > 0);
    if (r.converged) lam_ok = lam, at_ok = r, u_ok = u, t_ok = T;
    else lam_bad = std::min(lam_bad, lam);
    return r;
  };
  // Fractions 1/64, 1/16, then 1/8 .. 1 in steps of 1/8.
  for (int k = -1; k <= 8; ++k) {
    PointResult r = attempt(k == -1 ? 1.0 / 64 : k == 0 ? 1.0 / 16 : k / 8.0);
    if (k == 8 && (r.converged || r.summary.termination == Termination::kUnphysical)) {
      thermal->SetHeatScale(1.0);
      r.summary.message += " (reached by continuation in the heat input)";
      return r;
    }
    if (!r.converged) break;
  }
  if (lam_ok > 0)
    for (int i = 0; i < 3; ++i) attempt(0.5 * (lam_ok + lam_bad));
  thermal->SetHeatScale(1.0);
  has_answer = false;
  T = t_fail;
  const int g = HottestNode(t_fail);
  if (lam_ok > 0 && g >= 0) ExplainRunaway(cs, at_ok, lam_ok, lam_bad, g, t_fail[g], &failed.summary);
  return failed;
}

PointResult CaseSolver::Describe(const OperatingPoint& op, const Eigen::VectorXd& state_u,
                                 const std::vector<double>& state_T) {
  PointResult res;
  res.name = op.name;
  res.values = op.values;
  res.converged = true;
  if (!IsThermal(op)) {
    Collect(cs, op, &sys, &state_u, nullptr, nullptr, &res);
    return res;
  }
  res.thermal = true;
  thermal->ApplyBranchFluids(state_T, state_u, &sys);
  Eigen::VectorXd r;
  thermal->Residuals(state_u, state_T, &r, &res.thermal_report);
  Collect(cs, op, &sys, &state_u, &state_T, &res.thermal_report, &res);
  return res;
}

namespace {

// The closure figures of PointResult from the net mass flow of every node
// and the largest branch flow of every loop.
void MassClosure(const NetworkSystem& sys, const std::vector<double>& net, const std::vector<double>& loop_max,
                 PointResult* res) {
  for (size_t g = 0; g < sys.nodes().size(); ++g) {
    const NodeRef& nr = sys.nodes()[g];
    if (nr.unknown < 0) continue;
    const double a = std::abs(net[g]);
    res->max_mass_imbalance_kg_s = std::max(res->max_mass_imbalance_kg_s, a);
    // Relative to the loop's largest flow, floored at the solver's flow
    // floor (a stagnant loop's flows are zero to within that floor).
    const double floor = SolverOptions{}.flow_floor_m3s * sys.loop_states()[nr.loop].rho;
    const double rel = a / std::max(loop_max[nr.loop], floor);
    if (res->mass_imbalance_node < 0 || rel > res->max_mass_imbalance_rel) {
      res->max_mass_imbalance_rel = rel;
      res->mass_imbalance_node = static_cast<int>(g);
    }
  }
}

// A node's result at (u, T) (T null: the loop's one temperature); a fluid
// out of its range is a warning of the point.
NodeResult CollectNode(const Case& cs, const NetworkSystem& sys, size_t g, const Eigen::VectorXd& u,
                       const std::vector<double>* T, PointResult* res) {
  const NodeRef& nr = sys.nodes()[g];
  NodeResult n;
  n.loop = nr.loop;
  n.node = nr.node;
  n.boundary = nr.unknown < 0;
  n.pressure_pa = sys.NodePressure(static_cast<int>(g), u);
  n.temperature_k = T ? (*T)[g] : sys.loop_states()[nr.loop].temperature;
  const Fluid& fl = sys.loop_fluid(nr.loop);
  const double p_abs = n.pressure_pa + cs.ambient_pa;
  if (auto tsat = fl.SaturationTemperature(std::max(p_abs, 612.0))) n.boiling_margin_k = *tsat - n.temperature_k;
  // At an isothermal point the loop's first node speaks for all (one temperature).
  RangeReport rr = T || nr.node == 0 ? fl.InRange(n.temperature_k, std::max(p_abs, 1000.0)) : RangeReport{};
  if (!rr.in_range && (T || nr.node == 0))
    res->warnings.push_back(fmt::format("loop {}: fluid {}{}: {}", cs.loops[nr.loop].id, cs.loops[nr.loop].fluid_id,
                                        T ? " at node " + cs.loops[nr.loop].nodes[nr.node].id : "", rr.message));
  return n;
}

// Branch k's outcome at u: its unknowns and the model in effect.
BranchOutcome CollectBranch(const Case& cs, const NetworkSystem& sys, size_t k, const Eigen::VectorXd& u) {
  const Branch& b = sys.branches()[k];
  BranchOutcome o;
  o.loop = b.loop;
  o.comp = b.comp;
  o.m = u[b.m];
  for (int i = 0; i < b.nint; ++i) o.x[i] = u[b.x0() + i];
  o.flow_m3s = o.m / sys.branch_fluid(static_cast<int>(k)).rho;
  o.type_info = sys.branch_type(static_cast<int>(k));
  // The model and parameters in effect, kept only where they differ from
  // the case's component (a part swapped in, a bound or sized parameter, a
  // state a model that follows its stream wrote): otherwise BranchParams,
  // BranchModel and BranchReport read the case's, and a plant-size point
  // does not hold a second copy of every component's parameters.
  const Component* source = sys.model_source(static_cast<int>(k));
  const Component& own = *cs.loops[b.loop].components[b.comp].model;
  if (source != &own || !b.model->params().SameBits(own.params().data(), own.params().size())) {
    o.base_model = source;
    o.params = b.model->params();
  }
  return o;
}

// What BranchState reads besides nodes and branches: the loops' states, the
// branches' own fluid states where set apart, their heats (tr: thermal).
void CollectStates(const NetworkSystem& sys, const ThermalReport* tr, PointResult* res) {
  res->loop_states.resize(sys.loop_states().size());
  for (size_t l = 0; l < res->loop_states.size(); ++l) {
    const int li = static_cast<int>(l);
    const BranchFluid& f = sys.loop_fluid_state(li);
    res->loop_states[l] = {sys.loop_node_offset(li), sys.loop_states()[l].temperature, f.rho, f.mu, &sys.loop_fluid(li)};
  }
  if (sys.has_branch_fluids()) {
    res->branch_fluids.resize(sys.branches().size());
    for (size_t k = 0; k < sys.branches().size(); ++k) res->branch_fluids[k] = sys.branch_fluid(static_cast<int>(k));
  }
  if (tr) {
    res->branch_heats.resize(sys.branches().size());
    for (size_t k = 0; k < sys.branches().size(); ++k)
      res->branch_heats[k] = {tr->branch_t_in[k], tr->branch_cp[k], tr->branch_heat[k], tr->branch_t_out[k]};
  }
  res->for_checks_only = sys.for_checks_only();
}

void Collect(const Case& cs, const OperatingPoint& op, NetworkSystem* sys, const Eigen::VectorXd* u_ptr,
             const std::vector<double>* T, const ThermalReport* tr, PointResult* out) {
  (void)op;
  const Eigen::VectorXd& u = *u_ptr;
  PointResult& res = *out;
  res.nodes.reserve(sys->nodes().size());
  res.branches.reserve(sys->branches().size());
  for (size_t g = 0; g < sys->nodes().size(); ++g) res.nodes.push_back(CollectNode(cs, *sys, g, u, T, &res));
  std::vector<double> net(sys->nodes().size(), 0.0), loop_max(cs.loops.size(), 0.0);
  for (size_t k = 0; k < sys->branches().size(); ++k) {
    const Branch& b = sys->branches()[k];
    res.branches.push_back(CollectBranch(cs, *sys, k, u));
    net[b.from_node] -= u[b.m];
    net[b.to_node] += u[b.m];
    loop_max[b.loop] = std::max(loop_max[b.loop], std::abs(u[b.m]));
  }
  CollectStates(*sys, tr, &res);
  MassClosure(*sys, net, loop_max, &res);
  UndeterminedPressureWarnings(cs, *sys, &res);
  if (!cs.fluid_bindings.empty())
    for (size_t l = 0; l < cs.loops.size(); ++l) res.fluids.push_back(sys->loop_fluid_ptr(static_cast<int>(l)));
}

}  // namespace

}  // namespace loopwright
