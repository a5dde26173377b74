#include "network/case/schema.h"

#include <fmt/format.h>

#include "components/registry.h"
#include "network/case/check_table.h"
#include "network/case/tolerances.h"

namespace loopwright {

const std::vector<std::string>& HeatExchangerArrangements();
const std::vector<std::string>& DesignQuestionKinds();

using nlohmann::json;

namespace {

json Quantity(Dimension dim, const std::string& description, bool bindable) {
  std::vector<std::string> units = AcceptedUnits(dim);
  std::string desc = description;
  if (dim != Dimension::kDimensionless)
    desc += fmt::format(" [{}; a number is SI ({}), or a string \"value unit\" with unit one of: {}]", DimensionName(dim),
                        units.empty() ? "" : units[0], fmt::join(units, ", "));
  if (bindable) desc += "; or \"$variable\" to bind it to an envelope variable";
  return {{"description", desc},
          {"anyOf", json::array({{{"type", "number"}}, {{"type", "string"}, {"minLength", 1}, {"maxLength", 256}}})}};
}

// "checks", from the check table (network/case/check_table.h): a property
// per case limit with its default and basis; the checks whose limit is the
// component's own are named in the section's description.
json LimitSchema(const CheckRow& r) {
  const std::string dflt = r.HasDefault() ? r.default_text : "none";
  json j = Quantity(r.dim, fmt::format("{} (default: {}; {})", r.description, dflt, r.basis), false);
  if (r.HasDefault()) j["default"] = r.default_text;
  return j;
}

// "checks" on a component of type t (the limits that may apply to it, over
// its loop's and the case's) or on a node (boiling_margin_min); null when none may.
json PlacedChecksSchema(const ComponentType* t) {
  json props = {{"description", {{"type", "string"}}}, {"notes", json::object()}};
  size_t n = 0;
  for (const CheckRow& r : CheckTable())
    if (r.limit_from == LimitFrom::kCase && (t ? LimitMayApplyToType(r.id, *t) : r.id == CheckId::kBoilingMarginMin))
      props[r.name] = LimitSchema(r), ++n;
  if (n == 0) return nullptr;
  return {{"type", "object"},
          {"description", t ? "limits for this component over its loop's and the case's (the most specific wins); "
                              "the load refuses one its place does not read (a velocity limit of another line kind)"
                            : "limits for this node over its loop's and the case's (a loop whose fluid can boil)"},
          {"properties", props},
          {"additionalProperties", false}};
}

json ChecksSchema() {
  json props = {{"description", {{"type", "string"}}}, {"notes", json::object()}};
  std::vector<std::string> own;
  for (const CheckRow& r : CheckTable()) {
    if (r.limit_from == LimitFrom::kComponent) {
      own.push_back(fmt::format("{} ({})", r.name, r.basis));
      continue;
    }
    props[r.name] = LimitSchema(r);
  }
  return {{"type", "object"},
          {"description", fmt::format("limits of the envelope checks over their defaults; checks whose limit is the "
                                      "component's own and not set here: {}",
                                      fmt::join(own, ", "))},
          {"properties", props},
          {"additionalProperties", false}};
}

json ParamSchema(const ParamSpec& s) {
  switch (s.kind) {
    case ParamKind::kNumber: return Quantity(s.dim, s.description, s.bindable);
    case ParamKind::kBool: return {{"type", "boolean"}, {"description", s.description}};
    case ParamKind::kChoice: return {{"enum", s.choices}, {"description", s.description}};
    case ParamKind::kNameList:
      return {{"type", "array"}, {"items", {{"enum", s.choices}}}, {"description", s.description}};
    case ParamKind::kTable: {
      json items = json::array();
      std::vector<std::string> names;
      for (const auto& c : s.columns) {
        items.push_back(Quantity(c.dim, c.name, false));
        names.push_back(c.name);
      }
      return {{"type", "array"},
              {"minItems", s.min_rows},
              {"description", fmt::format("{}; rows [{}]", s.description, fmt::join(names, ", "))},
              {"items", {{"type", "array"}, {"prefixItems", items}, {"minItems", s.columns.size()},
                         {"maxItems", s.columns.size()}}}};
    }
  }
  return json::object();
}

json ComponentDef(const ComponentType& t) {
  json props = {
      {"id", {{"$ref", "#/$defs/id"}}},
      {"type", {{"const", t.name}}},
      {"from", {{"type", "string"}, {"description", "node the positive flow leaves"}}},
      {"to", {{"type", "string"}, {"description", "node the positive flow enters"}}},
      {"part", {{"type", "string"}, {"description", "library part id, or \"file.json#id\" in the case's folder"}}},
      {"description", {{"type", "string"}}},
      {"notes", json::object()},
  };
  if (t.roles & kRoleBearing)
    props["feed_margin"] = Quantity(Dimension::kPressureDifference, "feed pressure margin over the housing for this bearing", false);
  if (json checks = PlacedChecksSchema(&t); !checks.is_null()) props["checks"] = checks;
  if (t.roles & kRoleThermostat)
    props["sensed_node"] = {{"type", "string"}, {"description", "node whose temperature the element senses (default: from)"}};
  props["volume"] = Quantity(Dimension::kVolume, "liquid held inside, for `simulate` (default: a line's bore x length, "
                             "else none)", false);
  std::vector<std::string> required = {"id", "from", "to"};
  json names = json::array();
  for (const auto& s : t.params) {
    props[s.name] = ParamSchema(s);
    names.push_back(s.name);
  }
  props["fixed"] = {{"description", "parameters the fix search and sizing must not move (a bought part): true for "
                                    "every one, or their names"},
                    {"oneOf", {{{"type", "boolean"}}, {{"type", "array"}, {"items", {{"enum", names}}}}}}};
  return {{"type", "object"},
          {"description", t.summary},
          {"properties", props},
          {"required", required},
          {"additionalProperties", false}};
}

json FluidSchema() {
  json fluid_kinds = json::array({"oil", "water", "glycol", "table"});
  return {
      {"type", "object"},
      {"description",
       "oil: kv40+kv100 | viscosity [[T, nu], [T, nu]] | iso_vg+kv100 | sae+kv40+kv100, with optional density_15C, "
       "expansion, specific_heat, conductivity, t_min, t_max; water; glycol: glycol (ethylene|propylene), "
       "mass_fraction; table: rows [[T, nu, rho, cp, k], ...] (viscosity: kinematic|dynamic); or {part: id}"},
      {"properties",
       {{"kind", {{"enum", fluid_kinds}}},
        {"part", {{"type", "string"}}},
        {"kv40", Quantity(Dimension::kKinematicViscosity, "kinematic viscosity at 40 degC", true)},
        {"kv100", Quantity(Dimension::kKinematicViscosity, "kinematic viscosity at 100 degC", true)},
        {"viscosity", {{"description", "two points [[temperature, kinematic viscosity], ...], or for a table: kinematic|dynamic"}}},
        {"iso_vg", {{"type", "integer"}}},
        {"sae", {{"type", "string"}}},
        {"density_15C", Quantity(Dimension::kDensity, "density at 15 degC", false)},
        {"expansion", Quantity(Dimension::kInverseTemperature, "volumetric expansion coefficient", false)},
        {"specific_heat", Quantity(Dimension::kSpecificHeat, "constant specific heat (overrides Cragoe)", false)},
        {"conductivity", Quantity(Dimension::kThermalConductivity, "constant conductivity (overrides Cragoe)", false)},
        {"t_min", Quantity(Dimension::kTemperature, "lowest valid temperature", false)},
        {"t_max", Quantity(Dimension::kTemperature, "highest valid temperature", false)},
        {"glycol", {{"enum", {"ethylene", "propylene"}}}},
        {"mass_fraction", Quantity(Dimension::kDimensionless, "glycol mass fraction (0..0.6)", false)},
        {"rows", {{"type", "array"}, {"minItems", 2}}},
        {"source", {{"type", "string"}}},
        {"description", {{"type", "string"}}},
        {"notes", json::object()}}},
      {"additionalProperties", false}};
}

json BoundarySchema() {
  return {{"type", "object"},
          {"properties",
           {{"kind", {{"enum", {"reservoir", "tank", "pressure"}}}},
            {"pressure", Quantity(Dimension::kPressure, "pressure at the free surface / in the tank (gauge unless absolute)", true)},
            {"level", Quantity(Dimension::kLength, "liquid level above the node", false)},
            {"temperature", Quantity(Dimension::kTemperature, "fixed temperature of the liquid (omit for a well-mixed unknown)", true)},
            {"drains_to", {{"type", "string"}, {"description", "reservoir or tank node that receives this boundary's inflow (gravity drain)"}}},
            {"loss_conductance", Quantity(Dimension::kConductance, "heat loss from the reservoir to ambient", false)},
            {"ambient_temperature", Quantity(Dimension::kTemperature, "ambient temperature for the heat loss", true)},
            {"description", {{"type", "string"}}},
            {"notes", json::object()}}},
          {"required", {"kind"}},
          {"additionalProperties", false}};
}

json NodeSchema() {
  return {{"type", "object"},
          {"properties",
           {{"id", {{"$ref", "#/$defs/id"}}},
            {"elevation", Quantity(Dimension::kLength, "height of the node above the case datum", false)},
            {"heat", Quantity(Dimension::kPower, "heat input into the liquid at this node (e.g. heat soak into a housing)", true)},
            {"boundary", BoundarySchema()},
            {"checks", PlacedChecksSchema(nullptr)},
            {"volume", Quantity(Dimension::kVolume, "liquid held at the node itself (a reservoir's contents, a cavity), "
                                                   "for `simulate`", false)},
            {"description", {{"type", "string"}}},
            {"notes", json::object()}}},
          {"required", {"id"}},
          {"additionalProperties", false}};
}

// One definition per component type ("component_<type>"), and "component"
// choosing among them by "type".
void AddComponentSchemas(json* defs) {
  json all_of = json::array();
  std::vector<std::string> names;
  for (const auto& t : ComponentTypes()) {
    (*defs)["component_" + t.name] = ComponentDef(t);
    names.push_back(t.name);
    all_of.push_back({{"if", {{"properties", {{"type", {{"const", t.name}}}}}, {"required", {"type"}}}},
                      {"then", {{"$ref", "#/$defs/component_" + t.name}}}});
  }
  (*defs)["component"] = {{"type", "object"},
                          {"properties", {{"type", {{"enum", names}}}}},
                          {"required", {"id", "from", "to"}},
                          {"allOf", all_of}};
}

json LoopSchema() {
  return {{"type", "object"},
          {"properties",
           {{"id", {{"$ref", "#/$defs/id"}}},
            {"fluid", {{"type", "string"}, {"description", "id of a fluid under /fluids"}}},
            {"temperature", Quantity(Dimension::kTemperature, "loop temperature for isothermal solves", true)},
            {"nodes", {{"type", "array"}, {"items", {{"$ref", "#/$defs/node"}}}}},
            {"components", {{"type", "array"}, {"items", {{"$ref", "#/$defs/component"}}}}},
            {"checks", {{"$ref", "#/$defs/checks"}, {"description", "limits for this loop over the case's (a component's or node's own win)"}}},
            {"description", {{"type", "string"}}},
            {"notes", json::object()}}},
          {"required", {"id", "fluid", "nodes", "components"}},
          {"additionalProperties", false}};
}

json CouplingSchema() {
  return {{"type", "object"},
          {"properties",
           {{"id", {{"$ref", "#/$defs/id"}}},
            {"type", {{"const", "heat_exchanger"}}},
            {"arrangement", {{"enum", HeatExchangerArrangements()}}},
            {"hot", {{"type", "string"}, {"description", "\"loop/component\" of the hot side"}}},
            {"cold", {{"type", "string"}, {"description", "\"loop/component\" of the cold side"}}},
            {"conductance", Quantity(Dimension::kConductance, "UA of the exchanger", false)},
            {"description", {{"type", "string"}}},
            {"notes", json::object()}}},
          {"required", {"id", "type", "arrangement", "hot", "cold", "conductance"}},
          {"additionalProperties", false}};
}

json VariablesSchema() {
  std::vector<std::string> dims;
  for (Dimension d : AllDimensions()) dims.push_back(DimensionKey(d));
  return {{"type", "object"},
          {"additionalProperties",
           {{"type", "object"},
            {"properties", {{"dimension", {{"enum", dims}}}, {"default", {{"$ref", "#/$defs/quantity"}}},
                            {"severe", {{"enum", {"high", "low"}},
                                        {"description", "the side of the range the derived hot corner takes (default high)"}}}}},
            {"required", {"dimension", "default"}},
            {"additionalProperties", false}}}};
}

json PointsSchema() {
  return {{"type", "array"},
          {"items", {{"type", "object"},
                     {"properties", {{"name", {{"$ref", "#/$defs/id"}}}, {"values", {{"type", "object"}}},
                                     {"isothermal", {{"type", "boolean"}, {"description", "solve at the loop temperatures, no energy balance (cold start)"}}},
                                     {"description", {{"type", "string"}}}, {"notes", json::object()}}},
                     {"required", {"name"}},
                     {"additionalProperties", false}}}};
}

json GridsSchema() {
  return {{"type", "array"},
          {"items", {{"type", "object"},
                     {"properties", {{"name", {{"$ref", "#/$defs/id"}}}, {"axes", {{"type", "object"}}},
                                     {"values", {{"type", "object"}}}, {"isothermal", {{"type", "boolean"}}},
                                     {"description", {{"type", "string"}}}, {"notes", json::object()}}},
                     {"required", {"name", "axes"}},
                     {"additionalProperties", false}}}};
}

json DerivedSchema() {
  return {{"type", "object"},
          {"description", "ready-made points: cold_start {temperature} (isothermal, heat inputs zero) and hot_corner (every variable at its highest declared value)"},
          {"properties", {{"cold_start", {{"type", "object"}, {"properties", {{"temperature", Quantity(Dimension::kTemperature, "cold-start temperature of every loop", false)}}},
                                          {"required", {"temperature"}}, {"additionalProperties", false}}},
                          {"hot_corner", {{"type", "boolean"}}}}},
          {"additionalProperties", false}};
}

json EnvelopeSchema() {
  return {{"type", "object"},
          {"properties",
           {{"variables", VariablesSchema()},
            {"points", PointsSchema()},
            {"grids", GridsSchema()},
            {"derived", DerivedSchema()},
            {"description", {{"type", "string"}}},
            {"notes", json::object()}}},
          {"additionalProperties", false}};
}

json DesignSchema() {
  return {{"type", "array"},
          {"items", {{"type", "object"},
                     {"properties",
                      {{"id", {{"$ref", "#/$defs/id"}}},
                       {"kind", {{"enum", DesignQuestionKinds()}}},
                       {"component", {{"type", "string"}}},
                       {"target", json::object()},
                       {"point", {{"type", "string"}}},
                       {"candidates", {{"type", "array"}}},
                       {"min", json::object()},
                       {"max", json::object()},
                       {"description", {{"type", "string"}}},
                       {"notes", json::object()}}},
                     {"required", {"id", "kind", "component"}},
                     {"additionalProperties", false}}}};
}

// "knobs": the knobs the fix search and sizing may move, and more fixed
// ones (network/case/knobs.h).
json KnobsSchema() {
  const json names = {{"type", "array"},
                      {"items", {{"type", "string"},
                                 {"description", "\"loop/component.parameter\", \"loop/component\" or "
                                                 "\"coupling.conductance\""}}}};
  json allow = names, fixed = names;
  allow["description"] = "only these knobs may move (every other is held)";
  fixed["description"] = "these parameters may not move";
  return {{"type", "object"},
          {"description", "which design parameters the fix search and sizing may move"},
          {"properties", {{"allow", allow}, {"fixed", fixed}, {"description", {{"type", "string"}}},
                          {"notes", json::object()}}},
          {"additionalProperties", false}};
}

// "tolerances": distributions of parameters and their correlations
// (network/case/tolerances.h).
json TolerancesSchema() {
  const json q = {{"$ref", "#/$defs/quantity"}};
  json dist = {{"type", "object"},
               {"description", "normal: sd, or band (half-width) with coverage, and mean (default: the case's value); "
                               "uniform: low and high, or half_width; triangular: low, high, mode (default: the "
                               "case's value); lognormal: sd_log and median (default: the case's value)"},
               {"properties", {{"distribution", {{"enum", DistributionNames()}}}, {"mean", q}, {"sd", q}, {"band", q},
                               {"coverage", {{"type", "number"}, {"exclusiveMinimum", 0}, {"exclusiveMaximum", 1}}},
                               {"low", q}, {"high", q}, {"half_width", q}, {"mode", q}, {"median", q},
                               {"sd_log", {{"type", "number"}, {"exclusiveMinimum", 0}}},
                               {"description", {{"type", "string"}}}, {"notes", json::object()}}},
               {"required", {"distribution"}},
               {"additionalProperties", false}};
  json corr = {{"type", "object"},
               {"properties", {{"between", {{"type", "array"}, {"items", {{"type", "string"}}}, {"minItems", 2}, {"maxItems", 2}}},
                               {"coefficient", {{"type", "number"}, {"exclusiveMinimum", -1}, {"exclusiveMaximum", 1}}},
                               {"description", {{"type", "string"}}}, {"notes", json::object()}}},
               {"required", {"between", "coefficient"}},
               {"additionalProperties", false}};
  return {{"type", "object"},
          {"description", "the scatter of parameters for `loopwright spread`: \"loop/component.parameter\", "
                          "\"coupling.conductance\" or \"fluid.kv40\" / \"fluid.kv100\" of an oil"},
          {"properties", {{"parameters", {{"type", "object"}, {"additionalProperties", dist}}},
                          {"correlations", {{"type", "array"}, {"items", corr}}},
                          {"description", {{"type", "string"}}}, {"notes", json::object()}}},
          {"required", {"parameters"}},
          {"additionalProperties", false}};
}

// An object schema with `props` (descriptions and notes allowed), the keys
// `required` and nothing else.
json Closed(json props, const std::vector<std::string>& required, const std::string& description) {
  props["description"] = {{"type", "string"}};
  props["notes"] = json::object();
  return {{"type", "object"}, {"description", description}, {"properties", props}, {"required", required},
          {"additionalProperties", false}};
}

// "thermal_masses" (network/case/transient_spec.h).
json ThermalMassSchema() {
  const json to_fluid = Closed(
      {{"node", {{"type", "string"}, {"description", "\"loop/node\" whose liquid the mass exchanges heat with"}}},
       {"conductance", Quantity(Dimension::kConductance, "UA to the liquid (at rated_flow when flow_of is given)", false)},
       {"flow_of", {{"type", "string"}, {"description", "\"loop/component\" whose flow the forced convection follows"}}},
       {"rated_flow", Quantity(Dimension::kVolumeFlow, "flow at which UA = conductance", false)},
       {"exponent", Quantity(Dimension::kDimensionless, "UA ~ flow^exponent (0.8 turbulent, Dittus-Boelter; 1/3 laminar)", false)},
       {"natural", Quantity(Dimension::kConductance, "natural-convection UA left at zero flow", false)}},
      {"node", "conductance"}, "a heat path from the mass to the liquid at a node");
  const json to_masses = Closed({{"mass", {{"type", "string"}, {"description", "id of the other thermal mass"}}},
                                 {"conductance", Quantity(Dimension::kConductance, "conductance between the masses", false)}},
                                {"mass", "conductance"}, "a heat path between two masses");
  const json ambient = Closed(
      {{"conductance", Quantity(Dimension::kConductance, "convective UA to the surroundings", false)},
       {"area", Quantity(Dimension::kArea, "radiating area", false)},
       {"emissivity", Quantity(Dimension::kDimensionless, "grey-body emissivity (0..1)", false)},
       {"temperature", Quantity(Dimension::kTemperature, "temperature of the surroundings (default 20 degC)", true)}},
      {}, "heat lost to the surroundings: convection and radiation");
  return Closed({{"id", {{"$ref", "#/$defs/id"}}},
                 {"mass", Quantity(Dimension::kMass, "mass of the solid", false)},
                 {"specific_heat", Quantity(Dimension::kSpecificHeat, "specific heat of the solid", false)},
                 {"initial_temperature", Quantity(Dimension::kTemperature, "temperature at t = 0 (default: from the scenario's start)", false)},
                 {"heat", Quantity(Dimension::kPower, "heat into the mass (a scenario varies it through a variable)", true)},
                 {"ambient", ambient},
                 {"to_fluid", {{"type", "array"}, {"items", to_fluid}}},
                 {"to_masses", {{"type", "array"}, {"items", to_masses}}},
                 {"checks", Closed({{"coking_temperature_max",
                                     Quantity(Dimension::kTemperature, "this mass's own coking limit (simulate)", false)}},
                                   {}, "limits of the checks through time on this mass")}},
                {"id", "mass", "specific_heat"}, "a lumped solid (a bearing housing, a turbine casing) for `simulate`");
}

// "scenarios" (network/case/transient_spec.h).
json ScenarioSchema() {
  const json event = Closed(
      {{"name", {{"type", "string"}}},
       {"at", Quantity(Dimension::kTime, "time the change starts", false)},
       {"ramp", Quantity(Dimension::kTime, "duration of a linear change (default 0: a step)", false)},
       {"set", {{"type", "object"},
                {"description", "new values: an envelope variable, or \"loop/component/parameter\", to a quantity"},
                {"additionalProperties", {{"anyOf", json::array({{{"type", "number"}}, {{"type", "string"}}})}}}}}},
      {"at", "set"}, "a timed change of inputs");
  const json start = Closed(
      {{"point", {{"type", "string"}, {"description", "envelope point giving the inputs at t = 0 (default: the first)"}}},
       {"temperature", Quantity(Dimension::kTemperature, "uniform start temperature (default: the point's steady answer)", false)},
       {"set", {{"type", "object"},
                {"description", "inputs of the start that differ from the point's: an envelope variable, or "
                                "\"loop/component/parameter\", to a quantity"}}}},
      {}, "the state at t = 0");
  return Closed({{"id", {{"$ref", "#/$defs/id"}}},
                 {"start", start},
                 {"end", Quantity(Dimension::kTime, "end time", false)},
                 {"output_interval", Quantity(Dimension::kTime, "output interval (default end/200)", false)},
                 {"events", {{"type", "array"}, {"items", event}}},
                 {"watch", {{"type", "array"}, {"items", {{"type", "string"}, {"description", "thermal mass id or \"loop/node\""}}}}}},
                {"id", "end"}, "a named sequence of timed events for `simulate`");
}

json SchemaDefs() {
  json defs;
  defs["id"] = {{"type", "string"}, {"pattern", "^[A-Za-z0-9_.-]{1,64}$"}};
  defs["quantity"] = Quantity(Dimension::kDimensionless, "a number or \"value unit\" string", true);
  defs["fluid"] = FluidSchema();
  defs["node"] = NodeSchema();
  AddComponentSchemas(&defs);
  defs["loop"] = LoopSchema();
  defs["coupling"] = CouplingSchema();
  defs["envelope"] = EnvelopeSchema();
  defs["checks"] = ChecksSchema();
  defs["design"] = DesignSchema();
  defs["thermal_mass"] = ThermalMassSchema();
  defs["scenario"] = ScenarioSchema();
  return defs;
}

}  // namespace

json CaseSchema() {
  json defs = SchemaDefs();
  json schema = {
      {"$schema", "https://json-schema.org/draft/2020-12/schema"},
      {"$id", "case.schema.json"},
      {"title", "loopwright case file"},
      {"description", "An oil/coolant loop of pressure-fed bearings: fluids, loops of nodes and components, couplings, "
                      "envelope, checks and design questions. Comments (//) are allowed by loopwright; strip them "
                      "before validating with a generic JSON Schema tool."},
      {"type", "object"},
      {"properties",
       {{"$schema", {{"type", "string"}}},
        {"name", {{"type", "string"}, {"minLength", 1}}},
        {"description", {{"type", "string"}}},
        {"notes", json::object()},
        {"ambient_pressure", Quantity(Dimension::kPressureDifference, "absolute ambient pressure", false)},
        {"thermal", {{"type", "boolean"}, {"description", "solve temperatures with the hydraulics (energy balance at every node)"}}},
        {"work_heat", {{"type", "boolean"}, {"default", true},
                       {"description", "pump losses and the dissipation of every pressure drop heat the liquid (default true); "
                                       "false leaves them out of the energy balance, as a hand calculation does (still reported)"}}},
        {"fluids", {{"type", "object"}, {"minProperties", 1}, {"additionalProperties", {{"$ref", "#/$defs/fluid"}}}}},
        {"loops", {{"type", "array"}, {"minItems", 1}, {"items", {{"$ref", "#/$defs/loop"}}}}},
        {"couplings", {{"type", "array"}, {"items", {{"$ref", "#/$defs/coupling"}}}}},
        {"envelope", {{"$ref", "#/$defs/envelope"}}},
        {"checks", {{"$ref", "#/$defs/checks"}}},
        {"design", {{"$ref", "#/$defs/design"}}},
        {"knobs", KnobsSchema()},
        {"tolerances", TolerancesSchema()},
        {"thermal_masses", {{"type", "array"}, {"items", {{"$ref", "#/$defs/thermal_mass"}}}}},
        {"scenarios", {{"type", "array"}, {"items", {{"$ref", "#/$defs/scenario"}}}}}}},
      {"required", {"name", "fluids", "loops"}},
      {"additionalProperties", false},
      {"$defs", defs}};
  return schema;
}

}  // namespace loopwright
