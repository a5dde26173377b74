// Internal to the case loader: state shared by the section readers.
#pragma once

#include <array>
#include <cstdint>
#include <map>
#include <string>
#include <string_view>
#include <unordered_map>
#include <utility>
#include <vector>

#include <nlohmann/json.hpp>

#include "library/parts.h"
#include "library/units.h"
#include "network/case/case.h"
#include "network/case/diagnostics.h"
#include "network/case/fast_parse.h"
#include "network/case/json_view.h"

namespace loopwright {

// Whether two short texts (keys, names) are equal: lengths, then the first
// byte, before the bytes are compared (most keys differ there).
inline bool SameText(std::string_view a, std::string_view b) {
  return a.size() == b.size() && (a.empty() || (a[0] == b[0] && a.compare(b) == 0));
}

// The keys every component reads itself (not parameters).
enum ComponentKey {
  kKeyId, kKeyType, kKeyFrom, kKeyTo, kKeyPart, kKeyFeedMargin, kKeyChecks, kKeySensedNode, kKeyFixed, kKeyVolume,
  kKeyCount
};
// A component object's members, gathered in one pass (network/case/case.cpp):
// those keys' values by ComponentKey (absent where not given; the first of a
// repeated key), the other members (parameters, notes, unknown keys) in the
// object's order, and whether the object or anything in it repeats a key
// (the same pass: the loader then reads the text with the exact parser).
struct ComponentMembers {
  JsonView fixed[kKeyCount];
  std::vector<std::pair<std::string_view, JsonView>> rest;
  bool repeated = false;
};

struct CaseContext {
  CaseContext(Diagnostics& d, Envelope* e) : diag(d), envelope(e) { parse_recent.fill(-1); }
  Diagnostics& diag;
  Envelope* envelope;
  double ambient_pa = 101325.0;
  std::string case_path;
  PartsCatalog library;
  std::map<std::string, PartsCatalog> local_parts;
  size_t loop_errors_before = 0;
  // Values bound to a variable whose declaration has an error (reported
  // there): a component with one is not built, so that no second error
  // blames the component for the missing value.
  size_t invalid_bindings = 0;
  // Drop what the later readers no longer need from each component's object
  // once read (case.cpp, LaterKeys).
  bool thin_document = false;
  // The fast parse's elements still to be converted (network/case/
  // fast_parse.h; null after the exact parser), and the loop being read.
  LazyElements* lazy = nullptr;
  size_t loop_index = 0;
  // The parameters of the component being read, reused from one component
  // to the next (network/case/case.cpp, BuildComponent).
  ParamValues param_values;
  // The members of the component being read (the same reuse; ReadComponent).
  ComponentMembers component_members;

  // Reads a number (SI) or "value unit" string; with `variable` non-null a
  // "$name" string binds the field to an envelope variable (its default is
  // returned in *out and its index in *variable).
  // `type` and `param` name a component parameter, for its plausible range
  // (network/case/plausible.h); empty for other fields. A value beyond the hard
  // limit of its dimension is an error, one outside its plausible range a
  // warning.
  bool ReadQuantity(JsonView j, const JsonPlace& ptr, Dimension dim,
                    double* out, int* variable = nullptr, std::string_view type = {},
                    std::string_view param = {});
  bool AcceptMagnitude(double si, const JsonPlace& ptr, Dimension dim, std::string_view type,
                       std::string_view param, bool bare, double* out);
  // Whether the last quantity read was written as an absolute pressure.
  bool last_absolute = false;
  // ParseQuantity of a text already read (a case repeats "0.5 m", "40 mm"
  // thousands of times): the successful parses of up to kParseMemo texts.
  ParsedQuantity Parse(std::string_view text, Dimension dim);
  static constexpr size_t kParseMemo = 4096;
  // The memo's entries, each under its text followed by one byte, the
  // dimension's code, and their index by that key (kept apart from a
  // std::unordered_map: libstdc++ scans a map of up to 20 strings comparing
  // every key, and a case repeats about fifteen texts).
  struct ParseMemoEntry {
    std::string key;
    ParsedQuantity q;
  };
  std::vector<ParseMemoEntry> parse_memo;
  IdTable parse_memo_index;
  std::string parse_key;  // the key looked up (reused)
  // The memo entry last found for each hash of the text (its index, -1
  // none): most look-ups end here, before the key is built and hashed.
  std::array<int, 256> parse_recent;
  static size_t RecentSlot(std::string_view text, Dimension dim) {
    size_t h = text.size() * 131 + static_cast<size_t>(dim);
    for (char ch : text) h = h * 31 + static_cast<unsigned char>(ch);
    return (h ^ (h >> 8)) & 255;
  }
  double parse_memo_ambient = 0;
  // The text each number parameter was last read from when it was read
  // with nothing to report and bound to no variable (a slot per hash of the
  // ParamSpec; a clash only reads again): the same text gives the same
  // value, already tested against its limits (ReadNumberParam, case.cpp).
  // A header repeats "0.3 m" and "25 mm" in every segment.
  struct ParamTextMemo {
    const void* spec = nullptr;
    std::string text;
    double ambient_pa = 0;
    double si = 0;
    bool absolute = false;
  };
  std::array<ParamTextMemo, 64> param_text_memo;
  ParamTextMemo& ParamTextSlot(const void* spec) {
    return param_text_memo[(reinterpret_cast<uintptr_t>(spec) >> 4) % param_text_memo.size()];
  }
  bool ReadString(JsonView obj, const char* key, const std::string& ptr,
                  std::string* out, bool required);
  // The same for the value `v` of `key` (absent: missing).
  bool ReadStringValue(JsonView v, const char* key, const std::string& ptr, std::string* out, bool required);
  // The same as a view of the string in the document (no copy).
  bool ReadStringView(JsonView v, const char* key, const std::string& ptr, std::string_view* out, bool required);
  bool CheckId(const std::string& id, const std::string& ptr);
  // The same with the pointer ptr + suffix, built only for the error.
  bool CheckId(const std::string& id, const std::string& ptr, const char* suffix) {
    return IdValid(id) || CheckId(id, ptr + suffix);
  }
  static bool IdValid(const std::string& id);
  void UnknownKeys(JsonView obj, const std::string& ptr, const std::vector<std::string>& allowed);
  // Reports `keys` (unknown) in key order, as nlohmann's document lists them
  // (a simdjson object lists its keys in the text's order).
  void ReportUnknownKeys(std::vector<std::string_view> keys, const std::string& ptr,
                         const std::vector<std::string>& allowed);
  // Keys every object may carry for the reader's own notes.
  static bool IgnoredKey(std::string_view k) {
    return k == "//" || k == "$comment" || k == "notes" || k == "description";
  }
  void UnknownKey(const std::string& k, const std::string& ptr, const std::vector<std::string>& allowed);
  const PartEntry* ResolvePart(const std::string& ref, const std::string& ptr);
};

// The value of `key` in `obj`, or null if absent or `obj` is no object. A
// small object's keys are compared by length first (a case's components
// and nodes have about ten keys each, read hundreds of thousands of times;
// the map's own find with a literal measures the literal at every step).
inline const nlohmann::json* FindKey(const nlohmann::json& obj, std::string_view key) {
  return JsonView(obj).Find(key).nlohmann_value();
}

// "a string", "an object"... and the value as nlohmann prints it (cut at 60
// characters), for messages.
std::string TypeName(JsonView j);
std::string Shown(JsonView j);
std::string UnknownVariable(const std::string& name, const Envelope& e, const char* prefix);

// Whole-loop validation (network/case/case_consistency.cpp).
void CheckBoundaryPressures(const LoopSpec& loop, const Envelope& e, double ambient_pa, CaseContext& c);
void CheckFixedFlowIslands(const LoopSpec& loop, const Envelope& e, CaseContext& c);
void CheckBoundPairs(const LoopSpec& loop, const Envelope& e, CaseContext& c);
void CheckBoundValues(const LoopSpec& loop, const Envelope& e, CaseContext& c);
// A component with a boundary at both ends (its flow ignores what arrives).
void CheckBoundaryToBoundary(const LoopSpec& loop, CaseContext& c);
// A case with heat exchangers or node heat but no "thermal": true (a note).
void NoteHeatWithoutThermal(const Case& cs, CaseContext& c);

void ValidateCouplings(const nlohmann::json& j, const std::string& ptr, CaseContext& c, Case& cs);
void ValidateChecks(const nlohmann::json& j, const std::string& ptr, CaseContext& c, Case& cs);
// The limits written on loops, components and nodes of `doc` (after ValidateChecks).
void ValidatePlacedChecks(const nlohmann::json& doc, CaseContext& c, Case& cs);
// Reads the design questions into cs.design (typed); `doc` is the whole case
// document (a choice question's candidates are built from the component as
// the case writes it).
void ValidateDesign(const nlohmann::json& j, const std::string& ptr, CaseContext& c, Case& cs,
                    const nlohmann::json& doc);

// Reads the parameters the case marks fixed and the knobs it allows into
// cs.knobs, checks the design questions against them and collects the
// catalog line sizes (network/case/knobs.cpp).
void ReadKnobPolicy(const nlohmann::json& doc, CaseContext& c, Case& cs);
// One knob name, "loop/component[.param]" or a coupling's "id[.conductance]",
// into *r (an error at `ptr` when it names nothing; with `allow`, it must be
// a free design knob). network/case/knobs.cpp.
bool ResolveKnobName(const std::string& name, const std::string& ptr, bool allow, CaseContext& c, const Case& cs,
                     KnobRef* r);

// Reads "tolerances" into cs.tolerances (network/case/tolerances.cpp).
void ReadTolerances(const nlohmann::json& doc, CaseContext& c, Case& cs);

void GatherMembers(JsonView obj, ComponentMembers* m);
// ReadComponentParams of members already gathered.
void ReadGatheredParams(const ComponentMembers& m, const std::string& ptr, const PartEntry* part, CaseContext& c,
                        ComponentSpec* cs, ParamValues* values);

// Reads one component's parameters (from the case object merged over a
// part) into *values (what the type's factory takes; the model keeps them,
// so the caller may reuse *values for the next component) and cs->bindings
// (network/case/case.cpp).
void ReadComponentParams(JsonView obj, const std::string& ptr, const PartEntry* part, CaseContext& c,
                         ComponentSpec* cs, ParamValues* values);

// Through time (network/case/case_transient.cpp): a hold-up volume (>= 0),
// and the "thermal_masses" and "scenarios" sections.
void ReadHoldupVolume(JsonView j, const std::string& ptr, CaseContext& c, float* out);
void ReadTransientSections(const nlohmann::json& doc, CaseContext& c, Case& cs);
// "loop/component" to indices, or a pointed error (network/case/case_sections.cpp).
bool ResolveComponentRef(const nlohmann::json& j, const std::string& ptr, CaseContext& c, const Case& cs,
                         int* loop_index, int* comp_index);
// "loop/node" to indices, or a pointed error.
bool ResolveNodeRef(const nlohmann::json& j, const std::string& ptr, CaseContext& c, const Case& cs,
                    int* loop_index, int* node_index);

}  // namespace loopwright
