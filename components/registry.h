// The registry of component types: the single source of type names and
// parameter specifications. The case loader and validator read parameters by
// it, the JSON Schema (cases/case.schema.json) is generated from it and a test
// checks the shipped schema against it, and the network builds components
// through it.
#pragma once

#include <cmath>
#include <functional>
#include <limits>
#include <memory>
#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

#include "components/component.h"
#include "library/units.h"

namespace loopwright {

// kNameList: an array of names from `choices` (stored in tables as rows
// holding one index each).
enum class ParamKind { kNumber, kChoice, kTable, kBool, kNameList };

inline constexpr double kNoValue = std::numeric_limits<double>::quiet_NaN();
inline constexpr double kInf = std::numeric_limits<double>::infinity();

struct TableColumn {
  std::string name;
  Dimension dim;
};

struct ParamSpec {
  std::string name;
  ParamKind kind = ParamKind::kNumber;
  Dimension dim = Dimension::kDimensionless;
  bool required = false;
  double default_si = kNoValue;  // NaN: optional and absent unless given
  double min_si = -kInf;         // accepted input range (what the model can take)
  double max_si = kInf;
  bool min_exclusive = false;    // min_si itself is not accepted (sizes > 0)
  std::vector<std::string> choices;  // kChoice: valid names; value = index
  std::vector<TableColumn> columns;  // kTable: columns of each row
  size_t min_rows = 0;               // kTable: fewest rows
  std::string description;
  bool bindable = true;  // may be bound to an envelope variable
  // A design knob: sizing, fix suggestions and sensitivities may change this
  // parameter of a component whose case gives it a value and does not bind
  // it (network/envelope/sensitivity.h DesignKnobs). knob_min_si and
  // knob_max_si are the sensible bounds of that search in SI; NaN means the
  // accepted range min_si .. max_si.
  bool knob = false;
  double knob_min_si = kNoValue;
  double knob_max_si = kNoValue;

  // Concise setters for the spec lists of the component files, e.g.
  // Num("opening", ...).Range(0, 1).Knob(). Each returns a changed copy.
  ParamSpec Min(double lo, bool exclusive = false) const;
  ParamSpec Max(double hi) const;
  ParamSpec Range(double lo, double hi, bool lo_exclusive = false) const;
  ParamSpec Knob(double lo = kNoValue, double hi = kNoValue) const;
  // The knob's search bounds: knob_min_si/knob_max_si, else min_si/max_si.
  double KnobMin() const { return std::isnan(knob_min_si) ? min_si : knob_min_si; }
  double KnobMax() const { return std::isnan(knob_max_si) ? max_si : knob_max_si; }
};

// Parameter values as read from a case, in the order of the type's specs.
struct ParamValues {
  std::vector<double> values;                          // NaN = absent
  std::vector<std::vector<std::vector<double>>> tables;  // per spec (kTable only)
};

// An error found by a factory, naming the parameter it concerns.
struct ParamError {
  std::string param;  // spec name ("" = the component as a whole)
  std::string message;
};

using ComponentFactory = std::function<std::unique_ptr<Component>(
    const ParamValues&, std::vector<ParamError>*)>;

// Roles a component can play, used by checks and reports.
enum ComponentRole : unsigned {
  kRoleNone = 0,
  kRolePump = 1u << 0,
  kRoleBearing = 1u << 1,
  kRoleFilter = 1u << 2,
  kRoleReliefValve = 1u << 3,
  kRoleLine = 1u << 4,
  kRoleValve = 1u << 5,
  kRoleBoundaryFlow = 1u << 6,
  kRoleHeatExchanger = 1u << 7,
  kRoleRegulator = 1u << 8,  // a valve meant to be open, holding a pressure (regulator_authority)
  kRoleDrain = 1u << 9,      // a gravity drain from a cavity (drain_capacity_margin, housing_drained)
  kRoleThermostat = 1u << 10,  // a path of a wax-element valve: senses a node's temperature (thermostat_travel)
};

// The roles of every type whose model may impose its flow
// (Component::MayFixFlow: a fixed flow, a displacement pump without slip):
// a reader looking for such models skips every other type without reading
// its model (tests/components/component_properties_test.cpp holds every
// registered type to it).
inline constexpr unsigned kFlowFixerRoles = kRolePump | kRoleBoundaryFlow;

struct ComponentType {
  std::string name;     // JSON "type"
  std::string summary;  // one line, for `library` and the schema
  unsigned roles = kRoleNone;
  std::vector<ParamSpec> params;
  ComponentFactory make;

  int ParamIndex(std::string_view pname) const {
    for (size_t i = 0; i < params.size(); ++i)
      if (params[i].name == pname) return static_cast<int>(i);
    return -1;
  }
  // The spec named `pname`, for setting a limit or a description by name in
  // a type's factory function. A name the type does not have throws
  // std::logic_error naming the type and the parameter, so a misspelt name
  // fails when the registry is first built (at startup, in every test).
  ParamSpec& Param(const std::string& pname);
  const ParamSpec& Param(const std::string& pname) const;
};

// All component types, in a stable order.
const std::vector<ComponentType>& ComponentTypes();
// The type with this name, or nullptr.
const ComponentType* FindComponentType(const std::string& name);
std::vector<std::string> ComponentTypeNames();

// Helpers for building specs concisely.
ParamSpec Num(std::string name, Dimension dim, std::string description,
              bool required = true, double default_si = kNoValue);
ParamSpec Positive(std::string name, Dimension dim, std::string description,
                   bool required = true, double default_si = kNoValue);
ParamSpec Choice(std::string name, std::vector<std::string> choices,
                 std::string description, int default_index = 0);
ParamSpec NameList(std::string name, std::vector<std::string> choices, std::string description);
ParamSpec Table(std::string name, std::vector<TableColumn> columns,
                size_t min_rows, std::string description, bool required = true);

}  // namespace loopwright
