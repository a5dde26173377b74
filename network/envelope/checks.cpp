#include "network/envelope/checks.h"

#include <cmath>
#include <map>

#include <fmt/format.h>

#include "network/case/check_limits.h"

namespace loopwright {

double CheckLimitValue(const Case& cs, const std::string& key) {
  const CheckLimit* l = FindCheckLimit(key);
  if (!l) return kNoValue;
  if (cs.checks.is_object() && cs.checks.contains(key)) {
    const auto& j = cs.checks[key];
    if (j.is_number()) return j.get<double>();
    if (j.is_string()) {
      ParsedQuantity q = ParseQuantity(j.get<std::string>(), l->dim, cs.ambient_pa);
      if (q.ok) return q.si;
    }
  }
  return l->default_absolute ? l->default_si - cs.ambient_pa : l->default_si;
}

std::string CheckFailureText(const std::string& name) {
  static const std::map<std::string, std::string> text = {
      {"feed_pressure_margin", "the bearing feed falls below its housing pressure plus the margin"},
      {"bearing_flow_min", "the bearing gets less than its minimum flow"},
      {"bearing_flow_max", "the bearing gets more than its maximum flow"},
      {"feed_temperature_max", "the oil reaches the bearing too hot"},
      {"drain_temperature_max", "the oil leaves the bearing too hot"},
      {"start_viscosity_max", "the oil at the pump inlet is too thick to start"},
      {"pump_inlet_pressure_min", "the pump inlet pressure falls too low (cavitation, air release)"},
      {"pump_flow_fraction_min", "the pump delivers too little of its displacement flow"},
      {"relief_closed", "the relief lifts"},
      {"filter_bypass_closed", "the filter bypass opens"},
      {"velocity_suction_max", "the suction line runs too fast"},
      {"velocity_pressure_max", "the pressure line runs too fast"},
      {"velocity_return_max", "the return line runs too fast"},
      {"drain_capacity_margin", "the drain line runs out of capacity"},
      {"boiling_margin_min", "the coolant comes too close to boiling"},
      {"jacket_flow_min", "the coolant circulation falls below its minimum"},
      {"cooler_duty_margin", "the cooler has too little capacity to spare"},
  };
  auto it = text.find(name);
  return it == text.end() ? name + " fails" : it->second;
}

bool IsShutCheck(const std::string& name) { return name == "relief_closed" || name == "filter_bypass_closed"; }

double ShutTargetMargin(const Case& cs, const CheckOutcome& o) {
  return CheckLimitValue(cs, "closing_margin") * std::abs(o.limit);
}

namespace {

const ReportItem* Item(const ComponentReport& r, const std::string& key) {
  for (const auto& it : r.items)
    if (it.key == key) return &it;
  return nullptr;
}

}  // namespace

std::vector<CheckOutcome> EvaluateChecks(const Case& cs, const OperatingPoint& op, const PointResult& p,
                                         std::vector<CheckWarning>* warnings) {
  std::vector<CheckOutcome> out;
  const bool running = p.thermal || !op.isothermal;
  auto add = [&](const std::string& name, const std::string& where, double value, double limit, double margin,
                 Dimension dim) {
    if (std::isnan(limit)) return;
    out.push_back({name, where, value, limit, margin, dim, margin >= 0});
  };
  // Open/closed checks: the pressure a valve's spring sees against its
  // cracking pressure; the margin, crack - pressure, is >= 0 while it is shut.
  auto add_shut = [&](const std::string& name, const std::string& where, double pressure, double crack) {
    add(name, where, pressure, crack, crack - pressure, Dimension::kPressureDifference);
  };
  // Node lookup: global node index by (loop, node).
  std::map<std::pair<int, int>, const NodeResult*> node;
  for (const auto& n : p.nodes) node[{n.loop, n.node}] = &n;
  for (const auto& b : p.branches) {
    const LoopSpec& loop = cs.loops[b.loop];
    const ComponentSpec& c = loop.components[b.comp];
    const std::string where = loop.id + "/" + c.id;
    const ComponentType& type = BranchType(cs, b);  // a part swapped in may change it
    const unsigned roles = type.roles;
    const auto& prm = BranchParams(cs, b);  // the values at this point (bindings, knobs)
    const double q = b.flow_m3s;
    if (roles & kRoleBearing) {
      const double margin_req = std::isnan(c.housing_margin) ? CheckLimitValue(cs, "feed_pressure_margin") : c.housing_margin;
      const double feed = b.state.p_from - b.state.p_to;
      add("feed_pressure_margin", where, feed, margin_req, feed - margin_req, Dimension::kPressureDifference);
      const int imin = type.ParamIndex("flow_min"), imax = type.ParamIndex("flow_max");
      if (imin >= 0 && !std::isnan(prm[imin])) add("bearing_flow_min", where, q, prm[imin], q - prm[imin], Dimension::kVolumeFlow);
      if (imax >= 0 && !std::isnan(prm[imax])) add("bearing_flow_max", where, q, prm[imax], prm[imax] - q, Dimension::kVolumeFlow);
      if (p.thermal) {
        const ReportItem* tin = Item(b.report, "inlet_temperature");
        const ReportItem* tout = Item(b.report, "outlet_temperature");
        const double lf = CheckLimitValue(cs, "feed_temperature_max"), ld = CheckLimitValue(cs, "drain_temperature_max");
        if (tin) add("feed_temperature_max", where, tin->value, lf, lf - tin->value, Dimension::kTemperature);
        if (tout) add("drain_temperature_max", where, tout->value, ld, ld - tout->value, Dimension::kTemperature);
      }
    }
    if (roles & kRolePump) {
      const double pin = b.state.p_from, lim = CheckLimitValue(cs, "pump_inlet_pressure_min");
      add("pump_inlet_pressure_min", where, pin, lim, pin - lim, Dimension::kPressure);
      if (const ReportItem* ge = Item(b.report, "geometric_flow"); ge && ge->value > 0) {
        const double frac = q / ge->value, lf = CheckLimitValue(cs, "pump_flow_fraction_min");
        add("pump_flow_fraction_min", where, frac, lf, frac - lf, Dimension::kDimensionless);
      }
      if (op.isothermal) {
        const double nu = b.state.mu / b.state.rho, lv = CheckLimitValue(cs, "start_viscosity_max");
        add("start_viscosity_max", where, nu, lv, lv - nu, Dimension::kKinematicViscosity);
      }
      // The internal relief sees the pump's pressure rise.
      if (const int ic = type.ParamIndex("relief_crack"); ic >= 0 && !std::isnan(prm[ic]) && running)
        add_shut("relief_closed", where + " (internal relief)", -b.state.dp, prm[ic]);
      if (const ReportItem* rf = Item(b.report, "relief_flow"); rf && rf->text == "lifting" && !running)
        warnings->push_back({where, fmt::format("internal relief lifting at {} ({:.3g} L/min)", p.name, rf->value * 6e4), p.name});
    }
    if (roles & kRoleReliefValve) {
      const ReportItem* rf = Item(b.report, "relief_flow");
      const bool lifting = rf && rf->text == "lifting";
      // The valve sees the piezometric drop across it, as its law does.
      if (const int ic = type.ParamIndex("crack"); ic >= 0 && running)
        add_shut("relief_closed", where, b.state.dp, prm[ic]);
      else if (lifting) warnings->push_back({where, fmt::format("relief valve lifting at {} ({:.3g} L/min)", p.name, q * 6e4), p.name});
    }
    if (roles & kRoleFilter) {
      const ReportItem* bf = Item(b.report, "bypass_fraction");
      const bool open = bf && bf->text == "open";
      // The bypass valve sees the element's pressure drop.
      const ReportItem* ed = Item(b.report, "element_dp");
      const int ic = type.ParamIndex("bypass_crack");
      if (running && ed && ic >= 0 && !std::isnan(prm[ic])) add_shut("filter_bypass_closed", where, ed->value, prm[ic]);
      else if (!running && open) warnings->push_back({where, fmt::format("filter bypass open at {}: {:.1f}% unfiltered (cold start)", p.name, 100 * bf->value), p.name});
    }
    if ((roles & kRoleHeatExchanger) && p.thermal) {
      // Capacity at the hottest oil allowed (drain_temperature_max at the
      // cooler inlet) over the duty it carries now, same effectiveness:
      // (T_lim - T_air) / (T_in - T_air) - 1 >= cooler_duty_margin.
      const ReportItem* itd = Item(b.report, "initial_temperature_difference");
      const ReportItem* tin = Item(b.report, "inlet_temperature");
      const ReportItem* duty = Item(b.report, "duty");
      if (itd && tin && duty && itd->value > 0 && duty->value > 0) {
        const double t_air = tin->value - itd->value;
        const double spare = (CheckLimitValue(cs, "drain_temperature_max") - t_air) / itd->value - 1.0;
        const double lim = CheckLimitValue(cs, "cooler_duty_margin");
        add("cooler_duty_margin", where, spare, lim, spare - lim, Dimension::kDimensionless);
      }
    }
    if (roles & kRoleLine) {
      if (const ReportItem* v = Item(b.report, "velocity")) {
        const NodeSpec& from = loop.nodes[c.from];
        const NodeSpec& to = loop.nodes[c.to];
        std::string key = "velocity_pressure_max";
        if (from.boundary == BoundaryKind::kReservoir || from.boundary == BoundaryKind::kTank) key = "velocity_suction_max";
        else if (to.boundary != BoundaryKind::kNone) key = "velocity_return_max";
        const double lim = CheckLimitValue(cs, key), av = std::abs(v->value);
        add(key, where, av, lim, lim - av, Dimension::kVelocity);
        if (key == "velocity_return_max" && std::abs(q) > 0) {
          // Gravity drain capacity: the line running half full at the return
          // velocity limit (common practice; API 614, from memory) over its flow.
          const int di = type.ParamIndex("diameter");
          const double d = di >= 0 ? prm[di] : NAN;
          const double cap = 0.5 * 0.25 * M_PI * d * d * lim;
          const double spare = cap / std::abs(q) - 1.0, lm = CheckLimitValue(cs, "drain_capacity_margin");
          add("drain_capacity_margin", where, spare, lm, spare - lm, Dimension::kDimensionless);
        }
      }
    }
  }
  // Liquid-to-liquid couplings (an oil-to-water cooler): the same spare
  // capacity as an air cooler's, with the cold stream's inlet in place of
  // the air: (T_lim - T_cold,in) / (T_hot,in - T_cold,in) - 1, the duty the
  // exchanger would carry at the hottest oil allowed over the duty it carries
  // now, at the same effectiveness (e-NTU: q = eps C_min ITD, linear in ITD).
  if (p.thermal) {
    const auto& tr = p.thermal_report;
    const double lim_t = CheckLimitValue(cs, "drain_temperature_max"), lim = CheckLimitValue(cs, "cooler_duty_margin");
    for (size_t ci = 0; ci < tr.coupling_duty.size() && ci < cs.couplings.size() && ci < tr.coupling_hot_in.size(); ++ci) {
      const double itd = tr.coupling_hot_in[ci] - tr.coupling_cold_in[ci];
      if (!(itd > 0) || !(tr.coupling_duty[ci] > 0)) continue;
      const double spare = (lim_t - tr.coupling_cold_in[ci]) / itd - 1.0;
      add("cooler_duty_margin", cs.couplings[ci].value("hot", cs.couplings[ci].value("id", "")), spare, lim, spare - lim,
          Dimension::kDimensionless);
    }
  }
  // Coolant circulation: the flow of every pump of a loop whose fluid can boil.
  const double jf = CheckLimitValue(cs, "jacket_flow_min");
  for (const auto& b : p.branches) {
    const LoopSpec& loop = cs.loops[b.loop];
    const ComponentSpec& c = loop.components[b.comp];
    if ((c.type_info->roles & kRolePump) && loop.fluid->SaturationTemperature(cs.ambient_pa))
      add("jacket_flow_min", loop.id + "/" + c.id, b.flow_m3s, jf, b.flow_m3s - jf, Dimension::kVolumeFlow);
  }
  const double bm = CheckLimitValue(cs, "boiling_margin_min");
  for (const auto& n : p.nodes) {
    if (std::isnan(n.boiling_margin_k)) continue;
    const LoopSpec& loop = cs.loops[n.loop];
    add("boiling_margin_min", loop.id + "/" + loop.nodes[n.node].id, n.boiling_margin_k, bm, n.boiling_margin_k - bm,
        Dimension::kTemperatureDifference);
  }
  return out;
}

std::vector<CheckSummary> SummariseChecks(const std::vector<std::vector<CheckOutcome>>& per_point,
                                          const std::vector<std::string>& point_names) {
  std::vector<CheckSummary> out;
  std::map<std::pair<std::string, std::string>, size_t> index;
  for (size_t i = 0; i < per_point.size(); ++i) {
    for (const auto& c : per_point[i]) {
      auto key = std::make_pair(c.name, c.where);
      auto it = index.find(key);
      if (it == index.end()) {
        index[key] = out.size();
        out.push_back({c, point_names[i], 1});
        continue;
      }
      CheckSummary& s = out[it->second];
      ++s.points;
      // Compare relative to the limit's scale so temperature margins etc. rank sensibly.
      if (c.margin < s.worst.margin) {
        s.worst = c;
        s.point = point_names[i];
      }
    }
  }
  return out;
}

}  // namespace loopwright
