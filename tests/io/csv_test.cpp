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
  // No row named: the file as a whole.
  CHECK(row_error(t, InvalidInput(t.file, broken_rule("", "no row"))).mark().line == 0);
}
