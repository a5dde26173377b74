// JsonWriter's text against nlohmann::json's own dump() and dump(2) of the
// same document (the serializer the writer claims to match byte for byte),
// and its compact text parsed back by nlohmann.
#include <cmath>
#include <cstdlib>
#include <utility>
#include <limits>
#include <string>

#include <doctest/doctest.h>
#include <nlohmann/json.hpp>

#include "library/json_writer.h"

using loopwright::JsonWriter;
using nlohmann::json;

namespace {

const double kAwkward[] = {0.0, -0.0, 1.0, -2.5, 1e-5, 123456.789, 1e300, 5e-324, 0.1 + 0.2, 1e15, 1e16, 1.5e17};
const char* const kTexts[] = {"plain", "quote \" and \\ back", "tab\tnew\nline\r", "bell \x07 and \x1f", "ünïcödé °C µm",
                              ""};

// The same document written both ways: keys in nlohmann's (sorted) order.
void Write(JsonWriter& w) {
  w.BeginObject().Key("a_empty_array").BeginArray().EndArray();
  w.Key("b_empty_object").BeginObject().EndObject();
  w.Key("c_numbers").BeginArray();
  for (double v : kAwkward) w.Number(v);
  w.EndArray();
  w.Key("d_not_finite").BeginArray().Number(std::nan("")).Number(std::numeric_limits<double>::infinity()).EndArray();
  w.Key("e_texts").BeginArray();
  for (const char* t : kTexts) w.String(t);
  w.EndArray();
  w.Key("f_", "two_part").Integer(-42).Member("g_flag", true).Member("h_none", std::string("x"));
  w.Key("i_nested").BeginObject().Key("j").BeginArray().BeginObject().Member("k", 1.0).EndObject().EndArray().EndObject();
  w.Key("l_null").Null().EndObject();
}

json Expected() {
  json j;
  j["a_empty_array"] = json::array();
  j["b_empty_object"] = json::object();
  for (double v : kAwkward) j["c_numbers"].push_back(v);
  j["d_not_finite"] = {std::nan(""), std::numeric_limits<double>::infinity()};
  for (const char* t : kTexts) j["e_texts"].push_back(t);
  j["f_two_part"] = -42;
  j["g_flag"] = true;
  j["h_none"] = "x";
  j["i_nested"] = {{"j", json::array({{{"k", 1.0}}})}};
  j["l_null"] = nullptr;
  return j;
}

}  // namespace

TEST_CASE("compact text equals nlohmann's dump()") {
  std::string text;
  JsonWriter w(&text);
  Write(w);
  CHECK(text == Expected().dump());
  CHECK(json::parse(text)["c_numbers"][7] == doctest::Approx(5e-324));
}

TEST_CASE("pretty text equals nlohmann's dump(2), also nested at a column") {
  std::string text;
  JsonWriter w(&text, 2);
  Write(w);
  CHECK(text == Expected().dump(2));
  // Nested at column 4: every line after the first starts 4 columns further.
  std::string nested;
  JsonWriter n(&nested, 2, 4);
  Write(n);
  std::string shifted = Expected().dump(2);
  for (size_t at = shifted.find('\n'); at != std::string::npos; at = shifted.find('\n', at + 1))
    shifted.insert(at + 1, "    ");
  CHECK(nested == shifted);
}

// Doubles whose shortest round-trip digits Grisu2 (nlohmann's dump) misses:
// it writes the left text, a digit too many or a last digit farther from the
// double. The right text is Python 3's repr() of float(left) (shortest
// digits that read back, the closest of those; CPython 3.11 run on the
// left text), in the range where Python's layout and nlohmann's agree.
TEST_CASE("numbers are written with the shortest, closest digits, as Python's repr()") {
  const std::pair<const char*, const char*> kCases[] = {
      {"-8918.252430512919", "-8918.25243051292"},          {"57169040.440898374", "57169040.44089837"},
      {"1127.1350200525021", "1127.135020052502"},          {"2.4622570351024202", "2.46225703510242"},
      {"-15362.263994569439", "-15362.26399456944"},        {"0.17720793160931891", "0.1772079316093189"},
      {"2.0284336443466847e-11", "2.0284336443466848e-11"}, {"-3.0345559750668678e-81", "-3.034555975066868e-81"}};
  for (const auto& [left, right] : kCases) {
    std::string text;
    JsonWriter(&text).Number(std::strtod(left, nullptr));
    CHECK(text == right);
    CHECK(std::strtod(text.c_str(), nullptr) == std::strtod(left, nullptr));
  }
}
