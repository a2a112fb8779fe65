#include "lapwing/io/document.hpp"

#include <yaml-cpp/depthguard.h>
#include <yaml-cpp/eventhandler.h>
#include <yaml-cpp/exceptions.h>
#include <yaml-cpp/mark.h>
#include <yaml-cpp/parser.h>

#include <algorithm>
#include <cctype>
#include <cmath>
#include <cstdio>
#include <fstream>
#include <sstream>

#include "lapwing/base/text.hpp"
#include "lapwing/io/input_file.hpp"

namespace lapwing {

const Node* Node::find(std::string_view key) const {
  for (const auto& [k, v] : entries)
    if (k == key) return &v;
  return nullptr;
}

namespace {

Mark to_mark(const YAML::Mark& m) {
  return Mark{m.line + 1, m.column + 1};
}

// The key path of block-style line `line` (1-based) read from the indentation of the lines above
// it: its own key under each less indented "key:" line that opens a map ("tyres:" then "\tmu_long:"
// is tyres.mu_long). For a syntax error met before the parser has handed over the keys around
// it (a tab in an indentation); "" where a list or a flow map makes it a guess.
std::string block_path(const std::string& text, int line) {
  std::vector<std::string_view> lines;
  for (std::size_t at = 0; at <= text.size();) {
    const std::size_t end = std::min(text.find('\n', at), text.size());
    lines.push_back(std::string_view(text).substr(at, end - at));
    at = end + 1;
  }
  if (line < 1 || static_cast<std::size_t>(line) > lines.size()) return "";
  // A line's indentation (spaces and tabs) and its key, if it is "key:" or "key: value".
  const auto split = [](std::string_view l, std::size_t& indent, bool& opens) {
    indent = l.find_first_not_of(" \t");
    if (indent == std::string_view::npos) return std::string_view();
    const std::string_view rest = l.substr(indent);
    const std::size_t colon = rest.find(':');
    if (colon == 0 || colon == std::string_view::npos) return std::string_view();
    const std::string_view key = rest.substr(0, colon);
    for (char c : key)
      if (!(std::isalnum(static_cast<unsigned char>(c)) || c == '_')) return std::string_view();
    const std::size_t value = rest.find_first_not_of(" \t\r", colon + 1);
    opens = value == std::string_view::npos || rest[value] == '#';
    return key;
  };
  std::size_t indent = 0;
  bool opens = false;
  std::string path(split(lines[static_cast<std::size_t>(line) - 1], indent, opens));
  if (path.empty()) return "";
  for (std::size_t i = static_cast<std::size_t>(line) - 1; i-- > 0 && indent > 0;) {
    std::size_t at = 0;
    const std::string_view l = lines[i];
    const std::size_t first = l.find_first_not_of(" \t\r");
    if (first == std::string_view::npos || l[first] == '#') continue;  // blank or a comment
    const std::string_view key = split(l, at, opens);
    if (at >= indent) continue;
    if (key.empty() || !opens) return "";  // a list item, a flow map: not a plain block map
    path = std::string(key) + "." + path;
    indent = at;
  }
  return indent == 0 ? path : "";
}

// Builds a Node tree from parser events, refusing what lapwing's formats do not use.
class TreeBuilder : public YAML::EventHandler {
 public:
  explicit TreeBuilder(std::string file) : file_(std::move(file)) {}

  Node take() { return std::move(root_); }
  bool complete() const { return done_; }
  Mark start() const { return start_; }

  void OnDocumentStart(const YAML::Mark& mark) override { start_ = to_mark(mark); }
  void OnDocumentEnd() override { done_ = true; }

  void OnNull(const YAML::Mark& mark, YAML::anchor_t anchor) override {
    check_anchor(mark, anchor);
    Node n;
    n.kind = Node::Kind::null;
    n.mark = to_mark(mark);
    add(std::move(n));
  }
  void OnAlias(const YAML::Mark& mark, YAML::anchor_t) override {
    throw InputError(file_, to_mark(mark), "YAML aliases are not accepted; write the value out",
                     path());
  }
  void OnAnchor(const YAML::Mark& mark, const std::string&) override {
    throw InputError(file_, to_mark(mark), "YAML anchors are not accepted; write the value out",
                     path());
  }

  /// The key path of the value about to be read ("tyres.mu_lat", "segments[2]"; "" the root):
  /// for an error met while reading it (a duplicate key, an anchor, a syntax error).
  std::string path() const {
    std::string p;
    for (const Frame& f : stack_) {
      if (f.node.kind == Node::Kind::sequence)
        p += "[" + std::to_string(f.node.items.size()) + "]";
      else if (f.has_key)
        p = join_path(p, f.key);
      else
        break;  // a key, not yet a value: the map's own path
    }
    return p;
  }
  void OnScalar(const YAML::Mark& mark, const std::string& tag, YAML::anchor_t anchor,
                const std::string& value) override {
    check_anchor(mark, anchor);
    check_tag(mark, tag);
    Node n;
    n.kind = Node::Kind::scalar;
    n.mark = to_mark(mark);
    n.scalar = value;
    add(std::move(n));
  }
  void OnSequenceStart(const YAML::Mark& mark, const std::string& tag, YAML::anchor_t anchor,
                       YAML::EmitterStyle::value) override {
    open(mark, tag, anchor, Node::Kind::sequence);
  }
  void OnSequenceEnd() override { close(); }
  void OnMapStart(const YAML::Mark& mark, const std::string& tag, YAML::anchor_t anchor,
                  YAML::EmitterStyle::value) override {
    open(mark, tag, anchor, Node::Kind::map);
  }
  void OnMapEnd() override {
    if (stack_.back().has_key)
      throw InputError(file_, stack_.back().key_mark, "map key without a value", path());
    close();
  }

 private:
  struct Frame {
    Node node;
    bool has_key = false;
    std::string key;
    Mark key_mark;
  };

  void check_anchor(const YAML::Mark& mark, YAML::anchor_t anchor) const {
    if (anchor != YAML::NullAnchor)
      throw InputError(file_, to_mark(mark), "YAML anchors are not accepted; write the value out",
                       path());
  }
  void check_tag(const YAML::Mark& mark, const std::string& tag) const {
    // "?" marks a plain scalar, "!" a quoted one; anything else is an explicit tag.
    if (!tag.empty() && tag != "?" && tag != "!")
      throw InputError(file_, to_mark(mark), "YAML tags are not accepted ('" + tag + "')", path());
  }
  void open(const YAML::Mark& mark, const std::string& tag, YAML::anchor_t anchor,
            Node::Kind kind) {
    check_anchor(mark, anchor);
    check_tag(mark, tag);
    Frame f;
    f.node.kind = kind;
    f.node.mark = to_mark(mark);
    stack_.push_back(std::move(f));
  }
  void close() {
    Node n = std::move(stack_.back().node);
    stack_.pop_back();
    add(std::move(n));
  }
  void add(Node n) {
    if (stack_.empty()) {
      root_ = std::move(n);
      return;
    }
    Frame& top = stack_.back();
    if (top.node.kind == Node::Kind::sequence) {
      top.node.items.push_back(std::move(n));
      return;
    }
    if (!top.has_key) {
      if (n.kind != Node::Kind::scalar)
        throw InputError(file_, n.mark, "map keys must be plain words", path());
      for (std::size_t i = 0; i < top.node.entries.size(); ++i)
        if (top.node.entries[i].key == n.scalar)
          throw InputError(file_, n.mark,
                           "duplicate key '" + n.scalar + "' (first given at line " +
                               std::to_string(top.node.key_marks[i].line) + ")",
                           join_path(path(), n.scalar));
      top.has_key = true;
      top.key = n.scalar;
      top.key_mark = n.mark;
      return;
    }
    top.node.entries.push_back({std::move(top.key), std::move(n)});
    top.node.key_marks.push_back(top.key_mark);
    top.has_key = false;
  }

  std::string file_;
  std::vector<Frame> stack_;
  Node root_;
  Mark start_{1, 1};
  bool done_ = false;
};

// The fast reader: a plain subset of YAML read line by line into the same Node tree as
// TreeBuilder builds from yaml-cpp's events (same kinds, marks, texts and order; tests/io hold
// the two against each other). Anything outside the subset, or any doubt, and it gives up
// (GiveUp, caught in read()): yaml-cpp then reads the text and reports whatever is wrong.
class SimpleYaml {
 public:
  explicit SimpleYaml(std::string_view text) : text_(text) {}

  std::optional<Node> read() {
    try {
      split_lines();
      // An empty document, a root that is not a block map or that is indented: yaml-cpp's.
      if (lines_.empty() || lines_[0].indent != lines_[0].begin) give_up();
      if (!key_at(lines_[0], lines_[0].indent)) give_up();
      Node root = block_node();
      if (at_ != lines_.size()) give_up();
      return root;
    } catch (const GiveUp&) {
      return std::nullopt;
    }
  }

 private:
  struct GiveUp {};
  [[noreturn]] static void give_up() { throw GiveUp{}; }

  // Maps and lists nest at most this deep here (lapwing's files nest four or five); deeper, and
  // yaml-cpp reads the text (it refuses nesting beyond its own limit). Each level is a call of
  // block_node or flow_or_scalar: a file of 20 000 '[' overflowed the stack (found by fuzzing).
  static constexpr int max_depth = 64;
  int depth_ = 0;
  struct Deeper {
    explicit Deeper(int& depth) : d(depth) {
      if (++d > max_depth) give_up();
    }
    ~Deeper() { --d; }
    Deeper(const Deeper&) = delete;
    Deeper& operator=(const Deeper&) = delete;
    int& d;
  };

  // A line that holds something (not blank, not only a comment): its number, the offsets of its
  // first byte and of the end of its text (before "\r\n" or "\n"), and where the node read next
  // on it starts (its indentation, then past a "- " or a key once they are read).
  struct Line {
    int number = 0;
    std::size_t begin = 0, end = 0, indent = 0;
  };

  Mark mark(const Line& l, std::size_t at) const {
    return Mark{l.number, static_cast<int>(at - l.begin) + 1};
  }

  void split_lines() {
    // Printable ASCII and line ends only (no tab, no other control, no byte above 0x7F: yaml-cpp
    // counts columns and breaks lines in ways this reader does not copy); a CR only before LF.
    for (std::size_t i = 0; i < text_.size(); ++i) {
      const auto c = static_cast<unsigned char>(text_[i]);
      if (c == '\n') continue;
      if (c == '\r' && i + 1 < text_.size() && text_[i + 1] == '\n') continue;
      if (c < 0x20 || c > 0x7e) give_up();
    }
    int number = 1;
    for (std::size_t at = 0; at < text_.size(); ++number) {
      std::size_t next = text_.find('\n', at);
      std::size_t end = next == std::string_view::npos ? text_.size() : next;
      next = next == std::string_view::npos ? text_.size() : next + 1;
      if (end > at && text_[end - 1] == '\r') --end;
      std::size_t first = at;
      while (first < end && text_[first] == ' ') ++first;
      if (first < end && text_[first] != '#') lines_.push_back(Line{number, at, end, first});
      at = next;
    }
    // Where yaml-cpp puts a null met at the end of the text: the start of the line after the
    // last line end. Without a final line end it puts it elsewhere: not followed here.
    if (!text_.empty() && text_.back() == '\n') end_mark_ = Mark{number, 1};
  }

  static bool key_char(char c) {
    return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9') || c == '_';
  }
  static bool alnum(char c) {
    return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9');
  }
  // Characters of a plain scalar (after its first): letters, digits, space and a few marks that
  // are no YAML indicator inside a scalar. No ':', '#', ',' or brackets (they end or break one).
  static bool plain_char(char c) {
    return alnum(c) || c == ' ' || c == '.' || c == '+' || c == '-' || c == '_' || c == '/' ||
           c == '%' || c == '(' || c == ')';
  }
  // yaml-cpp reads these plain scalars as null, not as text.
  static bool null_word(std::string_view s) { return s == "null" || s == "Null" || s == "NULL"; }

  // The end of a plain key "word:" starting at `at` (the offset of ':'), if one stands there:
  // [A-Za-z0-9_]+ then ':' then a space or the end of the line.
  std::optional<std::size_t> key_at(const Line& l, std::size_t at) const {
    std::size_t i = at;
    while (i < l.end && key_char(text_[i])) ++i;
    if (i == at || i >= l.end || text_[i] != ':') return std::nullopt;
    if (i + 1 < l.end && text_[i + 1] != ' ') return std::nullopt;
    return i;
  }
  // A "- " (or a lone "-") list entry at `at`.
  bool dash_at(const Line& l, std::size_t at) const {
    return at < l.end && text_[at] == '-' && (at + 1 == l.end || text_[at + 1] == ' ');
  }
  std::size_t skip_spaces(const Line& l, std::size_t at) const {
    while (at < l.end && text_[at] == ' ') ++at;
    return at;
  }
  // Nothing but spaces and perhaps a comment (a '#' after a space) from `at` to the line's end.
  bool rest_empty(const Line& l, std::size_t at) const {
    const std::size_t i = skip_spaces(l, at);
    return i == l.end || (text_[i] == '#' && i > at);
  }

  // A block map or list starting at the current line's `indent`.
  Node block_node() {
    const Deeper deeper(depth_);
    const Line& l = lines_[at_];
    if (dash_at(l, l.indent)) return block_list();
    if (key_at(l, l.indent)) return block_map();
    give_up();
  }

  // The value after a key or a "- " whose own line holds nothing more: the block node on the
  // lines below when they are indented deeper than `column` (or a list at `column` under a key,
  // which YAML allows), else a null where the next token stands.
  Node value_below(std::size_t column, bool in_map) {
    ++at_;
    if (at_ == lines_.size()) {
      if (end_mark_.line == 0) give_up();
      Node n;
      n.mark = end_mark_;
      return n;
    }
    Line& l = lines_[at_];
    const std::size_t indent = l.indent - l.begin;
    if (indent > column || (in_map && indent == column && dash_at(l, l.indent)))
      return block_node();
    Node n;
    n.mark = mark(l, l.indent);
    return n;
  }

  // A value that starts on its key's or its "- "'s line at `at`, then the next line. After a
  // "- " it may be a block node of its own ("- key: value", "- - item"); after a key YAML
  // refuses one ("a: b: c").
  Node value_here(std::size_t at, bool in_list) {
    Line& l = lines_[at_];
    if (dash_at(l, at) || key_at(l, at)) {
      if (!in_list) give_up();
      l.indent = at;
      return block_node();
    }
    Node n = flow_or_scalar(l, at, false);
    if (!rest_empty(l, at_end_)) give_up();
    ++at_;
    return n;
  }

  // The indentation of the next line, or nothing at the end of the text.
  std::optional<std::size_t> next_indent() const {
    if (at_ == lines_.size()) return std::nullopt;
    return lines_[at_].indent - lines_[at_].begin;
  }

  Node block_map() {
    Node map;
    map.kind = Node::Kind::map;
    const std::size_t column = lines_[at_].indent - lines_[at_].begin;
    map.mark = mark(lines_[at_], lines_[at_].indent);
    for (;;) {
      Line& l = lines_[at_];
      const auto colon = key_at(l, l.indent);
      if (!colon) give_up();
      std::string key(text_.substr(l.indent, *colon - l.indent));
      if (null_word(key)) give_up();
      for (const auto& e : map.entries)
        if (e.key == key) give_up();  // a duplicate: yaml-cpp's path reports it
      map.key_marks.push_back(mark(l, l.indent));
      const std::size_t value = skip_spaces(l, *colon + 1);
      Node v = rest_empty(l, *colon + 1) ? value_below(column, true) : value_here(value, false);
      map.entries.push_back({std::move(key), std::move(v)});
      const auto next = next_indent();
      if (!next || *next < column) return map;
      if (*next > column) give_up();
      if (dash_at(lines_[at_], lines_[at_].indent)) give_up();
    }
  }

  Node block_list() {
    Node list;
    list.kind = Node::Kind::sequence;
    const std::size_t column = lines_[at_].indent - lines_[at_].begin;
    list.mark = mark(lines_[at_], lines_[at_].indent);
    for (;;) {
      Line& l = lines_[at_];
      if (!dash_at(l, l.indent)) give_up();
      const std::size_t after = l.indent + 1;
      list.items.push_back(rest_empty(l, after) ? value_below(column, false)
                                                : value_here(skip_spaces(l, after), true));
      const auto next = next_indent();
      if (!next || *next < column) return list;
      if (*next > column) give_up();
      if (!dash_at(lines_[at_], lines_[at_].indent)) return list;  // the map around goes on
    }
  }

  // A scalar, or a flow map or list closed on the same line, starting at `at`; at_end_ is set to
  // the offset just past it.
  Node flow_or_scalar(const Line& l, std::size_t at, bool in_flow) {
    if (at >= l.end) give_up();
    Node n;
    n.mark = mark(l, at);
    const char c = text_[at];
    if (c == '{' || c == '[') {
      const Deeper deeper(depth_);
      n.kind = c == '{' ? Node::Kind::map : Node::Kind::sequence;
      const char close = c == '{' ? '}' : ']';
      std::size_t i = skip_spaces(l, at + 1);
      if (i < l.end && text_[i] == close) {
        at_end_ = i + 1;
        return n;
      }
      for (;;) {
        if (n.kind == Node::Kind::map) {
          const auto colon = key_at(l, i);
          if (!colon || *colon + 1 >= l.end) give_up();
          std::string key(text_.substr(i, *colon - i));
          if (null_word(key)) give_up();
          for (const auto& e : n.entries)
            if (e.key == key) give_up();
          n.key_marks.push_back(mark(l, i));
          Node v = flow_or_scalar(l, skip_spaces(l, *colon + 1), true);
          n.entries.push_back({std::move(key), std::move(v)});
        } else {
          n.items.push_back(flow_or_scalar(l, i, true));
        }
        i = skip_spaces(l, at_end_);
        if (i >= l.end) give_up();
        if (text_[i] == close) {
          at_end_ = i + 1;
          return n;
        }
        if (text_[i] != ',') give_up();
        i = skip_spaces(l, i + 1);
      }
    }
    n.kind = Node::Kind::scalar;
    if (c == '"' || c == '\'') {
      std::size_t i = at + 1;
      while (i < l.end && text_[i] != c && !(c == '"' && text_[i] == '\\')) ++i;
      if (i >= l.end || text_[i] != c) give_up();  // a backslash, or not closed on this line
      if (c == '\'' && i + 1 < l.end && text_[i + 1] == '\'') give_up();  // '' inside
      n.scalar = std::string(text_.substr(at + 1, i - at - 1));
      at_end_ = i + 1;
      return n;
    }
    // A plain scalar: it starts with a letter or a digit, or a sign or point before one.
    if (!alnum(c) &&
        !((c == '-' || c == '+' || c == '.') && at + 1 < l.end && alnum(text_[at + 1])))
      give_up();
    std::size_t i = at + 1;
    while (i < l.end && plain_char(text_[i])) ++i;
    std::size_t end = i;
    while (text_[end - 1] == ' ') --end;
    if (i < l.end) {
      // What stops it: in a flow a ',', ']' or '}'; else a comment after a space.
      const char stop = text_[i];
      const bool ok = in_flow ? (stop == ',' || stop == ']' || stop == '}')
                              : (stop == '#' && text_[i - 1] == ' ');
      if (!ok) give_up();
    }
    n.scalar = std::string(text_.substr(at, end - at));
    if (null_word(n.scalar)) give_up();
    at_end_ = end;
    return n;
  }

  std::string_view text_;
  std::vector<Line> lines_;
  std::size_t at_ = 0;      // the current line
  std::size_t at_end_ = 0;  // just past the last flow node or scalar read
  Mark end_mark_{0, 0};     // where a null at the end of the text stands; line 0: give up
};

}  // namespace

Document parse_document(const std::string& text, const std::string& file) {
  Document doc;
  doc.file = file;
  doc.directory = std::filesystem::path(file).parent_path();
  // Text is UTF-8 (YAML 1.2, 5.2; lapwing's files and outputs are UTF-8): a byte that is not is
  // refused where it stands, before the parser reads it. A NUL byte is valid UTF-8 but no text
  // file holds one (the parser would stop there and call the file empty): the file is binary.
  // Whichever comes first is named.
  const std::size_t nul = text.find('\0');
  if (const auto bad = invalid_utf8_at(std::string_view(text).substr(0, nul))) {
    const TextPosition at = position_of(text, *bad);
    throw InputError(file, Mark{at.line, at.col}, invalid_utf8_message(text, *bad));
  }
  if (nul != std::string::npos) {
    const TextPosition at = position_of(text, nul);
    throw InputError(file, Mark{at.line, at.col},
                     "a NUL byte (byte " + std::to_string(nul + 1) + "): not a text file");
  }
  // Lines ended by a CR alone (old Mac text): YAML reads a lone CR as no line break, so the
  // parser saw one long line and said the file was empty (its first line a comment) or called
  // some value illegal (a robustness campaign's finding). Named at the first such CR, where
  // the text has no LF at all.
  if (const std::size_t cr = text.find('\r');
      cr != std::string::npos && text.find('\n') == std::string::npos && cr + 1 < text.size()) {
    const TextPosition at = position_of(text, cr);
    throw InputError(file, Mark{at.line, at.col}, lone_cr_message);
  }
  if (auto root = detail::read_simple_yaml(text))
    doc.root = std::move(*root);
  else
    doc.root = detail::read_yaml(text, file);
  if (doc.root.kind != Node::Kind::map)
    throw InputError(file, doc.root.mark, "the file must be a map of keys");
  return doc;
}

std::optional<Node> detail::read_simple_yaml(std::string_view text) {
  return SimpleYaml(text).read();
}

Node detail::read_yaml(const std::string& text, const std::string& file) {
  Node root;
  std::istringstream in(text);
  TreeBuilder builder(file);
  TreeBuilder rest(file);
  const TreeBuilder* reading = &builder;
  try {
    YAML::Parser parser(in);
    if (!parser.HandleNextDocument(builder))
      throw InputError(file, Mark{1, 1}, "the file is empty");
    root = builder.take();
    reading = &rest;
    if (parser.HandleNextDocument(rest)) {
      // An indented first key ends its map at the first key of column 1, which yaml-cpp reads as
      // a second document: said so, where it was called a second document (a robustness
      // campaign's finding).
      if (root.mark.col > 1 && rest.start().col < root.mark.col)
        throw InputError(file, rest.start(),
                         "this key is left of the file's first key (column " +
                             std::to_string(root.mark.col) +
                             "): the top level's keys must start in one column");
      throw InputError(file, rest.start(), "more than one YAML document in the file");
    }
  } catch (const YAML::Exception& e) {
    // Named by the key whose value was being read; else by the indentation around the error
    // (the parser reads ahead: a tab in an indentation is met before the key above is handed
    // over).
    std::string path = reading->path();
    if (path.empty()) path = block_path(text, e.mark.line + 1);
    // A path through lists nested thousands deep (yaml-cpp's limit, below) is named by its
    // start: the key it hangs from.
    constexpr std::size_t longest_path = 80;
    if (path.size() > longest_path) path = path.substr(0, longest_path) + "...";
    if (dynamic_cast<const YAML::DeepRecursion*>(&e))
      throw InputError(
          file, to_mark(e.mark),
          "YAML syntax: maps and lists nested too deep (lapwing's files nest a few levels)", path);
    // A tab in the line's indentation is the likely cause (YAML 1.2, 6.1: tabs must not indent).
    std::string tab;
    {
      std::size_t at = 0;
      for (int l = 0; l < e.mark.line && at != std::string::npos; ++l) {
        at = text.find('\n', at);
        if (at != std::string::npos) ++at;
      }
      if (at != std::string::npos) {
        const std::size_t first = text.find_first_not_of(" \t", at);
        if (text.find('\t', at) < std::min(first, text.size()))
          tab = "; the line is indented with a tab (YAML indents with spaces)";
      }
    }
    throw InputError(file, to_mark(e.mark), "YAML syntax: " + e.msg + tab, path);
  }
  return root;
}

Document load_document(const std::string& file) {
  std::ifstream in = open_input(file);
  // Read up to the cap and one byte more: a special file that never ends (/dev/zero, a pipe) is
  // refused there instead of being read for ever.
  std::string text;
  char buffer[1 << 16];
  while (in.read(buffer, sizeof buffer) || in.gcount() > 0) {
    const auto got = static_cast<std::size_t>(in.gcount());
    text.append(buffer, got);
    // A NUL byte: parse_document refuses the file there; what follows need not be read.
    if (std::string_view(buffer, got).find('\0') != std::string_view::npos) break;
    if (text.size() > max_document_bytes)
      throw InputError(file, Mark{},
                       "the file is larger than " + mib_text(max_document_bytes) +
                           " (lapwing's largest car or track file): not a car or track file");
  }
  if (in.bad()) throw InputError(file, Mark{}, "cannot read the file");
  return parse_document(text, file);
}

std::size_t edit_distance(std::string_view a, std::string_view b) {
  std::vector<std::size_t> prev(b.size() + 1), cur(b.size() + 1);
  for (std::size_t j = 0; j <= b.size(); ++j) prev[j] = j;
  for (std::size_t i = 1; i <= a.size(); ++i) {
    cur[0] = i;
    for (std::size_t j = 1; j <= b.size(); ++j)
      cur[j] = std::min({prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + (a[i - 1] != b[j - 1])});
    std::swap(prev, cur);
  }
  return prev[b.size()];
}

std::string closest(std::string_view word, const std::vector<std::string>& candidates) {
  std::string best;
  std::size_t best_d = std::max<std::size_t>(2, word.size() / 3) + 1;
  for (const auto& c : candidates) {
    std::size_t d = edit_distance(word, c);
    if (d < best_d) {
      best_d = d;
      best = c;
    }
  }
  return best;
}

Reader::Reader(const Document& doc, const Node& node, std::string path)
    : doc_(&doc), node_(&node), path_(std::move(path)) {
  if (node.kind != Node::Kind::map) fail(node, "expected a map of keys");
}

std::string Reader::child_path(std::string_view key) const {
  return path_.empty() ? std::string(key) : path_ + "." + std::string(key);
}

void Reader::fail(const Node& at, const std::string& what, std::string_view key) const {
  throw InputError(doc_->file, at.mark, what, key.empty() ? path_ : child_path(key));
}

bool Reader::has(std::string_view key) const {
  return node_->find(key) != nullptr;
}

const Node* Reader::get(std::string_view key) {
  const Node* n = node_->find(key);
  asked_.emplace_back(key);
  if (n) read_.emplace_back(key);
  return n;
}

const Node& Reader::require(std::string_view key) {
  const Node* n = get(key);
  if (n) return *n;
  // A missing key next to a misspelt one: name the misspelling where it stands.
  for (std::size_t i = 0; i < node_->entries.size() && !allowed_.empty(); ++i) {
    const std::string& k = node_->entries[i].key;
    if (std::find(allowed_.begin(), allowed_.end(), k) != allowed_.end()) continue;
    if (closest(k, {std::string(key)}) == key)
      throw InputError(doc_->file, node_->key_marks[i],
                       "unknown key '" + k + "'; did you mean '" + std::string(key) + "'?",
                       child_path(k));
  }
  fail(*node_, "missing key '" + std::string(key) + "'", key);
}

double Reader::node_quantity(const Node& n, Quantity q, const std::string& path,
                             std::optional<Range> r) const {
  if (n.kind != Node::Kind::scalar)
    throw InputError(doc_->file, n.mark,
                     "expected a " + std::string(quantity_name(q)) + ", got a " +
                         (n.kind == Node::Kind::null ? "null" : "list or map"),
                     path);
  std::string err;
  auto v = parse_quantity(n.scalar, q, err);
  if (!v) throw InputError(doc_->file, n.mark, err, path);
  if (r && !r->contains(*v))
    throw InputError(
        doc_->file, n.mark,
        "value " + n.scalar + " is out of range: must be " + r->describe() +
            (q == Quantity::number || q == Quantity::fraction ? std::string() : " in SI units"),
        path);
  return *v;
}

std::string Reader::node_string(const Node& n, const std::string& path) const {
  if (n.kind != Node::Kind::scalar)
    throw InputError(doc_->file, n.mark, "expected a text value", path);
  // A control character (a double-quoted "\u0000", "\e") is no part of a name or a path, and
  // the reports could not show it (HTML has no NUL); a tab is text.
  for (const char c : n.scalar) {
    const auto u = static_cast<unsigned char>(c);
    if ((u < 0x20 && c != '\t') || u == 0x7f) {
      char code[8];
      std::snprintf(code, sizeof code, "U+%04X", u);
      throw InputError(doc_->file, n.mark,
                       std::string("a control character (") + code + ") in a text value", path);
    }
  }
  return n.scalar;
}

double Reader::quantity(std::string_view key, Quantity q, std::optional<Range> r) {
  return node_quantity(require(key), q, child_path(key), r);
}

double Reader::quantity_or(std::string_view key, Quantity q, double fallback) {
  auto v = optional_quantity(key, q);
  return v ? *v : fallback;
}

std::optional<double> Reader::optional_quantity(std::string_view key, Quantity q,
                                                std::optional<Range> r) {
  const Node* n = get(key);
  if (!n) return std::nullopt;
  return node_quantity(*n, q, child_path(key), r);
}

std::string Reader::string(std::string_view key) {
  return node_string(require(key), child_path(key));
}

std::string Reader::string_or(std::string_view key, std::string fallback) {
  const Node* n = get(key);
  return n ? node_string(*n, child_path(key)) : std::move(fallback);
}

bool Reader::boolean_or(std::string_view key, bool fallback) {
  const Node* n = get(key);
  if (!n) return fallback;
  std::string s = node_string(*n, child_path(key));
  if (s == "true") return true;
  if (s == "false") return false;
  fail(*n, "expected true or false, got '" + s + "'", key);
}

int Reader::integer(std::string_view key, int lo, int hi) {
  const Node& n = require(key);
  double v = node_quantity(n, Quantity::number, child_path(key), Range{double(lo), double(hi)});
  if (v != std::floor(v)) fail(n, "expected a whole number, got " + n.scalar, key);
  return static_cast<int>(v);
}

std::string Reader::choice(std::string_view key, const std::vector<std::string>& choices,
                           std::string fallback) {
  const Node* n = fallback.empty() ? &require(key) : get(key);
  if (!n) return fallback;
  std::string s = node_string(*n, child_path(key));
  if (std::find(choices.begin(), choices.end(), s) != choices.end()) return s;
  std::string list;
  for (const auto& c : choices) list += (list.empty() ? "" : " | ") + c;
  std::string near = closest(s, choices);
  fail(*n,
       "'" + s + "' is not one of " + list + (near.empty() ? "" : "; did you mean '" + near + "'?"),
       key);
}

std::vector<double> Reader::quantities(std::string_view key, Quantity q, std::optional<Range> r) {
  const Node& n = require(key);
  if (n.kind != Node::Kind::sequence) fail(n, "expected a list", key);
  std::vector<double> out;
  out.reserve(n.items.size());
  for (std::size_t i = 0; i < n.items.size(); ++i)
    out.push_back(node_quantity(n.items[i], q, child_path(key) + "[" + std::to_string(i) + "]", r));
  return out;
}

Reader Reader::map(std::string_view key) {
  const Node& n = require(key);
  if (n.kind != Node::Kind::map) fail(n, "expected a map of keys", key);
  return Reader(*doc_, n, child_path(key));
}

void Reader::finish(const std::vector<std::string>& also_known) {
  std::vector<std::string> known = asked_;
  known.insert(known.end(), allowed_.begin(), allowed_.end());
  known.insert(known.end(), also_known.begin(), also_known.end());
  for (std::size_t i = 0; i < node_->entries.size(); ++i) {
    const std::string& k = node_->entries[i].key;
    if (std::find(read_.begin(), read_.end(), k) != read_.end()) continue;
    std::string near = closest(k, known);
    throw InputError(
        doc_->file, node_->key_marks[i],
        "unknown key '" + k + "'" + (near.empty() ? "" : "; did you mean '" + near + "'?"),
        child_path(k));
  }
}

}  // namespace lapwing
