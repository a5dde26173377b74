// Diagnostics: problems found in a case file, each pointing at its place.
#pragma once

#include <string>
#include <vector>

namespace loopwright {

struct Diagnostic {
  std::string id;       // stable error id, e.g. "unknown-unit", "missing-field"
  std::string pointer;  // JSON Pointer (RFC 6901) of the place, "" for the document
  std::string message;  // what was expected and what was given
  int line = 0;         // 1-based, when known (malformed JSON)
  int column = 0;
  bool warning = false;
};

class Diagnostics {
 public:
  void Error(std::string id, std::string pointer, std::string message) {
    items_.push_back({std::move(id), std::move(pointer), std::move(message), 0, 0, false});
  }
  void Warn(std::string id, std::string pointer, std::string message) {
    items_.push_back({std::move(id), std::move(pointer), std::move(message), 0, 0, true});
  }
  void Add(Diagnostic d) { items_.push_back(std::move(d)); }
  bool HasErrors() const {
    for (auto& d : items_) if (!d.warning) return true;
    return false;
  }
  size_t ErrorCount() const {
    size_t n = 0;
    for (auto& d : items_) n += d.warning ? 0 : 1;
    return n;
  }
  const std::vector<Diagnostic>& items() const { return items_; }

  // "error[unknown-unit] /loops/0/components/3/diameter: ..." one per line.
  std::string Format(const std::string& file) const;
  // The same as a JSON document (`validate --json`): {"file", "valid",
  // "errors", "warnings", "problems": [{"severity", "id", "pointer",
  // "message"[, "line", "column"]}]}, pretty-printed, ending in a newline.
  std::string ToJson(const std::string& file) const;

 private:
  std::vector<Diagnostic> items_;
};

// Escapes one reference token for a JSON Pointer ("~" -> "~0", "/" -> "~1").
std::string PointerToken(const std::string& key);

// A JSON Pointer written only when a message quotes it: a whole pointer, or
// a base and one more key (escaped as a pointer token then). A loader reads
// hundreds of thousands of fields and names almost none of them.
class JsonPlace {
 public:
  JsonPlace(const std::string& whole) : base_(&whole) {}  // NOLINT: converts, as a pointer string would
  JsonPlace(const char* whole) : literal_(whole) {}  // NOLINT: the same, from a literal
  JsonPlace(const std::string& base, const std::string& key) : base_(&base), key_(&key) {}
  std::string str() const {
    if (literal_) return literal_;
    return key_ ? *base_ + "/" + PointerToken(*key_) : *base_;
  }
  operator std::string() const { return str(); }  // NOLINT: wherever a pointer string is taken
  friend std::string operator+(const JsonPlace& a, const char* b) { return a.str() + b; }
  friend std::string operator+(const JsonPlace& a, const std::string& b) { return a.str() + b; }

 private:
  const char* literal_ = nullptr;
  const std::string* base_ = nullptr;
  const std::string* key_ = nullptr;
};

}  // namespace loopwright
