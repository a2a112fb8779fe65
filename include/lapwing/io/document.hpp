// An input file as a tree of nodes that remember where they stand (file, line, column), read by
// a fast reader of plain YAML or, for any other text, with yaml-cpp's event parser so that
// duplicate keys and aliases can be refused (both build the same tree), plus a Reader that
// takes keys out of a map by name, converts them to SI, checks ranges, and refuses unknown keys
// with a "did you mean" suggestion. Every error is an InputError with FILE:LINE:COL and key path.
#pragma once

#include <filesystem>
#include <memory>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "lapwing/base/error.hpp"
#include "lapwing/base/range.hpp"
#include "lapwing/base/units.hpp"

namespace lapwing {

struct Node {
  enum class Kind { null, scalar, sequence, map };
  struct Entry;  // a map's key and value (below: a Node must be complete to hold one)
  Kind kind = Kind::null;
  Mark mark;
  std::string scalar;           // scalar text
  std::vector<Node> items;      // sequence items
  std::vector<Entry> entries;   // map entries in file order
  std::vector<Mark> key_marks;  // mark of each map key

  const Node* find(std::string_view key) const;
};

// Not a vector<pair<string, Node>> inside Node: clang instantiates the pair's destructor where
// Node is declared, while Node is still incomplete, and stops (GCC defers it). An entry type
// declared in Node and defined once Node is complete builds with both (a vector of an incomplete
// type may be a member since C++17, [vector.overview]).
struct Node::Entry {
  std::string key;
  Node value;
};

/// A parsed file: the root node and the file's name as errors print it.
struct Document {
  std::string file;                 // as given by the user (printed in errors)
  std::filesystem::path directory;  // folder of the file: relative paths inside resolve here
  Node root;
};

/// Reads and parses a YAML file. Throws InputError on syntax errors, duplicate keys, aliases,
/// anchors, tags, more than one document, or an empty file.
Document load_document(const std::string& file);

/// Parses YAML text held in memory (`file` is the name used in errors).
Document parse_document(const std::string& text, const std::string& file);

namespace detail {
/// The two readers behind parse_document, for the tests that hold them against each other (text
/// already checked as UTF-8 without NUL). The fast reader takes a plain subset of YAML (block maps
/// and lists, one-line flow maps and lists, plain and simple quoted scalars, comments) and returns
/// nothing for any other text, and for any error, so that yaml-cpp reads it instead.
std::optional<Node> read_simple_yaml(std::string_view text);
/// yaml-cpp's event parser: any YAML; InputError on what lapwing refuses.
Node read_yaml(const std::string& text, const std::string& file);
}  // namespace detail

/// Takes keys out of one map node. Call finish() after the last read: any key not read is an
/// unknown key and an error.
class Reader {
 public:
  Reader(const Document& doc, const Node& node, std::string path);

  const Document& doc() const { return *doc_; }
  const Node& node() const { return *node_; }
  const std::string& path() const { return path_; }
  std::string child_path(std::string_view key) const;

  /// Declares every key this map may hold. Then a missing required key standing next to a
  /// misspelt one is reported as the misspelling, and suggestions draw on all of them.
  void keys(std::vector<std::string> allowed) { allowed_ = std::move(allowed); }

  bool has(std::string_view key) const;
  const Node* get(std::string_view key);      // marks the key as read; nullptr when absent
  const Node& require(std::string_view key);  // error when absent

  // Quantities in SI. The loaders leave the ranges of the model's values to its validate()
  // (which they call, mapping the key path back here); `r` checks a value of the file's own
  // notation that the model does not keep (an arc's radius, whose sign is the turn's).
  double quantity(std::string_view key, Quantity q, std::optional<Range> r = {});
  double quantity_or(std::string_view key, Quantity q, double fallback);
  std::optional<double> optional_quantity(std::string_view key, Quantity q,
                                          std::optional<Range> r = {});
  std::string string(std::string_view key);
  std::string string_or(std::string_view key, std::string fallback);
  bool boolean_or(std::string_view key, bool fallback);
  int integer(std::string_view key, int lo, int hi);
  /// One of `choices`; error lists them (and suggests the closest).
  std::string choice(std::string_view key, const std::vector<std::string>& choices,
                     std::string fallback = {});
  /// A sequence of quantities (each checked against `r` when given).
  std::vector<double> quantities(std::string_view key, Quantity q, std::optional<Range> r = {});

  Reader map(std::string_view key);  // a nested map (error when absent or not a map)

  /// Errors for keys not read, with "did you mean" against the keys that were read or known.
  void finish(const std::vector<std::string>& also_known = {});

  [[noreturn]] void fail(const Node& at, const std::string& what, std::string_view key = {}) const;

  // Conversions of a node already taken (for sequence items and the like).
  double node_quantity(const Node& n, Quantity q, const std::string& path,
                       std::optional<Range> r = {}) const;
  std::string node_string(const Node& n, const std::string& path) const;

 private:
  const Document* doc_;
  const Node* node_;
  std::string path_;
  std::vector<std::string> read_;     // keys present and taken
  std::vector<std::string> asked_;    // every key asked for: the known keys, for suggestions
  std::vector<std::string> allowed_;  // declared keys (optional)
};

/// Edit distance for suggestions (Levenshtein).
std::size_t edit_distance(std::string_view a, std::string_view b);

/// The closest of `candidates` to `word` if it is close enough to suggest, else empty.
std::string closest(std::string_view word, const std::vector<std::string>& candidates);

}  // namespace lapwing
