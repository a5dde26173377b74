#pragma once
// A small JSON text writer for large result documents: values are appended to
// a string as they come, with no document tree in between.
//
// The text is what nlohmann::json's dump() (compact, indent 0) or dump(2)
// (pretty, indent 2) writes for the same members in the same order, but for
// the digits of about one number in a thousand: strings with the same
// escapes (quote, backslash, control characters; UTF-8 passed through), a
// number in nlohmann's layout (its format_buffer: ".0" on an integral double,
// exponent from 1e16 and below 1e-4 as "e+16", "e-05"; null for NaN or
// infinity) with the shortest digits that read back as the same double and,
// of those, the closest to it (Dragonbox, fmt's implementation; the digits
// Python's repr() writes). nlohmann's Grisu2 sometimes writes a digit more or
// a neighbouring last digit (0.09 % of random doubles): both read back as the
// same double. A caller that wants nlohmann's key order writes keys sorted.
//
// Why: building an nlohmann object per node, component and check and
// dumping it cost about 80 % of writing a plant-size results document
// (callgrind, 3,000-bearing header); this writer appends straight to a
// reused buffer. Dragonbox takes a fifth of Grisu2's instructions.

#include <string>
#include <string_view>
#include <vector>

namespace loopwright {

class JsonWriter {
 public:
  // Appends to `out`. indent 0: compact; otherwise pretty with that step,
  // the first line's nested lines starting at column `base` (the column of
  // the line the value starts on).
  explicit JsonWriter(std::string* out, int indent = 0, int base = 0) : out_(out), step_(indent), base_(base) {}

  JsonWriter& BeginObject() { return Open('{'); }
  JsonWriter& EndObject() { return Close('}'); }
  JsonWriter& BeginArray() { return Open('['); }
  JsonWriter& EndArray() { return Close(']'); }
  JsonWriter& Key(std::string_view key);
  // A key made of two parts (a report item's key and its unit suffix).
  JsonWriter& Key(std::string_view key, std::string_view suffix);

  JsonWriter& Number(double v);
  JsonWriter& Integer(long long v);
  JsonWriter& Bool(bool v);
  JsonWriter& String(std::string_view s);
  JsonWriter& Null();
  JsonWriter& Strings(const std::vector<std::string>& list);  // an array of strings

  // Shorthands: a key and its value.
  template <typename T>
  JsonWriter& Member(std::string_view key, const T& v) {
    Key(key);
    return Value(v);
  }

 private:
  JsonWriter& Value(double v) { return Number(v); }
  JsonWriter& Value(int v) { return Integer(v); }
  JsonWriter& Value(bool v) { return Bool(v); }
  JsonWriter& Value(std::string_view v) { return String(v); }
  JsonWriter& Value(const std::string& v) { return String(v); }
  JsonWriter& Value(const char* v) { return String(v); }
  JsonWriter& Value(const std::vector<std::string>& v) { return Strings(v); }

  JsonWriter& Open(char bracket);
  JsonWriter& Close(char bracket);
  void BeforeValue();  // separator and indentation before an array element
  void Newline(int depth);
  void Escaped(std::string_view s);
  void Quoted(std::string_view a, std::string_view b, std::string_view tail);

  std::string* out_;
  int step_, base_;
  // Per open container: whether it has a member yet, a byte each (a string:
  // the usual nesting fits its inline buffer, so a writer per element
  // allocates nothing).
  std::string filled_;
  bool after_key_ = false;
};

}  // namespace loopwright
