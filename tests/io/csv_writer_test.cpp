// CSV writing: header and rows from one list of columns; fields quoted as RFC 4180 says.
#include <doctest/doctest.h>

#include <cmath>
#include <string>
#include <vector>

#include "lapwing/io/csv_writer.hpp"

using namespace lapwing;

namespace {
struct Row {
  std::string name;
  double value;
};
constexpr CsvColumn<Row> columns[] = {
    {"name", [](std::string& o, const Row& r) { csv_text(o, r.name); }},
    {"value", [](std::string& o, const Row& r) { csv_number(o, r.value); }},
    {"maybe", [](std::string& o, const Row& r) { csv_number_or_empty(o, r.value); }},
};
}  // namespace

TEST_CASE("a CSV's header and rows come from one list of columns") {
  CsvWriter<Row> w(columns);
  w.add({"a", 0.1});
  w.add({"b", -2.5});
  CHECK(w.take() == "name,value,maybe\na,0.1,0.1\nb,-2.5,-2.5\n");
  CHECK(csv_names<Row>(columns) == std::vector<std::string>{"name", "value", "maybe"});
}

TEST_CASE("text with a comma, quote or line break is quoted, quotes doubled (RFC 4180 sec. 2)") {
  std::string o;
  csv_text(o, "Park, North");
  CHECK(o == "\"Park, North\"");
  o.clear();
  csv_text(o, "the \"Esses\"");
  CHECK(o == "\"the \"\"Esses\"\"\"");
  o.clear();
  csv_text(o, "two\nlines");
  CHECK(o == "\"two\nlines\"");
  o.clear();
  csv_text(o, "plain");
  CHECK(o == "plain");
}

TEST_CASE("an undefined number is an empty field; a NaN elsewhere is refused") {
  std::string o;
  csv_number_or_empty(o, std::nan(""));
  CHECK(o.empty());
  CHECK_THROWS(csv_number(o, std::nan("")));
}
