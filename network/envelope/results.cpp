#include "network/envelope/results.h"

#include <cmath>

#include <fmt/format.h>

#include "library/oil.h"

namespace loopwright {

using nlohmann::json;

std::string SiKeySuffix(Dimension dim) {
  switch (dim) {
    case Dimension::kDimensionless: return "";
    case Dimension::kPressure: return "_Pa";
    case Dimension::kPressureDifference: return "_Pa";
    case Dimension::kVolumeFlow: return "_m3_s";
    case Dimension::kMassFlow: return "_kg_s";
    case Dimension::kLength: return "_m";
    case Dimension::kArea: return "_m2";
    case Dimension::kVolume: return "_m3";
    case Dimension::kDisplacement: return "_m3_rev";
    case Dimension::kTemperature: return "_K";
    case Dimension::kTemperatureDifference: return "_K";
    case Dimension::kKinematicViscosity: return "_m2_s";
    case Dimension::kDynamicViscosity: return "_Pa_s";
    case Dimension::kDensity: return "_kg_m3";
    case Dimension::kPower: return "_W";
    case Dimension::kConductance: return "_W_K";
    case Dimension::kRotationalSpeed: return "_rad_s";
    case Dimension::kSpecificHeat: return "_J_kgK";
    case Dimension::kThermalConductivity: return "_W_mK";
    case Dimension::kVelocity: return "_m_s";
    case Dimension::kTime: return "_s";
    case Dimension::kSlipCoefficient: return "_m3";
    case Dimension::kInverseTemperature: return "_1_K";
    case Dimension::kFlowCoefficientKv: return "_Kv";
    case Dimension::kForce: return "_N";
    default: return "";
  }
}

std::string SiUnitName(Dimension dim) {
  const std::string suffix = SiKeySuffix(dim);
  return suffix.empty() ? "1" : suffix.substr(1);
}

nlohmann::json CheckOutcomeJson(const CheckOutcome& o) {
  return {{"name", o.name},     {"where", o.where},           {"value", o.value},
          {"limit", o.limit},   {"margin", o.margin},         {"unit", SiUnitName(o.dim)},
          {"pass", o.pass},     {"limit_source", LimitSourceName(o.source)}};
}

const char* SafetyCautions() {
  return "These are engineering estimates. Confirm them against the manufacturers' data for the machine, pump, "
         "filter, valves and coolers. Hot oil, pressurised lines and high-speed rotors can injure and can start "
         "fires; follow local codes and licensed practice.";
}

namespace {

json ComponentJson(const Case& cs, const BranchOutcome& b) {
  const LoopSpec& loop = cs.loops[b.loop];
  const ComponentSpec& c = loop.components[b.comp];
  json cj = {{"loop", loop.id},
             {"id", c.id},
             {"type", c.type},
             {"from", loop.nodes[c.from].id},
             {"to", loop.nodes[c.to].id},
             {"flow_m3_s", b.flow_m3s},
             {"mass_flow_kg_s", b.state.m},
             {"dp_Pa", b.state.p_from - b.state.p_to},
             {"dp_piezometric_Pa", b.state.dp},
             {"heat_W", b.report.heat_W}};
  if (b.report.shaft_power_W > 0) cj["shaft_power_W"] = b.report.shaft_power_W;
  json details = json::object();
  for (const auto& it : b.report.items) {
    details[it.key + SiKeySuffix(it.dim)] = it.value;
    if (!it.text.empty()) details[it.key + "_state"] = it.text;
  }
  cj["details"] = details;
  cj["warnings"] = b.report.warnings;
  return cj;
}

json NodeJson(const Case& cs, const NodeResult& n) {
  const LoopSpec& loop = cs.loops[n.loop];
  json nj = {{"loop", loop.id},
             {"id", loop.nodes[n.node].id},
             {"boundary", n.boundary},
             {"pressure_Pa", n.pressure_pa},
             {"pressure_abs_Pa", n.pressure_pa + cs.ambient_pa},
             {"temperature_K", n.temperature_k}};
  if (!std::isnan(n.boiling_margin_k)) nj["boiling_margin_K"] = n.boiling_margin_k;
  return nj;
}

// Energy per loop, coupling duties and passes of a thermal point.
void AddThermal(const Case& cs, const PointResult& p, json* pj) {
  const ThermalReport& t = p.thermal_report;
  json loops = json::array();
  for (size_t l = 0; l < cs.loops.size() && l < t.loop_heat_added.size(); ++l)
    loops.push_back({{"loop", cs.loops[l].id}, {"heat_added_W", t.loop_heat_added[l]},
                     {"heat_removed_W", t.loop_heat_removed[l]}, {"heat_carried_out_W", t.loop_heat_carried[l]},
                     {"work_heat_W", t.loop_work_heat[l]}, {"work_heat_included", cs.work_heat},
                     {"energy_closure_W", t.loop_closure_W[l]}, {"energy_closure_relative", t.loop_closure[l]}});
  (*pj)["energy"] = loops;
  json cps = json::array();
  for (size_t i = 0; i < cs.couplings.size() && i < t.coupling_duty.size(); ++i)
    cps.push_back({{"id", cs.couplings[i].id}, {"duty_W", t.coupling_duty[i]},
                   {"effectiveness", t.coupling_effectiveness[i]}});
  (*pj)["couplings"] = cps;
  (*pj)["coupling_passes"] = p.coupling_iterations;
}

}  // namespace

json PointJson(const Case& cs, const PointResult& p) {
  json pj;
  pj["name"] = p.name;
  json vals = json::object();
  for (size_t i = 0; i < cs.envelope.variables.size() && i < p.values.size(); ++i)
    vals[cs.envelope.variables[i].name + SiKeySuffix(cs.envelope.variables[i].dim)] = p.values[i];
  pj["values"] = vals;
  pj["converged"] = p.converged;
  pj["solver"] = {{"termination", TerminationName(p.summary.termination)},
                  {"newton_iterations", p.summary.newton_iterations},
                  {"coupling_passes", p.summary.coupling_passes},
                  {"lm_iterations", p.summary.lm_iterations},
                  {"max_pressure_residual_Pa", p.summary.max_pressure_residual_pa},
                  {"report", p.summary.Report()}};
  pj["checks"] = json::array();
  if (!p.converged) {
    json worst = json::array();
    for (const auto& w : p.summary.worst) worst.push_back({{"equation", w.what}, {"residual", w.residual}, {"unit", w.unit}});
    pj["largest_residuals"] = worst;
    pj["cause"] = {{"kind", p.summary.cause_kind}, {"place", p.summary.place}, {"text", p.summary.cause}};
    pj["nodes"] = json::array();
    pj["components"] = json::array();
    return pj;
  }
  pj["max_mass_imbalance_relative"] = p.max_mass_imbalance_rel;
  pj["mass_balance_closure"] = {
      {"max_imbalance_kg_s", p.max_mass_imbalance_kg_s},
      {"max_imbalance_relative_to_largest_flow", p.max_mass_imbalance_rel},
      {"node", MassImbalanceNode(cs, p)}};
  pj["nodes"] = json::array();
  for (const auto& n : p.nodes) pj["nodes"].push_back(NodeJson(cs, n));
  pj["components"] = json::array();
  for (const auto& b : p.branches) pj["components"].push_back(ComponentJson(cs, b));
  pj["warnings"] = p.warnings;
  if (p.thermal) AddThermal(cs, p, &pj);
  return pj;
}

json ResultsJson(const Case& cs, const std::vector<PointResult>& points, const std::string& verdict) {
  json j;
  j["tool"] = "loopwright";
  j["version"] = LOOPWRIGHT_VERSION;
  j["case"] = cs.name;
  j["case_file"] = cs.path;
  j["verdict"] = verdict;
  j["ambient_pressure_Pa"] = cs.ambient_pa;
  j["cautions"] = SafetyCautions();
  // Each fluid by id: its kind and, for an oil, its ASTM D2270 viscosity
  // index (null where D2270 does not define it, KV100 < 2 cSt).
  json fl = json::object();
  for (const auto& [id, f] : cs.fluids) {
    if (!f) continue;
    fl[id] = {{"kind", f->Kind()}};
    if (const auto* oil = dynamic_cast<const OilFluid*>(f.get())) {
      const double vi = oil->ViscosityIndex();
      fl[id]["viscosity_index"] = std::isfinite(vi) ? json(vi) : json(nullptr);
    }
  }
  j["fluids"] = fl;
  json pts = json::array();
  for (const auto& p : points) pts.push_back(PointJson(cs, p));
  j["points"] = pts;
  return j;
}

}  // namespace loopwright
