// Reading the knobs a case allows and the parameters it marks fixed
// (network/case/knobs.h), and the catalog line sizes fixes snap to.
#include "network/case/knobs.h"

#include <algorithm>
#include <cmath>
#include <iterator>

#include <fmt/format.h>
#include <fmt/ranges.h>

#include "library/pipe_schedule.h"
#include "network/case/case_context.h"

namespace loopwright {

using nlohmann::json;

std::string KnobPolicy::Held(int loop, int comp, int param, int coupling) const {
  for (const KnobRef& r : fixed)
    if (r.Covers(loop, comp, param, coupling)) return "fixed at " + r.pointer;
  if (!has_allow) return "";
  for (const KnobRef& r : allow)
    if (r.Covers(loop, comp, param, coupling)) return "";
  return "not in /knobs/allow";
}

namespace {

std::string DidYouMean(const std::string& given, const std::vector<std::string>& names) {
  const std::string near = NearestName(given, names);
  return near.empty() ? "" : fmt::format("; did you mean \"{}\"?", near);
}

// The knob parameters of a component's type (for messages).
std::vector<std::string> KnobNames(const ComponentSpec& comp) {
  std::vector<std::string> out;
  for (const ParamSpec& s : comp.type_info->params)
    if (s.knob) out.push_back(s.name);
  return out;
}

bool Bound(const ComponentSpec& comp, int param) {
  for (const Binding& b : comp.bindings())
    if (b.param == param) return true;
  return false;
}

// A parameter of component `comp` by name into r->param; `allow` requires a
// knob that is not bound to an envelope variable.
bool ResolveParam(const std::string& name, const ComponentSpec& comp, const std::string& what, bool allow,
                  const std::string& ptr, CaseContext& c, KnobRef* r) {
  r->param = comp.type_info->ParamIndex(name);
  if (r->param < 0) {
    std::vector<std::string> names;
    for (const ParamSpec& s : comp.type_info->params) names.push_back(s.name);
    c.diag.Error("unknown-reference", ptr,
                 fmt::format("{} \"{}\" ({}) has no parameter \"{}\"{}", what, comp.id, comp.type(), name,
                             DidYouMean(name, names)));
    return false;
  }
  if (!allow) return true;
  if (!comp.type_info->params[r->param].knob) {
    const std::vector<std::string> knobs = KnobNames(comp);
    c.diag.Error("not-a-knob", ptr,
                 fmt::format("\"{}\" of {} \"{}\" is not a design knob{}", name, comp.type(), comp.id,
                             knobs.empty() ? fmt::format("; a {} has none", comp.type())
                                           : fmt::format(" (the knobs of a {}: {})", comp.type(), fmt::join(knobs, ", "))));
    return false;
  }
  if (Bound(comp, r->param)) {
    c.diag.Error("not-a-knob", ptr,
                 fmt::format("\"{}\" of \"{}\" is bound to an envelope variable, so it is no design choice", name,
                             comp.id));
    return false;
  }
  return true;
}

// "coupling[.conductance]" into r when it names a coupling.
bool ResolveCoupling(const std::string& name, const Case& cs, KnobRef* r) {
  for (size_t i = 0; i < cs.couplings.size(); ++i)
    if (name == cs.couplings[i].id || name == cs.couplings[i].id + ".conductance") {
      r->coupling = static_cast<int>(i);
      return true;
    }
  return false;
}

}  // namespace

// One name of knobs.allow / knobs.fixed: "loop/component[.param]" or a
// coupling's "id[.conductance]".
bool ResolveKnobName(const std::string& name, const std::string& ptr, bool allow, CaseContext& c, const Case& cs,
                     KnobRef* r) {
  r->pointer = ptr;
  const size_t slash = name.find('/');
  if (slash == std::string::npos) {
    if (ResolveCoupling(name, cs, r)) return true;
    std::vector<std::string> ids;
    for (const Coupling& cp : cs.couplings) ids.push_back(cp.id + ".conductance");
    c.diag.Error("unknown-reference", ptr,
                 fmt::format("expected \"loop/component.parameter\", \"loop/component\" or \"coupling.conductance\", "
                             "got \"{}\"{}", name, DidYouMean(name, ids)));
    return false;
  }
  const std::string lid = name.substr(0, slash), rest = name.substr(slash + 1);
  std::vector<std::string> loop_ids;
  for (const LoopSpec& l : cs.loops) loop_ids.push_back(l.id);
  const auto lit = std::find(loop_ids.begin(), loop_ids.end(), lid);
  if (lit == loop_ids.end()) {
    c.diag.Error("unknown-reference", ptr, fmt::format("no loop \"{}\"{}", lid, DidYouMean(lid, loop_ids)));
    return false;
  }
  r->loop = static_cast<int>(lit - loop_ids.begin());
  const LoopSpec& loop = cs.loops[r->loop];
  // Ids may hold dots: the whole rest is a component first.
  r->comp = loop.ComponentIndex(rest);
  std::string param;
  const size_t dot = rest.rfind('.');
  if (r->comp < 0 && dot != std::string::npos) {
    r->comp = loop.ComponentIndex(rest.substr(0, dot));
    param = rest.substr(dot + 1);
  }
  if (r->comp < 0) {
    std::vector<std::string> ids;
    for (const ComponentSpec& comp : loop.components) ids.push_back(comp.id);
    const std::string cid = dot == std::string::npos ? rest : rest.substr(0, dot);
    c.diag.Error("unknown-reference", ptr,
                 fmt::format("no component \"{}\" in loop \"{}\"{}", cid, lid, DidYouMean(cid, ids)));
    return false;
  }
  const ComponentSpec& comp = loop.components[r->comp];
  if (!comp.type_info) return false;  // reported already
  if (param.empty()) {
    if (allow && KnobNames(comp).empty()) {
      c.diag.Error("not-a-knob", ptr, fmt::format("{} \"{}\" has no design knob", comp.type(), comp.id));
      return false;
    }
    return true;
  }
  return ResolveParam(param, comp, "component", allow, ptr, c, r);
}

namespace {

void ReadNameList(const json& j, const std::string& ptr, bool allow, CaseContext& c, const Case& cs,
                  std::vector<KnobRef>* out) {
  if (!j.is_array()) {
    c.diag.Error("wrong-type", ptr, "expected an array of knob names (\"loop/component.parameter\"), got " + TypeName(j));
    return;
  }
  for (size_t i = 0; i < j.size(); ++i) {
    const std::string p = ptr + "/" + std::to_string(i);
    if (!j[i].is_string()) {
      c.diag.Error("wrong-type", p, "expected a knob name (\"loop/component.parameter\"), got " + TypeName(j[i]));
      continue;
    }
    KnobRef r;
    if (ResolveKnobName(j[i].get<std::string>(), p, allow, c, cs, &r)) out->push_back(r);
  }
}

// A component's "fixed": true (the whole component), false, or a list of its
// parameter names.
void ReadComponentFixed(const json& f, const std::string& ptr, int l, int k, CaseContext& c, const Case& cs,
                        KnobPolicy* out) {
  const ComponentSpec& comp = cs.loops[l].components[k];
  if (f.is_boolean()) {
    if (f.get<bool>()) out->fixed.push_back({l, k, -1, -1, ptr});
    return;
  }
  if (!f.is_array()) {
    c.diag.Error("wrong-type", ptr, "expected true (every parameter) or an array of parameter names, got " + TypeName(f));
    return;
  }
  for (size_t i = 0; i < f.size(); ++i) {
    const std::string p = ptr + "/" + std::to_string(i);
    if (!f[i].is_string()) {
      c.diag.Error("wrong-type", p, "expected a parameter name, got " + TypeName(f[i]));
      continue;
    }
    KnobRef r{l, k, -1, -1, p};
    if (comp.type_info && ResolveParam(f[i].get<std::string>(), comp, "component", false, p, c, &r))
      out->fixed.push_back(r);
  }
}

// Every component's "fixed", found through the loop's pointer and the
// component's position in its array (a loop or component read with an error
// may be missing from cs, so indices of cs and of the document may differ).
void ReadComponentsFixed(const json& doc, CaseContext& c, const Case& cs, KnobPolicy* out) {
  for (size_t l = 0; l < cs.loops.size(); ++l) {
    const LoopSpec& loop = cs.loops[l];
    const json::json_pointer lp(loop.pointer);
    if (!doc.contains(lp)) continue;
    const json& lj = doc.at(lp);
    if (!lj.is_object() || !lj.contains("components") || !lj["components"].is_array()) continue;
    const json& comps = lj["components"];
    for (size_t k = 0; k < loop.components.size(); ++k) {
      const size_t i = static_cast<size_t>(loop.components[k].index);
      if (i < comps.size() && comps[i].is_object() && comps[i].contains("fixed"))
        ReadComponentFixed(comps[i]["fixed"], loop.pointer + "/components/" + std::to_string(i) + "/fixed",
                           static_cast<int>(l), static_cast<int>(k), c, cs, out);
    }
  }
}

// The parameter a scalar design question moves ("" for a part choice).
const char* QuestionParam(const std::string& kind) {
  if (kind == "cooler_conductance") return "conductance";
  if (kind == "pump_displacement") return "displacement";
  if (kind == "pump_speed") return "speed";
  if (kind == "relief_setting") return "crack";
  if (kind == "bypass_opening") return "opening";
  if (kind == "restrictor_diameter") return "diameter";
  return "";
}

// Why question `q` (valid, typed) may not move what it sizes ("" when it may):
// its parameter held, or, for a part choice, the component held whole or a
// held parameter that a candidate part sets.
std::string QuestionHeld(const DesignQuestion& q, const CaseContext& c, const Case& cs, const KnobPolicy& kp) {
  const ComponentSpec& comp = cs.loops[q.loop].components[q.comp];
  const std::string pn = QuestionParam(q.kind_name);
  if (!pn.empty()) {
    const int pi = comp.type_info->ParamIndex(pn);
    if (pi >= 0 && !std::isnan(comp.model->params()[pi])) {
      const std::string why = kp.Held(q.loop, q.comp, pi, -1);
      return why.empty() ? "" : fmt::format("its {} is {}", pn, why);
    }
    const std::string ref = cs.loops[q.loop].id + "/" + comp.id;  // a coupling's side
    for (size_t i = 0; i < cs.couplings.size(); ++i)
      if (cs.couplings[i].hot_ref == ref || cs.couplings[i].cold_ref == ref) {
        const std::string why = kp.Held(-1, -1, -1, static_cast<int>(i));
        return why.empty() ? "" : fmt::format("the conductance of coupling \"{}\" is {}", cs.couplings[i].id, why);
      }
    return "";
  }
  for (const PartCandidate& cand : q.candidates) {
    const PartEntry* part = c.library.Find(cand.id);
    if (!part) continue;
    for (size_t pi = 0; pi < comp.type_info->params.size(); ++pi) {
      const std::string& name = comp.type_info->params[pi].name;
      const std::string why = kp.Held(q.loop, q.comp, static_cast<int>(pi), -1);
      if (!why.empty() && part->params.contains(name))
        return fmt::format("candidate \"{}\" sets its {}, which is {}", cand.id, name, why);
    }
  }
  return "";
}

void CheckQuestions(const json& doc, CaseContext& c, const Case& cs, const KnobPolicy& kp) {
  if (!doc.contains("design") || !doc["design"].is_array()) return;
  // Typed questions are kept in order, one per question object, in a case
  // without errors (ValidateDesign), which is the only one checked here.
  if (c.diag.ErrorCount() != 0 || cs.design.size() != doc["design"].size()) return;
  for (size_t i = 0; i < cs.design.size(); ++i) {
    const std::string why = QuestionHeld(cs.design[i], c, cs, kp);
    if (!why.empty())
      c.diag.Error("fixed-knob", fmt::format("/design/{}/component", i),
                   fmt::format("design question \"{}\" ({}) would move {}: {}", cs.design[i].id,
                               cs.design[i].kind_name, cs.design[i].component, why));
  }
}

// Every line size of the library (category "line": tube and hose sizes)
// and the pipe schedule (library/pipe_schedule.h), sorted by family, then
// bore. (Built at every load: a few allocations in all, which
// cases.load_linear_test counts.)
std::vector<CatalogLine> CatalogLines(const CaseContext& c) {
  std::vector<CatalogLine> out;
  size_t n = std::size(kPipeSchedule40);
  for (const PartEntry& p : c.library.parts) n += p.category == "line";
  out.reserve(n);
  for (const PipeSize& p : kPipeSchedule40) out.push_back({p.id, "pipe", p.BoreMetres()});
  for (const PartEntry& p : c.library.parts) {
    if (p.category != "line") continue;
    const auto it = p.params.find("diameter");
    if (it == p.params.end() || !it->is_string()) continue;
    const ParsedQuantity q = ParseQuantity(it->get_ref<const std::string&>(), Dimension::kLength);
    if (q.ok && q.si > 0) out.push_back({p.id, p.type, q.si});
  }
  std::sort(out.begin(), out.end(), [](const CatalogLine& a, const CatalogLine& b) {
    return a.type != b.type ? a.type < b.type : a.bore < b.bore;
  });
  return out;
}

}  // namespace

void ReadKnobPolicy(const json& doc, CaseContext& c, Case& cs) {
  KnobPolicy& kp = cs.knobs;
  ReadComponentsFixed(doc, c, cs, &kp);
  if (doc.contains("knobs")) {
    const json& k = doc["knobs"];
    if (!k.is_object()) {
      c.diag.Error("wrong-type", "/knobs", "expected {\"allow\": [names], \"fixed\": [names]}, got " + TypeName(k));
    } else {
      c.UnknownKeys(k, "/knobs", {"allow", "fixed"});
      if (k.contains("allow")) {
        kp.has_allow = true;
        ReadNameList(k["allow"], "/knobs/allow", true, c, cs, &kp.allow);
      }
      if (k.contains("fixed")) ReadNameList(k["fixed"], "/knobs/fixed", false, c, cs, &kp.fixed);
    }
  }
  // A knob both allowed and fixed is a contradiction in the case.
  for (const KnobRef& a : kp.allow)
    for (const KnobRef& f : kp.fixed)
      if ((a.param >= 0 && f.Covers(a.loop, a.comp, a.param, a.coupling)) ||
          (a.coupling >= 0 && a.coupling == f.coupling))
        c.diag.Error("fixed-knob", a.pointer, fmt::format("this knob is also fixed, at {}", f.pointer));
  CheckQuestions(doc, c, cs, kp);
  kp.lines = CatalogLines(c);
}

}  // namespace loopwright
