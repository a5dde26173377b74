// The case: a loop description read from a JSON case file and validated.
//
// LoadCase() reads the bytes, parses JSON (with // and /* */ comments),
// checks every field against the component registry and the units parser,
// resolves fluids and library parts, checks the topology, and returns either a
// Case or every problem found, each with its JSON Pointer.
//
// Size limits (documented in README): file at most 8 MiB by default (the CLI's
// --max-case-size and the `max_bytes` arguments raise it), nesting at most 64
// levels, at most 10,000,000 components in all (a plant-wide header of 10^6
// bearings holds 3 * 10^6); beyond them the input is refused.
#pragma once

#include <cstdint>
#include <limits>
#include <stdexcept>
#include <map>
#include <set>
#include <algorithm>
#include <memory>
#include <unordered_map>
#include <string>
#include <string_view>
#include <vector>

#include <nlohmann/json.hpp>

#include "components/component.h"
#include "components/model_arena.h"
#include "components/registry.h"
#include "library/fluid.h"
#include "library/oil.h"
#include "network/case/check_table.h"
#include "network/case/diagnostics.h"
#include "network/case/knobs.h"
#include "network/case/tolerances.h"
#include "network/case/transient_spec.h"

namespace loopwright {

inline constexpr size_t kMaxCaseBytes = 8u << 20;
inline constexpr int kMaxCaseDepth = 64;
inline constexpr size_t kMaxComponents = 10000000;

enum class BoundaryKind { kNone, kReservoir, kTank, kPressure };

// A value that is a constant, or bound to an envelope variable ("$name").
struct Binding {
  int param = -1;     // index in the component's params (or -1)
  int variable = -1;  // index in Envelope::variables
};

// Ids to indices without a copy of the ids: an open-addressing table (at
// most half full) of 4-byte slots into the caller's elements, whose ids it
// compares through `id_of(index)`. Finding or adding an id costs O(1) on
// average. A slot holds the index in its low bits (a table of 2^k slots
// holds fewer than 2^(k-1) ids) and, above them, a tag of the id's hash that
// the slot's position did not use: a probe whose tag differs skips the
// element without reading its id. In a plant-size case the elements (10^6
// nodes, 3 x 10^6 components) lie far beyond the caches, and each such read
// was a cache and TLB miss (DEVELOPERS.md, "Loading in linear time").
class IdTable {
 public:
  template <class IdOf>
  int Find(std::string_view id, IdOf id_of) const {
    if (slots_.empty()) return -1;
    const size_t h = Hash(id), mask = slots_.size() - 1;
    const uint32_t tag = Tag(h);
    for (size_t i = h & mask;; i = (i + 1) & mask) {
      const uint32_t s = slots_[i];
      if (s == kEmpty) return -1;
      if ((s & ~index_mask_) == tag && id_of(static_cast<int>(s & index_mask_)) == id)
        return static_cast<int>(s & index_mask_);
    }
  }
  // Adds `index` under `id` unless the id is there already (false then).
  template <class IdOf>
  bool Add(std::string_view id, int index, IdOf id_of) {
    // Indices below half the slots (a repeated id's element is not added,
    // so an index may exceed the count).
    const size_t need = 2 * std::max(count_ + 1, static_cast<size_t>(index) + 1);
    if (need > slots_.size()) Grow(need, id_of);
    const size_t h = Hash(id), mask = slots_.size() - 1;
    const uint32_t tag = Tag(h);
    size_t i = h & mask;
    for (; slots_[i] != kEmpty; i = (i + 1) & mask)
      if ((slots_[i] & ~index_mask_) == tag && id_of(static_cast<int>(slots_[i] & index_mask_)) == id) return false;
    slots_[i] = tag | static_cast<uint32_t>(index);
    ++count_;
    return true;
  }
  // Room for ids of indices below n without rehashing.
  template <class IdOf>
  void Reserve(size_t n, IdOf id_of) {
    if (2 * n > slots_.size()) Grow(2 * n, id_of);
  }
  size_t size() const { return count_; }
  // Starts reading the slot a lookup of `id` reads first. A plant-size
  // table lies far beyond the caches: a reader that will look up several ids
  // asks for their slots together, so that the misses overlap.
  void Prefetch(std::string_view id) const {
    if (slots_.empty()) return;
    const uint32_t* slot = &slots_[Hash(id) & (slots_.size() - 1)];
#if defined(__x86_64__) || defined(__i386__)
    // g++ 12 drops a __builtin_prefetch whose address only a loop (the
    // hash) computes; an asm statement stays.
    asm volatile("prefetcht0 %0" : : "m"(*slot));
#else
    __builtin_prefetch(slot);
#endif
  }

 private:
  static constexpr uint32_t kEmpty = 0xFFFFFFFFu;  // never a slot: an index is below half the slots
  // FNV-1a over the bytes (ids are short: inline, no call), its high bits
  // folded into the low ones that pick the slot.
  static size_t Hash(std::string_view id) {
    uint64_t h = 14695981039346656037ull;
    for (const char ch : id) h = (h ^ static_cast<unsigned char>(ch)) * 1099511628211ull;
    return static_cast<size_t>(h ^ (h >> 29));
  }
  // The hash's top bits above the index bits (the position uses its low bits).
  uint32_t Tag(size_t h) const { return static_cast<uint32_t>(h >> 32) & ~index_mask_; }
  template <class IdOf>
  void Grow(size_t min_slots, IdOf id_of) {
    size_t n = 16;
    while (n < min_slots) n *= 2;
    if (n > (size_t(1) << 31)) throw std::length_error("IdTable: more than 2^30 ids");
    std::vector<uint32_t> old = std::move(slots_);
    const uint32_t old_mask = index_mask_;
    slots_.assign(n, kEmpty);
    index_mask_ = static_cast<uint32_t>(n - 1);
    for (uint32_t s : old) {
      if (s == kEmpty) continue;
      const int index = static_cast<int>(s & old_mask);
      const size_t h = Hash(id_of(index));
      size_t i = h & (n - 1);
      while (slots_[i] != kEmpty) i = (i + 1) & (n - 1);
      slots_[i] = Tag(h) | static_cast<uint32_t>(index);
    }
  }
  std::vector<uint32_t> slots_;
  uint32_t index_mask_ = 0;  // the index bits of a slot (slots_.size() - 1)
  size_t count_ = 0;
};

// What a node may hold beyond a plain junction: a boundary's or reservoir's
// pressure, level, temperature and heat data, a heat input, and the
// envelope variables they follow. Kept apart from NodeSpec (NodeSpec::cond)
// because a plant-size case's nodes are nearly all plain.
struct NodeConditions {
  double surface_pressure = 0;  // gauge [Pa] at the free surface / in the tank
  double level = 0;             // liquid level above the node [m]
  double temperature = kNoValue;  // fixed boundary temperature [K] when given
  double heat = 0;                // heat input into the liquid at this node [W]
  double loss_conductance = 0;    // reservoir heat loss to ambient [W/K]
  double ambient_temperature = 298.15;  // [K]
  int pressure_variable = -1;   // surface pressure bound to an envelope variable
  int temperature_variable = -1;
  int heat_variable = -1;
  int drains_to = -1;             // boundary whose inflow drains into this reservoir (node index)
  int ambient_variable = -1;
};

struct NodeSpec {
  std::string id;
  int index = -1;  // position in the loop's "nodes" array (its pointer: LoopSpec::NodePointer)
  // Liquid held at the node itself [m3] ("volume": a reservoir's contents, a
  // cavity; `simulate` only). A float in the padding after `index`: cases of
  // 10^6 bearings keep their size per node.
  float volume = 0;
  double elevation = 0;  // [m]
  BoundaryKind boundary = BoundaryKind::kNone;
  int check_limits = -1;  // its own limits ("checks"): an index in Case::placed_checks, -1 none

  NodeSpec() = default;
  NodeSpec(NodeSpec&&) noexcept = default;
  NodeSpec& operator=(NodeSpec&&) noexcept = default;
  NodeSpec(const NodeSpec& o) : id(o.id), index(o.index), volume(o.volume), elevation(o.elevation),
      boundary(o.boundary), check_limits(o.check_limits), cond_(o.cond_ ? new NodeConditions(*o.cond_) : nullptr) {}
  NodeSpec& operator=(const NodeSpec& o) {
    if (this != &o) *this = NodeSpec(o);
    return *this;
  }
  // Its conditions (a plain node's: the defaults, shared).
  const NodeConditions& cond() const { return cond_ ? *cond_ : Plain(); }
  // Its conditions to write (made on first use: only a node that has any).
  NodeConditions& set_cond() {
    if (!cond_) cond_.reset(new NodeConditions());
    return *cond_;
  }

 private:
  static const NodeConditions& Plain() {
    static const NodeConditions plain;
    return plain;
  }
  std::unique_ptr<NodeConditions> cond_;
};
static_assert(sizeof(NodeSpec) <= sizeof(std::string) + 32, "a plain node's fields, its conditions apart");

// What a few components hold beyond the common fields: envelope variables,
// a library part, a bearing's own feed margin, a thermostat's sensed node.
// Kept apart from ComponentSpec (read through its accessors, written through
// ComponentSpec::extras) because a plant-size case's components hold none.
struct ComponentExtras {
  std::string_view part;   // library part id, if any: a view of LoopSpec::part_ids
  std::vector<Binding> bindings;
  double housing_margin = kNoValue;  // per-bearing override of the feed margin (as read; in force through check_limits)
  int sensed_node = -1;  // a thermostatic valve's "sensed_node" (node index in the loop; default its from node)
};

struct ComponentSpec {
  std::string id;
  int index = -1;  // position in the loop's "components" array (LoopSpec::ComponentPointer)
  // Liquid held inside [m3] ("volume"; NaN: a line's bore x length, else
  // none; `simulate` only). A float in the padding after `index`.
  float volume = std::numeric_limits<float>::quiet_NaN();
  const ComponentType* type_info = nullptr;
  int from = -1, to = -1;  // node indices in the loop
  // Built by the registry factory; read-only once loaded (a solver works on
  // its own clones: network/point/point_state.h). A loaded case's models lie
  // in their loop's arena (LoopSpec::models); one made otherwise on the heap.
  ModelPtr model;
  int check_limits = -1;  // its own limits ("checks", feed_margin): an index in Case::placed_checks, -1 none

  // Its type's registry name (empty while the type is unknown): read from
  // type_info, not held per component (16 B, 48 B per header bearing).
  std::string_view type() const { return type_info ? std::string_view(type_info->name) : std::string_view(); }
  std::string_view part() const { return Extras().part; }
  const std::vector<Binding>& bindings() const { return Extras().bindings; }
  double housing_margin() const { return Extras().housing_margin; }
  int sensed_node() const { return Extras().sensed_node; }
  // The extras to write (made on first use: only a component that has any).
  ComponentExtras& extras() {
    if (!extras_) extras_ = std::make_unique<ComponentExtras>();
    return *extras_;
  }

 private:
  const ComponentExtras& Extras() const {
    static const ComponentExtras none;
    return extras_ ? *extras_ : none;
  }
  std::unique_ptr<ComponentExtras> extras_;
};

struct LoopSpec {
  std::string id;
  std::string pointer;
  std::string fluid_id;
  FluidPtr fluid;
  double temperature = 313.15;  // isothermal temperature [K] (until thermal coupling)
  int temperature_variable = -1;
  std::vector<NodeSpec> nodes;
  // The storage of its components' models (declared before them: it must
  // outlive them).
  ModelArena models;
  std::vector<ComponentSpec> components;
  // The library part ids its components name, once each (ComponentSpec::part
  // views them; a set's strings stay in place when the loop moves).
  std::set<std::string, std::less<>> part_ids;
  // Index look-ups by id (kept by the loader as it adds nodes and
  // components; the first of a repeated id is kept).
  IdTable node_lookup;
  IdTable component_lookup;
  int check_limits = -1;  // the loop's limits ("checks"): an index in Case::placed_checks, -1 none
  int NodeIndex(const std::string& id) const;
  int ComponentIndex(const std::string& id) const;
  // JSON Pointers of a node and a component: "/loops/0/nodes/3".
  std::string NodePointer(const NodeSpec& n) const;
  std::string ComponentPointer(const ComponentSpec& c) const;
};

struct Variable {
  std::string name;
  Dimension dim;
  double default_si;
  // Which side of the variable's range is the severe one, for the derived
  // hot corner: true when its lowest declared value is (a fan's running
  // fraction, a pump speed that starves the feed).
  bool severe_low = false;
};

struct OperatingPoint {
  std::string name;
  std::vector<double> values;  // one per variable, SI
  // Solve at the loop temperatures without the energy balance (a cold
  // start: oil at ambient before it has warmed), even in a thermal case.
  bool isothermal = false;
  double loop_temperature = kNoValue;  // when set: every loop at this temperature (derived cold start)
  // The value of variable `var` at this point, or `fixed` when not bound.
  double ValueOr(int var, double fixed) const {
    return var >= 0 && var < static_cast<int>(values.size()) ? values[var] : fixed;
  }
};

struct Envelope {
  std::vector<Variable> variables;
  std::vector<OperatingPoint> points;  // named points then grid points, expanded
  // Variables declared with an error (already reported): references to them
  // are not reported again as unknown.
  std::vector<std::string> invalid_variables;
  int VariableIndex(const std::string& name) const;
  bool IsInvalidVariable(const std::string& name) const {
    return std::find(invalid_variables.begin(), invalid_variables.end(), name) != invalid_variables.end();
  }
};

// An oil whose KV40 and/or KV100 follow envelope variables (an oil grade
// swept over the envelope). The case's oil is never re-anchored: each
// point's state gives the anchors and the solver uses an oil made from
// them (network/point/point_state.h).
struct FluidBinding {
  std::string fluid_id;
  std::shared_ptr<const OilFluid> oil;
  double kv40 = 0, kv100 = 0;       // as given (SI), used where not bound
  int kv40_var = -1, kv100_var = -1;
};

// A liquid-to-liquid heat exchanger between two loops ("couplings"), typed
// at load: both sides resolved to (loop, component) indices.
struct Coupling {
  std::string id;
  std::string pointer;       // "/couplings/i"
  int arrangement = 0;       // index in HeatExchangerArrangements()
  int hot_loop = -1, hot_comp = -1;    // the hot side's component
  int cold_loop = -1, cold_comp = -1;  // the cold side's component
  std::string hot_ref, cold_ref;       // "loop/component" as written
  double conductance = 0;              // UA [W/K] > 0
};

// What the checks need of one component, so that the per-point evaluation
// builds no names and searches no parameter by name.
// Its place ("loop/component") is made from the ids when an outcome is
// named (network/envelope/checks.cpp), not held: 24 bytes a component.
struct CheckSite {
  int flow_min = -1, flow_max = -1;    // a bearing's parameter indices (-1: none)
  int diameter = -1;                   // a line's diameter parameter (-1: none)
  CheckId velocity = CheckId::kCount;  // a line's velocity limit (kCount: not a line)
  bool coolant_pump = false;           // a pump of a loop whose fluid can boil (jacket_flow_min)
};

// The flow arrangements a coupling may name (network/case/case_sections.cpp).
const std::vector<std::string>& HeatExchangerArrangements();

// Design questions ("design": [...]), typed at load (network/case/case_sections.cpp);
// network/design/sizing.h says what each kind asks.
enum class DesignKind {
  kCoolerConductance,
  kCoolerSize,
  kBypassOpening,
  kReliefSetting,
  kRestrictorDiameter,
  kPumpDisplacement,
  kPumpSpeed,
  kPumpChoice,
  kLineSize,
};

// A library part that may replace a question's component: the component as
// the case writes it, switched to the part (its parameters over the
// component's own, as "part": id would read), built by the registry factory
// at load. `error` says why it cannot (then `model` is null).
struct PartCandidate {
  std::string id;
  std::string error;
  const ComponentType* type_info = nullptr;
  std::shared_ptr<const Component> model;
  std::vector<Binding> bindings;  // envelope variables the component binds, by the part type's indices
};

struct DesignQuestion {
  std::string id;
  DesignKind kind = DesignKind::kCoolerConductance;
  std::string kind_name;   // as written ("cooler_conductance")
  std::string component;   // "loop/component" as written
  int loop = -1, comp = -1;
  double min = kNoValue, max = kNoValue;  // bounds (SI), NaN where not given
  double target = kNoValue;               // restrictor_diameter: the flow [m3/s]
  std::string point;                      // where a target applies ("" = the first point)
  std::vector<PartCandidate> candidates;  // pump_choice, line_size, cooler_size
};

struct Case {
  std::string name;
  std::string description;
  std::string path;        // the file it came from
  double ambient_pa = 101325.0;  // absolute ambient pressure [Pa]
  bool thermal = false;          // solve temperatures (energy balance) with the hydraulics
  // Work heat (pump losses, dissipation Q dp of every drop) heats the liquid;
  // false leaves it out of the energy balance, as a hand calculation does.
  bool work_heat = true;
  std::map<std::string, FluidPtr> fluids;
  std::vector<FluidBinding> fluid_bindings;
  std::vector<LoopSpec> loops;
  Envelope envelope;
  std::vector<Coupling> couplings;  // typed at load, used by the thermal solve and the checks
  // The limits in force (network/case/check_table.h): the case's "checks"
  // over the defaults, read once at load with this case's ambient pressure.
  CheckLimits checks = DefaultCheckLimits(101325.0);
  // The limits set on loops, components and nodes (only those set; the rest
  // kNone), one entry per object that sets any, indexed by its check_limits.
  // The most specific wins: LimitAt (network/envelope/checks.h).
  std::vector<CheckLimits> placed_checks;
  std::vector<DesignQuestion> design;
  KnobPolicy knobs;  // what the fix search and sizing may move (network/case/knobs.h)
  ToleranceSet tolerances;  // the scatter of parameters (network/case/tolerances.h)
  // Through time (network/case/transient_spec.h; `simulate` only).
  std::vector<ThermalMass> masses;
  std::vector<Scenario> scenarios;
};

// The check site of component (loop, comp) as a component of `type` (a part
// swapped in by sizing may change the type, and so the parameter indices).
// Made when read, per branch and point (network/envelope/checks.cpp): from
// its type's parameter indices (found once per type) and its ends' kinds, so
// a plant-size case holds no site per component.
CheckSite CheckSiteFor(const Case& cs, int loop, int comp, const ComponentType* type);

struct LoadResult {
  std::unique_ptr<Case> value;  // null when there are errors
  Diagnostics diagnostics;
};

// Parses and validates a case from its text. `path` names it in messages and
// sets the folder part references may resolve in; `library_dir` is the parts
// library (library/parts lives below it).
LoadResult LoadCaseText(const std::string& text, const std::string& path,
                        const std::string& library_dir, size_t max_bytes = kMaxCaseBytes);
LoadResult LoadCaseFile(const std::string& path, const std::string& library_dir,
                        size_t max_bytes = kMaxCaseBytes);
// A case-size limit written with a unit: "64 MiB", "1.5GiB", "500 kB" (B, kB,
// MB, GB powers of 1000; KiB, MiB, GiB powers of 1024). False, with what was
// wrong in `error`, for a missing or unknown unit, or a size outside
// 1 KiB ... 1 TiB.
bool ParseByteSize(const std::string& text, size_t* bytes, std::string* error);
// How many case texts LoadCaseText has read in this process (for tests: a
// sweep, sizing or fix search reads none).
size_t CaseTextsRead();

// The folder holding library/parts, from LOOPWRIGHT_LIBRARY env or the build's
// source tree.
std::string DefaultLibraryDir();

// Parses JSON text with comments, enforcing the depth and size limits; on
// failure adds a diagnostic with line and column and returns false.
bool ParseJsonText(const std::string& text, nlohmann::json* out, Diagnostics* diag,
                   size_t max_bytes = kMaxCaseBytes);
// How many parser events (values, keys, opening and closing brackets)
// ParseJsonText has handled in this process (for tests: the work of parsing
// grows linearly with the text).
size_t JsonEventsParsed();

}  // namespace loopwright
