// tests/bad_inputs_test.cc — every tests/bad/*.yaml must fail to load, first error where it says.
//
// Each case starts with `# expect: [FILE:]LINE:COL fragment`: the place (FILE relative to
// tests/bad, default the case itself) and a piece of the message of the FIRST diagnostic. The
// rules broken are those of PLANT-FORMAT.md ("Errors", "Quantities", "Conventions" and the
// section tables); files without that line (and tests/bad/inc/) are helpers.
#include <algorithm>
#include <filesystem>
#include <fstream>
#include <optional>
#include <random>
#include <string>
#include <vector>

#include <catch2/catch.hpp>

#include "overtone/errors.h"
#include "overtone/load.h"

namespace overtone {
namespace {

namespace fs = std::filesystem;

struct Expectation {
  std::string file;  // as the loader names it
  int line = 0;
  int column = 0;
  std::string fragment;
};

const fs::path kBadDir = fs::path(OVERTONE_SOURCE_DIR) / "tests" / "bad";

// Parses the `# expect:` line of `path`; nothing when the file is a helper.
std::optional<Expectation> ReadExpectation(const fs::path& path) {
  std::ifstream in(path, std::ios::binary);
  std::string first_line;
  std::getline(in, first_line);
  const std::string prefix = "# expect: ";
  if (first_line.rfind(prefix, 0) != 0) return std::nullopt;
  const std::string rest = first_line.substr(prefix.size());
  const size_t space = rest.find(' ');
  std::string place = rest.substr(0, space);
  Expectation expectation;
  expectation.fragment = rest.substr(space + 1);
  expectation.file = path.string();
  const size_t col_colon = place.rfind(':');
  const size_t line_colon = place.rfind(':', col_colon - 1);
  if (line_colon != std::string::npos) {
    expectation.file =
        (path.parent_path() / place.substr(0, line_colon)).lexically_normal().string();
    place = place.substr(line_colon + 1);
  }
  expectation.line = std::stoi(place.substr(0, place.find(':')));
  expectation.column = std::stoi(place.substr(place.find(':') + 1));
  return expectation;
}

std::vector<fs::path> BadCases() {
  std::vector<fs::path> cases;
  for (const fs::directory_entry& entry : fs::directory_iterator(kBadDir)) {
    if (entry.path().extension() == ".yaml" && ReadExpectation(entry.path())) {
      cases.push_back(entry.path());
    }
  }
  std::sort(cases.begin(), cases.end());
  return cases;
}

TEST_CASE("every bad plant file fails with its first error where it says", "[bad_inputs]") {
  const std::vector<fs::path> cases = BadCases();
  REQUIRE(cases.size() >= 60);  // issue 8: a corpus of at least 60
  for (const fs::path& path : cases) {
    DYNAMIC_SECTION(path.filename().string()) {
      const Expectation expected = *ReadExpectation(path);
      bool threw = false;
      try {
        LoadPlant(path.string());
      } catch (const InputError& error) {
        threw = true;
        REQUIRE_FALSE(error.diagnostics().empty());
        const Diagnostic& first = error.diagnostics().front();
        INFO(FormatDiagnostic(first));
        CHECK(first.where.file == expected.file);
        CHECK(first.where.line == expected.line);
        CHECK(first.where.column == expected.column);
        CHECK_THAT(first.message, Catch::Contains(expected.fragment));
      }
      CHECK(threw);
    }
  }
}

// The first diagnostic of loading `text` held in memory; fails the test when it loads.
Diagnostic FirstError(const std::string& text) {
  try {
    LoadPlantFromString(text, "generated.yaml");
  } catch (const InputError& error) {
    REQUIRE_FALSE(error.diagnostics().empty());
    return error.diagnostics().front();
  }
  FAIL("the generated text loaded");
  return {};
}

// Inputs too big to keep in tests/bad, generated here. PLANT-FORMAT.md "Errors": refused with a
// located message, never a crash. The top-level mapping is the first of the 64 levels allowed.
TEST_CASE("generated adversarial inputs are refused with a located error", "[bad_inputs]") {
  SECTION("10,000 nested `[`, closed and unclosed") {
    for (const std::string& tail : {std::string(), std::string(10000, ']')}) {
      const Diagnostic first = FirstError("overtone: 1\nbuses: " + std::string(10000, '[') + tail);
      INFO(FormatDiagnostic(first));
      CHECK(first.where.line == 2);
      CHECK(first.where.column == 8 + 63);  // the 64th `[` after "buses: ", level 65
      CHECK_THAT(first.message, Catch::Contains("deeper than 64 levels"));
    }
  }
  SECTION("10,000 nested `{a: `") {
    std::string text = "overtone: 1\nbuses: ";
    for (int i = 0; i < 10000; ++i) text += "{a: ";
    const Diagnostic first = FirstError(text);
    INFO(FormatDiagnostic(first));
    CHECK(first.where.line == 2);
    CHECK(first.where.column == 8 + 63 * 4);  // the 64th `{`, level 65
  }
  SECTION("10,000 nested block sequences") {
    std::string text = "overtone: 1\nbuses:\n  ";
    for (int i = 0; i < 10000; ++i) text += "- ";
    const Diagnostic first = FirstError(text + "x\n");
    INFO(FormatDiagnostic(first));
    CHECK(first.where.line == 3);
    CHECK(first.where.column == 3 + 63 * 2);  // the 64th `-`, level 65
    CHECK_THAT(first.message, Catch::Contains("deeper than 64 levels"));
  }
  SECTION("50 MB of random bytes from a fixed seed") {
    std::mt19937 random(8);  // the standard fixes mt19937's sequence, so the bytes are the same
    std::string text(50u << 20, '\0');
    for (char& c : text) c = static_cast<char>(random() & 0xFF);
    const Diagnostic first = FirstError(text);
    INFO(FormatDiagnostic(first));
    CHECK(first.where.line >= 1);
    CHECK(first.where.column >= 1);
    const bool explained = first.message.find("not UTF-8") != std::string::npos ||
                           first.message.find("control character") != std::string::npos;
    CHECK(explained);
  }
}

TEST_CASE("the expectation line is read with and without a file", "[bad_inputs]") {
  const std::optional<Expectation> own = ReadExpectation(kBadDir / "wrong_unit.yaml");
  REQUIRE(own);
  CHECK(own->file == (kBadDir / "wrong_unit.yaml").string());
  const std::optional<Expectation> other = ReadExpectation(kBadDir / "cycle_a.yaml");
  REQUIRE(other);
  CHECK(other->file == (kBadDir / "cycle_b.yaml").string());
  CHECK(other->line == 3);
  CHECK(other->column == 10);
  CHECK(other->fragment == "`extends` makes a cycle");
  CHECK_FALSE(ReadExpectation(kBadDir / "inc" / "base.yaml"));
}

}  // namespace
}  // namespace overtone
