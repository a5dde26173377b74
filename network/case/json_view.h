// Internal to the case loader: a read-only view of one JSON value, so that
// one set of readers reads both documents the loader can hold. A view is
// either a value of an nlohmann document (the exact parser's, the parts
// library's, the sections read before and after the loops) or an element of
// simdjson's DOM (the fast parse's loop nodes and components, read straight
// from its tape with no nlohmann object built). Both answer the same: a
// number's double is nlohmann's get<double>, a string its bytes, and Shown /
// TypeName (case_context.h) print what nlohmann prints. A view holds no
// copy: the document it looks into must outlive it. An object's members are
// visited in the document's order for simdjson, in key order for nlohmann;
// a reader that reports per member sorts what it reports (UnknownKeys).
// See DEVELOPERS.md, "Readers over simdjson's elements".
#pragma once

#include <cstddef>
#include <string_view>

#include <nlohmann/json.hpp>
#include <simdjson.h>

namespace loopwright {

class JsonView {
 public:
  JsonView() = default;  // absent (a key not found)
  JsonView(const nlohmann::json& j) : j_(&j) {}  // NOLINT: readers take either document's values
  explicit JsonView(simdjson::dom::element e) : e_(e), dom_(true) {}

  bool present() const { return j_ || dom_; }
  explicit operator bool() const { return present(); }
  bool is_object() const { return j_ ? j_->is_object() : dom_ && e_.is_object(); }
  bool is_array() const { return j_ ? j_->is_array() : dom_ && e_.is_array(); }
  bool is_string() const { return j_ ? j_->is_string() : dom_ && e_.is_string(); }
  bool is_number() const { return j_ ? j_->is_number() : dom_ && e_.is_number(); }
  bool is_boolean() const { return j_ ? j_->is_boolean() : dom_ && e_.is_bool(); }
  // A number as a double (nlohmann's get<double>); call only on a number.
  double number() const { return j_ ? j_->get<double>() : e_.get_double().value_unsafe(); }
  // A boolean's value; call only on a boolean.
  bool boolean() const { return j_ ? j_->get<bool>() : e_.get_bool().value_unsafe(); }
  // A string's bytes; call only on a string.
  std::string_view str() const {
    return j_ ? std::string_view(j_->get_ref<const std::string&>()) : e_.get_string().value_unsafe();
  }
  // The value of `key`, absent if there is none or this is no object.
  JsonView Find(std::string_view key) const;
  // An array's or object's number of members (call only on those).
  size_t size() const;
  // Calls f(index, JsonView) for each element of an array.
  template <class F>
  void ForEachElement(F f) const;
  // Calls f(std::string_view key, JsonView value) for each member of an object.
  template <class F>
  void ForEachMember(F f) const;
  // Whether any object within this value repeats a key (only a simdjson
  // element can: an nlohmann document keeps one value of each key).
  bool RepeatsKey() const;
  // A copy as an nlohmann value (for a message, or a part kept after the read).
  nlohmann::json ToJson() const;
  // The nlohmann value viewed, or null for a simdjson element.
  const nlohmann::json* nlohmann_value() const { return j_; }

 private:
  const nlohmann::json* j_ = nullptr;
  simdjson::dom::element e_;
  bool dom_ = false;
};

// The value as nlohmann's parser builds it (a non-negative integer is
// number_unsigned there; both read "-0" as the integer 0 and "-0.0" as the
// double -0.0). *repeated is set where an object repeats a key (which
// nlohmann's reader reports with its pointer). network/case/json_view.cpp.
nlohmann::json DomToJson(simdjson::dom::element e, bool* repeated);

// Whether any object within `e` repeats a key.
bool HasRepeatedKey(simdjson::dom::element e);

inline bool JsonView::RepeatsKey() const { return dom_ && HasRepeatedKey(e_); }

inline JsonView JsonView::Find(std::string_view key) const {
  if (j_) {
    if (!j_->is_object()) return {};
    const auto& m = j_->get_ref<const nlohmann::json::object_t&>();
    // A small object's keys compared by length first (the map's own find
    // with a literal measures the literal at every step).
    if (m.size() > 16) {
      const auto it = m.find(key);
      return it == m.end() ? JsonView() : JsonView(it->second);
    }
    for (const auto& kv : m)
      if (kv.first.size() == key.size() && kv.first.compare(0, key.size(), key.data(), key.size()) == 0)
        return JsonView(kv.second);
    return {};
  }
  simdjson::dom::object o;
  simdjson::dom::element v;
  if (!dom_ || e_.get(o) != simdjson::SUCCESS || o.at_key(key).get(v) != simdjson::SUCCESS) return {};
  return JsonView(v);
}

inline size_t JsonView::size() const {
  if (j_) return j_->size();
  if (e_.is_array()) return simdjson::dom::array(e_.get_array().value_unsafe()).size();
  return dom_ && e_.is_object() ? simdjson::dom::object(e_.get_object().value_unsafe()).size() : 0;
}

template <class F>
void JsonView::ForEachElement(F f) const {
  size_t i = 0;
  if (j_) {
    for (const nlohmann::json& x : *j_) f(i++, JsonView(x));
    return;
  }
  const simdjson::dom::array items = e_.get_array().value_unsafe();  // a copy: the result is a temporary
  for (simdjson::dom::element x : items) f(i++, JsonView(x));
}

template <class F>
void JsonView::ForEachMember(F f) const {
  if (j_) {
    for (const auto& kv : j_->get_ref<const nlohmann::json::object_t&>())
      f(std::string_view(kv.first), JsonView(kv.second));
    return;
  }
  const simdjson::dom::object members = e_.get_object().value_unsafe();  // a copy: the result is a temporary
  for (simdjson::dom::key_value_pair kv : members) f(kv.key, JsonView(kv.value));
}

}  // namespace loopwright
