// src/json_writer.h — a small streaming JSON writer (internal): no in-memory tree, so large
// studies write in one pass. Numbers use the shortest form that reads back exactly; a NaN or
// infinity is a broken invariant upstream and is written as null. Text is gathered in a buffer
// (formatting with fmt straight into it, format strings compiled, no string per number) and goes to the stream every
// 64 KiB and whenever the outermost value is complete, so the caller may write to the stream
// after a document ends.
#ifndef OVERTONE_INTERNAL_JSON_WRITER_H_
#define OVERTONE_INTERNAL_JSON_WRITER_H_

#include <cmath>
#include <ostream>
#include <string>
#include <string_view>
#include <vector>

#include <iterator>

#include <fmt/compile.h>
#include <fmt/format.h>

namespace overtone::internal {

class JsonWriter {
 public:
  explicit JsonWriter(std::ostream& out) : out_(out) {}
  ~JsonWriter() { Flush(); }
  JsonWriter(const JsonWriter&) = delete;
  JsonWriter& operator=(const JsonWriter&) = delete;

  JsonWriter& BeginObject() { Prefix(); buf_.push_back('{'); first_.push_back(true); return *this; }
  JsonWriter& EndObject() { first_.pop_back(); buf_.push_back('}'); return Done(); }
  JsonWriter& BeginArray() { Prefix(); buf_.push_back('['); first_.push_back(true); return *this; }
  JsonWriter& EndArray() { first_.pop_back(); buf_.push_back(']'); return Done(); }
  JsonWriter& Key(std::string_view key) {
    Prefix();
    WriteString(key);
    buf_.push_back(':');
    after_key_ = true;
    return *this;
  }
  JsonWriter& Value(double v) {
    Prefix();
    if (std::isfinite(v)) fmt::format_to(std::back_inserter(buf_), FMT_COMPILE("{}"), v);
    else Append("null");
    return Done();
  }
  JsonWriter& Value(int v) {
    Prefix();
    fmt::format_to(std::back_inserter(buf_), FMT_COMPILE("{}"), v);
    return Done();
  }
  JsonWriter& Value(bool v) { Prefix(); Append(v ? "true" : "false"); return Done(); }
  JsonWriter& Value(std::string_view v) { Prefix(); WriteString(v); return Done(); }
  JsonWriter& Value(const char* v) { return Value(std::string_view(v)); }
  template <typename T>
  JsonWriter& Field(std::string_view key, const T& v) { Key(key); return Value(v); }
  JsonWriter& StringArray(std::string_view key, const std::vector<std::string>& items) {
    Key(key).BeginArray();
    for (const std::string& s : items) Value(s);
    return EndArray();
  }

 private:
  static constexpr std::size_t kFlushBytes = 1 << 16;

  void Prefix() {
    if (after_key_) { after_key_ = false; return; }
    if (first_.empty()) return;
    if (!first_.back()) buf_.push_back(',');
    first_.back() = false;
  }
  JsonWriter& Done() {
    if (first_.empty() || buf_.size() >= kFlushBytes) Flush();
    return *this;
  }
  void Flush() {
    out_.write(buf_.data(), static_cast<std::streamsize>(buf_.size()));
    buf_.clear();
  }
  void Append(std::string_view s) { buf_.append(s.data(), s.data() + s.size()); }
  void WriteString(std::string_view s) {
    buf_.push_back('"');
    for (unsigned char c : s) {
      switch (c) {
        case '"': Append("\\\""); break;
        case '\\': Append("\\\\"); break;
        case '\n': Append("\\n"); break;
        case '\t': Append("\\t"); break;
        case '\r': Append("\\r"); break;
        default:
          if (c < 0x20) fmt::format_to(std::back_inserter(buf_), "\\u{:04x}", c);
          else buf_.push_back(static_cast<char>(c));
      }
    }
    buf_.push_back('"');
  }

  std::ostream& out_;
  fmt::memory_buffer buf_;
  std::vector<bool> first_;
  bool after_key_ = false;
};

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_JSON_WRITER_H_
