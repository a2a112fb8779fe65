// JSON numbers at full precision: the shortest text that reads back to the same double.
#include <doctest/doctest.h>

#include <cmath>
#include <cstdlib>
#include <stdexcept>

#include "lapwing/json.hpp"

using namespace lapwing;

TEST_CASE("numbers round-trip exactly through their text") {
  for (double v : {0.1, 1.0 / 3.0, 83.21400000000001, 1e-300, 6.02214076e23, -2.5, 287.1}) {
    const std::string s = format_number(v);
    CHECK(std::strtod(s.c_str(), nullptr) == v);
  }
  CHECK(format_number(0.1) == "0.1");
  CHECK(format_number(-0.0) == "0");
}

TEST_CASE("a non-finite number never reaches the output") {
  CHECK_THROWS_AS(format_number(std::nan("")), std::logic_error);
  CHECK_THROWS_AS(format_number(INFINITY), std::logic_error);
}

TEST_CASE("the writer nests objects and arrays with keys in order") {
  JsonWriter w;
  w.begin_object().field("a", 1).key("b").begin_array().value(2.5).value("x\"y").end_array();
  w.key("c").numbers({1.0, 2.0}).key("d").begin_object().end_object().end_object();
  CHECK(w.str() ==
        "{\n  \"a\": 1,\n  \"b\": [\n    2.5,\n    \"x\\\"y\"\n  ],\n  \"c\": [1, 2],\n"
        "  \"d\": {}\n}\n");
}
