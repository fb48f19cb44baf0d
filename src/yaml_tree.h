// src/yaml_tree.h — a YAML text read into a compact, immutable tree whose nodes know their place
// (internal). libyaml parses; the tree keeps every node in one array and every scalar in one
// text buffer, so a plant of 100,000 buses is read in a fraction of a second.
#ifndef OVERTONE_INTERNAL_YAML_TREE_H_
#define OVERTONE_INTERNAL_YAML_TREE_H_

#include <cstddef>
#include <cstdint>
#include <memory>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace overtone::internal {

struct YamlTree;

// A handle to one node of a YamlDocument; valid while the document lives. The default handle is
// "undefined": what a mapping lookup returns for an absent key.
class YamlNode {
 public:
  enum class Kind : std::uint8_t { kUndefined, kNull, kScalar, kSequence, kMap };

  YamlNode() = default;

  Kind kind() const;
  bool IsDefined() const { return kind() != Kind::kUndefined; }
  explicit operator bool() const { return IsDefined(); }
  bool IsNull() const { return kind() == Kind::kNull; }
  bool IsScalar() const { return kind() == Kind::kScalar; }
  bool IsSequence() const { return kind() == Kind::kSequence; }
  bool IsMap() const { return kind() == Kind::kMap; }

  // The text of a scalar as written (quotes and escapes resolved); empty for other kinds.
  std::string_view Scalar() const;
  // 1-based place of the node's first character; 0 for an undefined node.
  int line() const;
  int column() const;

  // Items of a sequence, or key-value pairs of a mapping.
  std::size_t size() const;
  YamlNode operator[](std::size_t item) const;  // the item of a sequence
  // The value of `key` in a mapping (the first, when written twice); undefined when absent.
  YamlNode operator[](std::string_view key) const;
  YamlNode Key(std::size_t pair) const;    // of a mapping
  YamlNode Value(std::size_t pair) const;  // of a mapping

  // `for (YamlNode item : sequence)`.
  class Iterator {
   public:
    Iterator(const YamlNode* parent, std::size_t item) : parent_(parent), item_(item) {}
    YamlNode operator*() const { return (*parent_)[item_]; }
    Iterator& operator++() {
      ++item_;
      return *this;
    }
    bool operator==(const Iterator& other) const { return item_ == other.item_; }

   private:
    const YamlNode* parent_;
    std::size_t item_;
  };
  Iterator begin() const { return {this, 0}; }
  Iterator end() const { return {this, IsSequence() ? size() : 0}; }

 private:
  friend struct YamlTree;
  YamlNode(const YamlTree* tree, std::uint32_t index) : tree_(tree), index_(index) {}

  const YamlTree* tree_ = nullptr;
  std::uint32_t index_ = 0;
};

// Why a text could not be read as YAML, and where.
struct YamlProblem {
  enum class Kind { kSyntax, kTooDeep };
  Kind kind = Kind::kSyntax;
  int line = 0;  // 1-based
  int column = 0;
  std::string message;  // libyaml's wording for a syntax error
};

// The documents of one text. Copies share the tree.
class YamlDocument {
 public:
  // The documents of `text` (empty ones included); nothing, with `*problem` set, when the text is
  // not YAML or nests (lists and mappings, block or flow) deeper than `max_depth`.
  static std::optional<YamlDocument> Parse(std::string_view text, int max_depth,
                                           YamlProblem* problem);

  const std::vector<YamlNode>& documents() const { return documents_; }

 private:
  std::shared_ptr<const YamlTree> tree_;
  std::vector<YamlNode> documents_;
};

// "a list", "a mapping", "empty" or "a single value", for messages.
std::string_view ShapeOf(YamlNode node);

// `text` as a YAML double-quoted scalar.
std::string DoubleQuoted(std::string_view text);

// `node` written back as one line of flow YAML (double-quoted scalars), for a generated file;
// nothing when it would exceed `max_bytes` (aliases can multiply a small text).
std::optional<std::string> ToFlowYaml(YamlNode node, std::size_t max_bytes);

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_YAML_TREE_H_
