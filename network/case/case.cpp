#include "network/case/case.h"

#include <algorithm>
#include <atomic>
#include <cmath>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <numeric>
#include <set>
#include <sstream>
#include <stdexcept>
#include <string_view>

#include <fmt/format.h>

#include "library/parts.h"
#include "network/case/case_context.h"
#include "network/case/fast_parse.h"
#include "network/case/fluid_spec.h"
#include "network/case/plausible.h"

namespace loopwright {

using nlohmann::json;

int LoopSpec::NodeIndex(const std::string& nid) const {
  return node_lookup.Find(nid, [this](int i) -> const std::string& { return nodes[i].id; });
}

int LoopSpec::ComponentIndex(const std::string& cid) const {
  return component_lookup.Find(cid, [this](int i) -> const std::string& { return components[i].id; });
}

std::string LoopSpec::NodePointer(const NodeSpec& n) const {
  return pointer + "/nodes/" + std::to_string(n.index);
}

std::string LoopSpec::ComponentPointer(const ComponentSpec& c) const {
  return pointer + "/components/" + std::to_string(c.index);
}

int Envelope::VariableIndex(const std::string& vname) const {
  for (size_t i = 0; i < variables.size(); ++i)
    if (variables[i].name == vname) return static_cast<int>(i);
  return -1;
}

std::string DefaultLibraryDir() {
  if (const char* env = std::getenv("LOOPWRIGHT_LIBRARY")) return env;
  return LOOPWRIGHT_LIBRARY_DIR;
}

// ---------------------------------------------------------------------------
// JSON text: size, depth, comments, line and column.

namespace {

void LineColumn(const std::string& text, size_t byte, int* line, int* col) {
  *line = 1;
  *col = 1;
  byte = std::min(byte, text.size());
  for (size_t i = 0; i < byte; ++i) {
    if (text[i] == '\n') {
      ++*line;
      *col = 1;
    } else {
      ++*col;
    }
  }
}

// Calls visit(i) for every byte of JSON text outside strings and comments,
// until visit returns true; returns that byte's offset, or npos.
template <class Visit>
size_t ScanCode(const std::string& text, Visit visit) {
  bool in_string = false, escape = false;
  for (size_t i = 0; i < text.size(); ++i) {
    const char c = text[i];
    if (in_string) {
      if (escape) escape = false;
      else if (c == '\\') escape = true;
      else if (c == '"') in_string = false;
      continue;
    }
    if (c == '"') {
      in_string = true;
    } else if (c == '/' && i + 1 < text.size() && text[i + 1] == '/') {
      while (i < text.size() && text[i] != '\n') ++i;
    } else if (c == '/' && i + 1 < text.size() && text[i + 1] == '*') {
      size_t end = text.find("*/", i + 2);
      i = end == std::string::npos ? text.size() : end + 1;
    } else if (visit(i)) {
      return i;
    }
  }
  return std::string::npos;
}

// Nesting depth outside strings and comments, so that absurdly deep input is
// refused before any recursive structure is built.
bool CheckDepth(const std::string& text, size_t* where) {
  int depth = 0;
  const size_t at = ScanCode(text, [&](size_t i) {
    const char c = text[i];
    if (c == '[' || c == '{') return ++depth > kMaxCaseDepth;
    if (c == ']' || c == '}') --depth;
    return false;
  });
  if (at == std::string::npos) return true;
  *where = at;
  return false;
}

// Byte offset of the first occurrence of number `token` outside strings and
// comments, or npos.
size_t FindNumberToken(const std::string& text, const std::string& token) {
  if (token.empty()) return std::string::npos;
  return ScanCode(text, [&](size_t i) {
    return text.compare(i, token.size(), token) == 0 &&
           (i == 0 || std::string_view("0123456789.eE+-").find(text[i - 1]) == std::string_view::npos);
  });
}

// Builds the document from nlohmann's SAX events (json::sax_parse) and tracks
// the path, so that a key repeated in one object (JSON keeps only the last
// one, silently) is reported with its pointer. Each event costs O(1) (a key:
// one map insertion, which is also the duplicate test), so parsing is linear
// in the text. (nlohmann's parser callback, used before, rescans the parent
// container after every object or array it closes: quadratic in an array of
// objects.)
class CaseJsonBuilder {
 public:
  explicit CaseJsonBuilder(json* root) : root_(root) {}

  bool null() { return Add(nullptr); }
  bool boolean(bool v) { return Add(v); }
  bool number_integer(json::number_integer_t v) { return Add(v); }
  bool number_unsigned(json::number_unsigned_t v) { return Add(v); }
  bool number_float(json::number_float_t v, const std::string&) { return Add(v); }
  bool string(std::string& v) { return Add(std::move(v)); }
  bool binary(json::binary_t& v) { return Add(std::move(v)); }
  bool start_object(std::size_t) { return Open(json::value_t::object); }
  bool start_array(std::size_t) { return Open(json::value_t::array); }
  bool end_object() { return Close(); }
  bool end_array() { return Close(); }
  bool key(std::string& k) {
    ++events_;
    Frame& f = stack_.back();
    auto [it, inserted] = f.value->get_ref<json::object_t&>().try_emplace(std::move(k));
    f.key = &it->first;
    slot_ = &it->second;  // a repeated key's value is replaced: the last one wins
    if (!inserted && duplicates_.size() < 100) duplicates_.push_back(Pointer());
    return true;
  }
  // nlohmann's own exception, rethrown as json::parse does: a parse_error
  // with its byte, or out_of_range for a number beyond a double.
  template <class Exception>
  bool parse_error(std::size_t, const std::string&, const Exception& e) {
    throw e;
  }

  const std::vector<std::string>& duplicates() const { return duplicates_; }
  size_t events() const { return events_; }

 private:
  struct Frame {
    json* value;                      // the open object or array
    const std::string* key = nullptr;  // an object's current key
  };

  // Puts `v` where the next value goes and returns where it now lives.
  json* Place(json&& v) {
    if (stack_.empty()) {
      *root_ = std::move(v);
      return root_;
    }
    json& top = *stack_.back().value;
    if (!top.is_array()) return &(*slot_ = std::move(v));
    auto& items = top.get_ref<json::array_t&>();
    items.push_back(std::move(v));
    return &items.back();
  }
  template <class T>
  bool Add(T&& v) {
    ++events_;
    Place(json(std::forward<T>(v)));
    return true;
  }
  bool Open(json::value_t type) {
    ++events_;
    stack_.push_back({Place(json(type))});
    return true;
  }
  bool Close() {
    ++events_;
    stack_.pop_back();
    return true;
  }
  // The pointer of the current key (an open array's current element is its
  // last one: it was placed when it opened).
  std::string Pointer() const {
    std::string p;
    for (const Frame& f : stack_)
      p += "/" + (f.value->is_object() ? PointerToken(*f.key) : std::to_string(f.value->size() - 1));
    return p;
  }

  json* root_;
  std::vector<Frame> stack_;
  json* slot_ = nullptr;  // the value of the key just read
  std::vector<std::string> duplicates_;
  size_t events_ = 0;
};

std::atomic<size_t> json_events_parsed{0};

void ReportParseError(const std::string& text, const json::parse_error& e, Diagnostics* diag) {
  Diagnostic d{"malformed-json", "", ""};
  size_t byte = e.byte > 0 ? e.byte - 1 : 0;
  LineColumn(text, byte, &d.line, &d.column);
  std::string what = e.what();
  // nlohmann's text: "[json.exception.parse_error.101] parse error at line 1,
  // column 2: syntax error while parsing value - ..."; keep the part after
  // the position, which says what was expected.
  size_t colon = what.find(": ", what.find("parse error"));
  d.message = "malformed JSON: " + (colon == std::string::npos ? what : what.substr(colon + 2));
  diag->Add(d);
}

// A number beyond the range of a double ("1e999"); nlohmann's exception
// carries no position, so the token is looked up in the text.
void ReportOutOfRange(const std::string& text, const json::out_of_range& e, Diagnostics* diag) {
  std::string what = e.what();
  size_t q1 = what.find('\''), q2 = what.rfind('\'');
  std::string token = q1 != std::string::npos && q2 > q1 ? what.substr(q1 + 1, q2 - q1 - 1) : "";
  Diagnostic d{"not-finite", "", fmt::format("number {} is beyond the range of a double; expected a finite number", token)};
  size_t at = FindNumberToken(text, token);
  if (at != std::string::npos) LineColumn(text, at, &d.line, &d.column);
  diag->Add(d);
}

// Size and nesting depth, checked before anything is parsed.
bool CheckSizeAndDepth(const std::string& text, Diagnostics* diag, size_t max_bytes) {
  if (text.size() > max_bytes) {
    diag->Error("too-large", "",
                fmt::format("the file is {} bytes; the limit is {} bytes ({:g} MiB)",
                            text.size(), max_bytes, max_bytes / 1048576.0));
    return false;
  }
  size_t where = 0;
  if (!CheckDepth(text, &where)) {
    Diagnostic d{"too-deep", "",
                 fmt::format("JSON nested more than {} levels deep", kMaxCaseDepth)};
    LineColumn(text, where, &d.line, &d.column);
    diag->Add(d);
    return false;
  }
  return true;
}

}  // namespace

size_t JsonEventsParsed() { return json_events_parsed.load(); }

namespace {

// nlohmann's parse through CaseJsonBuilder, after the size and depth checks.
bool ParseCheckedText(const std::string& text, json* out, Diagnostics* diag) {
  try {
    json doc;
    CaseJsonBuilder builder(&doc);
    json::sax_parse(text, &builder, json::input_format_t::json, /*strict=*/true, /*ignore_comments=*/true);
    json_events_parsed += builder.events();
    *out = std::move(doc);
    for (const auto& d : builder.duplicates())
      diag->Error("duplicate-key", d, "this key appears more than once in the same object; JSON keeps only the last, so remove the others");
    // Parsing succeeded: carry on, so every other problem is reported too.
  } catch (const json::parse_error& e) {
    ReportParseError(text, e, diag);
    return false;
  } catch (const json::out_of_range& e) {
    ReportOutOfRange(text, e, diag);
    return false;
  } catch (const std::exception& e) {
    diag->Error("malformed-json", "", std::string("malformed JSON: ") + e.what());
    return false;
  }
  return true;
}

}  // namespace

bool ParseJsonText(const std::string& text, json* out, Diagnostics* diag, size_t max_bytes) {
  return CheckSizeAndDepth(text, diag, max_bytes) && ParseCheckedText(text, out, diag);
}


// ---------------------------------------------------------------------------
// Field readers.

std::string TypeName(JsonView v) {
  if (!v.nlohmann_value()) {
    if (v.is_object()) return "an object";
    if (v.is_array()) return "an array";
    if (v.is_string()) return "a string";
    if (v.is_boolean()) return "a boolean";
    return v.is_number() ? "a number" : "null";
  }
  const json& j = *v.nlohmann_value();
  switch (j.type()) {
    case json::value_t::null: return "null";
    case json::value_t::boolean: return "a boolean";
    case json::value_t::string: return "a string";
    case json::value_t::array: return "an array";
    case json::value_t::object: return "an object";
    case json::value_t::discarded: return "nothing";
    default: return "a number";
  }
}

std::string Shown(JsonView j) {
  std::string s = j.nlohmann_value() ? j.nlohmann_value()->dump() : j.ToJson().dump();
  if (s.size() > 60) s = s.substr(0, 57) + "...";
  return s;
}

// The dimension a misspelt or shortened name means: the nearest spelling,
// else the one dimension having it as a word ("speed": rotational_speed;
// "flow" names two and gets none).
std::string NearestDimension(const std::string& given, const std::vector<std::string>& dims) {
  std::string near = NearestName(given, dims);
  if (!near.empty() || given.empty()) return near;
  for (const std::string& d : dims) {
    const size_t at = d.find(given);
    const bool word = at != std::string::npos && (at == 0 || d[at - 1] == '_') &&
                      (at + given.size() == d.size() || d[at + given.size()] == '_');
    if (!word) continue;
    if (!near.empty()) return std::string();  // two dimensions have it
    near = d;
  }
  return near;
}

// "no envelope variable named ..." with the nearest declared name (written
// with `prefix`, "$" where the reference is a "$name" value), or the list.
std::string UnknownVariable(const std::string& name, const Envelope& e, const char* prefix) {
  std::vector<std::string> names;
  for (const auto& v : e.variables) names.push_back(v.name);
  if (names.empty()) return fmt::format("no envelope variable named \"{}\" (the case declares none under /envelope/variables)", name);
  const std::string near = NearestName(name, names);
  if (!near.empty()) return fmt::format("no envelope variable named \"{}\"; did you mean \"{}{}\"?", name, prefix, near);
  return fmt::format("no envelope variable named \"{}\"; declared: {}", name, fmt::join(names, ", "));
}

bool CaseContext::ReadQuantity(JsonView j, const JsonPlace& ptr, Dimension dim,
                               double* out, int* variable, std::string_view type, std::string_view param) {
  if (variable) *variable = -1;
  last_absolute = false;
  if (j.is_number()) {
    const double v = j.number();
    if (!std::isfinite(v)) {
      diag.Error("not-finite", ptr, fmt::format("expected a finite {}, got {}", DimensionName(dim), Shown(j)));
      return false;
    }
    return AcceptMagnitude(v, ptr, dim, type, param, true, out);
  }
  if (j.is_string()) {
    const std::string_view s = j.str();
    if (!s.empty() && s[0] == '$') {
      std::string vname(s.substr(1));
      int vi = envelope->VariableIndex(vname);
      if (!variable) {
        diag.Error("not-bindable", ptr, fmt::format("this field cannot be bound to an envelope variable; got \"{}\"", s));
        return false;
      }
      if (vi < 0 && envelope->IsInvalidVariable(vname)) {  // its declaration is reported
        ++invalid_bindings;
        return false;
      }
      if (vi < 0) {
        diag.Error("unknown-variable", ptr, UnknownVariable(vname, *envelope, "$"));
        return false;
      }
      const Variable& var = envelope->variables[vi];
      bool compatible = var.dim == dim ||
                        (var.dim == Dimension::kPressure && dim == Dimension::kPressureDifference) ||
                        (var.dim == Dimension::kPressureDifference && dim == Dimension::kPressure);
      if (!compatible) {
        diag.Error("wrong-dimension", ptr,
                   fmt::format("variable \"{}\" is a {}, but this field is a {}", vname,
                               DimensionName(var.dim), DimensionName(dim)));
        return false;
      }
      *variable = vi;
      *out = var.default_si;
      return true;
    }
    const ParsedQuantity q = Parse(s, dim);
    if (!q.ok) {
      const char* id = q.error.rfind("unknown unit", 0) == 0                        ? "unknown-unit"
                       : q.error.rfind("missing unit", 0) == 0                      ? "missing-unit"
                       : q.error.find(", but this field is ") != std::string::npos ? "wrong-dimension"
                                                                                     : "bad-quantity";
      diag.Error(id, ptr, q.error);
      return false;
    }
    last_absolute = q.absolute;
    return AcceptMagnitude(q.si, ptr, dim, type, param, false, out);
  }
  diag.Error("wrong-type", ptr,
             fmt::format("expected a number (SI) or a \"value unit\" string for a {}, got {}",
                         DimensionName(dim), TypeName(j)));
  return false;
}

ParsedQuantity CaseContext::Parse(std::string_view text, Dimension dim) {
  auto key_of = [this](int i) -> const std::string& { return parse_memo[i].key; };
  if (parse_memo_ambient != ambient_pa) {
    parse_memo.clear();
    parse_memo_index = IdTable();
    parse_recent.fill(-1);
    parse_memo_ambient = ambient_pa;
  }
  int& recent = parse_recent[RecentSlot(text, dim)];
  if (recent >= 0) {
    const std::string& key = parse_memo[recent].key;  // the text, then the dimension's code
    if (key.size() == text.size() + 1 && key.back() == static_cast<char>(dim) &&
        std::string_view(key.data(), text.size()) == text)
      return parse_memo[recent].q;
  }
  parse_key.assign(text.data(), text.size());
  parse_key += static_cast<char>(dim);
  if (const int i = parse_memo_index.Find(parse_key, key_of); i >= 0) {
    recent = i;
    return parse_memo[i].q;
  }
  ParsedQuantity q = ParseQuantity(text, dim, ambient_pa);
  if (q.ok && parse_memo.size() < kParseMemo) {
    recent = static_cast<int>(parse_memo.size());
    parse_memo_index.Add(parse_key, recent, key_of);
    parse_memo.push_back({parse_key, q});
  }
  return q;
}

// A value read from the case: refused beyond the hard limit of its
// dimension, loaded with a warning outside the plausible range of its field
// (network/case/plausible.h).
bool CaseContext::AcceptMagnitude(double si, const JsonPlace& ptr, Dimension dim, std::string_view type,
                                  std::string_view param, bool bare, double* out) {
  if (FindFieldLimits(dim, type, param).Quiet(si)) {  // the messages below test the same
    *out = si;
    return true;
  }
  const std::string t(type), p(param);
  const std::string error = HardLimitError(dim, t, p, si);
  if (!error.empty()) {
    diag.Error("out-of-range", ptr, error);
    return false;
  }
  const std::string warning = PlausibilityWarning(dim, t, p, si, bare);
  if (!warning.empty()) diag.Warn("implausible", ptr, warning);
  *out = si;
  return true;
}

bool CaseContext::ReadString(JsonView obj, const char* key, const std::string& ptr,
                             std::string* out, bool required) {
  return ReadStringValue(obj.Find(key), key, ptr, out, required);
}

bool CaseContext::ReadStringValue(JsonView v, const char* key, const std::string& ptr, std::string* out,
                                  bool required) {
  std::string_view s;
  const bool ok = ReadStringView(v, key, ptr, &s, required);
  if (v.is_string()) *out = s;  // set as the view is, also when too long or empty
  return ok;
}

bool CaseContext::ReadStringView(JsonView v, const char* key, const std::string& ptr, std::string_view* out,
                                 bool required) {
  if (!v) {
    if (required) diag.Error("missing-field", ptr, fmt::format("missing required field \"{}\"", key));
    return false;
  }
  if (!v.is_string()) {
    diag.Error("wrong-type", ptr + "/" + PointerToken(key),
               fmt::format("expected a string, got {}", TypeName(v)));
    return false;
  }
  *out = v.str();
  if (out->empty() && required) {
    diag.Error("empty", ptr + "/" + PointerToken(key), "must not be empty");
    return false;
  }
  const size_t limit = key[0] == 'd' && std::strcmp(key, "description") == 0 ? 8000 : 200;
  if (out->size() > limit) {
    diag.Error("too-long", ptr + "/" + PointerToken(key), fmt::format("string longer than {} characters", limit));
    return false;
  }
  return true;
}

bool CaseContext::IdValid(const std::string& id) {
  bool ok = !id.empty() && id.size() <= 64;
  for (char c : id)
    ok = ok && (std::isalnum(static_cast<unsigned char>(c)) || c == '_' || c == '-' || c == '.');
  return ok;
}

bool CaseContext::CheckId(const std::string& id, const std::string& ptr) {
  const bool ok = IdValid(id);
  if (!ok)
    diag.Error("bad-id", ptr,
               fmt::format("an id is 1-64 characters of letters, digits, '_', '-', '.'; got \"{}\"",
                           id.size() > 40 ? id.substr(0, 40) + "..." : id));
  return ok;
}

void CaseContext::UnknownKeys(JsonView obj, const std::string& ptr, const std::vector<std::string>& allowed) {
  if (!obj.is_object()) return;
  std::vector<std::string_view> unknown;
  obj.ForEachMember([&](std::string_view k, JsonView) {
    if (!IgnoredKey(k) && std::find(allowed.begin(), allowed.end(), k) == allowed.end()) unknown.push_back(k);
  });
  ReportUnknownKeys(std::move(unknown), ptr, allowed);
}

void CaseContext::ReportUnknownKeys(std::vector<std::string_view> keys, const std::string& ptr,
                              const std::vector<std::string>& allowed) {
  std::sort(keys.begin(), keys.end());
  for (std::string_view k : keys) UnknownKey(std::string(k), ptr, allowed);
}

void CaseContext::UnknownKey(const std::string& k, const std::string& ptr, const std::vector<std::string>& allowed) {
  std::string near = NearestName(k, allowed);
  diag.Error("unknown-field", ptr + "/" + PointerToken(k),
             fmt::format("unknown field \"{}\"{}", k,
                         near.empty() ? fmt::format("; expected one of: {}", fmt::join(allowed, ", "))
                                      : fmt::format("; did you mean \"{}\"?", near)));
}

// ---------------------------------------------------------------------------
// Sections.

namespace {

const std::vector<std::pair<std::string, BoundaryKind>>& BoundaryKinds() {
  static const std::vector<std::pair<std::string, BoundaryKind>> k = {
      {"reservoir", BoundaryKind::kReservoir},
      {"tank", BoundaryKind::kTank},
      {"pressure", BoundaryKind::kPressure}};
  return k;
}

void ReadVariables(const json& env, const std::string& ptr, CaseContext& c, Envelope* e) {
  if (!env.contains("variables")) return;
  const json& vars = env["variables"];
  std::string vptr = ptr + "/variables";
  if (!vars.is_object()) {
    c.diag.Error("wrong-type", vptr, "expected an object of variables {name: {dimension, default}}, got " + TypeName(vars));
    return;
  }
  std::vector<std::string> dims;
  for (Dimension d : AllDimensions()) dims.push_back(DimensionKey(d));
  for (auto it = vars.begin(); it != vars.end(); ++it) {
    std::string p = vptr + "/" + PointerToken(it.key());
    c.CheckId(it.key(), p);
    const json& v = it.value();
    if (!v.is_object()) {
      c.diag.Error("wrong-type", p, "expected an object {\"dimension\": ..., \"default\": ...}, got " + TypeName(v));
      e->invalid_variables.push_back(it.key());
      continue;
    }
    c.UnknownKeys(v, p, {"dimension", "default", "severe"});
    auto invalid = [&] { e->invalid_variables.push_back(it.key()); };
    std::string dkey;
    if (!c.ReadString(v, "dimension", p, &dkey, true)) {
      invalid();
      continue;
    }
    auto dit = std::find(dims.begin(), dims.end(), dkey);
    if (dit == dims.end()) {
      std::string near = NearestDimension(dkey, dims);
      c.diag.Error("unknown-dimension", p + "/dimension",
                   fmt::format("unknown dimension \"{}\"{}; expected one of: {}", dkey,
                               near.empty() ? "" : fmt::format(" (did you mean \"{}\"?)", near),
                               fmt::join(dims, ", ")));
      invalid();
      continue;
    }
    Variable var{it.key(), static_cast<Dimension>(dit - dims.begin()), 0.0};
    if (!v.contains("default")) {
      c.diag.Error("missing-field", p, "missing required field \"default\"");
      invalid();
      continue;
    }
    if (!c.ReadQuantity(v["default"], p + "/default", var.dim, &var.default_si)) {
      invalid();
      continue;
    }
    if (v.contains("severe")) {
      const std::vector<std::string> sides = {"high", "low"};
      const json& sv = v["severe"];
      if (!sv.is_string() || std::find(sides.begin(), sides.end(), sv.get<std::string>()) == sides.end()) {
        const std::string given = sv.is_string() ? sv.get<std::string>() : TypeName(sv);
        const std::string near = sv.is_string() ? NearestName(given, sides) : "";
        c.diag.Error("unknown-choice", p + "/severe",
                     fmt::format("expected \"high\" or \"low\" (the side of the range the hot corner takes), got \"{}\"{}",
                                 given, near.empty() ? "" : fmt::format("; did you mean \"{}\"?", near)));
      } else {
        var.severe_low = sv.get<std::string>() == "low";
      }
    }
    e->variables.push_back(var);
  }
}

// Grid point names carry the axis values as written in the case ("80 degC",
// a bare number as given: "0.5"), so "sweep[oil_temperature=80 degC,
// boost=30 psi]" reads without the case at hand. A value written twice on
// one axis gets "#k" (its 1-based place) so names stay unique.
std::vector<std::string> GridValueTexts(const json& values) {
  std::vector<std::string> out;
  for (const auto& v : values) {
    std::string t = v.is_string() ? v.get<std::string>() : v.is_number() ? fmt::format("{:g}", v.get<double>()) : v.dump();
    const size_t b = t.find_first_not_of(" \t"), en = t.find_last_not_of(" \t");
    out.push_back(b == std::string::npos ? t : t.substr(b, en - b + 1));
  }
  for (size_t i = 0; i < out.size(); ++i)
    if (std::count(out.begin(), out.end(), out[i]) > 1) out[i] += fmt::format(" #{}", i + 1);
  return out;
}

// Reads {variable: value} over `out` (a point's or a grid's values).
void ReadPointValues(const json& vals, const std::string& p, CaseContext& c, const Envelope& e,
                     std::vector<double>* out) {
  if (!vals.is_object()) {
    c.diag.Error("wrong-type", p, "expected an object {variable: value}, got " + TypeName(vals));
    return;
  }
  for (auto it = vals.begin(); it != vals.end(); ++it) {
    std::string vp = p + "/" + PointerToken(it.key());
    int vi = e.VariableIndex(it.key());
    if (vi < 0 && e.IsInvalidVariable(it.key())) continue;  // its declaration is reported
    if (vi < 0) {
      c.diag.Error("unknown-variable", vp, UnknownVariable(it.key(), e, ""));
      continue;
    }
    c.ReadQuantity(it.value(), vp, e.variables[vi].dim, &(*out)[vi]);
  }
}

std::vector<double> VariableDefaults(const Envelope& e) {
  std::vector<double> defaults;
  for (auto& v : e.variables) defaults.push_back(v.default_si);
  return defaults;
}

void ReadDeclaredPoints(const json& pts, const std::string& ptr, CaseContext& c, Envelope* e) {
  if (!pts.is_array()) {
    c.diag.Error("wrong-type", ptr + "/points", "expected an array of points, got " + TypeName(pts));
    return;
  }
  const std::vector<double> defaults = VariableDefaults(*e);
  std::set<std::string> names;
  for (size_t i = 0; i < pts.size(); ++i) {
    std::string p = ptr + "/points/" + std::to_string(i);
    if (!pts[i].is_object()) {
      c.diag.Error("wrong-type", p, "expected an object {\"name\", \"values\"}, got " + TypeName(pts[i]));
      continue;
    }
    c.UnknownKeys(pts[i], p, {"name", "values", "isothermal"});
    OperatingPoint op{"", defaults};
    if (pts[i].contains("isothermal")) {
      if (pts[i]["isothermal"].is_boolean()) op.isothermal = pts[i]["isothermal"].get<bool>();
      else c.diag.Error("wrong-type", p + "/isothermal", "expected true or false, got " + TypeName(pts[i]["isothermal"]));
    }
    if (!c.ReadString(pts[i], "name", p, &op.name, true)) continue;
    if (!c.CheckId(op.name, p + "/name")) continue;
    if (!names.insert(op.name).second)
      c.diag.Error("duplicate-id", p + "/name", fmt::format("a point named \"{}\" already exists", op.name));
    if (pts[i].contains("values")) ReadPointValues(pts[i]["values"], p + "/values", c, *e, &op.values);
    e->points.push_back(op);
  }
}

// A grid's axes: the variable of each, its values (SI) and their text as
// written (for point names).
struct GridAxes {
  std::vector<int> var;
  std::vector<std::vector<double>> vals;
  std::vector<std::vector<std::string>> text;
  size_t total = 1;
};

constexpr size_t kMaxGridPoints = 100000;

// Reads the axes of a grid; false if any is unusable (reported, or its
// variable's declaration is).
bool ReadGridAxes(const json& axes, const std::string& p, CaseContext& c, const Envelope& e, GridAxes* g) {
  bool ok = true;
  for (auto it = axes.begin(); it != axes.end(); ++it) {
    std::string ap = p + "/axes/" + PointerToken(it.key());
    int vi = e.VariableIndex(it.key());
    if (vi < 0 && e.IsInvalidVariable(it.key())) {
      ok = false;
      continue;
    }
    if (vi < 0) {
      c.diag.Error("unknown-variable", ap, UnknownVariable(it.key(), e, ""));
      ok = false;
      continue;
    }
    if (!it.value().is_array() || it.value().empty()) {
      c.diag.Error("wrong-type", ap, "expected a non-empty array of values");
      ok = false;
      continue;
    }
    std::vector<double> vals;
    for (size_t k = 0; k < it.value().size(); ++k) {
      double v = 0;
      if (c.ReadQuantity(it.value()[k], ap + "/" + std::to_string(k), e.variables[vi].dim, &v))
        vals.push_back(v);
      else
        ok = false;
    }
    g->text.push_back(GridValueTexts(it.value()));
    g->total *= std::max<size_t>(1, vals.size());
    g->var.push_back(vi);
    g->vals.push_back(vals);
    if (g->total > kMaxGridPoints) break;
  }
  return ok;
}

// Every combination of the axes' values, the last axis fastest.
void ExpandGrid(const std::string& gname, const std::vector<double>& base, bool isothermal, const GridAxes& g,
                Envelope* e) {
  std::vector<size_t> idx(g.var.size(), 0);
  for (size_t n = 0; n < g.total; ++n) {
    OperatingPoint op{gname, base};
    op.isothermal = isothermal;
    for (size_t a = 0; a < g.var.size(); ++a) {
      op.values[g.var[a]] = g.vals[a][idx[a]];
      op.name += fmt::format("{}{}={}", a == 0 ? "[" : ", ", e->variables[g.var[a]].name, g.text[a][idx[a]]);
    }
    op.name += "]";
    e->points.push_back(op);
    for (size_t a = g.var.size(); a-- > 0;) {
      if (++idx[a] < g.vals[a].size()) break;
      idx[a] = 0;
    }
  }
}

void ReadGrid(const json& grid, const std::string& p, CaseContext& c, Envelope* e) {
  if (!grid.is_object()) {
    c.diag.Error("wrong-type", p, "expected an object {\"name\", \"axes\"}, got " + TypeName(grid));
    return;
  }
  c.UnknownKeys(grid, p, {"name", "axes", "values", "isothermal"});
  const bool grid_iso = grid.contains("isothermal") && grid["isothermal"].is_boolean() && grid["isothermal"].get<bool>();
  std::string gname;
  if (!c.ReadString(grid, "name", p, &gname, true) || !c.CheckId(gname, p + "/name")) return;
  std::vector<double> base = VariableDefaults(*e);
  if (grid.contains("values")) ReadPointValues(grid["values"], p + "/values", c, *e, &base);
  if (!grid.contains("axes") || !grid["axes"].is_object() || grid["axes"].empty()) {
    c.diag.Error("missing-field", p + "/axes", "a grid needs \"axes\": {variable: [values...]} with at least one axis");
    return;
  }
  GridAxes axes;
  const bool ok = ReadGridAxes(grid["axes"], p, c, *e, &axes);
  if (axes.total > kMaxGridPoints) {
    c.diag.Error("too-large", p + "/axes", "a grid may have at most 100,000 points");
    return;
  }
  if (ok) ExpandGrid(gname, base, grid_iso, axes, e);
}

void ReadPoints(const json& env, const std::string& ptr, CaseContext& c, Envelope* e) {
  if (env.contains("points")) ReadDeclaredPoints(env["points"], ptr, c, e);
  if (env.contains("grids")) {
    const json& grids = env["grids"];
    if (!grids.is_array()) {
      c.diag.Error("wrong-type", ptr + "/grids", "expected an array of grids, got " + TypeName(grids));
      return;
    }
    for (size_t g = 0; g < grids.size(); ++g) ReadGrid(grids[g], ptr + "/grids/" + std::to_string(g), c, e);
  }
  if (e->points.empty()) e->points.push_back({"nominal", VariableDefaults(*e)});
}

// Ready-made points derived from the declared ones:
//   "cold_start": {"temperature": T}  an isothermal point with every loop and
//       every temperature variable at T and every power variable (heat input)
//       at zero: thick oil at ambient before anything has warmed;
//   "hot_corner": true  every variable at its most severe value over the
//       declared running points: the highest, or the lowest for a variable
//       declared "severe": "low" (a fan's running fraction, a pump speed);
//       a common-practice bounding corner.
void ReadDerived(const json& d, const std::string& ptr, CaseContext& c, Case* cs) {
  Envelope& e = cs->envelope;
  if (!d.is_object()) {
    c.diag.Error("wrong-type", ptr, "expected an object {\"cold_start\": {\"temperature\": ...}, \"hot_corner\": true}, got " + TypeName(d));
    return;
  }
  c.UnknownKeys(d, ptr, {"cold_start", "hot_corner"});
  const std::vector<double> defaults = VariableDefaults(e);
  const std::vector<OperatingPoint> declared = e.points;
  if (d.contains("cold_start")) {
    const json& cj = d["cold_start"];
    double t = 0;
    if (!cj.is_object() || !cj.contains("temperature")) {
      c.diag.Error("missing-field", ptr + "/cold_start", "cold_start needs {\"temperature\": ...}");
    } else if (c.ReadQuantity(cj["temperature"], ptr + "/cold_start/temperature", Dimension::kTemperature, &t)) {
      bool taken = false;
      for (const auto& p : declared) taken = taken || p.name == "cold_start";
      OperatingPoint op{taken ? "cold_start_derived" : "cold_start", defaults, true};
      for (size_t i = 0; i < e.variables.size(); ++i) {
        if (e.variables[i].dim == Dimension::kTemperature) op.values[i] = t;
        if (e.variables[i].dim == Dimension::kPower) op.values[i] = 0.0;
      }
      op.loop_temperature = t;
      e.points.push_back(op);
    }
  }
  if (d.contains("hot_corner")) {
    if (!d["hot_corner"].is_boolean()) {
      c.diag.Error("wrong-type", ptr + "/hot_corner", "expected true or false");
    } else if (d["hot_corner"].get<bool>()) {
      bool taken = false;
      for (const auto& p : declared) taken = taken || p.name == "hot_corner";
      OperatingPoint op{taken ? "hot_corner_derived" : "hot_corner", defaults, false};
      for (size_t i = 0; i < e.variables.size(); ++i)
        for (const auto& p : declared)
          if (!p.isothermal)
            op.values[i] = e.variables[i].severe_low ? std::min(op.values[i], p.values[i]) : std::max(op.values[i], p.values[i]);
      e.points.push_back(op);
    }
  }
}

}  // namespace

namespace {

void CheckPartParams(const PartEntry& part, const ComponentType& t, const std::string& ptr, CaseContext& c) {
  for (auto it = part.params.begin(); it != part.params.end(); ++it)
    if (t.ParamIndex(it.key()) < 0)
      c.diag.Error("bad-part", ptr + "/part",
                   fmt::format("library part \"{}\" ({}) has unknown parameter \"{}\" for type {}",
                               part.id, part.file, it.key(), t.name));
}

// ReadQuantity of a parameter, or the value of the text it was last read
// from quietly (CaseContext::param_text_memo).
bool ReadParamQuantity(JsonView v, const JsonPlace& p, const ParamSpec& s, CaseContext& c, const ComponentType& t,
                       double* x, int* var) {
  CaseContext::ParamTextMemo& memo = c.ParamTextSlot(&s);
  const bool text = v.is_string();
  if (text && memo.spec == &s && memo.ambient_pa == c.ambient_pa && memo.text == v.str()) {
    *x = memo.si;
    c.last_absolute = memo.absolute;
    return true;
  }
  const size_t reported = c.diag.items().size();
  if (!c.ReadQuantity(v, p, s.dim, x, s.bindable ? var : nullptr, t.name, s.name)) return false;
  if (text && *var < 0 && c.diag.items().size() == reported) {
    memo.spec = &s;
    memo.text.assign(v.str());
    memo.ambient_pa = c.ambient_pa;
    memo.si = *x;
    memo.absolute = c.last_absolute;
  }
  return true;
}

void ReadNumberParam(JsonView v, const JsonPlace& p, const ParamSpec& s, size_t i, CaseContext& c, ParamValues* pv,
                     ComponentSpec* cs) {
  const ComponentType& t = *cs->type_info;
  double x = 0;
  int var = -1;
  if (!ReadParamQuantity(v, p, s, c, t, &x, &var)) return;
  bool below = s.min_exclusive ? !(x > s.min_si) : !(x >= s.min_si);
  if (below || !(x <= s.max_si)) {
    std::string range = s.min_exclusive && s.max_si == kInf ? "greater than " + fmt::format("{:g}", s.min_si)
                        : fmt::format("between {:g} and {:g}", s.min_si, s.max_si);
    c.diag.Error("out-of-range", p,
                 fmt::format("{} must be {} (SI: {}), got {}", s.name, range,
                             SiUnit(s.dim), Shown(v)));
    return;
  }
  pv->values[i] = x;
  if (var >= 0) cs->extras().bindings.push_back({static_cast<int>(i), var});
}

void ReadChoiceParam(JsonView v, const JsonPlace& p, const ParamSpec& s, size_t i, CaseContext& c,
                     ParamValues* pv) {
  if (!v.is_string()) {
    c.diag.Error("wrong-type", p, fmt::format("expected one of: {}; got {}", fmt::join(s.choices, ", "), TypeName(v)));
    return;
  }
  const std::string name(v.str());
  auto it = std::find(s.choices.begin(), s.choices.end(), name);
  if (it == s.choices.end()) {
    std::string near = NearestName(name, s.choices);
    c.diag.Error("unknown-choice", p,
                 fmt::format("unknown {} \"{}\"{}; expected one of: {}", s.name, name,
                             near.empty() ? "" : fmt::format(" (did you mean \"{}\"?)", near),
                             fmt::join(s.choices, ", ")));
    return;
  }
  pv->values[i] = static_cast<double>(it - s.choices.begin());
}

void ReadNameListParam(JsonView v, const JsonPlace& p, const ParamSpec& s, size_t i, CaseContext& c,
                       ParamValues* pv) {
  if (!v.is_array()) {
    c.diag.Error("wrong-type", p, "expected an array of names, got " + TypeName(v));
    return;
  }
  std::vector<std::vector<double>> rows;
  bool ok = true;
  v.ForEachElement([&](size_t r, JsonView name) {
    if (r >= 1000) return;
    const std::string given = name.is_string() ? std::string(name.str()) : Shown(name);
    auto it = name.is_string() ? std::find(s.choices.begin(), s.choices.end(), given) : s.choices.end();
    if (it == s.choices.end()) {
      std::string near = NearestName(given, s.choices);
      c.diag.Error("unknown-choice", p + ("/" + std::to_string(r)),
                   fmt::format("unknown {} entry \"{}\"{}; known: {}", s.name, given,
                               near.empty() ? "" : fmt::format(" (did you mean \"{}\"?)", near),
                               fmt::join(s.choices, ", ")));
      ok = false;
      return;
    }
    rows.push_back({static_cast<double>(it - s.choices.begin())});
  });
  if (ok) {
    pv->tables[i] = std::move(rows);
    pv->values[i] = 1.0;
  }
}

void ReadTableParam(JsonView v, const JsonPlace& p, const ParamSpec& s, size_t i, CaseContext& c, ParamValues* pv,
                    ComponentSpec* cs) {
  if (!v.is_array()) {
    c.diag.Error("wrong-type", p, "expected an array of rows, got " + TypeName(v));
    return;
  }
  if (v.size() < s.min_rows) {
    c.diag.Error("too-few-rows", p, fmt::format("needs at least {} rows, got {}", s.min_rows, v.size()));
    return;
  }
  if (v.size() > 10000) {
    c.diag.Error("too-large", p, "a table may have at most 10,000 rows");
    return;
  }
  std::vector<std::vector<double>> rows;
  bool ok = true;
  v.ForEachElement([&](size_t r, JsonView vr) {
    const std::string rp = p + ("/" + std::to_string(r));
    if (!vr.is_array() || vr.size() != s.columns.size()) {
      std::vector<std::string> cols;
      for (auto& col : s.columns) cols.push_back(col.name);
      c.diag.Error("wrong-type", rp,
                   fmt::format("expected a row [{}] of {} values, got {}", fmt::join(cols, ", "),
                               s.columns.size(), Shown(vr)));
      ok = false;
      return;
    }
    std::vector<double> row(s.columns.size());
    vr.ForEachElement([&](size_t k, JsonView x) {
      ok = c.ReadQuantity(x, rp + "/" + std::to_string(k), s.columns[k].dim, &row[k], nullptr,
                          cs->type_info->name, s.columns[k].name) && ok;
    });
    rows.push_back(row);
  });
  if (ok) {
    pv->tables[i] = std::move(rows);
    pv->values[i] = 1.0;  // present
  }
}

void ReadParamValue(JsonView v, const JsonPlace& p, const ParamSpec& s, size_t i, CaseContext& c, ParamValues* pv,
                    ComponentSpec* cs) {
  switch (s.kind) {
    case ParamKind::kNumber: ReadNumberParam(v, p, s, i, c, pv, cs); break;
    case ParamKind::kBool:
      if (!v.is_boolean()) {
        c.diag.Error("wrong-type", p, "expected true or false, got " + TypeName(v));
        break;
      }
      pv->values[i] = v.boolean() ? 1.0 : 0.0;
      break;
    case ParamKind::kChoice: ReadChoiceParam(v, p, s, i, c, pv); break;
    case ParamKind::kNameList: ReadNameListParam(v, p, s, i, c, pv); break;
    case ParamKind::kTable: ReadTableParam(v, p, s, i, c, pv, cs); break;
  }
}

// No component type names a parameter like a key every component reads
// itself (GatherMembers sets those keys apart first); checked once.
template <size_t N>
bool NoParamIsFixedKey(const std::string_view (&fixed)[N]) {
  for (const ComponentType& t : ComponentTypes())
    for (std::string_view k : fixed)
      if (t.ParamIndex(k) >= 0)
        throw std::logic_error(fmt::format("component type {} has a parameter named \"{}\"", t.name, k));
  return true;
}

// The parameter of type `t` named `key`: first the one after `after` (a
// case writes a type's parameters in much the same order each time), then
// by search.
int ParamAfter(const ComponentType& t, std::string_view key, int after) {
  const size_t guess = static_cast<size_t>(after + 1);
  if (guess < t.params.size() && SameText(t.params[guess].name, key)) return static_cast<int>(guess);
  return t.ParamIndex(key);
}

}  // namespace

// The keys every component reads itself, by ComponentKey.
static constexpr std::string_view kComponentKeys[] = {"id",          "type",   "from",        "to",   "part",
                                                      "feed_margin", "checks", "sensed_node", "fixed",
                                                      "volume"};
static_assert(std::size(kComponentKeys) == kKeyCount, "one name per ComponentKey");

namespace {

// The ComponentKey named `k`, kKeyCount for any other key. The names are
// sorted by length once, so that a key is compared with those of its own
// length only (a component has about ten keys, and a plant-size case 10^6
// components).
int FixedKeyOf(std::string_view k) {
  struct ByLength {
    int8_t first[16], count[16];  // the run of names of each length in `order`
    int8_t order[kKeyCount];
  };
  static const ByLength table = [] {
    static_assert(kKeyCount < 16, "a run fits int8_t");
    ByLength t{};
    int n = 0;
    for (size_t len = 0; len < 16; ++len) {
      t.first[len] = static_cast<int8_t>(n);
      for (int key = 0; key < kKeyCount; ++key)
        if (kComponentKeys[key].size() == len) t.order[n++] = static_cast<int8_t>(key);
      t.count[len] = static_cast<int8_t>(n - t.first[len]);
    }
    if (n != kKeyCount) throw std::logic_error("a component key longer than 15 characters");
    return t;
  }();
  if (k.size() >= 16) return kKeyCount;
  for (int i = 0; i < table.count[k.size()]; ++i) {
    const int key = table.order[table.first[k.size()] + i];
    if (SameText(kComponentKeys[key], k)) return key;
  }
  return kKeyCount;
}

// Whether `k` repeats one of the first `n` keys of `rest`. A mask of the
// keys' length and end letters is tested first: the keys are compared only
// when it says a key like this one was seen.
bool RepeatsRestKey(std::string_view k, const ComponentMembers& m, uint64_t* seen) {
  const uint64_t bit = uint64_t(1) << ((k.size() * 7 + (k.empty() ? 0 : k.front() * 3 + k.back())) & 63);
  const bool maybe = (*seen & bit) != 0;
  *seen |= bit;
  if (!maybe) return false;
  for (const auto& kv : m.rest)
    if (kv.first == k) return true;
  return false;
}

}  // namespace

void GatherMembers(JsonView obj, ComponentMembers* m) {
  static const bool checked = NoParamIsFixedKey(kComponentKeys);
  (void)checked;
  for (JsonView& f : m->fixed) f = JsonView();
  m->rest.clear();
  m->repeated = false;
  uint64_t seen = 0;
  obj.ForEachMember([&](std::string_view k, JsonView v) {
    if ((v.is_object() || v.is_array()) && v.RepeatsKey()) m->repeated = true;
    if (const int key = FixedKeyOf(k); key < kKeyCount) {
      if (m->fixed[key]) {
        m->repeated = true;  // the first is kept, as a search finds it
      } else {
        m->fixed[key] = v;
      }
    } else {
      if (RepeatsRestKey(k, *m, &seen)) m->repeated = true;
      m->rest.emplace_back(k, v);
    }
  });
}

void ReadComponentParams(JsonView obj, const std::string& ptr, const PartEntry* part, CaseContext& c,
                         ComponentSpec* cs, ParamValues* pv) {
  ComponentMembers m;
  GatherMembers(obj, &m);
  ReadGatheredParams(m, ptr, part, c, cs, pv);
}

// Reads one component's parameters (from the case object merged over a part).
// The object's other keys are checked against the type's parameters; a
// parameter's pointer is built only when its value is read.
void ReadGatheredParams(const ComponentMembers& m, const std::string& ptr, const PartEntry* part, CaseContext& c,
                        ComponentSpec* cs, ParamValues* pv) {
  const ComponentType& t = *cs->type_info;
  thread_local std::vector<JsonView> given;
  given.assign(t.params.size(), JsonView());
  std::vector<std::string_view> unknown;
  int last = -1;
  for (const auto& [k, v] : m.rest) {
    if (const int i = ParamAfter(t, k, last); i >= 0)
      given[last = i] = v;
    else if (!CaseContext::IgnoredKey(k))
      unknown.push_back(k);
  }
  if (!unknown.empty()) {
    std::vector<std::string> allowed(std::begin(kComponentKeys), std::end(kComponentKeys));
    for (auto& s : t.params) allowed.push_back(s.name);
    c.ReportUnknownKeys(std::move(unknown), ptr, allowed);
  }
  if (part) CheckPartParams(*part, t, ptr, c);
  pv->values.assign(t.params.size(), kNoValue);
  // Emptied in place: *pv is reused from one component to the next, and
  // nearly every component has no table.
  for (auto& table : pv->tables)
    if (!table.empty()) table.clear();
  pv->tables.resize(t.params.size());
  const std::string part_ptr = part ? ptr + "/part" : std::string();
  for (size_t i = 0; i < t.params.size(); ++i) {
    const ParamSpec& s = t.params[i];
    JsonView src = given[i];
    bool from_part = false;
    if (!src && part) {
      if (auto pit = part->params.find(s.name); pit != part->params.end()) {
        src = JsonView(*pit);
        from_part = true;  // the value came from the part
      }
    }
    if (src) {
      ReadParamValue(src, from_part ? JsonPlace(part_ptr) : JsonPlace(ptr, s.name), s, i, c, pv, cs);
    } else if (s.required) {
      c.diag.Error("missing-field", ptr,
                   fmt::format("missing required parameter \"{}\" ({}) for type {}{}", s.name,
                               s.kind == ParamKind::kNumber ? DimensionName(s.dim) : std::string("see schema"),
                               t.name, part ? fmt::format(" (not in part \"{}\" either)", part->id) : ""));
    } else {
      pv->values[i] = s.default_si;
    }
  }
}

namespace {

void ReadLoopFluid(const json& lj, const std::string& ptr, CaseContext& c, const Case& cs, LoopSpec* loop) {
  if (!c.ReadString(lj, "fluid", ptr, &loop->fluid_id, true)) return;
  auto it = cs.fluids.find(loop->fluid_id);
  if (it != cs.fluids.end()) {
    loop->fluid = it->second;
    return;
  }
  std::vector<std::string> names;
  for (auto& [k, v] : cs.fluids) names.push_back(k);
  std::string near = NearestName(loop->fluid_id, names);
  c.diag.Error("unknown-reference", ptr + "/fluid",
               fmt::format("no fluid \"{}\" under /fluids{}", loop->fluid_id,
                           near.empty() ? (names.empty() ? std::string(" (none declared)") : fmt::format("; declared: {}", fmt::join(names, ", ")))
                                        : fmt::format("; did you mean \"{}\"?", near)));
}

// A boundary's "drains_to": the index of the draining node and the id it names.
using DrainRefs = std::vector<std::pair<size_t, std::string>>;

void ReadBoundaryKind(JsonView b, const std::string& bp, CaseContext& c, NodeSpec* n) {
  std::string kind;
  if (!c.ReadString(b, "kind", bp, &kind, true)) return;
  std::vector<std::string> names;
  for (auto& [k, v] : BoundaryKinds()) names.push_back(k);
  auto it = std::find_if(BoundaryKinds().begin(), BoundaryKinds().end(),
                         [&](auto& kv) { return kv.first == kind; });
  if (it == BoundaryKinds().end()) {
    std::string near = NearestName(kind, names);
    c.diag.Error("unknown-choice", bp + "/kind",
                 fmt::format("unknown boundary kind \"{}\"{}; expected one of: {}", kind,
                             near.empty() ? "" : fmt::format(" (did you mean \"{}\"?)", near),
                             fmt::join(names, ", ")));
  } else {
    n->boundary = it->second;
  }
}

void ReadBoundaryPressure(JsonView b, const std::string& bp, CaseContext& c, NodeSpec* n) {
  const JsonView pressure = b.Find("pressure");
  if (!pressure) {
    if (n->boundary == BoundaryKind::kTank || n->boundary == BoundaryKind::kPressure)
      c.diag.Error("missing-field", bp, "a tank or pressure boundary needs \"pressure\"");
  } else if (c.ReadQuantity(pressure, bp + "/pressure", Dimension::kPressure, &n->set_cond().surface_pressure,
                            &n->set_cond().pressure_variable) &&
             c.last_absolute && n->set_cond().surface_pressure < 0 && n->set_cond().surface_pressure + c.ambient_pa >= 0) {
    c.diag.Warn("implausible", bp + "/pressure",
                fmt::format("boundary pressure {} is {:.4g} bar below the atmosphere ({:.4g} bar abs): a "
                            "tank or housing is rarely under vacuum; if a gauge pressure was meant, write "
                            "it as gauge (\"psig\", \"bar g\", or the unit alone)",
                            Shown(pressure), -n->set_cond().surface_pressure / 1e5, c.ambient_pa / 1e5));
  }
}

void ReadBoundary(JsonView b, const std::string& bp, size_t node_index, CaseContext& c, NodeSpec* n,
                  DrainRefs* drain_refs) {
  if (!b.is_object()) {
    c.diag.Error("wrong-type", bp, "expected an object {kind, pressure, level}, got " + TypeName(b));
    return;
  }
  c.UnknownKeys(b, bp, {"kind", "pressure", "level", "temperature", "drains_to", "loss_conductance",
                        "ambient_temperature"});
  ReadBoundaryKind(b, bp, c, n);
  ReadBoundaryPressure(b, bp, c, n);
  if (const JsonView level = b.Find("level")) {
    if (c.ReadQuantity(level, bp + "/level", Dimension::kLength, &n->set_cond().level) && n->set_cond().level < 0)
      c.diag.Error("out-of-range", bp + "/level", "level must not be negative");
  }
  if (const JsonView v = b.Find("temperature"))
    c.ReadQuantity(v, bp + "/temperature", Dimension::kTemperature, &n->set_cond().temperature,
                   &n->set_cond().temperature_variable);
  if (const JsonView g = b.Find("loss_conductance");
      g && c.ReadQuantity(g, bp + "/loss_conductance", Dimension::kConductance, &n->set_cond().loss_conductance) &&
      n->set_cond().loss_conductance < 0)
    c.diag.Error("out-of-range", bp + "/loss_conductance", "loss_conductance must not be negative");
  if (const JsonView v = b.Find("ambient_temperature"))
    c.ReadQuantity(v, bp + "/ambient_temperature", Dimension::kTemperature,
                   &n->set_cond().ambient_temperature, &n->set_cond().ambient_variable);
  if (b.Find("drains_to")) {
    std::string target;
    if (c.ReadString(b, "drains_to", bp, &target, true)) drain_refs->emplace_back(node_index, target);
  }
}

void ReadNode(JsonView nj, const std::string& p, int index, CaseContext& c, LoopSpec* loop, DrainRefs* drain_refs) {
  if (!nj.is_object()) {
    c.diag.Error("wrong-type", p, "expected a node object {id, elevation, boundary}, got " + TypeName(nj));
    return;
  }
  static const std::vector<std::string> kNodeKeys = {"id", "elevation", "boundary", "heat", "checks", "volume"};
  enum { kId, kElevation, kBoundary, kHeat, kChecks, kVolume };
  // Its members in one pass (a search per key walked them each time); the
  // first of a repeated key, as a search finds it.
  JsonView known[6];
  std::vector<std::string_view> unknown;
  nj.ForEachMember([&](std::string_view k, JsonView v) {
    for (size_t i = 0; i < kNodeKeys.size(); ++i) {
      if (!SameText(kNodeKeys[i], k)) continue;
      if (!known[i]) known[i] = v;
      return;
    }
    if (!CaseContext::IgnoredKey(k)) unknown.push_back(k);
  });
  if (!unknown.empty()) c.ReportUnknownKeys(std::move(unknown), p, kNodeKeys);
  NodeSpec n;
  n.index = index;
  if (!c.ReadStringValue(known[kId], "id", p, &n.id, true) || !c.CheckId(n.id, p, "/id")) return;
  // Added before it is stored (one probe finds a repeat and adds the id; the
  // first of a repeated id is kept); every path below stores the node.
  if (!loop->node_lookup.Add(n.id, static_cast<int>(loop->nodes.size()),
                             [loop](int i) -> const std::string& { return loop->nodes[i].id; }))
    c.diag.Error("duplicate-id", p + "/id", fmt::format("node \"{}\" is declared twice in loop \"{}\"", n.id, loop->id));
  if (const JsonView v = known[kElevation]) c.ReadQuantity(v, p + "/elevation", Dimension::kLength, &n.elevation);
  if (const JsonView v = known[kHeat]) c.ReadQuantity(v, p + "/heat", Dimension::kPower, &n.set_cond().heat, &n.set_cond().heat_variable);
  if (const JsonView v = known[kVolume]) ReadHoldupVolume(v, p + "/volume", c, &n.volume);
  if (const JsonView v = known[kBoundary]) ReadBoundary(v, p + "/boundary", loop->nodes.size(), c, &n, drain_refs);
  loop->nodes.push_back(std::move(n));
}

// The loop's node id nearest to `id`, for a message ("" if none is near):
// the ids are gathered only when a reference fails.
std::string NearestNodeId(const LoopSpec& loop, const std::string& id) {
  std::vector<std::string> ids;
  ids.reserve(loop.nodes.size());
  for (const NodeSpec& n : loop.nodes) ids.push_back(n.id);
  return NearestName(id, ids);
}

void ResolveDrains(const DrainRefs& drain_refs, CaseContext& c, LoopSpec* loop) {
  for (auto& [idx, target] : drain_refs) {
    std::string bp = loop->NodePointer(loop->nodes[idx]) + "/boundary/drains_to";
    int t = loop->NodeIndex(target);
    if (t < 0) {
      const std::string near = NearestNodeId(*loop, target);
      c.diag.Error("unknown-reference", bp, fmt::format("no node \"{}\" in loop \"{}\"{}", target, loop->id,
                                                        near.empty() ? "" : fmt::format("; did you mean \"{}\"?", near)));
    } else if (t == static_cast<int>(idx)) {
      c.diag.Error("self-loop", bp, "a boundary cannot drain into itself");
    } else if (loop->nodes[t].boundary != BoundaryKind::kReservoir && loop->nodes[t].boundary != BoundaryKind::kTank) {
      c.diag.Error("bad-reference", bp, fmt::format("node \"{}\" is not a reservoir or tank", target));
    } else {
      loop->nodes[idx].set_cond().drains_to = t;
    }
  }
}

// What the readers after the loops still look up in a node's or a
// component's object: placed checks, and a component's "fixed" (a
// part-choice question re-reads the whole object, and then nothing is
// thinned). The rest is dropped once read, so that a plant-size case does
// not hold its parsed document beside what was built from it. A null stands
// for an object with nothing left (ValidatePlacedChecks and the knobs take
// it as one); a component that is no object is kept as it is.
json NodeLaterKeys(JsonView obj) {
  if (!obj.is_object()) return json();
  json slim;
  // One pass over the members (a search per key walked them twice); the
  // first of a repeated key is kept, as a search finds it.
  obj.ForEachMember([&](std::string_view k, JsonView v) {
    if (k == "checks" && !(slim.is_object() && slim.contains(k))) slim[std::string(k)] = v.ToJson();
  });
  return slim;
}

// The same for a component, from its members as ReadComponent gathered them.
json ComponentLaterKeys(JsonView obj, const ComponentMembers& m) {
  if (!obj.is_object()) return obj.ToJson();
  json slim;
  for (const ComponentKey key : {kKeyChecks, kKeyFixed})
    if (m.fixed[key]) slim[std::string(kComponentKeys[key])] = m.fixed[key].ToJson();
  return slim;
}

// Reads each element of a loop's "nodes" or "components" array (straight
// from the fast parse's tape when it was left there, else from `items`)
// with its pointer, built in one reused string from `stem`
// ("/loops/0/nodes/"); what the later readers need (`later` of the element
// read) is left in `items`. `ahead` is shown each element before the one
// before it is read (ids whose table slots it asks for: PrefetchIds).
template <class Read, class Later, class Ahead>
void ForEachElement(json& items, std::string stem, bool nodes, CaseContext& c, Read read, Later later,
                    Ahead ahead) {
  const size_t base = stem.size();
  // In order, one ahead (the fast parse's array is walked forwards).
  auto element = [&](size_t i, JsonView* v) {
    *v = JsonView(items[i]);
    return LazyElement(c.lazy, c.loop_index, nodes, i, v);
  };
  JsonView view, next;
  bool from_tape = !items.empty() && element(0, &view), next_from_tape = false;
  for (size_t i = 0; i < items.size() && !LoadAbandoned(c.lazy); ++i) {
    if (i + 1 < items.size()) {
      next_from_tape = element(i + 1, &next);
      ahead(next);
    }
    stem.resize(base);
    stem += std::to_string(i);
    read(view, stem, static_cast<int>(i));
    if (c.thin_document)
      items[i] = later(view);
    else if (from_tape)
      items[i] = view.ToJson();
    view = next;
    from_tape = next_from_tape;
  }
}

// Asks for the table slots where the ids of an element still to be read
// (a node's id; a component's id and ends) will be looked up: a plant-size
// table lies beyond the caches, and a whole element's reading then hides
// the miss.
void PrefetchIds(JsonView e, const LoopSpec& loop, bool component) {
  if (!e.is_object()) return;
  for (const char* key : {"id", "from", "to"}) {
    const JsonView v = e.Find(key);
    if (v.is_string()) {
      loop.node_lookup.Prefetch(v.str());
      if (component && key[0] == 'i') loop.component_lookup.Prefetch(v.str());
    }
    if (!component) return;
  }
}

void ReadNodes(json& lj, const std::string& ptr, CaseContext& c, LoopSpec* loop) {
  DrainRefs drain_refs;
  if (!lj.contains("nodes") || !lj["nodes"].is_array()) {
    c.diag.Error(lj.contains("nodes") ? "wrong-type" : "missing-field", ptr + (lj.contains("nodes") ? "/nodes" : ""),
                 "a loop needs \"nodes\": an array of node objects");
  } else {
    json& nodes = lj["nodes"];
    loop->nodes.reserve(nodes.size());
    loop->node_lookup.Reserve(nodes.size(), [loop](int i) -> const std::string& { return loop->nodes[i].id; });
    ForEachElement(nodes, ptr + "/nodes/", true, c,
                   [&](JsonView nj, const std::string& p, int i) { ReadNode(nj, p, i, c, loop, &drain_refs); },
                   NodeLaterKeys, [loop](JsonView next) { PrefetchIds(next, *loop, false); });
  }
  ResolveDrains(drain_refs, c, loop);
}

// A component's "from" and "to" node references.
void ReadComponentEnds(const ComponentMembers& m, const std::string& p, CaseContext& c,
                       const LoopSpec& loop, ComponentSpec* comp) {
  std::string_view from, to;  // views into the document: looked up, not kept
  for (auto [key, dst, idx] : {std::tuple{kKeyFrom, &from, &comp->from}, std::tuple{kKeyTo, &to, &comp->to}}) {
    const char* name = key == kKeyFrom ? "from" : "to";
    if (!c.ReadStringView(m.fixed[key], name, p, dst, true)) continue;
    *idx = loop.node_lookup.Find(*dst, [&loop](int i) -> const std::string& { return loop.nodes[i].id; });
    if (*idx < 0) {
      const std::string near = NearestNodeId(loop, std::string(*dst));
      c.diag.Error("unknown-reference", p + "/" + name,
                   fmt::format("no node \"{}\" in loop \"{}\"{}", *dst, loop.id,
                               near.empty() ? "" : fmt::format("; did you mean \"{}\"?", near)));
    }
  }
  if (!from.empty() && from == to)
    c.diag.Error("self-loop", p + "/to", fmt::format("component \"{}\" runs from node \"{}\" to itself", comp->id, from));
}

// The component's part (if any) and its type, given or taken from the part;
// returns the part whose values apply (null if none or if it does not fit).
const PartEntry* ReadComponentType(const ComponentMembers& m, const std::string& p, CaseContext& c,
                                   LoopSpec* loop, ComponentSpec* comp) {
  const PartEntry* part = nullptr;
  const bool has_part = m.fixed[kKeyPart].present();
  if (has_part) {
    std::string pid;
    if (c.ReadStringValue(m.fixed[kKeyPart], "part", p, &pid, true)) {
      part = c.ResolvePart(pid, p + "/part");
      comp->extras().part = *loop->part_ids.insert(std::move(pid)).first;
    }
  }
  std::string type;
  if (m.fixed[kKeyType]) {
    c.ReadStringValue(m.fixed[kKeyType], "type", p, &type, true);
  } else if (part) {
    type = part->type;
  } else if (!has_part) {  // an unresolved part was reported already
    c.diag.Error("missing-field", p, "missing required field \"type\" (or a \"part\" that gives it)");
  }
  if (type.empty()) return part;
  comp->type_info = FindComponentType(type);
  if (!comp->type_info) {
    std::string near = NearestName(type, ComponentTypeNames());
    c.diag.Error("unknown-type", p + "/type",
                 fmt::format("unknown component type \"{}\"{}; known types: {}", type,
                             near.empty() ? "" : fmt::format(" (did you mean \"{}\"?)", near),
                             fmt::join(ComponentTypeNames(), ", ")));
    return part;
  }
  comp->type() = comp->type_info->name;
  if (part && part->type != type) {
    c.diag.Error("bad-part", p + "/part",
                 fmt::format("part \"{}\" is a {}, but the component's type is {}", part->id, part->type, type));
    part = nullptr;
  }
  return part;
}

// Feed margin, parameters and the model of a component of a known type.
void BuildComponent(const ComponentMembers& m, const std::string& p, const PartEntry* part, CaseContext& c,
                    ModelArena* models, ComponentSpec* comp) {
  if (const JsonView margin = m.fixed[kKeyFeedMargin]) {
    if (!(comp->type_info->roles & kRoleBearing))
      c.diag.Error("unknown-field", p + "/feed_margin", "feed_margin applies to bearings only");
    else
      c.ReadQuantity(margin, p + "/feed_margin", Dimension::kPressureDifference, &comp->extras().housing_margin);
  }
  const size_t before = c.diag.ErrorCount(), bound_before = c.invalid_bindings;
  ReadGatheredParams(m, p, part, c, comp, &c.param_values);
  if (c.diag.ErrorCount() != before || c.invalid_bindings != bound_before) return;
  std::vector<ParamError> errs;
  // The model keeps what it needs of the values (its params() begin with
  // them: network/case/case_consistency.cpp reads them there).
  comp->model = models->Place(comp->type_info->make(c.param_values, &errs));
  for (auto& e : errs)
    // e.param is a spec name, possibly with a pointer suffix ("curve/2").
    c.diag.Error("bad-parameter", e.param.empty() ? p : p + "/" + e.param, e.message);
  if (!comp->model && errs.empty())
    c.diag.Error("bad-parameter", p, "the component could not be built from these parameters");
}

// A thermostatic valve's "sensed_node" (default: its from node); an error on any other type.
void ReadSensedNode(const ComponentMembers& m, const std::string& p, CaseContext& c,
                    const LoopSpec& loop, ComponentSpec* comp) {
  const bool thermostat = comp->type_info && (comp->type_info->roles & kRoleThermostat);
  if (!m.fixed[kKeySensedNode]) {
    if (thermostat) comp->extras().sensed_node = comp->from;
    return;
  }
  if (!thermostat) {
    c.diag.Error("unknown-field", p + "/sensed_node", "sensed_node applies to thermostatic valves only");
    return;
  }
  std::string id;
  if (!c.ReadStringValue(m.fixed[kKeySensedNode], "sensed_node", p, &id, true)) return;
  comp->extras().sensed_node = loop.NodeIndex(id);
  if (comp->sensed_node() < 0) {
    const std::string near = NearestNodeId(loop, id);
    c.diag.Error("unknown-reference", p + "/sensed_node",
                 fmt::format("no node \"{}\" in loop \"{}\"{}", id, loop.id,
                             near.empty() ? "" : fmt::format("; did you mean \"{}\"?", near)));
  }
}

void ReadComponent(JsonView cj, const std::string& p, int index, CaseContext& c, LoopSpec* loop) {
  if (!cj.is_object()) {
    c.diag.Error("wrong-type", p, "expected a component object {id, type, from, to, ...}, got " + TypeName(cj));
    return;
  }
  // Its members gathered once (one pass instead of a search per key, which
  // also finds a repeated key).
  ComponentMembers& m = c.component_members;
  GatherMembers(cj, &m);
  if (m.repeated) MarkRepeatedKey(c.lazy);
  ComponentSpec comp;
  comp.index = index;
  if (!c.ReadStringValue(m.fixed[kKeyId], "id", p, &comp.id, true) || !c.CheckId(comp.id, p, "/id")) return;
  // Added before it is stored, as a node's id (ReadNode).
  const bool fresh = loop->component_lookup.Add(comp.id, static_cast<int>(loop->components.size()),
                                                [loop](int i) -> const std::string& { return loop->components[i].id; });
  const bool node = loop->NodeIndex(comp.id) >= 0;
  if (!fresh || node)
    c.diag.Error("duplicate-id", p + "/id",
                 fmt::format("id \"{}\" is already used by a {} in loop \"{}\"", comp.id,
                             node ? "node" : "component", loop->id));
  ReadComponentEnds(m, p, c, *loop, &comp);
  const PartEntry* part = ReadComponentType(m, p, c, loop, &comp);
  if (comp.type_info) BuildComponent(m, p, part, c, &loop->models, &comp);
  ReadSensedNode(m, p, c, *loop, &comp);
  if (const JsonView v = m.fixed[kKeyVolume]) ReadHoldupVolume(v, p + "/volume", c, &comp.volume);
  loop->components.push_back(std::move(comp));
}

// False when the case holds too many components (reported; the loop is dropped).
bool ReadComponents(json& lj, const std::string& ptr, CaseContext& c, LoopSpec* loop,
                    size_t* component_total) {
  if (!lj.contains("components") || !lj["components"].is_array()) {
    c.diag.Error(lj.contains("components") ? "wrong-type" : "missing-field",
                 ptr + (lj.contains("components") ? "/components" : ""),
                 "a loop needs \"components\": an array of component objects");
    return true;
  }
  json& comps = lj["components"];
  *component_total += comps.size();
  if (*component_total > kMaxComponents) {
    c.diag.Error("too-large", ptr + "/components",
                 fmt::format("more than {} components in the case", kMaxComponents));
    return false;
  }
  loop->components.reserve(comps.size());
  loop->component_lookup.Reserve(comps.size(), [loop](int i) -> const std::string& { return loop->components[i].id; });
  ForEachElement(comps, ptr + "/components/", false, c,
                 [&](JsonView cj, const std::string& p, int i) { ReadComponent(cj, p, i, c, loop); },
                 [&c](JsonView cj) { return ComponentLaterKeys(cj, c.component_members); },
                 [loop](JsonView next) { PrefetchIds(next, *loop, true); });
  return true;
}

// A connected piece of a loop: its first four nodes (indices, in the loop's
// order) and how many it holds, enough to name it (no copy of every id: a
// plant-size loop is one piece of millions of nodes).
struct LoopPiece {
  std::vector<int> first;
  size_t count = 0;
};

// Nodes no component touches are reported; returns the connected pieces
// (by root) of the nodes that are connected.
std::map<int, LoopPiece> ConnectedPieces(const LoopSpec& loop, CaseContext& c) {
  std::vector<int> degree(loop.nodes.size(), 0);
  std::vector<int> parent(loop.nodes.size());
  std::iota(parent.begin(), parent.end(), 0);
  auto find = [&](int a) {
    while (parent[a] != a) a = parent[a] = parent[parent[a]];
    return a;
  };
  for (auto& comp : loop.components) {
    if (comp.from < 0 || comp.to < 0) continue;
    degree[comp.from]++;
    degree[comp.to]++;
    parent[find(comp.from)] = find(comp.to);
  }
  for (size_t i = 0; i < loop.nodes.size(); ++i)
    if (degree[i] == 0)
      c.diag.Error("unreached-node", loop.NodePointer(loop.nodes[i]),
                   fmt::format("node \"{}\" is not connected to any component", loop.nodes[i].id));
  std::map<int, LoopPiece> pieces;
  for (size_t i = 0; i < loop.nodes.size(); ++i) {
    if (degree[i] == 0) continue;
    LoopPiece& p = pieces[find(static_cast<int>(i))];
    if (p.count++ < 4) p.first.push_back(static_cast<int>(i));
  }
  return pieces;
}

// Topology: boundaries, reach, connectivity.
void CheckLoopTopology(const LoopSpec& loop, const std::string& ptr, CaseContext& c, const Case& cs) {
  bool has_ref = std::any_of(loop.nodes.begin(), loop.nodes.end(),
                             [](const NodeSpec& n) { return n.boundary != BoundaryKind::kNone; });
  if (!has_ref)
    c.diag.Error("no-pressure-reference", ptr + "/nodes",
                 fmt::format("loop \"{}\" has no pressure reference: give at least one node a \"boundary\" "
                             "(reservoir, tank or pressure)", loop.id));
  const std::map<int, LoopPiece> pieces = ConnectedPieces(loop, c);
  if (pieces.size() > 1) {
    std::vector<std::string> desc;
    for (auto& [root, piece] : pieces) {
      std::vector<std::string_view> ids;
      for (int i : piece.first) ids.push_back(loop.nodes[i].id);
      desc.push_back("{" + fmt::format("{}", fmt::join(ids, ", ")) + (piece.count > 4 ? ", ..." : "") + "}");
    }
    c.diag.Error("disconnected", ptr,
                 fmt::format("loop \"{}\" is split into {} disconnected pieces: {}; connect them or make "
                             "them separate loops",
                             loop.id, pieces.size(), fmt::join(desc, " | ")));
  } else if (has_ref) {
    // Every piece must hold a reference; with one piece that is has_ref.
    CheckFixedFlowIslands(loop, cs.envelope, c);
  }
  CheckBoundaryPressures(loop, cs.envelope, c.ambient_pa, c);
  CheckBoundPairs(loop, cs.envelope, c);
  CheckBoundValues(loop, cs.envelope, c);
  CheckBoundaryToBoundary(loop, c);
}

void ReadLoop(json& lj, const std::string& ptr, CaseContext& c, Case* cs,
              size_t* component_total) {
  LoopSpec loop;
  loop.pointer = ptr;
  if (!lj.is_object()) {
    c.diag.Error("wrong-type", ptr, "expected a loop object {id, fluid, nodes, components}, got " + TypeName(lj));
    return;
  }
  c.UnknownKeys(lj, ptr, {"id", "fluid", "temperature", "nodes", "components", "checks"});
  if (c.ReadString(lj, "id", ptr, &loop.id, true)) c.CheckId(loop.id, ptr + "/id");
  ReadLoopFluid(lj, ptr, c, *cs, &loop);
  if (lj.contains("temperature"))
    c.ReadQuantity(lj["temperature"], ptr + "/temperature", Dimension::kTemperature, &loop.temperature,
                   &loop.temperature_variable);
  ReadNodes(lj, ptr, c, &loop);
  if (!ReadComponents(lj, ptr, c, &loop, component_total)) return;
  if (!loop.nodes.empty() && c.diag.ErrorCount() == c.loop_errors_before) CheckLoopTopology(loop, ptr, c, *cs);
  for (auto& l : cs->loops)
    if (l.id == loop.id && !loop.id.empty())
      c.diag.Error("duplicate-id", ptr + "/id", fmt::format("loop \"{}\" is declared twice", loop.id));
  cs->loops.push_back(std::move(loop));
}

}  // namespace

const PartEntry* CaseContext::ResolvePart(const std::string& ref, const std::string& ptr) {
  size_t hash = ref.find('#');
  if (hash == std::string::npos) {
    const PartEntry* p = library.Find(ref);
    if (!p) {
      std::string near = NearestName(ref, library.Ids());
      diag.Error("unknown-part", ptr,
                 fmt::format("no part \"{}\" in the parts library{}", ref,
                             near.empty() ? "; see `loopwright library list`" : fmt::format("; did you mean \"{}\"?", near)));
    }
    return p;
  }
  std::string file = ref.substr(0, hash), id = ref.substr(hash + 1);
  std::string real, error;
  if (!ResolveContainedFile(std::filesystem::path(case_path).parent_path().string(), file, &real, &error)) {
    diag.Error("part-path-outside", ptr, fmt::format("part file \"{}\" {}", file, error));
    return nullptr;
  }
  auto it = local_parts.find(real);
  if (it == local_parts.end()) {
    PartsCatalog cat;
    LoadPartsFile(real, &cat);
    it = local_parts.emplace(real, std::move(cat)).first;
  }
  if (!it->second.errors.empty()) {
    const std::string& e = it->second.errors.front();
    const bool unreadable = e.find("not a regular file") != std::string::npos || e.find("bytes") != std::string::npos;
    diag.Error(unreadable ? "bad-part-file" : "unknown-part", ptr,
               unreadable ? fmt::format("part file \"{}\" {}", file, e.substr(std::min(e.size(), real.size() + 2))) : e);
    return nullptr;
  }
  const PartEntry* p = it->second.Find(id);
  if (!p) {
    std::string near = NearestName(id, it->second.Ids());
    diag.Error("unknown-part", ptr,
               fmt::format("no part \"{}\" in {}{}", id, file, near.empty() ? "" : fmt::format("; did you mean \"{}\"?", near)));
  }
  return p;
}

namespace {

void ReadFlag(const json& doc, const char* key, CaseContext& c, bool* out) {
  if (!doc.contains(key)) return;
  if (doc[key].is_boolean()) *out = doc[key].get<bool>();
  else c.diag.Error("wrong-type", std::string("/") + key, "expected true or false, got " + TypeName(doc[key]));
}

// name, description, thermal, work_heat, ambient_pressure.
void ReadCaseHeader(const json& doc, CaseContext& c, Case* cs) {
  ReadFlag(doc, "thermal", c, &cs->thermal);
  ReadFlag(doc, "work_heat", c, &cs->work_heat);
  c.ReadString(doc, "name", "", &cs->name, true);
  if (doc.contains("description")) c.ReadString(doc, "description", "", &cs->description, false);
  if (doc.contains("ambient_pressure")) {
    // An absolute pressure, written as a magnitude ("101.3 kPa", "14.7 psi").
    if (c.ReadQuantity(doc["ambient_pressure"], "/ambient_pressure", Dimension::kPressureDifference, &cs->ambient_pa) &&
        !(cs->ambient_pa > 1000.0 && cs->ambient_pa < 2e5))
      c.diag.Error("out-of-range", "/ambient_pressure", "ambient (absolute) pressure must lie between 1 kPa and 200 kPa");
    c.ambient_pa = cs->ambient_pa;
  }
}

void ReadEnvelope(const json& doc, CaseContext& c, Case* cs) {
  if (!doc.contains("envelope")) {
    cs->envelope.points.push_back({"nominal", {}});
    return;
  }
  const json& env = doc["envelope"];
  if (!env.is_object()) {
    c.diag.Error("wrong-type", "/envelope", "expected an object {variables, points, grids}, got " + TypeName(env));
    return;
  }
  c.UnknownKeys(env, "/envelope", {"variables", "points", "grids", "derived"});
  ReadVariables(env, "/envelope", c, &cs->envelope);
  ReadPoints(env, "/envelope", c, &cs->envelope);
  if (env.contains("derived")) ReadDerived(env["derived"], "/envelope/derived", c, cs);
}

// A top-level section that must be a non-empty object or array; false
// (reported) if it is missing, of the wrong type or empty. `what` completes
// "a case needs \"key\": ...", `empty_what` "\"key\" is empty; a case needs ...".
bool RequireSection(const json& doc, const char* key, bool array, const char* what, const char* empty_what,
                    CaseContext& c) {
  const bool present = doc.contains(key);
  const bool right_type = present && (array ? doc[key].is_array() : doc[key].is_object());
  if (right_type && doc[key].empty()) {
    c.diag.Error("empty", std::string("/") + key, fmt::format("\"{}\" is empty; a case needs {}", key, empty_what));
    return false;
  }
  if (!right_type) {
    c.diag.Error(present ? "wrong-type" : "missing-field", present ? std::string("/") + key : std::string(),
                 fmt::format("a case needs \"{}\": {}", key, what) +
                     (present ? ", got " + TypeName(doc[key]) : std::string()));
    return false;
  }
  return true;
}

// Every envelope point must give an oil: KV100 below KV40.
void CheckOilAtPoints(const FluidBinding& binding, const std::string& p, const Envelope& e, CaseContext& c) {
  for (const auto& op : e.points) {
    auto at = [&](int var, double fixed) { return var >= 0 && var < int(op.values.size()) ? op.values[var] : fixed; };
    const double k40 = at(binding.kv40_var, binding.kv40), k100 = at(binding.kv100_var, binding.kv100);
    std::string err;
    if (!OilFluid::FromTwoPoints(k40, 313.15, k100, 373.15, binding.oil->extras(), &err)) {
      c.diag.Error("bad-fluid", p + (binding.kv40_var >= 0 ? "/kv40" : "/kv100"),
                   fmt::format("at envelope point \"{}\": {}", op.name, err));
      return;
    }
  }
}

void ReadFluids(const json& doc, CaseContext& c, Case* cs) {
  if (!RequireSection(doc, "fluids", false, "an object {id: fluid definition} with at least one fluid",
                      "at least one fluid {id: fluid definition}", c))
    return;
  for (auto it = doc["fluids"].begin(); it != doc["fluids"].end(); ++it) {
    std::string p = "/fluids/" + PointerToken(it.key());
    if (!c.CheckId(it.key(), p)) continue;
    FluidBinding binding;
    FluidPtr f = BuildFluid(it.value(), p, c, &binding);
    cs->fluids[it.key()] = f;  // null if declared but broken: no cascade of reference errors
    if (f && binding.oil) {
      binding.fluid_id = it.key();
      CheckOilAtPoints(binding, p, cs->envelope, c);
      cs->fluid_bindings.push_back(binding);
    }
  }
}

void ReadLoops(json& doc, CaseContext& c, Case* cs) {
  if (!RequireSection(doc, "loops", true, "an array with at least one loop",
                      "at least one loop {id, fluid, nodes, components}", c))
    return;
  size_t total = 0;
  for (size_t i = 0; i < doc["loops"].size(); ++i) {
    c.loop_errors_before = c.diag.ErrorCount();
    c.loop_index = i;
    ReadLoop(doc["loops"][i], "/loops/" + std::to_string(i), c, cs, &total);
    if (total > kMaxComponents) break;
  }
}

std::atomic<size_t> case_texts_read{0};

}  // namespace

size_t CaseTextsRead() { return case_texts_read.load(); }

// Whether a design question picks among parts: it re-reads its component's
// whole object after the loops are read.
static bool HasPartChoices(const json& doc) {
  if (!doc.is_object() || !doc.contains("design") || !doc["design"].is_array()) return false;
  for (const json& q : doc["design"])
    if (q.is_object() && q.contains("candidates")) return true;
  return false;
}

// The case from its parsed document (thinned while it is read).
static LoadResult LoadCaseDocument(json& doc, LazyElements* lazy, LoadResult result, const std::string& path,
                                   const std::string& library_dir) {
  auto cs = std::make_unique<Case>();
  cs->path = path;
  CaseContext c(result.diagnostics, &cs->envelope);
  c.case_path = path;
  c.lazy = lazy;
  c.thin_document = !HasPartChoices(doc);
  c.library = LoadPartsCatalog(library_dir);
  for (auto& e : c.library.errors) c.diag.Warn("library", "", e);
  if (!doc.is_object()) {
    c.diag.Error("wrong-type", "", "a case file is a JSON object, got " + TypeName(doc));
    return result;
  }
  c.UnknownKeys(doc, "", {"$schema", "name", "description", "ambient_pressure", "thermal", "work_heat", "fluids", "loops",
                          "couplings", "envelope", "checks", "design", "knobs", "tolerances", "thermal_masses",
                          "scenarios"});
  ReadCaseHeader(doc, c, cs.get());
  // Envelope variables first: other sections may bind to them.
  ReadEnvelope(doc, c, cs.get());
  ReadFluids(doc, c, cs.get());
  ReadLoops(doc, c, cs.get());
  ReleaseDocument(lazy);  // the loops' elements are read: the fast parse's document is not needed
  if (doc.contains("couplings")) ValidateCouplings(doc["couplings"], "/couplings", c, *cs);
  ValidateChecks(doc.contains("checks") ? doc["checks"] : json::object(), "/checks", c, *cs);  // the defaults too
  ValidatePlacedChecks(doc, c, *cs);  // "checks" on loops, components and nodes
  if (doc.contains("design")) ValidateDesign(doc["design"], "/design", c, *cs, doc);
  ReadKnobPolicy(doc, c, *cs);  // network/case/knobs.cpp
  ReadTolerances(doc, c, *cs);  // network/case/tolerances.cpp
  ReadTransientSections(doc, c, *cs);  // network/case/case_transient.cpp
  NoteHeatWithoutThermal(*cs, c);
  if (c.diag.HasErrors()) return result;
  result.value = std::move(cs);
  return result;
}

// The exact parser's load (ParseJsonText: every message with its line and
// column); *release, if given, is the text, freed once parsed.
static std::atomic<size_t> exact_parses{0};

size_t CaseTextsParsedExactly() { return exact_parses.load(); }

static LoadResult LoadExact(const std::string& text, std::string* release, const std::string& path,
                            const std::string& library_dir, size_t max_bytes) {
  ++exact_parses;
  LoadResult result;
  json doc;
  if (!ParseJsonText(text, &doc, &result.diagnostics, max_bytes)) return result;
  if (release) std::string().swap(*release);
  return LoadCaseDocument(doc, nullptr, std::move(result), path, library_dir);
}

// The fast parse's load (network/case/fast_parse.h) of the document it
// parsed into *out; false when the exact parser must read the text: found
// while a loop's elements are read (a repeated key, a window simdjson
// refuses), and then the load is dropped.
static bool LoadFast(json& doc, LazyElementsPtr lazy, const std::string& path, const std::string& library_dir,
                     LoadResult* out) {
  LoadResult r = LoadCaseDocument(doc, lazy.get(), LoadResult{}, path, library_dir);
  if (NeedsExactParse(lazy.get())) return false;
  *out = std::move(r);
  return true;
}

LoadResult LoadCaseText(const std::string& text, const std::string& path, const std::string& library_dir,
                        size_t max_bytes) {
  ++case_texts_read;
  LoadResult result;
  json doc;
  LazyElementsPtr lazy;
  if (text.size() <= max_bytes && FastParse(text, &doc, &lazy) &&
      LoadFast(doc, std::move(lazy), path, library_dir, &result))
    return result;
  return LoadExact(text, nullptr, path, library_dir, max_bytes);
}

// A regular file within the limit only (the same reader as part files);
// false with the reason in *result.
static bool ReadCaseFileText(const std::string& path, size_t max_bytes, std::string* text, LoadResult* result) {
  std::string error;
  if (ReadRegularFile(path, max_bytes, text, &error)) return true;
  const bool too_large = error.find("bytes") != std::string::npos;
  result->diagnostics.Error(too_large ? "too-large" : "cannot-read", "",
                            too_large ? "the file " + error + "; a larger case is read with --max-case-size (e.g. "
                                                                 "--max-case-size 64MiB)"
                                      : fmt::format("\"{}\" {}", path, error));
  return false;
}

// The fast parse reads the file in windows (never whole); the exact parser,
// when it must, reads the whole text (the same reader as part files).
LoadResult LoadCaseFile(const std::string& path, const std::string& library_dir, size_t max_bytes) {
  LoadResult result;
  json doc;
  LazyElementsPtr lazy;
  const bool scanned = FastParseFile(path, max_bytes, &doc, &lazy);
  if (scanned) {
    ++case_texts_read;
    if (LoadFast(doc, std::move(lazy), path, library_dir, &result)) return result;
  }
  doc = json();
  std::string text;
  if (!ReadCaseFileText(path, max_bytes, &text, &result)) return result;
  if (!scanned) ++case_texts_read;
  return LoadExact(text, &text, path, library_dir, max_bytes);
}

bool ParseByteSize(const std::string& text, size_t* bytes, std::string* error) {
  static const std::pair<const char*, double> kUnits[] = {
      {"B", 1}, {"kB", 1e3}, {"MB", 1e6}, {"GB", 1e9}, {"KiB", 1024.0}, {"MiB", 1048576.0}, {"GiB", 1073741824.0}};
  size_t end = 0;
  double value = 0;
  try {
    value = std::stod(text, &end);
  } catch (const std::exception&) {
    end = 0;
  }
  std::string unit = text.substr(end);
  unit.erase(0, std::min(unit.find_first_not_of(' '), unit.size()));
  const auto* u = std::find_if(std::begin(kUnits), std::end(kUnits), [&](const auto& k) { return unit == k.first; });
  if (end == 0 || u == std::end(kUnits)) {
    *error = fmt::format("\"{}\" is not a size with a unit (B, kB, MB, GB, KiB, MiB, GiB), e.g. \"64 MiB\"", text);
    return false;
  }
  const double b = value * u->second;
  if (!(b >= 1024.0 && b <= 1099511627776.0)) {
    *error = fmt::format("\"{}\" is outside 1 KiB ... 1 TiB", text);
    return false;
  }
  *bytes = static_cast<size_t>(b);
  return true;
}

}  // namespace loopwright
