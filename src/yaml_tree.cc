// src/yaml_tree.cc — libyaml's events gathered into one compact tree.
#include "yaml_tree.h"

#include <algorithm>
#include <unordered_map>
#include <utility>

#include <fmt/format.h>
#include <yaml.h>

namespace overtone::internal {

struct YamlTree {
  struct Node {
    YamlNode::Kind kind;
    std::uint32_t line;  // 1-based
    std::uint32_t column;
    std::uint32_t begin;  // scalar: offset in `text`; container: offset in `children`
    std::uint32_t count;  // scalar: bytes; sequence: items; mapping: keys and values
  };
  std::string text;
  std::vector<Node> nodes;
  std::vector<std::uint32_t> children;

  YamlNode Handle(std::uint32_t index) const { return {this, index}; }
  const Node& At(const YamlNode& node) const { return nodes[node.index_]; }
};

YamlNode::Kind YamlNode::kind() const { return tree_ ? tree_->At(*this).kind : Kind::kUndefined; }

std::string_view YamlNode::Scalar() const {
  if (!IsScalar()) return {};
  const YamlTree::Node& node = tree_->At(*this);
  return std::string_view(tree_->text).substr(node.begin, node.count);
}

int YamlNode::line() const { return tree_ ? static_cast<int>(tree_->At(*this).line) : 0; }
int YamlNode::column() const { return tree_ ? static_cast<int>(tree_->At(*this).column) : 0; }

std::size_t YamlNode::size() const {
  if (IsSequence()) return tree_->At(*this).count;
  if (IsMap()) return tree_->At(*this).count / 2;
  return 0;
}

YamlNode YamlNode::operator[](std::size_t item) const {
  if (item >= size() || !IsSequence()) return {};
  return tree_->Handle(tree_->children[tree_->At(*this).begin + item]);
}

YamlNode YamlNode::Key(std::size_t pair) const {
  if (!IsMap() || pair >= size()) return {};
  return tree_->Handle(tree_->children[tree_->At(*this).begin + 2 * pair]);
}

YamlNode YamlNode::Value(std::size_t pair) const {
  if (!IsMap() || pair >= size()) return {};
  return tree_->Handle(tree_->children[tree_->At(*this).begin + 2 * pair + 1]);
}

YamlNode YamlNode::operator[](std::string_view key) const {
  for (std::size_t pair = 0; pair < size(); ++pair) {
    const YamlNode k = Key(pair);
    if (k.IsScalar() && k.Scalar() == key) return Value(pair);
  }
  return {};
}

namespace {

// Builds the tree from libyaml's events. Containers are numbered when they open (so nodes are in
// document order) and get their children when they close; an alias is a new node with the
// alias's own place that shares its anchor's content.
class TreeBuilder {
 public:
  TreeBuilder(YamlTree* tree, int max_depth) : tree_(tree), max_depth_(max_depth) {}

  // Adds the node the event starts or completes; false with `*problem` set when it cannot.
  bool Add(const yaml_event_t& event, YamlProblem* problem) {
    const auto line = static_cast<std::uint32_t>(event.start_mark.line + 1);
    const auto column = static_cast<std::uint32_t>(event.start_mark.column + 1);
    switch (event.type) {
      case YAML_SCALAR_EVENT: {
        const auto& scalar = event.data.scalar;
        const std::string_view value(reinterpret_cast<const char*>(scalar.value), scalar.length);
        const bool null = scalar.style == YAML_PLAIN_SCALAR_STYLE &&
                          (value.empty() || value == "~" || value == "null" || value == "Null" ||
                           value == "NULL");
        const auto index = NewNode(
            {null ? YamlNode::Kind::kNull : YamlNode::Kind::kScalar, line, column,
             static_cast<std::uint32_t>(tree_->text.size()), static_cast<std::uint32_t>(value.size())});
        if (!null) tree_->text.append(value);
        Anchor(scalar.anchor, index);
        Complete(index);
        return true;
      }
      case YAML_ALIAS_EVENT: {
        const auto* anchor = reinterpret_cast<const char*>(event.data.alias.anchor);
        const auto found = anchors_.find(anchor);
        if (found == anchors_.end()) {
          const bool inside = std::ranges::find(open_, std::string_view(anchor), &Open::anchor) !=
                              open_.end();
          *problem = {YamlProblem::Kind::kSyntax, static_cast<int>(line), static_cast<int>(column),
                      inside ? fmt::format("the alias `*{}` is inside the content it names", anchor)
                             : fmt::format("the alias `*{}` names no anchor `&{}` above it",
                                           anchor, anchor)};
          return false;
        }
        YamlTree::Node copy = tree_->nodes[found->second];
        copy.line = line;
        copy.column = column;
        Complete(NewNode(copy));
        return true;
      }
      case YAML_SEQUENCE_START_EVENT:
      case YAML_MAPPING_START_EVENT: {
        if (static_cast<int>(open_.size()) >= max_depth_) {
          *problem = {YamlProblem::Kind::kTooDeep, static_cast<int>(line), static_cast<int>(column),
                      fmt::format("lists and mappings nest deeper than {} levels here",
                                  max_depth_)};
          return false;
        }
        const bool sequence = event.type == YAML_SEQUENCE_START_EVENT;
        const yaml_char_t* anchor =
            sequence ? event.data.sequence_start.anchor : event.data.mapping_start.anchor;
        const auto index = NewNode({sequence ? YamlNode::Kind::kSequence : YamlNode::Kind::kMap,
                                    line, column, 0, 0});
        open_.push_back({index, pending_.size(),
                         anchor ? reinterpret_cast<const char*>(anchor) : std::string()});
        return true;
      }
      case YAML_SEQUENCE_END_EVENT:
      case YAML_MAPPING_END_EVENT: {
        const Open open = std::move(open_.back());
        open_.pop_back();
        YamlTree::Node& node = tree_->nodes[open.index];
        node.begin = static_cast<std::uint32_t>(tree_->children.size());
        node.count = static_cast<std::uint32_t>(pending_.size() - open.first_child);
        tree_->children.insert(tree_->children.end(),
                               pending_.begin() + static_cast<std::ptrdiff_t>(open.first_child),
                               pending_.end());
        pending_.resize(open.first_child);
        // Anchored only now, so that an alias inside its own anchor's content (a cycle) is refused.
        if (!open.anchor.empty()) anchors_[open.anchor] = open.index;
        Complete(open.index);
        return true;
      }
      default:
        return true;  // stream and document boundaries are handled by the caller
    }
  }

  // A parser error at the end of the text means a `[` or `{` was left open: name the innermost.
  void ExplainEnd(YamlProblem* problem) const {
    if (open_.empty()) return;
    const YamlTree::Node& node = tree_->nodes[open_.back().index];
    problem->message += fmt::format("; the {} that starts at line {}, column {} is not closed",
                                    node.kind == YamlNode::Kind::kMap ? "mapping" : "list",
                                    node.line, node.column);
  }

  // The root of the document just ended.
  std::optional<std::uint32_t> TakeRoot() { return std::exchange(root_, std::nullopt); }

 private:
  struct Open {
    std::uint32_t index;
    std::size_t first_child;  // in pending_
    std::string anchor;
  };

  std::uint32_t NewNode(const YamlTree::Node& node) {
    tree_->nodes.push_back(node);
    return static_cast<std::uint32_t>(tree_->nodes.size() - 1);
  }

  void Anchor(const yaml_char_t* anchor, std::uint32_t index) {
    if (anchor) anchors_[reinterpret_cast<const char*>(anchor)] = index;
  }

  void Complete(std::uint32_t index) {
    if (open_.empty()) {
      root_ = index;
    } else {
      pending_.push_back(index);
    }
  }

  YamlTree* tree_;
  int max_depth_;
  std::vector<Open> open_;
  std::vector<std::uint32_t> pending_;  // children of the open containers, innermost last
  std::unordered_map<std::string, std::uint32_t> anchors_;
  std::optional<std::uint32_t> root_;
};

YamlProblem ParserProblem(const yaml_parser_t& parser) {
  if (parser.error == YAML_MEMORY_ERROR) return {YamlProblem::Kind::kSyntax, 0, 0, "out of memory"};
  std::string message = parser.problem ? parser.problem : "not YAML";
  if (parser.error != YAML_SCANNER_ERROR && parser.error != YAML_PARSER_ERROR) {
    return {YamlProblem::Kind::kSyntax, 0, 0, std::move(message)};  // a reader error has no mark
  }
  const yaml_mark_t& at = parser.problem_mark;
  const yaml_mark_t& context = parser.context_mark;
  if (parser.context && (context.line != at.line || context.column != at.column)) {
    message += fmt::format(" ({} that starts at line {}, column {})", parser.context,
                           context.line + 1, context.column + 1);
  }
  return {YamlProblem::Kind::kSyntax, static_cast<int>(at.line + 1),
          static_cast<int>(at.column + 1), std::move(message)};
}

}  // namespace

std::optional<YamlDocument> YamlDocument::Parse(std::string_view text, int max_depth,
                                                YamlProblem* problem) {
  auto tree = std::make_shared<YamlTree>();
  // Reserved from the text's size (a node takes at least two bytes of text), so the arrays never
  // move while growing; pages reserved but never written cost nothing.
  tree->text.reserve(text.size());
  tree->nodes.reserve(text.size() / 2 + 16);
  tree->children.reserve(text.size() / 2 + 16);
  TreeBuilder builder(tree.get(), max_depth);
  YamlDocument document;
  std::vector<std::uint32_t> roots;

  yaml_parser_t parser;
  if (!yaml_parser_initialize(&parser)) {
    *problem = {YamlProblem::Kind::kSyntax, 0, 0, "out of memory"};
    return std::nullopt;
  }
  yaml_parser_set_input_string(&parser, reinterpret_cast<const unsigned char*>(text.data()),
                               text.size());
  bool ok = true;
  for (bool done = false; ok && !done;) {
    yaml_event_t event;
    if (!yaml_parser_parse(&parser, &event)) {
      *problem = ParserProblem(parser);
      if (parser.error == YAML_PARSER_ERROR && parser.problem_mark.index >= text.size()) {
        builder.ExplainEnd(problem);
      }
      ok = false;
      break;
    }
    ok = builder.Add(event, problem);
    if (event.type == YAML_DOCUMENT_END_EVENT) {
      if (const std::optional<std::uint32_t> root = builder.TakeRoot()) roots.push_back(*root);
    }
    done = event.type == YAML_STREAM_END_EVENT;
    yaml_event_delete(&event);
  }
  yaml_parser_delete(&parser);
  if (!ok) return std::nullopt;

  for (const std::uint32_t root : roots) document.documents_.push_back(tree->Handle(root));
  document.tree_ = std::move(tree);
  return document;
}

std::string_view ShapeOf(YamlNode node) {
  if (node.IsSequence()) return "a list";
  if (node.IsMap()) return "a mapping";
  if (node.IsNull() || !node.IsDefined()) return "empty";
  return "a single value";
}

std::string DoubleQuoted(std::string_view text) {
  std::string out = "\"";
  for (const char c : text) {
    if (c == '"' || c == '\\') {
      out.push_back('\\');
      out.push_back(c);
    } else if (static_cast<unsigned char>(c) < 0x20) {
      out += fmt::format("\\x{:02X}", static_cast<unsigned char>(c));
    } else {
      out.push_back(c);
    }
  }
  out.push_back('"');
  return out;
}

namespace {

bool AppendFlow(YamlNode node, std::size_t max_bytes, std::string* out) {
  if (out->size() > max_bytes) return false;
  switch (node.kind()) {
    case YamlNode::Kind::kUndefined:
    case YamlNode::Kind::kNull:
      out->push_back('~');
      return true;
    case YamlNode::Kind::kScalar:
      *out += DoubleQuoted(node.Scalar());
      return true;
    case YamlNode::Kind::kSequence:
      out->push_back('[');
      for (std::size_t i = 0; i < node.size(); ++i) {
        if (i > 0) *out += ", ";
        if (!AppendFlow(node[i], max_bytes, out)) return false;
      }
      out->push_back(']');
      return true;
    case YamlNode::Kind::kMap:
      out->push_back('{');
      for (std::size_t i = 0; i < node.size(); ++i) {
        if (i > 0) *out += ", ";
        if (!AppendFlow(node.Key(i), max_bytes, out)) return false;
        *out += ": ";
        if (!AppendFlow(node.Value(i), max_bytes, out)) return false;
      }
      out->push_back('}');
      return true;
  }
  return false;
}

}  // namespace

std::optional<std::string> ToFlowYaml(YamlNode node, std::size_t max_bytes) {
  std::string out;
  if (!AppendFlow(node, max_bytes, &out) || out.size() > max_bytes) return std::nullopt;
  return out;
}

}  // namespace overtone::internal
