// The JSON writer: nesting, keys in order, numbers in their shortest round-trip form.
#include <doctest/doctest.h>

#include "lapwing/io/json.hpp"

using namespace lapwing;

TEST_CASE("the writer nests objects and arrays with keys in order") {
  JsonWriter w;
  w.begin_object().field("a", 1).key("b").begin_array().value(2.5).value("x\"y").end_array();
  w.key("c").numbers({1.0, 2.0}).key("d").begin_object().end_object().end_object();
  CHECK(w.str() ==
        "{\n  \"a\": 1,\n  \"b\": [\n    2.5,\n    \"x\\\"y\"\n  ],\n  \"c\": [1, 2],\n"
        "  \"d\": {}\n}\n");
}

TEST_CASE("JSON strings are valid UTF-8 whatever bytes they are given (issue 19, finding 10)") {
  // RFC 8259, 8.1: JSON text is UTF-8. A byte that is not valid there becomes U+FFFD.
  CHECK(json_quote("t\xE9st") == "\"t\xEF\xBF\xBDst\"");
  CHECK(json_quote("Br\xC3\xA4nnock") == "\"Br\xC3\xA4nnock\"");
  CHECK(json_quote("a\nb\x01") == "\"a\\nb\\u0001\"");
}
