// Reading input files: positions in errors, duplicate keys, aliases, unknown keys.
#include <doctest/doctest.h>

#include "lapwing/base/error.hpp"
#include "lapwing/io/document.hpp"

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
