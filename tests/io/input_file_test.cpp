// Input files that cannot be read say why (README, "Output files": one line FILE:LINE:COL: error:
// WHAT (KEY.PATH)): a missing file with the system's reason, a directory, a binary file, a file
// with no end; and the YAML reader's own refusals name the key path where they stand.
#include <doctest/doctest.h>

#include <filesystem>
#include <string>

#include "lapwing/base/error.hpp"
#include "lapwing/io/csv.hpp"
#include "lapwing/io/document.hpp"
#include "lapwing/io/input_file.hpp"
#include "test_support.hpp"

using namespace lapwing;

namespace {
std::string load_error(const std::string& file) {
  try {
    load_document(file);
  } catch (const InputError& e) {
    return e.what();
  }
  return "";
}
std::string csv_file_error(const std::string& file) {
  try {
    read_csv(file, 1);
  } catch (const InputError& e) {
    return e.what();
  }
  return "";
}
std::string parse_error(const std::string& text) {
  try {
    parse_document(text, "x.yaml");
  } catch (const InputError& e) {
    return e.what();
  }
  return "";
}
}  // namespace

TEST_CASE("a file that cannot be opened gives the system's reason, without a position") {
  const std::string missing = test::scratch_dir() + "/no-such-input.yaml";
  std::filesystem::remove(missing);
  // ENOENT's text as glibc's strerror gives it (POSIX names the error; the words are the C
  // library's, as every program on the system prints them).
  CHECK(load_error(missing) ==
        missing + ": error: cannot open the file: No such file or directory");
  CHECK(csv_file_error(missing) ==
        missing + ": error: cannot open the file: No such file or directory");
  CHECK(unreadable(missing).value_or("") == "cannot open the file: No such file or directory");
}

TEST_CASE("a directory is named as one, not read as an empty file") {
  const std::string dir = test::scratch_dir();
  CHECK(load_error(dir) == dir + ": error: is a directory, not a file");
  CHECK(csv_file_error(dir) == dir + ": error: is a directory, not a file");
  CHECK(unreadable(dir).value_or("") == "is a directory, not a file");
  CHECK(!unreadable(test::source_path("cars/pellion-fr2.yaml")));
}

TEST_CASE("a NUL byte makes a file binary: refused where it stands, not called empty") {
  CHECK(parse_error(std::string(3, '\0')) ==
        "x.yaml:1:1: error: a NUL byte (byte 1): not a text file");
  CHECK(parse_error(std::string("mass: 640\nname: a\0b\n", 20)) ==
        "x.yaml:2:8: error: a NUL byte (byte 18): not a text file");
  // The first of a byte that is not UTF-8 and a NUL is named.
  CHECK(parse_error(std::string("a: \xE9\0", 5)) ==
        "x.yaml:1:4: error: the text is not valid UTF-8 (byte 0xE9)");
  const std::string csv =
      test::scratch_file("input_file_nul.csv", std::string("x_m,y_m\n1,\0\n", 12));
  CHECK(csv_file_error(csv) == csv + ":2:3: error: a NUL byte (byte 11): not a text file");
}

TEST_CASE("a special file with no end is refused at once or at the cap, not read for ever") {
  // /dev/zero (POSIX: an endless source of NUL bytes): the first one refuses it.
  if (std::filesystem::exists("/dev/zero")) {
    CHECK(load_error("/dev/zero") == "/dev/zero:1:1: error: a NUL byte (byte 1): not a text file");
    CHECK(csv_file_error("/dev/zero") ==
          "/dev/zero:1:1: error: a NUL byte (byte 1): not a text file");
  }
  // A CSV line longer than the cap (1 MiB) is refused at that line.
  const std::string file = test::scratch_file(
      "input_file_long_line.csv", "x_m,y_m\n" + std::string(max_line_bytes + 1, '1') + "\n");
  CHECK(csv_file_error(file) ==
        file + ":2:1: error: the line is longer than 1 MiB (lapwing's longest " +
            "CSV row): not a CSV file of numbers");
  std::filesystem::remove(file);
}

TEST_CASE("duplicate keys, anchors, tags and syntax errors name their key path") {
  // A duplicate key under a map: the path of the key given twice.
  CHECK(parse_error("mass: 640\ntyres:\n  mu_lat: 1.7\n  mu_lat: 1.8\n") ==
        "x.yaml:4:3: error: duplicate key 'mu_lat' (first given at line 3) (tyres.mu_lat)");
  CHECK(parse_error("mass: 640\nmass: 650\n") ==
        "x.yaml:2:1: error: duplicate key 'mass' (first given at line 1) (mass)");
  // Inside a list: the item's index.
  CHECK(parse_error("segments:\n  - straight: 10\n  - {arc: 1, arc: 2}\n") ==
        "x.yaml:3:14: error: duplicate key 'arc' (first given at line 3) (segments[1].arc)");
  CHECK(parse_error("mass: &m 640\n") ==
        "x.yaml:1:7: error: YAML anchors are not accepted; write the value out (mass)");
  // An alias comes after its anchor, refused first; one of no anchor is a syntax error, which
  // names the key whose value was being read as well.
  CHECK(parse_error("a: 1\ntyres: {mu_lat: *m}\n") ==
        "x.yaml:2:17: error: YAML syntax: the referenced anchor is not defined (tyres.mu_lat)");
  CHECK(
      parse_error("tyres:\n  mu_lat: !!float 1.7\n") ==
      "x.yaml:2:11: error: YAML tags are not accepted ('tag:yaml.org,2002:float') (tyres.mu_lat)");
  // A tab in an indentation is met before the parser hands over the key above it: the path
  // comes from the indentation, and the tab is named (YAML 1.2, 6.1, from memory: tabs do not
  // indent).
  CHECK(parse_error("mass: 640\ntyres:\n\tmu_long: 1.55\n  mu_lat: 1.70\n") ==
        "x.yaml:3:9: error: YAML syntax: illegal map value; the line is indented with a tab (YAML "
        "indents with spaces) (tyres.mu_long)");
}
