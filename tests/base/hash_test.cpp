// The inputs' hash of a results store: 64-bit FNV-1a against its authors' published test vectors.
#include <doctest/doctest.h>

#include "lapwing/base/hash.hpp"

using namespace lapwing;

TEST_CASE("FNV-1a 64 matches the published test vectors") {
  // Test vectors of the FNV reference code (Noll, "FNV hash", test_fnv.c, FNV-1a 64-bit), from
  // memory: the empty string is the offset basis itself.
  CHECK(fnv1a64("") == 0xcbf29ce484222325ull);
  CHECK(fnv1a64("a") == 0xaf63dc4c8601ec8cull);
  CHECK(fnv1a64("foobar") == 0x85944171f73967e8ull);
  CHECK(hex64(0xaf63dc4c8601ec8cull) == "af63dc4c8601ec8c");
  CHECK(hex64(0x1ull) == "0000000000000001");
}
