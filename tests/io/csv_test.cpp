// Strict CSV reading: BOM and CRLF accepted; a rule the library finds about a row is reported at
// that row's line.
#include <doctest/doctest.h>

#include "lapwing/base/error.hpp"
#include "lapwing/io/csv.hpp"
#include "test_support.hpp"

using namespace lapwing;

TEST_CASE("CSV reading accepts a BOM and CRLF line ends") {
  const CsvTable t = read_csv(test::source_path("tests/data/good-bom-crlf.csv"));
  CHECK(t.names == std::vector<std::string>{"x_m", "y_m"});
  CHECK(t.rows() == 12);
  CHECK(t.column("x_m")[11] == 110.0);
}

TEST_CASE("a rule about row i of a table is reported at that row's file line") {
  const CsvTable t = read_csv(test::source_path("tests/data/good-bom-crlf.csv"));
  const InvalidInput e(t.file, broken_rule("", "a bad point", "x_m[3]"));
  const InputError placed = row_error(t, e);
  CHECK(placed.mark().line == t.lines[3]);
  CHECK(placed.mark().col == 1);
  CHECK(std::string(placed.what()) ==
        t.file + ":" + std::to_string(t.lines[3]) + ":1: error: a bad point");
  // No row named: the header, the nearest place (issue 19, finding 12: no error without a line).
  const InputError whole = row_error(t, InvalidInput(t.file, broken_rule("", "no row")));
  CHECK(whole.mark().line == t.header_line);
  CHECK(whole.mark().col == 1);
}

TEST_CASE("a row's error points at its column's field, read again from the file") {
  // A quoted first field with a comma inside it, and blanks: the field's first byte, counted
  // as the reading counts it (read_csv's columns; no reference beyond the file's own bytes).
  const std::string file = test::scratch_file(
      "csv_at_test.csv", "name,distance_m, speed\n\"a,b\",0,1\n\"c\",5, 2\nd,4,3\n");
  const CsvTable t = read_csv(file, 1);
  CHECK(t.at(1, "speed").line == 3);
  CHECK(t.at(1, "speed").col == 7);  // '"c",5, 2': the field ' 2' starts at its blank
  CHECK(t.at(0, "distance_m").col == 7);
  CHECK(t.at(0, "name").col == 1);
  // No such column, or no such row: the line alone (column 1), the header for a row beyond.
  CHECK(t.at(2, "no_such").col == 1);
  CHECK(t.at(9, "speed").line == t.header_line);
  try {
    require_increasing(t, "distance_m");
    FAIL("a falling distance was accepted");
  } catch (const InputError& e) {
    CHECK(e.mark().line == 4);
    CHECK(e.mark().col == 3);  // 'd,4,3'
  }
  // A library rule naming COLUMN[i] is placed at that field; a path that names no column of
  // the table (a point list), at the row's line.
  CHECK(row_error(t, InvalidInput(t.file, broken_rule("", "bad", "speed[2]"))).mark().col == 5);
  CHECK(row_error(t, InvalidInput(t.file, broken_rule("", "bad", "points[2]"))).mark().col == 1);
}

namespace {
// The error text of reading `text` as a CSV file (written to a scratch file), or "".
std::string csv_error(const std::string& text) {
  const std::string file = test::scratch_file("csv_test.csv", text);
  try {
    read_csv(file, 1);
  } catch (const InputError& e) {
    return std::string(e.what()).substr(file.size());
  }
  return "";
}
}  // namespace

TEST_CASE("a column named twice is refused at the second (issue 19, finding 12)") {
  CHECK(csv_error("x_m,y_m,x_m\n1,2,3\n") ==
        ":1:9: error: column 'x_m' is named twice (columns 1 and 3)");
  CHECK(csv_error("# survey\nx_m, x_m\n1,2\n") ==
        ":2:5: error: column 'x_m' is named twice (columns 1 and 2)");
}

TEST_CASE("a CSV byte that is not UTF-8 is refused at its line and column (issue 19, finding 10)") {
  CHECK(csv_error("x_m,y\xE9m\n1,2\n") == ":1:6: error: the text is not valid UTF-8 (byte 0xE9)");
  // After a BOM, columns still count from the file's first byte.
  CHECK(csv_error("\xEF\xBB\xBFx_m,\xFFy\n1,2\n") ==
        ":1:8: error: the text is not valid UTF-8 (byte 0xFF)");
}

TEST_CASE("an empty CSV file or one of comments alone is an error at 1:1 (issue 19, finding 12)") {
  CHECK(csv_error("") == ":1:1: error: the file is empty");
  CHECK(csv_error("# nothing but a note\n") ==
        ":1:1: error: the file has no header line (only comments)");
}

TEST_CASE("a CSV file whose lines end with a CR alone is named so at its first CR") {
  // A robustness campaign's: such a file read as one line, "no header line (only comments)"
  // where its first line was a comment, or one long header.
  const std::string want =
      "error: the lines end with a CR alone (old Mac line ends): save the file with LF or CR LF "
      "line ends";
  CHECK(csv_error("# a survey\rx_m,y_m\r1,2\r3,4\r") == ":1:11: " + want);
  CHECK(csv_error("x_m,y_m\r1,2\r3,4\r") == ":1:8: " + want);
  // CR LF line ends are lines (the BOM and CRLF file above).
  CHECK(csv_error("x_m,y_m\r\n1,2\r\n") == "");
}
