// Validation of the case sections that refer across loops: couplings, checks
// and design questions.
#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "network/case/case_context.h"
#include "network/case/check_table.h"

namespace loopwright {

using nlohmann::json;

namespace {

// Resolves "loop/<what>" to indices (`what` "component" or "node"); reports
// a pointed error otherwise.
bool ResolveLoopRef(const json& j, const std::string& ptr, CaseContext& c, const Case& cs, bool node,
                    int* loop_index, int* index) {
  const char* what = node ? "node" : "component";
  if (!j.is_string()) {
    c.diag.Error("wrong-type", ptr, fmt::format("expected \"loop/{}\", got {}", what, TypeName(j)));
    return false;
  }
  std::string ref = j.get<std::string>();
  size_t slash = ref.find('/');
  if (slash == std::string::npos) {
    c.diag.Error("bad-reference", ptr, fmt::format("expected \"loop/{}\", got \"{}\"", what, ref));
    return false;
  }
  std::string lid = ref.substr(0, slash), cid = ref.substr(slash + 1);
  std::vector<std::string> loop_ids;
  for (auto& l : cs.loops) loop_ids.push_back(l.id);
  auto it = std::find(loop_ids.begin(), loop_ids.end(), lid);
  if (it == loop_ids.end()) {
    std::string near = NearestName(lid, loop_ids);
    c.diag.Error("unknown-reference", ptr,
                 fmt::format("no loop \"{}\"{}", lid, near.empty() ? "" : fmt::format("; did you mean \"{}\"?", near)));
    return false;
  }
  *loop_index = static_cast<int>(it - loop_ids.begin());
  const LoopSpec& loop = cs.loops[*loop_index];
  *index = node ? loop.NodeIndex(cid) : loop.ComponentIndex(cid);
  if (*index < 0) {
    std::vector<std::string> ids;
    if (node)
      for (auto& n : loop.nodes) ids.push_back(n.id);
    else
      for (auto& comp : loop.components) ids.push_back(comp.id);
    std::string near = NearestName(cid, ids);
    c.diag.Error("unknown-reference", ptr,
                 fmt::format("no {} \"{}\" in loop \"{}\"{}", what, cid, lid,
                             near.empty() ? "" : fmt::format("; did you mean \"{}\"?", near)));
    return false;
  }
  return true;
}

}  // namespace

bool ResolveComponentRef(const json& j, const std::string& ptr, CaseContext& c, const Case& cs, int* loop_index,
                         int* comp_index) {
  return ResolveLoopRef(j, ptr, c, cs, false, loop_index, comp_index);
}

bool ResolveNodeRef(const json& j, const std::string& ptr, CaseContext& c, const Case& cs, int* loop_index,
                    int* node_index) {
  return ResolveLoopRef(j, ptr, c, cs, true, loop_index, node_index);
}

namespace {

void ReadChoice(const json& obj, const char* key, const std::string& ptr, CaseContext& c,
                const std::vector<std::string>& choices, bool required) {
  std::string v;
  if (!c.ReadString(obj, key, ptr, &v, required)) return;
  if (std::find(choices.begin(), choices.end(), v) == choices.end()) {
    std::string near = NearestName(v, choices);
    c.diag.Error("unknown-choice", ptr + "/" + key,
                 fmt::format("unknown {} \"{}\"{}; expected one of: {}", key, v,
                             near.empty() ? "" : fmt::format(" (did you mean \"{}\"?)", near),
                             fmt::join(choices, ", ")));
  }
}

// The library category a design question's candidates must come from.
const char* CandidateCategory(const std::string& kind) {
  if (kind == "pump_choice") return "pump";
  if (kind == "line_size") return "line";
  if (kind == "cooler_size") return "cooler";
  return nullptr;
}

// A choice question's candidates: library parts that exist and fit the
// question (a pump for pump_choice, a line for line_size, a cooler for
// cooler_size).
void ValidateCandidates(const json& q, const std::string& p, CaseContext& c) {
  const std::string kind = q.contains("kind") && q["kind"].is_string() ? q["kind"].get<std::string>() : "";
  const char* category = CandidateCategory(kind);
  if (!category) {
    if (q.contains("candidates"))
      c.diag.Error("unknown-field", p + "/candidates",
                   fmt::format("a {} question takes no candidates (only pump_choice, line_size and cooler_size do)",
                               kind.empty() ? "design" : kind));
    return;
  }
  const json* cands = q.contains("candidates") ? &q["candidates"] : nullptr;
  if (!cands) {
    c.diag.Warn("no-candidates", p,
                fmt::format("a {} question without \"candidates\" (an array of {} part ids from the parts library) "
                            "has nothing to choose from; `size` will answer nothing",
                            kind, category));
    return;
  }
  if (!cands->is_array() || cands->empty()) {
    c.diag.Error("wrong-type", p + "/candidates",
                 fmt::format("expected a non-empty array of {} part ids from the parts library, got {}", category,
                             cands->is_array() ? "an empty array" : TypeName(*cands)));
    return;
  }
  for (size_t i = 0; i < cands->size(); ++i) {
    const std::string cp = p + "/candidates/" + std::to_string(i);
    const json& id = (*cands)[i];
    if (!id.is_string()) {
      c.diag.Error("wrong-type", cp, "expected a part id (a string), got " + TypeName(id));
      continue;
    }
    const PartEntry* part = c.library.Find(id.get<std::string>());
    if (!part) {
      const std::string near = NearestName(id.get<std::string>(), c.library.Ids());
      c.diag.Error("unknown-part", cp,
                   fmt::format("no part \"{}\" in the parts library{}", id.get<std::string>(),
                               near.empty() ? "; see `loopwright library list`" : fmt::format("; did you mean \"{}\"?", near)));
    } else if (part->category != category) {
      c.diag.Error("bad-part", cp,
                   fmt::format("part \"{}\" is a {} ({}), but a {} question chooses among {} parts", part->id,
                               part->category, part->type, kind, category));
    }
  }
}

// What a design question asks of its component and the dimension of its
// bounds: the parameter it sizes (or the role a choice replaces).
struct QuestionFit {
  const char* kind;
  const char* param;  // the parameter sized, or nullptr
  unsigned role;      // the role a choice needs, or kRoleNone
  Dimension bounds;   // of "min"/"max"
};

const QuestionFit* FindQuestionFit(const std::string& kind) {
  static const QuestionFit fits[] = {
      {"cooler_conductance", "conductance", kRoleNone, Dimension::kConductance},
      {"cooler_size", nullptr, kRoleHeatExchanger, Dimension::kPower},
      {"bypass_opening", "opening", kRoleNone, Dimension::kDimensionless},
      {"relief_setting", "crack", kRoleNone, Dimension::kPressureDifference},
      {"restrictor_diameter", "diameter", kRoleNone, Dimension::kLength},
      {"pump_displacement", "displacement", kRoleNone, Dimension::kDisplacement},
      {"pump_speed", "speed", kRoleNone, Dimension::kRotationalSpeed},
      {"pump_choice", nullptr, kRolePump, Dimension::kPower},
      {"line_size", nullptr, kRoleLine, Dimension::kLength},
  };
  for (const QuestionFit& f : fits)
    if (kind == f.kind) return &f;
  return nullptr;
}

bool IsCouplingSide(const Case& cs, const std::string& ref) {
  for (const Coupling& cp : cs.couplings)
    if (cp.hot_ref == ref || cp.cold_ref == ref) return true;
  return false;
}

// The question's component must have what the question sizes; its bounds
// must read in the sized quantity's dimension, min not above max.
void ValidateQuestionFit(const json& q, const std::string& p, const std::string& kind, const ComponentSpec& comp,
                         CaseContext& c, const Case& cs) {
  const QuestionFit* fit = FindQuestionFit(kind);
  if (!fit || !comp.type_info) return;
  const std::string ref = q["component"].get<std::string>();
  const bool side = IsCouplingSide(cs, ref);
  const bool has = fit->param ? comp.type_info->ParamIndex(fit->param) >= 0 || (side && kind == "cooler_conductance")
                              : (comp.type_info->roles & fit->role) != 0 || (side && kind == "cooler_size");
  if (!has)
    c.diag.Error("bad-reference", p + "/component",
                 fmt::format("a {} question needs {}; \"{}\" is a {}", kind,
                             fit->param ? fmt::format("a component with a \"{}\" to size", fit->param)
                                        : fmt::format("a component that a {} part can replace", kind.substr(0, kind.find('_'))),
                             ref, comp.type()));
  double lo = NAN, hi = NAN;
  if (q.contains("min")) c.ReadQuantity(q["min"], p + "/min", fit->bounds, &lo);
  if (q.contains("max")) c.ReadQuantity(q["max"], p + "/max", fit->bounds, &hi);
  if (lo > hi)
    c.diag.Error("out-of-range", p + "/max", fmt::format("max is below min ({} is above {})", Shown(q["min"]), Shown(q["max"])));
  double target = 0;
  if (kind == "restrictor_diameter" && !q.contains("target"))
    c.diag.Error("missing-field", p, "a restrictor_diameter question needs \"target\": the flow the restrictor must pass");
  else if (q.contains("target"))
    c.ReadQuantity(q["target"], p + "/target", Dimension::kVolumeFlow, &target);
}

}  // namespace

const std::vector<std::string>& HeatExchangerArrangements() {
  static const std::vector<std::string> a = {"counterflow", "parallel_flow", "shell_and_tube_1pass",
                                             "crossflow_unmixed", "crossflow_hot_mixed", "crossflow_cold_mixed"};
  return a;
}

const std::vector<std::string>& DesignQuestionKinds() {
  static const std::vector<std::string> k = {"cooler_conductance", "cooler_size", "bypass_opening", "relief_setting",
                                             "restrictor_diameter", "pump_displacement", "pump_speed",
                                             "pump_choice", "line_size"};
  return k;
}

namespace {

// One coupling, typed: its sides resolved, its arrangement an index, its
// conductance in SI. Returns false when anything in it is wrong (reported).
bool ReadCoupling(const json& cj, const std::string& p, CaseContext& c, const Case& cs, std::vector<std::string>* ids,
                  Coupling* out) {
  const size_t errors = c.diag.ErrorCount();
  c.UnknownKeys(cj, p, {"id", "type", "arrangement", "hot", "cold", "conductance"});
  out->pointer = p;
  if (c.ReadString(cj, "id", p, &out->id, true) && c.CheckId(out->id, p + "/id")) {
    if (std::find(ids->begin(), ids->end(), out->id) != ids->end())
      c.diag.Error("duplicate-id", p + "/id", fmt::format("coupling \"{}\" is declared twice", out->id));
    ids->push_back(out->id);
  }
  ReadChoice(cj, "type", p, c, {"heat_exchanger"}, true);
  ReadChoice(cj, "arrangement", p, c, HeatExchangerArrangements(), true);
  if (cj.contains("arrangement") && cj["arrangement"].is_string()) {
    const auto& names = HeatExchangerArrangements();
    out->arrangement = static_cast<int>(std::find(names.begin(), names.end(), cj["arrangement"].get<std::string>()) - names.begin());
  }
  bool hot_ok = false, cold_ok = false;
  if (cj.contains("hot")) hot_ok = ResolveComponentRef(cj["hot"], p + "/hot", c, cs, &out->hot_loop, &out->hot_comp);
  else c.diag.Error("missing-field", p, "missing required field \"hot\" (\"loop/component\")");
  if (cj.contains("cold")) cold_ok = ResolveComponentRef(cj["cold"], p + "/cold", c, cs, &out->cold_loop, &out->cold_comp);
  else c.diag.Error("missing-field", p, "missing required field \"cold\" (\"loop/component\")");
  if (hot_ok) out->hot_ref = cj["hot"].get<std::string>();
  if (cold_ok) out->cold_ref = cj["cold"].get<std::string>();
  if (hot_ok && cold_ok && out->hot_loop == out->cold_loop)
    c.diag.Error("bad-reference", p + "/cold", "a coupling links two different loops; both sides are in the same loop");
  if (!cj.contains("conductance"))
    c.diag.Error("missing-field", p, "missing required field \"conductance\" (UA, W/K)");
  else if (c.ReadQuantity(cj["conductance"], p + "/conductance", Dimension::kConductance, &out->conductance) &&
           !(out->conductance > 0))
    c.diag.Error("out-of-range", p + "/conductance", "conductance must be greater than 0");
  return c.diag.ErrorCount() == errors;
}

}  // namespace

void ValidateCouplings(const json& j, const std::string& ptr, CaseContext& c, Case& cs) {
  if (!j.is_array()) {
    c.diag.Error("wrong-type", ptr, "expected an array of couplings, got " + TypeName(j));
    return;
  }
  std::vector<std::string> ids;
  for (size_t i = 0; i < j.size(); ++i) {
    std::string p = ptr + "/" + std::to_string(i);
    const json& cj = j[i];
    if (!cj.is_object()) {
      c.diag.Error("wrong-type", p, "expected a coupling object {id, type, hot, cold, ...}, got " + TypeName(cj));
      continue;
    }
    Coupling coupling;
    if (ReadCoupling(cj, p, c, cs, &ids, &coupling)) cs.couplings.push_back(std::move(coupling));
  }
}

namespace {

// A type's flow_min, flow_max and diameter indices (-1: none), found by
// name once per type (a slot per hash of the type; a clash finds again).
struct SiteParams {
  const ComponentType* type = nullptr;
  int flow_min = -1, flow_max = -1, diameter = -1;
};
const SiteParams& SiteParamsOf(const ComponentType* type) {
  thread_local std::array<SiteParams, 32> memo{};
  SiteParams& e = memo[(reinterpret_cast<uintptr_t>(type) >> 4) % memo.size()];
  if (e.type != type)
    e = {type, type->ParamIndex("flow_min"), type->ParamIndex("flow_max"), type->ParamIndex("diameter")};
  return e;
}

}  // namespace

CheckSite CheckSiteFor(const Case& cs, int l, int ci, const ComponentType* type) {
  const LoopSpec& loop = cs.loops[l];
  const ComponentSpec& c = loop.components[ci];
  CheckSite s;
  if (!type) return s;
  const unsigned roles = type->roles;
  const SiteParams& sp = SiteParamsOf(type);
  if (roles & kRoleBearing) {
    s.flow_min = sp.flow_min;
    s.flow_max = sp.flow_max;
  }
  if ((roles & kRoleLine) && c.from >= 0 && c.to >= 0) {
    const BoundaryKind from = loop.nodes[c.from].boundary, to = loop.nodes[c.to].boundary;
    // A line into a pressurised tank is the pumped return of a closed
    // (coolant) loop running full, judged as a pressure line; into a vented
    // reservoir or a pressure node it is a gravity return (drain).
    s.velocity = from == BoundaryKind::kReservoir || from == BoundaryKind::kTank ? CheckId::kVelocitySuctionMax
                 : to != BoundaryKind::kNone && to != BoundaryKind::kTank        ? CheckId::kVelocityReturnMax
                                                                                 : CheckId::kVelocityPressureMax;
    s.diameter = sp.diameter;
  }
  s.coolant_pump = (roles & kRolePump) && loop.fluid && loop.fluid->SaturationTemperature(cs.ambient_pa);
  return s;
}

// The limits in force: each key of "checks" a case limit of the check table,
// read in its dimension (an absolute pressure against the case's ambient),
// over the defaults. Called whether or not the case has "checks".
void ValidateChecks(const json& j, const std::string& ptr, CaseContext& c, Case& cs) {
  cs.checks = DefaultCheckLimits(cs.ambient_pa);
  if (!j.is_object()) {
    c.diag.Error("wrong-type", ptr, "expected an object {limit: value}, got " + TypeName(j));
    return;
  }
  std::vector<std::string> keys;
  for (const CheckRow& r : CheckTable())
    if (r.limit_from == LimitFrom::kCase) keys.push_back(r.name);
  c.UnknownKeys(j, ptr, keys);
  for (auto it = j.begin(); it != j.end(); ++it) {
    const CheckRow* r = FindCheck(it.key());
    if (!r || r->limit_from != LimitFrom::kCase) continue;
    double v = 0;
    if (c.ReadQuantity(it.value(), ptr + "/" + PointerToken(it.key()), r->dim, &v)) cs.checks.at(r->id) = {v, LimitSource::kCase};
  }
}

namespace {

bool IsCouplingHotSide(const Case& cs, int l, int ci) {
  for (const Coupling& k : cs.couplings)
    if (k.hot_loop == l && k.hot_comp == ci) return true;
  return false;
}

bool CanBoil(const Case& cs, const LoopSpec& loop) {
  return loop.fluid && loop.fluid->SaturationTemperature(cs.ambient_pa);
}

// Whether case limit `id` applies to component ci of loop l at its place: the
// type's rule (LimitMayApplyToType), narrowed by what the check reads there.
bool LimitAppliesToComponent(const Case& cs, int l, int ci, CheckId id) {
  const ComponentType* t = cs.loops[l].components[ci].type_info;
  if (!t || !LimitMayApplyToType(id, *t)) return false;
  const CheckSite s = CheckSiteFor(cs, l, ci, t);
  const bool cooler = (t->roles & kRoleHeatExchanger) || IsCouplingHotSide(cs, l, ci);
  switch (id) {
    case CheckId::kVelocitySuctionMax:
    case CheckId::kVelocityPressureMax:
    case CheckId::kVelocityReturnMax: return s.velocity == id;
    case CheckId::kDrainCapacityMargin: return (t->roles & kRoleDrain) || s.velocity == CheckId::kVelocityReturnMax;
    case CheckId::kJacketFlowMin: return s.coolant_pump;
    case CheckId::kCoolerDutyMargin: return cooler;
    case CheckId::kDrainTemperatureMax: return (t->roles & kRoleBearing) || cooler;
    default: return true;
  }
}

bool LimitAppliesToNode(const Case& cs, const LoopSpec& loop, CheckId id) {
  if (id == CheckId::kCokingTemperatureMax) return loop.fluid && loop.fluid->Kind() == "oil";
  return (id == CheckId::kBoilingMarginMin || id == CheckId::kAfterBoilMarginMin) && CanBoil(cs, loop);
}

bool LimitAppliesToLoop(const Case& cs, int l, CheckId id) {
  const LoopSpec& loop = cs.loops[l];
  if (LimitAppliesToNode(cs, loop, id)) return true;
  for (size_t ci = 0; ci < loop.components.size(); ++ci)
    if (LimitAppliesToComponent(cs, l, int(ci), id)) return true;
  return false;
}

// Why a known limit cannot be written on an object, for an error message.
std::string Misplaced(const CheckRow& r, const std::string& what) {
  if (r.limit_from == LimitFrom::kComponent)
    return fmt::format("{} is not set under \"checks\": its limit is {}", r.name, r.basis);
  return fmt::format("{} does not apply to {}: it is read at {}", r.name, what, r.reads);
}

// The limits of one "checks" object on a loop, component or node, into a
// new entry of cs.placed_checks (its index in *index). `applies(id)` says
// whether the limit can apply to this object; `what` names the object.
template <class Applies>
void ReadPlacedChecks(const json& j, const std::string& ptr, CaseContext& c, Case& cs, LimitInForce owner,
                      const std::string& what, Applies applies, int* index) {
  if (!j.is_object()) {
    c.diag.Error("wrong-type", ptr, "expected an object {limit: value}, got " + TypeName(j));
    return;
  }
  CheckLimits placed;
  for (auto it = j.begin(); it != j.end(); ++it) {
    if (CaseContext::IgnoredKey(it.key())) continue;
    const CheckRow* r = FindCheck(it.key());
    const std::string p = ptr + "/" + PointerToken(it.key());
    if (!r) {
      std::vector<std::string> keys;
      for (const CheckRow& row : CheckTable())
        if (row.limit_from == LimitFrom::kCase && applies(row.id)) keys.push_back(row.name);
      c.UnknownKey(it.key(), ptr, keys);
    } else if (r->limit_from != LimitFrom::kCase || !applies(r->id)) {
      c.diag.Error("misplaced-limit", p, Misplaced(*r, what));
    } else if (double v = 0; c.ReadQuantity(it.value(), p, r->dim, &v)) {
      owner.si = v;
      placed.at(r->id) = owner;
    }
  }
  *index = int(cs.placed_checks.size());
  cs.placed_checks.push_back(placed);
}

// A component's "checks" (and a bearing's feed_margin, its feed_pressure_margin).
void ReadComponentChecks(const json& cj, const std::string& ptr, CaseContext& c, Case& cs, int l, int ci) {
  ComponentSpec& comp = cs.loops[l].components[ci];
  const LimitInForce owner{0, LimitSource::kComponent, l, ci};
  const bool has_checks = cj.contains("checks"), has_margin = !std::isnan(comp.housing_margin());
  if (!has_checks && !has_margin) return;
  const CheckId velocity = CheckSiteFor(cs, l, ci, comp.type_info).velocity;
  const std::string what = fmt::format("component \"{}\" (a {}{})", comp.id, comp.type_info ? comp.type_info->name : "?",
                                       velocity == CheckId::kCount ? "" : fmt::format(", judged by {}", Check(velocity).name));
  if (has_checks)
    ReadPlacedChecks(cj["checks"], ptr + "/checks", c, cs, owner, what,
                     [&](CheckId id) { return LimitAppliesToComponent(cs, l, ci, id); }, &comp.check_limits);
  if (!has_margin) return;
  if (comp.check_limits < 0) {  // no "checks" (or not an object, reported)
    comp.check_limits = int(cs.placed_checks.size());
    cs.placed_checks.emplace_back();
  }
  LimitInForce& m = cs.placed_checks[comp.check_limits].at(CheckId::kFeedPressureMargin);
  if (m.Set())
    c.diag.Error("misplaced-limit", ptr + "/checks/feed_pressure_margin",
                 "the bearing's feed_margin sets feed_pressure_margin already: give one of them");
  m = owner;
  m.si = comp.housing_margin();
}

}  // namespace

// Limits written on loops, components and nodes ("checks" inside each; a
// bearing's feed_margin), each checked against what the object is: a limit
// that cannot apply to it is an error at its pointer. A component read
// stands as null in `doc` when nothing of it is left for later (case.cpp,
// LaterKeys).
void ValidatePlacedChecks(const json& doc, CaseContext& c, Case& cs) {
  if (!doc.contains("loops") || !doc["loops"].is_array()) return;
  for (size_t l = 0; l < cs.loops.size(); ++l) {
    LoopSpec& loop = cs.loops[l];
    const size_t li = std::stoul(loop.pointer.substr(loop.pointer.rfind('/') + 1));
    if (li >= doc["loops"].size() || !doc["loops"][li].is_object()) continue;
    const json& lj = doc["loops"][li];
    if (lj.contains("checks"))
      ReadPlacedChecks(lj["checks"], loop.pointer + "/checks", c, cs, {0, LimitSource::kLoop, int(l), -1},
                       fmt::format("loop \"{}\" (nothing in it is read by it)", loop.id),
                       [&](CheckId id) { return LimitAppliesToLoop(cs, int(l), id); }, &loop.check_limits);
    // Each array looked up once (a key look-up with a literal measures it
    // and walks the loop's map: 25 M instructions at 10^4 bearings).
    const json* comps = FindKey(lj, "components");
    if (comps && comps->is_array())
      for (size_t ci = 0; ci < loop.components.size(); ++ci) {
        const ComponentSpec& comp = loop.components[ci];
        if (comp.index < 0 || size_t(comp.index) >= comps->size()) continue;
        const json& cj = (*comps)[comp.index];
        // Most components have neither: their pointer is not written.
        const bool has_checks = cj.is_object() && cj.contains("checks");
        if ((cj.is_object() || cj.is_null()) && (has_checks || !std::isnan(comp.housing_margin())))
          ReadComponentChecks(cj, loop.ComponentPointer(comp), c, cs, int(l), int(ci));
      }
    const json* nodes = FindKey(lj, "nodes");
    if (!nodes || !nodes->is_array()) continue;
    for (size_t ni = 0; ni < loop.nodes.size(); ++ni) {
      NodeSpec& n = loop.nodes[ni];
      if (n.index < 0 || size_t(n.index) >= nodes->size() || !(*nodes)[n.index].contains("checks")) continue;
      ReadPlacedChecks((*nodes)[n.index]["checks"], loop.NodePointer(n) + "/checks", c, cs,
                       {0, LimitSource::kNode, int(l), int(ni)},
                       fmt::format("node \"{}\" (a node takes boiling_margin_min and after_boil_margin_min in a loop whose fluid can "
                                   "boil, coking_temperature_max in an oil loop)", n.id),
                       [&](CheckId id) { return LimitAppliesToNode(cs, loop, id); }, &n.check_limits);
    }
  }
}

namespace {

// A choice question's candidate: the component as the case writes it,
// switched to part `id` (the part's parameters replace the component's own),
// read and built as the loader reads a component. Problems go into the
// candidate's error, not into the case's diagnostics.
PartCandidate BuildCandidate(const json& comp_json, const ComponentSpec& comp, const std::string& id,
                             const std::string& ptr, const CaseContext& c) {
  PartCandidate cand;
  cand.id = id;
  const PartEntry* part = c.library.Find(id);
  if (!part) {
    cand.error = fmt::format("no library part \"{}\"", id);
    return cand;
  }
  json obj = comp_json;
  obj["part"] = id;
  obj["type"] = part->type;
  for (auto it = part->params.begin(); it != part->params.end(); ++it) obj.erase(it.key());
  Diagnostics scratch;
  CaseContext sc(scratch, c.envelope);
  sc.ambient_pa = c.ambient_pa;
  sc.case_path = c.case_path;
  ComponentSpec spec;
  spec.id = comp.id;
  spec.type_info = FindComponentType(part->type);
  if (spec.type_info) {
    ParamValues values;
    ReadComponentParams(obj, ptr, part, sc, &spec, &values);
    std::vector<ParamError> errs;
    if (scratch.ErrorCount() == 0) spec.model = spec.type_info->make(values, &errs);
    for (const ParamError& e : errs) scratch.Error("bad-parameter", ptr + "/" + e.param, e.message);
  }
  if (!spec.model) {
    for (const auto& d : scratch.items())
      if (cand.error.empty() && !d.warning) cand.error = d.message;
    if (cand.error.empty()) cand.error = "invalid";
    return cand;
  }
  cand.type_info = spec.type_info;
  cand.model = std::move(spec.model);
  cand.bindings = spec.bindings();
  return cand;
}

DesignKind KindOf(const std::string& name) {
  const auto& names = DesignQuestionKinds();
  return static_cast<DesignKind>(std::find(names.begin(), names.end(), name) - names.begin());
}

// The typed question of a valid question object (l, k: its component).
DesignQuestion TypedQuestion(const json& q, const std::string& p, int l, int k, const json& doc, CaseContext& c,
                             const Case& cs) {
  DesignQuestion d;
  d.id = q.value("id", "");
  d.kind_name = q["kind"].get<std::string>();
  d.kind = KindOf(d.kind_name);
  d.component = q["component"].get<std::string>();
  d.loop = l;
  d.comp = k;
  if (const QuestionFit* fit = FindQuestionFit(d.kind_name)) {
    Diagnostics quiet;  // read and reported once already, by ValidateQuestionFit
    CaseContext qc(quiet, c.envelope);
    if (q.contains("min")) qc.ReadQuantity(q["min"], p + "/min", fit->bounds, &d.min);
    if (q.contains("max")) qc.ReadQuantity(q["max"], p + "/max", fit->bounds, &d.max);
    if (q.contains("target")) qc.ReadQuantity(q["target"], p + "/target", Dimension::kVolumeFlow, &d.target);
  }
  d.point = q.value("point", "");
  if (CandidateCategory(d.kind_name) && q.contains("candidates")) {
    const json& cj = doc["loops"][l]["components"][k];
    for (size_t i = 0; i < q["candidates"].size(); ++i)
      d.candidates.push_back(BuildCandidate(cj, cs.loops[l].components[k], q["candidates"][i].get<std::string>(),
                                            p + "/candidates/" + std::to_string(i), c));
  }
  return d;
}

// A question's "point" must name an envelope point.
void ValidatePoint(const json& q, const std::string& p, CaseContext& c, const Case& cs) {
  std::string pn;
  if (!q.contains("point") || !c.ReadString(q, "point", p, &pn, true)) return;
  std::vector<std::string> names;
  for (auto& op : cs.envelope.points) {
    if (op.name == pn) return;
    names.push_back(op.name);
  }
  std::string near = NearestName(pn, names);
  c.diag.Error("unknown-reference", p + "/point",
               fmt::format("no operating point \"{}\"{}", pn, near.empty() ? "" : fmt::format("; did you mean \"{}\"?", near)));
}

}  // namespace

void ValidateDesign(const json& j, const std::string& ptr, CaseContext& c, Case& cs, const json& doc) {
  if (!j.is_array()) {
    c.diag.Error("wrong-type", ptr, "expected an array of design questions, got " + TypeName(j));
    return;
  }
  for (size_t i = 0; i < j.size(); ++i) {
    std::string p = ptr + "/" + std::to_string(i);
    const json& q = j[i];
    if (!q.is_object()) {
      c.diag.Error("wrong-type", p, "expected a question object {id, kind, component, ...}, got " + TypeName(q));
      continue;
    }
    c.UnknownKeys(q, p, {"id", "kind", "component", "target", "point", "candidates", "min", "max"});
    std::string id;
    if (c.ReadString(q, "id", p, &id, true)) c.CheckId(id, p + "/id");
    ReadChoice(q, "kind", p, c, DesignQuestionKinds(), true);
    ValidateCandidates(q, p, c);
    int l = -1, k = -1;
    if (!q.contains("component"))
      c.diag.Error("missing-field", p, "missing required field \"component\" (\"loop/component\")");
    else if (ResolveComponentRef(q["component"], p + "/component", c, cs, &l, &k) && q.contains("kind") &&
             q["kind"].is_string())
      ValidateQuestionFit(q, p, q["kind"].get<std::string>(), cs.loops[l].components[k], c, cs);
    ValidatePoint(q, p, c, cs);
    // Questions are typed only in a valid case (one with errors is refused):
    // then the loops and components of `doc` are those of cs, index for index.
    if (c.diag.ErrorCount() == 0 && l >= 0 && k >= 0 && cs.loops[l].components[k].model)
      cs.design.push_back(TypedQuestion(q, p, l, k, doc, c, cs));
  }
}

}  // namespace loopwright
