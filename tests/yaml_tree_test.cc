// tests/yaml_tree_test.cc — YAML texts into the compact tree: kinds, places, aliases, limits.
//
// Expected structures come from the YAML 1.2.2 specification (section named beside each check)
// and from PyYAML, an independent parser from the package registry (python3-yaml), which reads
// every plant, profile and sweep file of the project into the same structure.
#include <cstdio>
#include <filesystem>
#include <string>
#include <vector>

#include <catch2/catch.hpp>

#include "plant_text.h"
#include "yaml_tree.h"

namespace overtone::internal {
namespace {

namespace fs = std::filesystem;
using Kind = YamlNode::Kind;

YamlDocument MustParse(std::string_view text, int max_depth = 64) {
  YamlProblem problem;
  std::optional<YamlDocument> document = YamlDocument::Parse(text, max_depth, &problem);
  INFO(problem.line << ":" << problem.column << " " << problem.message);
  REQUIRE(document);
  return *document;
}

YamlProblem MustFail(std::string_view text, int max_depth = 64) {
  YamlProblem problem;
  CHECK_FALSE(YamlDocument::Parse(text, max_depth, &problem));
  return problem;
}

// The node as JSON with every scalar a string and null as "": the shape PyYAML's BaseLoader
// gives (no type resolution), written by json.dumps(..., separators=(",", ":")).
std::string Json(YamlNode node) {
  std::string out;
  switch (node.kind()) {
    case Kind::kUndefined:
    case Kind::kNull:
      return "\"\"";
    case Kind::kScalar:
      out = "\"";
      for (const char c : node.Scalar()) {  // escaped as json.dumps escapes
        if (c == '\n') {
          out += "\\n";
        } else if (c == '\t') {
          out += "\\t";
        } else {
          if (c == '"' || c == '\\') out += '\\';
          out += c;
        }
      }
      return out + "\"";
    case Kind::kSequence:
      for (std::size_t i = 0; i < node.size(); ++i) out += (i ? "," : "") + Json(node[i]);
      return "[" + out + "]";
    case Kind::kMap:
      for (std::size_t i = 0; i < node.size(); ++i) {
        out += (i ? "," : "") + Json(node.Key(i)) + ":" + Json(node.Value(i));
      }
      return "{" + out + "}";
  }
  return out;
}

TEST_CASE("block and flow collections keep their order, kinds and places", "[yaml_tree]") {
  const YamlDocument document = MustParse(
      "overtone: 1\n"
      "buses:\n"
      "  - {name: MAIN, kv: 13.8 kV}\n"
      "  - name: MCC\n"
      "    kv: '0.48 kV'\n");
  REQUIRE(document.documents().size() == 1);
  const YamlNode root = document.documents()[0];
  REQUIRE(root.IsMap());
  CHECK(root.size() == 2);
  CHECK(root.Key(0).Scalar() == "overtone");
  CHECK(root["overtone"].Scalar() == "1");
  const YamlNode buses = root["buses"];
  REQUIRE(buses.IsSequence());
  CHECK(buses.size() == 2);
  // Places are 1-based line and column of the node's first character (common practice: what
  // editors show).
  CHECK(buses.line() == 3);
  CHECK(buses.column() == 3);
  CHECK(buses[0].line() == 3);
  CHECK(buses[0].column() == 5);  // the `{`
  CHECK(buses[0]["kv"].Scalar() == "13.8 kV");
  CHECK(buses[1]["kv"].Scalar() == "0.48 kV");  // section 7.3.2: single quotes removed
  CHECK(buses[1]["kv"].line() == 5);
  CHECK(buses[1]["kv"].column() == 9);
  CHECK_FALSE(root["missing"]);
  CHECK(root["missing"].kind() == Kind::kUndefined);
  std::vector<std::string> names;
  for (const YamlNode bus : buses) names.emplace_back(bus["name"].Scalar());
  CHECK(names == std::vector<std::string>{"MAIN", "MCC"});
}

TEST_CASE("plain empty, ~ and null spellings are null; quoted ones are text", "[yaml_tree]") {
  // YAML 1.2.2 section 10.3.2 (core schema): null | Null | NULL | ~ and the empty plain scalar.
  const YamlDocument document =
      MustParse("a:\nb: ~\nc: null\nd: Null\ne: NULL\nf: ''\ng: \"null\"\nh: nil\n");
  const YamlNode root = document.documents()[0];
  for (const char* key : {"a", "b", "c", "d", "e"}) {
    INFO(key);
    CHECK(root[key].IsNull());
  }
  CHECK(root["f"].IsScalar());
  CHECK(root["f"].Scalar().empty());
  CHECK(root["g"].Scalar() == "null");
  CHECK(root["h"].Scalar() == "nil");
}

TEST_CASE("escapes and block scalars are resolved as the specification says", "[yaml_tree]") {
  const YamlDocument document = MustParse(
      "q: \"a\\tb\\\"c\\u00e9\"\n"  // section 5.7: \t, \", \u00e9
      "lit: |\n  one\n  two\n"       // section 8.1.2: literal keeps breaks
      "fold: >\n  one\n  two\n");    // section 8.1.3: folded joins lines
  const YamlNode root = document.documents()[0];
  CHECK(root["q"].Scalar() == "a\tb\"c\xC3\xA9");
  CHECK(root["lit"].Scalar() == "one\ntwo\n");
  CHECK(root["fold"].Scalar() == "one two\n");
}

TEST_CASE("an alias is its anchor's content at the alias's own place", "[yaml_tree]") {
  // YAML 1.2.2 section 7.1: an alias node refers to the most recent node with that anchor.
  const YamlDocument document =
      MustParse("base: &b {kv: 0.48 kV, grounded: yes}\ncopy: *b\nx: &s one\ny: *s\n");
  const YamlNode root = document.documents()[0];
  CHECK(Json(root["copy"]) == Json(root["base"]));
  CHECK(root["copy"].line() == 2);
  CHECK(root["copy"].column() == 7);
  CHECK(root["y"].Scalar() == "one");
}

TEST_CASE("bad texts are refused at the place of the problem", "[yaml_tree]") {
  SECTION("an alias without an anchor") {
    const YamlProblem problem = MustFail("a: 1\nb: *nowhere\n");
    CHECK(problem.line == 2);
    CHECK(problem.column == 4);
    CHECK_THAT(problem.message, Catch::Contains("*nowhere"));
  }
  SECTION("an alias inside its own anchor's content (a cycle)") {
    const YamlProblem problem = MustFail("a: &loop [1, *loop]\n");
    CHECK(problem.line == 1);
    CHECK(problem.column == 14);
    CHECK_THAT(problem.message, Catch::Contains("inside the content it names"));
  }
  SECTION("an unclosed flow list names where it opened") {
    const YamlProblem problem = MustFail("a: [1, 2\n");
    CHECK_THAT(problem.message, Catch::Contains("the list that starts at line 1, column 4"));
  }
  SECTION("nesting beyond the limit") {
    const YamlProblem problem = MustFail("a: [[[[x]]]]\n", 3);
    CHECK(problem.kind == YamlProblem::Kind::kTooDeep);
    CHECK(problem.line == 1);
    CHECK(problem.column == 6);  // the third `[` is the fourth level under the mapping
  }
}

TEST_CASE("documents of a stream are kept apart", "[yaml_tree]") {
  // YAML 1.2.2 section 9.2: `---` starts a document; an empty stream has none.
  CHECK(MustParse("").documents().empty());
  const YamlDocument two = MustParse("a: 1\n---\nb: 2\n");
  REQUIRE(two.documents().size() == 2);
  CHECK(two.documents()[1]["b"].Scalar() == "2");
  CHECK(two.documents()[1].line() == 3);
}

TEST_CASE("flow YAML written back reads as the same structure", "[yaml_tree]") {
  const YamlDocument document = MustParse(
      "drives:\n"
      "  - {name: \"P-1 \\\"east\\\"\", kw: 75 kW, tags: [a, 'b: c'], note: }\n"
      "  - name: back\\slash\n"
      "    text: |\n      two\n      lines\n");
  const YamlNode root = document.documents()[0];
  const std::optional<std::string> flow = ToFlowYaml(root, 1 << 20);
  REQUIRE(flow);
  const YamlDocument again = MustParse(*flow);
  CHECK(Json(again.documents()[0]) == Json(root));
  CHECK_FALSE(ToFlowYaml(root, 16));  // over the byte budget
}

TEST_CASE("the project's YAML files read as PyYAML reads them", "[yaml_tree]") {
  const fs::path source(OVERTONE_SOURCE_DIR);
  std::vector<fs::path> files;
  for (const char* dir : {"cases", "src/limits", "tests/plants", "tests/reference/plants"}) {
    for (const auto& entry : fs::recursive_directory_iterator(source / dir)) {
      if (entry.path().extension() == ".yaml") files.push_back(entry.path());
    }
  }
  REQUIRE(files.size() > 10);
  for (const fs::path& file : files) {
    INFO(file.string());
    const std::string command =
        "/usr/bin/python3 -c \"import json, sys, yaml; sys.stdout.write(json.dumps(yaml.load("
        "open(sys.argv[1], encoding='utf-8'), Loader=yaml.BaseLoader), separators=(',', ':'), "
        "ensure_ascii=False))\" '" +
        file.string() + "'";
    FILE* pipe = popen(command.c_str(), "r");
    REQUIRE(pipe);
    std::string expected;
    char block[4096];
    for (std::size_t n; (n = fread(block, 1, sizeof block, pipe)) > 0;) expected.append(block, n);
    REQUIRE(pclose(pipe) == 0);
    std::string error;
    const std::optional<std::string> text = ReadTextFile(file.string(), &error);
    REQUIRE(text);
    const YamlDocument document = MustParse(*text);
    CHECK(Json(document.documents()[0]) == expected);
  }
}

}  // namespace
}  // namespace overtone::internal
