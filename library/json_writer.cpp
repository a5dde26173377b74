#include "library/json_writer.h"

#include <cmath>
#include <cstdio>

#include <nlohmann/json.hpp>

namespace loopwright {

void JsonWriter::Newline(int depth) {
  out_->push_back('\n');
  out_->append(static_cast<size_t>(base_ + step_ * depth), ' ');
}

void JsonWriter::BeforeValue() {
  if (after_key_) {
    after_key_ = false;
    return;
  }
  if (filled_.empty()) return;  // the document's own value
  if (filled_.back()) out_->push_back(',');
  filled_.back() = true;
  if (step_ > 0) Newline(static_cast<int>(filled_.size()));
}

JsonWriter& JsonWriter::Open(char bracket) {
  BeforeValue();
  out_->push_back(bracket);
  filled_.push_back(false);
  return *this;
}

JsonWriter& JsonWriter::Close(char bracket) {
  const bool filled = filled_.back();
  filled_.pop_back();
  if (filled && step_ > 0) Newline(static_cast<int>(filled_.size()));
  out_->push_back(bracket);
  return *this;
}

JsonWriter& JsonWriter::Key(std::string_view key) { return Key(key, {}); }

JsonWriter& JsonWriter::Key(std::string_view key, std::string_view suffix) {
  BeforeValue();
  out_->push_back('"');
  Escaped(key);
  Escaped(suffix);
  out_->append(step_ > 0 ? "\": " : "\":");
  after_key_ = true;
  return *this;
}

JsonWriter& JsonWriter::Number(double v) {
  if (!std::isfinite(v)) return Null();  // as nlohmann writes a NaN or infinity
  BeforeValue();
  char buf[64];
  char* end = nlohmann::detail::to_chars(buf, buf + sizeof buf, v);
  out_->append(buf, static_cast<size_t>(end - buf));
  return *this;
}

JsonWriter& JsonWriter::Integer(long long v) {
  BeforeValue();
  char buf[24];
  const int n = std::snprintf(buf, sizeof buf, "%lld", v);
  out_->append(buf, static_cast<size_t>(n));
  return *this;
}

JsonWriter& JsonWriter::Bool(bool v) {
  BeforeValue();
  out_->append(v ? "true" : "false");
  return *this;
}

JsonWriter& JsonWriter::Null() {
  BeforeValue();
  out_->append("null");
  return *this;
}

JsonWriter& JsonWriter::String(std::string_view s) {
  BeforeValue();
  out_->push_back('"');
  Escaped(s);
  out_->push_back('"');
  return *this;
}

JsonWriter& JsonWriter::Strings(const std::vector<std::string>& list) {
  BeginArray();
  for (const auto& s : list) String(s);
  return EndArray();
}

// nlohmann's escapes with ensure_ascii off: the two-character forms where
// JSON has them, \u00xx for the other control characters, all else as is.
void JsonWriter::Escaped(std::string_view s) {
  size_t run = 0;  // start of the pending unescaped run
  for (size_t i = 0; i < s.size(); ++i) {
    const auto c = static_cast<unsigned char>(s[i]);
    if (c >= 0x20 && c != '"' && c != '\\') continue;
    out_->append(s.data() + run, i - run);
    run = i + 1;
    switch (c) {
      case '"': out_->append("\\\""); break;
      case '\\': out_->append("\\\\"); break;
      case '\b': out_->append("\\b"); break;
      case '\f': out_->append("\\f"); break;
      case '\n': out_->append("\\n"); break;
      case '\r': out_->append("\\r"); break;
      case '\t': out_->append("\\t"); break;
      default: {
        char buf[8];
        std::snprintf(buf, sizeof buf, "\\u%04x", c);
        out_->append(buf);
      }
    }
  }
  out_->append(s.data() + run, s.size() - run);
}

}  // namespace loopwright
