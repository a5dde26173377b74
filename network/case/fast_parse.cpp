#include "network/case/fast_parse.h"

#include <string_view>
#include <vector>

#include <simdjson.h>

#include "network/case/case.h"

namespace loopwright {

namespace dom = simdjson::dom;
using nlohmann::json;

class LazyElements {
 public:
  struct Array {
    size_t loop = 0;
    bool nodes = false;
    dom::array items;
    dom::array::iterator at;  // element `next`
    size_t next = 0;
  };
  dom::document document;  // the tape and strings (the parser is dropped once done)
  std::vector<Array> arrays;
  bool exact = false;  // the exact parser must read the text (ToJson)
};

void LazyElementsDeleter::operator()(LazyElements* p) const { delete p; }

namespace {

// The value as nlohmann's parser builds it (a non-negative integer is
// number_unsigned there; both read "-0" as the integer 0 and "-0.0" as the
// double -0.0). *exact is set where nlohmann's parser would report the
// text: a key repeated in an object (reported with its pointer).
json ToJson(dom::element e, bool* exact) {
  switch (e.type()) {
    case dom::element_type::ARRAY: {
      const dom::array arr = e.get_array().value_unsafe();
      json j(json::value_t::array);
      auto& a = j.get_ref<json::array_t&>();
      a.reserve(arr.size());
      for (dom::element x : arr) a.push_back(ToJson(x, exact));
      return j;
    }
    case dom::element_type::OBJECT: {
      const dom::object obj = e.get_object().value_unsafe();
      json j(json::value_t::object);
      auto& o = j.get_ref<json::object_t&>();
      for (dom::key_value_pair kv : obj)
        if (!o.emplace(std::string(kv.key), ToJson(kv.value, exact)).second) *exact = true;
      return j;
    }
    case dom::element_type::INT64: {
      const int64_t v = e.get_int64().value_unsafe();
      return v >= 0 ? json(static_cast<uint64_t>(v)) : json(v);
    }
    case dom::element_type::UINT64: {
      const uint64_t v = e.get_uint64().value_unsafe();
      return json(v);
    }
    case dom::element_type::DOUBLE: {
      return json(e.get_double().value_unsafe());
    }
    case dom::element_type::STRING: {
      const std::string_view v = e.get_string().value_unsafe();
      return json(std::string(v));
    }
    case dom::element_type::BOOL: {
      const bool v = e.get_bool().value_unsafe();
      return json(v);
    }
    default:
      return json(nullptr);
  }
}

// One loop object: its "nodes" and "components" arrays left as nulls, to be
// filled element by element.
json LoopToJson(dom::object loop, size_t index, LazyElements* lazy) {
  json j(json::value_t::object);
  auto& o = j.get_ref<json::object_t&>();
  for (dom::key_value_pair kv : loop) {
    dom::array items;
    const bool nodes = kv.key == "nodes";
    if ((nodes || kv.key == "components") && kv.value.get(items) == simdjson::SUCCESS) {
      lazy->arrays.push_back({index, nodes, items, items.begin(), 0});
      if (!o.emplace(std::string(kv.key), json::array_t(items.size())).second) lazy->exact = true;
    } else {
      if (!o.emplace(std::string(kv.key), ToJson(kv.value, &lazy->exact)).second) lazy->exact = true;
    }
  }
  return j;
}

}  // namespace

bool FastParse(const std::string& text, json* doc, LazyElementsPtr* lazy) {
  static_assert(kFastParsePadding >= simdjson::SIMDJSON_PADDING, "simdjson reads this far past the text");
  LazyElementsPtr l(new LazyElements);
  dom::element root;
  {
    // Parsed into the document alone: the parser's own buffers (the
    // structural indexes, 4 bytes per token) are freed at once. A text
    // with room for the padding is read in place, else copied.
    dom::parser parser;
    const bool copy = text.capacity() < text.size() + kFastParsePadding;
    if (parser.allocate(text.size(), kMaxCaseDepth) != simdjson::SUCCESS ||
        parser.parse_into_document(l->document, reinterpret_cast<const uint8_t*>(text.data()), text.size(), copy)
                .get(root) != simdjson::SUCCESS)
      return false;
  }
  dom::object top;
  if (root.get(top) != simdjson::SUCCESS) {
    *doc = ToJson(root, &l->exact);
    if (l->exact) return false;
    *lazy = std::move(l);
    return true;
  }
  json j(json::value_t::object);
  auto& o = j.get_ref<json::object_t&>();
  for (dom::key_value_pair kv : top) {
    dom::array loops;
    if (kv.key != "loops" || kv.value.get(loops) != simdjson::SUCCESS) {
      if (!o.emplace(std::string(kv.key), ToJson(kv.value, &l->exact)).second) l->exact = true;
      continue;
    }
    json list(json::value_t::array);
    auto& items = list.get_ref<json::array_t&>();
    for (dom::element loop : loops) {
      dom::object lo;
      items.push_back(loop.get(lo) == simdjson::SUCCESS ? LoopToJson(lo, items.size(), l.get())
                                                         : ToJson(loop, &l->exact));
    }
    if (!o.emplace("loops", std::move(list)).second) l->exact = true;
  }
  if (l->exact) return false;
  *doc = std::move(j);
  *lazy = std::move(l);
  return true;
}

// An element never converted (a loop not read: too many components) might
// hold a repeated key the exact parser reports.
bool NeedsExactParse(const LazyElements* lazy) {
  if (!lazy) return false;
  for (const LazyElements::Array& a : lazy->arrays)
    if (a.next < a.items.size()) return true;
  return lazy->exact;
}

bool FillElement(LazyElements* lazy, size_t loop, bool nodes, size_t index, json* slot) {
  if (!lazy) return false;
  for (LazyElements::Array& a : lazy->arrays) {
    if (a.loop != loop || a.nodes != nodes) continue;
    if (index < a.next) {
      a.at = a.items.begin();
      a.next = 0;
    }
    for (; a.next < index; ++a.next) ++a.at;
    *slot = ToJson(*a.at, &lazy->exact);
    ++a.at;
    ++a.next;
    return true;
  }
  return false;
}

}  // namespace loopwright
