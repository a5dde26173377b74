#include "network/case/fast_parse.h"

#include <string_view>
#include <vector>

#include <simdjson.h>

#include "network/case/case.h"
#include "network/case/json_view.h"

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
  bool exact = false;  // the exact parser must read the text (a repeated key)
};

void LazyElementsDeleter::operator()(LazyElements* p) const { delete p; }

namespace {

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
      if (!o.emplace(std::string(kv.key), DomToJson(kv.value, &lazy->exact)).second) lazy->exact = true;
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
    *doc = DomToJson(root, &l->exact);
    if (l->exact) return false;
    *lazy = std::move(l);
    return true;
  }
  json j(json::value_t::object);
  auto& o = j.get_ref<json::object_t&>();
  for (dom::key_value_pair kv : top) {
    dom::array loops;
    if (kv.key != "loops" || kv.value.get(loops) != simdjson::SUCCESS) {
      if (!o.emplace(std::string(kv.key), DomToJson(kv.value, &l->exact)).second) l->exact = true;
      continue;
    }
    json list(json::value_t::array);
    auto& items = list.get_ref<json::array_t&>();
    for (dom::element loop : loops) {
      dom::object lo;
      items.push_back(loop.get(lo) == simdjson::SUCCESS ? LoopToJson(lo, items.size(), l.get())
                                                         : DomToJson(loop, &l->exact));
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

void ReleaseDocument(LazyElements* lazy) {
  if (!lazy) return;
  lazy->exact = NeedsExactParse(lazy);  // reads the arrays' sizes from the tape
  lazy->arrays.clear();
  lazy->document = dom::document();
}

bool LazyElement(LazyElements* lazy, size_t loop, bool nodes, size_t index, JsonView* view) {
  if (!lazy) return false;
  for (LazyElements::Array& a : lazy->arrays) {
    if (a.loop != loop || a.nodes != nodes) continue;
    if (index < a.next) {
      a.at = a.items.begin();
      a.next = 0;
    }
    for (; a.next < index; ++a.next) ++a.at;
    *view = JsonView(*a.at);
    if ((nodes || !(*a.at).is_object()) && HasRepeatedKey(*a.at)) lazy->exact = true;
    ++a.at;
    ++a.next;
    return true;
  }
  return false;
}

void MarkRepeatedKey(LazyElements* lazy) {
  if (lazy) lazy->exact = true;
}

}  // namespace loopwright
