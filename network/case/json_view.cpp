#include "network/case/json_view.h"

#include <string>

namespace loopwright {

namespace dom = simdjson::dom;
using nlohmann::json;

json DomToJson(dom::element e, bool* repeated) {
  switch (e.type()) {
    case dom::element_type::ARRAY: {
      const dom::array arr = e.get_array().value_unsafe();
      json j(json::value_t::array);
      auto& a = j.get_ref<json::array_t&>();
      a.reserve(arr.size());
      for (dom::element x : arr) a.push_back(DomToJson(x, repeated));
      return j;
    }
    case dom::element_type::OBJECT: {
      const dom::object obj = e.get_object().value_unsafe();
      json j(json::value_t::object);
      auto& o = j.get_ref<json::object_t&>();
      for (dom::key_value_pair kv : obj)
        if (!o.emplace(std::string(kv.key), DomToJson(kv.value, repeated)).second) *repeated = true;
      return j;
    }
    case dom::element_type::INT64: {
      const int64_t v = e.get_int64().value_unsafe();
      return v >= 0 ? json(static_cast<uint64_t>(v)) : json(v);
    }
    case dom::element_type::UINT64: return json(e.get_uint64().value_unsafe());
    case dom::element_type::DOUBLE: return json(e.get_double().value_unsafe());
    case dom::element_type::STRING: return json(std::string(e.get_string().value_unsafe()));
    case dom::element_type::BOOL: return json(e.get_bool().value_unsafe());
    default: return json(nullptr);
  }
}

// An object's keys compared pairwise, lengths first (a component or node
// has about ten; an object of more than 32 keys is checked through its copy).
bool HasRepeatedKey(dom::element e) {
  dom::array arr;
  if (e.get(arr) == simdjson::SUCCESS) {
    for (dom::element x : arr)
      if ((x.type() == dom::element_type::OBJECT || x.type() == dom::element_type::ARRAY) && HasRepeatedKey(x))
        return true;
    return false;
  }
  dom::object obj;
  if (e.get(obj) != simdjson::SUCCESS) return false;
  if (obj.size() > 32) {
    bool repeated = false;
    DomToJson(e, &repeated);
    return repeated;
  }
  std::string_view keys[32];
  size_t n = 0;
  for (dom::key_value_pair kv : obj) {
    const dom::element_type type = kv.value.type();  // only an object or array nests keys
    if ((type == dom::element_type::OBJECT || type == dom::element_type::ARRAY) && HasRepeatedKey(kv.value))
      return true;
    for (size_t i = 0; i < n; ++i)
      if (keys[i].size() == kv.key.size() && keys[i] == kv.key) return true;
    keys[n++] = kv.key;
  }
  return false;
}

json JsonView::ToJson() const {
  if (j_) return *j_;
  bool repeated = false;
  return dom_ ? DomToJson(e_, &repeated) : json();
}

}  // namespace loopwright
