// src/json_writer.h — a small streaming JSON writer (internal): no in-memory tree, so large
// studies write in one pass. Numbers use the shortest form that reads back exactly; a NaN or
// infinity is a broken invariant upstream and is written as null.
#ifndef OVERTONE_INTERNAL_JSON_WRITER_H_
#define OVERTONE_INTERNAL_JSON_WRITER_H_

#include <cmath>
#include <ostream>
#include <string>
#include <string_view>
#include <vector>

#include <fmt/format.h>

namespace overtone::internal {

class JsonWriter {
 public:
  explicit JsonWriter(std::ostream& out) : out_(out) {}

  JsonWriter& BeginObject() { Prefix(); out_ << '{'; first_.push_back(true); return *this; }
  JsonWriter& EndObject() { first_.pop_back(); out_ << '}'; return *this; }
  JsonWriter& BeginArray() { Prefix(); out_ << '['; first_.push_back(true); return *this; }
  JsonWriter& EndArray() { first_.pop_back(); out_ << ']'; return *this; }
  JsonWriter& Key(std::string_view key) {
    Prefix();
    WriteString(key);
    out_ << ':';
    after_key_ = true;
    return *this;
  }
  JsonWriter& Value(double v) {
    Prefix();
    if (std::isfinite(v)) out_ << fmt::format("{}", v); else out_ << "null";
    return *this;
  }
  JsonWriter& Value(int v) { Prefix(); out_ << v; return *this; }
  JsonWriter& Value(bool v) { Prefix(); out_ << (v ? "true" : "false"); return *this; }
  JsonWriter& Value(std::string_view v) { Prefix(); WriteString(v); return *this; }
  JsonWriter& Value(const char* v) { return Value(std::string_view(v)); }
  template <typename T>
  JsonWriter& Field(std::string_view key, const T& v) { Key(key); return Value(v); }
  JsonWriter& StringArray(std::string_view key, const std::vector<std::string>& items) {
    Key(key).BeginArray();
    for (const std::string& s : items) Value(s);
    return EndArray();
  }

 private:
  void Prefix() {
    if (after_key_) { after_key_ = false; return; }
    if (first_.empty()) return;
    if (!first_.back()) out_ << ',';
    first_.back() = false;
  }
  void WriteString(std::string_view s) {
    out_ << '"';
    for (unsigned char c : s) {
      switch (c) {
        case '"': out_ << "\\\""; break;
        case '\\': out_ << "\\\\"; break;
        case '\n': out_ << "\\n"; break;
        case '\t': out_ << "\\t"; break;
        case '\r': out_ << "\\r"; break;
        default:
          if (c < 0x20) out_ << fmt::format("\\u{:04x}", c); else out_ << static_cast<char>(c);
      }
    }
    out_ << '"';
  }

  std::ostream& out_;
  std::vector<bool> first_;
  bool after_key_ = false;
};

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_JSON_WRITER_H_
