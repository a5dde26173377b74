// Validation of the through-time sections: "thermal_masses" (lumped solids and
// their heat paths) and "scenarios" (timed events), network/case/transient_spec.h.
#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "network/case/case_context.h"

namespace loopwright {

using nlohmann::json;

void ReadHoldupVolume(JsonView j, const std::string& ptr, CaseContext& c, float* out) {
  double v = 0;
  if (!c.ReadQuantity(j, ptr, Dimension::kVolume, &v)) return;
  if (v < 0) c.diag.Error("out-of-range", ptr, "a hold-up volume must not be negative");
  *out = static_cast<float>(v);
}

namespace {

// Reads an optional quantity `key` of `obj` that must be > 0 (or >= 0 when
// !strict); false when present and wrong (reported).
bool ReadBounded(const json& obj, const char* key, const std::string& p, Dimension dim, bool required, bool strict,
                 CaseContext& c, double* out, int* variable = nullptr) {
  const std::string kp = p + "/" + key;
  if (!obj.contains(key)) {
    if (required) c.diag.Error("missing-field", p, fmt::format("missing required field \"{}\"", key));
    return !required;
  }
  if (!c.ReadQuantity(obj[key], kp, dim, out, variable)) return false;
  if (variable && *variable >= 0) return true;
  if (strict ? !(*out > 0) : !(*out >= 0)) {
    c.diag.Error("out-of-range", kp, fmt::format("\"{}\" must be {} zero", key, strict ? "above" : "at least"));
    return false;
  }
  return true;
}

bool RequireObject(const json& j, const std::string& p, const char* what, CaseContext& c) {
  if (j.is_object()) return true;
  c.diag.Error("wrong-type", p, fmt::format("expected {}, got {}", what, TypeName(j)));
  return false;
}

bool RequireArray(const json& j, const std::string& p, const char* what, CaseContext& c) {
  if (j.is_array()) return true;
  c.diag.Error("wrong-type", p, fmt::format("expected an array of {}, got {}", what, TypeName(j)));
  return false;
}

void ReadFluidLink(const json& j, const std::string& p, CaseContext& c, const Case& cs, FluidLink* l) {
  if (!RequireObject(j, p, "a heat path to a node {node, conductance, flow_of, rated_flow, exponent, natural}", c))
    return;
  c.UnknownKeys(j, p, {"node", "conductance", "flow_of", "rated_flow", "exponent", "natural"});
  if (!j.contains("node")) c.diag.Error("missing-field", p, "missing required field \"node\" (\"loop/node\")");
  else if (ResolveNodeRef(j["node"], p + "/node", c, cs, &l->loop, &l->node)) l->node_ref = j["node"].get<std::string>();
  ReadBounded(j, "conductance", p, Dimension::kConductance, true, false, c, &l->conductance);
  ReadBounded(j, "natural", p, Dimension::kConductance, false, false, c, &l->natural);
  if (j.contains("flow_of")) {
    if (ResolveComponentRef(j["flow_of"], p + "/flow_of", c, cs, &l->flow_loop, &l->flow_comp))
      l->flow_ref = j["flow_of"].get<std::string>();
    ReadBounded(j, "rated_flow", p, Dimension::kVolumeFlow, true, true, c, &l->rated_flow);
    if (j.contains("exponent") && c.ReadQuantity(j["exponent"], p + "/exponent", Dimension::kDimensionless, &l->exponent) &&
        !(l->exponent > 0 && l->exponent <= 2))
      c.diag.Error("out-of-range", p + "/exponent", "the convective flow exponent must lie in (0, 2]");
  } else {
    for (const char* k : {"rated_flow", "exponent", "natural"})
      if (j.contains(k))
        c.diag.Error("unknown-field", p + "/" + k, fmt::format("\"{}\" applies only with \"flow_of\"", k));
  }
}

void ReadAmbient(const json& j, const std::string& p, CaseContext& c, ThermalMass* m) {
  if (!RequireObject(j, p, "an object {conductance, area, emissivity, temperature}", c)) return;
  c.UnknownKeys(j, p, {"conductance", "area", "emissivity", "temperature"});
  ReadBounded(j, "conductance", p, Dimension::kConductance, false, false, c, &m->ambient_conductance);
  ReadBounded(j, "area", p, Dimension::kArea, false, false, c, &m->radiating_area);
  if (j.contains("emissivity") &&
      c.ReadQuantity(j["emissivity"], p + "/emissivity", Dimension::kDimensionless, &m->emissivity) &&
      !(m->emissivity >= 0 && m->emissivity <= 1))
    c.diag.Error("out-of-range", p + "/emissivity", "emissivity must lie between 0 and 1");
  if ((m->emissivity > 0) != (m->radiating_area > 0))
    c.diag.Error("missing-field", p, "radiation needs both \"area\" and \"emissivity\"");
  if (j.contains("temperature"))
    c.ReadQuantity(j["temperature"], p + "/temperature", Dimension::kTemperature, &m->ambient_temperature,
                   &m->ambient_variable);
}

// A mass's "checks": its own coking_temperature_max (the one through-time
// limit a solid takes), a temperature above absolute zero.
void ReadMassChecks(const json& j, const std::string& p, CaseContext& c, ThermalMass* m) {
  if (!RequireObject(j, p, "limits {coking_temperature_max: temperature}", c)) return;
  for (auto it = j.begin(); it != j.end(); ++it) {
    if (CaseContext::IgnoredKey(it.key())) continue;
    const std::string kp = p + "/" + PointerToken(it.key());
    const CheckRow* r = FindCheck(it.key());
    if (!r)
      c.UnknownKey(it.key(), p, {"coking_temperature_max"});
    else if (r->id != CheckId::kCokingTemperatureMax)
      c.diag.Error("misplaced-limit", kp, fmt::format("{} does not apply to a thermal mass: it is read at {}", r->name, r->reads));
    else if (c.ReadQuantity(it.value(), kp, r->dim, &m->coking_limit) && !(m->coking_limit > 0))
      c.diag.Error("out-of-range", kp, "a temperature limit must lie above absolute zero");
  }
}

void ReadMass(const json& j, const std::string& p, CaseContext& c, const Case& cs, ThermalMass* m) {
  m->pointer = p;
  if (!RequireObject(j, p, "a thermal mass {id, mass, specific_heat, ...}", c)) return;
  c.UnknownKeys(j, p, {"id", "mass", "specific_heat", "initial_temperature", "heat", "ambient", "to_fluid", "to_masses",
                       "checks"});
  if (j.contains("checks")) ReadMassChecks(j["checks"], p + "/checks", c, m);
  if (c.ReadString(j, "id", p, &m->id, true)) c.CheckId(m->id, p, "/id");
  ReadBounded(j, "mass", p, Dimension::kMass, true, true, c, &m->mass);
  ReadBounded(j, "specific_heat", p, Dimension::kSpecificHeat, true, true, c, &m->specific_heat);
  if (j.contains("initial_temperature"))
    c.ReadQuantity(j["initial_temperature"], p + "/initial_temperature", Dimension::kTemperature,
                   &m->initial_temperature);
  if (j.contains("heat")) c.ReadQuantity(j["heat"], p + "/heat", Dimension::kPower, &m->heat, &m->heat_variable);
  if (j.contains("ambient")) ReadAmbient(j["ambient"], p + "/ambient", c, m);
  if (j.contains("to_fluid") && RequireArray(j["to_fluid"], p + "/to_fluid", "heat paths to nodes", c))
    for (size_t i = 0; i < j["to_fluid"].size(); ++i) {
      m->fluid.emplace_back();
      ReadFluidLink(j["to_fluid"][i], p + "/to_fluid/" + std::to_string(i), c, cs, &m->fluid.back());
    }
  if (j.contains("to_masses") && RequireArray(j["to_masses"], p + "/to_masses", "heat paths to masses", c))
    for (size_t i = 0; i < j["to_masses"].size(); ++i) {
      const std::string lp = p + "/to_masses/" + std::to_string(i);
      const json& lj = j["to_masses"][i];
      if (!RequireObject(lj, lp, "a heat path to a mass {mass, conductance}", c)) continue;
      c.UnknownKeys(lj, lp, {"mass", "conductance"});
      MassLink l;
      c.ReadString(lj, "mass", lp, &l.mass_ref, true);
      ReadBounded(lj, "conductance", lp, Dimension::kConductance, true, false, c, &l.conductance);
      m->masses.push_back(l);
    }
}

// The other ends of the mass-to-mass paths, once every mass is read.
void ResolveMassLinks(CaseContext& c, Case& cs) {
  std::vector<std::string> ids;
  for (const ThermalMass& m : cs.masses) ids.push_back(m.id);
  for (size_t k = 0; k < cs.masses.size(); ++k) {
    ThermalMass& m = cs.masses[k];
    for (size_t i = 0; i < m.masses.size(); ++i) {
      MassLink& l = m.masses[i];
      const std::string lp = m.pointer + "/to_masses/" + std::to_string(i) + "/mass";
      auto it = std::find(ids.begin(), ids.end(), l.mass_ref);
      if (l.mass_ref.empty()) continue;  // reported as missing
      if (it == ids.end()) {
        const std::string near = NearestName(l.mass_ref, ids);
        c.diag.Error("unknown-reference", lp,
                     fmt::format("no thermal mass \"{}\"{}", l.mass_ref,
                                 near.empty() ? "" : fmt::format("; did you mean \"{}\"?", near)));
      } else if (static_cast<size_t>(it - ids.begin()) == k) {
        c.diag.Error("bad-reference", lp, fmt::format("thermal mass \"{}\" cannot exchange heat with itself", m.id));
      } else {
        l.other = static_cast<int>(it - ids.begin());
      }
    }
    for (size_t i = 0; i < k; ++i)
      if (cs.masses[i].id == m.id && !m.id.empty())
        c.diag.Error("duplicate-id", m.pointer + "/id", fmt::format("thermal mass \"{}\" is declared twice", m.id));
  }
}

void ReadMasses(const json& j, CaseContext& c, Case& cs) {
  const std::string p = "/thermal_masses";
  if (!RequireArray(j, p, "thermal masses {id, mass, specific_heat, ...}", c)) return;
  if (!cs.thermal && !j.empty())
    c.diag.Error("bad-value", p, "thermal masses exchange heat with the liquid: the case needs \"thermal\": true");
  for (size_t i = 0; i < j.size(); ++i) {
    cs.masses.emplace_back();
    ReadMass(j[i], p + "/" + std::to_string(i), c, cs, &cs.masses.back());
  }
  ResolveMassLinks(c, cs);
}

// A change target: an envelope variable, or "loop/component/parameter".
void ReadChange(const std::string& key, const json& v, const std::string& p, CaseContext& c, const Case& cs,
                ScenarioChange* ch) {
  ch->target = key;
  const size_t last = key.rfind('/');
  Dimension dim = Dimension::kDimensionless;
  if (last == std::string::npos) {
    ch->variable = cs.envelope.VariableIndex(key);
    if (ch->variable < 0) {
      c.diag.Error("unknown-variable", p, UnknownVariable(key, cs.envelope, ""));
      return;
    }
    dim = cs.envelope.variables[ch->variable].dim;
  } else {
    if (!ResolveComponentRef(json(key.substr(0, last)), p, c, cs, &ch->loop, &ch->comp)) return;
    const ComponentSpec& comp = cs.loops[ch->loop].components[ch->comp];
    ch->param = comp.type_info ? comp.type_info->ParamIndex(key.substr(last + 1)) : -1;
    if (ch->param < 0 || comp.type_info->params[ch->param].kind != ParamKind::kNumber) {
      c.diag.Error("unknown-field", p,
                   fmt::format("component \"{}\" has no numeric parameter \"{}\"", key.substr(0, last), key.substr(last + 1)));
      return;
    }
    const ParamSpec& spec = comp.type_info->params[ch->param];
    dim = spec.dim;
    if (c.ReadQuantity(v, p, dim, &ch->value) && !(ch->value >= spec.min_si && ch->value <= spec.max_si))
      c.diag.Error("out-of-range", p, fmt::format("{} is outside the range the model takes", key));
    return;
  }
  c.ReadQuantity(v, p, dim, &ch->value);
}

void ReadChanges(const json& j, const std::string& p, CaseContext& c, const Case& cs,
                 std::vector<ScenarioChange>* out) {
  if (!RequireObject(j, p, "an object {variable or \"loop/component/parameter\": value}", c)) return;
  for (auto it = j.begin(); it != j.end(); ++it) {
    out->emplace_back();
    ReadChange(it.key(), it.value(), p + "/" + PointerToken(it.key()), c, cs, &out->back());
  }
}

void ReadEvent(const json& j, const std::string& p, CaseContext& c, const Case& cs, ScenarioEvent* e) {
  e->pointer = p;
  if (!RequireObject(j, p, "an event {at, set, ramp}", c)) return;
  c.UnknownKeys(j, p, {"name", "at", "ramp", "set"});
  if (j.contains("name")) c.ReadString(j, "name", p, &e->name, false);
  ReadBounded(j, "at", p, Dimension::kTime, true, false, c, &e->at);
  ReadBounded(j, "ramp", p, Dimension::kTime, false, false, c, &e->ramp);
  if (!j.contains("set")) {
    c.diag.Error("missing-field", p, "missing required field \"set\": {variable or \"loop/component/parameter\": value}");
    return;
  }
  ReadChanges(j["set"], p + "/set", c, cs, &e->changes);
}

void ReadStart(const json& j, const std::string& p, CaseContext& c, const Case& cs, Scenario* s) {
  if (!RequireObject(j, p, "an object {point, temperature}", c)) return;
  c.UnknownKeys(j, p, {"point", "temperature", "set"});
  std::string name;
  if (c.ReadString(j, "point", p, &name, false) && !name.empty()) {
    s->start_point = -1;
    for (size_t i = 0; i < cs.envelope.points.size(); ++i)
      if (cs.envelope.points[i].name == name) s->start_point = static_cast<int>(i);
    if (s->start_point < 0) {
      std::vector<std::string> names;
      for (const OperatingPoint& op : cs.envelope.points) names.push_back(op.name);
      const std::string near = NearestName(name, names);
      c.diag.Error("unknown-reference", p + "/point",
                   fmt::format("no envelope point \"{}\"{}", name,
                               near.empty() ? "" : fmt::format("; did you mean \"{}\"?", near)));
      s->start_point = 0;
    }
  }
  if (j.contains("temperature"))
    c.ReadQuantity(j["temperature"], p + "/temperature", Dimension::kTemperature, &s->start_temperature);
  if (j.contains("set")) ReadChanges(j["set"], p + "/set", c, cs, &s->start_changes);
}

void ReadScenario(const json& j, const std::string& p, CaseContext& c, const Case& cs, Scenario* s) {
  s->pointer = p;
  if (!RequireObject(j, p, "a scenario {id, start, end, events}", c)) return;
  c.UnknownKeys(j, p, {"id", "start", "end", "output_interval", "events", "watch"});
  if (c.ReadString(j, "id", p, &s->id, true)) c.CheckId(s->id, p, "/id");
  if (j.contains("start")) ReadStart(j["start"], p + "/start", c, cs, s);
  ReadBounded(j, "end", p, Dimension::kTime, true, true, c, &s->end);
  if (j.contains("output_interval"))
    ReadBounded(j, "output_interval", p, Dimension::kTime, false, true, c, &s->output_interval);
  if (j.contains("events") && RequireArray(j["events"], p + "/events", "events {at, set, ramp}", c))
    for (size_t i = 0; i < j["events"].size(); ++i) {
      s->events.emplace_back();
      ScenarioEvent& e = s->events.back();
      ReadEvent(j["events"][i], p + "/events/" + std::to_string(i), c, cs, &e);
      if (e.at > s->end)
        c.diag.Error("out-of-range", e.pointer + "/at",
                     fmt::format("the event at {:g} s comes after the scenario's end ({:g} s)", e.at, s->end));
    }
  std::stable_sort(s->events.begin(), s->events.end(),
                   [](const ScenarioEvent& a, const ScenarioEvent& b) { return a.at < b.at; });
  if (j.contains("watch") && RequireArray(j["watch"], p + "/watch", "names (mass, \"loop/node\")", c))
    for (size_t i = 0; i < j["watch"].size(); ++i) {
      const std::string wp = p + "/watch/" + std::to_string(i);
      if (!j["watch"][i].is_string()) {
        c.diag.Error("wrong-type", wp, "expected a thermal mass id or \"loop/node\", got " + TypeName(j["watch"][i]));
        continue;
      }
      const std::string w = j["watch"][i].get<std::string>();
      int l = -1, n = -1;
      const bool is_mass = std::any_of(cs.masses.begin(), cs.masses.end(), [&](const ThermalMass& m) { return m.id == w; });
      if (!is_mass && ResolveNodeRef(j["watch"][i], wp, c, cs, &l, &n)) s->watch.push_back(w);
      else if (is_mass) s->watch.push_back(w);
    }
}

void ReadScenarios(const json& j, CaseContext& c, Case& cs) {
  const std::string p = "/scenarios";
  if (!RequireArray(j, p, "scenarios {id, start, end, events}", c)) return;
  for (size_t i = 0; i < j.size(); ++i) {
    cs.scenarios.emplace_back();
    ReadScenario(j[i], p + "/" + std::to_string(i), c, cs, &cs.scenarios.back());
    for (size_t k = 0; k + 1 < cs.scenarios.size(); ++k)
      if (cs.scenarios[k].id == cs.scenarios.back().id && !cs.scenarios.back().id.empty())
        c.diag.Error("duplicate-id", p + "/" + std::to_string(i) + "/id",
                     fmt::format("scenario \"{}\" is declared twice", cs.scenarios.back().id));
  }
}

}  // namespace

void ReadTransientSections(const json& doc, CaseContext& c, Case& cs) {
  if (doc.contains("thermal_masses")) ReadMasses(doc["thermal_masses"], c, cs);
  if (doc.contains("scenarios")) ReadScenarios(doc["scenarios"], c, cs);
}

}  // namespace loopwright
