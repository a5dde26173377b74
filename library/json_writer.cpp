#include "library/json_writer.h"

#include <cmath>
#include <cstdio>
#include <cstdint>
#include <cstring>
#include <limits>

#include <fmt/format.h>

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

namespace {

// The bytes JSON writes escaped: the quote, the backslash and the control
// characters below 0x20.
struct EscapeTable {
  bool escaped[256] = {};
  constexpr EscapeTable() {
    for (int c = 0; c < 0x20; ++c) escaped[c] = true;
    escaped[static_cast<unsigned char>('"')] = escaped[static_cast<unsigned char>('\\')] = true;
  }
};
constexpr EscapeTable kEscape;

bool NeedsEscape(std::string_view s) {
  for (char c : s)
    if (kEscape.escaped[static_cast<unsigned char>(c)]) return true;
  return false;
}

}  // namespace

// `"a b` then `tail`: the usual short text without escapes in one append.
void JsonWriter::Quoted(std::string_view a, std::string_view b, std::string_view tail) {
  char buf[128];
  const size_t n = 1 + a.size() + b.size() + tail.size();
  if (n <= sizeof buf && !NeedsEscape(a) && !NeedsEscape(b)) {
    buf[0] = '"';
    std::memcpy(buf + 1, a.data(), a.size());
    std::memcpy(buf + 1 + a.size(), b.data(), b.size());
    std::memcpy(buf + 1 + a.size() + b.size(), tail.data(), tail.size());
    out_->append(buf, n);
    return;
  }
  out_->push_back('"');
  Escaped(a);
  Escaped(b);
  out_->append(tail);
}

JsonWriter& JsonWriter::Key(std::string_view key, std::string_view suffix) {
  BeforeValue();
  after_key_ = true;
  Quoted(key, suffix, step_ > 0 ? "\": " : "\":");
  return *this;
}

namespace {

int DigitCount(uint64_t x) {
  int n = 1;
  for (; x >= 10000; x /= 10000) n += 4;
  for (; x >= 10; x /= 10) ++n;
  return n;
}

// The n decimal digits of x at `first`, two at a time from the last.
void WriteDigits(char* first, int n, uint64_t x) {
  static constexpr char kPairs[] =
      "0001020304050607080910111213141516171819202122232425262728293031323334353637383940414243444546474849"
      "5051525354555657585960616263646566676869707172737475767778798081828384858687888990919293949596979899";
  char* at = first + n;
  for (; x >= 100; x /= 100) {
    at -= 2;
    std::memcpy(at, kPairs + 2 * (x % 100), 2);
  }
  if (x >= 10) std::memcpy(at - 2, kPairs + 2 * x, 2);
  else at[-1] = static_cast<char>('0' + x);
}

// The shortest digits that read back as `v` (finite), the closest to it of
// those, by Dragonbox (fmt's implementation), laid out by nlohmann's own
// format_buffer as its dump() lays out its digits.
char* ShortestNumber(char* first, double v) {
  if (std::signbit(v)) {
    v = -v;
    *first++ = '-';
  }
  if (v == 0) {  // as nlohmann writes +-0
    std::memcpy(first, "0.0", 3);
    return first + 3;
  }
  const auto dec = fmt::detail::dragonbox::to_decimal(v);
  const int n = DigitCount(dec.significand);
  WriteDigits(first, n, dec.significand);
  return nlohmann::detail::dtoa_impl::format_buffer(first, n, dec.exponent, -4, std::numeric_limits<double>::digits10);
}

}  // namespace

JsonWriter& JsonWriter::Number(double v) {
  if (!std::isfinite(v)) return Null();  // as nlohmann writes a NaN or infinity
  BeforeValue();
  char buf[64];
  char* end = ShortestNumber(buf, v);
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
  Quoted(s, {}, "\"");
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
    if (!kEscape.escaped[c]) continue;
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
