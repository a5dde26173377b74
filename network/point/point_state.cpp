#include "network/point/point_state.h"

#include <cmath>

namespace loopwright {

namespace {

template <class Entry, class Same>
void Upsert(std::vector<Entry>* list, const Entry& e, Same same) {
  for (Entry& x : *list)
    if (same(x)) {
      x = e;
      return;
    }
  list->push_back(e);
}

}  // namespace

void DesignOverrides::SetParam(int loop, int comp, int param, double value) {
  Upsert(&params, Param{loop, comp, param, value},
         [&](const Param& x) { return x.loop == loop && x.comp == comp && x.param == param; });
}

void DesignOverrides::SetCoupling(int index, double conductance) {
  Upsert(&couplings, Coupling{index, conductance}, [&](const Coupling& x) { return x.index == index; });
}

void DesignOverrides::SetPart(int loop, int comp, const PartCandidate* part) {
  Upsert(&parts, Part{loop, comp, part}, [&](const Part& x) { return x.loop == loop && x.comp == comp; });
}

void DesignOverrides::SetOil(int binding, int anchor, double kv) {
  Upsert(&oils, Oil{binding, anchor, kv}, [&](const Oil& x) { return x.binding == binding && x.anchor == anchor; });
}

std::vector<int> BranchOffsets(const Case& cs) {
  std::vector<int> off(cs.loops.size() + 1, 0);
  for (size_t l = 0; l < cs.loops.size(); ++l) off[l + 1] = off[l] + static_cast<int>(cs.loops[l].components.size());
  return off;
}

namespace {

// Bound parameters (by the bindings of the model in use), then overrides.
void StateParams(const Case& cs, const OperatingPoint& op, const DesignOverrides& ov, const std::vector<int>& off,
                 PointState* st) {
  st->parts.clear();  // empty: no part swapped in
  if (!ov.parts.empty()) st->parts.assign(off.back(), nullptr);
  for (const auto& p : ov.parts) st->parts[off[p.loop] + p.comp] = p.part;
  st->params.clear();
  for (size_t l = 0; l < cs.loops.size(); ++l)
    for (size_t c = 0; c < cs.loops[l].components.size(); ++c) {
      const int k = off[l] + static_cast<int>(c);
      const PartCandidate* part = st->parts.empty() ? nullptr : st->parts[k];
      const auto& bindings = part ? part->bindings : cs.loops[l].components[c].bindings();
      for (const Binding& b : bindings) st->params.push_back({k, b.param, op.ValueOr(b.variable, 0.0)});
    }
  for (const auto& p : ov.params) st->params.push_back({off[p.loop] + p.comp, p.param, p.value});
}

// Boundary pressures per global node, and for a case with energy balances
// (the thermal system reads them) fixed temperatures, heats and ambients.
void StateNodes(const Case& cs, const OperatingPoint& op, PointState* st) {
  size_t n = 0;
  for (const LoopSpec& loop : cs.loops) n += loop.nodes.size();
  st->surface_pressure.resize(n);
  if (!cs.thermal) {
    size_t g = 0;
    for (const LoopSpec& loop : cs.loops)
      for (const NodeSpec& ns : loop.nodes) st->surface_pressure[g++] = op.ValueOr(ns.cond().pressure_variable, ns.cond().surface_pressure);
    return;
  }
  st->fixed_temperature.resize(n);
  st->node_heat.resize(n);
  st->ambient_temperature.resize(n);
  size_t g = 0;
  for (const LoopSpec& loop : cs.loops)
    for (const NodeSpec& ns : loop.nodes) {
      st->surface_pressure[g] = op.ValueOr(ns.cond().pressure_variable, ns.cond().surface_pressure);
      st->fixed_temperature[g] = op.ValueOr(ns.cond().temperature_variable, ns.cond().temperature);
      st->node_heat[g] = op.ValueOr(ns.cond().heat_variable, ns.cond().heat);
      st->ambient_temperature[g] = op.ValueOr(ns.cond().ambient_variable, ns.cond().ambient_temperature);
      ++g;
    }
}

}  // namespace

void MakePointState(const Case& cs, const OperatingPoint& op, const DesignOverrides& ov, PointState* st) {
  const std::vector<int> off = BranchOffsets(cs);
  StateParams(cs, op, ov, off, st);
  st->oils.clear();
  for (size_t i = 0; i < cs.fluid_bindings.size(); ++i) {
    const FluidBinding& b = cs.fluid_bindings[i];
    st->oils.push_back({static_cast<int>(i), op.ValueOr(b.kv40_var, b.kv40), op.ValueOr(b.kv100_var, b.kv100)});
  }
  for (const auto& o : ov.oils) (o.anchor == 0 ? st->oils[o.binding].kv40 : st->oils[o.binding].kv100) = o.kv;
  st->loop_temperature.resize(cs.loops.size());
  for (size_t l = 0; l < cs.loops.size(); ++l)
    st->loop_temperature[l] = !std::isnan(op.loop_temperature)
                                  ? op.loop_temperature
                                  : op.ValueOr(cs.loops[l].temperature_variable, cs.loops[l].temperature);
  StateNodes(cs, op, st);
  st->coupling_conductance.assign(cs.couplings.size(), kNoValue);
  for (const auto& c : ov.couplings) st->coupling_conductance[c.index] = c.conductance;
}

}  // namespace loopwright
