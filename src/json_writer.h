// src/json_writer.h — a small streaming JSON writer (internal): no in-memory tree, so large
// studies write in one pass. Numbers carry kDigits significant digits (docs/output.md); a NaN or
// infinity is a broken invariant upstream and is written as null. Text is gathered in a buffer
// (no string per number) and goes to the stream every 64 KiB and whenever the outermost value is
// complete, so the caller may write to the stream after a document ends.
#ifndef OVERTONE_INTERNAL_JSON_WRITER_H_
#define OVERTONE_INTERNAL_JSON_WRITER_H_

#include <algorithm>
#include <cmath>
#include <cstdint>
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
  // Significant digits of every number: the plant data carry two to four, and a relative step of
  // 5e-9 stays far below what the results resolve even where currents cancel (a bus's 11th a
  // hundredth of its sources' own); the file is smaller and quicker to write than with the
  // 17-digit round-trip form.
  static constexpr int kDigits = 9;

  explicit JsonWriter(std::ostream& out) : out_(&out) {}
  // Appends to `text` instead: for items formatted apart, in parallel (Values).
  explicit JsonWriter(std::string& text) : text_(&text) {}
  ~JsonWriter() { Flush(); }
  JsonWriter(const JsonWriter&) = delete;
  JsonWriter& operator=(const JsonWriter&) = delete;

  JsonWriter& BeginObject() { return Open('{'); }
  JsonWriter& EndObject() { return Close('}'); }
  JsonWriter& BeginArray() { return Open('['); }
  JsonWriter& EndArray() { return Close(']'); }
  JsonWriter& Key(std::string_view key) {
    Prefix();
    WriteString(key);
    buf_.push_back(':');
    comma_ = false;
    return *this;
  }
  JsonWriter& Value(double v) {
    Prefix();
    if (std::isfinite(v)) WriteNumber(v);
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
  // Values already written by another writer inside an array (`a,b,c` without the brackets),
  // as the next values at this level: for items formatted apart, in parallel.
  JsonWriter& Values(std::string_view values) {
    if (values.empty()) return *this;
    Prefix();
    if (values.size() < kFlushBytes) {
      Append(values);
    } else {  // straight through, not copied into the buffer first
      Flush();
      Emit(values);
    }
    return Done();
  }
  JsonWriter& StringArray(std::string_view key, const std::vector<std::string>& items) {
    Key(key).BeginArray();
    for (const std::string& s : items) Value(s);
    return EndArray();
  }

 private:
  static constexpr std::size_t kFlushBytes = 1 << 16;

  // A comma goes before any value or key that follows a complete value at the same level.
  void Prefix() {
    if (comma_) buf_.push_back(',');
  }
  JsonWriter& Open(char bracket) {
    Prefix();
    buf_.push_back(bracket);
    ++depth_;
    comma_ = false;
    return *this;
  }
  JsonWriter& Close(char bracket) {
    buf_.push_back(bracket);
    --depth_;
    return Done();
  }
  JsonWriter& Done() {
    comma_ = depth_ > 0;  // top-level values stand alone
    if (depth_ == 0 || buf_.size() >= kFlushBytes) Flush();
    return *this;
  }
  void Flush() {
    Emit(std::string_view(buf_.data(), buf_.size()));
    buf_.clear();
  }
  void Emit(std::string_view text) {
    if (text_ != nullptr) text_->append(text);
    else out_->write(text.data(), static_cast<std::streamsize>(text.size()));
  }
  void Append(std::string_view s) { buf_.append(s.data(), s.data() + s.size()); }
  // Runs of plain characters are copied whole; only quotes, backslashes and control characters
  // are escaped.
  void WriteString(std::string_view s) {
    buf_.push_back('"');
    std::size_t plain = 0;
    for (std::size_t i = 0; i < s.size(); ++i) {
      const auto c = static_cast<unsigned char>(s[i]);
      if (c >= 0x20 && c != '"' && c != '\\') continue;
      Append(s.substr(plain, i - plain));
      plain = i + 1;
      switch (c) {
        case '"': Append("\\\""); break;
        case '\\': Append("\\\\"); break;
        case '\n': Append("\\n"); break;
        case '\t': Append("\\t"); break;
        case '\r': Append("\\r"); break;
        default: fmt::format_to(std::back_inserter(buf_), "\\u{:04x}", c);
      }
    }
    Append(s.substr(plain));
    buf_.push_back('"');
  }
  // v rounded to kDigits significant digits, laid out like printf's %g (no exponent for decimal
  // exponents -4..6, trailing zeros dropped), which is valid JSON. The common range is done by
  // hand, as an integer of kDigits digits: fmt's precision path costs twice its shortest form.
  void WriteNumber(double v) {
    const double a = std::abs(v);
    if (!(a >= 1e-4 && a < 1e6)) {
      if (v == 0.0) buf_.push_back('0');
      else fmt::format_to(std::back_inserter(buf_), FMT_COMPILE("{:.{}g}"), v, kDigits);
      return;
    }
    constexpr auto kLow = static_cast<std::int64_t>(kPow10[kDigits - 1]), kHigh = 10 * kLow;
    int e = 5;  // the decimal exponent, -4..5
    while (a < kPow10[e + 4] * 1e-4) --e;
    // a * 10^p is one rounding from exact, so a tie may rarely round the other way.
    auto m = static_cast<std::int64_t>(a * kPow10[kDigits - 1 - e] + 0.5);
    if (m >= kHigh) m = kLow, ++e;  // 9.99...95 and above round up to the next power of ten
    char text[32];
    char* out = text;
    if (v < 0) *out++ = '-';
    if (e < 0) {
      *out++ = '0', *out++ = '.';
      for (int i = -1; i > e; --i) *out++ = '0';
    }
    char digits[kDigits];
    for (int i = kDigits - 1; i >= 0; --i) digits[i] = static_cast<char>('0' + m % 10), m /= 10;
    int last = kDigits;  // digits kept after dropping trailing zeros of the fraction
    while (last > std::max(e + 1, 1) && digits[last - 1] == '0') --last;
    for (int i = 0; i < last; ++i) {
      if (i == e + 1 && e >= 0) *out++ = '.';
      *out++ = digits[i];
    }
    buf_.append(text, out);
  }

  static constexpr double kPow10[] = {1e0, 1e1, 1e2,  1e3,  1e4,  1e5,  1e6,
                                      1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13};  // exact doubles

  std::ostream* out_ = nullptr;  // one of the two
  std::string* text_ = nullptr;
  fmt::memory_buffer buf_;
  int depth_ = 0;       // open objects and arrays
  bool comma_ = false;  // the next value or key follows another at its level
};

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_JSON_WRITER_H_
