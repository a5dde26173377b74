#include "network/run.h"

#include <cmath>

#include <fmt/format.h>

namespace loopwright {

int FindPoint(const Case& cs, const std::string& name) {
  for (size_t i = 0; i < cs.envelope.points.size(); ++i)
    if (cs.envelope.points[i].name == name) return static_cast<int>(i);
  return -1;
}

namespace {

double VarValue(const OperatingPoint& op, int var, double fallback) {
  return var >= 0 && var < static_cast<int>(op.values.size()) ? op.values[var] : fallback;
}

}  // namespace

void ApplyPoint(const Case& cs, const OperatingPoint& op, NetworkSystem* sys) {
  std::vector<LoopState> states(cs.loops.size());
  std::vector<double> boundary(sys->nodes().size(), 0.0);
  for (size_t l = 0; l < cs.loops.size(); ++l) {
    const LoopSpec& loop = cs.loops[l];
    for (const ComponentSpec& comp : loop.components)
      for (const Binding& b : comp.bindings) comp.model->params()[b.param] = VarValue(op, b.variable, 0.0);
    LoopState& s = states[l];
    s.temperature = VarValue(op, loop.temperature_variable, loop.temperature);
    FluidProps f = loop.fluid->Evaluate(s.temperature, cs.ambient_pa);
    s.rho = f.rho;
    s.mu = f.mu;
  }
  for (size_t g = 0; g < sys->nodes().size(); ++g) {
    const NodeRef& nr = sys->nodes()[g];
    const NodeSpec& ns = cs.loops[nr.loop].nodes[nr.node];
    if (ns.boundary == BoundaryKind::kNone) continue;
    const double ps = VarValue(op, ns.pressure_variable, ns.surface_pressure);
    boundary[g] = ps + states[nr.loop].rho * kGravity * ns.level;
  }
  sys->SetPoint(states, boundary);
}

PointResult SolvePoint(const Case& cs, const OperatingPoint& op, NetworkSystem* sys, NetworkSolver* solver,
                       Eigen::VectorXd* u, bool warm) {
  PointResult res;
  res.name = op.name;
  res.values = op.values;
  ApplyPoint(cs, op, sys);
  if (!warm || u->size() != sys->NumUnknowns()) sys->StartingGuess(u);
  res.summary = solver->Solve(u);
  res.converged = res.summary.converged();
  if (!res.converged) return res;
  const auto& states = sys->loop_states();
  for (size_t g = 0; g < sys->nodes().size(); ++g) {
    const NodeRef& nr = sys->nodes()[g];
    NodeResult n;
    n.loop = nr.loop;
    n.node = nr.node;
    n.boundary = nr.unknown < 0;
    n.pressure_pa = sys->NodePressure(static_cast<int>(g), *u);
    n.temperature_k = states[nr.loop].temperature;
    res.nodes.push_back(n);
  }
  // Fluid validity at the point.
  for (size_t l = 0; l < cs.loops.size(); ++l) {
    RangeReport rr = cs.loops[l].fluid->InRange(states[l].temperature, cs.ambient_pa);
    if (!rr.in_range) res.warnings.push_back(fmt::format("loop {}: fluid {}: {}", cs.loops[l].id, cs.loops[l].fluid_id, rr.message));
  }
  std::vector<double> net(sys->nodes().size(), 0.0), gross(sys->nodes().size(), 0.0);
  for (const Branch& b : sys->branches()) {
    BranchOutcome o;
    o.loop = b.loop;
    o.comp = b.comp;
    const LoopState& ls = states[b.loop];
    o.state.p_from = sys->NodePressure(b.from_node, *u);
    o.state.p_to = sys->NodePressure(b.to_node, *u);
    o.state.dp = o.state.p_from - o.state.p_to + ls.rho * kGravity * b.dz;
    o.state.m = (*u)[b.m];
    o.state.rho = ls.rho;
    o.state.mu = ls.mu;
    o.state.ambient_pa = cs.ambient_pa;
    for (int i = 0; i < b.nint; ++i) o.state.x[i] = (*u)[b.x0 + i];
    o.flow_m3s = o.state.m / ls.rho;
    b.model->Describe(o.state, &o.report);
    net[b.from_node] -= o.state.m;
    net[b.to_node] += o.state.m;
    gross[b.from_node] += std::abs(o.state.m);
    gross[b.to_node] += std::abs(o.state.m);
    res.branches.push_back(std::move(o));
  }
  for (size_t g = 0; g < sys->nodes().size(); ++g)
    if (sys->nodes()[g].unknown >= 0 && gross[g] > 0)
      res.max_mass_imbalance_rel = std::max(res.max_mass_imbalance_rel, std::abs(net[g]) / gross[g]);
  return res;
}

}  // namespace loopwright
