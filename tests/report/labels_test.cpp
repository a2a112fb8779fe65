// The outputs' words for the library's enums, as the README documents them: the corners CSV's
// and summary.json's `limit` and `*_axle`, compare.json's `pieces[].kind`.
#include <doctest/doctest.h>

#include <string>

#include "lapwing/report/labels.hpp"

using namespace lapwing;

TEST_CASE("every corner limit, axle and piece kind has the word the README documents") {
  CHECK(label(CornerLimit::grip) == "grip");
  CHECK(label(CornerLimit::power) == "power");
  CHECK(label(CornerLimit::braking) == "braking");
  CHECK(label(Axle::front) == "front");
  CHECK(label(Axle::rear) == "rear");
  CHECK(label(Axle::both) == "both");
  CHECK(label(PieceKind::corner) == "corner");
  CHECK(label(PieceKind::straight) == "straight");
}
