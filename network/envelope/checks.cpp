#include "network/envelope/checks.h"

#include <cmath>
#include <unordered_map>
#include <memory>
#include <string_view>

#include <fmt/format.h>

namespace loopwright {

double CheckLimitValue(const Case& cs, const std::string& name) {
  const CheckRow* r = FindCheck(name);
  return r ? cs.checks[r->id] : kNoValue;
}

std::string CheckFailureText(const std::string& name) {
  const CheckRow* r = FindCheck(name);
  return r && r->IsCheck() ? r->failure : name + " fails";
}

const LimitInForce& LimitAt(const Case& cs, CheckId id, int loop, int comp, int node) {
  if (loop >= 0 && size_t(loop) < cs.loops.size()) {
    const LoopSpec& l = cs.loops[loop];
    const int own = comp >= 0 && size_t(comp) < l.components.size() ? l.components[comp].check_limits
                    : node >= 0 && size_t(node) < l.nodes.size()    ? l.nodes[node].check_limits
                                                                    : -1;
    for (int k : {own, l.check_limits})
      if (k >= 0 && size_t(k) < cs.placed_checks.size() && cs.placed_checks[k].at(id).Set())
        return cs.placed_checks[k].at(id);
  }
  return cs.checks.at(id);
}

std::string LimitSourceId(const Case& cs, const CheckOutcome& o) {
  if (o.source_loop < 0 || size_t(o.source_loop) >= cs.loops.size()) return {};
  const LoopSpec& loop = cs.loops[o.source_loop];
  const int item = o.source_item;
  if (o.source == LimitSource::kLoop) return loop.id;
  if (o.source == LimitSource::kComponent && item >= 0 && size_t(item) < loop.components.size())
    return loop.id + "/" + loop.components[item].id;
  if (o.source == LimitSource::kNode && item >= 0 && size_t(item) < loop.nodes.size())
    return loop.id + "/" + loop.nodes[item].id;
  return {};
}

std::string LimitSourceText(const Case& cs, const CheckOutcome& o) {
  const std::string kind = LimitSourceName(o.source), id = LimitSourceId(cs, o);
  return id.empty() ? kind : kind + " " + id;
}

double ShutTargetMargin(const Case& cs, const CheckOutcome& o) {
  return LimitAt(cs, CheckId::kClosingMargin, o.loop, o.comp).si * std::abs(o.limit);
}

namespace {

const ReportItem* Item(const ComponentReport& r, std::string_view key) {
  for (const auto& it : r.items)
    if (it.key == key) return &it;
  return nullptr;
}

// The checks of one converged point, one function per kind of place; every
// outcome goes through Add, which takes the margin rule from the table.
class PointChecks {
 public:
  PointChecks(const Case& cs, const OperatingPoint& op, const PointResult& p, std::vector<CheckWarning>* warnings)
      : cs_(cs), op_(op), p_(p), warnings_(warnings), running_(p.thermal || !op.isothermal) {}

  std::vector<CheckOutcome> Run() {
    // About one outcome per branch on a plant-size header (a line's velocity,
    // a bearing's feed margin); 2 x branches + nodes, reserved before, held
    // 2.7 times the outcomes there, the largest block of the point's memory.
    // An eighth more: a header with a pump or a relief has a few outcomes
    // more than branches, and one past the reserve doubled the block.
    out_.reserve(p_.branches.size() + p_.branches.size() / 8 + 16);
    for (const BranchOutcome& b : p_.branches) Branch(b);
    if (p_.thermal) Couplings();
    for (const BranchOutcome& b : p_.branches) JacketFlow(b);
    Boiling();
    return std::move(out_);
  }

  // Branch k's own outcomes (EvaluateBranchChecks).
  std::vector<CheckOutcome> RunBranch(size_t k) {
    Branch(p_.branches[k]);
    JacketFlow(p_.branches[k]);
    return std::move(out_);
  }

 private:
  // The component's check site, made when read (a case holds none); for a
  // part swapped in by sizing, the site of the part's type (its parameter
  // indices may differ).
  const CheckSite& Site(const BranchOutcome& b) const {
    site_ = CheckSiteFor(cs_, b.loop, b.comp, &BranchType(cs_, b));
    return site_;
  }

  void JacketFlow(const BranchOutcome& b) {
    if ((BranchType(cs_, b).roles & kRolePump) && Site(b).coolant_pump)
      At(b.loop, b.comp), Add(CheckId::kJacketFlowMin, Where(b), b.flow_m3s);
  }

  // "loop/component", as outcomes name the branch's component (made per
  // call in one reused string: a plant-size case holds no name per site).
  const std::string& Where(const BranchOutcome& b) const {
    const LoopSpec& loop = cs_.loops[b.loop];
    where_.assign(loop.id).append(1, '/').append(loop.components[b.comp].id);
    return where_;
  }

  // The item the next outcomes are evaluated at: a component, or a node
  // (comp -1); its limits are the ones in force there (LimitAt).
  void At(int loop, int comp, int node = -1) { loop_ = loop, comp_ = comp, node_ = node; }
  const LimitInForce& Limit(CheckId id) const { return LimitAt(cs_, id, loop_, comp_, node_); }

  // An outcome against the limit in force at the current item (skipped when it has none).
  void Add(CheckId id, const std::string& where, double value) { Put(id, where, value, Limit(id)); }
  // An outcome against a limit of the current component's own (its parameter).
  void Add(CheckId id, const std::string& where, double value, double limit, LimitSource source) {
    Put(id, where, value, {limit, source, loop_, comp_});
  }
  void Put(CheckId id, const std::string& where, double value, const LimitInForce& l) {
    if (std::isnan(l.si)) return;
    const CheckRow& r = Check(id);
    const double margin = r.Margin(value, l.si);
    const bool who = l.source == LimitSource::kLoop || l.source == LimitSource::kComponent || l.source == LimitSource::kNode;
    out_.push_back({where, value, l.si, margin, who ? l.loop : -1, who ? l.item : -1, loop_, comp_, id, r.dim,
                    margin >= 0, l.source});
  }

  // The branch's checks read its report, made once here (report_, reused
  // from branch to branch: no allocation per branch).
  void Branch(const BranchOutcome& b) {
    At(b.loop, b.comp);
    const size_t k = static_cast<size_t>(&b - p_.branches.data());
    DescribeBranch(cs_, p_, k, &report_);
    state_ = BranchState(cs_, p_, k);
    const unsigned roles = BranchType(cs_, b).roles;  // a part swapped in may change it
    if (roles & kRoleBearing) Bearing(b);
    if (roles & kRolePump) Pump(b);
    if (report_.valve.kind != ValveKind::kNone) Valve(b);
    if ((roles & kRoleHeatExchanger) && p_.thermal) Cooler(b);
    if (roles & kRoleLine) Line(b);
    if (roles & kRoleRegulator) Regulator(b);
    if ((roles & kRoleThermostat) && p_.thermal) Thermostat(b);
    if (roles & kRoleDrain) Drain(b);
  }

  // A regulator is meant to be open: its authority (travel from the nearer
  // end) at running points; saturated at a cold start, a warning.
  void Regulator(const BranchOutcome& b) {
    const ReportItem* a = Item(report_, "authority");
    const ReportItem* q = Item(report_, "regulated_flow");
    if (!a || !q) return;
    const std::string& where = Where(b);
    if (running_) Add(CheckId::kRegulatorAuthority, where, a->value);
    if (a->value <= 0.0)
      warnings_->push_back({where, fmt::format("regulator {} at {}: it no longer holds its set pressure",
                                               q->text == "closed" ? "closed" : "wide open", p_.name), p_.name});
  }

  // A thermostatic valve at a thermal point: the travel it has left before
  // it is fully open to its hot path, on one path of each valve (its
  // opens_hot path, or a path with no partner); saturated, a warning naming
  // the point.
  void Thermostat(const BranchOutcome& b) {
    const ReportItem* y = Item(report_, "travel");
    const ReportItem* ts = Item(report_, "sensed_temperature");
    if (!y || !ts || (y->text != "opens_hot" && Item(report_, "split"))) return;
    const std::string& where = Where(b);
    Add(CheckId::kThermostatTravel, where, 1.0 - y->value);
    if (y->value >= 1.0 || y->value <= 0.0)
      warnings_->push_back({where, fmt::format("thermostatic valve {} at {}: sensed {:.1f} degC, {}", y->value >= 1.0 ?
                                               "fully open to its hot path" : "shut to its hot path", p_.name,
                                               ts->value - 273.15, y->value >= 1.0 ? "the cooler is too small" :
                                               "the liquid runs below the valve's band"), p_.name});
  }

  // A gravity drain or scavenge pump at every point, cold start included:
  // design capacity margin, and the flood verdict against what it carries at
  // most (a drain running full, a scavenge pump its displacement flow).
  void Drain(const BranchOutcome& b) {
    const ReportItem* design = Item(report_, "design_capacity");
    const ReportItem* flood = Item(report_, "flood_capacity");
    if (!design || !flood) return;
    const std::string& where = Where(b);
    const double q = b.flow_m3s;
    if (q > 0) Add(CheckId::kDrainCapacityMargin, where, design->value / q - 1.0);
    Add(CheckId::kHousingDrained, where, q, flood->value, LimitSource::kComponent);
    if (q > flood->value)
      warnings_->push_back({where, fmt::format("housing floods at {}: {:.3g} L/min arrive, the drain carries at most "
                                               "{:.3g} L/min", p_.name, q * 6e4, flood->value * 6e4), p_.name});
  }

  void Bearing(const BranchOutcome& b) {
    const CheckSite s = Site(b);
    const auto& prm = BranchParams(cs_, b);  // the values at this point (bindings, knobs)
    const double q = b.flow_m3s;
    Add(CheckId::kFeedPressureMargin, Where(b), state_.p_from - state_.p_to);  // a feed_margin is the bearing's limit
    // The written (or bound) flow_min, else the bearing's own oil demand (a rolling bearing's heat balance).
    double flow_min = s.flow_min >= 0 ? prm[s.flow_min] : kNoValue;
    if (const ReportItem* demand = Item(report_, "oil_demand"); std::isnan(flow_min) && demand) flow_min = demand->value;
    Add(CheckId::kBearingFlowMin, Where(b), q, flow_min, LimitSource::kComponent);
    if (s.flow_max >= 0) Add(CheckId::kBearingFlowMax, Where(b), q, prm[s.flow_max], LimitSource::kComponent);
    if (p_.thermal && state_.thermal) {
      Add(CheckId::kFeedTemperatureMax, Where(b), state_.t_in);
      Add(CheckId::kDrainTemperatureMax, Where(b), state_.t_out);
    }
    Film(Where(b));
  }

  // A bearing film whose eccentricity follows from load (its report has the
  // film items; a floating ring bearing has two, prefixed inner_ / outer_,
  // each judged at its own place "<bearing>/inner_film"): h0 against the
  // limit in force, else against Trumpler's for the film's diameter (the
  // component reports it); the start unit load; the hottest film at thermal
  // points.
  void Film(const std::string& where) {
    // Per film: its place and the keys of its items (min film thickness,
    // Trumpler's limit, unit load, hottest film), without a string built per bearing.
    struct FilmKeys {
      const char *place, *h0, *trumpler, *unit_load, *t_max;
    };
    static const FilmKeys kFilms[] = {
        {"", "min_film_thickness", "film_thickness_trumpler", "unit_load", "film_temperature_max"},
        {"/inner_film", "inner_min_film_thickness", "inner_film_thickness_trumpler", "inner_unit_load",
         "inner_film_temperature_max"},
        {"/outer_film", "outer_min_film_thickness", "outer_film_thickness_trumpler", "outer_unit_load",
         "outer_film_temperature_max"}};
    for (const FilmKeys& f : kFilms) {
      const ReportItem* h0 = Item(report_, f.h0);
      if (!h0) continue;
      const std::string at = where + f.place;
      const ReportItem* trumpler = Item(report_, f.trumpler);
      const LimitInForce& l = Limit(CheckId::kFilmThicknessMin);
      if (l.Set()) Add(CheckId::kFilmThicknessMin, at, h0->value);
      else if (trumpler) Put(CheckId::kFilmThicknessMin, at, h0->value, {trumpler->value, LimitSource::kDefault});
      if (const ReportItem* p = Item(report_, f.unit_load)) Add(CheckId::kStartUnitLoadMax, at, p->value);
      if (const ReportItem* t = Item(report_, f.t_max); t && p_.thermal && state_.thermal)
        Add(CheckId::kFilmTemperatureMax, at, t->value);
    }
  }

  void Pump(const BranchOutcome& b) {
    Add(CheckId::kPumpInletPressureMin, Where(b), state_.p_from);
    if (const ReportItem* ge = Item(report_, "geometric_flow"); ge && ge->value > 0)
      Add(CheckId::kPumpFlowFractionMin, Where(b), b.flow_m3s / ge->value);
    if (op_.isothermal) Add(CheckId::kStartViscosityMax, Where(b), state_.mu / state_.rho);
  }

  // A valve that must stay shut (typed state from the component): an
  // open/closed check at running points, a warning when open at a cold start.
  void Valve(const BranchOutcome& b) {
    const ValveState& v = report_.valve;
    const std::string& where = Where(b);
    const bool bypass = v.kind == ValveKind::kFilterBypass, internal = v.kind == ValveKind::kInternalRelief;
    if (running_) {
      Add(bypass ? CheckId::kFilterBypassClosed : CheckId::kReliefClosed, internal ? where + " (internal relief)" : where,
          v.pressure, v.crack, LimitSource::kComponent);
    } else if (v.Open()) {
      const double q = std::abs(b.flow_m3s) > 0 ? v.flow / b.flow_m3s : 0.0;
      const std::string text =
          bypass ? fmt::format("filter bypass open at {}: {:.1f}% unfiltered (cold start)", p_.name, 100 * q)
                 : fmt::format("{} lifting at {} ({:.3g} L/min)", internal ? "internal relief" : "relief valve", p_.name,
                               v.flow * 6e4);
      warnings_->push_back({where, text, p_.name});
    }
  }

  // Capacity at the hottest oil allowed (drain_temperature_max at the cooler
  // inlet) over the duty it carries now, same effectiveness:
  // (T_lim - T_air) / (T_in - T_air) - 1 >= cooler_duty_margin.
  void Cooler(const BranchOutcome& b) {
    const ReportItem* itd = Item(report_, "initial_temperature_difference");
    const ReportItem* duty = Item(report_, "duty");
    if (!itd || !duty || !state_.thermal || !(itd->value > 0) || !(duty->value > 0)) return;
    const double t_air = state_.t_in - itd->value;
    Add(CheckId::kCoolerDutyMargin, Where(b), (Limit(CheckId::kDrainTemperatureMax).si - t_air) / itd->value - 1.0);
  }

  void Line(const BranchOutcome& b) {
    const CheckSite s = Site(b);
    const ReportItem* v = Item(report_, "velocity");
    if (!v || s.velocity == CheckId::kCount) return;
    const double lim = Limit(s.velocity).si;
    Add(s.velocity, Where(b), std::abs(v->value));
    const double q = std::abs(b.flow_m3s);
    if (s.velocity != CheckId::kVelocityReturnMax || !(q > 0)) return;
    SuggestDrain(b);
    // Gravity drain capacity: the line running half full at the return
    // velocity limit (common practice; API 614, from memory) over its flow.
    const double d = s.diameter >= 0 ? BranchParams(cs_, b)[s.diameter] : NAN;
    Add(CheckId::kDrainCapacityMargin, Where(b), 0.5 * 0.25 * M_PI * d * d * lim / q - 1.0);
  }

  // A line into a boundary that drains a pressurised cavity (from a
  // pressure boundary) or falls to a reservoir is modelled running full: a
  // warning suggests the gravity_drain, which runs part full and floods.
  void SuggestDrain(const BranchOutcome& b) {
    const LoopSpec& loop = cs_.loops[b.loop];
    const ComponentSpec& c = loop.components[b.comp];
    if (c.from < 0 || c.to < 0 || !(b.flow_m3s > 0)) return;
    const NodeSpec &from = loop.nodes[c.from], &to = loop.nodes[c.to];
    const bool downhill = to.boundary == BoundaryKind::kReservoir && from.elevation > to.elevation;
    if (from.boundary != BoundaryKind::kPressure && !downhill) return;
    warnings_->push_back({Where(b),
                          fmt::format("line from {} to {} modelled running full: a drain from a cavity runs part full under "
                                      "gravity (use the gravity_drain component: its capacity and the housing_drained check)",
                                      from.id, to.id),
                          p_.name});
  }

  // Liquid-to-liquid couplings (an oil-to-water cooler): the same spare
  // capacity as an air cooler's, with the cold stream's inlet in place of
  // the air: (T_lim - T_cold,in) / (T_hot,in - T_cold,in) - 1, the duty the
  // exchanger would carry at the hottest oil allowed over the duty it carries
  // now, at the same effectiveness (e-NTU: q = eps C_min ITD, linear in ITD).
  void Couplings() {
    const auto& tr = p_.thermal_report;
    for (size_t ci = 0; ci < tr.coupling_duty.size() && ci < cs_.couplings.size() && ci < tr.coupling_hot_in.size(); ++ci) {
      const double itd = tr.coupling_hot_in[ci] - tr.coupling_cold_in[ci];
      if (!(itd > 0) || !(tr.coupling_duty[ci] > 0)) continue;
      At(cs_.couplings[ci].hot_loop, cs_.couplings[ci].hot_comp);  // the limits of its hot side
      const double lim_t = Limit(CheckId::kDrainTemperatureMax).si;
      Add(CheckId::kCoolerDutyMargin, cs_.couplings[ci].hot_ref, (lim_t - tr.coupling_cold_in[ci]) / itd - 1.0);
    }
  }

  void Boiling() {
    for (const NodeResult& n : p_.nodes) {
      if (std::isnan(n.boiling_margin_k)) continue;
      const LoopSpec& loop = cs_.loops[n.loop];
      At(n.loop, -1, n.node);
      Add(CheckId::kBoilingMarginMin, loop.id + "/" + loop.nodes[n.node].id, n.boiling_margin_k);
    }
  }

  const Case& cs_;
  const OperatingPoint& op_;
  const PointResult& p_;
  std::vector<CheckWarning>* warnings_;
  const bool running_;
  mutable CheckSite site_;          // Site()'s last
  mutable std::string where_;       // Where()'s buffer
  int loop_ = -1, comp_ = -1, node_ = -1;  // the current item (At)
  std::vector<CheckOutcome> out_;
  ComponentReport report_;  // of the branch being checked (Branch)
  BranchResult state_;      // its state (BranchState)
};

}  // namespace

std::vector<CheckOutcome> EvaluateChecks(const Case& cs, const OperatingPoint& op, const PointResult& p,
                                         std::vector<CheckWarning>* warnings) {
  return PointChecks(cs, op, p, warnings).Run();
}

std::vector<CheckOutcome> EvaluateBranchChecks(const Case& cs, const OperatingPoint& op, const PointResult& p, size_t k,
                                               std::vector<CheckWarning>* warnings) {
  return PointChecks(cs, op, p, warnings).RunBranch(k);
}

std::vector<CheckSummary> SummariseChecks(const std::vector<std::vector<CheckOutcome>>& per_point,
                                          const std::vector<std::string>& point_names) {
  std::vector<CheckSummary> out;
  // (check, place) -> its entry in `out`: hashed, so a plant-size envelope
  // summarises in time linear in its outcomes.
  std::unordered_map<std::string, size_t> index;
  std::string key;
  for (size_t i = 0; i < per_point.size(); ++i) {
    for (const auto& c : per_point[i]) {
      key.assign(c.where).push_back('\0');
      key.append(c.name());
      auto [it, added] = index.try_emplace(key, out.size());
      if (added) {
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
