// tests/json_writer_test.cc — the streaming JSON writer: valid JSON, numbers to kDigits digits.
#include "json_writer.h"

#include <catch2/catch.hpp>
#include <nlohmann/json.hpp>

#include <charconv>
#include <cmath>
#include <limits>
#include <random>
#include <regex>
#include <sstream>
#include <string>

using overtone::internal::JsonWriter;

namespace {

std::string Written(double v) {
  std::ostringstream out;
  JsonWriter(out).Value(v);
  return out.str();
}

// The number grammar of RFC 8259 section 6.
bool IsJsonNumber(const std::string& s) {
  static const std::regex number(R"(-?(0|[1-9][0-9]*)(\.[0-9]+)?([eE][+-]?[0-9]+)?)");
  return std::regex_match(s, number);
}

constexpr int kDigits = JsonWriter::kDigits;

// printf-style %.<kDigits>g from the standard library's std::to_chars (ISO C++
// [charconv.to.chars]), an implementation independent of the writer's.
double StandardRounding(double v) {
  char text[64];
  const auto end =
      std::to_chars(text, text + sizeof text, v, std::chars_format::general, kDigits).ptr;
  return std::stod(std::string(text, end));
}

}  // namespace

TEST_CASE("Numbers are valid JSON rounded to kDigits significant digits", "[json]") {
  const double half_unit = 0.5 * std::pow(10.0, 1 - kDigits);  // of the leading digit's decade
  std::mt19937_64 random(7);
  std::uniform_real_distribution<double> exponent(-12.0, 12.0), unit(0.0, 1.0);
  for (int i = 0; i < 200000; ++i) {
    const double v = (unit(random) < 0.5 ? -1.0 : 1.0) * std::pow(10.0, exponent(random));
    const std::string s = Written(v);
    INFO(s << " for " << v);
    REQUIRE(IsJsonNumber(s));
    // Rounding to kDigits significant digits moves a value by at most half a unit in the last
    // digit kept.
    const double read = std::stod(s);
    const double decade = std::pow(10.0, std::floor(std::log10(std::abs(v))));
    CHECK(std::abs(read - v) <= half_unit * decade * 1.0001);
    // The same number as the standard library's rounding (a tie may go either way: one unit).
    CHECK(std::abs(read - StandardRounding(v)) <= 2.0 * half_unit * decade * 1.0001);
  }
}

TEST_CASE("Exact and edge values keep their plain form", "[json]") {
  // Integers and short decimals read back exactly (RFC 8259 section 6 forms).
  CHECK(Written(0.0) == "0");
  CHECK(std::stod(Written(115.0)) == 115.0);
  CHECK(std::stod(Written(-0.25)) == -0.25);
  CHECK(std::stod(Written(1e-4)) == 1e-4);
  // Next to powers of ten, where rounding carries into a new digit: 9.99...9 (kDigits + 1 nines)
  // rounds to 10, and 999999.99...9 to 1e6.
  const double below = 0.1 * std::pow(10.0, -kDigits);
  CHECK(std::stod(Written(10.0 - below)) == 10.0);
  CHECK(std::stod(Written(1e6 - 1e5 * below)) == 1e6);
  // A NaN or infinity is a broken invariant upstream; JSON has no such number, so null.
  CHECK(Written(std::numeric_limits<double>::quiet_NaN()) == "null");
  CHECK(Written(std::numeric_limits<double>::infinity()) == "null");
}

TEST_CASE("Nested objects, arrays and escaped text read back with a JSON parser", "[json]") {
  std::ostringstream out;
  {
    JsonWriter j(out);
    j.BeginObject().Field("name", "bus \"A\"\\\n\t\x01").Field("count", 3);
    j.Key("list").BeginArray().Value(1.5).BeginObject().Field("ok", true).EndObject();
    j.BeginArray().EndArray().EndArray();
    j.StringArray("words", {"a", "b"}).EndObject();
  }
  // nlohmann::json is an independent parser (RFC 8259); it rejects any misplaced comma.
  const auto doc = nlohmann::json::parse(out.str());
  CHECK(doc["name"] == "bus \"A\"\\\n\t\x01");
  CHECK(doc["count"] == 3);
  CHECK(doc["list"][0].get<double>() == Approx(1.5));
  CHECK(doc["list"][1]["ok"] == true);
  CHECK(doc["list"][2].empty());
  CHECK(doc["words"] == nlohmann::json({"a", "b"}));
}
