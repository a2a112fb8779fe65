// Reading input files: positions in errors, duplicate keys, aliases, unknown keys.
#include <doctest/doctest.h>

#include <algorithm>
#include <cstdint>
#include <filesystem>
#include <fstream>
#include <functional>
#include <optional>
#include <sstream>
#include <string>
#include <utility>
#include <vector>

#include "lapwing/base/error.hpp"
#include "lapwing/io/document.hpp"
#include "test_support.hpp"

using namespace lapwing;

namespace {
std::string error_of(const std::string& text) {
  try {
    Document d = parse_document(text, "x.yaml");
    Reader r(d, d.root, "");
    r.quantity("mass", Quantity::mass, positive());
    if (r.has("tyres")) {
      Reader t = r.map("tyres");
      t.quantity("mu_lat", Quantity::number, Range{0, 3, true, false});
      t.finish();
    }
    r.finish();
  } catch (const InputError& e) {
    return e.what();
  }
  return "";
}
}  // namespace

TEST_CASE("errors carry FILE:LINE:COL and the key path") {
  CHECK(error_of("mass: 640 kg\ntyres:\n  mu_lat: -1.2\n") ==
        "x.yaml:3:11: error: value -1.2 is out of range: must be (0, 3] (tyres.mu_lat)");
  CHECK(error_of("mass: 640 kgs\n") ==
        "x.yaml:1:7: error: unknown mass unit 'kgs' (accepted: kg, lb) (mass)");
}

TEST_CASE("duplicate keys, aliases, anchors and tags are refused") {
  CHECK(error_of("mass: 640\nmass: 650\n")
            .find("x.yaml:2:1: error: duplicate key 'mass' (first given at line 1)") == 0);
  CHECK(error_of("a: &m 640\nmass: *m\n").find("anchors") != std::string::npos);
  CHECK(error_of("mass: !!float 640\n").find("tags are not accepted") != std::string::npos);
}

TEST_CASE("unknown keys are refused with a suggestion") {
  CHECK(error_of("mass: 640\ntyres:\n  mu_lat: 1.7\n  mu_latt: 1.6\n") ==
        "x.yaml:4:3: error: unknown key 'mu_latt'; did you mean 'mu_lat'? (tyres.mu_latt)");
  CHECK(error_of("mass: 640\ncolour: red\n") == "x.yaml:2:1: error: unknown key 'colour' (colour)");
}

TEST_CASE("syntax errors and empty files are input errors too") {
  CHECK(error_of("mass: [1, 2\n").find("x.yaml:") == 0);
  CHECK(error_of("").find("empty") != std::string::npos);
  CHECK(error_of("- 1\n- 2\n").find("must be a map") != std::string::npos);
}

TEST_CASE("suggestions come from edit distance") {
  CHECK(edit_distance("kitten", "sitting") == 3);
  CHECK(closest("mu_latt", {"mu_lat", "mu_long"}) == "mu_lat");
  CHECK(closest("zzz", {"mu_lat", "mu_long"}).empty());
}

TEST_CASE("a missing key beside a misspelt one names the misspelling, not a valid neighbour") {
  auto run = [](const std::string& text) -> std::string {
    try {
      Document d = parse_document(text, "c.yaml");
      Reader r(d, d.root, "");
      r.keys({"cda", "cla", "balance"});
      r.quantity("cda", Quantity::area, non_negative());
      r.quantity("cla", Quantity::area, non_negative());
      r.finish();
    } catch (const InputError& e) {
      return e.what();
    }
    return "";
  };
  // 'cda' is a valid key one edit from 'cla': the error is the missing 'cla'.
  CHECK(run("cda: 1\n") == "c.yaml:1:1: error: missing key 'cla' (cla)");
  CHECK(run("cda: 1\nclaa: 3\n") ==
        "c.yaml:2:1: error: unknown key 'claa'; did you mean 'cla'? (claa)");
}

TEST_CASE("a byte that is not UTF-8 is refused at its line and column (issue 19, finding 10)") {
  CHECK(error_of("mass: 640\nname: \"Cald\xE9ra\"\n") ==
        "x.yaml:2:12: error: the text is not valid UTF-8 (byte 0xE9)");
  CHECK(error_of("mass: 640\nname: \"Caldera\"\n") ==
        "x.yaml:2:1: error: unknown key 'name' (name)");
}

TEST_CASE(
    "every document error names a line: an empty file 1:1, a second document where it starts") {
  CHECK(error_of("") == "x.yaml:1:1: error: the file is empty");
  CHECK(error_of("# only a comment\n") == "x.yaml:1:1: error: the file is empty");
  CHECK(error_of("mass: 640\n---\nmass: 650\n") ==
        "x.yaml:2:1: error: more than one YAML document in the file");
}

TEST_CASE("a newline in a quoted key or value stays inside one error line (issue 19, finding 8)") {
  CHECK(error_of("mass: 640\n\"col\\nour\": red\n") ==
        "x.yaml:2:1: error: unknown key 'col\\nour' (col\\nour)");
  CHECK(error_of("mass: \"640\\nkg\"\n") ==
        "x.yaml:1:7: error: unknown mass unit '\\nkg' (accepted: kg, lb) (mass)");
}

// The fast reader against yaml-cpp. The reference is yaml-cpp 0.7's event parser as lapwing reads
// it (detail::read_yaml: yaml-cpp's events and marks, lapwing's refusals); the fast reader must
// build the very same tree (kinds, marks of nodes and keys, texts, order) or give up.
namespace {

std::string mark_text(const Mark& m) {
  return std::to_string(m.line) + ":" + std::to_string(m.col);
}

// Where two trees first differ ("" when they agree in everything a Node holds).
std::string tree_difference(const Node& a, const Node& b, const std::string& at) {
  const std::string where = (at.empty() ? "root" : at) + ": ";
  if (a.kind != b.kind) return where + "kind";
  if (a.mark.line != b.mark.line || a.mark.col != b.mark.col)
    return where + "mark " + mark_text(a.mark) + " vs " + mark_text(b.mark);
  if (a.scalar != b.scalar) return where + "text '" + a.scalar + "' vs '" + b.scalar + "'";
  if (a.items.size() != b.items.size()) return where + "item count";
  if (a.entries.size() != b.entries.size() || a.key_marks.size() != b.key_marks.size() ||
      a.entries.size() != a.key_marks.size())
    return where + "entry count";
  for (std::size_t i = 0; i < a.items.size(); ++i) {
    std::string d = tree_difference(a.items[i], b.items[i], at + "[" + std::to_string(i) + "]");
    if (!d.empty()) return d;
  }
  for (std::size_t i = 0; i < a.entries.size(); ++i) {
    const std::string key = at + "." + b.entries[i].key;
    if (a.entries[i].key != b.entries[i].key) return where + "key " + a.entries[i].key;
    if (a.key_marks[i].line != b.key_marks[i].line || a.key_marks[i].col != b.key_marks[i].col)
      return key + ": key mark " + mark_text(a.key_marks[i]) + " vs " + mark_text(b.key_marks[i]);
    std::string d = tree_difference(a.entries[i].value, b.entries[i].value, key);
    if (!d.empty()) return d;
  }
  return "";
}

struct ReaderVerdict {
  bool handled = false;  // the fast reader took the text
  std::string problem;   // when it did: "" if yaml-cpp read the same tree, else what differs
};

ReaderVerdict both_readers(const std::string& text) {
  ReaderVerdict v;
  const std::optional<Node> fast = detail::read_simple_yaml(text);
  v.handled = fast.has_value();
  if (!v.handled) return v;
  try {
    v.problem = tree_difference(*fast, detail::read_yaml(text, "x.yaml"), "");
  } catch (const InputError& e) {
    v.problem = std::string("yaml-cpp refuses it: ") + e.what();
  }
  return v;
}

std::string read_file(const std::filesystem::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

}  // namespace

TEST_CASE(
    "the fast YAML reader takes every bundled car and track and reads them as yaml-cpp does") {
  namespace fs = std::filesystem;
  std::vector<fs::path> files;
  for (const char* dir : {"cars", "tracks", "tests", "examples"}) {
    const fs::path root = test::source_path(dir);
    if (!fs::exists(root)) continue;
    for (const auto& e : fs::recursive_directory_iterator(root))
      if (e.is_regular_file() && e.path().extension() == ".yaml") files.push_back(e.path());
  }
  std::sort(files.begin(), files.end());
  REQUIRE(files.size() >= 14);  // the 2 cars, 6 tracks and the test data at least
  int handled = 0;
  for (const auto& f : files) {
    CAPTURE(f.string());
    const ReaderVerdict v = both_readers(read_file(f));
    CHECK(v.problem == "");
    handled += v.handled;
    // The files lapwing ships and the benchmark reads: the fast reader is for these.
    const std::string parent = f.parent_path().filename().string();
    if (parent == "cars" || parent == "tracks") CHECK(v.handled);
  }
  // Most of the test files are plain too (the bad ones' faults are mostly in their values).
  CHECK(handled * 2 > static_cast<int>(files.size()));
}

TEST_CASE("a file whose lines end with a CR alone is named so, at its first CR") {
  // A robustness campaign's: YAML reads a lone CR as no line break, and such a file read as one
  // line said it was empty (its first line a comment) or called a value illegal.
  const std::string want =
      "error: the lines end with a CR alone (old Mac line ends): save the file with LF or CR LF "
      "line ends";
  CHECK(error_of("mass: 640\rtyres:\r  mu_lat: 1.2\r") == "x.yaml:1:10: " + want);
  CHECK(error_of("# a car\rmass: 640\r") == "x.yaml:1:8: " + want);
  // CR LF is a line end, and so is a last CR with nothing after it (the parser's business).
  CHECK(error_of("mass: 640\r\ntyres:\r\n  mu_lat: 1.2\r\n") == "");
}

TEST_CASE("an indented first key is named as such, not as a second document") {
  // yaml-cpp ends an indented first key's map at the next key of column 1 and reads a second
  // document there (a robustness campaign's: "more than one YAML document" for one indent).
  CHECK(error_of("# c\n  mass: 640\ntyres:\n  mu_lat: 1.2\n") ==
        "x.yaml:3:1: error: this key is left of the file's first key (column 3): the top "
        "level's keys must start in one column");
  CHECK(error_of("mass: 640\n---\ntyres: {}\n") ==
        "x.yaml:2:1: error: more than one YAML document in the file");
}

TEST_CASE("lists nested thousands deep are an input error, not a crash") {
  // A robustness campaign's file (20 000 '[' after a key) overflowed the fast reader's stack:
  // it now leaves anything nested over 64 deep to yaml-cpp, which refuses nesting deeper than
  // its limit (some 500 flow lists here), and the error names the key it hangs from, shortened.
  const auto nested = [](std::size_t depth, const char* open, const char* close) {
    std::string t = "mass: 640\nzz: ";
    for (std::size_t i = 0; i < depth; ++i) t += open;
    for (std::size_t i = 0; i < depth; ++i) t += close;
    return t + "\n";
  };
  for (const auto& [open, close] : {std::pair{"[", "]"}, std::pair{"{a: ", "}"}}) {
    const std::string deep = error_of(nested(20000, open, close));
    CAPTURE(deep.substr(0, 200));
    CHECK(deep.find("x.yaml:2:") == 0);
    CHECK(deep.find("nested too deep") != std::string::npos);
    CHECK(deep.size() < 300);  // the key's path, not 20 000 of its levels
    // Deeper than the fast reader goes, within yaml-cpp's limit: read, and the key is unknown.
    CHECK(error_of(nested(100, open, close)) == "x.yaml:2:1: error: unknown key 'zz' (zz)");
  }
  // Block maps nested deeper than 64: yaml-cpp's tree, the same as the fast reader's would be.
  std::string block = "mass: 640\n";
  for (int i = 0; i < 80; ++i) block += std::string(static_cast<std::size_t>(i), ' ') + "k:\n";
  CHECK(error_of(block) == "x.yaml:2:1: error: unknown key 'k' (k)");
}

TEST_CASE("the fast YAML reader agrees with yaml-cpp on tricky texts, or gives up on them") {
  struct Case {
    const char* text;
    bool handled;
  };
  const Case cases[] = {
      // Nulls: where yaml-cpp marks them (the next token, or the start of the line after the
      // last line end).
      {"a: 1\nb:\n", true},
      {"a:\nb: 1\n", true},
      {"a:\n\n# c\n", true},
      {"a:   # x\n  # y\nb: 1", true},
      {"x:\n  a:\nb: 1\n", true},
      {"x:\n  a:\n\n  # c\n", true},
      {"a: 1\nb:", false},  // a null at the end of a text without a final line end
      // Block lists, nested, indented under their key or not.
      {"s:\n- a\n- b\nc: 1\n", true},
      {"s:\n  - a\n  - b: 1\n    c:\n  -\n  - - x\n", true},
      {"s:\n    -   a\n    -   k: v\n        k2: {p: 1}\nt: 2\n", true},
      {"s:\n  - - - deep\n    - x\n  - y\n", true},
      {"s:\n  -\n    a: 1\n  -\n    - 2\n", true},
      // Comments everywhere, blank lines, trailing spaces.
      {"# head\n\na: 1 # one\n  # odd comment\nb:    two words   \n\n# tail\n", true},
      {"a: {x: 1, y: [2, 3]}   # c\nb: [ ]\nc: {}\n", true},
      // CRLF line ends.
      {"a: 1\r\nb:\r\n  - x y \r\n  - {k: v}\r\nc:\r\n", true},
      {"a: 1\rb: 2\n", false},  // a lone CR
      // Quoted scalars.
      {"name: \"Caldra # GT\"\nalt: 'it s'\nq: \"\"\n", true},
      {"name: \"a\\\"b\"\n", false},
      {"name: 'it''s'\n", false},
      {"name: \"two\n  lines\"\n", false},
      // Flow maps inside lists, lists inside flow maps.
      {"segments:\n  - straight: 300.000 m\n  - arc: {radius: 15 m, angle: 124.1 deg, turn: "
       "right}\n",
       true},
      {"m: {rpm: [2000, 4000], power: [150 kW, 300 kW]}\n", true},
      {"m: [{a: 1}, [b, c], 'd', \"e\"]\n", true},
      {"m: [ 1 , 2 ]\nn: { k: v , w: [ ] }\no: [[], {}, [[x]]]\n", true},
      {"m: [.nan, -1.5e-3, 0x1F, yes, a -b, x.y/z]\nn: .inf\n", true},
      {"- a:\n    b: 1\n", false},  // a list at the root: yaml-cpp's path refuses it
      {"r:\n- a:\n    b: 1\n  c: 2\n-   - x\n    - y\nd:\n", true},
      {"m: {a: 1,\n  b: 2}\n", false},  // a flow map over two lines
      // Keys at odd indentation.
      {"a:\n   b: 1\n   c:\n         d: 2\ne: 3\n", true},
      {"a:\n   b: 1\n  c: 2\n", false},
      {"  a: 1\n  b: 2\n", false},  // an indented root
      // What yaml-cpp reads but the fast reader leaves to it.
      {"a: &x 1\nb: *x\n", false},
      {"a: !!str 1\n", false},
      {"a: |\n  text\n", false},
      {"a: >\n  text\n", false},
      {"? a\n: 1\n", false},
      {"---\na: 1\n", false},
      {"a: 1\n...\n", false},
      {"a: 1\n---\nb: 2\n", false},
      {"\"a\": 1\n", false},
      {"a: one\n  two\n", false},  // a plain scalar over two lines
      {"a: b: c\n", false},
      {"a: 1\na: 2\n", false},  // a duplicate key: yaml-cpp's path names it
      {"a: null\n", false},
      {"a: ~\n", false},
      {"a:\t1\n", false},
      {"\xEF\xBB\xBF"
       "a: 1\n",
       false},
      {"a: caf\xC3\xA9\n", false},
      {"", false},
      {"# only a comment\n", false},
      {"- 1\n- 2\n", false},
      {"a: 1:2\n", false},
      {"a: x#y\n", false},
      {"a: [1, 2,]\n", false},
      {"a: {b}\n", false},
      {"a: {b:1}\n", false},
  };
  for (const Case& c : cases) {
    CAPTURE(std::string(c.text));
    const ReaderVerdict v = both_readers(c.text);
    CHECK(v.handled == c.handled);
    CHECK(v.problem == "");
  }
}

TEST_CASE("whatever the fast YAML reader takes, yaml-cpp reads to the same tree (random texts)") {
  // Documents drawn from a grammar of the subset, some then mutated with YAML's indicator
  // characters, a deleted byte or a changed indentation. Fixed seed: the same texts every run.
  test::Noise noise;
  noise.state = 20261203;
  const auto pick = [&](std::size_t n) {
    return std::min(n - 1, static_cast<std::size_t>(noise.uniform() * static_cast<double>(n)));
  };
  const auto chance = [&](double p) { return noise.uniform() < p; };
  const std::vector<std::string> keys = {"a", "b", "mass", "mu_lat", "k2", "x_1", "seg", "7"};
  // A map's next key: one it does not hold yet, but now and then a repeat or "null" (which
  // yaml-cpp reads as a null key, not a word).
  const auto key_for = [&](std::vector<std::string>& used) {
    std::string k = chance(0.02) ? std::string("null") : keys[pick(keys.size())];
    while (!chance(0.03) && std::find(used.begin(), used.end(), k) != used.end())
      k = keys[pick(keys.size())];
    used.push_back(k);
    return k;
  };
  const std::vector<std::string> plains = {
      "1",   "-2.5", "300.000 m", "abc",  "x y z", "36 %", "a/b",   "(x)", "true",
      "1e3", "+4",   ".5",        "1.45", "kW",    "-x",   "a - b", "o_k", "2000 rpm"};
  const std::vector<std::string> quoted = {"\"Caldra GT\"", "'it s'", "\"\"", "'# no'", "\"a: b\""};
  std::function<std::string(int)> flow = [&](int depth) -> std::string {
    const std::size_t kind = depth > 2 ? pick(2) : pick(4);
    if (kind == 0) return chance(0.01) ? std::string("Null") : plains[pick(plains.size())];
    if (kind == 1) return quoted[pick(quoted.size())];
    const std::size_t n = pick(4);
    std::string s = kind == 2 ? "{" : "[";
    std::vector<std::string> used;
    for (std::size_t i = 0; i < n; ++i) {
      if (i) s += chance(0.8) ? ", " : " ,";
      if (kind == 2) s += key_for(used) + ": ";
      s += flow(depth + 1);
    }
    return s + (kind == 2 ? "}" : "]");
  };
  const auto inline_value = [&]() {
    const std::size_t k = pick(3);
    return k == 0 ? plains[pick(plains.size())] : k == 1 ? quoted[pick(quoted.size())] : flow(1);
  };
  const auto tail = [&]() {
    std::string s = chance(0.2) ? std::string(1 + pick(3), ' ') : "";
    if (chance(0.15)) s += (s.empty() ? " # c" : "# c");
    return s + "\n";
  };
  const auto filler = [&](std::size_t indent) {
    if (chance(0.1)) return std::string("\n");
    if (chance(0.1)) return std::string(pick(indent + 3), ' ') + "# note\n";
    return std::string();
  };
  std::function<std::string(std::size_t, int)> block_map, block_list;
  // The value of a key or "- " whose line ends there: a deeper block node, or nothing (a null).
  const auto below = [&](std::size_t indent, int depth, bool in_map) {
    const std::size_t k = depth > 3 ? 2 : pick(3);
    if (k == 2) return tail();
    const std::size_t deeper = indent + ((in_map && k == 1 && chance(0.3)) ? 0 : 1 + pick(4));
    return tail() + filler(indent) +
           (k == 0 ? block_map(deeper, depth + 1) : block_list(deeper, depth + 1));
  };
  block_map = [&](std::size_t indent, int depth) {
    std::string s;
    const std::size_t n = 1 + pick(4);
    std::vector<std::string> used;
    for (std::size_t i = 0; i < n; ++i) {
      s += filler(indent) + std::string(indent, ' ') + key_for(used) + ":";
      s += chance(0.5) ? " " + inline_value() + tail() : below(indent, depth, true);
    }
    return s;
  };
  block_list = [&](std::size_t indent, int depth) {
    std::string s;
    const std::size_t n = 1 + pick(4);
    for (std::size_t i = 0; i < n; ++i) {
      s += filler(indent) + std::string(indent, ' ') + "-";
      const std::size_t k = depth > 3 ? pick(2) : pick(4);
      if (k == 0) {
        s += " " + inline_value() + tail();
      } else if (k == 1) {
        s += below(indent, depth, false);
      } else {
        // A compact map or list on the item's own line: its further lines line up with it.
        const std::size_t gap = 1 + pick(2);
        std::string inner = k == 2 ? block_map(indent + 1 + gap, depth + 1)
                                   : block_list(indent + 1 + gap, depth + 1);
        s += std::string(gap, ' ') + inner.substr(inner.find_first_not_of(' '));
      }
    }
    return s;
  };
  const std::string indicators = ":-?[]{},#&*!|>'\"%@` \t\r\n~\\.";
  int handled = 0, plain_handled = 0, plain_total = 0;
  for (int doc = 0; doc < 6000; ++doc) {
    std::string text = block_map(0, 0);
    if (chance(0.1)) {  // CRLF line ends throughout
      std::string crlf;
      for (char c : text) crlf += c == '\n' ? std::string("\r\n") : std::string(1, c);
      text = crlf;
    }
    if (chance(0.05) && !text.empty()) text.pop_back();  // no final line end
    const bool mutated = chance(0.6);
    if (mutated) {
      for (std::size_t m = 1 + pick(3); m-- > 0 && !text.empty();) {
        const std::size_t at = pick(text.size());
        const std::size_t how = pick(3);
        if (how == 0) {
          text.insert(at, 1, indicators[pick(indicators.size())]);
        } else if (how == 1) {
          text.erase(at, 1);
        } else {  // one more or one less space at the start of a line
          const std::size_t line =
              text.rfind('\n', at) == std::string::npos ? 0 : text.rfind('\n', at) + 1;
          if (chance(0.5))
            text.insert(line, 1, ' ');
          else if (text[line] == ' ')
            text.erase(line, 1);
        }
      }
    }
    CAPTURE(text);
    const ReaderVerdict v = both_readers(text);
    CHECK(v.problem == "");
    handled += v.handled;
    if (!mutated) {
      ++plain_total;
      plain_handled += v.handled;
    }
  }
  MESSAGE("fast reader took " << handled << " of 6000 texts, " << plain_handled << " of "
                              << plain_total << " unmutated");
  // Not a vacuous test: the fast reader must take many of the texts it is compared on. With this
  // seed it takes 2264 texts, 1600 of the 2383 unmutated (those it leaves hold, in the ones looked
  // at, a "null" key, a "Null" value, a repeated key or a null at the end of a text without a
  // final line end); the bounds leave room for a change of generator, none for a reader that
  // gives up on most texts.
  CHECK(handled > 1200);
  CHECK(plain_handled * 2 > plain_total);
}
