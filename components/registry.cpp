#include "components/registry.h"

#include "components/air_cooler.h"
#include "components/back_pressure_regulator.h"
#include "components/centrifugal_pump.h"
#include "components/check_valve.h"
#include "components/datasheet_loss.h"
#include "components/displacement_pump.h"
#include "components/filter.h"
#include "components/floating_ring_bearing.h"
#include "components/fixed_flow.h"
#include "components/gravity_drain.h"
#include "components/journal_bearing.h"
#include "components/orifice.h"
#include "components/pipe.h"
#include "components/pressure_reducing_valve.h"
#include "components/relief_valve.h"
#include "components/rolling_bearing.h"
#include "components/scavenge_pump.h"
#include "components/thermostatic_valve.h"
#include "components/valve.h"

namespace loopwright {

ParamSpec Num(std::string name, Dimension dim, std::string description, bool required, double default_si) {
  ParamSpec s;
  s.name = std::move(name);
  s.dim = dim;
  s.description = std::move(description);
  s.required = required;
  s.default_si = default_si;
  return s;
}

ParamSpec Positive(std::string name, Dimension dim, std::string description, bool required, double default_si) {
  ParamSpec s = Num(std::move(name), dim, std::move(description), required, default_si);
  s.min_si = 0;
  s.min_exclusive = true;
  return s;
}

ParamSpec Choice(std::string name, std::vector<std::string> choices, std::string description, int default_index) {
  ParamSpec s;
  s.name = std::move(name);
  s.kind = ParamKind::kChoice;
  s.choices = std::move(choices);
  s.description = std::move(description);
  s.default_si = default_index;
  s.bindable = false;
  return s;
}

ParamSpec NameList(std::string name, std::vector<std::string> choices, std::string description) {
  ParamSpec s;
  s.name = std::move(name);
  s.kind = ParamKind::kNameList;
  s.choices = std::move(choices);
  s.description = std::move(description);
  s.bindable = false;
  return s;
}

ParamSpec Table(std::string name, std::vector<TableColumn> columns, size_t min_rows, std::string description,
                bool required) {
  ParamSpec s;
  s.name = std::move(name);
  s.kind = ParamKind::kTable;
  s.columns = std::move(columns);
  s.min_rows = min_rows;
  s.description = std::move(description);
  s.required = required;
  s.bindable = false;
  return s;
}

ParamSpec ParamSpec::Min(double lo, bool exclusive) const {
  ParamSpec s = *this;
  s.min_si = lo;
  s.min_exclusive = exclusive;
  return s;
}

ParamSpec ParamSpec::Max(double hi) const {
  ParamSpec s = *this;
  s.max_si = hi;
  return s;
}

ParamSpec ParamSpec::Range(double lo, double hi, bool lo_exclusive) const { return Min(lo, lo_exclusive).Max(hi); }

ParamSpec ParamSpec::Knob(double lo, double hi) const {
  ParamSpec s = *this;
  s.knob = true;
  s.knob_min_si = lo;
  s.knob_max_si = hi;
  return s;
}

const ParamSpec& ComponentType::Param(const std::string& pname) const {
  const int i = ParamIndex(pname);
  if (i < 0) throw std::logic_error("component type " + name + " has no parameter \"" + pname + "\"");
  return params[i];
}

ParamSpec& ComponentType::Param(const std::string& pname) {
  return const_cast<ParamSpec&>(static_cast<const ComponentType&>(*this).Param(pname));
}

const std::vector<ComponentType>& ComponentTypes() {
  static const std::vector<ComponentType> types = [] {
    std::vector<ComponentType> t;
    // Roughness defaults: commercial steel 45 um, drawn tubing 1.5 um (Moody
    // 1944; Crane TP-410, from memory); smooth hose liner 5 um (common practice).
    t.push_back(PipeType("pipe", 45e-6, "straight pipe: Darcy-Weisbach friction and fitting losses"));
    t.push_back(PipeType("tube", 1.5e-6, "drawn tube: as pipe, smooth-wall default roughness"));
    t.push_back(PipeType("hose", 5e-6, "hose: as pipe, smooth-liner default roughness"));
    t.push_back(DisplacementPumpType());
    t.push_back(CentrifugalPumpType());
    t.push_back(FilterType());
    t.push_back(ValveType());
    t.push_back(ReliefValveType());
    t.push_back(BackPressureRegulatorType());
    t.push_back(PressureReducingValveType());
    t.push_back(CheckValveType());
    t.push_back(OrificeType());
    t.push_back(DatasheetLossType());
    t.push_back(AirCoolerType());
    t.push_back(JournalBearingType());
    t.push_back(FloatingRingBearingType());
    t.push_back(RollingBearingType());
    t.push_back(FixedFlowType());
    t.push_back(GravityDrainType());
    t.push_back(ScavengePumpType());
    t.push_back(ThermostaticValveType());
    return t;
  }();
  return types;
}

const ComponentType* FindComponentType(const std::string& name) {
  for (const auto& t : ComponentTypes())
    if (t.name == name) return &t;
  return nullptr;
}

std::vector<std::string> ComponentTypeNames() {
  std::vector<std::string> n;
  for (const auto& t : ComponentTypes()) n.push_back(t.name);
  return n;
}

}  // namespace loopwright
